"""On-demand speed check of a study of many small networks, built with one and two workers:
``pytest -m benchmark tests/benchmarks/many_networks.py -s`` (or run this file with Python).

A generated study of NETWORKS networks of 20 to 120 nodes (invented clinics' referral ties,
each with a node list naming the clinic's region). Measured: seconds per network of a fresh
build at ``--jobs 1`` and ``--jobs 2``, the speedup, where the time goes by stage, and the
per-network overhead of a one-job build beyond the bare igraph and matplotlib work for the same
networks (the same measures, community runs and layout called on igraph directly, and as many
figures of the same size, each saved as SVG and PNG). Targets: speedup at least MIN_SPEEDUP on
two cores; overhead at most MAX_OVERHEAD.

Rewired-network tests and perturbed reruns are off (``null_samples = 0``, ``perturbations =
0``): they multiply the analysis of each network and would hide the per-network costs this
benchmark is about; the analysis speed benchmark covers them."""

from __future__ import annotations

import io
import os
import random
import sys
import time
from pathlib import Path

import igraph as ig
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from generator.build import BuildResult, Workers, build_study
from generator.config import load_study
from generator.ingest import read_network

pytestmark = pytest.mark.benchmark

NETWORKS = 300
SMALLEST, LARGEST = 20, 120
MIN_SPEEDUP = 1.6
MAX_OVERHEAD = 0.5
REGIONS = ("north", "south", "east", "west")


def write_study(root: Path, networks: int = NETWORKS) -> Path:
    """NETWORKS referral networks among invented clinics, three ties per clinic on average,
    most of them inside the clinic's region."""
    rng = random.Random(3)
    (root / "data").mkdir(parents=True)
    parts = ['[study]\ntitle = "Clinic referral networks"\n',
             "[communities]\nperturbations = 0\n", "[significance]\nnull_samples = 0\n"]
    for index in range(networks):
        n = rng.randint(SMALLEST, LARGEST)
        region = [REGIONS[rng.randrange(len(REGIONS))] for _ in range(n)]
        ties: set[tuple[int, int]] = set()
        while len(ties) < 3 * n // 2:
            a, b = rng.randrange(n), rng.randrange(n)
            if a != b and (region[a] == region[b] or rng.random() < 0.2):
                ties.add((min(a, b), max(a, b)))
        rows = ["source,target,referrals"]
        rows += [f"c{a},c{b},{rng.randint(1, 6)}" for a, b in sorted(ties)]
        (root / "data" / f"referrals_{index}.csv").write_text("\n".join(rows) + "\n")
        nodes = ["id,region"] + [f"c{i},{region[i]}" for i in range(n)]
        (root / "data" / f"clinics_{index}.csv").write_text("\n".join(nodes) + "\n")
        parts.append(f'[[network]]\nid = "area-{index}"\ntitle = "Referrals, area {index}"\n'
                     f'edges = "data/referrals_{index}.csv"\nnodes = "data/clinics_{index}.csv"\n'
                     'weight = "referrals"\n')
    (root / "study.toml").write_text("\n".join(parts))
    return root


def _build(study: Path, jobs: int) -> tuple[float, BuildResult]:
    start = time.perf_counter()
    result = build_study(study, output=study.parent / f"site-{jobs}", fresh=True,
                         workers=Workers(jobs=jobs))
    return time.perf_counter() - start, result


def _bare_figure(values: list[float]) -> None:
    figure = Figure(figsize=(6.4, 3.6), dpi=100)
    FigureCanvasAgg(figure)
    figure.add_subplot().hist(values, bins=20)
    for kind in ("svg", "png"):
        figure.savefig(io.BytesIO(), format=kind, dpi=150)


def _bare_map(graph: ig.Graph, layout: list[list[float]]) -> None:
    figure = Figure(figsize=(7.5, 6.0), dpi=100)
    FigureCanvasAgg(figure)
    ax = figure.add_subplot()
    for a, b in graph.get_edgelist():
        ax.plot([layout[a][0], layout[b][0]], [layout[a][1], layout[b][1]], lw=0.6, c="grey")
    ax.scatter([p[0] for p in layout], [p[1] for p in layout], s=graph.degree())
    for kind in ("svg", "png"):
        figure.savefig(io.BytesIO(), format=kind, dpi=150)


