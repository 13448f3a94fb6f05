"""Node measures: degree, strength, betweenness, closeness, harmonic, eigenvector, PageRank,
coreness and clustering, each exactly as defined in the project's design."""

from __future__ import annotations

import math
import random
import warnings
from dataclasses import dataclass, field

import igraph as ig
import numpy as np
import pandas as pd

from .graph import undirected_version
from .seeding import seeded_igraph

__all__ = ["MEASURE_INFO", "PATH_MEASURES", "MeasureInfo", "NodeMeasures", "PathSampling",
           "node_measures"]

# Measures computed from shortest paths: the ones estimated when path sources are sampled.
PATH_MEASURES = ("betweenness", "closeness", "harmonic")


@dataclass(frozen=True)
class MeasureInfo:
    title: str
    definition: str  # the formula in words; the methods page prints it
    references: tuple[str, ...]
    reads: str  # "strength", "length" or "none": how the measure reads tie weights


MEASURE_INFO: dict[str, MeasureInfo] = {
    "degree": MeasureInfo("Degree", "Number of ties at the node; in a directed network the sum of "
                          "incoming and outgoing ties.", ("freeman1979",), "none"),
    "in_degree": MeasureInfo("In-degree", "Number of ties pointing to the node.", ("freeman1979",), "none"),
    "out_degree": MeasureInfo("Out-degree", "Number of ties leaving the node.", ("freeman1979",), "none"),
    "strength": MeasureInfo("Strength", "Sum of the strengths of the node's ties (all directions).",
                            ("opsahl2010",), "strength"),
    "in_strength": MeasureInfo("In-strength", "Sum of the strengths of incoming ties.",
                               ("opsahl2010",), "strength"),
    "out_strength": MeasureInfo("Out-strength", "Sum of the strengths of outgoing ties.",
                                ("opsahl2010",), "strength"),
    "betweenness": MeasureInfo(
        "Betweenness", "Share of shortest paths between other pairs that pass through the node "
        "(Brandes' algorithm over path lengths), normalised as Freeman: raw value divided by "
        "(n-1)(n-2)/2 in an undirected network and (n-1)(n-2) in a directed one.",
        ("freeman1977", "brandes2001"), "length"),
    "closeness": MeasureInfo(
        "Closeness", "Wasserman-Faust form: ((r-1)/(n-1)) x ((r-1)/sum of path lengths from the r-1 "
        "nodes that reach the node); 0 when no node reaches it. Directed: paths to the node.",
        ("wasserman1994",), "length"),
    "harmonic": MeasureInfo(
        "Harmonic closeness", "Sum over the other nodes of 1/path length to the node (0 for nodes "
        "that cannot reach it), divided by n-1.", ("marchiori2000", "boldi2014"), "length"),
    "eigenvector": MeasureInfo(
        "Eigenvector", "Leading eigenvector of the tie-strength matrix, scaled so the largest value "
        "is 1. Directed: a node scores high when high-scoring nodes point to it. Computed only when "
        "it is defined for the whole network: a directed network must be strongly connected, and "
        "the ties of an undirected one must form a single component (isolates then score 0).",
        ("bonacich1972",), "strength"),
    "pagerank": MeasureInfo(
        "PageRank", "Stationary share of a random walk that follows ties in proportion to their "
        "strength and jumps to a random node with probability 0.15 (damping 0.85); nodes with no "
        "outgoing tie spread their share over all nodes. Sums to 1.", ("brin1998",), "strength"),
    "coreness": MeasureInfo(
        "Coreness", "k-core number on the undirected version: the largest k such that the node "
        "belongs to a subgraph where every node has at least k ties.", ("seidman1983",), "none"),
    "clustering": MeasureInfo(
        "Local clustering", "Share of pairs of the node's neighbours that are tied to each other, on "
        "the undirected version, ignoring weights; 0 below two neighbours.", ("watts1998",), "none"),
    "community": MeasureInfo(
        "Community", "Community of the node in the partition kept (the best of several seeded "
        "runs by modularity, on the undirected version with strengths); 1 is the largest, equal "
        "sizes ordered by their first member. An isolate forms a community of its own.",
        (), "strength"),
}


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
    omitted: dict[str, str] = field(default_factory=dict)  # measure -> why it was left out
    sampling: PathSampling | None = None


