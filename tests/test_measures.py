"""Node measures (generator/analyse/measures.py): published values, worked examples, and a
column-by-column cross-check against networkx on four graphs."""

from __future__ import annotations

import math

import networkx as nx
import pytest
from conftest import (
    CROSS_CHECK_CASES,
    analyse,
    analyse_graph,
    by_id,
    csv_text,
    edge_study,
    load_network,
    undirected_version_nx,
)

EXACT = dict(rel=1e-9, abs=1e-12)  # exact algorithms: only float rounding may differ
# Eigenvector and PageRank come from iterative or sparse eigen-solvers in both libraries
# (igraph: ARPACK and PRPACK; networkx: ARPACK and the power method), so they agree only to
# the solvers' tolerances.
ITERATIVE = dict(rel=1e-6, abs=1e-8)
SIX_DECIMALS = dict(abs=5e-7)  # the known answers below are written to six decimals


# ---------------------------------------------------------------------------------------------
# networkx side of the cross-check


def networkx_measures(graph: nx.Graph, weighted: bool) -> dict[str, dict[str, float]]:
    """Every measure column as the project defines it (see the methods page), computed with
    networkx only."""
    n = graph.number_of_nodes()
    directed = graph.is_directed()
    length = "length" if weighted else None
    strength = "strength" if weighted else None
    expected: dict[str, dict[str, float]] = {"degree": dict(graph.degree())}
    if directed:
        expected["in_degree"] = dict(graph.in_degree())
        expected["out_degree"] = dict(graph.out_degree())
    if weighted:
        expected["strength"] = dict(graph.degree(weight="strength"))
        if directed:
            expected["in_strength"] = dict(graph.in_degree(weight="strength"))
            expected["out_strength"] = dict(graph.out_degree(weight="strength"))
    expected["betweenness"] = nx.betweenness_centrality(graph, normalized=True, weight=length)
    # networkx closeness on a DiGraph uses incoming distances: paths *to* the node, as ours does.
    expected["closeness"] = nx.closeness_centrality(graph, distance=length, wf_improved=True)
    expected["harmonic"] = {v: h / (n - 1) for v, h in
                            nx.harmonic_centrality(graph, distance=length).items()}
    if not directed or nx.is_strongly_connected(graph):
        expected["eigenvector"] = _networkx_eigenvector(graph, strength)
    expected["pagerank"] = nx.pagerank(graph, alpha=0.85, weight=strength, tol=1e-13,
                                       max_iter=10_000)
    undirected = undirected_version_nx(graph)
    expected["coreness"] = nx.core_number(undirected)
    expected["clustering"] = nx.clustering(undirected)
    return expected


def _networkx_eigenvector(graph: nx.Graph, strength: str | None) -> dict[str, float]:
    """Scaled to max 1. networkx uses in-edges on a DiGraph (the left eigenvector), as ours
    does. It refuses disconnected graphs (ambiguous, networkx gh-6888), so an undirected graph
    made of one component plus isolates is solved on that component and the isolates get 0."""
    parts = [graph] if graph.is_directed() else [
        graph.subgraph(c) for c in nx.connected_components(graph) if len(c) > 1]
    assert len(parts) == 1, "the eigenvector check needs a single component with ties"
    raw = nx.eigenvector_centrality_numpy(parts[0], weight=strength)
    top = max(raw.values())
    return {v: raw.get(v, 0.0) / top for v in graph.nodes}


def expected_columns(directed: bool, weighted: bool, eigenvector: bool) -> list[str]:
    columns = ["degree"] + (["in_degree", "out_degree"] if directed else [])
    if weighted:
        columns += ["strength"] + (["in_strength", "out_strength"] if directed else [])
    columns += ["betweenness", "closeness", "harmonic"] + (["eigenvector"] if eigenvector else [])
    return columns + ["pagerank", "coreness", "clustering", "constraint", "effective_size",
                      "community"]


