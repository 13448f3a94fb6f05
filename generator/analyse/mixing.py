"""Attribute mixing: tie counts between the groups of a categorical node attribute, and
Krackhardt & Stern's E-I index overall and per group."""

from __future__ import annotations

from dataclasses import dataclass

import igraph as ig
import pandas as pd

from ..ingest.network import natural_key

__all__ = ["GroupMixing", "MixingTable", "categorical_attributes", "ei_index", "merge_groups",
           "mixing_table", "numeric_attributes"]


@dataclass(frozen=True)
class GroupMixing:
    """One group's ties: ``internal`` join two of its members, ``external`` join a member with a
    node of another group (in a directed network, sent and received together); ``ei`` is
    (external - internal) / (external + internal), None when the group has no tie."""

    group: str
    nodes: int
    internal: int
    external: int
    ei: float | None


@dataclass(frozen=True)
class MixingTable:
    """The mixing matrix of one categorical attribute.

    ``counts[r][c]`` counts ties from group ``groups[r]`` to group ``groups[c]`` in a directed
    network. In an undirected one the matrix is symmetric: a tie between groups A and B adds 1 to
    both (A, B) and (B, A), a tie inside A adds 1 to (A, A); so the ties are the diagonal plus
    the cells above it. Ties with an end that has no value are left out (``left_out_ties``), as
    are nodes with no value (``left_out_nodes``). ``ei_index`` is None (``why`` says why by
    key) when no tie joins two valued nodes or every valued node has the same value.
    """

    attribute: str
    directed: bool
    groups: tuple[str, ...]
    counts: tuple[tuple[int, ...], ...]
    per_group: tuple[GroupMixing, ...]
    internal: int
    external: int
    ei_index: float | None
    why: str | None
    left_out_ties: int
    left_out_nodes: int


def categorical_attributes(attributes: pd.DataFrame) -> tuple[str, ...]:
    """The attributes read as categories (text), in column order."""
    return tuple(c for c in attributes.columns
                 if not pd.api.types.is_numeric_dtype(attributes[c].dtype))


def numeric_attributes(attributes: pd.DataFrame) -> tuple[str, ...]:
    return tuple(c for c in attributes.columns if pd.api.types.is_numeric_dtype(attributes[c].dtype))


def _groups(values: pd.Series) -> tuple[list[str | None], tuple[str, ...]]:
    texts = [None if pd.isna(v) else str(v) for v in values]
    groups = tuple(sorted({t for t in texts if t is not None}, key=natural_key))
    return texts, groups


def _ratio(external: int, internal: int) -> float | None:
    total = external + internal
    return (external - internal) / total if total else None


def mixing_table(graph: ig.Graph, values: pd.Series, attribute: str) -> MixingTable:
    """The mixing matrix and E-I indices of ``values`` (one per vertex, in vertex order).

    E-I index = (E - I) / (E + I), where I counts the ties inside groups and E the ties between
    them, each tie once: -1 when every tie stays inside its group, +1 when every tie crosses.
    A group's own index counts its internal ties against the ties between it and other groups.

    References: Krackhardt, D. & Stern, R. N.: Informal networks and organizational crises: an
    experimental simulation. Social Psychology Quarterly 51(2):123-140, 1988.
    doi:10.2307/2786835
    """
    texts, groups = _groups(values)
    index = {g: i for i, g in enumerate(groups)}
    k = len(groups)
    counts = [[0] * k for _ in range(k)]
    directed = graph.is_directed()
    left_out = 0
    for a, b in graph.get_edgelist():
        ga, gb = texts[a], texts[b]
        if ga is None or gb is None:
            left_out += 1
            continue
        r, c = index[ga], index[gb]
        counts[r][c] += 1
        if not directed and r != c:
            counts[c][r] += 1
    internal = sum(counts[i][i] for i in range(k))
    between = sum(counts[r][c] for r in range(k) for c in range(k) if r != c)
    external = between if directed else between // 2
    per_group = []
    for i, group in enumerate(groups):
        out = sum(counts[i][c] for c in range(k) if c != i)
        inward = sum(counts[r][i] for r in range(k) if r != i) if directed else 0
        per_group.append(GroupMixing(group, sum(1 for t in texts if t == group), counts[i][i],
                                     out + inward, _ratio(out + inward, counts[i][i])))
    ei = _ratio(external, internal)
    why = None
    if internal + external == 0:
        ei, why = None, "no_valued_ties"
    elif k < 2:
        ei, why = None, "one_value"
    return MixingTable(attribute, directed, groups, tuple(tuple(row) for row in counts),
                       tuple(per_group), internal, external, ei, why, left_out,
                       sum(1 for t in texts if t is None))


def merge_groups(table: MixingTable, small: tuple[str, ...], name: str) -> MixingTable:
    """The table with the groups in ``small`` merged into one group called ``name`` (last):
    their rows and columns are added up, and each group's counts are taken from the merged
    matrix, so ties between two merged groups count as inside the merged one. The overall
    counts and E-I index stay those of the groups as measured."""
    if not small:
        return table
    kept = [g for g in table.groups if g not in small]
    groups = (*kept, name)
    position = {g: (kept.index(g) if g in kept else len(kept)) for g in table.groups}
    k = len(groups)
    counts = [[0] * k for _ in range(k)]
    for r, row in enumerate(table.counts):
        for c, value in enumerate(row):
            a, b = position[table.groups[r]], position[table.groups[c]]
            if not table.directed and a == b and r != c:
                value = value if r < c else 0  # a symmetric pair becomes one diagonal count
            counts[a][b] += value
    nodes = {g: 0 for g in groups}
    for measured in table.per_group:
        nodes[groups[position[measured.group]]] += measured.nodes
    per_group = []
    for i, group in enumerate(groups):
        out = sum(counts[i][c] for c in range(k) if c != i)
        inward = sum(counts[r][i] for r in range(k) if r != i) if table.directed else 0
        per_group.append(GroupMixing(group, nodes[group], counts[i][i], out + inward,
                                     _ratio(out + inward, counts[i][i])))
    return MixingTable(table.attribute, table.directed, groups,
                       tuple(tuple(row) for row in counts), tuple(per_group), table.internal,
                       table.external, table.ei_index, table.why, table.left_out_ties,
                       table.left_out_nodes)


def ei_index(graph: ig.Graph, values: pd.Series) -> float | None:
    """The overall E-I index of ``values`` on ``graph`` (see ``mixing_table``)."""
    return mixing_table(graph, values, "").ei_index
