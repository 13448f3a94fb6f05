"""The map of a two-mode network: one mode drawn as circles, the other as rounded squares, in
two colours as well, so the modes stay apart in greyscale and for colour-blind readers."""

from __future__ import annotations

import math

from matplotlib.collections import LineCollection
from matplotlib.lines import Line2D
from matplotlib.path import Path

from ..analyse.two_mode import TwoModeAnalysis
from ..vocabulary import count_of, list_in_words, number
from .figure import Figure
from .style import INK, NODE_EDGE, OKABE_ITO, TIE_GREY, drawing_style, figure_bytes, new_figure

__all__ = ["MAX_LABELS", "draw_two_mode"]

MAX_LABELS = 60  # nodes are named on the map up to this many
MODE_COLOURS = (OKABE_ITO[4], OKABE_ITO[0])  # first mode blue, second mode orange


def _rounded_square(corner: float = 0.3, steps: int = 6) -> Path:
    """A square marker with rounded corners, centred on 0, half-width 1."""
    points = []
    inner = 1 - corner
    for cx, cy, start in ((inner, inner, 0), (-inner, inner, 90), (-inner, -inner, 180),
                          (inner, -inner, 270)):
        for step in range(steps + 1):
            angle = math.radians(start + 90 * step / steps)
            points.append((cx + corner * math.cos(angle), cy + corner * math.sin(angle)))
    points.append(points[0])
    codes = [Path.MOVETO] + [Path.LINETO] * (len(points) - 2) + [Path.CLOSEPOLY]
    return Path(points, codes)


ROUNDED_SQUARE = _rounded_square()


def draw_two_mode(analysis: TwoModeAnalysis, *, labels: bool = True) -> Figure:
    first, second = analysis.modes
    nodes = analysis.nodes
    position = {(m, i): xy for m, i, xy in zip(nodes["mode"], nodes["id"], analysis.layout)}
    segments = [(position[(first, a)], position[(second, b)])
                for a, b in zip(analysis.edges["first"], analysis.edges["second"])]
    n = len(nodes)
    size = max(18.0, min(110.0, 2400.0 / max(n, 1)))
    title = f"{analysis.title}: who is tied to what"
    with drawing_style():
        fig = new_figure(7.0, 6.2)
        ax = fig.add_axes((0.02, 0.1, 0.96, 0.8))
        ax.set_axis_off()
        ax.add_collection(LineCollection(segments, colors=TIE_GREY, linewidths=0.8, zorder=1))
        for mode, marker, colour in ((first, "o", MODE_COLOURS[0]),
                                     (second, ROUNDED_SQUARE, MODE_COLOURS[1])):
            xy = [position[(mode, i)] for i in nodes.loc[nodes["mode"] == mode, "id"]]
            if xy:
                ax.scatter([p[0] for p in xy], [p[1] for p in xy],
                           s=size * (1.4 if mode == second else 1.0), marker=marker,
                           c=colour, edgecolors=NODE_EDGE, linewidths=0.6, zorder=2)
        # Every node is named on a small map; on a larger one, the nodes of a mode small enough.
        named = {m for m in analysis.modes
                 if n <= MAX_LABELS or int((nodes["mode"] == m).sum()) <= MAX_LABELS // 2}
        if labels:
            for (x, y), label, mode in zip(analysis.layout, nodes["label"], nodes["mode"]):
                if mode not in named:
                    continue
                ax.annotate(str(label), (x, y), xytext=(4, 3), textcoords="offset points",
                            fontsize=6.5, color=INK, zorder=3)
        ys = [p[1] for p in analysis.layout] or [0.0, 1.0]
        ax.set_xlim(-0.06, 1.12)
        ax.set_ylim(min(ys) - 0.06, max(ys) + 0.06)
        handles = [Line2D([], [], linestyle="", marker="o", markersize=8,
                          markerfacecolor=MODE_COLOURS[0], markeredgecolor=NODE_EDGE,
                          label=f"{first} (circle)"),
                   Line2D([], [], linestyle="", marker=ROUNDED_SQUARE, markersize=8,
                          markerfacecolor=MODE_COLOURS[1], markeredgecolor=NODE_EDGE,
                          label=f"{second} (rounded square)"),
                   Line2D([], [], color=TIE_GREY, linewidth=1.2,
                          label=f"tie: this {first} is linked to this {second}")]
        fig.legend(handles=handles, loc="lower center", ncol=3, frameon=False, fontsize=8)
        fig.text(0.015, 0.975, title, ha="left", va="top", fontsize=10.5, fontweight="bold",
                 color=INK)
        svg, png = figure_bytes(fig)
    n1 = int(analysis.statistic(f"nodes:{first}") or 0)
    n2 = int(analysis.statistic(f"nodes:{second}") or 0)
    ties = int(analysis.statistic("edges") or 0)
    busiest = nodes.sort_values(["degree"], ascending=False, kind="mergesort")
    top = {mode: list(busiest.loc[busiest["mode"] == mode, "label"].astype(str)[:3])
           for mode in analysis.modes}
    density = analysis.statistic("density")
    alt = (f"Network map of {count_of(n1, f'{first} node')} drawn as blue circles and "
           f"{count_of(n2, f'{second} node')} drawn as orange rounded squares, joined by "
           f"{count_of(ties, 'tie')}; each tie links a {first} node to a {second} node. "
           f"The {first} nodes with most ties: {list_in_words(top[first])}. "
           f"The {second} nodes with most ties: {list_in_words(top[second])}."
           + (f" Density {number(density)}." if density is not None else ""))
    caption = (f"Each line joins a {first} (circle) to a {second} (rounded square) it is tied "
               f"to; nodes tied to many of the same partners sit close together. Two {first} "
               f"nodes are never joined directly: that is what the {first} projection shows.")
    return Figure(name="two-mode-map", title=f"{first.capitalize()} and {second} nodes and their "
                  "ties", alt=alt, caption=caption, svg=svg, png=png)
