"""Tests against chance (generator.analyse.nulls): degree-preserving rewiring, the empirical
p-value, seeds and processes, and the results on networks whose answer is known."""

from __future__ import annotations

import csv
import io
import json
import random
from collections import Counter

import igraph as ig
import networkx as nx
import pandas as pd
import pytest
from conftest import analyse, graph_study, karate_graph, load_network

from generator.analyse import analyse_network
from generator.analyse.nulls import (
    empirical_p,
    null_model_tests,
    null_seeds,
    rewired,
)
from generator.config import CommunitiesConfig, MeasuresConfig, SignificanceConfig
from generator.publish import datapackage_json, network_files


def _graph(nx_graph: nx.Graph, *, weights: list[float] | None = None) -> ig.Graph:
    """An igraph Graph shaped as build_graph makes it (weight, strength and length per tie)."""
    graph = ig.Graph.from_networkx(nx.convert_node_labels_to_integers(nx_graph))
    m = graph.ecount()
    values = weights if weights is not None else [1.0] * m
    graph.es["weight"] = values
    graph.es["strength"] = values
    graph.es["length"] = [1.0 / w for w in values]
    return graph


def _tests(graph: ig.Graph, *, samples: int = 12, seed: int = 1, workers: int | None = 1,
           attributes: pd.DataFrame | None = None, weighted: bool = False, runs: int = 3):
    frame = attributes if attributes is not None else pd.DataFrame(index=range(graph.vcount()))
    return null_model_tests(graph, weighted=weighted, attributes=frame, method="leiden",
                            resolution=1.0, runs=runs, samples=samples, seed=seed,
                            workers=workers)


def _analysed(root, graph: nx.Graph, samples: int, **keys):
    clean = load_network(graph_study(root, graph, **keys))
    return analyse_network(clean, communities=CommunitiesConfig(runs=3), measures=MeasuresConfig(),
                           seed=1, significance=SignificanceConfig(null_samples=samples))


# ---------------------------------------------------------------------------------------------
# The rewiring


def _pairs(graph: ig.Graph) -> Counter:
    return Counter(e.tuple if graph.is_directed() else tuple(sorted(e.tuple)) for e in graph.es)


def test_a_rewiring_keeps_every_degree_and_the_tie_count_and_stays_simple():
    # The defining property of the Maslov & Sneppen (2002) swap, checked on the karate club
    # (Zachary 1977) as networkx ships it.
    graph = _graph(nx.karate_club_graph())
    for seed in range(5):
        new = rewired(graph, seed=seed, weighted=False)
        assert new.degree() == graph.degree()
        assert new.ecount() == graph.ecount() == 78
        assert new.is_simple() and not any(new.is_loop())
        assert _pairs(new) != _pairs(graph)  # the ties did move
    assert _pairs(graph) == _pairs(_graph(nx.karate_club_graph()))  # the original is untouched


def test_a_directed_rewiring_keeps_every_in_and_out_degree():
    digraph = nx.gnp_random_graph(40, 0.08, seed=11, directed=True)
    graph = _graph(digraph)
    for seed in range(5):
        new = rewired(graph, seed=seed, weighted=False)
        assert new.is_directed()
        assert new.indegree() == graph.indegree() and new.outdegree() == graph.outdegree()
        assert new.ecount() == graph.ecount() and new.is_simple()
        assert _pairs(new) != _pairs(graph)


def test_a_weighted_rewiring_shuffles_the_same_weights_over_the_new_ties():
    source = nx.gnp_random_graph(30, 0.15, seed=5)
    weights = [float(1 + i % 7) for i in range(source.number_of_edges())]
    graph = _graph(source, weights=weights)
    new = rewired(graph, seed=3, weighted=True)
    assert sorted(new.es["weight"]) == sorted(weights)
    assert new.es["weight"] != weights  # shuffled, not left in tie order
    assert all(s == w and abs(length * w - 1) < 1e-12 for s, w, length in
               zip(new.es["strength"], new.es["weight"], new.es["length"]))  # moved together
    assert rewired(graph, seed=3, weighted=True).es["weight"] == new.es["weight"]


# ---------------------------------------------------------------------------------------------
# The p-value


