"""Read a CSV file as text columns that remember the line each row starts on.

Two readers give the same Table. The columnar one (pandas' C parser, every value read as text)
takes every file whose records are each one line; a file with a quoted value spanning lines, a
row longer than the first, or anything the strict CSV rules refuse is read by the row reader,
which tracks physical lines and names the line of every problem."""

from __future__ import annotations

import csv
import io
import re
import unicodedata
from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DataError, Finding

__all__ = ["DELIMITERS", "MAX_LINES_PER_VALUE", "Table", "read_table", "table_from_columns"]

# Separators a study may declare with ``delimiter``; the names are for messages.
DELIMITERS = {",": "','", ";": "';'", "\t": "a tab", "|": "'|'"}
# A quoted value may hold line breaks (a free-text comment), but one spanning more lines than this
# is almost always a quote that was never closed, swallowing the rows after it.
MAX_LINES_PER_VALUE = 10
PARQUET_SUFFIX = ".parquet"  # files with this suffix are read as Parquet, not CSV
# The longest value a cell may hold: an id, label or note is far shorter, and a value this long
# is nearly always a file cut or joined wrongly (Python's csv module holds the same limit).
MAX_VALUE_LENGTH = 131_072


def _text_array(values: Sequence[str]) -> np.ndarray:
    array = np.empty(len(values), dtype=object)
    array[:] = list(values) if not isinstance(values, np.ndarray) else values
    return array


@dataclass(frozen=True, eq=False)
class Table:
    """A data file as read: header, one column of text per header name, and the line each row
    starts on (for a Parquet file, ``unit`` is "row" and ``lines`` counts data rows from 1).

    Every value is stripped of surrounding spaces and normalised to Unicode NFC, so "Zoë" typed
    with a combining accent and "Zoë" typed as one character are the same id. ``findings`` holds
    the fixes reading made (blank lines before the header, empty unnamed columns dropped, values
    normalised)."""

    name: str  # the path as the user wrote it, for messages
    header: tuple[str, ...]
    columns: tuple[np.ndarray, ...]  # object arrays of str, one per header name
    lines: np.ndarray  # int64, the line (or row) of each row
    trimmed: tuple[tuple[int, int, int], ...] = ()  # (column index, count, first line) of values
    #                                                 trimmed of spaces
    findings: tuple[Finding, ...] = ()
    plain: bool = False  # True when reading proved that no value holds a control character
    unit: str = "line"  # "line" for CSV, "row" for Parquet

    def __len__(self) -> int:
        return len(self.lines)

    @cached_property
    def _positions(self) -> dict[str, int]:
        positions: dict[str, int] = {}
        for i, name in enumerate(self.header):
            positions.setdefault(name, i)
        return positions

    @cached_property
    def rows(self) -> tuple[tuple[str, ...], ...]:
        """The rows as tuples of text (for the small tables read row by row: matrices)."""
        return tuple(zip(*self.columns)) if self.columns else tuple(() for _ in self.lines)

    def values(self, name: str) -> np.ndarray:
        return self.columns[self.column(name)]

    def trimmed_findings(self, *names: str | None) -> list[Finding]:
        """A fix finding per named column whose values had spaces around them (" a" became "a")."""
        found = []
        by_column = {index: (count, first) for index, count, first in self.trimmed}
        for name in names:
            if name is None or name not in self._positions:
                continue
            index = self._positions[name]
            if index in by_column:
                count, first = by_column[index]
                found.append(Finding(
                    "fix", self.name, f"{count} {'value' if count == 1 else 'values'} "
                    f"had spaces before or after them, removed (first on {self.unit} {first})",
                    line=first, column=name, count=count, unit=self.unit))
        return found

    def column(self, name: str) -> int:
        return self._positions[name]

    def refuse_control_characters(self, *names: str | None) -> None:
        """Ids, labels and numbers must be one plain line (a quoted note may span lines)."""
        if self.plain:
            return
        columns = list(dict.fromkeys(self.column(n) for n in names
                                     if n is not None and n in self._positions))
        first: tuple[int, int] | None = None  # (row, position in ``columns``)
        for place, i in enumerate(columns):
            found = np.flatnonzero(np.fromiter((_CONTROL.search(v) is not None
                                                for v in self.columns[i]), bool,
                                               len(self.columns[i])))
            if len(found) and (first is None or found[0] < first[0]):
                first = (int(found[0]), place)
        if first is not None:
            row, place = first
            i = columns[place]
            raise DataError(Finding(
                "error", self.name, "a value holds a line break or another control "
                "character; ids, labels and numbers must be plain text on one line",
                line=int(self.lines[row]), column=self.header[i], value=self.columns[i][row],
                unit=self.unit))

    def require(self, *names: str, what: str) -> None:
        """Refuse the file unless every named column is present, listing the ones that are."""
        missing = [n for n in names if n not in self._positions]
        if missing:
            present = ", ".join(repr(h) for h in self.header) or "none"
            raise DataError(Finding(
                "error", self.name, f"the {what} has no column {missing[0]!r}; the columns are "
                f"{present} (set the column name in study.toml)",
                line=1 if self.unit == "line" else None, column=missing[0]))


