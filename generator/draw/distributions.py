"""How node measures are spread: the degree distribution and one histogram per centrality."""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
from matplotlib.axes import Axes
from matplotlib.ticker import FuncFormatter, MaxNLocator, NullFormatter

from ..analyse import NetworkAnalysis
from ..vocabulary import PATH_MEASURES, count_of, node_name, number
from ..vocabulary import measure as measure_entry
from .community_map import LARGE_MAP_NODES
from .figure import Figure
from .style import BAR_COLOUR, INK, drawing_style, figure_bytes, new_chart, quiet_axes

__all__ = ["CCDF_POINTS", "DEGREE_BARS_UP_TO", "ccdf_points", "draw_centrality", "draw_degree"]

DEGREE_BARS_UP_TO = 100  # the largest degree still drawn as one bar per degree
CCDF_POINTS = 30  # points of a complementary cumulative distribution, spaced on a log scale


def _degree_panel(ax: Axes, values: np.ndarray, measure: str) -> None:
    top = int(values.max()) if values.size else 0
    counts = np.bincount(values.astype(int), minlength=top + 1) if values.size else np.zeros(1)
    ax.bar(np.arange(top + 1), counts, width=0.8, color=BAR_COLOUR, linewidth=0)
    ax.set_xlabel(measure_entry(measure).plain)
    ax.xaxis.set_major_locator(MaxNLocator(integer=True))
    ax.yaxis.set_major_locator(MaxNLocator(integer=True))
    ax.set_xlim(-0.7, top + 0.7)
    quiet_axes(ax)


def _degree_words(values: np.ndarray, measure: str) -> str:
    name = measure_entry(measure).plain
    counts = np.bincount(values.astype(int))
    common = int(counts.argmax())  # ties go to the smaller value
    return (f"{name} ranges from {int(values.min())} to {int(values.max())} (median "
            f"{number(float(np.median(values)))}; most common {common}, "
            f"{count_of(int(counts[common]), 'node')})")


def ccdf_points(values: np.ndarray, points: int = CCDF_POINTS) -> tuple[np.ndarray, np.ndarray]:
    """The complementary cumulative distribution at about ``points`` degrees spaced evenly on a
    log scale from 1 to the largest: each degree k and the share of nodes with at least k
    (common practice for skewed degrees: Clauset, Shalizi & Newman 2009, "Power-law
    distributions in empirical data", SIAM Review 51(4), section 2)."""
    top = int(values.max()) if values.size else 0
    if top < 1:
        return np.zeros(0), np.zeros(0)
    ks = np.unique(np.round(np.logspace(0, math.log10(top), points)).astype(int))
    ordered = np.sort(values)
    at_least = (len(ordered) - np.searchsorted(ordered, ks, side="left")) / len(ordered)
    return ks.astype(float), at_least


def _ccdf_panel(ax: Axes, values: np.ndarray, measure: str) -> None:
    ks, shares = ccdf_points(values)
    ax.plot(ks, shares, marker="o", markersize=3.5, linewidth=1.2, color=BAR_COLOUR)
    ax.set_xscale("log")
    ax.set_yscale("log")
    for axis in (ax.xaxis, ax.yaxis):  # plain numbers (1, 10, 0.01), not powers of ten
        axis.set_major_formatter(FuncFormatter(lambda value, _: number(value)))
        axis.set_minor_formatter(NullFormatter())
    ax.set_xlabel(f"{measure_entry(measure).plain} (log scale)")
    quiet_axes(ax, grid="both")


def _skewed(analysis: NetworkAnalysis, panels: list[str]) -> bool:
    """Bars for every degree read well up to DEGREE_BARS_UP_TO degrees and LARGE_MAP_NODES
    nodes; beyond, the degree distribution is drawn as a complementary cumulative one."""
    top = max((float(analysis.measures[m].max()) for m in panels), default=0.0)
    return len(analysis.measures) > LARGE_MAP_NODES or top > DEGREE_BARS_UP_TO


def _degree_chart(analysis: NetworkAnalysis, panels: list[str], title: str,
                  panel: Callable[[Axes, np.ndarray, str], None], ylabel: str, *,
                  left: float = 0.8) -> tuple[bytes, bytes]:
    """One panel per degree measure side by side, drawn by ``panel``; (SVG, PNG)."""
    with drawing_style():
        fig, axes = new_chart(3.6 * len(panels) + 0.4 + left, 2.9, title=title,
                              panels=len(panels), left=left)
        for ax, measure in zip(axes, panels):
            panel(ax, np.array(analysis.measures[measure], dtype=float), measure)
        axes[0].set_ylabel(ylabel)
        return figure_bytes(fig)


def _degree_facts(analysis: NetworkAnalysis, panels: list[str]) -> tuple[list[str], int]:
    """Each panel's range in words, and how many nodes have no ties."""
    words = [_degree_words(np.array(analysis.measures[m], dtype=float), m) for m in panels]
    return words, int((np.array(analysis.measures["degree"]) == 0).sum())


