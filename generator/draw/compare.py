"""Figures of a series of waves: the main statistics across the waves, one small panel each, and
the flow of members between the communities of two consecutive waves."""

from __future__ import annotations

import math

from matplotlib.patches import Polygon, Rectangle

from ..analyse.compare import CommunityFlow, SeriesComparison
from ..vocabulary import count_of, list_in_words, number, statistic_title
from .figure import Figure
from .style import (
    BAR_COLOUR,
    INK,
    OKABE_ITO,
    QUIET_INK,
    drawing_style,
    figure_bytes,
    new_figure,
    quiet_axes,
    wrap_title,
)

__all__ = ["SERIES_STATISTICS", "draw_community_flow", "draw_series_statistics", "flow_figure_name"]

# The statistics drawn across waves, when a wave has them: the shape of the network, not its size.
SERIES_STATISTICS = ("density", "reciprocity", "transitivity", "average_clustering", "modularity",
                     "degree_assortativity")
_PANEL = (2.1, 1.5)  # inches per panel
_COLUMNS = 3


def flow_figure_name(earlier: str, later: str) -> str:
    return f"flow-{earlier}-{later}"


def draw_series_statistics(comparison: SeriesComparison, title: str) -> Figure | None:
    """One panel per statistic of SERIES_STATISTICS defined in at least one wave; None if none."""
    values = dict(comparison.statistics)
    shown = [name for name in SERIES_STATISTICS
             if name in values and any(v is not None for v in values[name])]
    if not shown:
        return None
    rows = (len(shown) + _COLUMNS - 1) // _COLUMNS
    columns = min(len(shown), _COLUMNS)
    width = 0.5 + columns * (_PANEL[0] + 0.55)
    heading = wrap_title(f"{title}: statistics across waves", width - 0.2)
    top = 0.3 + 0.2 * (heading.count("\n") + 1)
    height = top + rows * (_PANEL[1] + 0.75)
    waves = list(comparison.waves)
    with drawing_style():
        figure = new_figure(width, height)
        figure.text(0.1 / width, 1 - 0.1 / height, heading, ha="left", va="top", fontsize=10.5,
                    fontweight="bold", color=INK)
        for k, name in enumerate(shown):
            row, column = divmod(k, _COLUMNS)
            left = 0.55 + column * (_PANEL[0] + 0.55)
            bottom = height - top - (row + 1) * (_PANEL[1] + 0.75) + 0.45
            ax = figure.add_axes((left / width, bottom / height, _PANEL[0] / width,
                                  _PANEL[1] / height))
            points = [(w, v) for w, v in zip(waves, values[name]) if v is not None]
            ax.plot([w for w, _ in points], [v for _, v in points], color=BAR_COLOUR,
                    marker="o", markersize=4, linewidth=1.4)
            for w, v in points:
                ax.annotate(number(v), xy=(w, v), xytext=(0, 5), textcoords="offset points",
                            ha="center", fontsize=7, color=INK)
            ax.set_title(statistic_title(name), fontsize=8.5, loc="left", color=INK)
            ax.set_xticks(waves, [f"wave {w}" for w in waves], fontsize=7.5)
            ax.set_xlim(waves[0] - 0.4, waves[-1] + 0.4)
            low = min(v for _, v in points)
            high = max(v for _, v in points)
            pad = (high - low) * 0.35 or max(abs(high) * 0.2, 0.05)
            ax.set_ylim(low - pad, high + pad)
            ax.tick_params(axis="y", labelsize=7)
            quiet_axes(ax, grid="y")
        svg, png = figure_bytes(figure)
    described = [f"{statistic_title(n).lower()} " + " then ".join(
        number(v) if v is not None else "not defined" for v in values[n]) for n in shown]
    numbers = list_in_words([str(w) for w in waves])
    alt = (f"Small line charts, one per statistic, across waves {numbers}: "
           + "; ".join(described) + ".")
    caption = ("Each panel follows one statistic from wave to wave, on its own scale: read the "
               "direction of change, not the height of one panel against another. The table "
               "below gives every statistic.")
    return Figure(name="statistics", title=f"{title}: statistics across waves", alt=alt,
                  caption=caption, svg=svg, png=png)


def _colour(community: int) -> str:
    return OKABE_ITO[(community - 1) % len(OKABE_ITO)]


