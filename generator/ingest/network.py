"""Turn one [[network]]'s files into a CleanNetwork, recording every fix and refusal."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from fractions import Fraction
from pathlib import Path

import pandas as pd

from ..config import EdgeListSource, MatrixSource, NetworkConfig, StudyConfig
from ..errors import DataError, Finding
from ..vocabulary import MEASURE_NAMES, count_of
from .csvfile import read_table

__all__ = ["CleanNetwork", "DataChecks", "natural_key", "read_network"]

MAX_LINES_LISTED = 20  # a finding lists at most this many line numbers


NaturalKey = tuple[tuple[tuple[int, int, str], ...], str]


def natural_key(text: str) -> NaturalKey:
    """Sort "s2" before "s10": digits compare as numbers, the rest as text.

    The text itself breaks ties ("a1" and "a01"), so the order is total and the same in every
    process."""
    parts = tuple((0, int(part), "") if part.isdigit() else (1, 0, part)
                  for part in re.split(r"(\d+)", text) if part != "")
    return (parts, text)


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


def _number(text: str, decimal: str = ".") -> float | None:
    if decimal == ",":
        if "." in text:  # with a decimal comma, "1.5" is ambiguous (a thousands mark?): refuse
            return None
        text = text.replace(",", ".")
    if _NUMBER.fullmatch(text) or text.lower() in _SPECIAL:
        return float(text)
    return None




def _lines(lines: list[int]) -> str:
    shown = ", ".join(str(n) for n in lines[:MAX_LINES_LISTED])
    more = len(lines) - MAX_LINES_LISTED
    return shown + (f" and {more} more" if more > 0 else "")


# ---------------------------------------------------------------------------------------------
# Node list


def _read_node_list(net: NetworkConfig, path: Path, name: str, checks: DataChecks
                    ) -> tuple[pd.DataFrame, dict[str, int]]:
    """The node list indexed by id (all text, file order) and the line of each id."""
    table = read_table(path, name, delimiter=net.delimiter)
    checks.findings += table.findings
    table.require(net.node_id, what="node list")
    if net.label is not None and net.label != net.node_id:
        table.require(net.label, what="node list")
    table.refuse_control_characters(net.node_id, net.label)
    checks.findings += table.trimmed_findings(net.node_id)
    id_col = table.column(net.node_id)
    first_line: dict[str, int] = {}
    for row, line in zip(table.rows, table.lines):
        node = row[id_col]
        if node == "":
            checks.add(Finding("error", name, "a node has an empty id", line=line, column=net.node_id))
        elif node in first_line:
            checks.add(Finding("error", name, f"node id is repeated (first on line {first_line[node]})",
                               line=line, column=net.node_id, value=node))
        else:
            first_line[node] = line
    checks.raise_if_errors()
    frame = pd.DataFrame(list(table.rows), columns=list(table.header), dtype="string")
    frame = frame.set_index(net.node_id)
    frame.index = frame.index.astype(str)
    frame.index.name = "id"
    return frame, first_line


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
                    lines: dict[str, int], label_column: str | None, checks: DataChecks
                    ) -> pd.DataFrame:
    """Apply study.toml's ``categorical`` and ``numeric`` declarations: a categorical column
    keeps its values as text (codes 0-3 are four groups, not a scale); every filled cell of a
    numeric one must be a number. Raises DataError naming file, line, column and value."""
    columns = [c for c in attrs.columns if c != label_column]
    for declared, kind in ((net.categorical, "categorical"), (net.numeric, "numeric")):
        for column in declared:
            if column not in columns:
                listed = ", ".join(repr(c) for c in columns) or "none"
                checks.add(Finding("error", name, f"{kind} = [...] in study.toml names "
                                   f"{column!r}, which is not a node attribute of this node list "
                                   f"(attribute columns: {listed})", line=1, column=column,
                                   value=column))
    checks.raise_if_errors()
    typed: pd.DataFrame = attrs.copy()
    for column in net.categorical:
        typed[column] = raw[column].astype("string").str.strip().replace({"": pd.NA})
    for column in net.numeric:
        text = raw[column].astype("string").str.strip().replace({"": pd.NA})
        values: list[float | None] = []
        for node, cell in text.items():
            if pd.isna(cell):
                values.append(None)
                continue
            value = _number(str(cell), net.decimal)
            if value is None or not math.isfinite(value):
                checks.add(Finding("error", name, f"numeric = [...] in study.toml declares "
                                   f"{column!r} numeric, but this value is not a number",
                                   line=lines.get(str(node)), column=column, value=str(cell)))
                values.append(None)
            else:
                values.append(value)
        checks.raise_if_errors()
        numbers = pd.array(values, dtype="Float64")
        whole = all(v is None or float(v).is_integer() for v in values)
        typed[column] = pd.Series(numbers, index=typed.index).astype("Int64" if whole
                                                                      else "Float64")
    return typed


# ---------------------------------------------------------------------------------------------
# Edge list and matrix


@dataclass(frozen=True)
class _RawTie:
    source: str
    target: str
    weight: float
    line: int


def _check_weight(text: str, net: NetworkConfig, name: str, line: int, column: str,
                  checks: DataChecks) -> float | None:
    if text == "":
        checks.add(Finding("error", name, "weight is missing", line=line, column=column, value=text))
        return None
    value = _number(text, net.decimal)
    if value is None or math.isnan(value):
        mark = ("; decimal = \",\" is set, so write 2,5 (not 2.5)" if net.decimal == "," else
                "; this looks like a decimal comma: set decimal = \",\" (and delimiter = \";\") "
                "in this network's table of study.toml" if re.fullmatch(r"[0-9]+,[0-9]+", text) else "")
        checks.add(Finding("error", name, f"weight is not a number{mark}", line=line,
                           column=column, value=text))
    elif math.isinf(value):
        checks.add(Finding("error", name, "weight is infinite", line=line, column=column, value=text))
    elif value < 0:
        checks.add(Finding("error", name, "weight is negative; netfolio reads weights as tie "
                           "strengths or distances, which cannot be below 0", line=line,
                           column=column, value=text))
    else:
        return value
    return None


def _note_unused_columns(header: tuple[str, ...], rows: tuple[tuple[str, ...], ...],
                         used: list[str], net: NetworkConfig, name: str, checks: DataChecks) -> None:
    """Name the edge-list columns the analysis does not read, so a forgotten ``weight`` key (or a
    column the analyst expected to matter) does not pass unnoticed."""
    unused = [c for c in header if c not in used]
    if not unused:
        return
    listed = ", ".join(repr(c) for c in unused)
    message = (f"{'column' if len(unused) == 1 else 'columns'} {listed} "
               f"{'is' if len(unused) == 1 else 'are'} not used by the analysis")
    if net.weight is None:
        numeric = [c for c in unused if _all_numbers(rows, header.index(c), net.decimal)]
        if numeric:
            message += (f"; the network is read as unweighted because study.toml sets no "
                        f"'weight' key: to use {numeric[0]!r} as tie weights, set "
                        f"weight = \"{numeric[0]}\"")
    checks.add(Finding("note", name, message, line=1, column=unused[0], count=len(unused)))


def _all_numbers(rows: tuple[tuple[str, ...], ...], index: int, decimal: str) -> bool:
    filled = [row[index] for row in rows if row[index]]
    return bool(filled) and all(_number(v, decimal) is not None for v in filled)


def _read_edge_list(net: NetworkConfig, edge_list: EdgeListSource, name: str, checks: DataChecks
                    ) -> list[_RawTie]:
    table = read_table(edge_list.path, name, delimiter=net.delimiter)
    checks.findings += table.findings
    columns = [edge_list.source, edge_list.target] + ([edge_list.weight] if edge_list.weight else [])
    table.require(*columns, what="edge list")
    _note_unused_columns(table.header, table.rows, columns, net, name, checks)
    table.refuse_control_characters(*columns)
    checks.findings += table.trimmed_findings(edge_list.source, edge_list.target)
    s, t = table.column(edge_list.source), table.column(edge_list.target)
    weight_column = edge_list.weight
    w = table.column(weight_column) if weight_column else None
    for row, line in list(zip(table.rows, table.lines))[:HEADER_LIKE_ROWS]:
        code = next((i for i in (s, t, w) if i is not None and _IMPORT_CODE.match(row[i])), None)
        if code is not None:
            raise DataError(Finding(
                "error", name, f"line {line} does not look like a tie: column "
                f"{table.header[code]!r} holds {row[code]!r}, which looks like an import code. "
                "Survey tools often export extra header rows (question text, import codes) under "
                f"the column names; delete {_span(table.lines[0], line)} and build again", line=line,
                column=table.header[code], value=row[code]))
    ties = []
    zero_lines = []
    for row, line in zip(table.rows, table.lines):
        source, target = row[s], row[t]
        for column, value in ((edge_list.source, source), (edge_list.target, target)):
            if value == "":
                checks.add(Finding("error", name, "a tie has an empty node id", line=line,
                                   column=column, value=value))
        weight = 1.0
        if w is not None and weight_column is not None:
            checked = _check_weight(row[w], net, name, line, weight_column, checks)
            if checked is None:
                continue
            if checked == 0:
                zero_lines.append(line)
                checks.add(Finding("error", name, _zero_weight_reason(net), line=line,
                                   column=weight_column, value=row[w]))
                continue
            weight = checked
        if source and target:
            ties.append(_RawTie(source, target, weight, line))
    return ties


def _zero_weight_reason(net: NetworkConfig) -> str:
    if net.weight_means == "strength":
        return ("weight is 0: as a tie strength it would become an infinite path length; "
                "remove the row if there is no tie")
    return ("weight is 0: as a distance it would make the tie infinitely strong; "
            "remove the row or give a positive distance")


def _read_matrix(net: NetworkConfig, matrix: MatrixSource, name: str, checks: DataChecks
                 ) -> tuple[list[_RawTie], list[str], bool]:
    """Rows are senders (source), columns receivers (target); a cell is the tie's weight."""
    table = read_table(matrix.path, name, delimiter=net.delimiter, row_labels=True)
    checks.findings += table.findings
    table.refuse_control_characters(*table.header)
    col_labels = list(table.header[1:])
    row_labels = [row[0] for row in table.rows]
    if sorted(row_labels) != sorted(col_labels):
        only_rows = sorted(set(row_labels) - set(col_labels))
        only_cols = sorted(set(col_labels) - set(row_labels))
        odd = (f"row label {only_rows[0]!r} has no column" if only_rows
               else f"column label {only_cols[0]!r} has no row" if only_cols
               else "a row label is repeated")
        raise DataError(Finding("error", name, "an adjacency matrix needs the same labels in its "
                                f"header row and first column: {odd}", line=1))
    values: dict[tuple[str, str], float] = {}
    line_of: dict[str, int] = {}
    for row, line in zip(table.rows, table.lines):
        line_of[row[0]] = line
        for label, cell in zip(col_labels, row[1:]):
            checked = 0.0 if cell == "" else _check_weight(cell, net, name, line, label, checks)
            if checked is not None:
                values[(row[0], label)] = checked
    checks.raise_if_errors()
    if not net.directed:
        for row_label in row_labels:  # file order, so the first asymmetric cell is named
            for col_label in col_labels:
                a, b = values[(row_label, col_label)], values[(col_label, row_label)]
                if a != b:
                    raise DataError(Finding(
                        "error", name, f"the network is undirected but the matrix is not symmetric: "
                        f"row {row_label!r} column {col_label!r} holds {a:g}, row {col_label!r} "
                        f"column {row_label!r} holds {b:g}", line=line_of[row_label],
                        column=col_label, value=f"{a:g}"))
    weighted = any(v not in (0.0, 1.0) for v in values.values())
    ties = [
        _RawTie(src, dst, value, line_of[src])
        for (src, dst), value in values.items()
        if value != 0 and (net.directed or natural_key(src) <= natural_key(dst))  # one of each pair
    ]
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