def test_the_empirical_p_value_on_a_case_worked_by_hand():
    # nulls 1, 2, 3, 4, 10: mean 4. Observed 5 is 1 from the mean; the nulls are 3, 2, 1, 0 and 6
    # from it, so k = 4 (3, 2, 1 and 6 are at least 1) and p = (4 + 1) / (5 + 1).
    assert empirical_p(5.0, [1.0, 2.0, 3.0, 4.0, 10.0]) == pytest.approx(5 / 6)
    # Observed 10 against 1, 2, 3 (mean 2): no null is 8 from the mean, k = 0, p = 1 / 4.
    assert empirical_p(10.0, [1.0, 2.0, 3.0]) == pytest.approx(1 / 4)
    # Two-sided: observed -6 against the same nulls lies 8 below the mean; p = 1 / 4 again.
    assert empirical_p(-6.0, [1.0, 2.0, 3.0]) == pytest.approx(1 / 4)
    # Every null equal to the observed value: all as extreme, p = 1.
    assert empirical_p(0.3, [0.3] * 9) == 1.0


def test_a_test_reports_mean_sd_z_and_the_counts_on_either_side():
    # The karate club (Zachary 1977): its transitivity, 0.255682 (computed with networkx 3.6),
    # against rewirings with the same degrees.
    result = _tests(_graph(nx.karate_club_graph()), samples=30)
    test = result.test("transitivity")
    assert test is not None and test.samples == 30 and len(test.nulls) == 30
    assert test.observed == pytest.approx(nx.transitivity(nx.karate_club_graph()), abs=1e-12)
    mean = sum(test.nulls) / 30
    sd = (sum((x - mean) ** 2 for x in test.nulls) / 29) ** 0.5
    assert test.null_mean == pytest.approx(mean) and test.null_sd == pytest.approx(sd)
    assert test.z == pytest.approx((test.observed - mean) / sd)
    assert test.p == pytest.approx(empirical_p(test.observed, test.nulls))
    assert test.below == sum(1 for x in test.nulls if x < test.observed)
    assert test.above == sum(1 for x in test.nulls if x > test.observed)


def test_the_karate_clubs_transitivity_is_no_more_than_its_degrees_explain():
    # Often said, but not so under this null model: the karate club's (Zachary 1977)
    # transitivity, 0.2557, is what its hubs give anyway. networkx's own degree-preserving swap
    # (double_edge_swap, 10 x m swaps, seeds 0..59) computed here as the independent check gives
    # rewired networks whose mean transitivity agrees with ours.
    karate = nx.karate_club_graph()
    test = _tests(_graph(karate), samples=60).test("transitivity")
    assert test is not None and test.null_mean is not None
    theirs = []
    for seed in range(60):
        swapped = karate.copy()
        nx.double_edge_swap(swapped, nswap=10 * 78, max_tries=100_000, seed=seed)
        theirs.append(nx.transitivity(swapped))
    assert test.null_mean == pytest.approx(sum(theirs) / 60, abs=0.015)
    assert test.observed > test.null_mean and test.p is not None and test.p > 0.05


def test_a_small_world_clusters_far_more_than_its_rewired_networks():
    # Watts & Strogatz (1998, Collective dynamics of 'small-world' networks): a ring lattice with
    # few shortcuts keeps the lattice's clustering, far above random networks with its degrees.
    # The values checked come from this test's own run: every one of the 40 rewired networks
    # falls below the observed transitivity, so p is the smallest possible, 1/41.
    lattice = nx.watts_strogatz_graph(60, 6, 0.05, seed=3)
    test = _tests(_graph(lattice), samples=40).test("transitivity")
    assert test is not None and test.z is not None
    assert test.observed == pytest.approx(nx.transitivity(lattice), abs=1e-12)
    assert test.below == 40 and test.p == pytest.approx(1 / 41) and test.z > 3


def test_a_planted_partition_has_significant_modularity():
    # A stochastic block model (Holland, Laskey & Leinhardt 1983) with four planted blocks of 20:
    # ties inside blocks are ten times likelier than across, so its modularity far exceeds that
    # of rewired networks with the same degrees.
    sbm = nx.stochastic_block_model([20] * 4, [[0.4 if i == j else 0.04 for j in range(4)]
                                               for i in range(4)], seed=42)
    test = _tests(_graph(sbm), samples=25, runs=5).test("modularity")
    assert test is not None and test.z is not None and test.z > 3
    assert test.p == pytest.approx(1 / 26)


