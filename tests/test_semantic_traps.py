"""Inputs whose numbers are easy to get silently wrong: undirected ties listed both ways, mixed
directions, repeated ties read as distances, ids that look like numbers, ids in other cases or
Unicode forms, and group codes written as numbers. Each expected number is counted by hand (the
arithmetic is written beside it) or computed by networkx on the graph the input means."""

from __future__ import annotations

import unicodedata
from pathlib import Path

import networkx as nx
import pytest
from conftest import analyse, by_id, edge_study, load_network

EXACT = {"rel": 0, "abs": 1e-12}


def numbers(root: Path) -> tuple[dict[str, float], float, int, int]:
    """Degree per node, density, node count and tie count as netfolio computes them."""
    analysis = analyse(load_network(root))
    return (by_id(analysis, "degree"), float(analysis.statistic("density") or 0.0),
            int(analysis.statistic("nodes") or 0), int(analysis.statistic("edges") or 0))


def reference(graph: nx.Graph) -> tuple[dict[str, float], float, int, int]:
    """The same four from networkx (density: m / (n(n-1)/2) undirected, m / (n(n-1)) directed)."""
    return ({str(k): float(v) for k, v in graph.degree()}, nx.density(graph),
            graph.number_of_nodes(), graph.number_of_edges())


def test_an_undirected_network_listed_in_both_directions_is_read_once(tmp_path: Path) -> None:
    # Every pair written twice (a,b and b,a, same weight), as many tools export undirected ties.
    rows = [("a", "b", 2), ("b", "a", 2), ("b", "c", 1), ("c", "b", 1), ("c", "d", 3),
            ("d", "c", 3)]
    edges = "source,target,weight\n" + "".join(f"{u},{v},{w}\n" for u, v, w in rows)
    root = edge_study(tmp_path, edges, weight="weight")
    graph = nx.Graph([("a", "b"), ("b", "c"), ("c", "d")])  # the path a-b-c-d: 3 ties
    assert numbers(root) == reference(graph)
    assert reference(graph)[1] == pytest.approx(3 / 6, **EXACT)  # 3 of the 4*3/2 pairs
    analysis = analyse(load_network(root))
    # Strength is the sum of the weights of each node's ties, each pair counted once:
    # a: 2; b: 2 + 1; c: 1 + 3; d: 3 (doubling would give 4, 6, 8, 6).
    assert by_id(analysis, "strength") == {"a": 2.0, "b": 3.0, "c": 4.0, "d": 3.0}


def test_mixed_directions_in_undirected_data_are_one_tie_per_pair(tmp_path: Path) -> None:
    # Unweighted: a,b and b,a name the same undirected tie; c,b is b-c written the other way.
    edges = "source,target\na,b\nb,a\nc,b\nd,c\n"
    root = edge_study(tmp_path, edges)
    graph = nx.Graph([("a", "b"), ("b", "c"), ("c", "d")])
    assert numbers(root) == reference(graph)
    # Weighted and only partly mirrored: the two rows of a-b are combined by duplicates = "sum",
    # 1 + 3 = 4 (the README's rule for repeated ties), and a warning names both lines.
    edges = "source,target,weight\na,b,1\nb,a,3\nc,b,2\n"
    root = edge_study(tmp_path / "weighted", edges, weight="weight")
    clean = load_network(root)
    assert sorted(map(tuple, clean.edges[["source", "target", "weight"]].values.tolist())) == [
        ("a", "b", 4.0), ("b", "c", 2.0)]
    warnings = [f for f in clean.checks.findings if f.level == "warning"]
    assert len(warnings) == 1 and "line 2" in warnings[0].message and "line 3" in warnings[0].message


def test_a_directed_network_keeps_both_directions_as_two_ties(tmp_path: Path) -> None:
    edges = "source,target\na,b\nb,a\nb,c\n"
    root = edge_study(tmp_path, edges, directed=True)
    graph = nx.DiGraph([("a", "b"), ("b", "a"), ("b", "c")])
    degree, density, n, m = numbers(root)
    # networkx's DiGraph degree is in + out; density m / (n(n-1)) = 3 / 6.
    assert (n, m) == (3, 3) and density == pytest.approx(nx.density(graph), **EXACT)
    assert density == pytest.approx(0.5, **EXACT)
    assert degree == {str(k): float(v) for k, v in graph.degree()}