def _mirrored_listing(kept: list[_RawTie], net: NetworkConfig, name: str, order: dict[str, int],
                      weighted: bool, checks: DataChecks) -> list[_RawTie]:
    """Undirected ties that many tools export twice (a,b and b,a with the same weight).

    When every pair is listed exactly so, each pair is read as one tie; summing both rows would
    double every strength. When only some pairs are, ``duplicates`` applies and a warning counts
    them."""
    groups: dict[tuple[int, int], list[_RawTie]] = {}
    for tie in kept:
        a, b = order[tie.source], order[tie.target]
        groups.setdefault((min(a, b), max(a, b)), []).append(tie)
    both = [g for g in groups.values() if len({order[t.source] < order[t.target] for t in g}) == 2]
    if not both:
        return kept
    mirrored = all(len(g) == 2 and g[0].source == g[1].target and g[0].weight == g[1].weight
                   for g in groups.values())
    if mirrored:
        first = min(min(t.line for t in g) for g in groups.values())
        checks.add(Finding(
            "fix", name, f"every tie is listed twice, once in each direction and with the same "
            f"weight ({count_of(len(groups), 'pair', 'pairs')}), as many tools export undirected "
            "networks; each pair was read as one tie, so strengths are not doubled",
            line=first, count=len(groups)))
        return [min(g, key=lambda t: t.line) for g in groups.values()]
    if weighted:
        example = min(both, key=lambda g: min(t.line for t in g))
        one, other = sorted(example, key=lambda t: t.line)[:2]
        checks.add(Finding(
            "warning", name, f"{count_of(len(both), 'pair is', 'pairs are')} listed in both "
            f"directions (such as {one.source!r},{one.target!r} on line {one.line} and "
            f"{other.source!r},{other.target!r} on line {other.line}) but not every pair is; in "
            f"this undirected network both rows are one tie, so their weights were combined by "
            f"{_combine_rule(net)}. If the file lists some ties twice by mistake, remove one row "
            "of each", line=one.line, count=len(both)))
    return kept


