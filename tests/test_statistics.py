"""Network statistics (generator/analyse/statistics.py): published values, worked examples and a
statistic-by-statistic cross-check against networkx on four graphs."""

from __future__ import annotations

import itertools

import networkx as nx
import pandas as pd
import pytest
from conftest import (
    CROSS_CHECK_CASES,
    analyse,
    csv_text,
    edge_study,
    load_network,
    undirected_version_nx,
)

from generator.analyse import Statistic

EXACT = dict(rel=1e-9, abs=1e-12)
SIX_DECIMALS = dict(abs=5e-7)  # the known answers below are written to six decimals


def statistic(analysis, name: str) -> Statistic:
    found = [s for s in analysis.statistics if s.name == name]
    assert len(found) == 1, f"{name}: {len(found)} rows"
    return found[0]


# ---------------------------------------------------------------------------------------------
# networkx side of the cross-check


def _paths(graph: nx.Graph) -> list[float]:
    """Shortest path lengths over ordered pairs joined by a path (unreachable pairs ignored)."""
    return [d for u, dist in nx.all_pairs_dijkstra_path_length(graph, weight="length")
            for v, d in dist.items() if u != v]


def _attribute_assortativity(graph: nx.Graph, attribute: str) -> float:
    present = [v for v, x in graph.nodes(data=attribute) if x is not None]
    sub = graph.subgraph(present)
    values = {x for _, x in sub.nodes(data=attribute)}
    if all(isinstance(x, (int, float)) for x in values):
        return nx.numeric_assortativity_coefficient(sub, attribute)
    return nx.attribute_assortativity_coefficient(sub, attribute)


def networkx_statistics(graph: nx.Graph, analysis) -> dict[str, float]:
    """Every statistic as the project defines it (see the methods page), from networkx and, for
    the centralizations, Freeman's formulas written out (Freeman 1978/79, Centrality in social
    networks: conceptual clarification, Social Networks 1(3):215-239).

    Modularity is of the partition the analysis reported (networkx cannot know which one it
    kept); its value is recomputed by networkx on the hand-built undirected version.
    """
    n, m = graph.number_of_nodes(), graph.number_of_edges()
    directed = graph.is_directed()
    undirected = undirected_version_nx(graph)
    expected: dict[str, float] = {"nodes": n, "edges": m, "density": nx.density(graph)}
    if directed:
        expected["reciprocity"] = nx.reciprocity(graph)
    expected["transitivity"] = nx.transitivity(undirected)
    expected["average_clustering"] = nx.average_clustering(undirected)
    if directed:
        weak = list(nx.weakly_connected_components(graph))
        expected["components"] = len(weak)
        expected["strong_components"] = nx.number_strongly_connected_components(graph)
    else:
        weak = list(nx.connected_components(graph))
        expected["components"] = len(weak)
    expected["largest_component_share"] = max(len(c) for c in weak) / n
    paths = _paths(graph)
    expected["diameter"] = max(paths)
    expected["average_path_length"] = sum(paths) / len(paths)
    expected["degree_assortativity"] = (
        nx.degree_assortativity_coefficient(graph, x="out", y="in") if directed
        else nx.degree_assortativity_coefficient(graph))
    for attribute in analysis.attributes:
        expected[f"assortativity:{attribute}"] = _attribute_assortativity(graph, attribute)
    membership = dict(zip(analysis.measures.index, analysis.measures["community"]))
    labels = sorted(set(membership.values()))
    groups = [{v for v, c in membership.items() if c == k} for k in labels]
    expected["modularity"] = nx.community.modularity(undirected, groups, weight="strength")
    expected["communities"] = len(groups)
    degrees = dict(undirected.degree())
    top = max(degrees.values())
    expected["degree_centralization"] = sum(top - d for d in degrees.values()) / ((n - 1) * (n - 2))
    betweenness = nx.betweenness_centrality(graph, normalized=True,
                                            weight="length" if analysis.weighted else None)
    top_b = max(betweenness.values())
    expected["betweenness_centralization"] = sum(top_b - b for b in betweenness.values()) / (n - 1)
    return expected


@pytest.mark.parametrize("case", CROSS_CHECK_CASES)
def test_statistics_are_listed_in_a_fixed_order(case, request):
    graph, analysis = request.getfixturevalue(case)
    directed = graph.is_directed()
    names = (["nodes", "edges", "density"] + (["reciprocity"] if directed else [])
             + ["transitivity", "average_clustering", "components"]
             + (["strong_components"] if directed else [])
             + ["largest_component_share", "diameter", "average_path_length",
                "degree_assortativity"]
             + [f"assortativity:{a}" for a in analysis.attributes]
             + [f"ei_index:{a}" for a in analysis.attributes
                if not pd.api.types.is_numeric_dtype(analysis.nodes[a].dtype)]
             + ["modularity", "communities", "degree_centralization"]
             + (["in_degree_centralization", "out_degree_centralization"] if directed else [])
             + ["betweenness_centralization", "community_agreement_ari", "community_agreement_nmi"]
             + (["community_robustness_ari"] if analysis.stability.ran else [])
             + [f"community_attribute_nmi:{a}" for a in analysis.attributes
                if not pd.api.types.is_numeric_dtype(analysis.nodes[a].dtype)])
    assert [s.name for s in analysis.statistics] == names


