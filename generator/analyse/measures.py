"""Node measures: degree, strength, betweenness, closeness, harmonic, eigenvector, PageRank,
coreness, clustering, constraint and effective size, each exactly as defined in the README
(definitions and references of each live in ``generator.vocabulary.measures``)."""

from __future__ import annotations

import math
import random
import warnings
from dataclasses import dataclass, field

import igraph as ig
import numpy as np
import pandas as pd

from ..vocabulary import measure
from .brokerage import burt_brokerage
from .graph import undirected_version
from .paths import SourcePaths, source_rows
from .seeding import seeded_igraph

__all__ = ["NodeMeasures", "Omission", "PathSampling", "node_measures"]


@dataclass(frozen=True)
class Omission:
    """Why a measure is left out of a network: a reason key (the wording lives with the
    presentation) and, where the reason has one, a count."""

    reason: str
    count: int = 0


@dataclass(frozen=True)
class PathSampling:
    """Path measures estimated from ``sources`` randomly chosen source nodes (Brandes & Pich 2007)."""

    sources: int
    nodes: int
    seed: int


@dataclass(frozen=True)
class NodeMeasures:
    """One row per node (index: node id), one column per measure that applies."""

    table: pd.DataFrame
    omitted: dict[str, Omission] = field(default_factory=dict)  # measure -> why it was left out
    sampling: PathSampling | None = None
    # Shortest paths out of each sampled source (in path lengths), for the path statistics.
    paths: SourcePaths | None = None


def _eigenvector_undefined(graph: ig.Graph) -> Omission | None:
    """Why eigenvector centrality is not reported, or None when it is.

    On a network of several parts the leading eigenvector lives on one part and gives exactly zero
    to every other, which reads as "unimportant" when it means "not measured"; so it is reported
    only for a strongly connected directed network, or an undirected one whose ties form a single
    component (isolates then score 0)."""
    if graph.ecount() == 0:
        return Omission("no_ties")
    if graph.is_directed():
        return None if graph.is_connected(mode="strong") else Omission("not_strongly_connected")
    with_ties = sum(1 for size in graph.connected_components().sizes() if size > 1)
    return Omission("several_components", with_ties) if with_ties > 1 else None


def _freeman_betweenness(raw: list[float], n: int, directed: bool) -> list[float]:
    # igraph's own normalized=True divides by n(n-1)/2, not Freeman's factor; do it here.
    if n < 3:
        return [0.0] * n
    scale = (n - 1) * (n - 2) / (1 if directed else 2)
    return [b / scale for b in raw]


def _reach_and_distance_sums(graph: ig.Graph, lengths: list[float], sources: list[int] | None
                             ) -> tuple[np.ndarray, np.ndarray, np.ndarray, SourcePaths | None]:
    """For each node v: how many (sampled) sources reach v, the sum of their path lengths to v, and
    the sum of reciprocal lengths. Rows are sources, so directed paths run source -> v. With
    sampled ``sources``, the same rows also give each source's own sums (``SourcePaths``), from
    which the path statistics are estimated."""
    n = graph.vcount()
    src = list(range(n)) if sources is None else sources
    reach = np.zeros(n)
    total = np.zeros(n)
    inverse = np.zeros(n)
    reached: list[int] = []
    sums: list[float] = []
    longest: list[float] = []
    farthest: list[int] = []
    for start in range(0, len(src), 256):  # bounded memory on large networks
        block = src[start:start + 256]
        dist = np.array(graph.distances(source=block, weights=lengths, mode="out"), dtype=float)
        for row, s in enumerate(block):
            dist[row, s] = math.inf  # a node does not reach itself for these sums
        finite = np.isfinite(dist)
        reach += finite.sum(axis=0)
        total += np.where(finite, dist, 0.0).sum(axis=0)
        with np.errstate(divide="ignore"):
            inverse += np.where(finite, 1.0 / dist, 0.0).sum(axis=0)
        if sources is not None:
            r, t, lo, f = source_rows(dist, block)
            reached += r
            sums += t
            longest += lo
            farthest += f
    paths = None if sources is None else SourcePaths(
        nodes=n, sources=tuple(sources), reached=tuple(reached), total=tuple(sums),
        longest=tuple(longest), farthest=tuple(farthest))
    return reach, total, inverse, paths


