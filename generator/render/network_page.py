"""The page context of one network: statistics, figures, top nodes and communities."""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
import pandas as pd

from ..analyse import CommunityResult, NetworkAnalysis, Statistic
from ..analyse.paths import DIAMETER_SWEEPS
from ..draw.coassignment import COASSIGNMENT
from ..draw.explorer import COMMUNITY_LEVEL, EXPLORER_MAX_NODES
from ..vocabulary import (
    COMMUNITY,
    COMMUNITY_CONFIDENCE,
    MEASURE_NAMES,
    PATH_MEASURES,
    Reading,
    count,
    count_of,
    is_missing,
    left_out_sentence,
    number,
    omission_reason,
    path_statistics_sentence,
    reading,
    share,
    statistic_title,
    statistic_value,
    undefined_reason,
)
from .describe import (
    a_network,
    measure_title,
    method_title,
    network_kind,
    stability_reading,
    weights_sentence,
)
from .figures import FigureView, figure_views
from .inputs import NetworkPageInput
from .mixing import MixingSection, is_mixing_figure, mixing_section
from .significance import SignificanceView, is_null_figure, significance_view
from .site_map import (
    CHECKS,
    DOWNLOADS,
    METHODS,
    PageFrame,
    communities_page,
    network_file,
    nodes_page,
)

__all__ = [
    "TOP_COUNT", "CommunityRow", "CommunityView", "NetworkFacts", "NetworkLinks", "NetworkPage",
    "RankedNode", "StatisticRow",
    "TopTable", "community_view", "network_context", "network_facts", "omitted_measures",
    "ranked_nodes",
    "sampling_sentence", "statistic_rows", "top_tables",
]

TOP_COUNT = 10
_POSITION_FIGURES = MEASURE_NAMES


@dataclass(frozen=True)
class StatisticRow:
    name: str
    anchor: str  # an HTML id: "statistic-assortativity-clinic"
    title: str
    value: str  # rounded for the page, or "not defined"
    reading: str
    defined: bool


@dataclass(frozen=True)
class RankedNode:
    rank: int  # competition ranking: equal values share a rank ("1, 2, 2, 4")
    label: str
    value: str
    node_id: str = ""  # shown beside the label when they differ, so equal names stay apart


@dataclass(frozen=True)
class TopTable:
    column: str
    title: str
    rows: tuple[RankedNode, ...]
    more_tied: int  # nodes beyond the table with the same value as its last row


@dataclass(frozen=True)
class CommunityRow:
    number: int
    size: int
    share: str


@dataclass(frozen=True)
class CommunityView:
    method: str
    resolution: str
    runs: int
    seed: int
    count: int
    rows: tuple[CommunityRow, ...]  # the largest communities of two or more nodes
    rows_left_out: str  # "" or a sentence: how many are not listed here, and where they are
    single_node: int  # communities of one node (isolates and loosely tied nodes)
    single_node_note: str  # a sentence about them, empty when there are none
    modularity: str
    mean_ari: str
    mean_nmi: str
    best_run_share: str
    distinct_partitions: int
    reading: str


@dataclass(frozen=True)
class NetworkFacts:
    kind: str  # "directed, weighted"
    described: str  # "A directed, weighted network"
    nodes: str
    ties: str
    density: str
    communities: str
    weights: str  # a sentence on where weights came from and what they mean
    fixes: int
    notes: int

    @property
    def summary(self) -> str:
        return f"{self.described} of {self.nodes} nodes and {self.ties} ties."

    @property
    def checks(self) -> str:
        return f"{count_of(self.fixes, 'fix', 'fixes')}, {count_of(self.notes, 'note')}"


def _anchor(name: str) -> str:
    return "statistic-" + re.sub(r"[^A-Za-z0-9_-]+", "-", name).strip("-")