MEASURE_COLUMNS = ("degree", "in_degree", "out_degree", "strength", "in_strength", "out_strength",
                   "betweenness", "closeness", "harmonic", "eigenvector", "pagerank", "coreness",
                   "clustering")


@pytest.mark.parametrize("case", CROSS_CHECK_CASES)
def test_measure_columns_are_exactly_those_that_apply(case, request):
    graph, analysis = request.getfixturevalue(case)
    eigen = not graph.is_directed() or nx.is_strongly_connected(graph)
    assert list(analysis.measures.columns) == expected_columns(
        graph.is_directed(), analysis.weighted, eigen)
    assert sorted(analysis.measures.index) == sorted(graph.nodes)


@pytest.mark.parametrize("column", MEASURE_COLUMNS)
@pytest.mark.parametrize("case", CROSS_CHECK_CASES)
def test_measure_matches_networkx(case, column, request):
    graph, analysis = request.getfixturevalue(case)
    expected = networkx_measures(graph, analysis.weighted)  # source: networkx 3.6 on the same graph
    if column not in expected:
        assert column not in analysis.measures.columns
        return
    tolerance = ITERATIVE if column in ("eigenvector", "pagerank") else EXACT
    ours = by_id(analysis, column)
    assert ours == pytest.approx({v: float(x) for v, x in expected[column].items()}, **tolerance)


def test_eigenvector_is_left_out_when_directed_network_is_not_strongly_connected(directed_case):
    graph, analysis = directed_case
    assert not nx.is_strongly_connected(graph)
    assert "eigenvector" not in analysis.measures.columns
    assert analysis.omitted["eigenvector"].reason == "not_strongly_connected"


def test_directed_eigenvector_uses_incoming_ties(strong_case):
    graph, analysis = strong_case
    # networkx eigenvector_centrality_numpy on the DiGraph (in-edges), scaled to max 1;
    # the reversed graph (out-edges) must give something else, or the check proves nothing.
    incoming = nx.eigenvector_centrality_numpy(graph, weight="strength")
    outgoing = nx.eigenvector_centrality_numpy(graph.reverse(), weight="strength")
    top_in, top_out = max(incoming.values()), max(outgoing.values())
    ours = by_id(analysis, "eigenvector")
    assert ours == pytest.approx({v: x / top_in for v, x in incoming.items()}, **ITERATIVE)
    assert ours != pytest.approx({v: x / top_out for v, x in outgoing.items()}, abs=1e-3)
    assert max(ours.values()) == pytest.approx(1.0, abs=1e-12)


# ---------------------------------------------------------------------------------------------
# Known answers on classic graphs: the karate club (Zachary 1977, An information flow model for
# conflict and fission in small groups, J. Anthropological Research 33(4):452-473) and the
# Florentine families (Padgett & Ansell 1993, Robust action and the rise of the Medici,
# 1400-1434, American J. Sociology 98(6):1259-1319), both as networkx ships them, unweighted.


def test_karate_betweenness_of_the_two_leaders_matches_the_known_values(karate_case):
    _, analysis = karate_case
    betweenness = by_id(analysis, "betweenness")
    # Normalised betweenness of node 0 = 0.437635 and node 33 = 0.304075 (computed with
    # networkx 3.6 on the graph networkx ships)
    assert betweenness["0"] == pytest.approx(0.437635, **SIX_DECIMALS)
    assert betweenness["33"] == pytest.approx(0.304075, **SIX_DECIMALS)


def test_karate_eigenvector_matches_the_known_values(karate_case):
    _, analysis = karate_case
    eigenvector = by_id(analysis, "eigenvector")
    # Scaled to max 1: node 33 = 1.0, node 0 = 0.952132 (computed with networkx 3.6 on the graph
    # networkx ships)
    assert eigenvector["33"] == pytest.approx(1.0, abs=1e-9)
    assert eigenvector["0"] == pytest.approx(0.952132, **SIX_DECIMALS)
    assert max(eigenvector, key=eigenvector.get) == "33"


