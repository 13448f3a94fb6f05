"""Community stability: agreement across runs, reruns on perturbed ties, community profiles and
communities against node attributes."""

from __future__ import annotations

import csv
import io
import itertools
import json
import math
import random
from pathlib import Path

import igraph as ig
import networkx as nx
import pytest
from conftest import analyse, graph_study, load_network, write_study

from generator.analyse.communities import (
    adjusted_rand_index,
    community_profiles,
    compare_with_attribute,
    normalised_mutual_information,
    perturbed_stability,
)
from generator.analyse.graph import build_graph, undirected_version
from generator.build import build_study
from generator.cache import analysis_from_json, analysis_to_json
from generator.cli import main

BLOCKS = [25, 25, 25, 25]


def _planted(p_in: float = 0.3, p_out: float = 0.01, seed: int = 11) -> nx.Graph:
    """A stochastic block model (Holland, Laskey & Leinhardt 1983) of four blocks of 25, each
    node carrying its block as the text attribute "group"."""
    probabilities = [[p_in if i == j else p_out for j in range(4)] for i in range(4)]
    graph = nx.stochastic_block_model(BLOCKS, probabilities, seed=seed)
    for _, data in graph.nodes(data=True):
        data["group"] = f"block-{data['block']}"
    return graph


def _blocks(graph: nx.Graph) -> list[int]:
    return [graph.nodes[v]["block"] for v in sorted(graph.nodes)]


@pytest.fixture(scope="module")
def planted(tmp_path_factory):
    graph = _planted()
    root = tmp_path_factory.mktemp("planted")
    analysis = analyse(load_network(graph_study(root, graph, attributes=("group",))),
                       perturbations=20)
    return graph, analysis


def _undirected(root: Path):
    return undirected_version(build_graph(load_network(root)))


# ---------------------------------------------------------------------------------------------
# Comparing partitions


def test_adjusted_rand_index_matches_a_worked_example():
    # Computed by hand from Hubert & Arabie 1985 ("Comparing partitions"), their formula: cells
    # (2, 1, 1, 2) give index 2; rows (3, 3) give 6 pairs, columns (2, 2, 2) give 3; expected
    # 6 x 3 / C(6, 2) = 1.2; maximum (6 + 3) / 2 = 4.5; ARI = 0.8 / 3.3.
    a = [0, 0, 0, 1, 1, 1]
    b = [0, 0, 1, 1, 2, 2]
    assert adjusted_rand_index(a, b) == pytest.approx(0.8 / 3.3)
    assert adjusted_rand_index(a, a) == pytest.approx(1.0)


def test_adjusted_rand_index_and_nmi_agree_with_igraph_on_random_partitions():
    # igraph's compare_communities computes the same indices (ARI: Hubert & Arabie 1985; NMI:
    # Danon et al. 2005, "Comparing community structure identification").
    rng = random.Random(5)
    for _ in range(40):
        n = rng.randrange(5, 60)
        a = [rng.randrange(rng.randrange(1, 6) + 1) for _ in range(n)]
        b = [rng.randrange(rng.randrange(1, 8) + 1) for _ in range(n)]
        if len(set(a)) > 1 or len(set(b)) > 1:
            assert adjusted_rand_index(a, b) == pytest.approx(
                ig.compare_communities(a, b, method="adjusted_rand"), abs=1e-12)
            assert normalised_mutual_information(a, b) == pytest.approx(
                ig.compare_communities(a, b, method="nmi"), abs=1e-12)


def test_nmi_of_independent_partitions_is_zero_and_of_one_group_each_undefined():
    # Worked by hand: each community holds one of each value, so I = 0 (Danon et al. 2005).
    assert normalised_mutual_information([1, 1, 2, 2], ["x", "y", "x", "y"]) == pytest.approx(0)
    assert math.isnan(normalised_mutual_information([1, 1], ["x", "x"]))


