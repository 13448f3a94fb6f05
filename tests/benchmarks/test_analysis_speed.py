"""On-demand speed checks: ``pytest -m benchmark tests/benchmarks -s``.

Each check reports the time of a netfolio step as a ratio to a baseline measured in the same run
on the same machine (the bare library call doing the heaviest part of the work), so the targets
hold on slow and fast machines alike."""

from __future__ import annotations

import random
import time
import tracemalloc
from pathlib import Path

import igraph as ig
import pytest

from generator.analyse import analyse_network
from generator.config import CommunitiesConfig, MeasuresConfig, load_study
from generator.ingest import read_network

pytestmark = pytest.mark.benchmark

NODES = 3000
TIES = 15000
# Full analysis (every measure, 20 community runs, statistics, layout) against one bare igraph
# betweenness pass over the same graph.
MAX_ANALYSIS_RATIO = 12.0
MAX_PEAK_MIB = 400


def _write_study(root: Path) -> Path:
    rng = random.Random(11)
    (root / "data").mkdir(parents=True)
    ties = set()
    while len(ties) < TIES:
        a, b = rng.randrange(NODES), rng.randrange(NODES)
        if a != b:
            ties.add((a, b))
    rows = ["source,target,w"] + [f"n{a},n{b},{rng.randint(1, 9)}" for a, b in sorted(ties)]
    (root / "data" / "edges.csv").write_text("\n".join(rows) + "\n")
    (root / "study.toml").write_text('[study]\ntitle = "bench"\n\n[[network]]\nid = "big"\n'
                                     'edges = "data/edges.csv"\ndirected = true\nweight = "w"\n')
    return root


def _seconds(action) -> float:
    start = time.perf_counter()
    action()
    return time.perf_counter() - start


def test_full_analysis_costs_a_bounded_multiple_of_one_betweenness_pass(tmp_path: Path) -> None:
    study = load_study(_write_study(tmp_path))
    clean = read_network(study, study.networks[0])
    pairs = [(int(s[1:]), int(t[1:])) for s, t in zip(clean.edges["source"], clean.edges["target"])]
    graph = ig.Graph(n=NODES, edges=pairs, directed=True)
    graph.es["length"] = [1.0 / w for w in clean.edges["weight"]]
    baseline = min(_seconds(lambda: graph.betweenness(weights="length")) for _ in range(3))

    def run() -> None:
        analyse_network(clean, communities=CommunitiesConfig(), measures=MeasuresConfig(), seed=1)

    ours = _seconds(run)
    tracemalloc.start()  # a second run for memory: tracing slows Python code down several times
    run()
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    ratio = ours / baseline
    print(f"\nanalysis {ours:.2f} s; baseline betweenness {baseline:.3f} s; ratio {ratio:.1f} "
          f"(target <= {MAX_ANALYSIS_RATIO}); Python peak {peak / 2**20:.0f} MiB")
    assert ratio <= MAX_ANALYSIS_RATIO
    assert peak / 2**20 <= MAX_PEAK_MIB


def test_sampled_paths_are_cheaper_than_exact_ones(tmp_path: Path) -> None:
    study = load_study(_write_study(tmp_path))
    clean = read_network(study, study.networks[0])
    exact = _seconds(lambda: analyse_network(clean, communities=CommunitiesConfig(runs=1),
                                             measures=MeasuresConfig(), seed=1))
    sampled = _seconds(lambda: analyse_network(
        clean, communities=CommunitiesConfig(runs=1),
        measures=MeasuresConfig(exact_paths_up_to=100, path_sample_sources=300), seed=1))
    print(f"\nexact paths {exact:.2f} s; 300 sampled sources {sampled:.2f} s; "
          f"ratio {sampled / exact:.2f}")
    assert sampled < exact
