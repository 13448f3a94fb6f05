"""Tests against chance as figures: each statistic's values on the rewired networks as a
histogram, with the observed value marked."""

from __future__ import annotations

import re

import numpy as np
from matplotlib.ticker import MaxNLocator

from ..analyse import NetworkAnalysis, NullTest
from ..vocabulary import count_of, null_reading, null_subject, null_subject_inline, number
from .figure import Figure
from .style import BAR_COLOUR, INK, OKABE_ITO, drawing_style, figure_bytes, new_chart, quiet_axes

__all__ = ["NULL_FIGURE_PREFIX", "draw_null_tests", "null_figure_names"]

NULL_FIGURE_PREFIX = "null-"
_OBSERVED = OKABE_ITO[5]  # vermilion: stands apart from the blue bars, also in grey print


def null_figure_names(tests: tuple[NullTest, ...]) -> dict[str, str]:
    """The file stem of each test's figure: ``null-transitivity``, ``null-assortativity-clinic``;
    attribute names are reduced to letters, digits and dashes, and kept apart if they meet."""
    names: dict[str, str] = {}
    taken: set[str] = set()
    for test in tests:
        slug = re.sub(r"[^a-z0-9]+", "-", test.statistic.lower()).strip("-") or "statistic"
        name, n = NULL_FIGURE_PREFIX + slug, 2
        while name in taken:
            name, n = f"{NULL_FIGURE_PREFIX}{slug}-{n}", n + 1
        taken.add(name)
        names[test.statistic] = name
    return names


def _bins(n: int) -> int:
    # Rice's rule, 2 n^(1/3), held between 10 and 30 bars.
    return int(min(30, max(10, round(2 * n ** (1 / 3)))))


def _span(values: np.ndarray, observed: float) -> tuple[tuple[float, float], tuple[float, float]]:
    """The histogram's range (the null values) and the axis' range (those and the observed)."""
    low, high = float(values.min()), float(values.max())
    if high - low < 1e-12:
        pad = 0.01 * max(1.0, abs(low))
        low, high = low - pad, high + pad
    left, right = min(low, observed), max(high, observed)
    margin = 0.06 * (right - left)
    return (low, high), (left - margin, right + margin)


def draw_null_test(analysis: NetworkAnalysis, test: NullTest, name: str) -> Figure:
    """Histogram of one statistic on the rewired networks; a solid line marks the observed value
    and a dashed one the rewired networks' mean."""
    values = np.array(test.nulls, dtype=float)
    subject = null_subject(test.statistic)
    lower = null_subject_inline(test.statistic)  # the attribute stays as written
    title = f"{analysis.title}: {lower} against {count_of(test.samples, 'rewired network')}"
    bars, axis = _span(values, test.observed)
    with drawing_style():
        fig, (ax,) = new_chart(6.4, 2.6, title=title)
        counts, _, _ = ax.hist(values, bins=_bins(len(values)), range=bars, color=BAR_COLOUR,
                               edgecolor="white", linewidth=0.6,
                               label=f"{count_of(test.samples, 'rewired network')}")
        tallest = max(float(np.max(counts)) if len(counts) else 0.0, 1.0)
        # The lines stop short of the top, leaving a band for the key in one row above the bars.
        top = tallest * 1.1
        if test.null_mean is not None:
            ax.vlines(test.null_mean, 0, top, colors=INK, linestyles=(0, (4, 3)), linewidth=1.0,
                      label=f"their mean {number(test.null_mean)}")
        ax.vlines(test.observed, 0, top, colors=_OBSERVED, linewidth=2.2,
                  label=f"observed {number(test.observed)}")
        ax.set_ylim(0, tallest * 1.38)
        ax.set_xlim(*axis)
        ax.legend(loc="upper center", ncol=3, handlelength=1.6, columnspacing=1.4,
                  borderaxespad=0.2)
        ax.set_xlabel(subject)
        ax.set_ylabel("rewired networks")
        ax.yaxis.set_major_locator(MaxNLocator(integer=True))
        quiet_axes(ax)
        svg, png = figure_bytes(fig)
    alt = (f"Histogram of {lower} on "
           f"{count_of(test.samples, 'rewired network')} with the same degrees: values from "
           f"{number(float(values.min()))} to {number(float(values.max()))}, mean "
           f"{number(test.null_mean)}; a line marks the observed value, {number(test.observed)}. "
           f"{null_reading(test)}")
    caption = (f"{null_reading(test)} Each bar counts the rewired networks (every node keeping "
               "its degree, ties placed at random) whose value falls in its range; the solid line "
               "is the network as measured, the dashed line the rewired networks' mean.")
    return Figure(name=name, title=title, alt=alt, caption=caption, svg=svg, png=png)


def draw_null_tests(analysis: NetworkAnalysis) -> list[Figure]:
    """One figure per test that has null values, in the order of the tests."""
    tests = analysis.significance.tests
    names = null_figure_names(tests)
    return [draw_null_test(analysis, t, names[t.statistic]) for t in tests if t.nulls]