def _reading_context(stat: Statistic, analysis: NetworkAnalysis) -> Reading:
    attribute = stat.name.partition(":")[2]
    numeric = bool(attribute) and attribute in analysis.nodes.columns and bool(
        pd.api.types.is_numeric_dtype(analysis.nodes[attribute].dtype))
    return Reading(value=float(stat.value or 0.0), attribute=attribute, numeric=numeric,
                   directed=analysis.directed, weighted=analysis.weighted,
                   weight_means=analysis.weight_means, steps=stat.steps,
                   test=analysis.significance.test(stat.name), estimate=stat.estimate,
                   standard_error=stat.standard_error,
                   steps_standard_error=stat.steps_standard_error)


def statistic_rows(analysis: NetworkAnalysis) -> tuple[StatisticRow, ...]:
    """One row per statistic, in the analysis' order, each with its plain reading."""
    rows = []
    for stat in analysis.statistics:
        left_out = left_out_sentence(stat.left_out)
        if stat.value is None or is_missing(stat.value):
            why = undefined_reason(stat.why) if stat.why else "The statistic does not apply."
            rows.append(StatisticRow(stat.name, _anchor(stat.name), statistic_title(stat.name),
                                     "not defined", f"{why} {left_out}".strip(), False))
            continue
        text = reading(stat.name, _reading_context(stat, analysis))
        shown = statistic_value(stat.value, estimate=stat.estimate,
                                standard_error=stat.standard_error)
        rows.append(StatisticRow(stat.name, _anchor(stat.name), statistic_title(stat.name),
                                 shown, f"{text} {left_out}".strip(), True))
    return tuple(rows)


def network_facts(item: NetworkPageInput) -> NetworkFacts:
    analysis = item.analysis

    def stat(name: str, fallback: Any = None) -> str:
        value = analysis.statistic(name)
        return number(fallback if value is None else value)

    return NetworkFacts(
        kind=network_kind(analysis),
        described=a_network(analysis),
        nodes=stat("nodes", len(analysis.nodes)),
        ties=stat("edges", len(analysis.edges)),
        density=stat("density"),
        communities=count(analysis.communities.count),
        weights=weights_sentence(item.config, analysis),
        fixes=sum(1 for f in analysis.findings if f.level == "fix"),
        notes=sum(1 for f in analysis.findings if f.level == "note"),
    )


def ranked_nodes(values: Sequence[float] | np.ndarray, labels: Sequence[str],
                 ids: Sequence[str], count: int) -> tuple[tuple[RankedNode, ...], int]:
    """The ``count`` highest values (NaN left out) with competition ranks, equal values in node
    order; and how many nodes beyond them equal the last one shown. Sorted with numpy: a
    network of 10^5 nodes ranks each measure in milliseconds."""
    numbers = np.asarray(values, dtype=float)
    present = np.flatnonzero(~np.isnan(numbers))
    order = present[np.lexsort((present, -numbers[present]))]  # ties keep node order
    top = order[:count]
    shown = numbers[top]
    changed = np.ones(len(top), dtype=bool)
    changed[1:] = shown[1:] != shown[:-1]
    ranks = np.maximum.accumulate(np.where(changed, np.arange(1, len(top) + 1), 0))
    rows = tuple(RankedNode(int(rank), labels[i], number(float(numbers[i])),
                            ids[i] if ids[i] != labels[i] else "")
                 for rank, i in zip(ranks.tolist(), top.tolist()))
    more = 0
    if len(order) > count:
        more = int(np.count_nonzero(numbers[order[count:]] == numbers[order[count - 1]]))
    return rows, more


def top_tables(analysis: NetworkAnalysis, count: int = TOP_COUNT) -> tuple[TopTable, ...]:
    """The ``count`` highest nodes for every measure present (community numbers and community
    confidence are not ranked: the communities page shows them per community)."""
    labels = analysis.labels
    ids = [str(node) for node in analysis.nodes.index]
    measures = analysis.measures.reindex(analysis.nodes.index)
    tables = []
    for column in measures.columns:
        if column in (COMMUNITY, COMMUNITY_CONFIDENCE):  # shown per community instead
            continue
        values = measures[column].to_numpy(dtype=float, na_value=np.nan)
        rows, more = ranked_nodes(values, labels, ids, count)
        tables.append(TopTable(column, measure_title(column), rows, more))
    return tuple(tables)


