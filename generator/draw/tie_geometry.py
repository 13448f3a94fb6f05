"""Where tie lines and arrowheads go on the map, worked out in map units.

The map has a fixed scale (points per layout unit), so arrows can be cut to the rim of the
target marker here, with plain numpy, instead of asking matplotlib to intersect curves with
every marker at draw time (which is slow and adds nothing a reader can see).
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["arrow_shapes", "tie_widths"]

ARROW_LENGTH = 5.0  # points, for a tie of width 1
ARROW_HALF_WIDTH = 2.0


def tie_widths(strengths: tuple[float, ...], *, weighted: bool) -> np.ndarray:
    """Line width in points of every tie: thin and equal, or growing mildly with strength so
    the strongest tie is about three times as wide as the weakest."""
    m = len(strengths)
    base = 0.6 if m <= 1500 else 0.3
    values = np.array(strengths, dtype=float)
    if not weighted or m == 0 or values.max() == values.min():
        return np.full(m, base)
    share = (values - values.min()) / (values.max() - values.min())
    widths: np.ndarray = base * (1.0 + 2.0 * share)
    return widths


def arrow_shapes(xy: np.ndarray, pairs: tuple[tuple[int, int], ...], radii: np.ndarray,
                 widths: np.ndarray, points_per_unit: float
                 ) -> tuple[list[tuple[tuple[float, float], tuple[float, float]]],
                            list[np.ndarray], list[float]]:
    """Line segments (source rim to arrow base), arrowhead triangles (tip on the target rim)
    and the width of each tie drawn.

    ``radii`` are marker radii in points; ``points_per_unit`` converts points to layout units.
    Ties between nodes that overlap on the map get neither line nor head.
    """
    segments = []
    heads = []
    drawn = []
    unit = 1.0 / points_per_unit
    for (a, b), width in zip(pairs, widths):
        start, end = xy[a], xy[b]
        delta = end - start
        distance = math.hypot(delta[0], delta[1])
        head_length = (ARROW_LENGTH + 1.5 * width) * unit
        gap_a, gap_b = radii[a] * unit, (radii[b] + 0.8) * unit
        if distance <= gap_a + gap_b + head_length:
            continue
        direction = delta / distance
        normal = np.array([-direction[1], direction[0]])
        tip = end - direction * gap_b
        base = tip - direction * head_length
        half = (ARROW_HALF_WIDTH + 0.6 * width) * unit
        segments.append((tuple(start + direction * gap_a), tuple(base + direction * 0.3 * unit)))
        heads.append(np.array([tip, base + normal * half, base - normal * half]))
        drawn.append(float(width))
    return segments, heads, drawn
