"""Turn one [[network]]'s files into a CleanNetwork, recording every fix and refusal."""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path

import numpy as np
import pandas as pd

from ..config import (
    EdgeListSource,
    MatrixSource,
    NetworkConfig,
    StudyConfig,
    network_setting_error,
)
from ..errors import DataError, Finding
from ..vocabulary import MEASURE_NAMES, count_of
from .csvfile import Table, read_table

__all__ = ["CleanNetwork", "DataChecks", "natural_key", "natural_order", "read_network"]

MAX_LINES_LISTED = 20  # a finding lists at most this many line numbers


NaturalKey = tuple[tuple[tuple[int, int, str], ...], str]


def natural_key(text: str) -> NaturalKey:
    """Sort "s2" before "s10": digits compare as numbers, the rest as text.

    The text itself breaks ties ("a1" and "a01"), so the order is total and the same in every
    process."""
    parts = tuple([(0, int(part), "") if part.isdigit() else (1, 0, part)
                   for part in _DIGITS.split(text) if part != ""])
    return (parts, text)


_DIGITS = re.compile(r"(\d+)")
_TEXT_THEN_NUMBER = re.compile(r"(\D*)(\d{0,18})")


def natural_order(ids: list[str]) -> list[str]:
    """``sorted(ids, key=natural_key)``, fast when every id is text followed by a number of at
    most 18 digits ("s01", "p12345", "007", "north"), as ids mostly are: then the natural key
    is (text, number, the id itself), with no text sorting first and no number before any
    number, which numpy sorts at once."""
    matches = [_TEXT_THEN_NUMBER.fullmatch(i) for i in ids]
    if not all(matches):
        return sorted(ids, key=natural_key)
    texts = np.empty(len(ids), dtype=object)
    texts[:] = [m.group(1) for m in matches if m]
    digits = [m.group(2) for m in matches if m]
    numbers = np.array([int(d) if d else -1 for d in digits], dtype=np.int64)
    whole = np.empty(len(ids), dtype=object)
    whole[:] = ids
    text_rank = np.unique(texts, return_inverse=True)[1] if len(ids) else texts
    id_rank = np.unique(whole, return_inverse=True)[1] if len(ids) else whole
    # A key's first part is (1, 0, text) when there is text, else (0, number, ""); a missing
    # number (-1) sorts before every number, as a shorter key does.
    order = np.lexsort((id_rank, numbers, text_rank, texts != ""))
    return [ids[i] for i in order.tolist()]


@dataclass
class DataChecks:
    """Every fix and refusal made while reading one network, in the order found."""

    findings: list[Finding] = field(default_factory=list)

    def add(self, finding: Finding) -> None:
        self.findings.append(finding)

    @property
    def errors(self) -> list[Finding]:
        return [f for f in self.findings if f.level == "error"]

    def raise_if_errors(self) -> None:
        if self.errors:
            raise DataError(self.errors)


@dataclass(frozen=True)
class CleanNetwork:
    """A network ready for analysis.

    ``nodes`` is indexed by node id (text), sorted naturally, with a ``label`` column and the node
    attributes (numbers where a column holds only numbers). ``edges`` has ``source``, ``target``
    and, when weighted, ``weight`` (as written, before strength/length conversion), sorted by node
    order. Undirected ties are stored with source before target in node order.
    """

    config: NetworkConfig
    nodes: pd.DataFrame
    edges: pd.DataFrame
    weighted: bool
    attributes: tuple[str, ...]
    checks: DataChecks
    files: tuple[Path, ...]
    listed: int | None = None  # nodes in the node list; None when there is none

    @property
    def id(self) -> str:
        return self.config.id

    @property
    def directed(self) -> bool:
        return self.config.directed


# Plain decimal numbers only: Python's float() would also take "1_000" and non-Latin digits.
_NUMBER = re.compile(r"[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([eE][+-]?[0-9]+)?")
_SPECIAL = {"inf", "+inf", "-inf", "infinity", "+infinity", "-infinity", "nan"}
_PLAIN_DIGITS = re.compile(r"[0-9.eE+-]*")


def _number(text: str, decimal: str = ".") -> float | None:
    if decimal == ",":
        if "." in text:  # with a decimal comma, "1.5" is ambiguous (a thousands mark?): refuse
            return None
        text = text.replace(",", ".")
    if _NUMBER.fullmatch(text) or text.lower() in _SPECIAL:
        return float(text)
    return None


