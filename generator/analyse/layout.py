"""A seeded force-directed layout, computed once per network and reused by every figure."""

from __future__ import annotations

import math
import random

import igraph as ig

from .graph import undirected_version
from .seeding import seeded_igraph

__all__ = ["network_layout"]

# Above this many nodes repulsion is computed on a grid (only nearby nodes repel), which is ~25x
# faster on 3,000 nodes and looks the same at figure size; igraph's own "auto" uses 1,000 too.
GRID_ABOVE = 1000
ISOLATE_ROW_GAP = 0.08  # distance between the network and the row of isolates, in layout units


def network_layout(graph: ig.Graph, *, seed: int, weighted: bool) -> list[tuple[float, float]]:
    """Fruchterman-Reingold (1991) on the undirected version, stronger ties pulling harder, scaled
    into the unit square and rounded so figures are byte-stable.

    Isolates would drift to the edges and squeeze the rest into the middle, so they are laid out
    in a row beneath the connected part instead."""
    undirected = undirected_version(graph)
    n = undirected.vcount()
    if n == 0:
        return []
    degrees = undirected.degree()
    tied = [v for v in range(n) if degrees[v] > 0]
    isolates = [v for v in range(n) if degrees[v] == 0]
    positions: dict[int, tuple[float, float]] = {}
    if tied:
        sub = undirected.induced_subgraph(tied)
        start = random.Random(f"layout:{seed}")
        # Spread the start like igraph's own (a square of side ~sqrt(n)) so grid cells are useful.
        side = math.sqrt(len(tied))
        initial = [[start.uniform(0, side), start.uniform(0, side)] for _ in tied]
        with seeded_igraph(f"layout:{seed}"):
            coords = sub.layout_fruchterman_reingold(
                seed=initial, weights=sub.es["strength"] if weighted else None, niter=1000,
                grid=len(tied) > GRID_ABOVE)
        xs, ys = [p[0] for p in coords], [p[1] for p in coords]
        x0, y0 = min(xs), min(ys)
        span = max(max(xs) - x0, max(ys) - y0) or 1.0
        for v, (x, y) in zip(tied, coords):
            # y grows upwards in figures; the isolates' row goes below the lowest node
            positions[v] = ((x - x0) / span, (y - y0) / span)
    if isolates:
        per_row = max(1, math.ceil(math.sqrt(len(isolates)) * 2))
        width = max((x for x, _ in positions.values()), default=1.0) or 1.0
        step = width / max(per_row - 1, 1)
        for k, v in enumerate(isolates):
            row, col = divmod(k, per_row)
            positions[v] = (col * step if per_row > 1 else width / 2,
                            -ISOLATE_ROW_GAP * (1 + row) if tied else -row * step)
    xs = [positions[v][0] for v in range(n)]
    ys = [positions[v][1] for v in range(n)]
    x0, y0 = min(xs), min(ys)
    span = max(max(xs) - x0, max(ys) - y0) or 1.0
    return [(round((positions[v][0] - x0) / span + 0.0, 6),
             round((positions[v][1] - y0) / span + 0.0, 6)) for v in range(n)]