# ---------------------------------------------------------------------------------------------
# The planted partition


def test_found_communities_recover_the_planted_blocks(planted):
    graph, analysis = planted
    found = list(analysis.communities.membership)
    assert analysis.communities.sizes == (25, 25, 25, 25)
    assert adjusted_rand_index(_blocks(graph), found) >= 0.9
    assert ig.compare_communities(_blocks(graph), found, method="adjusted_rand") >= 0.9


def test_agreement_across_runs_and_robustness_are_high_and_in_statistics(planted):
    _, analysis = planted
    assert analysis.statistic("community_agreement_ari") == analysis.communities.mean_ari
    assert analysis.statistic("community_agreement_nmi") == analysis.communities.mean_nmi
    assert analysis.statistic("community_agreement_ari") >= 0.9
    assert analysis.statistic("community_agreement_nmi") >= 0.9
    assert analysis.stability.perturbations == 20
    assert analysis.stability.removed == round(0.1 * analysis.statistic("edges"))
    assert analysis.statistic("community_robustness_ari") >= 0.9


def test_community_confidence_is_near_one_on_the_planted_network_and_lower_on_a_noisy_one(
        planted, tmp_path):
    _, analysis = planted
    confidence = list(analysis.measures["community_confidence"])
    assert len(confidence) == 100 and all(0 <= c <= 1 for c in confidence)
    assert sum(confidence) / 100 >= 0.95
    noisy = analyse(load_network(graph_study(tmp_path, _planted(p_in=0.12, p_out=0.04))),
                    perturbations=20)
    noisy_confidence = list(noisy.measures["community_confidence"])
    assert sum(noisy_confidence) / 100 < sum(confidence) / 100 - 0.05
    assert noisy.statistic("community_robustness_ari") < analysis.statistic(
        "community_robustness_ari")


def test_confidence_counts_the_share_of_community_members_kept_together():
    # Worked by hand. A triangle 0-1-2 and a pair 3-4 with no tie between them, and an isolate
    # 5: removing any one tie of the triangle leaves a path, which stays one community; the
    # pair's only tie removed leaves two isolates, each separated from the other. The isolate
    # gets 1 (alone in its community, there is nothing to separate it from).
    graph = ig.Graph(n=6, edges=[(0, 1), (1, 2), (0, 2), (3, 4)])
    graph.es["strength"] = [1.0] * 4
    kept = [1, 1, 1, 2, 2, 3]
    result = perturbed_stability(graph, kept, method="leiden", resolution=1.0, runs=3, seed=4,
                                 weighted=False, perturbations=30, share=0.25)
    assert result.removed == 1
    pair_runs_apart = 30 - result.together[3][4]
    assert result.confidence[3] == pytest.approx(result.together[3][4] / 30)
    assert result.confidence[4] == result.confidence[3]
    assert 0 < pair_runs_apart < 30  # the pair's tie is drawn in about one run in four
    assert result.confidence[5] == 1.0
    assert result.confidence[:3] == (1.0, 1.0, 1.0)
    assert all(result.together[v][v] == 30 for v in range(6))