def _numbers(values: np.ndarray, decimal: str = ".") -> tuple[np.ndarray, np.ndarray]:
    """``_number`` of every value at once: whether each is a number, and its value (NaN where it
    is not). Each distinct text is read once, so a column of repeated weights costs little."""
    if decimal == "." and len(values) and _PLAIN_DIGITS.fullmatch("".join(values.tolist())):
        # Only digits, '.', 'e', 'E', '+' and '-': for such text Python's float() takes exactly
        # what _NUMBER matches (no spaces, underscores, inf or nan can be spelled), so one
        # conversion of the whole column decides, unless some value is not a number.
        try:
            numbers = values.astype(np.float64)
        except ValueError:
            pass
        else:
            return np.ones(len(values), dtype=bool), numbers
    codes, distinct = pd.factorize(values)
    texts = [str(v) for v in distinct]
    if decimal == ",":
        valid = np.fromiter(("." not in t for t in texts), bool, len(texts))
        texts = [t.replace(",", ".") for t in texts]
    else:
        valid = np.ones(len(texts), dtype=bool)
    valid &= np.fromiter((_NUMBER.fullmatch(t) is not None or t.lower() in _SPECIAL
                          for t in texts), bool, len(texts))
    numbers = np.full(len(texts), np.nan)
    if valid.any():
        chosen = np.empty(int(valid.sum()), dtype=object)
        chosen[:] = [t for t, ok in zip(texts, valid) if ok]
        numbers[valid] = chosen.astype(np.float64)  # Python's float() of each text
    return valid[codes], numbers[codes]




def _lines(lines: list[int]) -> str:
    shown = ", ".join(str(n) for n in lines[:MAX_LINES_LISTED])
    more = len(lines) - MAX_LINES_LISTED
    return shown + (f" and {more} more" if more > 0 else "")


# ---------------------------------------------------------------------------------------------
# Node list


def _read_node_list(net: NetworkConfig, path: Path, name: str, checks: DataChecks
                    ) -> tuple[pd.DataFrame, dict[str, int], str]:
    """The node list indexed by id (all text, file order), the line of each id, and whether the
    file counts lines or rows."""
    table = read_table(path, name, delimiter=net.delimiter, decimal=net.decimal)
    checks.findings += table.findings
    table.require(net.node_id, what="node list")
    if net.label is not None and net.label != net.node_id:
        table.require(net.label, what="node list")
    table.refuse_control_characters(net.node_id, net.label)
    checks.findings += table.trimmed_findings(net.node_id)
    ids = table.values(net.node_id)
    empty = ids == ""
    repeated = pd.Series(ids).duplicated(keep="first").to_numpy() & ~empty
    firsts = ~(empty | repeated)
    first_line = dict(zip(ids[firsts].tolist(), table.lines[firsts].tolist()))
    for i in np.flatnonzero(empty | repeated):  # only the offending rows, in file order
        line = int(table.lines[i])
        if empty[i]:
            checks.add(Finding("error", name, "a node has an empty id", line=line,
                               column=net.node_id, unit=table.unit))
        else:
            checks.add(Finding("error", name, f"node id is repeated (first on {table.unit} "
                               f"{first_line[ids[i]]})", line=line, column=net.node_id,
                               value=ids[i], unit=table.unit))
    checks.raise_if_errors()
    frame = pd.DataFrame(dict(zip(table.header, table.columns)), columns=list(table.header),
                         dtype="string")
    frame = frame.set_index(net.node_id)
    frame.index = frame.index.astype(str)
    frame.index.name = "id"
    return frame, first_line, table.unit


_CANONICAL_NUMBER = r"-?(0|[1-9][0-9]*)(\.[0-9]+)?"


def _typed_attributes(frame: pd.DataFrame, decimal: str = ".") -> pd.DataFrame:
    """Empty cells become missing; a column whose filled cells are all numbers becomes numeric."""
    typed: dict[str, pd.Series] = {}
    pattern = _CANONICAL_NUMBER if decimal == "." else _CANONICAL_NUMBER.replace("\\.", ",")
    for column in frame.columns:
        text = frame[column].astype("string").str.strip().replace({"": pd.NA})
        filled = text.dropna()
        # "01234" is a code, not a number: only columns of plainly written numbers become numeric.
        canonical = filled.str.fullmatch(pattern).all() if len(filled) else False
        plain = text.str.replace(",", ".", regex=False) if decimal == "," and canonical else text
        numbers = pd.to_numeric(plain, errors="coerce") if canonical else text
        if canonical and numbers.notna().sum() == text.notna().sum():
            all_whole = ((numbers.dropna() % 1) == 0).all()
            typed[column] = numbers.astype("Int64") if all_whole else numbers.astype("Float64")
        else:
            typed[column] = text
    result: pd.DataFrame = pd.DataFrame(typed, index=frame.index)
    return result