def _clean_ties(ties: list[_RawTie], net: NetworkConfig, name: str, order: dict[str, int],
                weighted: bool, checks: DataChecks) -> pd.DataFrame:
    loops = [t for t in ties if t.source == t.target]
    if loops:
        checks.add(Finding("fix", name, f"{count_of(len(loops), 'self-loop')} removed (a tie "
                           f"from a node to itself) on {'line' if len(loops) == 1 else 'lines'} "
                           f"{_lines([t.line for t in loops])}",
                           line=loops[0].line if len(loops) == 1 else None,
                           value=loops[0].source, count=len(loops)))
    kept = [t for t in ties if t.source != t.target]
    if not net.directed:
        kept = _mirrored_listing(kept, net, name, order, weighted, checks)

    def key(t: _RawTie) -> tuple[int, int]:
        a, b = order[t.source], order[t.target]
        return (a, b) if net.directed or a <= b else (b, a)

    frame = pd.DataFrame({
        "a": [key(t)[0] for t in kept], "b": [key(t)[1] for t in kept],
        "weight": [t.weight for t in kept], "line": [t.line for t in kept],
    })
    # Sort before combining so sums do not depend on the order of rows in the file.
    frame = frame.sort_values(["a", "b", "weight", "line"], kind="mergesort")
    repeated = frame[frame.duplicated(["a", "b"], keep=False)]
    if len(repeated):
        extra = len(repeated) - repeated[["a", "b"]].drop_duplicates().shape[0]
        how = f"weights combined by {_combine_rule(net)}" if weighted else "kept once"
        what = "ties" if net.directed else "ties (either direction, as the network is undirected)"
        lines = sorted(repeated["line"].tolist())
        checks.add(Finding("fix", name, f"{extra} repeated {what} merged, {how}; lines "
                           f"{_lines(lines)}", line=lines[0], count=extra))
    merged = frame.groupby(["a", "b"], sort=True)["weight"].agg(_COMBINE[net.duplicates]).reset_index()
    if weighted and len(repeated) and net.duplicates == "sum" and net.weight_means == "distance":
        exact = repeated.groupby(["a", "b"], sort=True)["weight"].agg(_combine_distances)
        merged = merged.set_index(["a", "b"])
        merged.loc[exact.index, "weight"] = exact
        merged = merged.reset_index()
    names = sorted(order, key=order.__getitem__)
    edges = pd.DataFrame({
        "source": pd.Series([names[i] for i in merged["a"]], dtype=str),
        "target": pd.Series([names[i] for i in merged["b"]], dtype=str),
    })
    if weighted:
        edges["weight"] = merged["weight"].astype(float).to_numpy()
    result: pd.DataFrame = edges
    return result


