"""Read a two-mode network (an edge list whose source values are one mode and target values the
other, or an incidence matrix with one mode in its rows and the other in its columns) into a
TwoModeNetwork, recording every fix and refusal.

Nodes are keyed by (mode, id): the same text may name a node of each mode without clashing."""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from ..config import EdgeListSource, MatrixSource, NetworkConfig, StudyConfig
from ..errors import DataError, Finding
from ..vocabulary import count_of
from .csvfile import read_table
from .network import (
    MAX_LINES_LISTED,
    RESERVED_COLUMNS,
    DataChecks,
    _number,
    _RawTie,
    _read_edge_list,
    _typed_attributes,
    natural_key,
)

__all__ = ["MODE_COLUMN", "TwoModeNetwork", "projection_findings", "read_two_mode",
           "typed_mode_attributes"]

MODE_COLUMN = "mode"  # the optional node-list column naming each node's mode
TWO_MODE_COLUMNS = ("mode", "degree_share")  # columns of a two-mode nodes.csv netfolio writes

NodeKey = tuple[str, str]  # (mode, id)


@dataclass(frozen=True)
class TwoModeNetwork:
    """A two-mode network ready for analysis.

    ``nodes`` has one row per node, first-mode nodes then second-mode nodes, each in natural id
    order, with the columns ``mode``, ``id``, ``label`` and the node attributes (as text; see
    ``typed_mode_attributes``). ``edges`` has ``first`` and ``second`` (the ids of the tie's
    first-mode and second-mode node) and, when weighted, ``weight``, sorted in node order."""

    config: NetworkConfig
    nodes: pd.DataFrame
    edges: pd.DataFrame
    weighted: bool
    attributes: tuple[str, ...]
    checks: DataChecks
    files: tuple[Path, ...]

    @property
    def id(self) -> str:
        return self.config.id

    @property
    def modes(self) -> tuple[str, str]:
        return self.config.modes

    def ids(self, mode: str) -> list[str]:
        return [str(v) for v in self.nodes.loc[self.nodes["mode"] == mode, "id"]]


def _a(word: str) -> str:
    """``a staff member``, ``an event``."""
    return f"{'an' if word[:1].lower() in 'aeiou' else 'a'} {word}"


def typed_mode_attributes(network: TwoModeNetwork, mode: str | None) -> pd.DataFrame:
    """The attributes of one mode's nodes (or, with ``mode`` None, of every node), indexed by id,
    a column of numbers where its filled cells all are; columns empty for these nodes are left
    out."""
    rows = network.nodes if mode is None else network.nodes[network.nodes["mode"] == mode]
    frame = rows[list(network.attributes)].astype("string")
    frame.index = pd.Index([str(v) for v in rows["id"]], name="id")
    frame = frame[[c for c in frame.columns if frame[c].fillna("").str.strip().ne("").any()]]
    return _typed_attributes(frame, network.config.decimal)


def _read_nodes(net: NetworkConfig, path: Path, name: str, checks: DataChecks
                ) -> tuple[list[str], list[tuple[str | None, str, int, tuple[str, ...]]], bool, str]:
    """The node list's header, its rows as (mode or None, id, line, row), whether it has a mode
    column, and whether it counts lines or (Parquet) rows."""
    table = read_table(path, name, delimiter=net.delimiter, decimal=net.decimal)
    checks.findings += table.findings
    table.require(net.node_id, what="node list")
    if net.label is not None and net.label != net.node_id:
        table.require(net.label, what="node list")
    has_mode = MODE_COLUMN in table.header and MODE_COLUMN != net.node_id
    table.refuse_control_characters(net.node_id, net.label, MODE_COLUMN if has_mode else None)
    checks.findings += table.trimmed_findings(net.node_id)
    id_col = table.column(net.node_id)
    mode_col = table.column(MODE_COLUMN) if has_mode else None
    rows = []
    unit = table.unit
    first_line: dict[tuple[str | None, str], int] = {}
    for row, line in zip(table.rows, table.lines.tolist()):
        node = row[id_col]
        mode = row[mode_col] if mode_col is not None else None
        if mode is not None and mode not in net.modes:
            checks.add(Finding("error", name, f"mode must be {net.modes[0]!r} or {net.modes[1]!r} "
                               "(the modes study.toml names)", line=line, column=MODE_COLUMN,
                               value=mode, unit=unit))
            continue
        if node == "":
            checks.add(Finding("error", name, "a node has an empty id", line=line,
                               column=net.node_id, unit=unit))
        elif (mode, node) in first_line:
            where = f" as {_a(mode)}" if mode else ""
            checks.add(Finding("error", name, f"node id is repeated{where} (first on {unit} "
                               f"{first_line[(mode, node)]})", line=line, column=net.node_id,
                               value=node, unit=unit))
        else:
            first_line[(mode, node)] = line
            rows.append((mode, node, line, row))
    checks.raise_if_errors()
    return list(table.header), rows, has_mode, unit


