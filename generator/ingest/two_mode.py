"""Read a two-mode network (an edge list whose source values are one mode and target values the
other, or an incidence matrix with one mode in its rows and the other in its columns) into a
TwoModeNetwork, recording every fix and refusal.

Nodes are keyed by (mode, id): the same text may name a node of each mode without clashing."""

from __future__ import annotations

import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..config import EdgeListSource, MatrixSource, NetworkConfig, StudyConfig
from ..errors import DataError, Finding
from ..vocabulary import count_of
from .csvfile import Table, read_table
from .network import (
    MAX_LINES_LISTED,
    RESERVED_COLUMNS,
    DataChecks,
    _numbers,
    _read_edge_list,
    _Ties,
    _typed_attributes,
    first_places,
    natural_order,
    sorted_pairs,
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


def _text(values: list[str] | np.ndarray) -> np.ndarray:
    """An object array of str (empty when there are none)."""
    array = np.empty(len(values), dtype=object)
    array[:] = list(values)
    return array


def _first_lines(keys: np.ndarray, lines: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For rows keyed by ``keys`` (integers), whether each row repeats an earlier row's key, and
    the line of the first row with each row's key."""
    first, inverse = np.unique(keys, return_index=True, return_inverse=True)[1:]
    repeated = np.ones(len(keys), dtype=bool)
    repeated[first] = False
    return repeated, lines[first][inverse.reshape(-1)]


def _read_nodes(net: NetworkConfig, path: Path, name: str, checks: DataChecks
                ) -> tuple[Table, bool]:
    """The node list, each row naming one node, and whether it has a mode column. Refuses
    unknown modes, empty ids and ids repeated (within a mode, when there is a mode column)."""
    table = read_table(path, name, delimiter=net.delimiter, decimal=net.decimal)
    checks.findings += table.findings
    table.require(net.node_id, what="node list")
    if net.label is not None and net.label != net.node_id:
        table.require(net.label, what="node list")
    has_mode = MODE_COLUMN in table.header and MODE_COLUMN != net.node_id
    table.refuse_control_characters(net.node_id, net.label, MODE_COLUMN if has_mode else None)
    checks.findings += table.trimmed_findings(net.node_id)
    ids, unit = table.values(net.node_id), table.unit
    modes = table.values(MODE_COLUMN) if has_mode else np.full(len(table), "", dtype=object)
    second = modes == net.modes[1]
    bad_mode = ~(second | (modes == net.modes[0])) & has_mode
    # A row with an unknown mode is refused for that alone; neither it nor a row with no id is
    # the first of a repeated id.
    empty = (ids == "") & ~bad_mode
    named = ~(bad_mode | empty)
    codes = pd.factorize(ids)[0].astype(np.int64) * 2 + second
    repeated = np.zeros(len(table), dtype=bool)
    first_line = np.zeros(len(table), dtype=np.int64)
    repeated[named], first_line[named] = _first_lines(codes[named], table.lines[named])
    for i in np.flatnonzero(bad_mode | empty | repeated).tolist():  # the offending rows, in order
        line = int(table.lines[i])
        if bad_mode[i]:
            checks.add(Finding("error", name, f"mode must be {net.modes[0]!r} or "
                               f"{net.modes[1]!r} (the modes study.toml names)", line=line,
                               column=MODE_COLUMN, value=str(modes[i]), unit=unit))
        elif empty[i]:
            checks.add(Finding("error", name, "a node has an empty id", line=line,
                               column=net.node_id, unit=unit))
        else:
            where = f" as {_a(str(modes[i]))}" if has_mode else ""
            checks.add(Finding("error", name, f"node id is repeated{where} (first on {unit} "
                               f"{int(first_line[i])})", line=line, column=net.node_id,
                               value=str(ids[i]), unit=unit))
    checks.raise_if_errors()
    return table, has_mode


def _read_incidence(net: NetworkConfig, matrix: MatrixSource, name: str, checks: DataChecks
                    ) -> tuple[_Ties, np.ndarray, np.ndarray, bool]:
    """Rows are first-mode nodes, columns second-mode nodes; a cell is 0 (no tie) or the tie's
    weight. Returns the ties (row by row, as the file reads), the row ids, the column ids and
    whether any weight is other than 1."""
    table = read_table(matrix.path, name, delimiter=net.delimiter, row_labels=True)
    checks.findings += table.findings
    table.refuse_control_characters(*table.header)
    columns = list(table.header[1:])
    first_column = table.header[0] or "first column"
    seen: set[str] = set()
    for column in columns:
        if column == "":
            raise DataError(Finding("error", name, "a column of the incidence matrix has no id in "
                                    "the header row", line=1))
        if column in seen:
            raise DataError(Finding("error", name, "column id is repeated in the header row",
                                    line=1, column=column, value=column))
        seen.add(column)
    labels, lines = table.columns[0], table.lines
    no_id = labels == ""
    repeated = np.zeros(len(table), dtype=bool)
    first_line = np.zeros(len(table), dtype=np.int64)
    codes = pd.factorize(labels)[0].astype(np.int64)
    repeated[~no_id], first_line[~no_id] = _first_lines(codes[~no_id], lines[~no_id])
    good = ~(no_id | repeated)  # rows whose cells are read
    width = len(columns)
    cells = np.empty((len(table), width), dtype=object)  # rows in file order
    for j, values in enumerate(table.columns[1:]):
        cells[:, j] = values
    flat = cells.ravel()
    valid, numbers = _numbers(flat, net.decimal)
    read = ~(flat == "") & np.repeat(good, width)  # an empty cell is no tie
    with np.errstate(invalid="ignore"):
        not_number = read & (~valid | np.isnan(numbers))
        negative = read & ~not_number & (np.isinf(numbers) | (numbers < 0))
        tie = read & ~not_number & ~negative & (numbers != 0)
    # Errors in file order: a row's missing or repeated id, else its cells left to right; as
    # place i * (width + 1) + j, j = 0 for the id and 1 + the column's index for a cell.
    bad_row, bad_cell = np.divmod(np.flatnonzero(not_number | negative), max(width, 1))
    refused = np.concatenate([np.flatnonzero(~good) * (width + 1),
                              bad_row * (width + 1) + bad_cell + 1])
    for place in np.sort(refused).tolist():
        i, j = divmod(place, width + 1)
        line = int(lines[i])
        if j == 0 and no_id[i]:
            checks.add(Finding("error", name, "a row has no id in the first column", line=line,
                               column=first_column))
        elif j == 0:
            checks.add(Finding("error", name, f"row id is repeated (first on line "
                               f"{int(first_line[i])})", line=line, column=first_column,
                               value=str(labels[i])))
        else:
            k = i * width + j - 1
            checks.add(Finding(
                "error", name, "an incidence-matrix cell must be a number (0 for no tie, or the "
                "tie's weight)" if not_number[k] else "an incidence-matrix cell must be 0 or a "
                "positive number", line=line, column=columns[j - 1], value=str(flat[k])))
    checks.raise_if_errors()
    rows, cols = np.divmod(np.flatnonzero(tie), max(width, 1))
    ties = _Ties(labels[rows], _text(columns)[cols], numbers[tie].astype(np.float64),
                 lines[rows].astype(np.int64))
    weighted = bool((ties.weight != 1.0).any())
    return ties, labels[good], _text(columns), weighted


@dataclass(frozen=True, eq=False)
class _Side:
    """One mode's nodes in natural id order, and each tie's place among them."""

    mode: str
    ids: list[str]
    index: pd.Index  # of ids
    place: np.ndarray  # int64, per tie: the place of its node of this mode

    def __len__(self) -> int:
        return len(self.ids)


def _side(mode: str, ends: np.ndarray, more: list[np.ndarray]) -> tuple[_Side, np.ndarray,
                                                                        np.ndarray]:
    """The nodes of one mode: those at this end of the ties and those in ``more``. Also returns
    the distinct ids at this end, in order of first appearance, and each tie's code into them."""
    codes, distinct = pd.factorize(ends)
    distinct = _text(distinct)
    ids = natural_order(pd.unique(np.concatenate([distinct, *more])).tolist())
    index = pd.Index(ids, dtype=object)
    place = index.get_indexer(pd.Index(distinct, dtype=object))[codes].astype(np.int64)
    return _Side(mode, ids, index, place), distinct, codes


def _refuse_wrong_side(ties: _Ties, table: Table, net: NetworkConfig, data_name: str,
                       nodes_name: str, columns: tuple[str, str], ends: list[tuple[np.ndarray,
                                                                                   np.ndarray]],
                       checks: DataChecks) -> None:
    """With a ``mode`` column in the node list, an id listed only as one mode may not appear in
    the other mode's column. ``ends`` holds, for the source and the target ends of the ties, the
    distinct ids (in order of first appearance) and each tie's code into them."""
    first, second = net.modes
    node_unit, tie_unit = table.unit, ties.unit
    ids, modes = table.values(net.node_id), table.values(MODE_COLUMN)
    listed = {m: pd.Index(ids[modes == m], dtype=object) for m in (first, second)}
    listed_line = {m: table.lines[modes == m] for m in (first, second)}
    found: list[tuple[int, int, str, str, str, int]] = []  # (place, end, mode, other, id, line)
    for end, (mode, other) in enumerate(((first, second), (second, first))):
        distinct, codes = ends[end]
        as_other = listed[other].get_indexer(pd.Index(distinct, dtype=object))
        wrong = np.flatnonzero((as_other >= 0) & (listed[mode].get_indexer(
            pd.Index(distinct, dtype=object)) < 0))
        if not len(wrong):
            continue
        places = first_places(codes)[wrong]  # the first tie naming each
        found += [(place, end, mode, other, str(distinct[k]), int(listed_line[other][at]))
                  for place, k, at in zip(places.tolist(), wrong.tolist(),
                                          as_other[wrong].tolist())]
    for place, end, mode, other, node, declared in sorted(found):
        column = columns[end]
        in_header = column == "header row"  # an incidence matrix's column id
        checks.add(Finding(
            "error", data_name, f"node {node!r} is listed as {_a(other)} in {nodes_name} "
            f"({node_unit} {declared}) but appears in the {mode} column; in a "
            f"two-mode network the {column!r} column holds {mode} nodes only"
            if not in_header else
            f"node {node!r} is listed as {_a(other)} in {nodes_name} ({node_unit} "
            f"{declared}) but names a column of the incidence matrix, whose "
            f"columns are {mode} nodes", line=1 if in_header else int(ties.line[place]),
            column=node if in_header else column, value=node,
            unit="line" if in_header else tie_unit))


def read_two_mode(study: StudyConfig, net: NetworkConfig) -> TwoModeNetwork:
    """Read, check and clean one two-mode network; raise DataError listing every error found."""
    checks = DataChecks()
    first, second = net.modes
    data_name = study.relative(net.data_file)
    nodes_name = study.relative(net.nodes) if net.nodes is not None else data_name
    table: Table | None = None
    has_mode = False
    if net.nodes is not None:
        table, has_mode = _read_nodes(net, net.nodes, nodes_name, checks)
    row_ids = column_ids = _text([])
    if isinstance(net.data, EdgeListSource):
        ties = _read_edge_list(net, net.data, data_name, checks)
        weighted = net.data.weight is not None
        columns = (net.data.source, net.data.target)
    else:
        ties, row_ids, column_ids, weighted = _read_incidence(net, net.data, data_name, checks)
        columns = ("first column", "header row")
    checks.raise_if_errors()
    if not len(ties) and (table is None or not len(table)) and not len(row_ids):
        raise DataError(Finding("error", data_name, "holds no ties and there is no node list, so "
                                "the network would be empty"))
    node_ids = table.values(net.node_id) if table is not None else _text([])
    node_modes = table.values(MODE_COLUMN) if table is not None and has_mode else None

    # Each mode's nodes: those in ties (and matrix rows or columns with none), and those the
    # node list gives that mode.
    sides = []
    ends = []
    for mode, values, more in ((first, ties.source, row_ids), (second, ties.target, column_ids)):
        declared = [node_ids[node_modes == mode]] if node_modes is not None else []
        side, distinct, codes = _side(mode, values, [more, *declared])
        sides.append(side)
        ends.append((distinct, codes))
    if table is not None and has_mode:
        _refuse_wrong_side(ties, table, net, data_name, nodes_name, columns, ends, checks)
        checks.raise_if_errors()

    # The node-list row of each node (-1: none). Without a mode column, a listed id takes the
    # mode of the ties it is in (both, if it is in ties of each), or is left out.
    row_of = [np.full(len(side), -1, dtype=np.int64) for side in sides]
    node_unit = table.unit if table is not None else "line"
    if table is not None:
        at = [side.index.get_indexer(pd.Index(node_ids, dtype=object)) for side in sides]
        for k, side in enumerate(sides):
            rows = np.flatnonzero(at[k] >= 0 if node_modes is None else
                                  (node_modes == side.mode) & (at[k] >= 0))
            row_of[k][at[k][rows]] = rows
        if node_modes is None:
            unplaced = np.flatnonzero((at[0] < 0) & (at[1] < 0))
            if len(unplaced):
                shown = ", ".join(f"{n!r} ({node_unit} {line})" for n, line in zip(
                    node_ids[unplaced[:MAX_LINES_LISTED]].tolist(),
                    table.lines[unplaced[:MAX_LINES_LISTED]].tolist()))
                checks.add(Finding(
                    "warning", nodes_name, f"{count_of(len(unplaced), 'listed node')} appear in "
                    f"no tie, and the node list has no {MODE_COLUMN!r} column to say whether each "
                    f"is a {first} or a {second}; left out: {shown}. Add a {MODE_COLUMN!r} column "
                    "to keep them", line=int(table.lines[unplaced[0]]),
                    value=str(node_ids[unplaced[0]]), count=len(unplaced), unit=node_unit))
        unknown = [(side.mode, np.flatnonzero(rows < 0)) for side, rows in zip(sides, row_of)]
        total = sum(len(places) for _, places in unknown)
        if total:
            named = [(mode, sides[k].ids[i]) for k, (mode, places) in enumerate(unknown)
                     for i in places[:MAX_LINES_LISTED].tolist()][:MAX_LINES_LISTED]
            shown = ", ".join(f"{n!r} ({m})" for m, n in named)
            checks.add(Finding("fix", data_name, f"{count_of(total, 'node')} appear in "
                               f"ties but not in the node list {nodes_name}; added with no "
                               f"attributes: {shown}", value=named[0][1], count=total))

    for side, other in ((sides[0], second), (sides[1], first)):
        if not len(side):
            mode = side.mode
            where = ("the target column" if isinstance(net.data, EdgeListSource) else
                     "the header row") + (" or the node list" if net.nodes is not None else "")
            raise DataError(Finding(
                "error", data_name, f"names no {mode} node ({where} holds none), so the two-mode "
                f"network has one mode only and its projection onto {mode} would be empty; "
                f"give at least one {mode} node, or read the {other} nodes as a one-mode "
                "network without two_mode", line=1))
    header = list(table.header) if table is not None else []
    label_column = net.label
    if label_column is None and "label" in header:
        label_column = "label"
    skip = {net.node_id, MODE_COLUMN if has_mode else None, label_column}
    attribute_names = [c for c in header if c not in skip]
    renamed = _renamed_attributes(attribute_names, header, nodes_name, checks)
    nodes = _node_frame(sides, np.concatenate(row_of), table, label_column,
                        dict(zip(renamed, attribute_names)))

    edges, touched = _combine(ties, sides, net, data_name, weighted, checks)
    isolates = [(side.mode, side.ids[i]) for side, hit in zip(sides, touched)
                for i in np.flatnonzero(~hit)[:MAX_LINES_LISTED].tolist()]
    count = int(sum((~hit).sum() for hit in touched))
    if count:
        shown = ", ".join(f"{n} ({m})" for m, n in isolates[:MAX_LINES_LISTED])
        checks.add(Finding("note", data_name, f"{count_of(count, 'node')} with no ties, "
                           f"kept in the network: {shown}", count=count))
    files = tuple(p for p in (net.data_file, net.nodes) if p is not None)
    return TwoModeNetwork(net, nodes, edges, weighted, tuple(renamed), checks, files)


def _node_frame(sides: list[_Side], row_of: np.ndarray, table: Table | None,
                label_column: str | None, attributes: dict[str, str]) -> pd.DataFrame:
    """One row per node, first-mode nodes then second-mode nodes: mode, id, label (the label
    column's text, or the id where it is empty or there is none) and each attribute's text
    ("" where the node has no node-list row). ``row_of`` is each node's row in ``table``, or
    -1."""
    ids = _text([node for side in sides for node in side.ids])
    modes = np.repeat(_text([side.mode for side in sides]), [len(side) for side in sides])

    def cells(column: str) -> np.ndarray:
        assert table is not None
        values = np.append(table.values(column), "")  # the last: for nodes with no row
        return values[np.where(row_of >= 0, row_of, len(values) - 1)]

    labels = ids
    if table is not None and label_column is not None:
        written = pd.Series(cells(label_column), dtype=object).str.strip().to_numpy(dtype=object)
        labels = np.where(written == "", ids, written)
    frame = pd.DataFrame({"mode": modes, "id": ids, "label": labels,
                          **{new: cells(old) for new, old in attributes.items()}},
                         columns=["mode", "id", "label", *attributes])
    typed: pd.DataFrame = frame.astype("string")
    return typed


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


COMPENSATED_SUM = sys.version_info >= (3, 12)  # Python's sum of floats compensates from 3.12


def _python_sums(values: np.ndarray, starts: np.ndarray, *,
                 compensated: bool = COMPENSATED_SUM) -> np.ndarray:
    """``sum(values[start:end])`` of each run of ``values`` (runs given by where each starts,
    in order), float for float as Python's built-in ``sum`` adds: one value after another from
    0, and from Python 3.12 with Neumaier's compensation (Neumaier 1974, "Rundungsfehleranalyse
    einiger Verfahren zur Summation endlicher Summen"). The k-th values of all runs are added
    at once, so this takes as many steps as the longest run has values."""
    sizes = np.diff(np.append(starts, len(values)))
    by_size = np.argsort(-sizes, kind="stable")  # the runs still adding form a prefix
    starts, sizes = starts[by_size], sizes[by_size]
    total = np.zeros(len(starts))
    compensation = np.zeros(len(starts))
    with np.errstate(over="ignore", invalid="ignore"):  # a sum may overflow, as Python's does
        for k in range(int(sizes[0]) if len(sizes) else 0):
            m = int(np.searchsorted(-sizes, -k, side="left"))  # runs of more than k values
            x = values[starts[:m] + k]
            if compensated:
                before = total[:m].copy()
                total[:m] = before + x
                compensation[:m] += np.where(np.abs(before) >= np.abs(x),
                                             (before - total[:m]) + x, (x - total[:m]) + before)
            else:
                total[:m] += x
        if compensated:
            total = np.where((compensation != 0) & np.isfinite(compensation),
                             total + compensation, total)
    sums = np.empty(len(starts))
    sums[by_size] = total
    return sums


def _combine(ties: _Ties, sides: list[_Side], net: NetworkConfig, name: str, weighted: bool,
             checks: DataChecks) -> tuple[pd.DataFrame, list[np.ndarray]]:
    """One row per (first, second) pair in node order, repeated ties combined by
    ``duplicates`` over their weights in ascending order; and for each mode's nodes whether a
    tie touches them."""
    unit = ties.unit
    a, b = sides[0].place, sides[1].place
    pair = a * max(len(sides[1]), 1) + b  # sorts as (first's place, second's place)
    ordered, first, repeat = sorted_pairs(pair, ties.weight)
    if repeat.any():
        extra = int(repeat.sum() - (first & repeat).sum())
        lines = np.sort(ties.line[ordered[repeat]])
        how = f"weights combined by {net.duplicates}" if weighted else "kept once"
        shown = ", ".join(str(n) for n in lines[:MAX_LINES_LISTED].tolist())
        checks.add(Finding("fix", name,
                           f"{count_of(extra, 'repeated tie')} merged, {how}; {unit}s {shown}",
                           line=int(lines[0]), count=extra, unit=unit))
    kept = ordered[first]
    first_names, second_names = _text(sides[0].ids), _text(sides[1].ids)
    frame = pd.DataFrame({"first": pd.Series(first_names[a[kept]], dtype=str),
                          "second": pd.Series(second_names[b[kept]], dtype=str)})
    if weighted:
        combined = ties.weight[kept].astype(np.float64)  # a pair listed once keeps its weight
        if repeat.any():
            weights = ties.weight[ordered[repeat]]  # ascending within each pair
            starts = np.flatnonzero(first[repeat])
            if net.duplicates == "max":
                merged = weights[np.append(starts[1:], len(weights)) - 1]
            else:
                merged = _python_sums(weights, starts)
                if net.duplicates == "mean":
                    merged = merged / np.diff(np.append(starts, len(weights)))
            combined[repeat[first]] = merged
        frame["weight"] = pd.Series(combined, dtype=float)
    touched = [np.zeros(len(side), dtype=bool) for side in sides]
    touched[0][a] = True
    touched[1][b] = True
    return frame, touched


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
