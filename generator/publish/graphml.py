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


def _text(values: pd.Series) -> pd.Series:
    """Character data escaped as xml.etree does (&, <, >)."""
    return (values.str.replace("&", "&amp;", regex=False).str.replace("<", "&lt;", regex=False)
            .str.replace(">", "&gt;", regex=False))


def _attribute(values: pd.Series) -> pd.Series:
    """An attribute value escaped as xml.etree does."""
    escaped = _text(values).str.replace('"', "&quot;", regex=False)
    for raw, entity in (("\r", "&#13;"), ("\n", "&#10;"), ("\t", "&#09;")):
        escaped = escaped.str.replace(raw, entity, regex=False)
    return escaped


def _plain(value: object) -> object | None:
    if value is None or value is pd.NA or (isinstance(value, float) and math.isnan(value)):
        return None
    item = getattr(value, "item", None)
    return item() if callable(item) else value


def _typed(column: pd.Series) -> tuple[pd.Series, pd.Series, pd.Series]:
    """(present, text, xml type) of every value of one column."""
    dtype = column.dtype
    if pd.api.types.is_bool_dtype(dtype) and not column.isna().any():
        present = pd.Series(True, index=column.index)
        return present, column.map(str), pd.Series("boolean", index=column.index)
    if pd.api.types.is_integer_dtype(dtype) or pd.api.types.is_float_dtype(dtype):
        present = column.notna()
        kind = "long" if pd.api.types.is_integer_dtype(dtype) else "double"
        values = column[present]
        if kind == "long":
            text = pd.Series(values.astype("int64").to_numpy().astype(str), index=values.index)
        else:
            text = pd.Series([repr(float(v)) for v in values.to_numpy(dtype=float)],
                             index=values.index, dtype=object)
        full = pd.Series("", index=column.index, dtype=object)
        full[present] = text
        return present, full, pd.Series(kind, index=column.index)
    plain = [_plain(v) for v in column.tolist()]
    present = pd.Series([v is not None for v in plain], index=column.index)
    text = pd.Series(["" if v is None else str(v) for v in plain], index=column.index,
                     dtype=object)
    kinds = pd.Series(["" if v is None else _PYTHON_TYPES[type(v)] for v in plain],
                      index=column.index, dtype=object)
    return present, text, kinds


def _data(key: pd.Series | str, text: pd.Series, indent: str, *, escape: bool) -> pd.Series:
    element = (indent + '<data key="' + key + '"' if isinstance(key, pd.Series)
               else pd.Series(f'{indent}<data key="{key}"', index=text.index, dtype=object))
    filled = text != ""
    written = _text(text) if escape else text
    data: pd.Series = element.where(~filled, element + ">" + written + "</data>\n").where(
        filled, element + " />\n")
    return data


def _edge_order(sources: np.ndarray, targets: np.ndarray, directed: bool
                ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The order networkx lists the edges in, and which end it writes as source."""
    first = sources if directed else np.minimum(sources, targets)
    second = targets if directed else np.maximum(sources, targets)
    order = np.lexsort((np.arange(len(first)), first))
    return order, first[order], second[order]


def _lines(table: pd.DataFrame, edges: pd.DataFrame, *, directed: bool, title: str
           ) -> Iterator[str]:
    ids = table["id"].astype(str)
    columns = [c for c in table.columns if c != "id"]
    typed = [_typed(table[c]) for c in columns]
    # Keys in the order networkx makes them: the title, node attributes by first appearance
    # (node, then column), then the weight.
    keys: dict[tuple[str, str, str], str] = {("title", "string", "graph"): "d0"}
    found = []
    for position, (name, (present, _, kinds)) in enumerate(zip(columns, typed)):
        for kind in pd.unique(kinds[present]):
            first = int(np.flatnonzero((present & (kinds == kind)).to_numpy())[0])
            found.append((first, position, str(name), str(kind)))
    for _, _, name, kind in sorted(found):
        keys[(name, kind, "node")] = f"d{len(keys)}"
    weighted = "weight" in edges.columns
    if weighted:
        keys[("weight", "double", "edge")] = f"d{len(keys)}"
    yield _HEAD
    for (name, kind, scope), made in reversed(keys.items()):
        yield (f'  <key id="{made}" for="{scope}" attr.name="{_attribute(pd.Series([name]))[0]}"'
               f' attr.type="{kind}" />')
    yield f'  <graph edgedefault="{"directed" if directed else "undirected"}">'
    body = pd.Series("", index=table.index, dtype=object)
    for name, (present, text, kinds) in zip(columns, typed):
        single = pd.unique(kinds[present])
        if len(single) == 1:  # one type in the column (always so for numbers): one key
            key: pd.Series | str = keys[(str(name), str(single[0]), "node")]
        else:
            key = kinds.map(lambda kind, name=str(name): keys.get((name, kind, "node"), ""))
        numeric = bool(kinds.isin(["long", "double"]).all())  # numbers need no escaping
        body = body + _data(key, text, "      ", escape=not numeric).where(present, "")
    escaped = _attribute(ids)
    node_opening = '    <node id="' + escaped + '"'
    nodes = node_opening.where(body == "", node_opening + ">\n" + body + "    </node>").where(
        body != "", node_opening + " />")
    yield from nodes.tolist()
    position = pd.Series(np.arange(len(ids)), index=ids.to_numpy())
    sources = position.reindex(edges["source"].astype(str)).to_numpy()
    targets = position.reindex(edges["target"].astype(str)).to_numpy()
    order, tails, heads = _edge_order(sources, targets, directed)
    names = escaped.to_numpy(dtype=object)  # each id escaped once, not once per tie
    opening = ('    <edge source="' + pd.Series(names[tails], dtype=object) + '" target="'
               + pd.Series(names[heads], dtype=object) + '"')
    if weighted:
        weights = edges["weight"].to_numpy(dtype=float)[order]
        weight = pd.Series([repr(float(w)) for w in weights], dtype=object)
        yield from (opening + '>\n      <data key="' + keys[("weight", "double", "edge")] + '">'
                    + weight + "</data>\n    </edge>").tolist()
    else:
        yield from (opening + " />").tolist()
    yield f'    <data key="d0">{_text(pd.Series([title], dtype=object))[0]}</data>'
    yield "  </graph>"
    yield "</graphml>"


def graphml_bytes(table: pd.DataFrame, edges: pd.DataFrame, *, directed: bool, title: str
                  ) -> bytes:
    """GraphML of the nodes of ``table`` (column ``id``, then one column per attribute; missing
    values left out) and the ``edges`` (source, target and, when present, weight)."""
    text = "\n".join(_lines(table, edges, directed=directed, title=title))
    # networkx yields the document's lines as str.splitlines() cuts them, rejoined with "\n"
    return ("\n".join(text.splitlines()) + "\n").encode("utf-8")
