"""Reading large two-mode networks: the columnar reader gives exactly what the reader that
looped over ties and node-list rows gave, and a bad row deep in a large file is named by line,
column and value."""

from __future__ import annotations

import json
import random
import sys
from pathlib import Path

import pytest
from conftest import write_study

from generator.config import load_study
from generator.errors import DataError
from generator.ingest.two_mode import read_two_mode

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


# ---------------------------------------------------------------------------------------------
# One bad row near the end of a large file

ROWS = 200_000
TIES = "data/ties.csv"
NODES = "data/nodes.csv"


def _large_ties(bad_row: str | None = None, at: int = -1, *, seed: int = 3) -> str:
    """An author-paper edge list: 20,000 authors, 5,000 papers, weights 1-9."""
    rng = random.Random(seed)
    rows = ["author,paper,w"]
    for i in range(ROWS):
        row = f"a{rng.randrange(20_000)},p{rng.randrange(5_000)},{rng.randint(1, 9)}"
        rows.append(bad_row if i == at and bad_row is not None else row)
    return "\n".join(rows) + "\n"


def _large_study(root: Path, ties: str, nodes: str | None = None, **network: object) -> Path:
    settings = {"id": "ap", "edges": TIES, "source": "author", "target": "paper", "weight": "w",
                "two_mode": True, "modes": ["author", "paper"], **network}
    files = {TIES: ties}
    if nodes is not None:
        settings["nodes"] = NODES
        files[NODES] = nodes
    return write_study(root, networks=[settings], files=files)


def _read(root: Path):
    study = load_study(root)
    return read_two_mode(study, study.two_mode[0])


@pytest.mark.parametrize("bad_row, column, value, message", [
    ("a1,p2,heavy", "w", "heavy", "weight is not a number"),
    ("a1,p2,-3", "w", "-3", "weight is negative; netfolio reads weights as tie strengths or "
                            "distances, which cannot be below 0"),
    ("a1,p2,", "w", "", "weight is missing"),
    (",p2,4", "author", "", "a tie has an empty node id"),
    ("a1, ,4", "paper", "", "a tie has an empty node id"),
])
def test_a_bad_row_near_the_end_of_a_large_two_mode_edge_list_is_named(
        tmp_path, bad_row, column, value, message):
    at = ROWS - 9  # data row at index ``at`` is line at + 2 (the header is line 1)
    with pytest.raises(DataError) as caught:
        _read(_large_study(tmp_path, _large_ties(bad_row, at)))
    (finding,) = caught.value.findings
    assert (finding.file, finding.line, finding.column, finding.value, finding.message) == (
        TIES, at + 2, column, value, message)


def _listed(authors: int, papers: int) -> str:
    rows = ["id,mode"] + [f"a{k},author" for k in range(authors)]
    rows += [f"p{k},paper" for k in range(papers)]
    return "\n".join(rows) + "\n"


def test_a_wrong_side_id_near_the_end_of_a_large_edge_list_names_its_line(tmp_path):
    # p7 is listed as a paper (node-list line 20,000 + 7 + 2) but written as an author.
    at = ROWS - 4
    root = _large_study(tmp_path, _large_ties("p7,p3,2", at), _listed(20_000, 5_000))
    with pytest.raises(DataError) as caught:
        _read(root)
    (finding,) = caught.value.findings
    assert (finding.file, finding.line, finding.column, finding.value) == (
        TIES, at + 2, "author", "p7")
    assert finding.message == (
        f"node 'p7' is listed as a paper in {NODES} (line 20009) but appears in the author "
        "column; in a two-mode network the 'author' column holds author nodes only")


@pytest.mark.parametrize("duplicates", ["sum", "mean", "max"])
def test_a_large_two_mode_edge_list_is_cleaned_as_a_row_by_row_count_says(tmp_path, duplicates):
    # The expected network is counted here in plain Python, one row at a time; a tie's
    # repeated weights combine over the weights in ascending order, as the reader documents.
    text = _large_ties()
    rows = [line.split(",") for line in text.splitlines()[1:]]
    weights: dict[tuple[str, str], list[float]] = {}
    lines: dict[tuple[str, str], list[int]] = {}
    for number, (author, paper, weight) in enumerate(rows, start=2):
        weights.setdefault((author, paper), []).append(float(weight))
        lines.setdefault((author, paper), []).append(number)
    combine = {"sum": sum, "max": max, "mean": lambda w: sum(w) / len(w)}[duplicates]
    expected = {pair: combine(sorted(w)) for pair, w in weights.items()}
    repeated = sorted(n for listed in lines.values() if len(listed) > 1 for n in listed)
    authors = {a for a, _ in weights}
    papers = {p for _, p in weights}
    listed = _listed(21_000, 5_000)  # a20000-a20999 are in no tie

    network = _read(_large_study(tmp_path, text, listed, duplicates=duplicates))
    got = {(a, p): w for a, p, w in network.edges.itertuples(index=False)}
    assert got == expected
    # Ties in node order, each mode's ids in natural order (a2 before a10).
    assert list(zip(network.edges["first"], network.edges["second"])) == sorted(
        expected, key=lambda pair: (int(pair[0][1:]), int(pair[1][1:])))
    merged = next(f for f in network.checks.findings if "repeated tie" in f.message)
    assert (merged.count, merged.line) == (len(rows) - len(weights), repeated[0])
    assert merged.message.endswith(", ".join(str(n) for n in repeated[:20]))
    isolated = next(f for f in network.checks.findings if "with no ties" in f.message)
    no_ties = 21_000 - len(authors) + 5_000 - len(papers)
    assert isolated.count == no_ties
    assert network.nodes["mode"].value_counts().to_dict() == {"author": 21_000, "paper": 5_000}
    assert network.ids("author")[:3] == ["a0", "a1", "a2"]