def test_a_network_rewiring_cannot_change_has_no_z_and_says_why():
    # The complete graph on 5 nodes: no swap can be made, every rewiring is the network itself.
    result = _tests(_graph(nx.complete_graph(5)), samples=8)
    test = result.test("transitivity")
    assert test is not None and test.null_sd == 0.0 and test.z is None
    assert test.why == "no_null_variance" and test.p == 1.0
    assert set(test.nulls) == {1.0}


def test_a_statistic_undefined_on_the_network_is_not_tested():
    # Every degree in a cycle is 2: degree assortativity is undefined, so it is left out.
    result = _tests(_graph(nx.cycle_graph(8)), samples=4)
    names = [t.statistic for t in result.tests]
    assert "degree_assortativity" not in names
    assert names == ["transitivity", "modularity"]


def test_nothing_is_tested_when_no_samples_are_asked_for_or_there_are_no_ties():
    assert _tests(_graph(nx.karate_club_graph()), samples=0).why == "not_requested"
    empty = _graph(nx.empty_graph(4))
    result = _tests(empty, samples=5)
    assert result.tests == () and result.why == "no_ties"


# ---------------------------------------------------------------------------------------------
# Seeds and processes


def test_sample_seeds_derive_from_the_study_seed():
    assert null_seeds(7, 5) == null_seeds(7, 5)
    assert null_seeds(7, 5) != null_seeds(8, 5)
    assert null_seeds(7, 8)[:5] == null_seeds(7, 5)  # more samples extend, never reshuffle


def test_p_values_are_the_same_for_the_same_seed_and_differ_for_another():
    graph = _graph(nx.karate_club_graph())
    clubs = pd.DataFrame({"club": [d["club"] for _, d in nx.karate_club_graph().nodes(data=True)]})
    first = _tests(graph, samples=15, seed=4, attributes=clubs)
    assert _tests(graph, samples=15, seed=4, attributes=clubs) == first
    other = _tests(graph, samples=15, seed=5, attributes=clubs)
    assert [t.nulls for t in other.tests] != [t.nulls for t in first.tests]
    assert [t.p for t in other.tests] != [t.p for t in first.tests]


def test_parallel_processes_give_exactly_the_serial_results():
    digraph = nx.gnp_random_graph(30, 0.1, seed=8, directed=True)
    weights = [float(1 + i % 4) for i in range(digraph.number_of_edges())]
    graph = _graph(digraph, weights=weights)
    groups = pd.DataFrame({"unit": [f"u{i % 3}" for i in range(30)],
                           "years": [float(i % 7) for i in range(30)]})
    serial = _tests(graph, samples=10, weighted=True, attributes=groups, workers=1)
    parallel = _tests(graph, samples=10, weighted=True, attributes=groups, workers=2)
    assert parallel == serial
    assert json.dumps([t.nulls for t in parallel.tests]) == json.dumps([t.nulls for t in serial.tests])


def test_progress_is_reported_as_samples_finish():
    seen: list[tuple[int, int]] = []
    null_model_tests(_graph(nx.path_graph(6)), weighted=False,
                     attributes=pd.DataFrame(index=range(6)), method="leiden", resolution=1.0,
                     runs=2, samples=5, seed=1, progress=lambda done, total: seen.append((done, total)),
                     workers=1)
    assert seen == [(1, 5), (2, 5), (3, 5), (4, 5), (5, 5)]


# ---------------------------------------------------------------------------------------------
# In the analysis and its downloads


def test_the_observed_values_are_the_statistics_the_analysis_reports(tmp_path):
    graph = karate_graph()
    analysis = _analysed(tmp_path, graph, 6, attributes=("club", "tenure"))
    tested = {t.statistic: t.observed for t in analysis.significance.tests}
    assert list(tested) == ["transitivity", "degree_assortativity", "assortativity:club",
                            "assortativity:tenure", "ei_index:club", "modularity"]
    for name, observed in tested.items():
        assert observed == analysis.statistic(name), name
    # Nominal assortativity of the club, 0.717531 (computed with networkx 3.6).
    assert tested["assortativity:club"] == pytest.approx(0.717531, abs=1e-6)


def test_a_directed_network_tests_reciprocity(tmp_path):
    digraph = nx.gnp_random_graph(25, 0.12, seed=3, directed=True)
    digraph = nx.relabel_nodes(digraph, {n: f"n{n}" for n in digraph})
    analysis = _analysed(tmp_path, digraph, 5)
    test = analysis.significance.test("reciprocity")
    assert test is not None and test.observed == pytest.approx(nx.overall_reciprocity(digraph))