_CONTROL = re.compile(r"[\x00-\x1f\x7f]")


def _decode(data: bytes, name: str) -> str:
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise DataError(Finding(
            "error", name, f"is not UTF-8 text: byte 0x{data[exc.start]:02X} cannot be read; "
            "save the file as UTF-8 (CSV UTF-8 in spreadsheet programs)", line=line)) from None


def _records(text: str, name: str, delimiter: str) -> list[tuple[int, list[str]]]:
    """Every CSV record with the line it starts on; a quote left open is an error naming the
    line where it opened, not a silent merge of the rows after it."""
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
    records: list[tuple[int, list[str]]] = []
    start = 1
    try:
        for record in reader:
            if reader.line_num - start + 1 > MAX_LINES_PER_VALUE:
                raise DataError(Finding(
                    "error", name, f"a quoted value that opens on line {start} runs over "
                    f"{reader.line_num - start + 1} lines, so a closing quote (\") is probably "
                    "missing there; every row after it would have been read into that one value",
                    line=start))
            records.append((start, record))
            start = reader.line_num + 1
    except csv.Error as exc:
        if "end of data" in str(exc):
            message = (f"a quote (\") opened on line {start} is never closed, so every line after "
                       "it would be read into one value; add the closing quote or remove the "
                       "opening one")
            raise DataError(Finding("error", name, message, line=start)) from None
        raise DataError(Finding(
            "error", name, f"is not valid CSV on line {reader.line_num}: {exc}; a value that "
            "starts with a quote must end with one, right before the next separator",
            line=reader.line_num)) from None
    return records


def _blank(record: list[str]) -> bool:
    return not any(cell.strip() for cell in record)


def _other_delimiter(header: list[str], delimiter: str) -> str | None:
    """The separator a one-column header seems to use instead of ``delimiter``, if any."""
    if len(header) != 1:
        return None
    counts = {d: header[0].count(d) for d in DELIMITERS if d != delimiter}
    best = max(counts, key=lambda d: counts[d])
    return best if counts[best] else None


def _delimiter_error(name: str, found: str) -> DataError:
    key = '"\\t"' if found == "\t" else f'"{found}"'
    decimal = ' (and decimal = "," if numbers use a decimal comma)' if found == ";" else ""
    return DataError(Finding(
        "error", name, f"this file seems to use {DELIMITERS[found]} between values, not the "
        f"expected separator; set delimiter = {key} in its [[network]] table of study.toml"
        f"{decimal}", line=1))


