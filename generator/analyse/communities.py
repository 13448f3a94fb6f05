"""Communities: best of several seeded runs of Leiden, Louvain or label propagation, with the
agreement between runs and under perturbed data as measures of stability, a profile of every
community, and the comparison of communities with node attributes."""

from __future__ import annotations

import math
import random
from collections import Counter
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace

import igraph as ig
import numpy as np

from .seeding import seeded_igraph

__all__ = [
    "COASSIGNMENT_MAX_NODES",
    "NOT_PERTURBED",
    "AttributeComparison",
    "CommunityProfile",
    "CommunityResult",
    "CommunityTies",
    "StabilityResult",
    "adjusted_rand_index",
    "community_profiles",
    "community_ties",
    "compare_with_attribute",
    "find_communities",
    "merge_values",
    "normalised_mutual_information",
    "perturbation_seeds",
    "perturbed_stability",
    "run_seeds",
]

# The co-assignment matrix is kept (and drawn) up to this many nodes: it grows with n squared.
COASSIGNMENT_MAX_NODES = 300


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


def _runs(graph: ig.Graph, method: str, resolution: float, runs: int, seed: int,
          weights: list[float] | None, progress: Callable[[int, int], None] | None = None
          ) -> tuple[list[tuple[int, ...]], list[float], int]:
    """Every run's partition (canonical labels), its score at ``resolution``, and the index of
    the best run (highest score; the earliest among equal ones)."""
    partitions = []
    for done, s in enumerate(run_seeds(seed, runs), start=1):
        partitions.append(_canonical(_one_run(graph, method, resolution, weights, s)))
        if progress is not None:
            progress(done, runs)
    scores = [graph.modularity(list(p), weights=weights, resolution=resolution) for p in partitions]
    best_index = max(range(runs), key=lambda i: (round(scores[i], 12), -i))
    return partitions, scores, best_index


def find_communities(undirected: ig.Graph, *, method: str, resolution: float, runs: int, seed: int,
                     weighted: bool, progress: Callable[[int, int], None] | None = None
                     ) -> CommunityResult:
    """Run ``method`` ``runs`` times with seeds from ``seed`` on the undirected version (with
    strengths) and keep the partition with the highest modularity at ``resolution``.

    Agreement between the kept partition and the other runs (adjusted Rand index, Hubert & Arabie
    1985; normalised mutual information, Danon et al. 2005) shows how stable the result is: near 1,
    every run found much the same communities; well below 1, the split is one of several.
    ``progress(done, runs)`` follows the runs.
    """
    weights = undirected.es["strength"] if weighted else None
    n = undirected.vcount()
    if undirected.ecount() == 0:
        membership = tuple(range(1, n + 1))
        return CommunityResult(method, resolution, runs, seed, membership, (1,) * n, None, None,
                               None, None, 1, 1.0)
    partitions, scores, best_index = _runs(undirected, method, resolution, runs, seed, weights,
                                           progress)
    best = partitions[best_index]
    counted = Counter(best)
    sizes = tuple(counted[k] for k in range(1, max(best) + 1))
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




# ---------------------------------------------------------------------------------------------
# Comparing two partitions


def _contingency(a: Sequence[object], b: Sequence[object]) -> tuple[Counter[tuple[object, object]],
                                                                    Counter[object],
                                                                    Counter[object]]:
    if len(a) != len(b):
        raise ValueError(f"unequal lengths: {len(a)}, {len(b)}")
    return Counter(zip(a, b)), Counter(a), Counter(b)


def adjusted_rand_index(a: Sequence[object], b: Sequence[object]) -> float:
    """The adjusted Rand index of two partitions of the same nodes (``a[i]`` and ``b[i]`` are
    the groups of node i).

    ARI = (index - expected) / (maximum - expected), with index = sum over cells of the
    contingency table of C(n_ij, 2), expected = sum_i C(a_i, 2) sum_j C(b_j, 2) / C(n, 2) and
    maximum = (sum_i C(a_i, 2) + sum_j C(b_j, 2)) / 2. 1 for identical partitions, about 0 for
    partitions as alike as chance makes them. NaN when undefined: fewer than two nodes, or both
    partitions trivial in the same way (maximum equals expected).

    References: Hubert, L. & Arabie, P.: Comparing partitions. Journal of Classification
    2:193-218, 1985. doi:10.1007/BF01908075
    """
    cells, rows, columns = _contingency(a, b)
    n = len(a)
    if n < 2:
        return math.nan
    index = sum(math.comb(c, 2) for c in cells.values())
    sum_a = sum(math.comb(c, 2) for c in rows.values())
    sum_b = sum(math.comb(c, 2) for c in columns.values())
    expected = sum_a * sum_b / math.comb(n, 2)
    maximum = (sum_a + sum_b) / 2
    if maximum == expected:
        return math.nan
    return (index - expected) / (maximum - expected)


