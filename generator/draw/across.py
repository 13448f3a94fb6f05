"""How the main statistics are spread across the networks of a study: one small histogram per
statistic, each network a tick below the bars, the median dashed."""

from __future__ import annotations

import math

import numpy as np
from matplotlib.ticker import MaxNLocator

from ..analyse.across import StudyTable, spread
from ..vocabulary import count_of, number, statistic_title
from .figure import Figure
from .style import BAR_COLOUR, INK, drawing_style, figure_bytes, new_figure, quiet_axes, wrap_title

__all__ = ["MANY_NETWORKS", "SPREAD_FIGURE", "SPREAD_STATISTICS", "draw_study_spread"]

MANY_NETWORKS = 6  # from this many networks on, the front page draws how statistics spread
SPREAD_FIGURE = "study-statistics"
# The shape of a network, read across groups: its size, how dense, reciprocated, clustered,
# divided and centred it is.
SPREAD_STATISTICS = ("nodes", "density", "reciprocity", "transitivity", "modularity",
                     "degree_centralization")
_PANEL = (2.1, 1.4)  # inches per panel
_COLUMNS = 3


def _bins(n: int) -> int:
    # Rice's rule, 2 n^(1/3), held between 5 and 20 bars (a few networks to a few thousand).
    return int(min(20, max(5, round(2 * n ** (1 / 3)))))


def _finite(values: tuple[float | None, ...]) -> np.ndarray:
    return np.array([v for v in values if v is not None and math.isfinite(v)], dtype=float)


def draw_study_spread(table: StudyTable, study_title: str) -> Figure | None:
    """One panel per statistic of SPREAD_STATISTICS that at least two networks have; None when
    the study has fewer than MANY_NETWORKS networks or no statistic qualifies."""
    if len(table.networks) < MANY_NETWORKS:
        return None
    shown = [name for name in SPREAD_STATISTICS
             if name in table.statistics and _finite(table.column(name)).size >= 2]
    if not shown:
        return None
    rows = (len(shown) + _COLUMNS - 1) // _COLUMNS
    columns = min(len(shown), _COLUMNS)
    width = 0.5 + columns * (_PANEL[0] + 0.55)
    title = f"{study_title}: statistics across {count_of(len(table.networks), 'network')}"
    heading = wrap_title(title, width - 0.2)
    top = 0.3 + 0.2 * (heading.count("\n") + 1)
    height = top + rows * (_PANEL[1] + 0.8)
    with drawing_style():
        figure = new_figure(width, height)
        figure.text(0.1 / width, 1 - 0.1 / height, heading, ha="left", va="top", fontsize=10.5,
                    fontweight="bold", color=INK)
        for k, name in enumerate(shown):
            row, column = divmod(k, _COLUMNS)
            left = 0.55 + column * (_PANEL[0] + 0.55)
            bottom = height - top - (row + 1) * (_PANEL[1] + 0.8) + 0.5
            ax = figure.add_axes((left / width, bottom / height, _PANEL[0] / width,
                                  _PANEL[1] / height))
            values = _finite(table.column(name))
            low, high = float(values.min()), float(values.max())
            span = (low, high) if high > low else (low - 0.5, high + 0.5)
            counts, _, _ = ax.hist(values, bins=_bins(values.size), range=span, color=BAR_COLOUR,
                                   edgecolor="white", linewidth=0.5)
            tallest = float(np.max(counts))
            # Every network as a tick under the bars: the few that stand apart stay visible.
            ax.plot(values, np.full(values.size, -0.06 * tallest), linestyle="none",
                    marker="|", markersize=5, color=INK, alpha=0.6)
            ax.axvline(float(np.median(values)), color=INK, linestyle=(0, (4, 3)), linewidth=0.9)
            ax.set_ylim(-0.12 * tallest, tallest * 1.1)
            ax.set_title(statistic_title(name), fontsize=8.5, loc="left", color=INK)
            ax.yaxis.set_major_locator(MaxNLocator(integer=True, nbins=4))
            ax.xaxis.set_major_locator(MaxNLocator(nbins=4))
            ax.tick_params(labelsize=7)
            if column == 0:
                ax.set_ylabel("networks", fontsize=7.5)
            quiet_axes(ax, grid="y")
        svg, png = figure_bytes(figure)
    described = []
    for name in shown:
        s = spread(table, name)
        assert s is not None  # shown statistics have at least two finite values
        described.append(f"{statistic_title(name).lower()} from {number(s.low)} to "
                         f"{number(s.high)}, median {number(s.median)}")
    alt = (f"Small histograms, one per statistic, over the {count_of(len(table.networks), 'network')}"
           f" of the study: " + "; ".join(described) + ".")
    caption = ("Each panel counts the networks whose statistic falls in each range; the ticks "
               "under the bars are the networks one by one and the dashed line is the median. "
               "Panels have their own scales. The table gives every network's value.")
    return Figure(name=SPREAD_FIGURE, title=title, alt=alt, caption=caption, svg=svg, png=png)