def read_table(path: Path, name: str, *, delimiter: str = ",", row_labels: bool = False,
               decimal: str = ".") -> Table:
    """Read ``path`` as UTF-8 CSV (a byte-order mark is allowed); every value stays text.

    Ids such as "007" must survive as written, so nothing is converted here. With
    ``row_labels`` (an adjacency matrix) the first column holds labels and its header cell may be
    empty. A file named *.parquet is read as Parquet (see parquet.py; ``decimal`` is the mark
    its numbers are written with as text).
    """
    if path.suffix.lower() == PARQUET_SUFFIX:
        from .parquet import read_parquet_table

        if row_labels:
            raise DataError(Finding("error", name, "an adjacency matrix is read from CSV only; "
                                    "save it as CSV, or give its ties as an edge list (which "
                                    "may be Parquet)"))
        return read_parquet_table(path, name, decimal=decimal)
    text = _decode(path.read_bytes(), name)
    if len(text) > MAX_VALUE_LENGTH:  # no value can be too long in a shorter file
        _refuse_huge_values(text, name, delimiter)
    fast = _columnar_table(text, name, delimiter, row_labels)
    return fast if fast is not None else _row_table(text, name, delimiter, row_labels)


def _refuse_huge_values(text: str, name: str, delimiter: str) -> None:
    """A line longer than MAX_VALUE_LENGTH may hold a value that long: find it (per line,
    vectorised) and name its line and column."""
    lengths = pd.Series(text.split("\n")).str.len().to_numpy()
    long = np.flatnonzero(lengths > MAX_VALUE_LENGTH)
    if not len(long):
        return
    limit = csv.field_size_limit()
    csv.field_size_limit(max(limit, len(text) + 1))  # read the long value to report it
    try:
        reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
        header: list[str] = []
        start = 1
        for record in reader:
            if not header:
                header = record
            for index, value in enumerate(record):
                if len(value) > MAX_VALUE_LENGTH:
                    column = header[index] if index < len(header) else f"column {index + 1}"
                    raise DataError(Finding(
                        "error", name, f"column '{column}' holds a value of {len(value):,} "
                        f"characters on line {start} (at most {MAX_VALUE_LENGTH:,}); the file "
                        "was probably cut or joined wrongly, or a quote is missing",
                        line=start, column=column, value=value[:40] + "…"))
            start = reader.line_num + 1
    except csv.Error:
        return  # not valid CSV: the readers say where
    finally:
        csv.field_size_limit(limit)


# ---------------------------------------------------------------------------------------------
# The row reader: any CSV file, physical lines tracked record by record


def _row_table(text: str, name: str, delimiter: str, row_labels: bool) -> Table:
    findings: list[Finding] = []
    records = _records(text, name, delimiter)
    leading = 0
    while leading < len(records) and _blank(records[leading][1]):
        leading += 1
    if leading == len(records):
        raise DataError(Finding("error", name, "is empty; it needs a header row and data rows"))
    header_line, raw_header = records[leading]
    if leading:
        findings.append(_leading_blank_finding(name, leading, header_line))
    other = _other_delimiter(raw_header, delimiter)
    if other is not None:
        raise _delimiter_error(name, other)

    header = [cell.strip() for cell in raw_header]
    rows: list[list[str]] = []
    lines: list[int] = []
    trimmed: list[tuple[int, int]] = []  # (line, column index) of values that had spaces around
    for line, record in records[leading + 1:]:
        if _blank(record):
            continue
        # Spreadsheets pad rows with empty cells past the last named column ("a,b,,"): drop them.
        while len(record) > len(header) and not record[-1].strip():
            record = record[:-1]
        rows.append([cell.strip() for cell in record])
        trimmed += [(line, i) for i, cell in enumerate(record) if cell != cell.strip()]
        lines.append(line)
    if not rows:
        raise DataError(Finding("error", name, "has a header row but no data rows",
                                line=header_line))
    for row, line in zip(rows, lines):
        if len(row) != len(header):
            raise _width_error(name, len(row), len(header), line, delimiter.join(row))

    columns = [_text_array([row[i] for row in rows]) for i in range(len(header))]
    header, columns, kept = _drop_unnamed_columns(header, columns, np.array(lines, np.int64),
                                                  name, findings, keep_first=row_labels)
    _refuse_repeated_names(header, name, header_line)
    header, columns = _normalise(header, columns, np.array(lines, np.int64), name, findings)
    new_index = {old: new for new, old in enumerate(kept)}
    per_column: dict[int, list[int]] = {}
    for line, i in trimmed:
        if i in new_index:
            per_column.setdefault(new_index[i], []).append(line)
    return Table(name, tuple(header), tuple(columns), np.array(lines, dtype=np.int64),
                 tuple((i, len(found), found[0]) for i, found in sorted(per_column.items())),
                 tuple(findings))