def _optional(value: float | None) -> str:
    return "not defined" if value is None or is_missing(value) else number(value)


# The network page lists the sizes of this many of the largest communities; a network of 10^6
# ties can have hundreds, which the communities page and communities.csv hold.
COMMUNITY_ROWS = 20


def community_view(result: CommunityResult) -> CommunityView:
    total = sum(result.sizes) or 1
    single = sum(1 for size in result.sizes if size == 1)
    single_note = ""
    if single == 1:
        single_note = ("1 node forms a community of its own (an isolate or a node only loosely "
                       "tied to any group).")
    elif single > 1:
        single_note = (f"{count(single)} nodes form communities of their own (isolates or nodes only "
                       "loosely tied to any group).")
    rows = tuple(CommunityRow(rank, size, share(size / total))
                 for rank, size in enumerate(result.sizes, start=1) if size > 1)
    left_out = ""
    if len(rows) > COMMUNITY_ROWS:
        left_out = (f"The {COMMUNITY_ROWS} largest of the {count(len(rows))} communities of two "
                    "or more nodes are listed; the communities page and the communities download "
                    "list every one.")
        rows = rows[:COMMUNITY_ROWS]
    return CommunityView(
        method=method_title(result.method),
        resolution=number(result.resolution),
        runs=result.runs,
        seed=result.seed,
        count=result.count,
        rows=rows,
        rows_left_out=left_out,
        single_node=single,
        single_node_note=single_note,
        modularity=_optional(result.modularity),
        mean_ari=_optional(result.mean_ari),
        mean_nmi=_optional(result.mean_nmi),
        best_run_share=share(result.best_run_share),
        distinct_partitions=result.distinct_partitions,
        reading=stability_reading(result),
    )


def omitted_measures(analysis: NetworkAnalysis) -> tuple[tuple[str, str], ...]:
    """(title, why) of every measure left out of this network."""
    return tuple((measure_title(name), omission_reason(why.reason, why.count))
                 for name, why in analysis.omitted.items())


def sampling_sentence(analysis: NetworkAnalysis, *, statistics: bool = False) -> str | None:
    """What was sampled; ``statistics``: with how the path statistics were estimated too (the
    methods page)."""
    sampling = analysis.sampling
    if sampling is None:
        return None
    present = [measure_title(c).lower() for c in PATH_MEASURES if c in analysis.measures.columns]
    derived = (" Betweenness centralization is computed from the estimated betweenness."
               if "betweenness" in analysis.measures.columns else "")
    if statistics and any(s.estimate is not None and s.name != "betweenness_centralization"
                          for s in analysis.statistics):
        derived += " " + path_statistics_sentence(sampling.sources, sampling.seed,
                                                  DIAMETER_SWEEPS)
    return (f"The network has {count(sampling.nodes)} nodes, so {', '.join(present)} were "
            f"estimated from shortest paths out of {count(sampling.sources)} randomly chosen "
            f"source nodes (seed "
            f"{sampling.seed}) rather than from every node; values are estimates, best for "
            f"comparing nodes within this network.{derived}")


@dataclass(frozen=True)
class NetworkLinks:
    nodes: str
    communities: str
    methods: str
    checks: str
    downloads: str
    nodes_csv: str


@dataclass(frozen=True)
class ExplorerView:
    """The explorable map's frame on the page; the script fills it from the data file."""

    network_id: str
    label: str  # what the map is, for screen readers
    nodes_href: str  # the node table, which a picked node links into
    directed: bool
    views_href: str = ""  # the folder of the nodes' own pages, when they have them
    community_level: str = ""  # what the map shows instead of nodes, when it shows communities