def draw_degree(analysis: NetworkAnalysis) -> Figure:
    """Bar chart of how many nodes have each degree; in- and out-degree side by side when the
    network is directed. A large or skewed network gets the complementary cumulative
    distribution on log scales instead."""
    panels = ["in_degree", "out_degree"] if analysis.directed else ["degree"]
    if _skewed(analysis, panels):
        return _draw_degree_ccdf(analysis, panels)
    n = len(analysis.measures)
    title = f"{analysis.title}: degree distribution"
    svg, png = _degree_chart(analysis, panels, title, _degree_panel, "number of nodes")
    words, isolated = _degree_facts(analysis, panels)
    alone = f"; {count_of(isolated, 'node')} with no ties at all" if isolated else ""
    if analysis.directed:
        alt = (f"Two bar charts of the {count_of(n, 'node')}: {words[0]}; {words[1]}{alone}.")
        caption = (f"{measure_entry('in_degree').meaning} {measure_entry('out_degree').meaning} "
                   "Each bar shows how many nodes have that many.")
    else:
        alt = f"Bar chart of the degree of {count_of(n, 'node')}: {words[0]}{alone}."
        caption = (f"{measure_entry('degree').meaning} Each bar shows how many nodes have that "
                   "many.")
    return Figure(name="degree", title=title, alt=alt, caption=caption, svg=svg, png=png)


def _draw_degree_ccdf(analysis: NetworkAnalysis, panels: list[str]) -> Figure:
    n = len(analysis.measures)
    title = f"{analysis.title}: degree distribution"
    svg, png = _degree_chart(analysis, panels, title, _ccdf_panel,
                             "share of nodes with at least\nthis many (log scale)", left=1.2)
    words, isolated = _degree_facts(analysis, panels)
    alone = (f"; {count_of(isolated, 'node')} with no ties at all, counted in the shares but "
             "not drawn (a log scale has no zero)" if isolated else "")
    kind = "Two line charts" if analysis.directed else "A line chart"
    alt = (f"{kind} on log scales of the share of the {count_of(n, 'node')} with at least each "
           f"number of ties: {'; '.join(words)}{alone}.")
    meanings = " ".join(measure_entry(m).meaning for m in panels)
    caption = (f"{meanings} Each point shows the share of nodes with at least that many; both "
               "scales are logarithmic, so a few nodes with very many ties stay visible next "
               "to the many with few.")
    return Figure(name="degree", title=title, alt=alt, caption=caption, svg=svg, png=png)


def _bins(n: int) -> int:
    # Rice's rule, 2 n^(1/3), held between 10 and 40 bars.
    return int(min(40, max(10, round(2 * n ** (1 / 3)))))


def draw_centrality(analysis: NetworkAnalysis, measure: str) -> Figure:
    """Histogram of one centrality measure, with its median marked."""
    values = np.array(analysis.measures[measure], dtype=float)
    finite = values[np.isfinite(values)]
    n = len(values)
    high = float(finite.max()) if finite.size else 0.0
    low = min(0.0, float(finite.min())) if finite.size else 0.0
    median = float(np.median(finite)) if finite.size else math.nan
    title = f"{analysis.title}: distribution of {measure_entry(measure).plain}"
    with drawing_style():
        fig, (ax,) = new_chart(6.4, 2.9, title=title)
        span = (low, high if high > low else low + 1.0)
        counts, _, _ = ax.hist(finite, bins=_bins(n), range=span, color=BAR_COLOUR,
                               edgecolor="white", linewidth=0.6)
        tallest = float(np.max(counts)) if len(counts) else 0.0
        ax.set_ylim(0, max(tallest, 1.0) * 1.15)  # headroom for the key
        if finite.size:
            ax.axvline(median, color=INK, linestyle=(0, (4, 3)), linewidth=1.0,
                       label=f"median {number(median)}")
            ax.legend(loc="best")
        ax.set_xlabel(measure_entry(measure).axis_label)
        ax.set_ylabel("number of nodes")
        ax.yaxis.set_major_locator(MaxNLocator(integer=True))
        quiet_axes(ax)
        svg, png = figure_bytes(fig)
    return Figure(name=measure, title=title, alt=_centrality_alt(analysis, measure, values),
                  caption=_centrality_caption(analysis, measure), svg=svg, png=png)


def _centrality_alt(analysis: NetworkAnalysis, measure: str, values: np.ndarray) -> str:
    finite = np.isfinite(values)
    if not finite.any():
        return (f"Histogram of {measure_entry(measure).plain} for {count_of(len(values), 'node')}: "
                f"no values.")
    top = int(np.argmax(np.where(finite, values, -np.inf)))  # first node with the maximum
    ids = list(analysis.measures.index)
    kept = values[finite]
    q50, q75 = (float(np.quantile(kept, q)) for q in (0.5, 0.75))
    low, high = number(float(kept.min())), number(float(kept.max()))
    leader = node_name(analysis.labels[top], str(ids[top]))
    return (f"Histogram of {measure_entry(measure).plain} for {count_of(len(values), 'node')}: values "
            f"range from {low} to {high}; half the nodes score at most {number(q50)} and "
            f"three in four at most {number(q75)}; the highest is {leader} with "
            f"{number(float(values[top]))}.")


def _centrality_caption(analysis: NetworkAnalysis, measure: str) -> str:
    text = (measure_entry(measure).meaning + " Each bar counts the nodes in its range; the dashed "
            "line marks the median.")
    if analysis.directed and measure in ("closeness", "harmonic"):
        text += " In this directed network paths run along tie directions to the node."
    if analysis.weighted and measure in ("closeness", "harmonic"):
        reading = "1/weight" if analysis.weight_means == "strength" else "the weight"
        text += (f" Path lengths here are {reading} per tie, so values above 1 are possible and "
                 f"only comparisons between nodes carry meaning.")
    if analysis.sampling is not None and measure in PATH_MEASURES:
        text += (f" Values are estimated from {analysis.sampling.sources} sampled starting nodes "
                 f"of {analysis.sampling.nodes}.")
    return text