def _declared_types(attrs: pd.DataFrame, raw: pd.DataFrame, net: NetworkConfig, name: str,
                    lines: dict[str, int], label_column: str | None, checks: DataChecks,
                    study: StudyConfig, unit: str = "line") -> pd.DataFrame:
    """Apply study.toml's ``categorical`` and ``numeric`` declarations: a categorical column
    keeps its values as text (codes 0-3 are four groups, not a scale); every filled cell of a
    numeric one must be a number. Raises DataError naming file, line, column and value, or
    ConfigError naming the study.toml key that declares a column the node list lacks."""
    columns = [c for c in attrs.columns if c != label_column]
    for declared, kind in ((net.categorical, "categorical"), (net.numeric, "numeric")):
        for column in declared:
            if column not in columns:
                listed = ", ".join(repr(c) for c in columns) or "none"
                where = (f"the node list {name}" if net.nodes is not None
                         else "this network (it has no node list)")
                raise network_setting_error(study, net.id, kind, f"{column!r} is not a node "
                                            f"attribute of {where} (attribute columns: "
                                            f"{listed})")
    typed: pd.DataFrame = attrs.copy()
    for column in net.categorical:
        typed[column] = raw[column].astype("string").str.strip().replace({"": pd.NA})
    for column in net.numeric:
        text = raw[column].astype("string").str.strip().replace({"": pd.NA})
        present = text.notna().to_numpy()
        cells = text.to_numpy(dtype=object, na_value="")
        valid, numbers = _numbers(cells, net.decimal)
        for i in np.flatnonzero(present & ~(valid & np.isfinite(numbers))):
            checks.add(Finding("error", name, f"numeric = [...] in study.toml declares "
                               f"{column!r} numeric, but this value is not a number",
                               line=lines.get(str(text.index[int(i)])), column=column,
                               value=str(cells[i]), unit=unit))
        checks.raise_if_errors()
        filled = np.where(present, numbers, 0.0)
        whole = bool(np.all(filled % 1 == 0))
        typed[column] = pd.Series(pd.arrays.FloatingArray(filled, ~present),
                                  index=typed.index).astype("Int64" if whole else "Float64")
    return typed


# ---------------------------------------------------------------------------------------------
# Edge list and matrix


@dataclass(frozen=True, eq=False)
class _Ties:
    """Ties as read, column by column in file order: ids, weight (1 when unweighted) and the line
    (or, for Parquet, the row) of each."""

    source: np.ndarray  # object arrays of str
    target: np.ndarray
    weight: np.ndarray  # float64
    line: np.ndarray  # int64
    unit: str = "line"

    def __len__(self) -> int:
        return len(self.line)


def _check_weight(text: str, net: NetworkConfig, name: str, line: int, column: str,
                  checks: DataChecks, unit: str = "line") -> float | None:
    if text == "":
        checks.add(Finding("error", name, "weight is missing", line=line, column=column,
                           value=text, unit=unit))
        return None
    value = _number(text, net.decimal)
    if value is None or math.isnan(value):
        mark = ("; decimal = \",\" is set, so write 2,5 (not 2.5)" if net.decimal == "," else
                "; this looks like a decimal comma: set decimal = \",\" (and delimiter = \";\") "
                "in this network's table of study.toml" if re.fullmatch(r"[0-9]+,[0-9]+", text) else "")
        checks.add(Finding("error", name, f"weight is not a number{mark}", line=line,
                           column=column, value=text, unit=unit))
    elif math.isinf(value):
        checks.add(Finding("error", name, "weight is infinite", line=line, column=column,
                           value=text, unit=unit))
    elif value < 0:
        checks.add(Finding("error", name, "weight is negative; netfolio reads weights as tie "
                           "strengths or distances, which cannot be below 0", line=line,
                           column=column, value=text, unit=unit))
    else:
        return value
    return None


def _note_unused_columns(table: Table, used: list[str], net: NetworkConfig, name: str,
                         checks: DataChecks) -> None:
    """Name the edge-list columns the analysis does not read, so a forgotten ``weight`` key (or a
    column the analyst expected to matter) does not pass unnoticed."""
    unused = [c for c in table.header if c not in used]
    if not unused:
        return
    listed = ", ".join(repr(c) for c in unused)
    message = (f"{'column' if len(unused) == 1 else 'columns'} {listed} "
               f"{'is' if len(unused) == 1 else 'are'} not used by the analysis")
    if net.weight is None:
        numeric = [c for c in unused if _all_numbers(table.values(c), net.decimal)]
        if numeric:
            message += (f"; the network is read as unweighted because study.toml sets no "
                        f"'weight' key: to use {numeric[0]!r} as tie weights, set "
                        f"weight = \"{numeric[0]}\"")
    checks.add(Finding("note", name, message, line=1 if table.unit == "line" else None,
                       column=unused[0], count=len(unused)))


def _all_numbers(values: np.ndarray, decimal: str) -> bool:
    filled = values[values != ""]
    return bool(len(filled)) and bool(_numbers(filled, decimal)[0].all())


