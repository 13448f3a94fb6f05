"""Communities: best of several seeded runs of Leiden, Louvain or label propagation, with the
agreement between runs as a measure of stability."""

from __future__ import annotations

import math
import random
from dataclasses import dataclass

import igraph as ig

from .seeding import seeded_igraph

__all__ = ["CommunityResult", "find_communities", "run_seeds"]


@dataclass(frozen=True)
class CommunityResult:
    """The partition kept, how it was found and how far the runs agreed with it.

    ``membership[i]`` is the community of vertex i, numbered 1..k by size (largest first, ties
    broken by the smallest member in node order). ``objective`` is modularity at the configured
    resolution; ``modularity`` the standard one (resolution 1).
    """

    method: str
    resolution: float
    runs: int
    seed: int
    membership: tuple[int, ...]
    sizes: tuple[int, ...]
    objective: float | None
    modularity: float | None
    mean_ari: float | None  # mean adjusted Rand index between the kept partition and every run
    mean_nmi: float | None  # mean normalised mutual information, likewise
    distinct_partitions: int
    best_run_share: float  # share of runs that found the kept partition (up to relabelling)

    @property
    def count(self) -> int:
        return len(self.sizes)


def _mean_or_none(values: list[float]) -> float | None:
    """The mean, or None where agreement is undefined (e.g. every run put all nodes together)."""
    mean = sum(values) / len(values)
    return None if math.isnan(mean) else mean


def run_seeds(seed: int, runs: int) -> list[int]:
    """Independent seeds for each run, derived from the study seed."""
    rng = random.Random(f"communities:{seed}")
    return [rng.randrange(2**31) for _ in range(runs)]


def _one_run(graph: ig.Graph, method: str, resolution: float, weights: list[float] | None,
             seed: int) -> list[int]:
    with seeded_igraph(seed):
        if method == "leiden":
            # The default objective is CPM, which splits everything into singletons; ask for
            # modularity and iterate until the partition stops changing.
            found = graph.community_leiden(objective_function="modularity", weights=weights,
                                           resolution=resolution, n_iterations=-1)
        elif method == "louvain":
            found = graph.community_multilevel(weights=weights, resolution=resolution)
        else:
            found = graph.community_label_propagation(weights=weights)
    return list(found.membership)


def _canonical(membership: list[int]) -> tuple[int, ...]:
    """Relabel 1..k by size, largest first, ties broken by the smallest member (node order)."""
    members: dict[int, list[int]] = {}
    for vertex, label in enumerate(membership):
        members.setdefault(label, []).append(vertex)
    order = sorted(members.values(), key=lambda vs: (-len(vs), vs[0]))
    new = {}
    for rank, vertices in enumerate(order, start=1):
        for v in vertices:
            new[v] = rank
    return tuple(new[v] for v in range(len(membership)))


def find_communities(undirected: ig.Graph, *, method: str, resolution: float, runs: int, seed: int,
                     weighted: bool) -> CommunityResult:
    """Run ``method`` ``runs`` times with seeds from ``seed`` on the undirected version (with
    strengths) and keep the partition with the highest modularity at ``resolution``.

    Agreement between the kept partition and the other runs (adjusted Rand index, Hubert & Arabie
    1985; normalised mutual information, Danon et al. 2005) shows how stable the result is: near 1,
    every run found much the same communities; well below 1, the split is one of several.
    """
    weights = undirected.es["strength"] if weighted else None
    n = undirected.vcount()
    if undirected.ecount() == 0:
        membership = tuple(range(1, n + 1))
        return CommunityResult(method, resolution, runs, seed, membership, (1,) * n, None, None,
                               None, None, 1, 1.0)
    partitions = [_canonical(_one_run(undirected, method, resolution, weights, s))
                  for s in run_seeds(seed, runs)]
    scores = [undirected.modularity(list(p), weights=weights, resolution=resolution) for p in partitions]
    best_index = max(range(runs), key=lambda i: (round(scores[i], 12), -i))
    best = partitions[best_index]
    sizes = tuple(best.count(k) for k in range(1, max(best) + 1))
    ari = [ig.compare_communities(list(best), list(p), method="adjusted_rand") for p in partitions]
    nmi = [ig.compare_communities(list(best), list(p), method="nmi") for p in partitions]
    distinct = len(set(partitions))
    return CommunityResult(
        method=method, resolution=resolution, runs=runs, seed=seed, membership=best, sizes=sizes,
        objective=scores[best_index],
        modularity=undirected.modularity(list(best), weights=weights, resolution=1.0),
        mean_ari=_mean_or_none(ari), mean_nmi=_mean_or_none(nmi), distinct_partitions=distinct,
        best_run_share=sum(1 for p in partitions if p == best) / runs,
    )


