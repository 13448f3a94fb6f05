"""Path statistics of large networks from sampled sources (generator/analyse/paths.py): the
average path length as a ratio estimate with its standard error, the diameter as a lower bound,
their accuracy against exact all-pairs values from igraph, and how pages and files show them.

Outside references: igraph's exact all-pairs ``betweenness``, ``average_path_length`` and
``diameter`` (``unconn=True``: over the pairs joined by a path), networkx's shortest paths;
Cochran, W. G. (1977), Sampling Techniques, 3rd ed., ch. 6 (the ratio estimator and its
variance); Magnien, Latapy & Habib (2009), Fast computation of empirically tight bounds for the
diameter of massive graphs (double sweeps; exact on trees, as they recall from Handler 1973 --
from memory)."""

from __future__ import annotations

import csv
import io
import itertools
import json
import random
import statistics as stats

import igraph as ig
import networkx as nx
import numpy as np
import pandas as pd
import pytest
from conftest import (
    analyse_graph,
    csv_text,
    directed_weighted_graph,
    distance_graph,
    karate_graph,
    write_study,
)

from generator.analyse import Statistic
from generator.analyse.measures import node_measures
from generator.analyse.paths import (
    SourcePaths,
    diameter_lower_bound,
    mean_path_length,
    source_paths,
)
from generator.analyse.statistics import LOWER_BOUND, SAMPLED, network_statistics
from generator.config import DEFAULT_PATH_SAMPLE_SOURCES

EXACT = dict(rel=1e-9, abs=1e-12)


def _stat(statistics, name: str) -> Statistic:
    found = [s for s in statistics if s.name == name]
    assert len(found) == 1, name
    return found[0]


def _graph(nx_graph: nx.Graph) -> ig.Graph:
    nodes = list(nx_graph.nodes)
    at = {v: i for i, v in enumerate(nodes)}
    graph = ig.Graph(n=len(nodes), edges=[(at[u], at[v]) for u, v in nx_graph.edges],
                     directed=nx_graph.is_directed())
    graph.vs["name"] = [str(v) for v in nodes]
    return graph


def _subset(full: SourcePaths, chosen: tuple[int, ...]) -> SourcePaths:
    """The rows of ``chosen`` sources out of the rows of every node as a source."""
    return SourcePaths(nodes=full.nodes, sources=tuple(full.sources[i] for i in chosen),
                       reached=tuple(full.reached[i] for i in chosen),
                       total=tuple(full.total[i] for i in chosen),
                       longest=tuple(full.longest[i] for i in chosen),
                       farthest=tuple(full.farthest[i] for i in chosen))


# ---------------------------------------------------------------------------------------------
# The estimators on small graphs


def test_the_path_statistics_reuse_the_rows_of_the_node_path_measures():
    graph = _graph(karate_graph())
    measured = node_measures(graph, weighted=False, exact_up_to=10, sample_sources=7, seed=4)
    sources = sorted(random.Random(4).sample(range(34), 7))  # as node_measures draws them
    assert measured.paths == source_paths(graph, sources, None)
    assert measured.paths.sources == tuple(sources)
    # networkx's BFS from each source: how many others it reaches, their total distance, and
    # the longest distance (Zachary's karate club is connected: 33 reached from every source).
    reference = karate_graph()
    for s, reached, total, longest in zip(sources, measured.paths.reached, measured.paths.total,
                                          measured.paths.longest):
        lengths = nx.single_source_shortest_path_length(reference, str(s))
        assert reached == 33
        assert total == sum(lengths.values())
        assert longest == max(lengths.values())


def test_the_ratio_estimate_is_unbiased_over_every_sample_of_a_connected_graph():
    # Cochran (1977) ch. 6: with x_s constant (every source reaches the other n - 1 nodes of a
    # connected graph) the ratio estimator is the sample mean of y_s / (n - 1), which is exactly
    # unbiased; the average over all C(12, 4) samples must equal igraph's all-pairs mean.
    nx_graph = nx.connected_watts_strogatz_graph(12, 4, 0.3, seed=5)
    graph = _graph(nx_graph)
    exact = graph.average_path_length(unconn=True)
    full = source_paths(graph, list(range(12)), None)
    estimates = [mean_path_length(_subset(full, c)).value
                 for c in itertools.combinations(range(12), 4)]
    assert len(estimates) == 495
    assert stats.fmean(estimates) == pytest.approx(exact, **EXACT)


