"""On-demand speed checks of rebuilding: ``pytest -m benchmark tests/benchmarks -s``.

One study with one network of 20,000 nodes and 100,000 ties. Measured in one run: the full build,
a build with nothing changed, a note edit until the new page is on disk (through the in-process
rebuilder the preview uses), and a note edit until ``netfolio watch`` serves the new page (polling
``/.netfolio/state``). Each is printed in seconds and as a ratio to the full build; the targets
are absolute, as a person waits for them: a note edit within 1 s and a no-change build within
0.5 s."""

from __future__ import annotations

import json
import random
import re
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

from generator.build import Progress, Rebuilder, build_study

pytestmark = pytest.mark.benchmark

NODES = 20_000
TIES = 100_000
GROUPS = 40
MAX_NOTE_EDIT_SECONDS = 1.0
MAX_NO_CHANGE_SECONDS = 0.5


def _write_study(root: Path) -> Path:
    """A directed weighted network of GROUPS units, four in five ties inside a unit."""
    rng = random.Random(5)
    size = NODES // GROUPS
    ties: set[tuple[int, int]] = set()
    while len(ties) < TIES:
        a = rng.randrange(NODES)
        b = (a // size) * size + rng.randrange(size) if rng.random() < 0.8 else rng.randrange(NODES)
        if a != b:
            ties.add((a, b))
    (root / "data").mkdir(parents=True)
    (root / "notes").mkdir()
    rows = ["source,target,w"] + [f"p{a},p{b},{rng.randint(1, 5)}" for a, b in sorted(ties)]
    (root / "data" / "edges.csv").write_text("\n".join(rows) + "\n")
    nodes = ["id,unit"] + [f"p{i},u{i // size}" for i in range(NODES)]
    (root / "data" / "nodes.csv").write_text("\n".join(nodes) + "\n")
    (root / "notes" / "about.md").write_text("# About\n\nFirst version.\n")
    (root / "study.toml").write_text(
        '[study]\ntitle = "Large invented study"\n\n[[network]]\nid = "big"\n'
        'edges = "data/edges.csv"\nnodes = "data/nodes.csv"\ndirected = true\nweight = "w"\n')
    return root


def _seconds(action) -> float:
    start = time.perf_counter()
    action()
    return time.perf_counter() - start


def test_rebuilds_after_no_change_and_after_a_note_edit_are_quick(tmp_path: Path) -> None:
    root = _write_study(tmp_path / "study")
    out = tmp_path / "site"
    full = _seconds(lambda: build_study(root, output=out, progress=Progress(), fresh=True))
    no_change = _seconds(lambda: build_study(root, output=out, progress=Progress()))

    rebuilder = Rebuilder(root, output=out, progress=Progress())
    rebuilder.build()  # the preview's first build: results now held in memory

    def edit_note() -> None:
        (root / "notes" / "about.md").write_text("# About\n\nSecond version.\n")
        rebuilder.build()
        assert "Second version." in (out / "notes" / "about.html").read_text()

    note_edit = _seconds(edit_note)
    served = _served_note_edit(root)
    print(f"\nfull build {full:.1f} s; no-change build {no_change:.2f} s "
          f"({no_change / full:.4f} of full); note edit {note_edit:.2f} s "
          f"({note_edit / full:.4f} of full); note edit served by watch {served:.2f} s "
          f"({served / full:.4f} of full)")
    assert no_change <= MAX_NO_CHANGE_SECONDS
    assert note_edit <= MAX_NOTE_EDIT_SECONDS
    assert served <= MAX_NOTE_EDIT_SECONDS


def _get(url: str) -> bytes:
    with urllib.request.urlopen(url, timeout=10) as response:
        data: bytes = response.read()
        return data


def _served_note_edit(root: Path) -> float:
    """Seconds from saving a note to ``watch`` serving the page with the new words."""
    watch = subprocess.Popen([sys.executable, "-m", "generator", "watch", str(root), "--port",
                              "0", "--quiet"], stdout=subprocess.PIPE, stderr=subprocess.DEVNULL,
                             text=True)
    try:
        assert watch.stdout is not None
        line = watch.stdout.readline()
        url = re.fullmatch(r"serving (\S+)", line.strip())
        assert url, line
        base = url.group(1)

        def builds() -> int:
            state = json.loads(_get(base + ".netfolio/state"))
            return int(state["build"]) if state["ok"] else -1

        while builds() < 1:  # the first build (from the cache) and its results in memory
            time.sleep(0.1)
        before = builds()
        start = time.perf_counter()
        (root / "notes" / "about.md").write_text("# About\n\nThird version.\n")
        while builds() <= before or b"Third version." not in _get(base + "notes/about.html"):
            time.sleep(0.02)
        return time.perf_counter() - start
    finally:
        watch.terminate()
        watch.wait(timeout=30)