def _eigenvector_undefined(graph: ig.Graph) -> str:
    """Why eigenvector centrality is not reported, or "" when it is.

    On a network of several parts the leading eigenvector lives on one part and gives exactly zero
    to every other, which reads as "unimportant" when it means "not measured"; so it is reported
    only for a strongly connected directed network, or an undirected one whose ties form a single
    component (isolates then score 0)."""
    if graph.ecount() == 0:
        return "the network has no ties"
    if graph.is_directed():
        if not graph.is_connected(mode="strong"):
            return ("the network is directed and not strongly connected, so the leading "
                    "eigenvector gives zero to every node outside one strong component; see "
                    "PageRank instead")
        return ""
    with_ties = sum(1 for size in graph.connected_components().sizes() if size > 1)
    if with_ties > 1:
        return (f"the ties form {with_ties} separate components, so the leading eigenvector gives "
                "zero to every node outside one of them; see PageRank or harmonic closeness instead")
    return ""


def _freeman_betweenness(raw: list[float], n: int, directed: bool) -> list[float]:
    # igraph's own normalized=True divides by n(n-1)/2, not Freeman's factor; do it here.
    if n < 3:
        return [0.0] * n
    scale = (n - 1) * (n - 2) / (1 if directed else 2)
    return [b / scale for b in raw]


def _reach_and_distance_sums(graph: ig.Graph, lengths: list[float], sources: list[int] | None
                             ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """For each node v: how many (sampled) sources reach v, the sum of their path lengths to v, and
    the sum of reciprocal lengths. Rows are sources, so directed paths run source -> v."""
    n = graph.vcount()
    src = list(range(n)) if sources is None else sources
    reach = np.zeros(n)
    total = np.zeros(n)
    inverse = np.zeros(n)
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
    return reach, total, inverse


def node_measures(graph: ig.Graph, *, weighted: bool, exact_up_to: int, sample_sources: int,
                  seed: int) -> NodeMeasures:
    """Compute every node measure that applies to ``graph`` (built by ``build_graph``)."""
    n = graph.vcount()
    directed = graph.is_directed()
    lengths = graph.es["length"] if weighted else None
    strengths = graph.es["strength"] if weighted else None
    columns: dict[str, list[float]] = {}
    omitted: dict[str, str] = {}

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

    reach, total, inverse = _reach_and_distance_sums(graph, lengths or [1.0] * graph.ecount(), sources)
    if sources is not None:
        # Scale each node's sample sums up to all n-1 other nodes; a sampled node is not its own
        # source, so it saw one source fewer.
        others = np.full(n, float(len(sources)))
        others[sources] -= 1
        factor = np.divide(n - 1, others, out=np.zeros(n), where=others > 0)
        reach, total, inverse = reach * factor, total * factor, inverse * factor
    with np.errstate(divide="ignore", invalid="ignore"):
        closeness = np.where(total > 0, (reach / (n - 1)) * (reach / total), 0.0) if n > 1 else np.zeros(n)
    columns["closeness"] = closeness.tolist()
    columns["harmonic"] = (inverse / (n - 1)).tolist() if n > 1 else [0.0] * n

    why_not = _eigenvector_undefined(graph)
    if why_not:
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

    table = pd.DataFrame(columns, index=pd.Index(graph.vs["name"], name="id"))
    for name in table.columns:
        if name in ("degree", "in_degree", "out_degree", "coreness"):
            table[name] = table[name].astype("int64")
        else:
            table[name] = table[name].astype(float) + 0.0  # -0.0 from eigensolvers prints as 0.0
    return NodeMeasures(table=table, omitted=omitted, sampling=sampling)