def test_without_null_samples_the_analysis_tests_nothing(tmp_path):
    analysis = analyse(load_network(graph_study(tmp_path, karate_graph())))
    assert analysis.significance.tests == () and analysis.significance.why == "not_requested"
    assert "files/net/significance.csv" not in network_files(analysis)


def test_significance_csv_has_the_documented_columns_and_the_datapackage_matches(tmp_path):
    analysis = _analysed(tmp_path, karate_graph(), 5, attributes=("club",))
    files = network_files(analysis)
    rows = list(csv.reader(io.StringIO(files["files/net/significance.csv"].decode("utf-8"))))
    assert rows[0] == ["statistic", "observed", "null_mean", "null_sd", "z", "p", "samples"]
    assert [r[0] for r in rows[1:]] == [t.statistic for t in analysis.significance.tests]
    for row, test in zip(rows[1:], analysis.significance.tests):
        assert float(row[1]) == test.observed and float(row[5]) == test.p
        assert row[6] == "5"
    package = json.loads(datapackage_json([analysis], title="T"))
    (resource,) = [r for r in package["resources"] if r["path"] == "net/significance.csv"]
    fields = resource["schema"]["fields"]
    assert [f["name"] for f in fields] == rows[0]
    assert {f["name"]: f["type"] for f in fields}["samples"] == "integer"
    assert all(f["description"] for f in fields)


def test_significance_csv_validates_as_its_datapackage_says(tmp_path):
    frictionless = pytest.importorskip("frictionless")
    analysis = _analysed(tmp_path / "study", karate_graph(), 4)
    site = tmp_path / "site" / "files"
    for path, data in network_files(analysis).items():
        (tmp_path / "site" / path).parent.mkdir(parents=True, exist_ok=True)
        (tmp_path / "site" / path).write_bytes(data)
    package = json.loads(datapackage_json([analysis], title="T"))
    package["resources"] = [r for r in package["resources"] if r["path"].endswith("significance.csv")]
    (site / "datapackage.json").write_text(json.dumps(package), encoding="utf-8")
    report = frictionless.validate(str(site / "datapackage.json"))
    assert report.valid, report.flatten(["type", "note"])


def test_a_tied_z_is_written_empty(tmp_path):
    analysis = _analysed(tmp_path, nx.complete_graph(5), 3)
    text = network_files(analysis)["files/net/significance.csv"].decode("utf-8")
    assert "\ntransitivity,1,1,0,,1,3\n" in text


def test_every_sample_seed_is_a_separate_draw():
    # Each rewired network depends only on its seed: drawing sample 3 alone gives what it gives
    # inside a run of ten (the reason results do not depend on the number of processes).
    graph = _graph(nx.karate_club_graph())
    seeds = null_seeds(9, 10)
    alone = rewired(graph, seed=seeds[3], weighted=False)
    again = rewired(graph, seed=seeds[3], weighted=False)
    assert _pairs(alone) == _pairs(again)
    random.Random(0).random()  # the global generator's state plays no part
    assert _pairs(rewired(graph, seed=seeds[3], weighted=False)) == _pairs(alone)



def test_parallel_processes_start_only_when_the_work_pays_for_them(monkeypatch):
    from generator.analyse import nulls

    small = nulls._Job(_graph(nx.path_graph(5)), False, pd.DataFrame(index=range(5)),
                       ("transitivity", "modularity"), "leiden", 1.0, 20)
    large = nulls._Job(_graph(nx.gnm_random_graph(400, 2000, seed=1)), False,
                       pd.DataFrame(index=range(400)), ("transitivity", "modularity"), "leiden",
                       1.0, 20)
    monkeypatch.setattr(nulls.os, "cpu_count", lambda: 4)
    assert nulls._automatic_workers(small, 200) == 1
    assert nulls._automatic_workers(large, 200) == 4  # one per CPU, never more
    monkeypatch.setattr(nulls.os, "cpu_count", lambda: 64)
    assert nulls._automatic_workers(large, 40) == 40  # nor more than there are samples
    monkeypatch.setattr(nulls.os, "cpu_count", lambda: 1)
    assert nulls._automatic_workers(large, 200) == 1