@pytest.mark.parametrize(("rule", "expected"), [
    # Repeated distance ties a-b of 2 and 4: "sum" adds their strengths, 1/2 + 1/4 = 3/4, so
    # the distance is 4/3 (README, duplicates); "mean" averages the distances, (2 + 4) / 2 = 3.
    ("sum", 4 / 3),
    ("mean", 3.0),
])
def test_repeated_ties_read_as_distances_combine_by_their_strengths(tmp_path: Path, rule: str,
                                                                    expected: float) -> None:
    edges = "source,target,weight\na,b,2\nb,a,4\nb,c,1\n"
    root = edge_study(tmp_path, edges, weight="weight", weight_means="distance", duplicates=rule)
    clean = load_network(root)
    weights = {(s, t): w for s, t, w in clean.edges[["source", "target", "weight"]].values}
    assert weights[("a", "b")] == pytest.approx(expected, **EXACT)
    assert weights[("b", "c")] == 1.0
    # The shortest path a -> c, by networkx on the combined distances: the a-b tie plus 1.
    graph = nx.Graph()
    graph.add_weighted_edges_from((s, t, w) for (s, t), w in weights.items())
    assert nx.shortest_path_length(graph, "a", "c", weight="weight") == pytest.approx(
        expected + 1, **EXACT)
    # a and c have degree 1 and b degree 2: repeating a tie never adds a tie.
    degree, _, n, m = numbers(root)
    assert (n, m, degree) == (3, 2, {"a": 1.0, "b": 2.0, "c": 1.0})


def test_ids_that_look_numeric_stay_text(tmp_path: Path) -> None:
    # 007, 7 and 7.0 are three people; reading ids as numbers would make them one.
    edges = "source,target\n007,7\n7,7.0\n7.0,x\n"
    nodes = "id,group\n007,red\n7,blue\n7.0,red\nx,blue\n"
    root = edge_study(tmp_path, edges, nodes=nodes)
    clean = load_network(root)
    assert sorted(clean.nodes.index) == ["007", "7", "7.0", "x"]
    graph = nx.Graph([("007", "7"), ("7", "7.0"), ("7.0", "x")])
    assert numbers(root) == reference(graph)
    assert clean.nodes.loc["007", "group"] == "red" and clean.nodes.loc["7", "group"] == "blue"


def test_ids_in_another_case_are_other_nodes_but_unicode_forms_are_one(tmp_path: Path) -> None:
    composed, decomposed = "Zo\u00eb", unicodedata.normalize("NFD", "Zo\u00eb")
    assert composed != decomposed  # the file really holds two spellings
    edges = f"source,target\nAna,ana\nana,{decomposed}\n{composed},Bo\n"
    root = edge_study(tmp_path, edges)
    # Ana and ana: two nodes (a warning says so); Zoë in both forms: one node (NFC).
    graph = nx.Graph([("Ana", "ana"), ("ana", composed), (composed, "Bo")])
    assert numbers(root) == reference(graph)
    clean = load_network(root)
    assert composed in clean.nodes.index and decomposed not in clean.nodes.index
    levels = sorted(f.level for f in clean.checks.findings if "case" in f.message
                    or "composed form" in f.message)
    assert levels == ["fix", "warning"]


def test_group_codes_written_as_numbers_are_groups_when_declared_categorical(tmp_path: Path) -> None:
    # Codes 01 and 1 are different groups of a categorical attribute. Ties: a-b (01-01, inside),
    # b-c (01-1, between), c-d (1-1, inside), d-e (1-2, between), e-a (2-01, between).
    # E-I index (Krackhardt & Stern 1988, Informal networks and organizational crises,
    # Social Psychology Quarterly 51(2):123-140) = (E - I) / (E + I) = (3 - 2) / 5 = 0.2.
    # Read as numbers, 01 = 1 would give I = 3 (a-b, b-c, c-d), E = 2: -0.2.
    edges = "source,target\na,b\nb,c\nc,d\nd,e\ne,a\n"
    nodes = "id,unit\na,01\nb,01\nc,1\nd,1\ne,2\n"
    root = edge_study(tmp_path, edges, nodes=nodes, categorical=["unit"])
    analysis = analyse(load_network(root))
    assert analysis.statistic("ei_index:unit") == pytest.approx(0.2, **EXACT)
    assert analysis.mixing[0].groups == ("01", "1", "2")