def _read_edge_list(net: NetworkConfig, edge_list: EdgeListSource, name: str, checks: DataChecks
                    ) -> _Ties:
    table = read_table(edge_list.path, name, delimiter=net.delimiter,
                       decimal=net.decimal)
    checks.findings += table.findings
    columns = [edge_list.source, edge_list.target] + ([edge_list.weight] if edge_list.weight else [])
    table.require(*columns, what="edge list")
    _note_unused_columns(table, columns, net, name, checks)
    table.refuse_control_characters(*columns)
    checks.findings += table.trimmed_findings(edge_list.source, edge_list.target)
    unit = table.unit
    source, target = table.values(edge_list.source), table.values(edge_list.target)
    weight_column = edge_list.weight
    texts = [source, target] + ([table.values(weight_column)] if weight_column else [])
    for k in range(min(HEADER_LIKE_ROWS, len(table))):
        code = next((i for i, values in enumerate(texts) if _IMPORT_CODE.match(values[k])), None)
        if code is not None:
            line = int(table.lines[k])
            raise DataError(Finding(
                "error", name, f"{unit} {line} does not look like a tie: column "
                f"{columns[code]!r} holds {texts[code][k]!r}, which looks like an import code. "
                "Survey tools often export extra header rows (question text, import codes) under "
                f"the column names; delete {_span(int(table.lines[0]), line, unit)} and build "
                "again", line=line, column=columns[code], value=texts[code][k], unit=unit))
    no_source, no_target = source == "", target == ""
    weights = np.ones(len(table), dtype=np.float64)
    refused = np.zeros(len(table), dtype=bool)
    if weight_column is not None:
        written = table.values(weight_column)
        valid, weights = _numbers(written, net.decimal)
        with np.errstate(invalid="ignore"):
            refused = ~valid | ~np.isfinite(weights) | (weights <= 0)
    for i in np.flatnonzero(no_source | no_target | refused):  # the offending rows, in order
        line = int(table.lines[i])
        for column, missing in ((edge_list.source, no_source[i]), (edge_list.target, no_target[i])):
            if missing:
                checks.add(Finding("error", name, "a tie has an empty node id", line=line,
                                   column=column, value="", unit=unit))
        if weight_column is not None and refused[i]:
            cell = str(written[i])
            if _check_weight(cell, net, name, line, weight_column, checks, unit) == 0:
                checks.add(Finding("error", name, _zero_weight_reason(net), line=line,
                                   column=weight_column, value=cell, unit=unit))
    keep = ~(no_source | no_target | refused)
    return _Ties(source[keep], target[keep], weights[keep], table.lines[keep], unit)


def _zero_weight_reason(net: NetworkConfig) -> str:
    if net.weight_means == "strength":
        return ("weight is 0: as a tie strength it would become an infinite path length; "
                "remove the row if there is no tie")
    return ("weight is 0: as a distance it would make the tie infinitely strong; "
            "remove the row or give a positive distance")


def _read_matrix(net: NetworkConfig, matrix: MatrixSource, name: str, checks: DataChecks
                 ) -> tuple[_Ties, list[str], bool]:
    """Rows are senders (source), columns receivers (target); a cell is the tie's weight."""
    table = read_table(matrix.path, name, delimiter=net.delimiter, row_labels=True)
    checks.findings += table.findings
    table.refuse_control_characters(*table.header)
    col_labels = list(table.header[1:])
    row_labels = table.columns[0].tolist()
    if sorted(row_labels) != sorted(col_labels):
        only_rows = sorted(set(row_labels) - set(col_labels))
        only_cols = sorted(set(col_labels) - set(row_labels))
        repeated = next((label for i, label in enumerate(row_labels)
                         if label in row_labels[:i]), None)
        odd = (f"row label {only_rows[0]!r} has no column" if only_rows
               else f"column label {only_cols[0]!r} has no row" if only_cols
               else f"row label {repeated!r} is repeated")
        # A row's label is on that row's line; a column's on the header line.
        where = (int(table.lines[row_labels.index(only_rows[0])]) if only_rows
                 else int(table.lines[len(row_labels) - 1 - row_labels[::-1].index(repeated)])
                 if not only_cols and repeated is not None else 1)
        raise DataError(Finding("error", name, "an adjacency matrix needs the same labels in its "
                                f"header row and first column: {odd}", line=where,
                                value=only_rows[0] if only_rows else only_cols[0] if only_cols
                                else repeated))
    n = len(col_labels)
    cells = np.empty((len(row_labels), n), dtype=object)  # rows in file order, columns in header order
    for j, column in enumerate(table.columns[1:]):
        cells[:, j] = column
    flat = cells.ravel()
    valid, numbers = _numbers(flat, net.decimal)
    blank = flat == ""
    with np.errstate(invalid="ignore"):
        refused = ~blank & (~valid | ~np.isfinite(numbers) | (numbers < 0))
    for k in np.flatnonzero(refused):  # row by row, as the file reads
        i, j = divmod(int(k), n)
        _check_weight(str(flat[k]), net, name, int(table.lines[i]), col_labels[j], checks)
    checks.raise_if_errors()
    values = np.where(blank, 0.0, numbers).reshape(len(row_labels), n)
    position = {label: j for j, label in enumerate(col_labels)}
    row_position = np.array([position[label] for label in row_labels], dtype=np.int64)
    if not net.directed:
        # values[i, j] is row label i to column label j; the mirror cell is row label j's row
        # at the column of row label i.
        mirror = values[np.argsort(row_position)][:, row_position].T
        asymmetric = np.flatnonzero((values != mirror).ravel())
        if len(asymmetric):
            i, j = divmod(int(asymmetric[0]), n)
            a, b = values[i, j], mirror[i, j]
            row_label, col_label = row_labels[i], col_labels[j]
            raise DataError(Finding(
                "error", name, f"the network is undirected but the matrix is not symmetric: "
                f"row {row_label!r} column {col_label!r} holds {a:g}, row {col_label!r} "
                f"column {row_label!r} holds {b:g}", line=int(table.lines[i]),
                column=col_label, value=f"{a:g}"))
    weighted = bool(((values != 0.0) & (values != 1.0)).any())
    keep = values != 0
    if not net.directed:  # one of each pair: the cell whose row label comes first in node order
        rank = np.empty(n, dtype=np.int64)
        rank[sorted(range(n), key=lambda j: natural_key(col_labels[j]))] = np.arange(n)
        keep &= rank[row_position][:, None] <= rank[None, :]
    rows, cols = np.nonzero(keep)  # row-major: the file's order
    labels = np.empty(n, dtype=object)
    labels[:] = col_labels
    ties = _Ties(labels[row_position[rows]], labels[cols], values[rows, cols],
                 table.lines[rows].astype(np.int64))
    return ties, row_labels, weighted