def normalised_mutual_information(a: Sequence[object], b: Sequence[object]) -> float:
    """Normalised mutual information of two partitions of the same nodes, in the form of Danon
    et al. (2005): NMI = 2 I(A; B) / (H(A) + H(B)), natural logarithms (the base cancels).

    1 for identical partitions, 0 for independent ones. NaN when both partitions put every node
    in one group (H(A) + H(B) = 0) or there are no nodes.

    References: Danon, L., Diaz-Guilera, A., Duch, J. & Arenas, A.: Comparing community
    structure identification. Journal of Statistical Mechanics P09008, 2005.
    doi:10.1088/1742-5468/2005/09/P09008
    """
    cells, rows, columns = _contingency(a, b)
    n = len(a)
    if n == 0:
        return math.nan
    mutual = sum(c / n * math.log(c * n / (rows[i] * columns[j])) for (i, j), c in cells.items())
    entropy = -sum(c / n * math.log(c / n) for c in (*rows.values(), *columns.values()))
    if entropy <= 0:
        return math.nan
    return max(0.0, min(1.0, 2 * mutual / entropy))


# ---------------------------------------------------------------------------------------------
# Stability under perturbed data


@dataclass(frozen=True)
class StabilityResult:
    """How the communities hold up when a share of the ties is removed at random.

    ``perturbations`` reruns of the community method (as configured: ``runs`` runs, the best
    kept) each on the network with ``removed`` of its ties (``share`` of them) taken away, the
    ties drawn with ``random.Random`` seeded from ``perturbation_seeds(seed, ...)``.

    ``robustness_ari`` is the mean adjusted Rand index between each perturbed partition and the
    kept one, over the nodes that still have a tie in the perturbed network (``robustness_runs``
    counts the runs where it is defined). ``confidence[i]`` is, over the perturbed runs, the mean
    share of the other members of vertex i's kept community that the run put in its community;
    1 for a node alone in its kept community (nothing can be split from it). ``together[i][j]``
    counts the runs that put vertices i and j in one community (kept up to
    ``COASSIGNMENT_MAX_NODES`` nodes; None above). ``why`` names by key why nothing was run.
    """

    perturbations: int
    share: float
    seed: int
    removed: int
    robustness_ari: float | None
    robustness_runs: int
    confidence: tuple[float, ...]
    together: tuple[tuple[int, ...], ...] | None
    why: str | None = None

    @property
    def ran(self) -> bool:
        return self.perturbations > 0 and self.why is None


NOT_PERTURBED = StabilityResult(perturbations=0, share=0.0, seed=0, removed=0,
                                robustness_ari=None, robustness_runs=0, confidence=(),
                                together=None, why="not_requested")


def perturbation_seeds(seed: int, perturbations: int) -> list[int]:
    """The seed of each perturbed run, derived from the study seed; it draws the ties removed and
    seeds that run's community runs."""
    rng = random.Random(f"perturbations:{seed}")
    return [rng.randrange(2**31) for _ in range(perturbations)]


def _perturbed_partition(undirected: ig.Graph, *, method: str, resolution: float, runs: int,
                         weighted: bool, removed: int, seed: int
                         ) -> tuple[tuple[int, ...], list[bool]]:
    """The best partition of the network with ``removed`` ties taken away at random, and which
    vertices still have a tie."""
    graph = undirected.copy()
    graph.delete_edges(random.Random(seed).sample(range(undirected.ecount()), removed))
    present = [d > 0 for d in graph.degree()]
    if graph.ecount() == 0:
        return tuple(range(1, graph.vcount() + 1)), present
    weights = graph.es["strength"] if weighted else None
    partitions, _, best_index = _runs(graph, method, resolution, runs, seed, weights)
    return partitions[best_index], present