def explorer_view(item: NetworkPageInput, frame: PageFrame) -> ExplorerView | None:
    if item.explorer is None:
        return None
    return ExplorerView(network_id=item.id, label=f"Explorable map of {item.title}",
                        nodes_href=frame.href(nodes_page(item.id)),
                        directed=item.analysis.directed,
                        views_href=frame.href(f"networks/{item.id}/nodes/") + "/"
                        if item.ego is not None else "",
                        community_level=_community_level(item))


def _community_level(item: NetworkPageInput) -> str:
    if item.explorer is None or item.explorer.level != COMMUNITY_LEVEL:
        return ""
    return (f"With {count_of(len(item.analysis.nodes), 'node')}, more than "
            f"{number(EXPLORER_MAX_NODES)}, this map shows the "
            f"{count_of(len(item.explorer.ids), 'community', 'communities')} instead: each circle "
            "is a community, its area growing with its members, and each line the ties between "
            "two communities, wider for more ties; select a community to see its members' "
            "numbers.")


@dataclass(frozen=True)
class NetworkPage:
    """Everything ``network.html`` shows."""

    page: PageFrame
    facts: NetworkFacts
    statistics: tuple[StatisticRow, ...]
    map_figures: tuple[FigureView, ...]
    position_figures: tuple[FigureView, ...]
    community_figures: tuple[FigureView, ...]
    other_figures: tuple[FigureView, ...]
    top_tables: tuple[TopTable, ...]
    top_count: int
    communities: CommunityView
    omitted: tuple[tuple[str, str], ...]
    sampling: str | None
    links: NetworkLinks
    significance: SignificanceView
    explorer: ExplorerView | None = None
    explorer_omitted: str | None = None  # why a network has no explorable map
    mixing: MixingSection | None = None  # attribute mixing and the nodes with no ties


def network_context(item: NetworkPageInput, frame: PageFrame) -> NetworkPage:
    analysis = item.analysis
    figures = figure_views(frame, item.id, item.figures)
    anchor = f"network-{item.id}"
    statistics = statistic_rows(analysis)
    return NetworkPage(
        page=frame,
        facts=network_facts(item),
        statistics=statistics,
        map_figures=tuple(f for f in figures if f.name == "map"),
        position_figures=tuple(f for f in figures if f.name in _POSITION_FIGURES),
        community_figures=tuple(f for f in figures if f.name == "communities"),
        other_figures=tuple(f for f in figures if f.name not in ("map", "communities",
                                                                 COASSIGNMENT)
                            and f.name not in _POSITION_FIGURES and not is_null_figure(f.name)
                            and not is_mixing_figure(f.name)),
        top_tables=top_tables(analysis),
        top_count=TOP_COUNT,
        communities=community_view(analysis.communities),
        omitted=omitted_measures(analysis),
        sampling=sampling_sentence(analysis),
        links=NetworkLinks(
            nodes=frame.href(nodes_page(item.id)),
            communities=frame.href(communities_page(item.id)),
            methods=frame.href(f"{METHODS}#{anchor}"),
            checks=frame.href(f"{CHECKS}#{anchor}"),
            downloads=frame.href(f"{DOWNLOADS}#{anchor}"),
            nodes_csv=frame.href(network_file(item.id, "nodes.csv")),
        ),
        explorer=explorer_view(item, frame),
        explorer_omitted=None if item.explorer is not None else (
            "This network has no nodes to show on a map."),
        significance=significance_view(
            analysis, tuple(f for f in figures if is_null_figure(f.name)),
            anchors={row.name: row.anchor for row in statistics},
            methods_href=frame.href(f"{METHODS}#{anchor}-significance"),
            csv_href=frame.href(network_file(item.id, "significance.csv"))),
        mixing=mixing_section(item, frame, tuple(f for f in figures if is_mixing_figure(f.name)),
                              {row.name: (row.reading, row.anchor) for row in statistics}),
    )