def test_florentine_medici_betweenness_matches_the_known_values(tmp_path):
    families = nx.florentine_families_graph()
    code = {name: f"f{i:02d}" for i, name in enumerate(sorted(families.nodes), start=1)}
    graph = nx.relabel_nodes(families, code)  # neutral codes in the written files
    betweenness = by_id(analyse_graph(tmp_path, graph, runs=2), "betweenness")
    medici = code["Medici"]
    n = graph.number_of_nodes()
    # Medici 0.521978 normalised (computed with networkx 3.6 on the graph networkx ships);
    # 47.5 raw, as textbook tables of the Padgett & Ansell marriage network give it (from memory)
    assert betweenness[medici] == pytest.approx(0.521978, **SIX_DECIMALS)
    assert betweenness[medici] * (n - 1) * (n - 2) / 2 == pytest.approx(47.5, rel=1e-12)
    assert max(betweenness, key=betweenness.get) == medici


# ---------------------------------------------------------------------------------------------
# Worked examples


def test_path_of_three_centre_has_betweenness_one_and_eigenvector_sqrt_two_ratio(tmp_path):
    analysis = analyse(load_network(edge_study(tmp_path, "source,target\nx,y\ny,z\n")), runs=2)
    # Worked example of Freeman 1977, A set of measures of centrality based on betweenness,
    # Sociometry 40(1):35-41: the centre lies on the only path between the ends, the one pair
    # it could lie between, so its normalised betweenness is 1.
    assert by_id(analysis, "betweenness") == pytest.approx({"x": 0.0, "y": 1.0, "z": 0.0}, **EXACT)
    # Linear algebra: the leading eigenvector of the 3-path is (1, sqrt 2, 1).
    end = 1 / math.sqrt(2)
    assert by_id(analysis, "eigenvector") == pytest.approx({"x": end, "y": 1.0, "z": end},
                                                          **ITERATIVE)


def test_star_centre_has_betweenness_one_and_leaves_zero(tmp_path):
    edges = csv_text(("source", "target"), [("hub", f"leaf{i}") for i in range(1, 7)])
    betweenness = by_id(analyse(load_network(edge_study(tmp_path, edges)), runs=2), "betweenness")
    # Freeman 1977, A set of measures of centrality based on betweenness, Sociometry
    # 40(1):35-41: the centre of a star has the largest possible betweenness, 1 normalised, and
    # its leaves 0 (from memory).
    assert betweenness.pop("hub") == pytest.approx(1.0, **EXACT)
    assert set(betweenness.values()) == {0.0}


def test_directed_cycle_gives_every_node_pagerank_one_over_n(tmp_path):
    n = 7
    edges = csv_text(("source", "target"), [(f"c{i}", f"c{(i + 1) % n}") for i in range(n)])
    analysis = analyse(load_network(edge_study(tmp_path, edges, directed=True)), runs=2)
    # Follows from the definition in Brin & Page 1998, The anatomy of a large-scale hypertextual
    # Web search engine, Computer Networks and ISDN Systems 30(1-7):107-117: on a directed
    # cycle the walk is uniform over the nodes.
    assert list(analysis.measures["pagerank"]) == pytest.approx([1 / n] * n, **ITERATIVE)


def test_directed_closeness_counts_paths_to_the_node(tmp_path):
    analysis = analyse(load_network(edge_study(tmp_path, "source,target\np,q\nq,r\n",
                                               directed=True)), runs=2)
    # Worked example of the closeness of Wasserman & Faust 1994, Social Network Analysis:
    # Methods and Applications (paths to the node, scaled by the share reached) on p -> q -> r:
    # r is reached by q (1) and p (2): (2/2) * (2/3); q by p alone: (1/2) * (1/1); p by none: 0.
    assert by_id(analysis, "closeness") == pytest.approx({"p": 0.0, "q": 0.5, "r": 2 / 3}, **EXACT)
    # Harmonic closeness (Marchiori & Latora 2000, Harmony in the small-world, Physica A
    # 285(3-4):539-546), divided by n-1 = 2: r gets (1/1 + 1/2) / 2; q gets 1/1 / 2; p gets 0.
    assert by_id(analysis, "harmonic") == pytest.approx({"p": 0.0, "q": 0.5, "r": 0.75}, **EXACT)


