"""The page context of one network's node table: every node, every attribute and measure; of a
network above ``NODE_TABLE_ROWS`` nodes, the ``NODE_TABLE_ROWS`` nodes highest on the map's size
measure (nodes.csv keeps them all)."""

from __future__ import annotations

from dataclasses import dataclass

import pandas as pd

from ..draw.figure import FigureSettings
from ..draw.node_encoding import size_measure
from ..vocabulary import DIGITS, measure, node_anchor, number, sort_key, value_text
from .describe import measure_title
from .inputs import NetworkPageInput
from .network_page import sampling_sentence
from .site_map import DOWNLOADS, PageFrame, network_file, network_page, node_view

__all__ = ["NODE_TABLE_ROWS", "Cell", "Column", "NodeRow", "NodesLinks", "NodesPage", "node_columns",
           "node_rows", "nodes_context", "table_positions"]

NODE_TABLE_ROWS = 1000  # the node table page shows at most this many nodes (about 1 MB of HTML)


@dataclass(frozen=True)
class Column:
    key: str  # the column's name in nodes.csv
    title: str
    numeric: bool  # sorts as numbers


@dataclass(frozen=True)
class Cell:
    text: str  # rounded for reading
    value: str  # exact, for sorting ("" when missing)
    numeric: bool


@dataclass(frozen=True)
class NodeRow:
    id: str
    cells: tuple[Cell, ...]  # every column after the id, in column order
    anchor: str  # the row's fragment, which the explorable map links to
    view: str = ""  # the node's own page, when nodes have pages


def _table(item: NetworkPageInput) -> pd.DataFrame:
    """The columns of nodes.csv after the id, in its order: label, attributes, measures."""
    analysis = item.analysis
    # By position, not name: an attribute may share a name with "label" or a measure.
    nodes = analysis.nodes.iloc[:, :1 + len(analysis.attributes)]
    measures = analysis.measures.reindex(nodes.index)
    table: pd.DataFrame = pd.concat([nodes, measures], axis=1)
    return table


def node_columns(item: NetworkPageInput) -> tuple[Column, ...]:
    analysis = item.analysis
    columns = [Column("id", "Id", False), Column("label", "Label", False)]
    dtypes = analysis.nodes.dtypes.iloc[1:]  # by position: names may repeat (see _table)
    columns += [Column(a, a, bool(pd.api.types.is_numeric_dtype(dtype)))
                for a, dtype in zip(analysis.attributes, dtypes)]
    columns += [Column(m, measure_title(m), True) for m in analysis.measures.columns]
    return tuple(columns)


def table_measure(item: NetworkPageInput) -> str:
    """The measure a shortened node table ranks by: the one that sizes the map's nodes."""
    return size_measure(item.analysis, FigureSettings(color_by=item.config.color_by,
                                                      size_by=item.config.size_by))


def table_positions(item: NetworkPageInput) -> list[int] | None:
    """The node positions (node order) the table page shows: None for every node, else the
    NODE_TABLE_ROWS highest on ``table_measure``, highest first, equal values in node order."""
    n = len(item.analysis.nodes)
    if n <= NODE_TABLE_ROWS:
        return None
    values = item.analysis.measures[table_measure(item)].reindex(item.analysis.nodes.index)
    ranked = pd.DataFrame({"value": values.to_numpy(dtype=float), "position": range(n)})
    ranked = ranked.sort_values(["value", "position"], ascending=[False, True],
                                na_position="last", kind="stable")
    return [int(p) for p in ranked["position"].iloc[:NODE_TABLE_ROWS]]


def node_rows(item: NetworkPageInput, frame: PageFrame | None = None) -> tuple[NodeRow, ...]:
    table = _table(item)
    views = ([frame.href(node_view(item.id, p)) for p in range(len(table))]
             if frame is not None and item.ego is not None else [])
    numeric = [c.numeric for c in node_columns(item)[1:]]
    columns = [table.iloc[:, i].tolist() for i in range(table.shape[1])]
    written = 1 + len(item.analysis.attributes)  # label and attributes, as written in the data
    rows = []
    shown = table_positions(item)
    ids = list(table.index)
    for position in (range(len(ids)) if shown is None else shown):
        node = ids[position]
        values = [column[position] for column in columns]
        rows.append(NodeRow(str(node), tuple(
            Cell(value_text(v) if i < written else number(v), sort_key(v), is_number)
            for i, (v, is_number) in enumerate(zip(values, numeric))), node_anchor(position),
            views[position] if views else ""))
    return tuple(rows)


@dataclass(frozen=True)
class NodesLinks:
    network: str
    nodes_csv: str
    columns: str


@dataclass(frozen=True)
class NodesPage:
    """Everything ``nodes.html`` shows."""

    page: PageFrame
    network_title: str
    digits: int
    columns: tuple[Column, ...]
    rows: tuple[NodeRow, ...]
    sampling: str | None
    links: NodesLinks
    shortened: str | None = None  # when only the top nodes are shown: which, and why


def _shortened(item: NetworkPageInput) -> str | None:
    n = len(item.analysis.nodes)
    if n <= NODE_TABLE_ROWS:
        return None
    return (f"This table shows the {number(NODE_TABLE_ROWS)} of {number(n)} nodes with the "
            f"highest {measure(table_measure(item)).plain}, highest first, so the page stays "
            "light; nodes.csv holds every node.")


def nodes_context(item: NetworkPageInput, frame: PageFrame) -> NodesPage:
    return NodesPage(
        page=frame,
        network_title=item.title,
        digits=DIGITS,
        columns=node_columns(item),
        rows=node_rows(item, frame),
        sampling=sampling_sentence(item.analysis),
        shortened=_shortened(item),
        links=NodesLinks(
            network=frame.href(network_page(item.id)),
            nodes_csv=frame.href(network_file(item.id, "nodes.csv")),
            columns=frame.href(f"{DOWNLOADS}#network-{item.id}"),
        ),
    )