STATISTIC_NAMES = ("nodes", "edges", "density", "reciprocity", "transitivity",
                   "average_clustering", "components", "strong_components",
                   "largest_component_share", "diameter", "average_path_length",
                   "degree_assortativity", "assortativity", "modularity", "communities",
                   "degree_centralization", "betweenness_centralization")


@pytest.mark.parametrize("name", STATISTIC_NAMES)
@pytest.mark.parametrize("case", CROSS_CHECK_CASES)
def test_statistic_matches_networkx(case, name, request):
    graph, analysis = request.getfixturevalue(case)
    expected = networkx_statistics(graph, analysis)  # source: networkx 3.6 on the same graph
    ours = {s.name: s.value for s in analysis.statistics}
    keys = [k for k in expected if k == name or k.startswith(name + ":")]
    if name in ("reciprocity", "strong_components") and not graph.is_directed():
        assert name not in ours
        return
    assert keys, f"no networkx value for {name}"
    for key in keys:
        assert ours[key] == pytest.approx(expected[key], **EXACT), key


def test_every_attribute_kind_is_cross_checked(directed_case, karate_case):
    # The cross-check above covers text and numeric attributes, directed and undirected.
    assert directed_case[1].nodes["team"].dtype == "string"
    assert directed_case[1].nodes["years"].dtype == "Int64"
    assert directed_case[1].nodes["score"].dtype == "Float64"
    assert karate_case[1].nodes["club"].dtype == "string"
    assert karate_case[1].nodes["tenure"].dtype == "Int64"


def test_node_without_attribute_value_is_left_out_and_counted(directed_case):
    _, analysis = directed_case
    team = statistic(analysis, "assortativity:team")
    assert team.value is not None
    assert team.left_out == 1  # a3 has no team (conftest.directed_weighted_graph)
    assert statistic(analysis, "assortativity:years").left_out == 0


def _hops(graph: nx.Graph) -> list[int]:
    """Shortest path lengths in ties over ordered pairs joined by a path."""
    return [d for u, dist in nx.all_pairs_shortest_path_length(graph) for v, d in dist.items()
            if u != v]


@pytest.mark.parametrize("case", ("directed_case", "distance_case"))
def test_weighted_path_statistics_also_count_every_tie_as_one_step(case, request):
    graph, analysis = request.getfixturevalue(case)
    hops = _hops(graph)  # networkx 3.6 on the same graph, weights ignored
    assert statistic(analysis, "diameter").steps == max(hops)
    assert statistic(analysis, "average_path_length").steps == pytest.approx(
        sum(hops) / len(hops), **EXACT)


def test_unweighted_path_statistics_need_no_separate_step_count(karate_case):
    _, analysis = karate_case
    assert statistic(analysis, "diameter").steps is None
    assert statistic(analysis, "average_path_length").steps is None


# ---------------------------------------------------------------------------------------------
# Known answers on the karate club (Zachary 1977, An information flow model for conflict and
# fission in small groups, J. Anthropological Research 33(4):452-473), as networkx ships it,
# unweighted


def test_karate_statistics_match_the_known_values(karate_case):
    _, analysis = karate_case
    value = analysis.statistic
    assert value("nodes") == 34 and value("edges") == 78  # Zachary 1977
    # The rest computed with networkx 3.6 on the graph networkx ships (club assortativity from
    # its "club" attribute)
    assert value("density") == pytest.approx(0.139037, **SIX_DECIMALS)
    assert value("transitivity") == pytest.approx(0.255682, **SIX_DECIMALS)
    assert value("average_clustering") == pytest.approx(0.570638, **SIX_DECIMALS)
    assert value("degree_assortativity") == pytest.approx(-0.475613, **SIX_DECIMALS)
    assert value("assortativity:club") == pytest.approx(0.717531, **SIX_DECIMALS)


# ---------------------------------------------------------------------------------------------
# Worked examples


def _analysis(tmp_path, edges: str, **network):
    return analyse(load_network(edge_study(tmp_path, edges, **network)), runs=3)


def test_five_nodes_with_five_ties_have_density_one_half(tmp_path):
    ring = csv_text(("source", "target"), [(f"r{i}", f"r{(i + 1) % 5}") for i in range(5)])
    # Worked example of density m / (n(n-1)/2) (common practice): 5 / (5 * 4 / 2) = 0.5
    assert _analysis(tmp_path, ring).statistic("density") == pytest.approx(0.5, **EXACT)


def test_complete_graph_on_five_nodes_has_density_one(tmp_path):
    edges = csv_text(("source", "target"), itertools.combinations("vwxyz", 2))
    # Worked example of density m / (n(n-1)/2) (common practice): 10 / (5 * 4 / 2) = 1
    assert _analysis(tmp_path, edges).statistic("density") == pytest.approx(1.0, **EXACT)


