"""The figure of one node's ego network: the node in the middle, the nodes it is tied to on a
ring around it (in the direction they lie on the network map, so the two read alike), its ties
and the ties among those nodes.

This is geometry only (positions, sizes, colours, texts); the theme writes it as SVG inside the
node's page, so a network of thousands of nodes does not need thousands of image files.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..analyse import NetworkAnalysis, tie_strengths
from ..vocabulary import node_name
from .figure import DEFAULT_SETTINGS, FigureSettings
from .node_encoding import NodeColours, colour_nodes
from .tie_geometry import tie_widths

__all__ = ["EGO_MAX_ALTERS", "EgoFigure", "EgoNode", "EgoTie", "ego_figures"]

EGO_MAX_ALTERS = 40  # drawn at most, the strongest ties first; the page lists every tie
_LABELLED_ALTERS = 24  # above this many, the ring is not labelled (the list below names them)
_WIDTH = 760.0  # room either side of the ring for the labels
_HEIGHT = 400.0
_RING = 160.0
_MAX_LABEL = 30  # characters of a label on the figure
_EGO_RADIUS = 13.0
_ALTER_RADIUS = 8.0
_ARROW = 9.0


@dataclass(frozen=True)
class EgoNode:
    x: float
    y: float
    r: float
    colour: str
    label: str
    position: int  # the node's place in node order (its page is node-<position + 1>)
    anchor: str  # "start" or "end": which way the label runs from the node
    label_x: float
    label_y: float
    is_ego: bool = False


@dataclass(frozen=True)
class EgoTie:
    x1: float
    y1: float
    x2: float
    y2: float
    width: float
    head: str  # an arrowhead's SVG path ("" on an undirected network)
    touches_ego: bool


@dataclass(frozen=True)
class EgoFigure:
    width: float
    height: float
    nodes: tuple[EgoNode, ...]  # the ego first
    ties: tuple[EgoTie, ...]
    alters: int  # nodes tied to the ego
    drawn: int  # of those, how many are on the figure
    labelled: bool


def _short(label: str) -> str:
    return label if len(label) <= _MAX_LABEL else label[:_MAX_LABEL - 1] + "…"


def _ring_order(analysis: NetworkAnalysis, ego: int, alters: list[int]) -> list[int]:
    """Alters by the angle at which they lie from the ego on the network map."""
    ex, ey = analysis.layout[ego]

    def angle(v: int) -> tuple[float, int]:
        x, y = analysis.layout[v]
        return (math.atan2(y - ey, x - ex) if (x, y) != (ex, ey) else 0.0, v)

    return sorted(alters, key=angle)


def _head(x1: float, y1: float, x2: float, y2: float, gap: float) -> tuple[float, float, str]:
    """Where a directed tie's line ends, and its arrowhead with the tip on the target's rim."""
    length = math.hypot(x2 - x1, y2 - y1)
    if length <= gap + _ARROW:
        return x2, y2, ""
    ux, uy = (x2 - x1) / length, (y2 - y1) / length
    tip_x, tip_y = x2 - ux * gap, y2 - uy * gap
    base_x, base_y = tip_x - ux * _ARROW, tip_y - uy * _ARROW
    half = _ARROW * 0.42
    path = (f"M{tip_x:.1f} {tip_y:.1f}L{base_x - uy * half:.1f} {base_y + ux * half:.1f}"
            f"L{base_x + uy * half:.1f} {base_y - ux * half:.1f}Z")
    return base_x, base_y, path


def ego_figures(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS
                ) -> list[EgoFigure]:
    """The ego figure of every node, in node order."""
    colours: NodeColours = colour_nodes(analysis, settings)
    index = {node: i for i, node in enumerate(analysis.nodes.index)}
    edges = analysis.edges
    pairs = [(index[s], index[t]) for s, t in zip(edges["source"], edges["target"])]
    if analysis.weighted:
        strengths = tie_strengths([float(w) for w in edges["weight"]], analysis.weight_means)[0]
    else:
        strengths = [1.0] * len(pairs)
    widths = tie_widths(tuple(strengths), weighted=analysis.weighted) * 1.6
    n = len(analysis.nodes)
    touching: list[list[int]] = [[] for _ in range(n)]
    for t, (a, b) in enumerate(pairs):
        touching[a].append(t)
        if b != a:
            touching[b].append(t)
    labels = [node_name(str(label), str(node)) for node, label
              in zip(analysis.nodes.index, analysis.nodes["label"])]
    figures = []
    for ego in range(n):
        # Each alter's strongest tie with the ego decides which alters are drawn.
        strongest: dict[int, float] = {}
        for t in touching[ego]:
            a, b = pairs[t]
            other = b if a == ego else a
            strongest[other] = max(strongest.get(other, 0.0), strengths[t])
        ranked = sorted(strongest, key=lambda v: (-strongest[v], v))
        shown = _ring_order(analysis, ego, ranked[:EGO_MAX_ALTERS])
        labelled = len(shown) <= _LABELLED_ALTERS
        cx, cy = _WIDTH / 2, _HEIGHT / 2
        place = {ego: (cx, cy)}
        nodes = [EgoNode(cx, cy, _EGO_RADIUS, colours.colours[ego], _short(labels[ego]), ego,
                         "start", cx + _EGO_RADIUS + 4, cy - _EGO_RADIUS - 4, True)]
        for k, v in enumerate(shown):
            theta = 2 * math.pi * k / max(len(shown), 1) - math.pi / 2
            x = cx + _RING * math.cos(theta)
            y = cy + _RING * math.sin(theta)
            place[v] = (x, y)
            right = math.cos(theta) >= -1e-9
            nodes.append(EgoNode(
                round(x, 1), round(y, 1), _ALTER_RADIUS, colours.colours[v], _short(labels[v]), v,
                "start" if right else "end",
                round(x + (1 if right else -1) * (_ALTER_RADIUS + 4), 1), round(y + 4, 1)))
        ties = []
        drawn = set(place)
        seen: set[int] = set()
        for v in [ego, *shown]:
            for t in touching[v]:
                a, b = pairs[t]
                if t in seen or a not in drawn or b not in drawn or a == b:
                    continue
                seen.add(t)
                (x1, y1), (x2, y2) = place[a], place[b]
                head = ""
                if analysis.directed:
                    gap = (_EGO_RADIUS if b == ego else _ALTER_RADIUS) + 1.5
                    x2, y2, head = _head(x1, y1, x2, y2, gap)
                ties.append(EgoTie(round(x1, 1), round(y1, 1), round(x2, 1), round(y2, 1),
                                   round(float(widths[t]), 2), head, ego in (a, b)))
        # Ties with the ego on top of the ties among its alters.
        ties.sort(key=lambda tie: tie.touches_ego)
        figures.append(EgoFigure(_WIDTH, _HEIGHT, tuple(nodes), tuple(ties), len(strongest),
                                 len(shown), labelled))
    return figures