def _leading_blank_finding(name: str, leading: int, header_line: int) -> Finding:
    return Finding(
        "fix", name, f"{leading} blank {'line' if leading == 1 else 'lines'} before the header "
        f"row skipped; the header is line {header_line}", line=header_line, count=leading)


def _width_error(name: str, width: int, expected: int, line: int, value: str) -> DataError:
    return DataError(Finding(
        "error", name, f"has {width} values where the header has {expected} "
        "columns; check for a missing or extra separator or an unquoted value that "
        "holds one", line=line, value=value))


def _refuse_repeated_names(header: list[str], name: str, header_line: int | None) -> None:
    seen = set()
    for column in header:
        if column in seen:
            raise DataError(Finding("error", name, "a column name is repeated in the header row",
                                    line=header_line, column=column, value=column))
        seen.add(column)


# ---------------------------------------------------------------------------------------------
# The columnar reader: files whose records are one line each


def _columnar_table(text: str, name: str, delimiter: str, row_labels: bool) -> Table | None:
    """The Table the row reader would give, read column by column; None when the file needs the
    row reader (a record spanning lines, a quote the strict CSV rules refuse, a row longer than
    the first, a NUL byte), which then names the problem's line exactly."""
    if not text or "\x00" in text or text.startswith("\ufeff"):
        return None
    if '"' not in text and text.count("\r") == text.count("\r\n"):
        # No quotes and every line ends in LF or CRLF: each line is a record, and its values
        # are its separators plus one.
        lengths = _values_per_line(text, delimiter)
    else:
        # The strict reader, run in C without keeping its rows, proves the file is valid CSV,
        # counts each record's values, and shows whether every record is one physical line.
        reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
        try:
            lengths = np.fromiter(map(len, reader), dtype=np.int64)
        except csv.Error:
            return None
        if reader.line_num != len(lengths):
            return None  # some quoted value spans lines
    try:
        frame = pd.read_csv(io.StringIO(text), sep=delimiter, header=None, dtype=object,
                            na_filter=False, keep_default_na=False, skip_blank_lines=False,
                            quotechar='"', doublequote=True, skipinitialspace=False,
                            engine="c", index_col=False)
    except (pd.errors.ParserError, pd.errors.EmptyDataError, ValueError):
        return None
    width = frame.shape[1]
    if len(frame) != len(lengths) or (lengths > width).any():
        return None
    raw = [frame[c].to_numpy(dtype=object) for c in frame.columns]
    del frame
    spaced = _may_hold_spaces(text, delimiter)
    stripped = [_strip(col) for col in raw] if spaced else raw
    blank = np.ones(len(lengths), dtype=bool)
    for col in stripped:
        blank &= col == ""
    filled = np.flatnonzero(~blank)
    if not len(filled):
        raise DataError(Finding("error", name, "is empty; it needs a header row and data rows"))
    at = int(filled[0])
    findings: list[Finding] = []
    if at:
        findings.append(_leading_blank_finding(name, at, at + 1))
    raw_header = [str(raw[i][at]) for i in range(int(lengths[at]))]
    other = _other_delimiter(raw_header, delimiter)
    if other is not None:
        raise _delimiter_error(name, other)
    header = [cell.strip() for cell in raw_header]
    rows = filled[1:]
    if not len(rows):
        raise DataError(Finding("error", name, "has a header row but no data rows", line=at + 1))
    lines = (rows + 1).astype(np.int64)
    count = len(header)
    widths = lengths[rows]
    if (widths > count).any():  # trailing empty cells past the last named column are dropped
        last = np.full(len(rows), count, dtype=np.int64)
        for j in range(count, width):
            last = np.where((stripped[j][rows] != "") & (j < widths), j + 1, last)
        widths = np.where(widths > count, last, widths)
    wrong = np.flatnonzero(widths != count)
    if len(wrong):
        k = int(wrong[0])
        row = [str(stripped[j][rows[k]]) for j in range(int(widths[k]))]
        raise _width_error(name, len(row), count, int(lines[k]), delimiter.join(row))
    columns = [stripped[j][rows] for j in range(count)]
    trimmed: dict[int, tuple[int, int]] = {}
    if spaced:
        for j in range(count):
            moved = np.flatnonzero(raw[j][rows] != columns[j])
            if len(moved):
                trimmed[j] = (len(moved), int(lines[moved[0]]))
    del raw, stripped
    header, columns, kept = _drop_unnamed_columns(header, columns, lines, name, findings,
                                                  keep_first=row_labels)
    _refuse_repeated_names(header, name, at + 1)
    if not (text.isascii() or unicodedata.is_normalized("NFC", text)):
        header, columns = _normalise(header, columns, lines, name, findings)
    new_index = {old: new for new, old in enumerate(kept)}
    return Table(name, tuple(header), tuple(columns), lines,
                 tuple((new_index[i], n, first) for i, (n, first) in sorted(trimmed.items())
                       if i in new_index),
                 tuple(findings), plain=_plain(text, delimiter))


