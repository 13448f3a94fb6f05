"""The page of one series of waves, ``compare/<series>.html``: statistics across waves, tie
change, who joined and left, the largest movers, and where community members went."""

from __future__ import annotations

from dataclasses import dataclass

from ..analyse import NetworkAnalysis
from ..analyse.compare import SeriesComparison
from ..draw.compare import flow_figure_name
from ..draw.figure import Figure
from ..publish.series import SERIES_FILES
from ..vocabulary import (
    MISSING,
    count,
    count_of,
    list_in_words,
    measure,
    node_name,
    number,
    statistic_title,
    statistic_value,
)
from .figures import FigureView, figure_view
from .inputs import NetworkPageInput
from .site_map import PageFrame, compare_figure, network_page, series_file

__all__ = ["ComparePage", "SeriesInput", "compare_context", "series_title"]

MOVERS_SHOWN = 10


@dataclass(frozen=True)
class SeriesInput:
    """What the build hands the render stage for one series: the comparison and its figures."""

    comparison: SeriesComparison
    figures: tuple[Figure, ...]


def series_title(series: str) -> str:
    return f"Waves: {series}"


@dataclass(frozen=True)
class WaveLink:
    wave: int
    title: str
    href: str


@dataclass(frozen=True)
class StatisticAcross:
    title: str
    values: tuple[str, ...]


@dataclass(frozen=True)
class MoverTable:
    title: str  # the measure
    rows: tuple[tuple[str, str, str, str], ...]  # node, before, after, change


@dataclass(frozen=True)
class WaveStep:
    """What changed from one wave to the next."""

    anchor: str
    heading: str
    kept: str
    added: str
    dropped: str
    jaccard: str
    summary: str
    joined: str
    left: str
    movers: tuple[MoverTable, ...]
    flow: FigureView | None
    flow_rows: tuple[tuple[str, str, str], ...]  # earlier community, later community, members
    nmi: str


@dataclass(frozen=True)
class ComparePage:
    """Everything ``compare.html`` shows."""

    page: PageFrame
    series: str
    waves: tuple[WaveLink, ...]
    statistics: tuple[StatisticAcross, ...]
    figure: FigureView | None
    steps: tuple[WaveStep, ...]
    files: tuple[tuple[str, str], ...]  # (path, href)


def _text(value: float | None) -> str:
    return MISSING if value is None else number(value)


def _statistic_text(analysis: NetworkAnalysis, name: str) -> str:
    """A wave's statistic as its network page shows it ("at least 12" for a bound)."""
    stat = next((s for s in analysis.statistics if s.name == name), None)
    if stat is None or stat.value is None:
        return MISSING
    return statistic_value(stat.value, estimate=stat.estimate, standard_error=stat.standard_error)


def _change(value: float) -> str:
    """A change with its sign: "+8", "-0.0123"."""
    return ("+" if value > 0 else "") + number(value)


def _names(ids: tuple[str, ...], labels: dict[str, str]) -> str:
    if not ids:
        return "nobody"
    return list_in_words([labels.get(i, i) for i in ids], limit=12)


def compare_context(series: SeriesInput, networks: dict[str, NetworkPageInput],
                    frame: PageFrame) -> ComparePage:
    comparison = series.comparison
    titles = {i: networks[i].title for i in comparison.networks}
    labels: dict[str, str] = {}
    for i in comparison.networks:
        analysis = networks[i].analysis
        labels.update((str(node), node_name(label, str(node)))
                      for node, label in zip(analysis.nodes.index, analysis.labels))
    figures = {f.name: f for f in series.figures}

    def view(name: str) -> FigureView | None:
        figure = figures.get(name)
        if figure is None:
            return None
        return figure_view(frame, figure, compare_figure(comparison.series, name, "svg"),
                           compare_figure(comparison.series, name, "png"))

    steps = []
    for ties, nodes, flow in zip(comparison.ties, comparison.nodes, comparison.flows):
        before, after = titles[ties.earlier], titles[ties.later]
        movers = tuple(MoverTable(measure(name).title, tuple(
            (labels.get(row.node, row.node), number(row.before), number(row.after),
             _change(row.change)) for row in rows[:MOVERS_SHOWN] if row.change != 0))
            for name, rows in nodes.movers.items())
        summary = (f"Of the {count_of(ties.kept + ties.dropped, 'tie')} of {before}, "
                   f"{count(ties.kept)} are still there in {after} and {count(ties.dropped)} are "
                   f"gone; {count_of(ties.added, 'tie')} are new. "
                   f"{count_of(len(nodes.both), 'node')} are in both waves.")
        steps.append(WaveStep(
            anchor=f"step-{ties.earlier}-{ties.later}", heading=f"From {before} to {after}",
            kept=count(ties.kept), added=count(ties.added), dropped=count(ties.dropped),
            jaccard=_text(ties.jaccard), summary=summary,
            joined=_names(nodes.joined, labels), left=_names(nodes.left, labels),
            movers=tuple(m for m in movers if m.rows),
            flow=view(flow_figure_name(flow.earlier, flow.later)),
            flow_rows=tuple((str(a), str(b), count(n)) for a, b, n in flow.flows),
            nmi=_text(flow.nmi)))
    return ComparePage(
        page=frame, series=comparison.series,
        waves=tuple(WaveLink(w, titles[i], frame.href(network_page(i)))
                    for w, i in zip(comparison.waves, comparison.networks)),
        statistics=tuple(StatisticAcross(statistic_title(name), tuple(
            _statistic_text(networks[i].analysis, name) for i in comparison.networks))
                         for name, _ in comparison.statistics),
        figure=view("statistics"),
        steps=tuple(steps),
        files=tuple((series_file(comparison.series, name),
                     frame.href(series_file(comparison.series, name))) for name in SERIES_FILES),
    )