def test_stability_is_identical_for_the_same_seed_and_differs_for_another(tmp_path):
    undirected = _undirected(graph_study(tmp_path, _planted(p_in=0.12, p_out=0.04)))
    kept = [1 + (v // 25) for v in range(100)]

    def run(seed: int):
        return perturbed_stability(undirected, kept, method="leiden", resolution=1.0, runs=3,
                                   seed=seed, weighted=False, perturbations=8, share=0.2)

    first, again, other = run(1), run(1), run(2)
    assert first == again
    assert first.confidence != other.confidence
    assert first.robustness_ari != other.robustness_ari


def test_without_perturbations_nothing_is_rerun_and_the_column_is_left_out(tmp_path):
    analysis = analyse(load_network(graph_study(tmp_path, _planted())), perturbations=0)
    assert not analysis.stability.ran
    assert "community_confidence" not in analysis.measures.columns
    assert analysis.statistic("community_robustness_ari") is None
    assert "community_robustness_ari" not in [s.name for s in analysis.statistics]


# ---------------------------------------------------------------------------------------------
# Profiles and attributes


def test_profiles_match_networkx_conductance_density_and_cut_size(planted):
    graph, analysis = planted
    membership = analysis.communities.membership
    ids = list(analysis.nodes.index)
    for profile in analysis.community_profiles:
        members = {int(ids[v]) for v, c in enumerate(membership) if c == profile.community}
        inside = graph.subgraph(members)
        assert profile.size == len(members)
        assert profile.internal == inside.number_of_edges()
        assert profile.external == nx.cut_size(graph, members)
        assert profile.density == pytest.approx(nx.density(inside))
        assert profile.conductance == pytest.approx(nx.conductance(graph, members))
        expected = [analysis.measures["community_confidence"].iloc[v]
                    for v, c in enumerate(membership) if c == profile.community]
        assert profile.confidence == pytest.approx(sum(expected) / len(expected))


def test_profile_of_a_single_node_and_of_one_community_holding_every_tie():
    # Worked by hand: a triangle plus an isolate. The triangle has 3 internal ties, density 1,
    # and no tie out of it, while the rest has no degree at all: conductance is undefined
    # (0 / min(6, 0)). The isolate has no density.
    graph = ig.Graph(n=4, edges=[(0, 1), (1, 2), (0, 2)])
    triangle, isolate = community_profiles(graph, [1, 1, 1, 2])
    assert (triangle.size, triangle.internal, triangle.external) == (3, 3, 0)
    assert triangle.density == 1.0 and triangle.conductance is None
    assert (isolate.size, isolate.density, isolate.conductance) == (1, None, None)


def test_cross_table_and_nmi_of_communities_and_an_attribute():
    # Worked by hand: community 1 holds a, a, b; community 2 holds b, b and one node without a
    # value. NMI from the contingency table (2, 1 / 0, 2) over 5 nodes, checked with igraph.
    comparison = compare_with_attribute("unit", [1, 1, 1, 2, 2, 2],
                                        ["a", "a", "b", "b", "b", None])
    assert comparison.values == ("a", "b")
    assert comparison.counts == ((2, 1), (0, 2))
    assert comparison.left_out == 1
    assert comparison.nmi == pytest.approx(
        ig.compare_communities([1, 1, 1, 2, 2], [0, 0, 1, 1, 1], method="nmi"))
    n = 5
    mutual = (2 / n * math.log(2 * n / (3 * 2)) + 1 / n * math.log(1 * n / (3 * 3))
              + 2 / n * math.log(2 * n / (2 * 3)))
    entropy = -sum(k / n * math.log(k / n) for k in (3, 2, 2, 3))
    assert comparison.nmi == pytest.approx(2 * mutual / entropy)


def test_communities_follow_the_planted_group_attribute(planted):
    _, analysis = planted
    (comparison,) = analysis.attribute_comparisons
    assert comparison.attribute == "group"
    assert sum(map(sum, comparison.counts)) == 100
    assert analysis.statistic("community_attribute_nmi:group") == comparison.nmi
    assert comparison.nmi >= 0.9


def test_the_stability_results_survive_the_cache_round_trip(planted):
    _, analysis = planted
    back = analysis_from_json(json.loads(json.dumps(analysis_to_json(analysis))))
    assert back.stability == analysis.stability
    assert back.community_profiles == analysis.community_profiles
    assert back.attribute_comparisons == analysis.attribute_comparisons


# ---------------------------------------------------------------------------------------------
# Config and build


@pytest.mark.parametrize(("setting", "shown"), [
    ("perturbations = -3", "-3"),
    ("perturbations = 2.5", "2.5"),
    ('perturbations = "many"', "'many'"),
    ("perturb_share = 1.0", "1.0"),
    ("perturb_share = -0.2", "-0.2"),
])
def test_bad_perturbation_settings_exit_1_naming_the_line_and_value(tmp_path, capsys, setting,
                                                                    shown):
    root = write_study(tmp_path, networks=[{"id": "net", "edges": "data/edges.csv"}],
                       files={"data/edges.csv": "source,target\na,b\nb,c\n"})
    text = (root / "study.toml").read_text().replace("perturbations = 0", "runs = 2\n" + setting)
    (root / "study.toml").write_text(text)
    line = text.splitlines().index(setting) + 1
    assert main(["build", str(root), "--quiet"]) == 1
    err = capsys.readouterr().err
    key = setting.split(" =")[0]
    assert f"study.toml, line {line}: [communities.{key}]" in err
    assert shown in err and "Traceback" not in err


def test_a_build_writes_the_communities_page_csv_statistics_and_column(tmp_path):
    graph = _planted()
    root = graph_study(tmp_path / "study", graph, attributes=("group",))
    text = (root / "study.toml").read_text().replace("perturbations = 0",
                                                     "perturbations = 5\nruns = 3")
    (root / "study.toml").write_text(text)
    site = tmp_path / "site"
    build_study(root, output=site)
    page = (site / "networks/net/communities.html").read_text()
    assert "Conductance" in page and "figures/coassignment.svg" in page
    assert 'alt="Heat map of 100 by 100 cells' in page
    assert "Nodes of each community by group" in page
    assert 'href="communities.html"' in (site / "networks/net/index.html").read_text()
    rows = list(csv.DictReader(io.StringIO((site / "files/net/communities.csv").read_text())))
    assert [r["community"] for r in rows] == ["1", "2", "3", "4"]
    assert set(rows[0]) == {"community", "size", "internal_ties", "external_ties",
                            "internal_density", "conductance", "confidence"}
    stats = dict(csv.reader(io.StringIO((site / "files/net/statistics.csv").read_text())))
    for name in ("community_agreement_ari", "community_agreement_nmi",
                 "community_robustness_ari", "community_attribute_nmi:group"):
        assert float(stats[name]) >= 0.9
    header = (site / "files/net/nodes.csv").read_text().splitlines()[0].split(",")
    assert header[-2:] == ["community", "community_confidence"]
    package = json.loads((site / "files/datapackage.json").read_text())
    resource = next(r for r in package["resources"] if r["name"] == "net-communities")
    assert [f["name"] for f in resource["schema"]["fields"]] == [r for r in rows[0]]
    assert "communities.csv" in (site / "downloads.html").read_text()
    methods = (site / "methods.html").read_text()
    assert "Fortunato, S.: Community detection in graphs" in methods
    assert "Robustness of community structure in networks" in methods
    assert "5 reruns" in methods


def test_every_pair_is_counted_once_per_rerun_in_the_coassignment_matrix(planted):
    _, analysis = planted
    together = analysis.stability.together
    n = len(together)
    assert all(together[i][j] == together[j][i] for i, j in itertools.combinations(range(n), 2))
    assert all(0 <= together[i][j] <= 20 for i in range(n) for j in range(n))


def test_merging_values_of_a_cross_table_adds_their_columns_and_keeps_the_nmi():
    from generator.analyse.communities import compare_with_attribute, merge_values

    # Worked example: communities 1 1 2 2 2 against values a a b c c.
    full = compare_with_attribute("team", [1, 1, 2, 2, 2], ["a", "a", "b", "c", "c"])
    assert full.values == ("a", "b", "c") and full.counts == ((2, 0, 0), (0, 1, 2))
    merged = merge_values(full, ("a", "b"), "other")
    assert merged.values == ("c", "other") and merged.counts == ((0, 2), (2, 1))
    assert merged.nmi == full.nmi and merged.left_out == full.left_out
    assert merge_values(full, ("z",), "other") is full