# Survey tools put extra header rows (the question text, an import code such as
# {"ImportId":"QID1"}) under the column names; they are checked for among the first rows.
HEADER_LIKE_ROWS = 3
_IMPORT_CODE = re.compile(r'^\{\s*"[^"]*"\s*:.*\}$')


def _span(first: int, last: int) -> str:
    return f"line {first}" if first == last else f"lines {first}-{last}"


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
        others = [v for v in rest[column] if v]
        if len(others) >= 3 and all(_number(v, decimal) is not None for v in others):
            return (f"its id {node!r} appears in no tie and column {column!r} holds {value!r} "
                    "where the other rows hold numbers")
    return None


def _refuse_extra_header_rows(frame: pd.DataFrame, lines: dict[str, int], tie_ids: set[str],
                              net: NetworkConfig, name: str, checks: DataChecks) -> None:
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
    where = _span(first_line, last_line)
    reason = reasons[flagged[0]]
    checks.add(Finding(
        "error", name, f"line {lines[flagged[0]]} does not look like a node: {reason}. Survey "
        "tools often export extra header rows (question text, import codes) under the column "
        f"names; delete {where} and build again", line=lines[flagged[0]], value=flagged[0]))
    checks.raise_if_errors()


def _warn_ids_equal_but_for_case(ids: list[str], name: str, checks: DataChecks) -> None:
    """'a' and 'A' are two nodes; say so, since a person typed two ways is a common slip."""
    groups: dict[str, list[str]] = {}
    for node in ids:
        groups.setdefault(node.casefold(), []).append(node)
    clashes = [g for g in groups.values() if len(g) > 1]
    if not clashes:
        return
    shown = "; ".join(" and ".join(repr(n) for n in g) for g in clashes[:MAX_LINES_LISTED])
    more = f" and {len(clashes) - MAX_LINES_LISTED} more" if len(clashes) > MAX_LINES_LISTED else ""
    checks.add(Finding(
        "warning", name, f"{count_of(len(clashes), 'set', 'sets')} of ids differ only in upper or "
        f"lower case and are read as different nodes: {shown}{more}; if they are the same node, "
        "write the id the same way in every file", value=clashes[0][0], count=len(clashes)))


