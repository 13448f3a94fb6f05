"""The page context of one network: statistics, figures, top nodes and communities."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

from ..analyse import MEASURE_INFO, CommunityResult, NetworkAnalysis, Statistic
from .describe import (COMMUNITY_METHOD_TITLES, PATH_MEASURES, a_network, measure_title,
                       network_kind, stability_reading, statistic_title, weights_sentence)
from .display import is_missing, shown, significant
from .figures import figure_views
from .inputs import NetworkPageInput
from .site_map import CHECKS, DOWNLOADS, METHODS, PageFrame, network_file, nodes_page

__all__ = [
    "TOP_COUNT", "CommunityRow", "CommunityView", "NetworkFacts", "RankedNode", "StatisticRow",
    "TopTable", "community_view", "network_context", "network_facts", "sampling_sentence",
    "statistic_rows", "top_tables",
]

TOP_COUNT = 10
_POSITION_FIGURES = ("degree", *MEASURE_INFO)


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
    rows: tuple[CommunityRow, ...]  # communities of two or more nodes
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
        return f"{_count(self.fixes, 'fix', 'fixes')}, {_count(self.notes, 'note', 'notes')}"


def _count(number: int, one: str, many: str) -> str:
    return f"{number:,} {one if number == 1 else many}"


def _sentence(text: str) -> str:
    text = text.strip().strip("()").strip()
    if not text:
        return ""
    text = text[0].upper() + text[1:]
    return text if text.endswith((".", "!", "?")) else text + "."


def _not_defined_reason(note: str) -> str:
    # "not defined: no ties" -> "No ties."; "not defined below three nodes" reads well as it is
    if note.lower().startswith("not defined:"):
        note = note[len("not defined:"):]
    return _sentence(note) or "The statistic does not apply to this network."


def _anchor(name: str) -> str:
    return "statistic-" + re.sub(r"[^A-Za-z0-9_-]+", "-", name).strip("-")


def _reading(stat: Statistic) -> str:
    try:
        return stat.reading()
    except KeyError:  # a statistic without a plain-words template: show the value alone
        return f"{statistic_title(stat.name)} is {shown(stat.value)}."


def statistic_rows(statistics: tuple[Statistic, ...]) -> tuple[StatisticRow, ...]:
    """One row per statistic, in the analysis' order."""
    rows = []
    for stat in statistics:
        if stat.value is None or is_missing(stat.value):
            rows.append(StatisticRow(stat.name, _anchor(stat.name), statistic_title(stat.name),
                                     "not defined",
                                     _not_defined_reason(stat.note), False))
            continue
        reading = _reading(stat)
        if stat.note:
            reading = f"{reading} {_sentence(stat.note)}"
        rows.append(StatisticRow(stat.name, _anchor(stat.name), statistic_title(stat.name),
                                 shown(stat.value), reading, True))
    return tuple(rows)


def network_facts(item: NetworkPageInput) -> NetworkFacts:
    analysis = item.analysis

    def stat(name: str, fallback: Any = None) -> str:
        value = analysis.statistic(name)
        return shown(fallback if value is None else value)

    return NetworkFacts(
        kind=network_kind(analysis),
        described=a_network(analysis),
        nodes=stat("nodes", len(analysis.nodes)),
        ties=stat("edges", len(analysis.edges)),
        density=stat("density"),
        communities=shown(analysis.communities.count),
        weights=weights_sentence(item.config, analysis),
        fixes=sum(1 for f in analysis.findings if f.level == "fix"),
        notes=sum(1 for f in analysis.findings if f.level == "note"),
    )


def _ranked(values: list[float], labels: list[str], ids: list[str], count: int
            ) -> tuple[tuple[RankedNode, ...], int]:
    order = sorted((i for i, v in enumerate(values) if not math.isnan(v)),
                   key=lambda i: (-values[i], i))  # ties keep node order
    rows = []
    rank = 0
    for position, i in enumerate(order[:count], start=1):
        if position == 1 or values[i] != values[order[position - 2]]:
            rank = position
        rows.append(RankedNode(rank, labels[i], shown(values[i]),
                               ids[i] if ids[i] != labels[i] else ""))
    more = 0
    if len(order) > count:
        last = values[order[count - 1]]
        more = sum(1 for i in order[count:] if values[i] == last)
    return tuple(rows), more