def bare_seconds(study: Path, figures_per_network: float) -> float:
    """The bare igraph and matplotlib work for every network: the measures, 20 modularity
    runs of Leiden and a force-directed layout on igraph, then a map and as many histograms as
    netfolio draws, each saved as SVG and PNG."""
    config = load_study(study)
    cleaned = [read_network(config, net) for net in config.networks]
    start = time.perf_counter()
    for clean in cleaned:
        index = {node: i for i, node in enumerate(clean.nodes.index)}
        pairs = [(index[s], index[t]) for s, t in zip(clean.edges["source"], clean.edges["target"])]
        graph = ig.Graph(n=len(index), edges=pairs)
        strength = [float(w) for w in clean.edges["weight"]]
        length = [1.0 / w for w in strength]
        measures = [graph.degree(), graph.strength(weights=strength),
                    graph.betweenness(weights=length), graph.closeness(weights=length),
                    graph.harmonic_centrality(weights=length),
                    graph.eigenvector_centrality(weights=strength),
                    graph.pagerank(weights=strength), graph.coreness(),
                    graph.transitivity_local_undirected(mode="zero")]
        random.seed(1)
        for _ in range(20):
            graph.community_leiden(objective_function="modularity", weights=strength)
        layout = graph.layout_fruchterman_reingold(weights=strength).coords
        _bare_map(graph, layout)
        for number in range(round(figures_per_network) - 1):
            _bare_figure(measures[number % len(measures)])
    return time.perf_counter() - start


def run(root: Path, networks: int = NETWORKS) -> dict[str, float]:
    study = write_study(root / "study", networks)
    one, first = _build(study, 1)
    two, second = _build(study, 2)
    same = (study.parent / "site-1" / "manifest.json").read_bytes() == (
        study.parent / "site-2" / "manifest.json").read_bytes()
    figures = sum(1 for p in (study.parent / "site-1" / "networks").rglob("*.svg")) / networks
    bare = bare_seconds(study, figures)
    figures_work = {"analyse": first.timings["analyse"], "draw": first.timings["draw"]}
    print(f"\n{networks} networks of {SMALLEST}-{LARGEST} nodes, {figures:.0f} figures each; "
          f"{os.cpu_count()} cores; load average before: {os.getloadavg()[0]:.1f}")
    print(f"--jobs 1: {one:.1f} s, {one / networks * 1000:.1f} ms per network")
    print(f"--jobs 2: {two:.1f} s, {two / networks * 1000:.1f} ms per network")
    speedup = one / two
    print(f"speedup {speedup:.2f} (target >= {MIN_SPEEDUP})")
    overhead = one / bare - 1
    print(f"bare igraph + matplotlib: {bare:.1f} s, {bare / networks * 1000:.1f} ms per network; "
          f"overhead of a one-job build {overhead:.0%} (target <= {MAX_OVERHEAD:.0%})")
    for label, result, total in (("--jobs 1", first, one), ("--jobs 2", second, two)):
        stages = ", ".join(f"{name} {seconds:.1f} s" for name, seconds in result.timings.items())
        print(f"stages at {label} (total {total:.1f} s): {stages}")
    print(f"per network at --jobs 1: analyse {figures_work['analyse'] / networks * 1000:.1f} ms, "
          f"draw {figures_work['draw'] / networks * 1000:.1f} ms")
    print(f"sites at --jobs 1 and 2 byte-identical: {same}")
    return {"one": one, "two": two, "speedup": speedup, "overhead": overhead, "same": same}


def test_many_small_networks_build_faster_on_two_workers(tmp_path: Path) -> None:
    measured = run(tmp_path)
    assert measured["same"]
    assert measured["speedup"] >= MIN_SPEEDUP
    assert measured["overhead"] <= MAX_OVERHEAD


if __name__ == "__main__":
    import tempfile

    with tempfile.TemporaryDirectory() as folder:
        run(Path(folder), int(sys.argv[1]) if len(sys.argv) > 1 else NETWORKS)
    sys.exit(0)