def perturbed_stability(undirected: ig.Graph, kept: Sequence[int], *, method: str,
                        resolution: float, runs: int, seed: int, weighted: bool,
                        perturbations: int, share: float,
                        progress: Callable[[int, int], None] | None = None) -> StabilityResult:
    """Rerun the community method ``perturbations`` times on the network with ``share`` of its
    ties removed at random, and measure how far each run agrees with the ``kept`` partition.

    Each run removes round(share x m) ties, drawn without replacement; the runs are independent
    and seeded from ``seed``. Perturbing the ties and comparing the partitions found checks whether
    the communities rest on a few ties that a survey might have missed (Karrer, Levina & Newman
    2008 perturb networks in this spirit; Fortunato 2010 surveys such checks). Cost:
    ``perturbations`` x ``runs`` community runs. ``progress(done, total)`` follows the runs.
    """
    n = undirected.vcount()
    m = undirected.ecount()
    if perturbations <= 0:
        return NOT_PERTURBED
    if m == 0:
        return _not_run(perturbations, share, seed, "no_ties")
    removed = round(share * m)
    sizes = Counter(kept)
    confidence_sum = [0.0] * n
    keep_matrix = n <= COASSIGNMENT_MAX_NODES
    together = [[0] * n for _ in range(n)] if keep_matrix else None
    agreements: list[float] = []
    seeds = perturbation_seeds(seed, perturbations)
    for done, run_seed in enumerate(seeds, start=1):
        found, present = _perturbed_partition(undirected, method=method, resolution=resolution,
                                              runs=runs, weighted=weighted, removed=removed,
                                              seed=run_seed)
        on = [v for v in range(n) if present[v]]
        ari = adjusted_rand_index([kept[v] for v in on], [found[v] for v in on])
        if not math.isnan(ari):
            agreements.append(ari)
        cells = Counter(zip(kept, found))
        for v in range(n):
            if sizes[kept[v]] > 1:
                confidence_sum[v] += (cells[(kept[v], found[v])] - 1) / (sizes[kept[v]] - 1)
        if together is not None:
            groups: dict[int, list[int]] = {}
            for v, label in enumerate(found):
                groups.setdefault(label, []).append(v)
            for members in groups.values():
                for i in members:
                    row = together[i]
                    for j in members:
                        row[j] += 1
        if progress is not None:
            progress(done, perturbations)
    confidence = tuple(confidence_sum[v] / perturbations if sizes[kept[v]] > 1 else 1.0
                       for v in range(n))
    return StabilityResult(
        perturbations=perturbations, share=share, seed=seed, removed=removed,
        robustness_ari=sum(agreements) / len(agreements) if agreements else None,
        robustness_runs=len(agreements), confidence=confidence,
        together=tuple(tuple(row) for row in together) if together is not None else None)


def _not_run(perturbations: int, share: float, seed: int, why: str) -> StabilityResult:
    """A stability result that did not run, with the reason key."""
    return StabilityResult(perturbations=perturbations, share=share, seed=seed, removed=0,
                           robustness_ari=None, robustness_runs=0, confidence=(), together=None,
                           why=why)


# ---------------------------------------------------------------------------------------------
# Profiles of communities and their comparison with node attributes


@dataclass(frozen=True)
class CommunityProfile:
    """One community of the kept partition, counted on the undirected version (unweighted).

    ``internal`` ties join two members, ``external`` ties one member and a non-member.
    ``density`` is internal / (size (size - 1) / 2), None for a single node. ``conductance`` is
    external / min(vol(S), vol(rest)), where vol sums the degrees of a set (Fortunato 2010;
    networkx ``conductance``); None when either volume is 0 (an isolate, or one community holding
    every tie). ``confidence`` is the mean community confidence of the members (see
    ``StabilityResult``), None when no perturbed reruns ran.
    """

    community: int
    size: int
    internal: int
    external: int
    density: float | None
    conductance: float | None
    confidence: float | None = None


def community_profiles(undirected: ig.Graph, membership: Sequence[int],
                       confidence: Sequence[float] = ()) -> tuple[CommunityProfile, ...]:
    """The profile of every community 1..k of ``membership`` (vertex i in ``membership[i]``);
    ``confidence`` (one per vertex, or empty) gives each community its members' mean."""
    summed: dict[int, float] = {}
    for c, value in zip(membership, confidence):
        summed.setdefault(c, 0.0)
        summed[c] += value
    k = max(membership, default=0)
    size = Counter(membership)
    edges = np.array(undirected.get_edgelist(), dtype=np.int64).reshape(-1, 2)
    counted = community_ties(membership, edges[:, 0], edges[:, 1], directed=False)
    internal = dict(zip(range(1, k + 1), counted.inside))
    external = dict.fromkeys(range(1, k + 1), 0)
    for (a, b), n in zip(counted.pairs, counted.counts):
        external[a] += n
        external[b] += n
    total_volume = 2 * undirected.ecount()
    profiles = []
    for c in range(1, k + 1):
        s = size[c]
        volume = 2 * internal[c] + external[c]
        smaller = min(volume, total_volume - volume)
        profiles.append(CommunityProfile(
            community=c, size=s, internal=internal[c], external=external[c],
            density=internal[c] / (s * (s - 1) / 2) if s > 1 else None,
            conductance=external[c] / smaller if smaller > 0 else None,
            confidence=summed.get(c, 0.0) / s if confidence else None))
    return tuple(profiles)