def top_tables(analysis: NetworkAnalysis, count: int = TOP_COUNT) -> tuple[TopTable, ...]:
    """The ``count`` highest nodes for every measure present (community numbers are not ranked)."""
    labels = analysis.labels
    ids = [str(node) for node in analysis.nodes.index]
    measures = analysis.measures.reindex(analysis.nodes.index)
    tables = []
    for column in measures.columns:
        if column == "community":
            continue
        values = [float(v) if not is_missing(v) else math.nan for v in measures[column].tolist()]
        rows, more = _ranked(values, labels, ids, count)
        tables.append(TopTable(column, measure_title(column), rows, more))
    return tuple(tables)


def _optional(value: float | None) -> str:
    return "not defined" if is_missing(value) else significant(value, 3)


def community_view(result: CommunityResult) -> CommunityView:
    total = sum(result.sizes) or 1
    single = sum(1 for size in result.sizes if size == 1)
    single_note = ""
    if single == 1:
        single_note = ("1 node forms a community of its own (an isolate or a node only loosely "
                       "tied to any group).")
    elif single > 1:
        single_note = (f"{single:,} nodes form communities of their own (isolates or nodes only "
                       "loosely tied to any group).")
    rows = tuple(CommunityRow(number, size, f"{size / total:.0%}")
                 for number, size in enumerate(result.sizes, start=1) if size > 1)
    return CommunityView(
        method=COMMUNITY_METHOD_TITLES.get(result.method, result.method),
        resolution=significant(result.resolution),
        runs=result.runs,
        seed=result.seed,
        count=result.count,
        rows=rows,
        single_node=single,
        single_node_note=single_note,
        modularity=_optional(result.modularity),
        mean_ari=_optional(result.mean_ari),
        mean_nmi=_optional(result.mean_nmi),
        best_run_share=f"{result.best_run_share:.0%}",
        distinct_partitions=result.distinct_partitions,
        reading=stability_reading(result),
    )


def sampling_sentence(analysis: NetworkAnalysis) -> str | None:
    sampling = analysis.sampling
    if sampling is None:
        return None
    present = [measure_title(c).lower() for c in PATH_MEASURES if c in analysis.measures.columns]
    derived = (" Betweenness centralization is computed from the estimated betweenness."
               if "betweenness" in analysis.measures.columns else "")
    return (f"The network has {sampling.nodes:,} nodes, so {', '.join(present)} were estimated "
            f"from shortest paths out of {sampling.sources:,} randomly chosen source nodes (seed "
            f"{sampling.seed}) rather than from every node; values are estimates, best for "
            f"comparing nodes within this network.{derived}")


def network_context(item: NetworkPageInput, frame: PageFrame) -> dict[str, Any]:
    analysis = item.analysis
    figures = figure_views(frame, item.id, item.figures)
    anchor = f"network-{item.id}"
    return {
        "page": frame,
        "facts": network_facts(item),
        "statistics": statistic_rows(analysis.statistics),
        "map_figures": tuple(f for f in figures if f.name == "map"),
        "position_figures": tuple(f for f in figures if f.name in _POSITION_FIGURES),
        "community_figures": tuple(f for f in figures if f.name == "communities"),
        "other_figures": tuple(f for f in figures if f.name != "map" and f.name != "communities"
                               and f.name not in _POSITION_FIGURES),
        "top_tables": top_tables(analysis),
        "top_count": TOP_COUNT,
        "communities": community_view(analysis.communities),
        "omitted": tuple((measure_title(name), reason)
                         for name, reason in analysis.omitted.items()),
        "sampling": sampling_sentence(analysis),
        "links": {
            "nodes": frame.href(nodes_page(item.id)),
            "methods": frame.href(f"{METHODS}#{anchor}"),
            "checks": frame.href(f"{CHECKS}#{anchor}"),
            "downloads": frame.href(f"{DOWNLOADS}#{anchor}"),
            "nodes_csv": frame.href(network_file(item.id, "nodes.csv")),
        },
    }