def test_the_ratio_estimate_of_a_network_of_parts_is_nearly_unbiased_and_its_error_is_right():
    # Two parts (8 and 4 nodes): sources in the small part reach fewer nodes, so the ratio
    # estimator has the small bias of order 1/k that Cochran (1977, ch. 6) describes. Over all
    # C(12, k) samples, the bias stays a small part of the spread, and Cochran's standard error
    # approximates the true spread of the estimates over samples.
    nx_graph = nx.disjoint_union(nx.path_graph(8), nx.cycle_graph(4))
    nx_graph.add_edges_from([(0, 3), (2, 6)])
    graph = _graph(nx_graph)
    exact = graph.average_path_length(unconn=True)
    full = source_paths(graph, list(range(12)), None)
    for k in (4, 6, 8):
        found = [mean_path_length(_subset(full, c)) for c in itertools.combinations(range(12), k)]
        values = [f.value for f in found]
        spread = stats.pstdev(values)
        assert abs(stats.fmean(values) - exact) < 0.1 * spread, k
        mean_error = stats.fmean(f.standard_error for f in found)
        assert mean_error == pytest.approx(spread, rel=0.25), k


def test_the_mean_over_many_seeds_approaches_the_exact_value(tmp_path):
    # The estimate of the pipeline itself, 300 seeds of 6 sources of Zachary's karate club,
    # against igraph's exact mean: within three standard errors of the mean of the seeds.
    graph = _graph(karate_graph())
    exact = graph.average_path_length(unconn=True)
    values = []
    for seed in range(300):
        measured = node_measures(graph, weighted=False, exact_up_to=10, sample_sources=6,
                                 seed=seed)
        values.append(mean_path_length(measured.paths).value)
    assert abs(stats.fmean(values) - exact) < 3 * stats.stdev(values) / len(values) ** 0.5
    assert len(set(values)) > 50  # the seeds drew different sources


@pytest.mark.parametrize("case", ["undirected", "directed_weighted", "distance"])
def test_sampling_every_node_reproduces_the_exact_statistics(tmp_path, case):
    graph = {"undirected": karate_graph, "directed_weighted": directed_weighted_graph,
             "distance": distance_graph}[case]()
    weight = {"undirected": {}, "directed_weighted": {"weight": "weight"},
              "distance": {"weight": "weight", "weight_means": "distance"}}[case]
    exact = analyse_graph(tmp_path / "exact", graph, runs=2, **weight)
    sampled = analyse_graph(tmp_path / "sampled", graph, runs=2, exact_up_to=2,
                            sample_sources=10_000, **weight)
    assert exact.sampling is None and sampled.sampling is not None
    assert sampled.sampling.sources == graph.number_of_nodes()
    for name in ("diameter", "average_path_length"):
        known, found = _stat(exact.statistics, name), _stat(sampled.statistics, name)
        assert known.estimate is None and known.standard_error is None
        assert found.value == pytest.approx(known.value, **EXACT)
        assert (found.steps is None) == (known.steps is None)
        if known.steps is not None:
            assert found.steps == pytest.approx(known.steps, **EXACT)
    apl = _stat(sampled.statistics, "average_path_length")
    assert apl.estimate == SAMPLED and apl.standard_error == 0.0  # every node: no sampling error
    assert _stat(sampled.statistics, "diameter").estimate == LOWER_BOUND
    if weight:
        assert apl.steps_standard_error == 0.0
    # the exact values themselves are checked against networkx in test_statistics.py


def test_the_diameter_bound_is_a_real_distance_and_never_above_the_diameter():
    rng = random.Random(8)
    for trial in range(30):
        directed = trial % 2 == 1
        nx_graph = nx.gnm_random_graph(40, 60, seed=trial, directed=directed)
        graph = _graph(nx_graph)
        lengths = [rng.choice((0.5, 1.0, 2.0, 3.5)) for _ in range(graph.ecount())]
        for weights in (None, lengths):
            exact = graph.diameter(directed=directed, unconn=True, weights=weights)
            sources = sorted(random.Random(trial).sample(range(40), 2))
            bound = diameter_lower_bound(graph, source_paths(graph, sources, weights), weights)
            assert 0 < bound <= exact
            distances = np.array(graph.distances(weights=weights), dtype=float)
            assert bound in set(distances[np.isfinite(distances)].tolist())


