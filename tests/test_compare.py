"""Networks side by side: tie and node change between waves, community flow, QAP and MRQAP.

Checked against answers known by construction, against networkx (degrees) and igraph (NMI), and
MRQAP's coefficients against an ordinary least-squares fit with numpy on the same dyads."""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest
from conftest import analyse_graph

from generator.analyse.compare import (
    community_flow,
    difference_matrix,
    jaccard,
    mrqap,
    node_change,
    qap_correlation,
    relation_matrix,
    same_matrix,
    tie_change,
    tie_set,
)


def _wave(tmp_path, name: str, nodes: list[str], ties: list[tuple[str, str]]):
    graph = nx.Graph()
    graph.add_nodes_from(nodes)
    graph.add_edges_from(ties)
    return analyse_graph(tmp_path / name, graph, id=name)


def test_kept_added_and_dropped_ties_and_who_joined_and_left(tmp_path):
    # Built so the answers are known: a-b and c-d stay, b-c goes, d-e and b-e are new;
    # f is only in the first wave and e only in the second.
    first = _wave(tmp_path, "w1", ["a", "b", "c", "d", "f"], [("a", "b"), ("b", "c"), ("d", "c")])
    second = _wave(tmp_path, "w2", ["a", "b", "c", "d", "e"],
                   [("b", "a"), ("c", "d"), ("d", "e"), ("b", "e")])
    change = tie_change(first, second)
    assert (change.kept, change.added, change.dropped) == (2, 2, 1)
    assert change.jaccard == pytest.approx(2 / 5)  # |kept| / |all ties of either wave|
    nodes = node_change(first, second)
    assert nodes.joined == ("e",) and nodes.left == ("f",)
    assert set(nodes.both) == {"a", "b", "c", "d"}
    # Degree change against networkx's degrees of the two waves.
    g1 = nx.Graph([("a", "b"), ("b", "c"), ("d", "c")])
    g2 = nx.Graph([("b", "a"), ("c", "d"), ("d", "e"), ("b", "e")])
    moved = {row.node: row.change for row in nodes.movers["degree"]}
    assert moved == {n: g2.degree(n) - g1.degree(n) for n in ("a", "b", "c", "d")}
    assert abs(nodes.movers["degree"][0].change) == max(abs(v) for v in moved.values())


def test_the_jaccard_index_of_two_empty_tie_sets_is_undefined():
    assert jaccard(frozenset(), frozenset()) is None


def test_community_flow_counts_every_member_present_in_both_waves(tmp_path):
    blocks = nx.disjoint_union(nx.complete_graph(5), nx.complete_graph(5))
    blocks.add_edge(0, 5)
    later = nx.disjoint_union(nx.complete_graph(4), nx.complete_graph(6))
    later.add_edge(0, 9)
    first = analyse_graph(tmp_path / "one", blocks)
    second = analyse_graph(tmp_path / "two", later)
    flow = community_flow(first, second)
    present = set(map(str, first.nodes.index)) & set(map(str, second.nodes.index))
    assert flow.members == len(present) == 10
    # Node 4 moved from the first five to the six: so the second wave's partition differs.
    assert flow.nmi is not None and 0 < flow.nmi < 1
    import igraph as ig
    before = dict(zip(map(str, first.nodes.index), first.communities.membership))
    after = dict(zip(map(str, second.nodes.index), second.communities.membership))
    shared = sorted(present)
    assert flow.nmi == pytest.approx(ig.compare_communities(
        [before[n] for n in shared], [after[n] for n in shared], method="nmi"))


def _random_matrix(n: int, seed: int, density: float = 0.2, directed: bool = True) -> np.ndarray:
    rng = np.random.default_rng(seed)
    matrix = (rng.random((n, n)) < density).astype(float)
    np.fill_diagonal(matrix, 0)
    if not directed:
        matrix = np.triu(matrix, 1)
        matrix = matrix + matrix.T
    return matrix