def test_directed_density_counts_ordered_pairs(tmp_path):
    # Directed density m / (n(n-1)) (common practice): three ties among three nodes = 3/6; none
    # of them is returned, so reciprocity is 0.
    analysis = _analysis(tmp_path, "source,target\na,b\nb,c\nc,a\n", directed=True)
    assert analysis.statistic("density") == pytest.approx(0.5, **EXACT)
    assert analysis.statistic("reciprocity") == 0.0


def test_star_has_degree_and_betweenness_centralization_one(tmp_path):
    edges = csv_text(("source", "target"), [("hub", f"leaf{i}") for i in range(1, 8)])
    analysis = _analysis(tmp_path, edges)
    # Freeman 1978/79, Centrality in social networks: conceptual clarification, Social Networks
    # 1(3):215-239: a star is maximally centralized, centralization 1 (from memory).
    assert analysis.statistic("degree_centralization") == pytest.approx(1.0, **EXACT)
    assert analysis.statistic("betweenness_centralization") == pytest.approx(1.0, **EXACT)


def test_two_groups_with_ties_only_inside_have_nominal_assortativity_one(tmp_path):
    edges = "source,target\np1,p2\np2,p3\np3,p1\nq1,q2\nq2,q3\n"
    nodes = "id,unit\np1,west\np2,west\np3,west\nq1,east\nq2,east\nq3,east\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, nodes=nodes)), runs=3)
    # Newman 2003, Mixing patterns in networks, Phys. Rev. E 67:026126: ties only inside groups
    # are perfect assortative mixing, nominal assortativity 1 (from memory).
    assert analysis.statistic("assortativity:unit") == pytest.approx(1.0, **EXACT)


def test_nominal_assortativity_with_one_shared_value_is_undefined_with_a_reason_not_nan(tmp_path):
    edges = "source,target\np1,p2\np2,p3\n"
    nodes = "id,unit\np1,west\np2,west\np3,west\n"
    stat = statistic(analyse(load_network(edge_study(tmp_path, edges, nodes=nodes)), runs=3),
                     "assortativity:unit")
    # Newman 2003's coefficient divides by 1 - sum over values of a_i b_i (the shares of tie
    # ends), which is 0 when every node has the same value (from memory; networkx 3.6 returns
    # NaN on this graph). The project reports "not defined" with the reason instead (its own
    # choice, by definition).
    assert stat.value is None and stat.why == "one_value"


def test_regular_network_degree_assortativity_is_undefined_with_a_reason_not_nan(tmp_path):
    ring = csv_text(("source", "target"), [(f"r{i}", f"r{(i + 1) % 5}") for i in range(5)])
    stat = statistic(_analysis(tmp_path, ring), "degree_assortativity")
    # networkx 3.6 gives NaN here too: every degree is 2, so the correlation has no variance
    # (Newman 2002, Assortative mixing in networks, Phys. Rev. Lett. 89:208701).
    assert stat.value is None and stat.why == "constant_degrees"


def test_network_without_ties_reports_undefined_path_statistics(tmp_path):
    # Only a self-loop: it is removed, leaving three isolates from the node list.
    analysis = analyse(load_network(edge_study(tmp_path, "source,target\na,a\n",
                                               nodes="id\na\nb\nc\n")), runs=3)
    value = {s.name: s.value for s in analysis.statistics}
    assert value["nodes"] == 3 and value["edges"] == 0 and value["density"] == 0.0
    assert value["components"] == 3 and value["communities"] == 3
    why = {s.name: s.why for s in analysis.statistics}
    assert {name: (value[name], why[name]) for name in (
        "transitivity", "diameter", "average_path_length", "degree_assortativity", "modularity")
    } == {"transitivity": (None, "no_two_neighbours"), "diameter": (None, "no_ties"),
          "average_path_length": (None, "no_ties"), "degree_assortativity": (None, "no_ties"),
          "modularity": (None, "no_ties")}
    # all degrees equal, so none falls short of the largest (Freeman 1978/79, by definition)
    assert value["degree_centralization"] == 0.0


def test_centralization_is_not_defined_below_three_nodes(tmp_path):
    analysis = _analysis(tmp_path, "source,target\na,b\n")
    for name in ("degree_centralization", "betweenness_centralization"):
        stat = statistic(analysis, name)
        assert stat.value is None and stat.why == "below_three_nodes"


def test_path_statistics_ignore_unreachable_pairs(tmp_path):
    # Worked example: a -> b -> c plus an isolate d. Reachable ordered pairs: (a,b) 1, (b,c) 1,
    # (a,c) 2; mean 4/3, longest 2 (by definition: unreachable pairs are left out, as the
    # methods page states). The largest weak component holds 3 of 4 nodes; each node is a
    # strong component of its own.
    analysis = analyse(load_network(edge_study(tmp_path, "source,target\na,b\nb,c\n",
                                               nodes="id\na\nb\nc\nd\n", directed=True)), runs=3)
    assert analysis.statistic("average_path_length") == pytest.approx(4 / 3, **EXACT)
    assert analysis.statistic("diameter") == 2.0
    assert analysis.statistic("largest_component_share") == pytest.approx(0.75, **EXACT)
    assert analysis.statistic("strong_components") == 4