def test_double_sweeps_find_the_exact_diameter_of_a_tree():
    # Magnien, Latapy & Habib (2009): on a tree, a search from the far end of a first search
    # finds the diameter (Handler 1973; from memory). One sampled source is enough.
    for seed in range(10):
        tree = nx.random_labeled_tree(60, seed=seed) if hasattr(nx, "random_labeled_tree") \
            else nx.random_tree(60, seed=seed)
        graph = _graph(tree)
        paths = source_paths(graph, [seed], None)
        assert diameter_lower_bound(graph, paths, None) == nx.diameter(tree)
        assert diameter_lower_bound(graph, paths, None, sweeps=0) <= nx.diameter(tree)


def test_no_sampled_source_with_a_tie_leaves_the_path_statistics_undefined():
    graph = ig.Graph(n=6, edges=[(0, 1)])
    graph.vs["name"] = [f"v{i}" for i in range(6)]
    # seed 5 draws two sources among the four isolates
    measured = node_measures(graph, weighted=False, exact_up_to=2, sample_sources=2, seed=5)
    assert 0 not in measured.paths.sources and 1 not in measured.paths.sources
    found = network_statistics(graph, weighted=False, betweenness=[0.0] * 6,
                               attributes=pd.DataFrame(index=range(6)), modularity=None,
                               communities=5, paths=measured.paths)
    for name in ("diameter", "average_path_length"):
        assert (_stat(found, name).value, _stat(found, name).why) == (None, "no_sampled_paths")


# ---------------------------------------------------------------------------------------------
# Accuracy at 5,000 nodes (the default number of sources)


def skewed_communities(n: int, m: int, groups: int, seed: int, inside: float = 0.9) -> ig.Graph:
    """An invented network: Pareto-distributed node weights (exponent 2.1, so a few hubs), each
    node in one of ``groups`` communities; each tie starts at a node drawn by weight and ends,
    with probability ``inside``, at a node of its community drawn by weight, else anywhere."""
    rng = np.random.default_rng(seed)
    weight = rng.pareto(2.1, n) + 1.0
    community = rng.integers(0, groups, n)
    anywhere = np.cumsum(weight) / weight.sum()
    members = [np.flatnonzero(community == g) for g in range(groups)]
    within = [np.cumsum(weight[p]) / weight[p].sum() for p in members]
    edges: set[tuple[int, int]] = set()
    while len(edges) < m:
        starts = np.minimum(np.searchsorted(anywhere, rng.random(m)), n - 1)
        inner = rng.random(m) < inside
        draws = rng.random(m)
        for u, stay, x in zip(starts, inner, draws):
            if stay:
                c = community[u]
                v = members[c][min(np.searchsorted(within[c], x), len(members[c]) - 1)]
            else:
                v = min(np.searchsorted(anywhere, x), n - 1)
            if u != v:
                edges.add((int(min(u, v)), int(max(u, v))))
            if len(edges) == m:
                break
    graph = ig.Graph(n=n, edges=sorted(edges))
    graph.vs["name"] = [f"n{i}" for i in range(n)]
    return graph


@pytest.fixture(scope="module")
def large():
    graph = skewed_communities(5000, 25_000, 10, seed=13)
    measured = node_measures(graph, weighted=False, exact_up_to=1000,
                             sample_sources=DEFAULT_PATH_SAMPLE_SOURCES, seed=1)
    found = network_statistics(graph, weighted=False,
                               betweenness=list(measured.table["betweenness"]),
                               attributes=pd.DataFrame(index=range(5000)), modularity=None,
                               communities=10, paths=measured.paths)
    return graph, measured, found


def test_sampled_betweenness_ranks_nodes_as_the_exact_one_does(large):
    graph, measured, _ = large
    assert measured.sampling.sources == DEFAULT_PATH_SAMPLE_SOURCES
    exact = pd.Series(graph.betweenness())  # igraph, every source (Brandes 2001)
    sampled = pd.Series(measured.table["betweenness"].to_numpy())
    assert sampled.corr(exact, method="spearman") >= 0.95
    top = set(exact.sort_values(ascending=False, kind="stable").index[:10])
    sampled_top = set(sampled.sort_values(ascending=False, kind="stable").index[:10])
    assert len(top & sampled_top) >= 8


def test_sampled_average_path_length_is_within_two_percent(large):
    graph, _, found = large
    exact = graph.average_path_length(unconn=True)  # igraph, all pairs
    apl = _stat(found, "average_path_length")
    assert apl.estimate == SAMPLED
    assert apl.value == pytest.approx(exact, rel=0.02)
    assert 0 < apl.standard_error < 0.01 * exact
    assert abs(apl.value - exact) < 4 * apl.standard_error  # the error is of the size it says