@pytest.mark.parametrize("weight_means, centre_betweenness", [("strength", 1.0), ("distance", 0.0)])
def test_weight_meaning_decides_which_paths_are_shortest(tmp_path, weight_means,
                                                         centre_betweenness):
    # Worked example: u-v and v-w have weight 4, u-w weight 1. Read as strength, the lengths are
    # 1/4 + 1/4 < 1, so the shortest u-w path runs through v; read as distance, 4 + 4 > 1
    # (by definition: a strength's path length is 1/strength, see README, the choices where
    # the measure definitions leave room; Opsahl et al. 2010, Node centrality in weighted
    # networks, Social Networks 32(3):245-251).
    edges = "source,target,weight\nu,v,4\nv,w,4\nu,w,1\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, weight="weight",
                                               weight_means=weight_means)), runs=2)
    assert by_id(analysis, "betweenness")["v"] == pytest.approx(centre_betweenness, **EXACT)
    strength = 4 + 1 if weight_means == "strength" else 1 / 4 + 1
    assert by_id(analysis, "strength")["u"] == pytest.approx(strength, **EXACT)


def test_isolate_scores_zero_on_path_measures_clustering_and_coreness(tmp_path):
    root = edge_study(tmp_path, "source,target\nx,y\ny,z\nz,x\n", nodes="id\nx\ny\nz\nlone\n")
    measures = analyse(load_network(root), runs=2).measures
    lone = measures.loc["lone"]
    # By definition: an isolate lies on no path and reaches no node, so every path measure is 0
    # (closeness 0, not missing, as the methods page states); it has no neighbours to cluster.
    for column in ("degree", "betweenness", "closeness", "harmonic", "coreness", "clustering",
                   "eigenvector"):
        assert lone[column] == 0, column
    assert measures["clustering"].notna().all()
    # a triangle: both neighbours tied (Watts & Strogatz 1998, Collective dynamics of
    # 'small-world' networks, Nature 393:440-442)
    assert measures.loc["x", "clustering"] == 1.0


def test_clustering_is_zero_not_missing_below_two_neighbours(tmp_path):
    analysis = analyse(load_network(edge_study(tmp_path, "source,target\nx,y\ny,z\n")), runs=2)
    # By definition (the project's, printed on the methods page): 0 below two neighbours; y has
    # two neighbours that are not tied to each other.
    assert by_id(analysis, "clustering") == {"x": 0.0, "y": 0.0, "z": 0.0}


def test_pagerank_sums_to_one_with_dangling_nodes_and_isolates(directed_case):
    _, analysis = directed_case
    # Brin & Page 1998: PageRank is a probability distribution over the nodes.
    assert analysis.measures["pagerank"].sum() == pytest.approx(1.0, abs=1e-9)


def test_degree_columns_are_whole_numbers_and_directed_degree_is_in_plus_out(directed_case):
    _, analysis = directed_case
    m = analysis.measures
    for column in ("degree", "in_degree", "out_degree", "coreness"):
        assert m[column].dtype == "int64"
    assert (m["degree"] == m["in_degree"] + m["out_degree"]).all()


def test_reciprocal_ties_merge_into_one_tie_for_coreness_and_clustering(tmp_path):
    # a <-> b and b -> c, c -> a: the undirected version is a triangle, each node has two
    # neighbours, all tied (by definition: reciprocal pairs merge into one tie, see README, the
    # choices where the measure definitions leave room).
    root = edge_study(tmp_path, "source,target\na,b\nb,a\nb,c\nc,a\n", directed=True)
    measures = analyse(load_network(root), runs=2).measures
    assert list(measures["coreness"]) == [2, 2, 2]
    assert list(measures["clustering"]) == [1.0, 1.0, 1.0]
    assert list(measures["degree"]) == [3, 3, 2]