def _read_incidence(net: NetworkConfig, matrix: MatrixSource, name: str, checks: DataChecks
                    ) -> tuple[list[_RawTie], list[tuple[str, int]], list[str], bool]:
    """Rows are first-mode nodes, columns second-mode nodes; a cell is 0 (no tie) or the tie's
    weight. Returns the ties, the row ids with their lines, the column ids and whether any
    weight is other than 1."""
    table = read_table(matrix.path, name, delimiter=net.delimiter, row_labels=True)
    checks.findings += table.findings
    table.refuse_control_characters(*table.header)
    columns = list(table.header[1:])
    first_column = table.header[0] or "first column"
    seen: dict[str, int] = {}
    for column in columns:
        if column == "":
            raise DataError(Finding("error", name, "a column of the incidence matrix has no id in "
                                    "the header row", line=1))
        if column in seen:
            raise DataError(Finding("error", name, "column id is repeated in the header row",
                                    line=1, column=column, value=column))
        seen[column] = 1
    rows: list[tuple[str, int]] = []
    row_line: dict[str, int] = {}
    ties: list[_RawTie] = []
    for row, line in zip(table.rows, table.lines.tolist()):
        label = row[0]
        if label == "":
            checks.add(Finding("error", name, "a row has no id in the first column", line=line,
                               column=first_column))
            continue
        if label in row_line:
            checks.add(Finding("error", name, f"row id is repeated (first on line "
                               f"{row_line[label]})", line=line, column=first_column, value=label))
            continue
        row_line[label] = line
        rows.append((label, line))
        for column, cell in zip(columns, row[1:]):
            if cell == "":
                continue  # an empty cell is no tie
            value = _number(cell, net.decimal)
            if value is None or math.isnan(value):
                checks.add(Finding("error", name, "an incidence-matrix cell must be a number "
                                   "(0 for no tie, or the tie's weight)", line=line,
                                   column=column, value=cell))
            elif math.isinf(value) or value < 0:
                checks.add(Finding("error", name, "an incidence-matrix cell must be 0 or a "
                                   "positive number", line=line, column=column, value=cell))
            elif value != 0:
                ties.append(_RawTie(label, column, value, line))
    checks.raise_if_errors()
    weighted = any(t.weight != 1.0 for t in ties)
    return ties, rows, columns, weighted


def _refuse_wrong_side(ties: list[_RawTie], declared: dict[NodeKey, int], net: NetworkConfig,
                       data_name: str, nodes_name: str, columns: tuple[str, str],
                       checks: DataChecks, units: tuple[str, str] = ("line", "line")) -> None:
    """With a ``mode`` column in the node list, an id listed only as one mode may not appear in
    the other mode's column."""
    first, second = net.modes
    node_unit, tie_unit = units
    reported: set[NodeKey] = set()
    for tie in ties:
        for mode, other, node, column in ((first, second, tie.source, columns[0]),
                                          (second, first, tie.target, columns[1])):
            if (mode, node) in declared or (other, node) not in declared:
                continue
            if (mode, node) in reported:
                continue
            reported.add((mode, node))
            in_header = column == "header row"  # an incidence matrix's column id
            checks.add(Finding(
                "error", data_name, f"node {node!r} is listed as {_a(other)} in {nodes_name} "
                f"({node_unit} {declared[(other, node)]}) but appears in the {mode} column; in a "
                f"two-mode network the {column!r} column holds {mode} nodes only"
                if not in_header else
                f"node {node!r} is listed as {_a(other)} in {nodes_name} ({node_unit} "
                f"{declared[(other, node)]}) but names a column of the incidence matrix, whose "
                f"columns are {mode} nodes", line=1 if in_header else tie.line,
                column=node if in_header else column, value=node,
                unit="line" if in_header else tie_unit))