# ---------------------------------------------------------------------------------------------
# Cleaning


_COMBINE = {"sum": "sum", "mean": "mean", "max": "max"}


def _combine_distances(weights: pd.Series) -> float:
    """Repeated distance ties add their strengths (1/distance): two ties of distance 2 make one
    of distance 1, so repeating a tie never makes it weaker. Exact fractions, so the result does
    not depend on the order of rows."""
    return float(1 / sum(1 / Fraction(float(w)) for w in weights))


def _combine_rule(net: NetworkConfig) -> str:
    if net.duplicates == "sum" and net.weight_means == "distance":
        return "adding their strengths (1/distance), so distances 2 and 2 become 1"
    return net.duplicates


def _plural(unit: str, count: int) -> str:
    return unit if count == 1 else unit + "s"


def _mirrored_listing(kept: np.ndarray, a: np.ndarray, b: np.ndarray, ties: _Ties,
                      net: NetworkConfig, name: str, weighted: bool, checks: DataChecks
                      ) -> np.ndarray:
    """Undirected ties that many tools export twice (a,b and b,a with the same weight).

    When every pair is listed exactly so, each pair is read as one tie; summing both rows would
    double every strength. When only some pairs are, ``duplicates`` applies and a warning counts
    them. ``kept`` are the positions of the ties (no self-loops), ``a`` and ``b`` their nodes'
    places in node order; returns the positions to keep."""
    if not len(kept):
        return kept
    low, high = np.minimum(a, b), np.maximum(a, b)
    group, pairs = pd.factorize(low * (int(max(a.max(), b.max())) + 1) + high)
    count = np.bincount(group, minlength=len(pairs))
    forward = np.bincount(group[a < b], minlength=len(pairs))
    both = (forward > 0) & (forward < count)
    if not both.any():
        return kept
    unit = ties.unit
    lines = ties.line[kept]
    if (count == 2).all() and both.all():
        ordered = np.argsort(group, kind="stable")  # the two ties of each pair side by side
        weights = ties.weight[kept][ordered]
        mirrored = bool((weights[0::2] == weights[1::2]).all())
    else:
        mirrored = False
    if mirrored:
        checks.add(Finding(
            "fix", name, f"every tie is listed twice, once in each direction and with the same "
            f"weight ({count_of(len(pairs), 'pair', 'pairs')}), as many tools export undirected "
            "networks; each pair was read as one tie, so strengths are not doubled",
            line=int(lines.min()), count=len(pairs), unit=unit))
        first = np.unique(group, return_index=True)[1]  # ties are in file order
        return kept[np.sort(first)]
    if weighted:
        example = int(group[np.flatnonzero(both[group])[0]])
        one, other = kept[np.flatnonzero(group == example)[:2]]
        checks.add(Finding(
            "warning", name, f"{count_of(int(both.sum()), 'pair is', 'pairs are')} listed in both "
            f"directions (such as {ties.source[one]!r},{ties.target[one]!r} on {unit} "
            f"{ties.line[one]} and {ties.source[other]!r},{ties.target[other]!r} on {unit} "
            f"{ties.line[other]}) but not every pair is; in this undirected network both rows "
            f"are one tie, so their weights were combined by {_combine_rule(net)}. If the file "
            "lists some ties twice by mistake, remove one row of each", line=int(ties.line[one]),
            count=int(both.sum()), unit=unit))
    return kept


