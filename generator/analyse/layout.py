"""A seeded force-directed layout, computed once per network and reused by every figure."""

from __future__ import annotations

import random

import igraph as ig

from .graph import undirected_version
from .seeding import seeded_igraph

__all__ = ["network_layout"]


def network_layout(graph: ig.Graph, *, seed: int, weighted: bool) -> list[tuple[float, float]]:
    """Fruchterman-Reingold (1991) on the undirected version, stronger ties pulling harder,
    scaled into the unit square and rounded so figures are byte-stable."""
    undirected = undirected_version(graph)
    n = undirected.vcount()
    if n == 0:
        return []
    start = random.Random(f"layout:{seed}")
    initial = [[start.uniform(-1, 1), start.uniform(-1, 1)] for _ in range(n)]
    with seeded_igraph(seed):
        layout = undirected.layout_fruchterman_reingold(
            seed=initial, weights=undirected.es["strength"] if weighted else None, niter=1000,
            grid=False)
    xs, ys = [p[0] for p in layout], [p[1] for p in layout]
    span = max(max(xs) - min(xs), max(ys) - min(ys)) or 1.0
    return [(round((x - min(xs)) / span, 6), round((y - min(ys)) / span, 6)) for x, y in layout]
