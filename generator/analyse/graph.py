"""Build the igraph Graph of a cleaned network, with each tie's strength and path length."""

from __future__ import annotations

import igraph as ig

from ..ingest import CleanNetwork

__all__ = ["build_graph", "tie_strengths", "undirected_version"]


def tie_strengths(weights: list[float], weight_means: str) -> tuple[list[float], list[float]]:
    """Each tie's strength and path length from its weight as written.

    With weight_means = "strength" the strength is the weight and the length 1/weight; with
    "distance" the length is the weight and the strength 1/weight; an unweighted network gives
    every tie strength 1 and length 1 (Opsahl, Agneessens & Skvoretz 2010; Newman 2001)."""
    inverse = [1.0 / w for w in weights]
    return (weights, inverse) if weight_means == "strength" else (inverse, weights)


def build_graph(network: CleanNetwork) -> ig.Graph:
    """Vertices in the network's node order (attribute ``name`` is the id); edges carry
    ``weight`` (as written), ``strength`` and ``length`` (see ``tie_strengths``)."""
    ids = list(network.nodes.index)
    index = {node: i for i, node in enumerate(ids)}
    edges = network.edges
    pairs = list(zip((index[s] for s in edges["source"]), (index[t] for t in edges["target"])))
    graph = ig.Graph(n=len(ids), edges=pairs, directed=network.directed)
    graph.vs["name"] = ids
    graph["weight_means"] = network.config.weight_means
    if network.weighted:
        weights = [float(w) for w in edges["weight"]]
        strengths, lengths = tie_strengths(weights, network.config.weight_means)
    else:
        weights = strengths = lengths = [1.0] * len(pairs)
    graph.es["weight"] = weights
    graph.es["strength"] = strengths
    graph.es["length"] = lengths
    return graph


def undirected_version(graph: ig.Graph) -> ig.Graph:
    """Each directed tie becomes undirected; a reciprocal pair merges into one tie whose strength
    is the sum of the two strengths and whose length is 1/strength."""
    if not graph.is_directed():
        return graph
    undirected = graph.as_undirected(mode="collapse", combine_edges={"strength": "sum"})
    undirected.es["length"] = [1.0 / s for s in undirected.es["strength"]]
    return undirected