def test_qap_identical_relations_correlate_fully_with_the_smallest_p():
    matrix = _random_matrix(20, 1)
    result = qap_correlation(matrix, matrix, directed=True, permutations=199, seed=7)
    assert result.correlation == pytest.approx(1.0)
    assert result.p == pytest.approx(1 / 200)  # the smallest possible, 1 / (permutations + 1)


def test_qap_independent_relations_get_a_large_p_and_the_seed_fixes_it():
    first, second = _random_matrix(25, 2), _random_matrix(25, 3)
    result = qap_correlation(first, second, directed=True, permutations=499, seed=7)
    mask = ~np.eye(25, dtype=bool)
    assert result.correlation == pytest.approx(np.corrcoef(first[mask], second[mask])[0, 1])
    assert result.p is not None and result.p > 0.1
    # A weak relation (6% of the cells copied from the first): p in between, fixed by the seed.
    rng = np.random.default_rng(9)
    weak = np.where(rng.random((25, 25)) < 0.06, first, second)
    np.fill_diagonal(weak, 0)
    once = qap_correlation(first, weak, directed=True, permutations=499, seed=7)
    again = qap_correlation(first, weak, directed=True, permutations=499, seed=7)
    other = qap_correlation(first, weak, directed=True, permutations=499, seed=8)
    assert once.p == again.p and other.p != once.p and 0.05 < once.p < 0.95


def test_mrqap_coefficients_are_least_squares_on_the_dyads_and_recover_a_planted_effect():
    n = 30
    rng = np.random.default_rng(11)
    predictor = _random_matrix(n, 4, density=0.3)
    unrelated = _random_matrix(n, 5, density=0.3)
    noise = rng.normal(0, 0.5, (n, n))
    outcome = 2.0 * predictor + noise
    np.fill_diagonal(outcome, 0)
    result = mrqap(outcome, {"advice": predictor, "other": unrelated}, directed=True,
                   permutations=199, seed=3, outcome_name="work")
    mask = ~np.eye(n, dtype=bool)
    design = np.column_stack([np.ones(mask.sum()), predictor[mask], unrelated[mask]])
    reference, *_ = np.linalg.lstsq(design, outcome[mask], rcond=None)  # numpy's OLS
    terms = {t.term: t for t in result.terms}
    assert [terms[k].coefficient for k in ("intercept", "advice", "other")] == pytest.approx(
        list(reference))
    assert terms["advice"].coefficient == pytest.approx(2.0, abs=0.1)
    assert terms["advice"].p == pytest.approx(1 / 200)
    assert terms["other"].p is not None and terms["other"].p > 0.05
    fitted = design @ reference
    residual = outcome[mask] - fitted
    total = outcome[mask] - outcome[mask].mean()
    assert result.r_squared == pytest.approx(1 - residual @ residual / (total @ total))
    std = reference[1] * predictor[mask].std() / outcome[mask].std()
    assert terms["advice"].std_coefficient == pytest.approx(std)
    assert result.dyads == n * (n - 1)


def test_attribute_matrices_for_the_model():
    # By hand: a and c share "north"; b has no value and shares nothing.
    same = same_matrix(["north", None, "north", "south"])
    assert same.tolist() == [[1, 0, 1, 0], [0, 0, 0, 0], [1, 0, 1, 0], [0, 0, 0, 1]]
    assert difference_matrix([1.0, 4.0, 2.5]).tolist() == [[0, 3, 1.5], [3, 0, 1.5], [1.5, 1.5, 0]]


def test_relation_matrices_follow_the_node_order_and_the_weights(tmp_path):
    graph = nx.DiGraph()
    graph.add_weighted_edges_from([("a", "b", 3.0), ("b", "c", 1.0)])
    analysis = analyse_graph(tmp_path, graph, weight="weight")
    matrix = relation_matrix(analysis, ["c", "b", "a"])
    assert matrix.tolist() == [[0, 0, 0], [1, 0, 0], [0, 3, 0]]
    assert tie_set(analysis) == {("a", "b"), ("b", "c")}