def read_two_mode(study: StudyConfig, net: NetworkConfig) -> TwoModeNetwork:
    """Read, check and clean one two-mode network; raise DataError listing every error found."""
    checks = DataChecks()
    first, second = net.modes
    data_name = study.relative(net.data_file)
    nodes_name = study.relative(net.nodes) if net.nodes is not None else data_name
    header: list[str] = []
    node_rows: list[tuple[str | None, str, int, tuple[str, ...]]] = []
    has_mode = False
    node_unit = tie_unit = "line"
    if net.nodes is not None:
        header, node_rows, has_mode, node_unit = _read_nodes(net, net.nodes, nodes_name, checks)
    matrix_rows: list[tuple[str, int]] = []
    matrix_columns: list[str] = []
    if isinstance(net.data, EdgeListSource):
        read = _read_edge_list(net, net.data, data_name, checks)
        ties, tie_unit = read.raw(), read.unit
        weighted = net.data.weight is not None
        columns = (net.data.source, net.data.target)
    else:
        ties, matrix_rows, matrix_columns, weighted = _read_incidence(net, net.data, data_name,
                                                                      checks)
        columns = ("first column", "header row")
    checks.raise_if_errors()
    if not ties and not node_rows and not matrix_rows:
        raise DataError(Finding("error", data_name, "holds no ties and there is no node list, so "
                                "the network would be empty"))

    declared: dict[NodeKey, int] = {}
    if has_mode:
        declared = {(str(mode), node): line for mode, node, line, _ in node_rows}
        _refuse_wrong_side(ties, declared, net, data_name, nodes_name, columns, checks,
                           (node_unit, tie_unit))
        checks.raise_if_errors()

    in_ties = {first: {t.source for t in ties} | {r for r, _ in matrix_rows},
               second: {t.target for t in ties} | set(matrix_columns)}
    keys: set[NodeKey] = {(m, n) for m in (first, second) for n in in_ties[m]}
    attribute_rows: dict[NodeKey, tuple[str, ...]] = {}
    unplaced: list[tuple[str, int]] = []
    for mode, node, line, row in node_rows:
        if mode is not None:
            keys.add((mode, node))
            attribute_rows[(mode, node)] = row
            continue
        placed = [m for m in (first, second) if node in in_ties[m]]
        for m in placed:
            attribute_rows[(m, node)] = row
        if not placed:
            unplaced.append((node, line))
    if unplaced:
        shown = ", ".join(f"{n!r} ({node_unit} {line})"
                          for n, line in unplaced[:MAX_LINES_LISTED])
        checks.add(Finding(
            "warning", nodes_name, f"{count_of(len(unplaced), 'listed node')} appear in no tie, "
            f"and the node list has no {MODE_COLUMN!r} column to say whether each is a {first} "
            f"or a {second}; left out: {shown}. Add a {MODE_COLUMN!r} column to keep them",
            line=unplaced[0][1], value=unplaced[0][0], count=len(unplaced), unit=node_unit))
    if net.nodes is not None:
        unknown = sorted((k for k in keys if k not in attribute_rows),
                         key=lambda k: (k[0] != first, natural_key(k[1])))
        if unknown:
            shown = ", ".join(f"{n!r} ({m})" for m, n in unknown[:MAX_LINES_LISTED])
            checks.add(Finding("fix", data_name, f"{count_of(len(unknown), 'node')} appear in "
                               f"ties but not in the node list {nodes_name}; added with no "
                               f"attributes: {shown}", value=unknown[0][1], count=len(unknown)))

    ordered = sorted(keys, key=lambda k: (k[0] != first, natural_key(k[1])))
    for mode, other in ((first, second), (second, first)):
        if not any(k[0] == mode for k in ordered):
            where = ("the target column" if isinstance(net.data, EdgeListSource) else
                     "the header row") + (" or the node list" if net.nodes is not None else "")
            raise DataError(Finding(
                "error", data_name, f"names no {mode} node ({where} holds none), so the two-mode "
                f"network has one mode only and its projection onto {mode} would be empty; "
                f"give at least one {mode} node, or read the {other} nodes as a one-mode "
                "network without two_mode", line=1))
    label_column = net.label
    if label_column is None and "label" in header:
        label_column = "label"
    skip = {net.node_id, MODE_COLUMN if has_mode else None, label_column}
    attribute_names = [c for c in header if c not in skip]
    renamed = _renamed_attributes(attribute_names, header, nodes_name, checks)
    records = []
    for key in ordered:
        found = attribute_rows.get(key)
        values = {new: (found[header.index(old)] if found is not None else "")
                  for old, new in zip(attribute_names, renamed)}
        label = ""
        if found is not None and label_column is not None:
            label = found[header.index(label_column)].strip()
        records.append({"mode": key[0], "id": key[1], "label": label or key[1], **values})
    nodes = pd.DataFrame(records, columns=["mode", "id", "label", *renamed]).astype("string")

    edges = _combine(ties, net, data_name, weighted, checks, tie_unit)
    touched = ({(first, s) for s in edges["first"]} | {(second, t) for t in edges["second"]})
    isolates = [k for k in ordered if k not in touched]
    if isolates:
        shown = ", ".join(f"{n} ({m})" for m, n in isolates[:MAX_LINES_LISTED])
        checks.add(Finding("note", data_name, f"{count_of(len(isolates), 'node')} with no ties, "
                           f"kept in the network: {shown}", count=len(isolates)))
    files = tuple(p for p in (net.data_file, net.nodes) if p is not None)
    return TwoModeNetwork(net, nodes, edges, weighted, tuple(renamed), checks, files)


