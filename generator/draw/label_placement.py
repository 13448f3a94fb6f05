"""Put node names beside their nodes where they cover the fewest other names and nodes."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from matplotlib.axes import Axes
from matplotlib.backend_bases import RendererBase
from matplotlib.text import Annotation
from matplotlib.transforms import Bbox

HorizontalAlignment = Literal["left", "center", "right"]
VerticalAlignment = Literal["bottom", "baseline", "center", "center_baseline", "top"]

__all__ = ["NodeDisc", "place_labels"]

# Offsets tried in order: above, below, right, left, then the four corners. (dx, dy) are unit
# directions; ha/va anchor the text on the side facing the node.
_CANDIDATES: tuple[tuple[int, int, HorizontalAlignment, VerticalAlignment], ...] = (
    (0, 1, "center", "bottom"), (0, -1, "center", "top"), (1, 0, "left", "center"),
    (-1, 0, "right", "center"), (1, 1, "left", "bottom"), (-1, 1, "right", "bottom"),
    (1, -1, "left", "top"), (-1, -1, "right", "top"),
)
_LABEL_CLASH = 100.0  # a name over another name costs as much as covering 100 nodes
_NAMED_NODE = 10.0  # covering another named node (the largest ones) is worse than a small one


@dataclass(frozen=True)
class NodeDisc:
    """A marker on the map in display pixels."""

    x: float
    y: float
    radius: float

    def meets(self, box: Bbox) -> bool:
        nearest_x = min(max(self.x, box.x0), box.x1)
        nearest_y = min(max(self.y, box.y0), box.y1)
        return math.hypot(self.x - nearest_x, self.y - nearest_y) < self.radius


def _offset(dx: int, dy: int, radius_points: float) -> tuple[float, float]:
    gap = radius_points + 1.5
    if dx and dy:  # corners: step out along the diagonal
        gap /= math.sqrt(2)
    return dx * gap, dy * gap


def place_labels(ax: Axes, renderer: RendererBase, labels: list[Annotation],
                 vertices: list[int], radii_points: np.ndarray, discs: list[NodeDisc]) -> None:
    """Move each label (already added at its node) to its least crowded side, in order.

    A candidate's cost counts the other nodes it covers (named nodes weigh more) and, far more
    heavily, the names already placed that it overlaps; the first cheapest candidate wins, so
    the result is the same on every run.
    """
    frame = ax.get_window_extent(renderer)
    placed: list[Bbox] = []
    named = set(vertices)
    for text, vertex in zip(labels, vertices):
        best: tuple[float, int] | None = None
        for index, (dx, dy, ha, va) in enumerate(_CANDIDATES):
            box = _try(text, renderer, _offset(dx, dy, radii_points[vertex]), ha, va)
            cost = sum(_NAMED_NODE if i in named else 1.0
                       for i, disc in enumerate(discs) if i != vertex and disc.meets(box))
            cost += _LABEL_CLASH * sum(1 for other in placed if box.overlaps(other))
            if box.x0 < frame.x0 or box.x1 > frame.x1 or box.y1 > frame.y1 or box.y0 < frame.y0:
                cost += 0.5  # prefer staying inside the map
            if best is None or cost < best[0]:
                best = (cost, index)
        dx, dy, ha, va = _CANDIDATES[best[1] if best else 0]
        placed.append(_try(text, renderer, _offset(dx, dy, radii_points[vertex]), ha, va).padded(2))


def _try(text: Annotation, renderer: RendererBase, offset: tuple[float, float],
         ha: HorizontalAlignment, va: VerticalAlignment) -> Bbox:
    text.xyann = offset
    text.set_horizontalalignment(ha)
    text.set_verticalalignment(va)
    return text.get_window_extent(renderer)