def read_network(study: StudyConfig, net: NetworkConfig) -> CleanNetwork:
    """Read, check and clean one network; raise DataError listing every error found."""
    checks = DataChecks()
    data_name = study.relative(net.data_file)
    node_frame = None
    node_lines: dict[str, int] = {}
    nodes_name = study.relative(net.nodes) if net.nodes is not None else data_name
    if net.nodes is not None:
        node_frame, node_lines = _read_node_list(net, net.nodes, nodes_name, checks)
    if isinstance(net.data, EdgeListSource):
        ties = _read_edge_list(net, net.data, data_name, checks)
        weighted = net.data.weight is not None
        listed = [t.source for t in ties] + [t.target for t in ties]
    else:
        ties, listed, weighted = _read_matrix(net, net.data, data_name, checks)
    checks.raise_if_errors()
    if node_frame is not None:
        _refuse_extra_header_rows(node_frame, node_lines, set(listed), net, nodes_name, checks)
    if not ties and node_frame is None:
        raise DataError(Finding("error", data_name, "holds no ties and there is no node list, so "
                                "the network would be empty"))

    known = set(node_frame.index) if node_frame is not None else set()
    unknown: dict[str, int] = {}
    for tie in ties:
        for node in (tie.source, tie.target):
            if node_frame is not None and node not in known and node not in unknown:
                unknown[node] = tie.line
    if len(unknown) == 1:
        ((node, line),) = unknown.items()
        checks.add(Finding("fix", data_name, f"node {node!r} appears in ties but not in the node "
                           f"list {nodes_name}; added with no attributes",
                           line=line, value=node))
    elif unknown:
        first = list(unknown.items())[:MAX_LINES_LISTED]
        shown = ", ".join(f"{n!r} (line {line})" for n, line in first)
        checks.add(Finding("fix", data_name, f"{len(unknown)} nodes appear in ties but not in the "
                           f"node list {nodes_name}; added with no attributes: "
                           f"{shown}", value=next(iter(unknown)), count=len(unknown)))

    all_ids = sorted(known | set(listed), key=natural_key)
    _warn_ids_equal_but_for_case(all_ids, study.relative(net.nodes) if net.nodes else data_name,
                                 checks)
    order = {node: i for i, node in enumerate(all_ids)}
    edges = _clean_ties(ties, net, data_name, order, weighted, checks)

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
                                checks)
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

    touched = set(edges["source"]) | set(edges["target"])
    isolates = [n for n in all_ids if n not in touched]
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
        where = study.relative(net.nodes) if net.nodes else "the network (it has no node list)"
        choices = ", ".join(("community",) + attributes)
        raise DataError(Finding("error", where, f"color_by = {net.color_by!r} in study.toml names no "
                                f"node attribute; use one of: {choices}", column=net.color_by))
