"""network.graphml written column by column, the same bytes networkx's ``generate_graphml``
writes for the same graph, without building a networkx graph and an XML tree of a million
elements first.

networkx (``readwrite/graphml.py``) gives every (attribute, value type, scope) a key ``d0``,
``d1``... in the order it meets them: the graph's own attributes, then the nodes in order with
their attributes in column order, then the edges; the keys are listed last-made first; a value
is written as ``str(value)``, a missing one is left out; elements are indented two spaces a level
and an element with nothing inside closes itself (``<node id="a" />``). A directed graph lists
its edges source by source in node order, each source's in the order they were added; an
undirected one lists each edge once, from the end that comes first in node order. The test
``test_graphml_matches_networkx`` holds this module to networkx's bytes on varied networks."""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np
import pandas as pd

__all__ = ["graphml_bytes"]

_HEAD = ('<graphml xmlns="http://graphml.graphdrawing.org/xmlns" '
         'xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" '
         'xsi:schemaLocation="http://graphml.graphdrawing.org/xmlns '
         'http://graphml.graphdrawing.org/xmlns/1.0/graphml.xsd">')
_PYTHON_TYPES = {str: "string", int: "long", float: "double", bool: "boolean"}


def _text(value: str) -> str:
    """Character data escaped as xml.etree does (&, <, >)."""
    return value.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _attribute(value: str) -> str:
    """An attribute value escaped as xml.etree does."""
    return (_text(value).replace('"', "&quot;").replace("\r", "&#13;").replace("\n", "&#10;")
            .replace("\t", "&#09;"))


def _plain(value: object) -> object | None:
    if value is None or value is pd.NA or (isinstance(value, float) and math.isnan(value)):
        return None
    item = getattr(value, "item", None)
    return item() if callable(item) else value


def _typed(column: pd.Series) -> tuple[list[bool], list[str], list[str]]:
    """(present, text, xml type) of every value of one column, as plain lists: per-column
    pandas operations cost more than the values themselves on the small networks most studies
    hold, and a list comprehension is as quick as pandas' string methods on large ones."""
    dtype = column.dtype
    n = len(column)
    if pd.api.types.is_bool_dtype(dtype) and not column.isna().any():
        return [True] * n, [str(v) for v in column.tolist()], ["boolean"] * n
    if pd.api.types.is_integer_dtype(dtype) or pd.api.types.is_float_dtype(dtype):
        mask = column.notna().to_numpy()
        kind = "long" if pd.api.types.is_integer_dtype(dtype) else "double"
        values = column[mask]
        if kind == "long":
            written = values.astype("int64").to_numpy().astype(str).tolist()
        else:
            written = [repr(v) for v in values.to_numpy(dtype=float).tolist()]
        text = [""] * n
        for position, value in zip(np.flatnonzero(mask).tolist(), written):
            text[position] = value
        return mask.tolist(), text, [kind] * n
    plain = [_plain(v) for v in column.tolist()]
    return ([v is not None for v in plain], ["" if v is None else str(v) for v in plain],
            ["" if v is None else _PYTHON_TYPES[type(v)] for v in plain])


def _edge_order(sources: np.ndarray, targets: np.ndarray, directed: bool
                ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The order networkx lists the edges in, and which end it writes as source."""
    first = sources if directed else np.minimum(sources, targets)
    second = targets if directed else np.maximum(sources, targets)
    order = np.lexsort((np.arange(len(first)), first))
    return order, first[order], second[order]


def _column_data(name: str, typed: tuple[list[bool], list[str], list[str]],
                 keys: dict[tuple[str, str, str], str]) -> list[str]:
    """Each node's ``<data>`` element of one column ("" where the value is missing)."""
    present, text, kinds = typed
    numeric = all(kind in ("long", "double") for kind in kinds)  # numbers need no escaping
    written = text if numeric else [_text(value) for value in text]
    data = []
    for here, value, kind in zip(present, written, kinds):
        if not here:
            data.append("")
            continue
        key = keys.get((name, kind, "node"), "")
        data.append(f'      <data key="{key}">{value}</data>\n' if value
                    else f'      <data key="{key}" />\n')
    return data


def _lines(table: pd.DataFrame, edges: pd.DataFrame, *, directed: bool, title: str
           ) -> Iterator[str]:
    ids = [str(v) for v in table["id"].tolist()]
    columns = [c for c in table.columns if c != "id"]
    typed = [_typed(table[c]) for c in columns]
    # Keys in the order networkx makes them: the title, node attributes by first appearance
    # (node, then column), then the weight.
    keys: dict[tuple[str, str, str], str] = {("title", "string", "graph"): "d0"}
    found = []
    for position, (name, (present, _, kinds)) in enumerate(zip(columns, typed)):
        first: dict[str, int] = {}
        for node, (here, kind) in enumerate(zip(present, kinds)):
            if here and kind not in first:
                first[kind] = node
        found += [(node, position, str(name), kind) for kind, node in first.items()]
    for _, _, name, kind in sorted(found):
        keys[(name, kind, "node")] = f"d{len(keys)}"
    weighted = "weight" in edges.columns
    if weighted:
        keys[("weight", "double", "edge")] = f"d{len(keys)}"
    yield _HEAD
    for (name, kind, scope), made in reversed(keys.items()):
        yield (f'  <key id="{made}" for="{scope}" attr.name="{_attribute(name)}"'
               f' attr.type="{kind}" />')
    yield f'  <graph edgedefault="{"directed" if directed else "undirected"}">'
    parts = [_column_data(str(name), values, keys) for name, values in zip(columns, typed)]
    bodies = ["".join(row) for row in zip(*parts)] if parts else [""] * len(ids)
    escaped = [_attribute(node) for node in ids]  # each id escaped once, not once per tie
    for element_id, body in zip(escaped, bodies):
        yield (f'    <node id="{element_id}">\n{body}    </node>' if body
               else f'    <node id="{element_id}" />')
    position = pd.Series(np.arange(len(ids)), index=pd.Index(ids, dtype=object))
    sources = position.reindex(edges["source"].astype(str)).to_numpy()
    targets = position.reindex(edges["target"].astype(str)).to_numpy()
    order, tails, heads = _edge_order(sources, targets, directed)
    names = np.array(escaped, dtype=object)
    ends = zip(names[tails].tolist(), names[heads].tolist())
    if weighted:
        key = keys[("weight", "double", "edge")]
        weights = edges["weight"].to_numpy(dtype=float)[order].tolist()
        for (tail, head), weight in zip(ends, weights):
            yield (f'    <edge source="{tail}" target="{head}">\n      <data key="{key}">'
                   f"{weight!r}</data>\n    </edge>")
    else:
        for tail, head in ends:
            yield f'    <edge source="{tail}" target="{head}" />'
    yield f'    <data key="d0">{_text(title)}</data>'
    yield "  </graph>"
    yield "</graphml>"


def graphml_bytes(table: pd.DataFrame, edges: pd.DataFrame, *, directed: bool, title: str
                  ) -> bytes:
    """GraphML of the nodes of ``table`` (column ``id``, then one column per attribute; missing
    values left out) and the ``edges`` (source, target and, when present, weight)."""
    text = "\n".join(_lines(table, edges, directed=directed, title=title))
    # networkx yields the document's lines as str.splitlines() cuts them, rejoined with "\n"
    return ("\n".join(text.splitlines()) + "\n").encode("utf-8")