# ---------------------------------------------------------------------------------------------
# Sampled path measures on large networks


def test_sampling_every_node_as_source_gives_exact_betweenness(tmp_path, karate_case):
    graph, exact = karate_case
    sampled = analyse_graph(tmp_path, graph, exact_up_to=10, sample_sources=100, runs=2)
    assert sampled.sampling is not None
    assert (sampled.sampling.sources, sampled.sampling.nodes, sampled.sampling.seed) == (34, 34, 1)
    assert exact.sampling is None
    # networkx 3.6 on the same graph (every source used, so the estimate is the exact value)
    assert by_id(sampled, "betweenness") == pytest.approx(
        nx.betweenness_centrality(graph, normalized=True), **EXACT)


def test_sampled_betweenness_is_seeded_and_repeatable(tmp_path, karate_case):
    graph, _ = karate_case
    first = analyse_graph(tmp_path / "one", graph, exact_up_to=10, sample_sources=12, runs=2)
    again = analyse_graph(tmp_path / "two", graph, exact_up_to=10, sample_sources=12, runs=2)
    other = analyse_graph(tmp_path / "three", graph, exact_up_to=10, sample_sources=12, runs=2,
                          seed=2)
    assert first.sampling.sources == 12
    assert by_id(first, "betweenness") == by_id(again, "betweenness")
    assert by_id(other, "betweenness") != by_id(first, "betweenness")  # other seed, other sources


def test_sampling_every_node_as_source_gives_exact_closeness_and_harmonic(tmp_path):
    graph = nx.complete_graph([f"k{i}" for i in range(12)])
    analysis = analyse_graph(tmp_path, graph, exact_up_to=5, sample_sources=12, runs=2)
    assert analysis.sampling is not None and analysis.sampling.sources == 12
    # By definition of both (common practice): in a complete graph every node is at distance 1
    # from every other node, so closeness and harmonic are exactly 1 (networkx gives 1.0 too).
    assert list(analysis.measures["closeness"]) == pytest.approx([1.0] * 12, **EXACT)
    assert list(analysis.measures["harmonic"]) == pytest.approx([1.0] * 12, **EXACT)


def test_sampled_closeness_on_complete_graph_is_one_for_every_node(tmp_path):
    graph = nx.complete_graph([f"k{i}" for i in range(12)])
    analysis = analyse_graph(tmp_path, graph, exact_up_to=5, sample_sources=6, runs=2)
    # By definition (common practice): an estimate of a constant 1 from sampled distances that
    # are all 1 is 1, whichever sources are drawn.
    assert list(analysis.measures["harmonic"]) == pytest.approx([1.0] * 12, **EXACT)
    assert list(analysis.measures["closeness"]) == pytest.approx([1.0] * 12, **EXACT)


def test_eigenvector_is_left_out_when_undirected_ties_form_several_components(tmp_path):
    # a triangle {a, b, c} and, apart from it, a complete graph on {d, e, f, g}
    edges = "source,target\na,b\nb,c\nc,a\nd,e\ne,f\nf,d\nd,g\ne,g\nf,g\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges)), runs=2)
    # Linear algebra: each component's own leading eigenvector is positive on all its nodes
    # (Perron-Frobenius), so on two components a zero score (igraph gives about 3e-16 to the
    # triangle) would say only "not in the winning component". So the measure is left out, with
    # the reason (by definition: see README, Output reference, on the eigenvector column).
    assert "eigenvector" not in analysis.measures.columns
    omitted = analysis.omitted["eigenvector"]
    assert (omitted.reason, omitted.count) == ("several_components", 2)