def draw_community_flow(flow: CommunityFlow, earlier_title: str, later_title: str) -> Figure:
    """Two columns of blocks, the communities of the earlier wave on the left and of the later
    on the right, each as tall as its members present in both waves; a band for every
    (earlier, later) pair, as wide as the members who moved so, in the earlier community's
    colour."""
    total = max(flow.members, 1)
    left_sizes: dict[int, int] = {}
    right_sizes: dict[int, int] = {}
    for a, b, n in flow.flows:
        left_sizes[a] = left_sizes.get(a, 0) + n
        right_sizes[b] = right_sizes.get(b, 0) + n
    gap = 0.02 * total
    heading = f"Where the members of each community went: {earlier_title} to {later_title}"

    def stack(sizes: dict[int, int]) -> dict[int, float]:
        tops, y = {}, 0.0
        for community in sorted(sizes):
            tops[community] = y
            y += sizes[community] + gap
        return tops

    left_top, right_top = stack(left_sizes), stack(right_sizes)
    span = max(sum(left_sizes.values()) + gap * len(left_sizes),
               sum(right_sizes.values()) + gap * len(right_sizes), 1)
    width, height = 6.4, 0.9 + min(5.5, 0.9 + 0.22 * max(len(left_sizes), len(right_sizes), 1))
    with drawing_style():
        figure = new_figure(width, height)
        lines = wrap_title(heading, width - 0.2)
        figure.text(0.1 / width, 1 - 0.1 / height, lines, ha="left", va="top", fontsize=10.5,
                    fontweight="bold", color=INK)
        top_margin = 0.3 + 0.2 * (lines.count("\n") + 1)
        ax = figure.add_axes((1.5 / width, 0.3 / height, (width - 3.0) / width,
                              (height - top_margin - 0.35) / height))
        ax.set_xlim(0, 1)
        ax.set_ylim(span, 0)
        ax.axis("off")
        block = 0.06
        left_used = dict.fromkeys(left_sizes, 0.0)
        right_used = dict.fromkeys(right_sizes, 0.0)
        for a, b, n in flow.flows:
            y0 = left_top[a] + left_used[a]
            y1 = right_top[b] + right_used[b]
            left_used[a] += n
            right_used[b] += n
            xs = [block + i / 20 * (1 - 2 * block) for i in range(21)]
            ease = [(1 - math.cos(math.pi * i / 20)) / 2 for i in range(21)]
            upper = [y0 + (y1 - y0) * e for e in ease]
            lower = [u + n for u in upper]
            outline = list(zip(xs, upper)) + list(zip(reversed(xs), reversed(lower)))
            ax.add_patch(Polygon(outline, closed=True, facecolor=_colour(a), alpha=0.45,
                                 edgecolor="none"))
        for side, sizes, tops, x in (("left", left_sizes, left_top, 0.0),
                                     ("right", right_sizes, right_top, 1 - block)):
            below = -span  # labels of small neighbouring blocks are pushed apart, never stacked
            for community in sorted(sizes):
                size = sizes[community]
                ax.add_patch(Rectangle((x, tops[community]), block, size,
                                       facecolor=_colour(community) if side == "left" else "#5A5A5A",
                                       edgecolor="white", linewidth=0.6))
                y = max(tops[community] + size / 2, below + 0.05 * span)
                below = y
                ax.text(-0.02 if side == "left" else 1.02, y, f"community {community} ({size})",
                        ha="right" if side == "left" else "left", va="center", fontsize=7.5,
                        color=INK)
        ax.text(block / 2, -0.02 * span, earlier_title, ha="left", va="bottom", fontsize=8,
                color=QUIET_INK, fontweight="bold")
        ax.text(1 - block / 2, -0.02 * span, later_title, ha="right", va="bottom", fontsize=8,
                color=QUIET_INK, fontweight="bold")
        svg, png = figure_bytes(figure)
    moves = sorted(flow.flows, key=lambda f: (-f[2], f[0], f[1]))
    described = list_in_words([f"{n} from community {a} to community {b}" for a, b, n in moves],
                              limit=8)
    nmi = (f" The normalised mutual information of the two partitions is {number(flow.nmi)}."
           if flow.nmi is not None else "")
    alt = (f"Flow chart of the {count_of(flow.members, 'node')} present in both waves, from the "
           f"communities of {earlier_title} (left) to those of {later_title} (right): "
           f"{described}.{nmi}")
    caption = ("Each band carries the members of one community of the earlier wave to their "
               "community in the later one; a band's width is the number of members. The "
               "communities of each wave are numbered by size within that wave, so community 1 "
               "of one wave need not be community 1 of the next." + nmi)
    return Figure(name=flow_figure_name(flow.earlier, flow.later), title=heading, alt=alt,
                  caption=caption, svg=svg, png=png)