def test_the_diameter_bound_is_not_above_the_exact_diameter(large):
    graph, _, found = large
    exact = graph.diameter(unconn=True)  # igraph, all pairs
    diameter = _stat(found, "diameter")
    assert diameter.estimate == LOWER_BOUND
    assert exact - 1 <= diameter.value <= exact


def test_betweenness_centralization_of_a_sampled_network_is_marked_as_sampled(large):
    _, _, found = large
    assert _stat(found, "betweenness_centralization").estimate == SAMPLED
    assert _stat(found, "density").estimate is None


# ---------------------------------------------------------------------------------------------
# Pages and files


def _waves(root, *, exact_up_to: int):
    first = csv_text(("source", "target"), [("a", "b"), ("b", "c"), ("c", "d"), ("d", "e"),
                                            ("e", "f"), ("f", "g"), ("g", "a")])
    second = csv_text(("source", "target"), [("a", "b"), ("b", "c"), ("c", "d"), ("d", "e"),
                                             ("e", "f"), ("f", "g"), ("g", "h"), ("h", "a"),
                                             ("a", "e")])
    return write_study(root, networks=[
        {"id": "one", "title": "Wave one", "edges": "data/one.csv", "series": "team", "wave": 1},
        {"id": "two", "title": "Wave two", "edges": "data/two.csv", "series": "team", "wave": 2},
    ], files={"data/one.csv": first, "data/two.csv": second},
        tables={"measures": {"exact_paths_up_to": exact_up_to, "path_sample_sources": 3}})


def _rows(path) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(path.read_text("utf-8"))))


def rows_of(path) -> dict[str, dict[str, str]]:
    return {row["statistic"]: row for row in _rows(path)}


@pytest.fixture(scope="module")
def mixed(tmp_path_factory):
    """Wave one (7 nodes) exact, wave two (8 nodes) from 3 sampled sources."""
    from generator.build import build_study

    root = _waves(tmp_path_factory.mktemp("mixed"), exact_up_to=7)
    return build_study(root).output


def test_pages_show_the_bound_and_the_standard_error(mixed):
    rows = {r["statistic"]: r for r in _rows(mixed / "files/two/statistics.csv")}
    assert list(rows["density"]) == ["statistic", "value", "standard_error", "estimate"]
    assert rows["density"]["estimate"] == "exact" and rows["density"]["standard_error"] == ""
    assert rows["diameter"]["estimate"] == "lower bound from 3 sampled sources, seed 1"
    apl = rows["average_path_length"]
    assert apl["estimate"] == "sampled from 3 sources, seed 1"
    assert float(apl["standard_error"]) > 0
    page = (mixed / "networks/two/index.html").read_text("utf-8")
    assert f'<td class="num">at least {rows["diameter"]["value"]}</td>' in page
    assert "(SE " in page and "the diameter is at least this and may be larger" in page
    compare = (mixed / "compare/team.html").read_text("utf-8")
    assert f"at least {rows['diameter']['value']}" in compare
    index = (mixed / "index.html").read_text("utf-8")
    assert f"at least {rows['diameter']['value']}</td>" in index
    methods = (mixed / "methods.html").read_text("utf-8")
    assert "estimated from the shortest paths out of the same 3 sampled source nodes (seed 1)" \
        in methods
    assert "Magnien, C., Latapy, M. &amp; Habib, M." in methods and "Cochran, W. G." in methods


