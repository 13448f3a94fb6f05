"""The page of one node: its ego network, its ties in and out, its measures with their rank and
percentile among all nodes, its community, and the same node in the study's other networks."""

from __future__ import annotations

import math
import posixpath
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..config import NetworkConfig
from ..draw.ego import EgoFigure
from ..vocabulary import COMMUNITY, count_of, node_anchor, node_name, number, ordinal, value_text
from .describe import measure_title
from .inputs import NetworkPageInput
from .site_map import PageFrame, network_page, node_view, nodes_page

__all__ = ["ELSEWHERE_SHOWN", "NODE_VIEW_LIMIT", "NodeViewPage", "node_appearances",
           "node_view_contexts", "node_view_limit"]

# Without [site] node_views, networks up to this many nodes get a page per node.
NODE_VIEW_LIMIT = 2000
# A node's page links the same node in at most this many other networks: the networks of its
# series or sharing its node list first, then the others in study order. A study of hundreds of
# team networks whose ids repeat (c1 in every team) would otherwise list hundreds on each page.
ELSEWHERE_SHOWN = 12

# Per node id, every network it is in with its position there, in study order.
Appearances = dict[str, list[tuple[NetworkPageInput, int]]]


def node_appearances(networks: list[NetworkPageInput]) -> Appearances:
    """Where each node id appears: one pass over every network's nodes."""
    found: Appearances = {}
    for item in networks:
        for position, node in enumerate(item.analysis.nodes.index):
            found.setdefault(str(node), []).append((item, position))
    return found


def _related(one: NetworkConfig, other: NetworkConfig) -> bool:
    """Waves of one series, or networks read from one node list: surely the same people."""
    return ((one.series is not None and one.series == other.series)
            or (one.nodes is not None and one.nodes == other.nodes))


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
    elsewhere_more: str  # "" or "3 more networks": where else the node is, not linked
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


def _neighbours(item: NetworkPageInput) -> tuple[list[list[tuple[int, object]]],
                                                  list[list[tuple[int, object]]]]:
    """Per node, in node order: its ties out and its ties in, as (other node, weight) in edge
    order; an undirected network lists each tie at both ends, a self-tie once."""
    analysis = item.analysis
    index = {n: i for i, n in enumerate(analysis.nodes.index)}
    edges = analysis.edges
    weights = list(edges["weight"]) if analysis.weighted else [None] * len(edges)
    out_rows: list[list[tuple[int, object]]] = [[] for _ in range(len(index))]
    in_rows: list[list[tuple[int, object]]] = [[] for _ in range(len(index))]
    for s, t, w in zip(edges["source"], edges["target"], weights):
        out_rows[index[s]].append((index[t], w))
        if analysis.directed or s != t:
            in_rows[index[t]].append((index[s], w))
    return out_rows, in_rows


def _tie_groups(directed: bool, out_rows: list[tuple[int, object]],
                in_rows: list[tuple[int, object]], href_of: list[str], labels: list[str]
                ) -> tuple[TieGroup, ...]:
    def rows(found: list[tuple[int, object]]) -> tuple[TieRow, ...]:
        found = sorted(found, key=lambda r: (-(float(r[1]) if r[1] is not None else 0.0),  # type: ignore[arg-type]
                                             labels[r[0]]))
        return tuple(TieRow(labels[v], href_of[v], "" if w is None else number(w))
                     for v, w in found)

    if directed:
        return (TieGroup("Ties out", "From this node to each node listed.", rows(out_rows)),
                TieGroup("Ties in", "From each node listed to this node.", rows(in_rows)))
    return (TieGroup("Ties", "The nodes this node is tied to.", rows(out_rows + in_rows)),)


def node_view_contexts(item: NetworkPageInput, frames: list[PageFrame], ego: list[EgoFigure],
                       appearances: Appearances) -> list[NodeViewPage]:
    """The page of every node of ``item`` (``frames`` in node order). ``appearances`` says
    where else each node id is, for links to the same node there (its page when that network's
    nodes have pages, else its row of the node table); at most ELSEWHERE_SHOWN links."""
    analysis = item.analysis
    nodes = analysis.nodes
    n = len(nodes)
    labels = [node_name(str(label), str(node)) for node, label in zip(nodes.index, nodes["label"])]
    measures = [m for m in analysis.measures.columns if m != COMMUNITY]
    ranked = {m: _ranks(analysis.measures[m]) for m in measures}
    out_rows, in_rows = _neighbours(item)
    shown = {m: [number(v) for v in analysis.measures[m]] for m in measures}
    titles = {m: measure_title(m) for m in measures}
    attributes = {a: [value_text(v) for v in nodes[a]] for a in analysis.attributes}
    communities = [str(int(c)) for c in analysis.measures[COMMUNITY]]
    # Every node's page lies in one folder, so a link to a node's page reads the same from each.
    folders = {posixpath.dirname(frame.path) for frame in frames}
    assert len(folders) <= 1, "node pages of one network share one folder"
    href_of = [frames[0].href(node_view(item.id, v)) for v in range(n)] if frames else []
    pages = []
    for position, frame in enumerate(frames):
        found = [(other, at) for other, at in appearances.get(str(nodes.index[position]), [])
                 if other.id != item.id]
        found.sort(key=lambda entry: not _related(item.config, entry[0].config))  # stable
        elsewhere = []
        for other, at in found[:ELSEWHERE_SHOWN]:
            target = (node_view(other.id, at) if other.ego is not None
                      else f"{nodes_page(other.id)}#{node_anchor(at)}")
            elsewhere.append(Elsewhere(other.title, frame.href(target)))
        more = len(found) - len(elsewhere)
        rows = tuple(MeasureRow(titles[m], shown[m][position], ranked[m][0][position],
                                ranked[m][1][position]) for m in measures)
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
            attributes=tuple((a, attributes[a][position]) for a in analysis.attributes),
            community=communities[position],
            measures=rows, ties=_tie_groups(analysis.directed, out_rows[position],
                                            in_rows[position], href_of, labels),
            elsewhere=tuple(elsewhere),
            elsewhere_more=count_of(more, "more network", "more networks") if more else "",
            ego=figure,
            ego_hrefs=tuple(href_of[node.position] for node in figure.nodes),
            ego_caption=caption, weighted=analysis.weighted,
        ))
    return pages