def _values_per_line(text: str, delimiter: str) -> np.ndarray:
    """How many values each line of a file with no quotes holds (a blank line counts one)."""
    data = np.frombuffer(text.encode("utf-8"), dtype=np.uint8)
    breaks = np.flatnonzero(data == 10)
    lines = len(breaks) + (1 if len(data) and data[-1] != 10 else 0)
    separators = np.flatnonzero(data == ord(delimiter))
    return np.bincount(np.searchsorted(breaks, separators), minlength=lines).astype(np.int64) + 1


_SPACE_IN_VALUE = re.compile(r"[^\S\r\n]")  # whitespace other than line breaks


def _may_hold_spaces(text: str, delimiter: str) -> bool:
    """Whether some value may have whitespace to strip; False only when no whitespace but line
    breaks (and the tab separator outside quotes) occurs in the file."""
    if delimiter == "\t" and '"' in text:
        return True
    if text.isascii():  # str.strip's whitespace among ASCII characters
        spaces = " \x0b\x0c\x1c\x1d\x1e\x1f" + ("" if delimiter == "\t" else "\t")
        return any(space in text for space in spaces)
    if delimiter == "\t":
        text = text.replace("\t", "")
    return _SPACE_IN_VALUE.search(text) is not None


def _plain(text: str, delimiter: str) -> bool:
    """Whether no value of a file of one-line records can hold a control character."""
    if "\t" in text and (delimiter != "\t" or '"' in text):
        return False
    # Control characters are ASCII, so the UTF-8 bytes show them; line breaks and tabs aside.
    data = np.frombuffer(text.encode("utf-8"), dtype=np.uint8)
    breaks = text.count("\n") + text.count("\r") + text.count("\t")
    return int(np.count_nonzero(data < 32)) == breaks and "\x7f" not in text


def _strip(values: np.ndarray) -> np.ndarray:
    return _text_array([v.strip() for v in values])


