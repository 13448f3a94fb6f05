"""Read a CSV file as text rows that remember their line numbers."""

from __future__ import annotations

import csv
import io
import re
import unicodedata
from dataclasses import dataclass
from pathlib import Path

from ..errors import DataError, Finding

__all__ = ["DELIMITERS", "MAX_LINES_PER_VALUE", "Table", "read_table"]

# Separators a study may declare with ``delimiter``; the names are for messages.
DELIMITERS = {",": "','", ";": "';'", "\t": "a tab", "|": "'|'"}
# A quoted value may hold line breaks (a free-text comment), but one spanning more lines than this
# is almost always a quote that was never closed, swallowing the rows after it.
MAX_LINES_PER_VALUE = 10


@dataclass(frozen=True)
class Table:
    """A CSV file as read: header, rows of text, and the line each row starts on.

    Every value is stripped of surrounding spaces and normalised to Unicode NFC, so "Zoë" typed
    with a combining accent and "Zoë" typed as one character are the same id. ``findings`` holds
    the fixes reading made (blank lines before the header, empty unnamed columns dropped, values
    normalised)."""

    name: str  # the path as the user wrote it, for messages
    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    lines: tuple[int, ...]
    trimmed: tuple[tuple[int, int], ...] = ()  # (line, column index) of values trimmed of spaces
    findings: tuple[Finding, ...] = ()

    def trimmed_findings(self, *names: str | None) -> list[Finding]:
        """A fix finding per named column whose values had spaces around them (" a" became "a")."""
        found = []
        for name in names:
            if name is None or name not in self.header:
                continue
            index = self.header.index(name)
            lines = [line for line, i in self.trimmed if i == index]
            if lines:
                found.append(Finding(
                    "fix", self.name, f"{len(lines)} {'value' if len(lines) == 1 else 'values'} "
                    f"had spaces before or after them, removed (first on line {lines[0]})",
                    line=lines[0], column=name, count=len(lines)))
        return found

    def column(self, name: str) -> int:
        return self.header.index(name)

    def refuse_control_characters(self, *names: str | None) -> None:
        """Ids, labels and numbers must be one plain line (a quoted note may span lines)."""
        columns = [self.column(n) for n in names if n is not None and n in self.header]
        for row, line in zip(self.rows, self.lines):
            for i in columns:
                if _CONTROL.search(row[i]):
                    raise DataError(Finding(
                        "error", self.name, "a value holds a line break or another control "
                        "character; ids, labels and numbers must be plain text on one line",
                        line=line, column=self.header[i], value=row[i]))

    def require(self, *names: str, what: str) -> None:
        """Refuse the file unless every named column is present, listing the ones that are."""
        missing = [n for n in names if n not in self.header]
        if missing:
            present = ", ".join(repr(h) for h in self.header) or "none"
            raise DataError(Finding(
                "error", self.name, f"the {what} has no column {missing[0]!r}; the columns are "
                f"{present} (set the column name in study.toml)", line=1, column=missing[0]))


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


def read_table(path: Path, name: str, *, delimiter: str = ",", row_labels: bool = False
               ) -> Table:
    """Read ``path`` as UTF-8 CSV (a byte-order mark is allowed); every value stays text.

    Ids such as "007" must survive as written, so nothing is converted here. With
    ``row_labels`` (an adjacency matrix) the first column holds labels and its header cell may be
    empty.
    """
    text = _decode(path.read_bytes(), name)
    findings: list[Finding] = []
    records = _records(text, name, delimiter)
    leading = 0
    while leading < len(records) and _blank(records[leading][1]):
        leading += 1
    if leading == len(records):
        raise DataError(Finding("error", name, "is empty; it needs a header row and data rows"))
    header_line, raw_header = records[leading]
    if leading:
        findings.append(Finding(
            "fix", name, f"{leading} blank {'line' if leading == 1 else 'lines'} before the header "
            f"row skipped; the header is line {header_line}", line=header_line, count=leading))
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
            raise DataError(Finding(
                "error", name, f"has {len(row)} values where the header has {len(header)} "
                "columns; check for a missing or extra separator or an unquoted value that "
                "holds one", line=line, value=delimiter.join(row)))

    header, rows, trimmed = _drop_unnamed_columns(header, rows, lines, trimmed, name, findings,
                                                  keep_first=row_labels)
    seen = set()
    for column in header:
        if column in seen:
            raise DataError(Finding("error", name, "a column name is repeated in the header row",
                                    line=header_line, column=column, value=column))
        seen.add(column)
    header, rows = _normalise(header, rows, lines, name, findings)
    return Table(name, tuple(header), tuple(tuple(r) for r in rows), tuple(lines),
                 tuple(trimmed), tuple(findings))


def _drop_unnamed_columns(header: list[str], rows: list[list[str]], lines: list[int],
                          trimmed: list[tuple[int, int]], name: str, findings: list[Finding],
                          *, keep_first: bool = False
                          ) -> tuple[list[str], list[list[str]], list[tuple[int, int]]]:
    """Columns with no name and no values (trailing commas from a spreadsheet) are dropped; a
    column with no name but with values is refused, since nothing could refer to it."""
    empty = []
    for index, column in enumerate(header):
        if column or (keep_first and index == 0):
            continue
        filled = next(((row[index], line) for row, line in zip(rows, lines) if row[index]), None)
        if filled is not None:
            raise DataError(Finding(
                "error", name, f"column {index + 1} has no name in the header row but holds "
                f"values (first on line {filled[1]}); give it a name or delete it",
                line=filled[1], value=filled[0]))
        empty.append(index)
    if not empty:
        return header, rows, trimmed
    if len(empty) == len(header):
        raise DataError(Finding("error", name, "the header row has no column names", line=1))
    findings.append(Finding(
        "fix", name, f"{len(empty)} empty {'column' if len(empty) == 1 else 'columns'} with no "
        "name removed (as spreadsheets export trailing separators)", count=len(empty)))
    keep = [i for i in range(len(header)) if i not in empty]
    new_index = {old: new for new, old in enumerate(keep)}
    return ([header[i] for i in keep], [[row[i] for i in keep] for row in rows],
            [(line, new_index[i]) for line, i in trimmed if i in new_index])


def _normalise(header: list[str], rows: list[list[str]], lines: list[int], name: str,
               findings: list[Finding]) -> tuple[list[str], list[list[str]]]:
    """Unicode NFC for every value, so one id typed two ways is one id."""
    changed: list[int] = []
    out = []
    for row, line in zip(rows, lines):
        new = [unicodedata.normalize("NFC", cell) for cell in row]
        if new != row:
            changed.append(line)
        out.append(new)
    new_header = [unicodedata.normalize("NFC", cell) for cell in header]
    if changed or new_header != header:
        first = changed[0] if changed else 1
        count = len(changed) + (new_header != header)
        findings.append(Finding(
            "fix", name, f"{count} {'row' if count == 1 else 'rows'} held letters written in "
            "decomposed form (such as e followed by a combining accent); rewritten in the "
            "composed form (Unicode NFC) so the same name always matches",
            line=first, count=count))
    return new_header, out
