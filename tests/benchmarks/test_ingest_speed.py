"""On-demand speed check of reading and cleaning: ``pytest -m benchmark
tests/benchmarks/test_ingest_speed.py -s``.

netfolio's read_network of an edge list of 10^6 ties and a node list of 10^5 nodes, timed against a
bare pandas read_csv of the same two files (every column as text, as netfolio reads them), in
the same run on the same machine."""

from __future__ import annotations

import random
import time
from pathlib import Path

import pandas as pd
import pytest

from generator.config import load_study
from generator.ingest import read_network

pytestmark = pytest.mark.benchmark

NODES = 100_000
TIES = 1_000_000
MAX_RATIO = 5.0  # read_network within about five bare reads


def write_study(root: Path, *, nodes: int = NODES, ties: int = TIES) -> Path:
    """An invented study: ties between random nodes with whole-number weights 1-20 (as counts of
    contacts are), a node list with a group, a year and a label."""
    rng = random.Random(17)
    (root / "data").mkdir(parents=True)
    with open(root / "data" / "edges.csv", "w", encoding="utf-8") as out:
        out.write("source,target,weight\n")
        out.writelines(f"p{rng.randrange(nodes)},p{rng.randrange(nodes)},{rng.randint(1, 20)}\n"
                       for _ in range(ties))
    groups = ("north", "south", "east", "west")
    with open(root / "data" / "nodes.csv", "w", encoding="utf-8") as out:
        out.write("id,group,year,label\n")
        out.writelines(f"p{i},{rng.choice(groups)},{rng.randint(1990, 2020)},Person {i}\n"
                       for i in range(nodes))
    (root / "study.toml").write_text(
        '[study]\ntitle = "bench"\n\n[[network]]\nid = "big"\nedges = "data/edges.csv"\n'
        'nodes = "data/nodes.csv"\nweight = "weight"\n', encoding="utf-8")
    return root


def _seconds(action) -> float:
    start = time.perf_counter()
    action()
    return time.perf_counter() - start


def test_reading_a_large_network_costs_a_few_bare_reads(tmp_path: Path) -> None:
    root = write_study(tmp_path)
    study = load_study(root)

    def bare() -> None:
        for name in ("edges.csv", "nodes.csv"):
            pd.read_csv(root / "data" / name, dtype=str, keep_default_na=False)

    clean = None

    def ours() -> None:
        nonlocal clean
        clean = read_network(study, study.networks[0])

    # Rounds of one bare read and one read_network, so both see the same load on the machine;
    # the fastest of each counts.
    rounds = [(_seconds(bare), _seconds(ours)) for _ in range(3)]
    baseline = min(b for b, _ in rounds)
    seconds = min(o for _, o in rounds)
    assert clean is not None and len(clean.nodes) == NODES
    ratio = seconds / baseline
    print(f"\nread_network of {TIES:,} ties and {NODES:,} nodes: {seconds:.2f} s; bare pandas "
          f"read_csv of the same files: {baseline:.2f} s; ratio {ratio:.1f} (target {MAX_RATIO})")
    assert ratio <= MAX_RATIO
