"""The page of one node: its ego network, its ties in and out, its measures with their rank and
percentile among all nodes, its community, and the same node in the study's other networks."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..draw.ego import EgoFigure
from ..vocabulary import COMMUNITY, count_of, node_anchor, node_name, number, ordinal, value_text
from .describe import measure_title
from .inputs import NetworkPageInput
from .site_map import PageFrame, network_page, node_view, nodes_page

__all__ = ["NODE_VIEW_LIMIT", "NodeViewPage", "node_view_contexts", "node_view_limit"]

# Without [site] node_views, networks up to this many nodes get a page per node.
NODE_VIEW_LIMIT = 2000


def node_view_limit(setting: bool | None) -> float:
    """Networks up to this many nodes get a page per node: as ``[site] node_views`` says
    (true: every network, false: none), else up to ``NODE_VIEW_LIMIT`` nodes."""
    if setting is None:
        return NODE_VIEW_LIMIT
    return math.inf if setting else -1


@dataclass(frozen=True)
class MeasureRow:
    title: str
    value: str
    rank: str  # "3rd of 61", "" when the node has no value
    percentile: str  # "higher than 92% of nodes"


@dataclass(frozen=True)
class TieRow:
    label: str
    href: str
    weight: str  # "" on an unweighted network


@dataclass(frozen=True)
class TieGroup:
    title: str  # "Ties out", "Ties in" or "Ties"
    explanation: str
    rows: tuple[TieRow, ...]


@dataclass(frozen=True)
class Elsewhere:
    network_title: str
    href: str


@dataclass(frozen=True)
class NodeViewPage:
    """Everything ``node.html`` shows."""

    page: PageFrame
    name: str
    node_id: str
    network_title: str
    network_href: str
    table_href: str
    attributes: tuple[tuple[str, str], ...]
    community: str
    measures: tuple[MeasureRow, ...]
    ties: tuple[TieGroup, ...]
    elsewhere: tuple[Elsewhere, ...]
    ego: EgoFigure
    ego_hrefs: tuple[str, ...]  # per node of the figure, its page
    ego_caption: str
    weighted: bool


def _ranks(values: pd.Series) -> tuple[list[str], list[str]]:
    """Competition ranks ("1st of 61"; equal values share a rank) and the share of the other
    nodes each value is higher than."""
    numbers = values.to_numpy(dtype=float)
    present = numbers[~np.isnan(numbers)]
    ordered = np.sort(present)
    total = len(present)
    ranks, percentiles = [], []
    for v in numbers:
        if math.isnan(v):
            ranks.append("")
            percentiles.append("")
            continue
        above = total - int(np.searchsorted(ordered, v, side="right"))
        below = int(np.searchsorted(ordered, v, side="left"))
        ranks.append(f"{ordinal(above + 1)} of {number(total)}")
        others = total - 1
        percentiles.append(f"higher than {round(100 * below / others)}% of the other nodes"
                           if others else "")
    return ranks, percentiles


def _tie_groups(item: NetworkPageInput, position: int, href_of: list[str], labels: list[str]
                ) -> tuple[TieGroup, ...]:
    analysis = item.analysis
    node = analysis.nodes.index[position]
    index = {n: i for i, n in enumerate(analysis.nodes.index)}
    edges = analysis.edges
    weights = list(edges["weight"]) if analysis.weighted else [None] * len(edges)
    out_rows, in_rows = [], []
    for s, t, w in zip(edges["source"], edges["target"], weights):
        if s == node:
            out_rows.append((index[t], w))
        if t == node and (analysis.directed or s != node):
            in_rows.append((index[s], w))

    def rows(found: list[tuple[int, object]]) -> tuple[TieRow, ...]:
        found.sort(key=lambda r: (-(float(r[1]) if r[1] is not None else 0.0), labels[r[0]]))  # type: ignore[arg-type]
        return tuple(TieRow(labels[v], href_of[v], "" if w is None else number(w))
                     for v, w in found)

    if analysis.directed:
        return (TieGroup("Ties out", "From this node to each node listed.", rows(out_rows)),
                TieGroup("Ties in", "From each node listed to this node.", rows(in_rows)))
    return (TieGroup("Ties", "The nodes this node is tied to.", rows(out_rows + in_rows)),)


def node_view_contexts(item: NetworkPageInput, frames: list[PageFrame], ego: list[EgoFigure],
                       others: list[tuple[NetworkPageInput, bool]]
                       ) -> list[NodeViewPage]:
    """The page of every node of ``item`` (``frames`` in node order). ``others`` are the
    study's other networks, each with whether its nodes have pages, for links to the same node
    there."""
    analysis = item.analysis
    nodes = analysis.nodes
    n = len(nodes)
    labels = [node_name(str(label), str(node)) for node, label in zip(nodes.index, nodes["label"])]
    measures = [m for m in analysis.measures.columns if m != COMMUNITY]
    ranked = {m: _ranks(analysis.measures[m]) for m in measures}
    where_else = []
    for other, views in others:
        positions = {str(node): i for i, node in enumerate(other.analysis.nodes.index)}
        where_else.append((other, views, positions))
    pages = []
    for position, frame in enumerate(frames):
        href_of = [frame.href(node_view(item.id, v)) for v in range(n)]
        elsewhere = []
        for other, views, positions in where_else:
            at = positions.get(str(nodes.index[position]))
            if at is not None:
                target = (node_view(other.id, at) if views
                          else f"{nodes_page(other.id)}#{node_anchor(at)}")
                elsewhere.append(Elsewhere(other.title, frame.href(target)))
        rows = tuple(MeasureRow(measure_title(m), number(analysis.measures[m].iloc[position]),
                                ranked[m][0][position], ranked[m][1][position]) for m in measures)
        figure = ego[position]
        caption = (f"{labels[position]} in the middle, the "
                   f"{count_of(figure.alters, 'node')} it is tied to around it, and the ties "
                   "among them.")
        if figure.drawn < figure.alters:
            caption += (f" The {number(figure.drawn)} with the strongest ties are drawn; the "
                        "list below names every tie.")
        pages.append(NodeViewPage(
            page=frame, name=labels[position], node_id=str(nodes.index[position]),
            network_title=item.title, network_href=frame.href(network_page(item.id)),
            table_href=frame.href(f"{nodes_page(item.id)}#{node_anchor(position)}"),
            attributes=tuple((a, value_text(nodes.iloc[position][a]))
                             for a in analysis.attributes),
            community=str(int(analysis.measures[COMMUNITY].iloc[position])),
            measures=rows, ties=_tie_groups(item, position, href_of, labels),
            elsewhere=tuple(elsewhere), ego=figure,
            ego_hrefs=tuple(href_of[node.position] for node in figure.nodes),
            ego_caption=caption, weighted=analysis.weighted,
        ))
    return pages