def _drop_unnamed_columns(header: list[str], columns: list[np.ndarray], lines: np.ndarray,
                          name: str, findings: list[Finding], *, keep_first: bool = False,
                          unit: str = "line") -> tuple[list[str], list[np.ndarray], list[int]]:
    """Columns with no name and no values (trailing commas from a spreadsheet) are dropped; a
    column with no name but with values is refused, since nothing could refer to it. Returns the
    header, the columns and the old index of each column kept."""
    empty = []
    for index, column in enumerate(header):
        if column or (keep_first and index == 0):
            continue
        filled = np.flatnonzero(columns[index] != "")
        if len(filled):
            raise DataError(Finding(
                "error", name, f"column {index + 1} has no name in the header row but holds "
                f"values (first on {unit} {int(lines[filled[0]])}); give it a name or delete it",
                line=int(lines[filled[0]]), value=columns[index][filled[0]], unit=unit))
        empty.append(index)
    if not empty:
        return header, columns, list(range(len(header)))
    if len(empty) == len(header):
        raise DataError(Finding("error", name, "the header row has no column names",
                                line=1 if unit == "line" else None))
    findings.append(Finding(
        "fix", name, f"{len(empty)} empty {'column' if len(empty) == 1 else 'columns'} with no "
        "name removed (as spreadsheets export trailing separators)", count=len(empty)))
    dropped = set(empty)
    keep = [i for i in range(len(header)) if i not in dropped]
    return [header[i] for i in keep], [columns[i] for i in keep], keep


def _normalise(header: list[str], columns: list[np.ndarray], lines: np.ndarray, name: str,
               findings: list[Finding], *, unit: str = "line"
               ) -> tuple[list[str], list[np.ndarray]]:
    """Unicode NFC for every value, so one id typed two ways is one id."""
    changed = np.zeros(len(lines), dtype=bool)
    out = []
    for values in columns:
        new = _text_array([unicodedata.normalize("NFC", cell) for cell in values])
        changed |= new != values
        out.append(new)
    new_header = [unicodedata.normalize("NFC", cell) for cell in header]
    rows_changed = np.flatnonzero(changed)
    if len(rows_changed) or new_header != header:
        first: int | None = int(lines[rows_changed[0]]) if len(rows_changed) else 1
        if unit != "line" and not len(rows_changed):
            first = None  # only the column names changed; a Parquet file has no header line
        count = len(rows_changed) + (new_header != header)
        findings.append(Finding(
            "fix", name, f"{count} {'row' if count == 1 else 'rows'} held letters written in "
            "decomposed form (such as e followed by a combining accent); rewritten in the "
            "composed form (Unicode NFC) so the same name always matches",
            line=first, count=count, unit=unit))
    return new_header, out


def table_from_columns(name: str, header: list[str], raw: list[np.ndarray], *,
                       unit: str = "row") -> Table:
    """A Table from columns already split (a Parquet file's, as text): rows of empty values are
    skipped, values stripped and normalised as a CSV file's are; ``lines`` counts rows from 1."""
    if not header:
        raise DataError(Finding("error", name, "has no columns; it needs a column per value"))
    stripped = [_strip(col) for col in raw]
    blank = np.ones(len(raw[0]), dtype=bool)
    for col in stripped:
        blank &= col == ""
    rows = np.flatnonzero(~blank)
    if not len(rows):
        raise DataError(Finding("error", name, "has column names but no data rows"))
    lines = (rows + 1).astype(np.int64)
    columns = [col[rows] for col in stripped]
    trimmed: dict[int, tuple[int, int]] = {}
    for j, col in enumerate(raw):
        moved = np.flatnonzero(col[rows] != columns[j])
        if len(moved):
            trimmed[j] = (len(moved), int(lines[moved[0]]))
    header = [cell.strip() for cell in header]
    findings: list[Finding] = []
    header, columns, kept = _drop_unnamed_columns(header, columns, lines, name, findings,
                                                  unit=unit)
    _refuse_repeated_names(header, name, None)
    header, columns = _normalise(header, columns, lines, name, findings, unit=unit)
    new_index = {old: new for new, old in enumerate(kept)}
    return Table(name, tuple(header), tuple(columns), lines,
                 tuple((new_index[i], n, first) for i, (n, first) in sorted(trimmed.items())
                       if i in new_index), tuple(findings), unit=unit)
