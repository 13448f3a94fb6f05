"""Brokerage: Burt's constraint and effective size of each node, on the undirected version."""

from __future__ import annotations

import math

import igraph as ig

__all__ = ["burt_brokerage"]


def _neighbour_weights(graph: ig.Graph, weighted: bool) -> list[dict[int, float]]:
    weights: list[dict[int, float]] = [{} for _ in range(graph.vcount())]
    strengths = graph.es["strength"] if weighted else [1.0] * graph.ecount()
    for (a, b), w in zip(graph.get_edgelist(), strengths):
        if a == b:
            continue
        weights[a][b] = weights[a].get(b, 0.0) + w
        weights[b][a] = weights[b].get(a, 0.0) + w
    return weights


def burt_brokerage(undirected: ig.Graph, *, weighted: bool) -> tuple[list[float], list[float]]:
    """Each node's constraint and effective size (Burt 1992), exactly as networkx 3 defines
    ``constraint`` and ``effective_size`` with ``weight``; NaN for an isolate.

    With w_ij the tie strength (1 for every tie when the network is unweighted),
    p_ij = w_ij / sum_k w_ik is i's proportional investment in j and m_jq = w_jq / max_k w_jk.
    Constraint c_i = sum over neighbours j of (p_ij + sum_q p_iq p_qj)^2, q running over i's
    other neighbours: low for a node whose contacts are not tied to each other. Effective size
    e_i = sum over neighbours j of (1 - sum_q p_iq m_jq): the number of neighbours less their
    redundancy; unweighted it equals n_i - 2 t_i / n_i (t_i ties among the n_i neighbours).
    Cost: O(sum of squared degrees).

    References: Burt, R. S.: Structural Holes: The Social Structure of Competition. Harvard
    University Press, 1992. doi:10.4159/9780674029095
    """
    weights = _neighbour_weights(undirected, weighted)
    share = []  # p_ij
    of_max = []  # m_ij
    for row in weights:
        total = sum(row.values())
        top = max(row.values()) if row else 0.0
        share.append({j: w / total for j, w in row.items()} if total else {})
        of_max.append({j: w / top for j, w in row.items()} if top else {})
    constraint: list[float] = []
    effective: list[float] = []
    for p in share:
        if not p:
            constraint.append(math.nan)
            effective.append(math.nan)
            continue
        c = 0.0
        e = 0.0
        for j, direct in p.items():
            indirect = sum(p_iq * share[q].get(j, 0.0) for q, p_iq in p.items() if q != j)
            c += (direct + indirect) ** 2
            e += 1.0 - sum(p_iq * of_max[j].get(q, 0.0) for q, p_iq in p.items() if q != j)
        constraint.append(c)
        effective.append(e)
    return constraint, effective