def _renamed_attributes(names: list[str], header: list[str], nodes_name: str,
                        checks: DataChecks) -> list[str]:
    reserved = set(RESERVED_COLUMNS) | set(TWO_MODE_COLUMNS)
    renamed = []
    for name in names:
        new = name
        if name in reserved:
            new = f"{name}_attribute"
            while new in header or new in renamed:
                new += "_"
            checks.add(Finding("fix", nodes_name, f"node attribute {name!r} shares its name with "
                               f"a column netfolio writes; it is kept as {new!r}", line=1,
                               column=name))
        renamed.append(new)
    return renamed


def _combine(ties: list[_RawTie], net: NetworkConfig, name: str, weighted: bool,
             checks: DataChecks, unit: str = "line") -> pd.DataFrame:
    """One row per (first, second) pair, repeated ties combined by ``duplicates``."""
    groups: dict[tuple[str, str], list[_RawTie]] = {}
    for tie in ties:
        groups.setdefault((tie.source, tie.target), []).append(tie)
    repeated = [g for g in groups.values() if len(g) > 1]
    if repeated:
        extra = sum(len(g) - 1 for g in repeated)
        lines = sorted(t.line for g in repeated for t in g)
        how = f"weights combined by {net.duplicates}" if weighted else "kept once"
        shown = ", ".join(str(n) for n in lines[:MAX_LINES_LISTED])
        checks.add(Finding("fix", name,
                           f"{count_of(extra, 'repeated tie')} merged, {how}; {unit}s {shown}",
                           line=lines[0], count=extra, unit=unit))
    pairs = sorted(groups, key=lambda p: (natural_key(p[0]), natural_key(p[1])))
    frame = pd.DataFrame({"first": pd.Series([p[0] for p in pairs], dtype=str),
                          "second": pd.Series([p[1] for p in pairs], dtype=str)})
    if weighted:
        combined = []
        for pair in pairs:
            weights = sorted(t.weight for t in groups[pair])
            combined.append(sum(weights) if net.duplicates == "sum" else
                            max(weights) if net.duplicates == "max" else
                            sum(weights) / len(weights))
        frame["weight"] = pd.Series(combined, dtype=float)
    result: pd.DataFrame = frame
    return result


def projection_findings(network: TwoModeNetwork, mode: str, *, tied: bool) -> list[Finding]:
    """What the checks page says of a projection onto ``mode``: how it was made, and a warning
    when no two of its nodes share a node of the other mode (``tied`` False)."""
    other = network.modes[1] if mode == network.modes[0] else network.modes[0]
    name = network.checks.findings[0].file if network.checks.findings else network.id
    how = (f"the number of {other} nodes they share" if network.config.projection == "shared"
           else f"the sum over the {other} nodes they share of 1/(k - 1), k being that "
           f"{other}'s number of ties (Newman 2001)")
    found = [Finding("note", name, f"projection of the two-mode network {network.id!r} onto "
                     f"its {mode} nodes: two {mode} nodes are tied when they share at least one "
                     f"{other}, the tie's weight is {how}")]
    if not tied:
        found.append(Finding("warning", name, f"no two {mode} nodes share a {other}, so the "
                             f"projection onto {mode} has no ties"))
    return found
