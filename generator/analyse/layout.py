"""A seeded force-directed layout, computed once per network and reused by every figure."""

from __future__ import annotations

import math
import random

import igraph as ig

from .graph import undirected_version
from .seeding import seeded_igraph

__all__ = ["LARGE_LAYOUT_NODES", "LARGE_LAYOUT_TRAVEL", "LAYOUT_ITERATIONS", "layout_iterations",
           "network_layout"]

# Above this many nodes repulsion is computed on a grid (only nearby nodes repel), which is ~25x
# faster on 3,000 nodes and looks the same at figure size; igraph's own "auto" uses 1,000 too.
GRID_ABOVE = 1000
ISOLATE_ROW_GAP = 0.08  # distance between the network and the row of isolates, in layout units
LAYOUT_ITERATIONS = 1000  # Fruchterman-Reingold iterations up to LARGE_LAYOUT_NODES tied nodes
# Above this many tied nodes the iterations shrink so that nodes x iterations stays within
# LAYOUT_WORK (at least MIN_ITERATIONS), and the layout starts from the community graph's own
# layout with each member near its community, so fewer iterations still settle into a picture.
LARGE_LAYOUT_NODES = 5_000
LAYOUT_WORK = LARGE_LAYOUT_NODES * LAYOUT_ITERATIONS
MIN_ITERATIONS = 50
# From the community start a node may move at most this share of the drawing's side in all:
# the iterations refine the communities' placement instead of redoing it. (igraph's default
# first step, sqrt(n) / 10 along each axis, cooling to 0, adds up to sqrt(n) * iterations / 20:
# with 50 iterations, 2.5 times the side, enough to stir every community into one blob.)
LARGE_LAYOUT_TRAVEL = 0.1


def layout_iterations(tied_nodes: int) -> int:
    """The Fruchterman-Reingold iteration budget for a layout of ``tied_nodes`` nodes with ties."""
    if tied_nodes <= LARGE_LAYOUT_NODES:
        return LAYOUT_ITERATIONS
    return max(MIN_ITERATIONS, LAYOUT_WORK // tied_nodes)


def _community_start(sub: ig.Graph, membership: list[int], rng: random.Random
                     ) -> list[list[float]]:
    """Start positions for a large layout: the communities' graph (one vertex per community,
    ties weighted by the ties between two communities) laid out first, then each member drawn
    uniformly in a disc around its community's place, the disc's area growing with the members."""
    k = max(membership)
    quotient = sub.copy()
    quotient.contract_vertices([c - 1 for c in membership], combine_attrs="ignore")
    quotient.es["count"] = 1
    quotient.simplify(combine_edges={"count": "sum"})
    side = math.sqrt(sub.vcount())
    start = [[rng.uniform(0, side), rng.uniform(0, side)] for _ in range(k)]
    places = quotient.layout_fruchterman_reingold(
        seed=start, weights=quotient.es["count"] if quotient.ecount() else None,
        niter=LAYOUT_ITERATIONS)
    xs, ys = [p[0] for p in places], [p[1] for p in places]
    spread = max(max(xs) - min(xs), max(ys) - min(ys)) or 1.0
    sizes = [0] * (k + 1)
    for c in membership:
        sizes[c] += 1
    # Discs of the largest community take about a fifth of the drawing across.
    unit = 0.1 * spread / math.sqrt(max(sizes))
    scale = side / (spread * 1.4)
    initial = []
    for c in membership:
        radius = unit * math.sqrt(sizes[c]) * math.sqrt(rng.random())
        angle = rng.uniform(0, 2 * math.pi)
        x, y = places[c - 1]
        initial.append([(x + radius * math.cos(angle)) * scale,
                        (y + radius * math.sin(angle)) * scale])
    return initial


def _renumbered(membership: list[int]) -> list[int]:
    """Communities 1..j of the tied nodes only (isolates hold communities of their own)."""
    numbers: dict[int, int] = {}
    return [numbers.setdefault(c, len(numbers) + 1) for c in membership]


def network_layout(graph: ig.Graph, *, seed: int, weighted: bool,
                   membership: list[int] | tuple[int, ...] | None = None
                   ) -> list[tuple[float, float]]:
    """Fruchterman-Reingold (1991) on the undirected version, stronger ties pulling harder, scaled
    into the unit square and rounded so figures are byte-stable. Above LARGE_LAYOUT_NODES tied
    nodes, with ``membership`` (community 1..k of every vertex) given, the layout starts from
    the community graph's layout and runs ``layout_iterations`` iterations.

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
        iterations = layout_iterations(len(tied))
        with seeded_igraph(f"layout:{seed}"):
            side = math.sqrt(len(tied))
            step = side / 10  # igraph's default first step
            if len(tied) > LARGE_LAYOUT_NODES and membership is not None:
                initial = _community_start(sub, _renumbered([membership[v] for v in tied]),
                                           start)
                # The step cools linearly to 0, so the moves add up to step * iterations / 2.
                step = 2 * LARGE_LAYOUT_TRAVEL * side / iterations
            else:
                # Spread the start like igraph's own (a square of side ~sqrt(n)) so grid cells
                # are useful.
                initial = [[start.uniform(0, side), start.uniform(0, side)] for _ in tied]
            coords = sub.layout_fruchterman_reingold(
                seed=initial, weights=sub.es["strength"] if weighted else None,
                niter=iterations, start_temp=step, grid=len(tied) > GRID_ABOVE)
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
