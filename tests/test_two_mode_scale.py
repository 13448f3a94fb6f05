"""Reading large two-mode networks: the columnar reader gives exactly what the reader that
looped over ties and node-list rows gave, and a bad row deep in a large file is named by line,
column and value."""

from __future__ import annotations

import json
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent / "fixtures"))
import two_mode_cases  # noqa: E402


def test_reading_gives_what_the_tie_by_tie_reader_recorded():
    # two_mode_before.json was recorded by the reader that looped over ties and node-list rows
    # in Python (see tests/fixtures/two_mode_cases.py): 175 invented two-mode studies, edge lists
    # and incidence matrices, CSV and Parquet, with their nodes, edges, dtypes, findings and
    # refusals.
    recorded = json.loads(two_mode_cases.RECORDED.read_text())
    now = json.loads(json.dumps(two_mode_cases.summaries()))
    assert len(now) == len(recorded) == len(two_mode_cases.CASES)
    for i, (before, after) in enumerate(zip(recorded, now)):
        assert after == before, (i, two_mode_cases.CASES[i])