def test_the_exact_wave_keeps_its_two_columns_and_the_study_table_marks_the_estimates(mixed):
    assert (mixed / "files/one/statistics.csv").read_text("utf-8").startswith(
        "statistic,value\nnodes,7\n")
    study = _rows(mixed / "files/study-statistics.csv")
    header = list(study[0])
    at = header.index("diameter")
    assert header[at:at + 5] == ["diameter", "diameter_estimate", "average_path_length",
                                 "average_path_length_standard_error",
                                 "average_path_length_estimate"]
    one, two = study
    assert one["diameter_estimate"] == "exact" and one["average_path_length_standard_error"] == ""
    assert two["diameter_estimate"] == "lower bound from 3 sampled sources, seed 1"
    assert two["average_path_length_estimate"] == "sampled from 3 sources, seed 1"
    assert "density_estimate" not in header  # exact in every network
    assert "betweenness_centralization_estimate" in header
    package = json.loads((mixed / "files/datapackage.json").read_text("utf-8"))
    resources = {r["name"]: r for r in package["resources"]}
    assert [f["name"] for f in resources["two-statistics"]["schema"]["fields"]] == [
        "statistic", "value", "standard_error", "estimate"]
    assert [f["name"] for f in resources["one-statistics"]["schema"]["fields"]] == [
        "statistic", "value"]
    waves = {f["name"]: f["description"]
             for f in resources["series-team-statistics"]["schema"]["fields"]}
    assert "two_estimate says so" in waves["two"]
    assert "says so" not in waves["one"]
    assert list(waves)[:5] == ["statistic", "one", "two", "two_standard_error", "two_estimate"]
    # The series table carries the sampled wave's standard errors and estimates as its own
    # statistics.csv writes them.
    series = {r["statistic"]: r for r in _rows(mixed / "files/series/team/statistics.csv")}
    assert list(series["diameter"]) == ["statistic", "one", "two", "two_standard_error",
                                        "two_estimate"]
    for name, row in rows_of(mixed / "files/two/statistics.csv").items():
        assert (series[name]["two"], series[name]["two_standard_error"],
                series[name]["two_estimate"]) == (row["value"], row["standard_error"],
                                                  row["estimate"])
    study_fields = {f["name"] for f in resources["study-statistics"]["schema"]["fields"]}
    assert {"diameter_estimate", "average_path_length_standard_error"} <= study_fields
    import frictionless

    report = frictionless.validate(str(mixed / "files/datapackage.json"))
    assert report.valid, report.flatten(["rowNumber", "fieldName", "message"])


def test_a_study_of_exact_networks_writes_no_estimate_columns(tmp_path):
    from generator.build import build_study

    site = build_study(_waves(tmp_path / "study", exact_up_to=5000)).output
    assert (site / "files/two/statistics.csv").read_text("utf-8").startswith(
        "statistic,value\n")
    header = (site / "files/study-statistics.csv").read_text("utf-8").splitlines()[0]
    assert "_estimate" not in header and "_standard_error" not in header
    page = (site / "networks/two/index.html").read_text("utf-8")
    assert "at least" not in page and "(SE " not in page
    assert "<td>No two connected nodes are more than 4 steps (ties) apart.</td>" in page


def test_a_cached_build_of_a_sampled_network_writes_the_same_files(mixed, tmp_path):
    from generator.build import build_study
    from generator.cache import analysis_from_json, analysis_to_json

    second = build_study(mixed.parent, output=tmp_path / "second")  # from the cache
    for analysis in second.networks:
        again = analysis_from_json(json.loads(json.dumps(analysis_to_json(analysis))))
        assert again.statistics == analysis.statistics
    assert [s.estimate for s in second.networks[1].statistics if "path" in s.name] == [SAMPLED]
    for name in ("files/two/statistics.csv", "files/study-statistics.csv",
                 "networks/two/index.html", "methods.html"):
        assert (mixed / name).read_bytes() == (second.output / name).read_bytes(), name


def test_estimates_and_bounds_read_as_such():
    from generator.vocabulary import Reading, reading, statistic_value

    assert statistic_value(12.0, estimate=LOWER_BOUND, standard_error=None) == "at least 12"
    assert statistic_value(4.2134, estimate=SAMPLED, standard_error=0.03123) == "4.21 (SE 0.031)"
    assert statistic_value(0.12345, estimate=SAMPLED, standard_error=None) == "about 0.123"
    assert statistic_value(4.2134, estimate=None, standard_error=None) == "4.21"
    weighted = Reading(value=2.5, weighted=True, steps=3.25, estimate=SAMPLED,
                       standard_error=0.0512, steps_standard_error=0.0406)
    assert reading("average_path_length", weighted) == (
        "Connected pairs are on average about 2.5 apart in path length (1/weight per tie) "
        "(estimated from the pairs that start at the sampled source nodes, standard error "
        "0.051). Counting every tie as one step, they are on average about 3.25 steps apart, "
        "standard error 0.041.")
    bound = Reading(value=7.5, weighted=True, steps=9.0, estimate=LOWER_BOUND)
    assert reading("diameter", bound) == (
        "Some connected nodes are 7.5 apart in path length (1/weight per tie): the longest "
        "shortest path found from the sampled source nodes, so the diameter is at least this "
        "and may be larger. Counting every tie as one step, some are 9 steps apart, so the "
        "diameter in steps is at least that.")
