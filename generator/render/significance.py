"""The network page's section on tests against chance: one row per statistic tested against
rewired networks, with its plain reading and its figure."""

from __future__ import annotations

from dataclasses import dataclass

from ..analyse import NetworkAnalysis, NullTest
from ..draw.null_models import NULL_FIGURE_PREFIX, null_figure_names
from ..vocabulary import (
    MISSING,
    SIGNIFICANCE_LEVEL,
    count,
    null_reading,
    null_subject,
    number,
    plural,
    untested_reason,
)
from .figures import FigureView

__all__ = ["SignificanceRow", "SignificanceView", "is_null_figure", "significance_view"]


@dataclass(frozen=True)
class SignificanceRow:
    statistic: str  # as in statistics.csv
    anchor: str  # the statistic's row in the statistics table
    title: str
    observed: str
    null_mean: str
    null_sd: str
    z: str
    p: str
    samples: int
    reading: str
    figure: FigureView | None


@dataclass(frozen=True)
class SignificanceView:
    tested: bool
    intro: str  # what was done, or why nothing was tested
    rows: tuple[SignificanceRow, ...]
    figures: tuple[FigureView, ...]
    methods_href: str
    csv_href: str | None  # files/<id>/significance.csv, when it was written


def is_null_figure(name: str) -> bool:
    return name.startswith(NULL_FIGURE_PREFIX)


def _value(value: float | None, digits: int = 3) -> str:
    return MISSING if value is None else number(value, digits)


def _row(test: NullTest, anchor: str, figure: FigureView | None) -> SignificanceRow:
    return SignificanceRow(
        statistic=test.statistic, anchor=anchor, title=null_subject(test.statistic),
        observed=_value(test.observed), null_mean=_value(test.null_mean),
        null_sd=_value(test.null_sd), z=_value(test.z), p=_value(test.p, 2),
        samples=test.samples, reading=null_reading(test), figure=figure)


def significance_view(analysis: NetworkAnalysis, figures: tuple[FigureView, ...], *,
                      anchors: dict[str, str], methods_href: str, csv_href: str
                      ) -> SignificanceView:
    """``anchors`` maps a statistic to its row's id in the statistics table."""
    result = analysis.significance
    if not result.tests:
        reason = untested_reason(result.why or "not_requested")
        return SignificanceView(False, reason, (), (), methods_href, None)
    by_name = {f.name: f for f in figures}
    names = null_figure_names(result.tests)
    rows = tuple(_row(t, anchors.get(t.statistic, ""), by_name.get(names[t.statistic]))
                 for t in result.tests)
    n = result.samples
    keeps = ("its in-degree and out-degree" if analysis.directed else "its degree")
    weights = (", with the tie weights shuffled over the new ties" if analysis.weighted else "")
    intro = (f"Each statistic is compared with its values on {count(n)} {plural(n, 'network')} "
             f"rewired at random so that every node keeps {keeps}{weights}. A statistic reads as "
             f"higher or lower than chance only when p is below {number(SIGNIFICANCE_LEVEL)}: "
             "then so few rewired networks come as far from their mean that the pattern is "
             "unlikely to arise from the degrees alone. Several statistics are tested at once, "
             "so read a single p near 0.05 with care.")
    return SignificanceView(True, intro, rows, tuple(r.figure for r in rows if r.figure),
                            methods_href, csv_href)