def sorted_pairs(pair: np.ndarray, weight: np.ndarray
                 ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The order that puts ties (given in file order) by pair, and within a pair listed more
    than once by weight, so that combining repeated ties does not depend on the order of rows
    in the file; both sorts are stable, so equal ties stay in file order. ``pair`` codes each
    tie's pair as an integer that sorts as the pairs should. Returns the order, and for each
    tie in that order whether it is its pair's first (``first``) and whether its pair is listed
    more than once (``repeat``)."""
    ordered = np.argsort(pair, kind="stable")
    same = pair[ordered][1:] == pair[ordered][:-1]  # a tie and the next are one pair
    repeat = np.zeros(len(pair), dtype=bool)
    repeat[1:] |= same
    repeat[:-1] |= same
    if repeat.any():  # only pairs listed more than once need the second sort
        group = ordered[repeat]
        ordered[repeat] = group[np.lexsort((weight[group], pair[group]))]
    first = np.ones(len(pair), dtype=bool)
    first[1:] = ~same
    return ordered, first, repeat


def first_places(codes: np.ndarray) -> np.ndarray:
    """Where each code first appears, for codes numbered in order of first appearance (as
    ``pd.factorize`` numbers them): a code's first place is where the running maximum of the
    codes reaches it."""
    return np.flatnonzero(np.diff(np.maximum.accumulate(codes), prepend=-1) > 0)


def _clean_ties(ties: _Ties, a_all: np.ndarray, b_all: np.ndarray, net: NetworkConfig, name: str,
                order: list[str], weighted: bool, checks: DataChecks
                ) -> tuple[pd.DataFrame, np.ndarray]:
    """The edges frame, and for every node (in ``order``) whether a tie touches it. ``a_all``
    and ``b_all`` are the places in ``order`` of each tie's source and target."""
    unit = ties.unit
    loops = np.flatnonzero(a_all == b_all)
    if len(loops):
        lines = ties.line[loops].tolist()
        checks.add(Finding("fix", name, f"{count_of(len(loops), 'self-loop')} removed (a tie "
                           f"from a node to itself) on {_plural(unit, len(loops))} "
                           f"{_lines(lines)}", line=lines[0] if len(loops) == 1 else None,
                           value=ties.source[loops[0]], count=len(loops), unit=unit))
    kept = np.flatnonzero(a_all != b_all)
    if not net.directed:
        kept = _mirrored_listing(kept, a_all[kept], b_all[kept], ties, net, name, weighted,
                                 checks)
    a, b = a_all[kept], b_all[kept]
    if not net.directed:
        a, b = np.minimum(a, b), np.maximum(a, b)
    weight, line = ties.weight[kept], ties.line[kept]
    pair = a.astype(np.int64) * max(len(order), 1) + b
    ordered, first, repeat = sorted_pairs(pair, weight)
    frame = pd.DataFrame({"a": a[ordered], "b": b[ordered], "weight": weight[ordered],
                          "line": line[ordered]}, index=ordered)
    repeated = frame[repeat]
    if len(repeated):
        extra = len(repeated) - repeated[["a", "b"]].drop_duplicates().shape[0]
        how = f"weights combined by {_combine_rule(net)}" if weighted else "kept once"
        what = "ties" if net.directed else "ties (either direction, as the network is undirected)"
        lines = sorted(repeated["line"].tolist())
        checks.add(Finding("fix", name, f"{extra} repeated {what} merged, {how}; {unit}s "
                           f"{_lines(lines)}", line=lines[0], count=extra, unit=unit))
    # One row per pair: its first row, with the combined weight where the pair is repeated (a
    # pair listed once keeps its weight, which is its sum, mean and max).
    merged = frame.loc[first, ["a", "b", "weight"]].reset_index(drop=True)
    if len(repeated):
        if weighted and net.duplicates == "sum" and net.weight_means == "distance":
            combined = repeated.groupby(["a", "b"], sort=True)["weight"].agg(_combine_distances)
        else:
            combined = repeated.groupby(["a", "b"], sort=True)["weight"].agg(
                _COMBINE[net.duplicates])
        merged.loc[repeat[first], "weight"] = combined.to_numpy(dtype=np.float64)
    names = pd.array(order, dtype=str)
    sources = merged["a"].to_numpy(dtype=np.int64)
    targets = merged["b"].to_numpy(dtype=np.int64)
    edges = pd.DataFrame({
        "source": pd.Series(names.take(sources)),
        "target": pd.Series(names.take(targets)),
    })
    if weighted:
        edges["weight"] = merged["weight"].astype(float).to_numpy()
    touched = np.zeros(len(order), dtype=bool)
    touched[sources] = True
    touched[targets] = True
    result: pd.DataFrame = edges
    return result, touched


# Survey tools put extra header rows (the question text, an import code such as
# {"ImportId":"QID1"}) under the column names; they are checked for among the first rows.
HEADER_LIKE_ROWS = 3
_IMPORT_CODE = re.compile(r'^\{\s*"[^"]*"\s*:.*\}$')


def _span(first: int, last: int, unit: str = "line") -> str:
    return f"{unit} {first}" if first == last else f"{unit}s {first}-{last}"


def _header_like(frame: pd.DataFrame, node: str, tie_ids: set[str], decimal: str,
                 skip: set[str]) -> str | None:
    """Why the node-list row of ``node`` looks like a second header row, or None."""
    row = frame.loc[node]
    for column in frame.columns:
        if _IMPORT_CODE.match(str(row[column])):
            return f"column {column!r} holds {row[column]!r}, which looks like an import code"
    if node in tie_ids or not tie_ids:
        return None
    rest = frame.iloc[HEADER_LIKE_ROWS:]
    for column in frame.columns:
        value = str(row[column])
        if column in skip or not value or _number(value, decimal) is not None:
            continue
        values = rest[column].to_numpy(dtype=object)
        others = values[values != ""]
        if len(others) >= 3 and _numbers(others, decimal)[0].all():
            return (f"its id {node!r} appears in no tie and column {column!r} holds {value!r} "
                    "where the other rows hold numbers")
    return None


def _refuse_extra_header_rows(frame: pd.DataFrame, lines: dict[str, int], tie_ids: set[str],
                              net: NetworkConfig, name: str, checks: DataChecks,
                              unit: str = "line") -> None:
    head = list(frame.index[:HEADER_LIKE_ROWS])
    skip = {net.label} if net.label else set()
    reasons = {node: _header_like(frame, node, tie_ids, net.decimal, skip) for node in head}
    flagged = [node for node in head if reasons[node]]
    if not flagged:
        return
    last = head.index(flagged[-1])
    # Rows above a flagged one that name no tie belong to the same block of extra headers.
    block = [node for node in head[:last + 1] if node not in tie_ids or reasons[node]]
    first_line, last_line = lines[block[0]], lines[block[-1]]
    where = _span(first_line, last_line, unit)
    reason = reasons[flagged[0]]
    checks.add(Finding(
        "error", name, f"{unit} {lines[flagged[0]]} does not look like a node: {reason}. Survey "
        "tools often export extra header rows (question text, import codes) under the column "
        f"names; delete {where} and build again", line=lines[flagged[0]], value=flagged[0],
        unit=unit))
    checks.raise_if_errors()


def _warn_ids_equal_but_for_case(ids: list[str], file: str,
                                 where: Callable[[str], tuple[str, int | None, str]],
                                 checks: DataChecks) -> None:
    """'a' and 'A' are two nodes; say so, since a person typed two ways is a common slip.
    ``where`` gives the file, line and unit where an id is first written; the finding is on
    ``file`` (the node list when there is one), at the first line of the first pair there."""
    folded = [node.casefold() for node in ids]
    clashing = np.flatnonzero(pd.Series(folded, dtype=object).duplicated(keep=False).to_numpy())
    if not len(clashing):
        return
    groups: dict[str, list[str]] = {}
    for i in clashing.tolist():  # only the ids that share their folded form, in order
        groups.setdefault(folded[i], []).append(ids[i])
    clashes = [g for g in groups.values() if len(g) > 1]
    if not clashes:
        return

    def located(node: str) -> str:
        name, line, unit = where(node)
        if line is None:
            return repr(node) if name == file else f"{node!r} ({name})"
        return f"{node!r} ({unit} {line})" if name == file else f"{node!r} ({name}, {unit} {line})"

    shown = "; ".join(" and ".join(located(n) for n in g) for g in clashes[:MAX_LINES_LISTED])
    more = f" and {len(clashes) - MAX_LINES_LISTED} more" if len(clashes) > MAX_LINES_LISTED else ""
    in_file = [where(n) for g in clashes[:MAX_LINES_LISTED] for n in g]
    first = next(((line, unit) for name, line, unit in in_file if name == file and line), None)
    checks.add(Finding(
        "warning", file, f"{count_of(len(clashes), 'set', 'sets')} of ids differ only in upper or "
        f"lower case and are read as different nodes: {shown}{more}; if they are the same node, "
        "write the id the same way in every file", value=clashes[0][0], count=len(clashes),
        line=first[0] if first else None, unit=first[1] if first else "line"))


def read_network(study: StudyConfig, net: NetworkConfig) -> CleanNetwork:
    """Read, check and clean one network; raise DataError listing every error found."""
    checks = DataChecks()
    data_name = study.relative(net.data_file)
    node_frame = None
    node_lines: dict[str, int] = {}
    node_unit = "line"
    nodes_name = study.relative(net.nodes) if net.nodes is not None else data_name
    refused: list[Finding] = []  # a file's errors, so the other file's are listed with them
    if net.nodes is not None:
        try:
            node_frame, node_lines, node_unit = _read_node_list(net, net.nodes, nodes_name,
                                                                checks)
        except DataError as error:
            refused += error.findings
    row_labels: list[str] = []
    try:
        if isinstance(net.data, EdgeListSource):
            ties = _read_edge_list(net, net.data, data_name, checks)
            weighted = net.data.weight is not None
        else:
            ties, row_labels, weighted = _read_matrix(net, net.data, data_name, checks)
    except DataError as error:
        refused += error.findings
    if refused:
        raise DataError(list(dict.fromkeys([*refused, *checks.errors])))
    checks.raise_if_errors()
    # Every tie end as a code into ``named`` (sources and targets interleaved, in file order).
    ends = np.empty(2 * len(ties), dtype=object)
    ends[0::2], ends[1::2] = ties.source, ties.target
    codes, named = pd.factorize(ends)
    listed = set(named.tolist()) | set(row_labels)  # a matrix lists nodes with no ties too
    if node_frame is not None:
        _refuse_extra_header_rows(node_frame, node_lines, listed, net, nodes_name, checks,
                                  node_unit)
    if not len(ties) and node_frame is None:
        raise DataError(Finding("error", data_name, "holds no ties and there is no node list, so "
                                "the network would be empty"))

    known = node_frame.index if node_frame is not None else pd.Index([], dtype=object)
    if node_frame is not None:
        # Each node missing from the node list, with the line of the tie naming it first.
        first_place = first_places(codes)
        missing = np.flatnonzero(known.get_indexer(pd.Index(named, dtype=object)) == -1)
        unknown = dict(zip(named[missing].tolist(),
                           ties.line[first_place[missing] // 2].tolist()))
        unit = ties.unit
        if len(unknown) == 1:
            ((node, line),) = unknown.items()
            checks.add(Finding("fix", data_name, f"node {node!r} appears in ties but not in the "
                               f"node list {nodes_name}; added with no attributes",
                               line=line, value=str(node), unit=unit))
        elif unknown:
            shown = ", ".join(f"{n!r} ({unit} {line})"
                              for n, line in list(unknown.items())[:MAX_LINES_LISTED])
            checks.add(Finding("fix", data_name, f"{len(unknown)} nodes appear in ties but not "
                               f"in the node list {nodes_name}; added with no attributes: "
                               f"{shown}", value=str(next(iter(unknown))), count=len(unknown),
                               unit=unit))

    all_ids = natural_order(list(set(known.tolist()) | listed))

    def first_written(node: str) -> tuple[str, int | None, str]:
        if node in node_lines:
            return nodes_name, node_lines[node], node_unit
        code = np.flatnonzero(named == node)
        if not len(code):  # a matrix row with no ties
            return data_name, None, ties.unit
        place = int(np.flatnonzero(codes == code[0])[0])
        return data_name, int(ties.line[place // 2]), ties.unit

    _warn_ids_equal_but_for_case(all_ids, nodes_name, first_written, checks)
    place = pd.Index(all_ids, dtype=object).get_indexer(pd.Index(named, dtype=object))[codes]
    edges, touched = _clean_ties(ties, place[0::2], place[1::2], net, data_name, all_ids,
                                 weighted, checks)

    if node_frame is None:
        node_frame = pd.DataFrame(index=pd.Index(all_ids, name="id"))
    node_frame = node_frame.reindex(pd.Index(all_ids, name="id"))
    label_column = net.label
    if label_column is None and "label" in node_frame.columns:
        label_column = "label"  # a column called label is the natural display column
    node_frame = _rename_reserved_columns(node_frame, label_column, study.relative(net.nodes)
                                          if net.nodes else data_name, checks)
    attrs = _typed_attributes(node_frame, net.decimal)
    if net.categorical or net.numeric:
        attrs = _declared_types(attrs, node_frame, net, nodes_name, node_lines, label_column,
                                checks, study, node_unit)
    # Labels stay exactly as written ("007" is not a number); empty or missing labels show the id.
    if label_column == net.node_id:
        labels = pd.Series(attrs.index, index=attrs.index, dtype="string")
    elif label_column:
        labels = node_frame[label_column].astype("string").str.strip().replace({"": pd.NA})
    else:
        labels = pd.Series(pd.NA, index=attrs.index, dtype="string")
    labels = labels.fillna(pd.Series(attrs.index, index=attrs.index, dtype="string"))
    attribute_names = tuple(c for c in attrs.columns if c != label_column)
    nodes = pd.concat([labels.rename("label"), attrs[list(attribute_names)]], axis=1)

    isolates = [all_ids[i] for i in np.flatnonzero(~touched)]
    if isolates:
        checks.add(Finding("note", data_name, f"{count_of(len(isolates), 'isolate')} with no "
                           f"ties, kept in the network: {', '.join(isolates[:MAX_LINES_LISTED])}",
                           count=len(isolates)))
    _check_display_settings(net, attribute_names, study)
    files = tuple(p for p in (net.data_file, net.nodes) if p is not None)
    return CleanNetwork(net, nodes, edges, weighted, attribute_names, checks, files,
                        len(known) if net.nodes is not None else None)


# Columns of nodes.csv that netfolio writes itself; a node attribute may not take these names.
RESERVED_COLUMNS = ("id", "label", *MEASURE_NAMES)


def _rename_reserved_columns(frame: pd.DataFrame, label_column: str | None, name: str,
                             checks: DataChecks) -> pd.DataFrame:
    """An attribute called e.g. "degree" would collide with the measure in nodes.csv; keep it
    under "degree_attribute" and say so."""
    renames: dict[str, str] = {}
    for column in frame.columns:
        if column in RESERVED_COLUMNS and column != label_column:
            new = f"{column}_attribute"
            while new in frame.columns or new in renames.values():
                new += "_"
            renames[column] = new
            checks.add(Finding("fix", name, f"node attribute {column!r} shares its name with a "
                               f"column netfolio writes; it is kept as {new!r}", line=1,
                               column=column))
    return frame.rename(columns=renames) if renames else frame


def _check_display_settings(net: NetworkConfig, attributes: tuple[str, ...], study: StudyConfig) -> None:
    if net.color_by is not None and net.color_by != "community" and net.color_by not in attributes:
        where = (f"the node list {study.relative(net.nodes)}" if net.nodes
                 else "this network (it has no node list)")
        choices = ", ".join(("community",) + attributes)
        raise network_setting_error(study, net.id, "color_by", f"{net.color_by!r} is not a node "
                                    f"attribute of {where}; use one of: {choices}")