def node_measures(graph: ig.Graph, *, weighted: bool, exact_up_to: int, sample_sources: int,
                  seed: int) -> NodeMeasures:
    """Compute every node measure that applies to ``graph`` (built by ``build_graph``)."""
    n = graph.vcount()
    directed = graph.is_directed()
    lengths = graph.es["length"] if weighted else None
    strengths = graph.es["strength"] if weighted else None
    columns: dict[str, list[float]] = {}
    omitted: dict[str, Omission] = {}

    if directed:
        columns["degree"] = graph.degree(mode="all")
        columns["in_degree"] = graph.degree(mode="in")
        columns["out_degree"] = graph.degree(mode="out")
    else:
        columns["degree"] = graph.degree()
    if weighted:
        if directed:
            columns["strength"] = graph.strength(mode="all", weights="strength")
            columns["in_strength"] = graph.strength(mode="in", weights="strength")
            columns["out_strength"] = graph.strength(mode="out", weights="strength")
        else:
            columns["strength"] = graph.strength(weights="strength")

    sampling = None
    sources = None
    if n > exact_up_to:
        k = min(sample_sources, n)
        sources = sorted(random.Random(seed).sample(range(n), k))
        sampling = PathSampling(sources=k, nodes=n, seed=seed)
    raw = graph.betweenness(directed=directed, weights=lengths, sources=sources)
    if sources is not None:
        raw = [b * n / len(sources) for b in raw]
    columns["betweenness"] = _freeman_betweenness(raw, n, directed)

    reach, total, inverse, paths = _reach_and_distance_sums(graph, lengths or [1.0] * graph.ecount(),
                                                            sources)
    if sources is not None:
        # Scale each node's sample sums up to all n-1 other nodes; a sampled node is not its own
        # source, so it saw one source fewer.
        others = np.full(n, float(len(sources)))
        others[sources] -= 1
        factor = np.divide(n - 1, others, out=np.zeros(n), where=others > 0)
        reach, total, inverse = reach * factor, total * factor, inverse * factor
    with np.errstate(divide="ignore", invalid="ignore"):
        closeness = (np.where(total > 0, (reach / (n - 1)) * (reach / total), 0.0) if n > 1
                     else np.zeros(n))
    columns["closeness"] = closeness.tolist()
    columns["harmonic"] = (inverse / (n - 1)).tolist() if n > 1 else [0.0] * n

    why_not = _eigenvector_undefined(graph)
    if why_not is not None:
        omitted["eigenvector"] = why_not
    else:
        # directed=True is ignored on undirected graphs (igraph 1.0 rejects False there); ARPACK
        # starts from a random vector, so draw it from the study seed.
        with seeded_igraph(seed), warnings.catch_warnings():
            # Isolates beside one connected part score 0 by design; igraph warns about that.
            warnings.filterwarnings("ignore", message="Some eigenvector centralities are nearly zero")
            columns["eigenvector"] = graph.eigenvector_centrality(directed=True, scale=True,
                                                                  weights=strengths)
    columns["pagerank"] = graph.pagerank(directed=directed, damping=0.85, weights=strengths)

    undirected = undirected_version(graph)
    columns["coreness"] = undirected.coreness()
    columns["clustering"] = undirected.transitivity_local_undirected(mode="zero")
    columns["constraint"], columns["effective_size"] = burt_brokerage(undirected, weighted=weighted)

    table = pd.DataFrame(columns, index=pd.Index(graph.vs["name"], name="id"))
    for name in table.columns:
        if measure(name).whole:
            table[name] = table[name].astype("int64")
        else:
            table[name] = table[name].astype(float) + 0.0  # -0.0 from eigensolvers prints as 0.0
    return NodeMeasures(table=table, omitted=omitted, sampling=sampling, paths=paths)
