"""Brokerage: Burt's constraint and effective size of each node, on the undirected version."""

from __future__ import annotations

import itertools

import igraph as ig
import numpy as np

__all__ = ["burt_brokerage"]


def burt_brokerage(undirected: ig.Graph, *, weighted: bool) -> tuple[list[float], list[float]]:
    """Each node's constraint and effective size (Burt 1992), exactly as networkx 3 defines
    ``constraint`` and ``effective_size`` with ``weight``; NaN for an isolate.

    With w_ij the tie strength (1 for every tie when the network is unweighted),
    p_ij = w_ij / sum_k w_ik is i's proportional investment in j and m_jq = w_jq / max_k w_jk.
    Constraint c_i = sum over neighbours j of (p_ij + sum_q p_iq p_qj)^2, q running over i's
    other neighbours: low for a node whose contacts are not tied to each other. Effective size
    e_i = sum over neighbours j of (1 - sum_q p_iq m_jq): the number of neighbours less their
    redundancy; unweighted it equals n_i - 2 t_i / n_i (t_i ties among the n_i neighbours).

    A q adds to node i's sums for neighbour j only when q is tied to both, so every term comes
    from a triangle (i, j, q): the sums are taken over igraph's list of triangles, each read in
    its six orders, with array arithmetic instead of a loop per pair of neighbours.

    References: Burt, R. S.: Structural Holes: The Social Structure of Competition. Harvard
    University Press, 1992. doi:10.4159/9780674029095
    """
    n = undirected.vcount()
    edges = np.array(undirected.get_edgelist(), dtype=np.int64).reshape(-1, 2)
    strengths = (np.array(undirected.es["strength"], dtype=float) if weighted
                 else np.ones(len(edges)))
    keep = edges[:, 0] != edges[:, 1]
    edges, strengths = edges[keep], strengths[keep]
    # Each tie as two arcs, parallel ties summed (as networkx's undirected graph holds them).
    src = np.concatenate([edges[:, 0], edges[:, 1]])
    dst = np.concatenate([edges[:, 1], edges[:, 0]])
    codes, where = np.unique(src * n + dst, return_inverse=True)
    weight = np.bincount(where, weights=np.concatenate([strengths, strengths]))
    src, dst = codes // max(n, 1), codes % max(n, 1)
    total = np.bincount(src, weights=weight, minlength=n)
    top = np.zeros(n)
    np.maximum.at(top, src, weight)
    share = weight / total[src]  # p of each arc i -> j
    of_max = weight / top[src]  # m of each arc j -> q

    def arc(a: np.ndarray, b: np.ndarray) -> np.ndarray:
        found: np.ndarray = np.searchsorted(codes, a * n + b)
        return found

    indirect = np.zeros(len(codes))
    redundancy = np.zeros(n)
    triangles = np.array(undirected.list_triangles(), dtype=np.int64).reshape(-1, 3)
    for first, second, third in itertools.permutations(range(3)):
        i, j, q = triangles[:, first], triangles[:, second], triangles[:, third]
        p_iq = share[arc(i, q)]
        indirect += np.bincount(arc(i, j), weights=p_iq * share[arc(q, j)], minlength=len(codes))
        redundancy += np.bincount(i, weights=p_iq * of_max[arc(j, q)], minlength=n)
    degree = np.bincount(src, minlength=n).astype(float)
    # float even with no ties at all (bincount of nothing gives whole numbers)
    constraint = np.bincount(src, weights=(share + indirect) ** 2, minlength=n).astype(float)
    effective = (degree - redundancy).astype(float)
    alone = degree == 0
    constraint[alone] = np.nan
    effective[alone] = np.nan
    return constraint.tolist(), effective.tolist()