def test_sums_of_runs_are_what_pythons_sum_gives():
    # Repeated ties' weights were combined by Python's built-in sum over the sorted weights;
    # the columnar reader adds the runs of all pairs at once and must give the same floats. The
    # reference is this interpreter's sum (plain left-to-right addition up to Python 3.11,
    # Neumaier's compensated addition from 3.12). When written, the compensated branch was also
    # checked against Python 3.12.1's sum on 3,000 such runs, all equal.
    import math

    import numpy as np

    from generator.ingest.two_mode import _python_sums

    rng = random.Random(8)
    pieces = [0.1, 0.2, 0.3, 0.7, 1.0, 3.0, 1e-3, 1e16, 7.7, 2.5e-17, 1e308]
    runs = [[rng.choice(pieces) * rng.choice([1, 3]) for _ in range(rng.randint(1, 40))]
            for _ in range(2000)] + [[0.1] * 5000]  # one pair listed 5,000 times
    values = np.array([v for run in runs for v in run])
    starts = np.cumsum([0] + [len(run) for run in runs][:-1])
    got = _python_sums(values, starts)
    assert got.tolist() == [sum(run) for run in runs]
    plain = _python_sums(values, starts, compensated=False)
    assert plain.tolist() == [_left_to_right(run) for run in runs]
    # The way of adding shows in the last digits: exactly rounded sums differ from these.
    assert sum(p != math.fsum(run) for p, run in zip(plain.tolist(), runs)
               if max(run) < 1e300) > 100  # (1e308 is there for sums that overflow)


def _left_to_right(run: list[float]) -> float:
    total = 0.0
    for value in run:
        total += value
    return total


def _large_matrix(rows: int, columns: int, bad: tuple[int, int, str] | None = None
                  ) -> tuple[str, list[tuple[str, str, str]]]:
    """An incidence matrix of people by events (cells 0, 1 or 2) and its ties row by row."""
    rng = random.Random(6)
    lines = [",".join(["id"] + [f"e{j}" for j in range(columns)])]
    ties = []
    for i in range(rows):
        cells = [rng.choice("0000012") for _ in range(columns)]
        if bad is not None and bad[0] == i:
            cells[bad[1]] = bad[2]
        lines.append(",".join([f"p{i}"] + cells))
        ties += [(f"p{i}", f"e{j}", cell) for j, cell in enumerate(cells) if cell != "0"]
    return "\n".join(lines) + "\n", ties


def test_a_bad_cell_near_the_end_of_a_large_incidence_matrix_is_named(tmp_path):
    text, _ = _large_matrix(3000, 100, bad=(2990, 57, "yes"))
    root = write_study(tmp_path, networks=[{"id": "m", "matrix": "data/m.csv", "two_mode": True}],
                       files={"data/m.csv": text})
    with pytest.raises(DataError) as caught:
        _read(root)
    (finding,) = caught.value.findings
    assert (finding.file, finding.line, finding.column, finding.value) == (
        "data/m.csv", 2992, "e57", "yes")
    assert finding.message == ("an incidence-matrix cell must be a number (0 for no tie, or the "
                               "tie's weight)")


def test_a_large_incidence_matrix_equals_the_edge_list_of_its_ties(tmp_path):
    text, ties = _large_matrix(3000, 100)
    matrix = write_study(tmp_path / "m", networks=[{
        "id": "m", "matrix": "data/m.csv", "two_mode": True}], files={"data/m.csv": text})
    edges = write_study(tmp_path / "e", networks=[{
        "id": "m", "edges": "data/e.csv", "weight": "w", "two_mode": True}],
        files={"data/e.csv": "\n".join(["source,target,w"] + [",".join(t) for t in ties])
               + "\n"})
    from_matrix, from_edges = _read(matrix), _read(edges)
    assert from_matrix.weighted and len(from_matrix.edges) == len(ties)
    assert from_matrix.edges.equals(from_edges.edges)
    assert from_matrix.nodes.equals(from_edges.nodes)