@dataclass(frozen=True)
class CommunityTies:
    """The community graph of a partition: ties inside each community 1..k, and the ties
    between each pair of communities that has any (``pairs[i]`` holds ``counts[i]`` ties; a
    directed network counts each direction apart, an undirected one lists a pair once, the
    lower community first)."""

    inside: tuple[int, ...]
    pairs: tuple[tuple[int, int], ...]
    counts: tuple[int, ...]


def community_ties(membership: Sequence[int], sources: Sequence[int] | np.ndarray,
                   targets: Sequence[int] | np.ndarray, *, directed: bool) -> CommunityTies:
    """Count the ties of vertex pairs (``sources[i]``, ``targets[i]``) by the communities of
    their ends (``membership[v]`` in 1..k), without a loop per tie."""
    member = np.asarray(membership, dtype=np.int64)
    k = int(member.max()) if member.size else 0
    a = member[np.asarray(sources, dtype=np.int64)] if len(sources) else np.zeros(0, np.int64)
    b = member[np.asarray(targets, dtype=np.int64)] if len(targets) else np.zeros(0, np.int64)
    same = a == b
    inside = np.bincount(a[same], minlength=k + 1)[1:]
    a, b = a[~same], b[~same]
    if not directed:
        a, b = np.minimum(a, b), np.maximum(a, b)
    codes, counts = np.unique(a * (k + 1) + b, return_counts=True)
    pairs = tuple((int(code // (k + 1)), int(code % (k + 1))) for code in codes)
    return CommunityTies(tuple(int(x) for x in inside), pairs, tuple(int(c) for c in counts))


@dataclass(frozen=True)
class AttributeComparison:
    """Communities against one categorical node attribute, over the nodes that have a value.

    ``counts[c - 1][j]`` is the number of nodes of community c whose value is ``values[j]``
    (values sorted as text). ``nmi`` is the normalised mutual information of the two partitions
    (Danon et al. 2005), None with ``why`` when undefined. ``left_out`` counts nodes without a
    value.
    """

    attribute: str
    values: tuple[str, ...]
    counts: tuple[tuple[int, ...], ...]
    nmi: float | None
    why: str | None
    left_out: int


def compare_with_attribute(attribute: str, membership: Sequence[int],
                           values: Sequence[object | None]) -> AttributeComparison:
    """Cross-table and NMI of the communities in ``membership`` and the attribute ``values``
    (one per vertex; None or NaN for a node without a value)."""
    def missing(value: object | None) -> bool:
        return value is None or (isinstance(value, float) and math.isnan(value)) or value == ""

    kept = [(c, str(v)) for c, v in zip(membership, values) if not missing(v)]
    names = tuple(sorted({v for _, v in kept}, key=lambda t: (t.casefold(), t)))
    column = {v: j for j, v in enumerate(names)}
    k = max(membership, default=0)
    table = [[0] * len(names) for _ in range(k)]
    for c, v in kept:
        table[c - 1][column[v]] += 1
    why = None
    nmi: float | None = None
    if not kept:
        why = "no_values"
    else:
        value = normalised_mutual_information([c for c, _ in kept], [v for _, v in kept])
        if math.isnan(value):
            why = "one_group"
        else:
            nmi = value
    return AttributeComparison(attribute=attribute, values=names,
                               counts=tuple(tuple(row) for row in table), nmi=nmi, why=why,
                               left_out=len(membership) - len(kept))


def merge_values(comparison: AttributeComparison, small: Sequence[str],
                 name: str) -> AttributeComparison:
    """The cross-table with the values in ``small`` merged into one column called ``name``
    (last), their counts added up. The NMI stays that of the values as measured."""
    if not set(small) & set(comparison.values):
        return comparison
    kept = [j for j, v in enumerate(comparison.values) if v not in small]
    merged = [j for j, v in enumerate(comparison.values) if v in small]
    counts = tuple(tuple([row[j] for j in kept] + [sum(row[j] for j in merged)])
                   for row in comparison.counts)
    return replace(comparison, values=(*(comparison.values[j] for j in kept), name),
                   counts=counts)
