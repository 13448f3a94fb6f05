"""Read a CSV file as text rows that remember their line numbers."""

from __future__ import annotations

import csv
import io
import re
from dataclasses import dataclass
from pathlib import Path

from ..errors import DataError, Finding

__all__ = ["Table", "read_table"]


@dataclass(frozen=True)
class Table:
    """A CSV file as read: header, rows of text, and the line each row starts on."""

    name: str  # the path as the user wrote it, for messages
    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    lines: tuple[int, ...]
    trimmed: tuple[tuple[int, int], ...] = ()  # (line, column index) of values trimmed of spaces

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


def read_table(path: Path, name: str) -> Table:
    """Read ``path`` as UTF-8 CSV (a byte-order mark is allowed); every value stays text.

    Ids such as "007" must survive as written, so nothing is converted here.
    """
    data = path.read_bytes()
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise DataError(Finding(
            "error", name, f"is not UTF-8 text: byte 0x{data[exc.start]:02X} cannot be read; "
            "save the file as UTF-8 (CSV UTF-8 in spreadsheet programs)", line=line)) from None
    reader = csv.reader(io.StringIO(text, newline=""))
    rows: list[tuple[str, ...]] = []
    lines: list[int] = []
    trimmed: list[tuple[int, int]] = []  # (line, column index) of values that had spaces around
    header: tuple[str, ...] | None = None
    start = 1
    try:
        for record in reader:
            if header is None:
                header = tuple(cell.strip() for cell in record)
            elif any(cell.strip() for cell in record):
                rows.append(tuple(cell.strip() for cell in record))
                trimmed += [(start, i) for i, cell in enumerate(record) if cell != cell.strip()]
                lines.append(start)
            start = reader.line_num + 1
    except csv.Error as exc:
        raise DataError(Finding("error", name, f"is not valid CSV: {exc}", line=reader.line_num)) from None
    if header is None or not any(header):
        raise DataError(Finding("error", name, "is empty; it needs a header row and data rows"))
    if not rows:
        raise DataError(Finding("error", name, "has a header row but no data rows", line=1))
    seen = set()
    for column in header:
        if column in seen:
            raise DataError(Finding("error", name, "a column name is repeated in the header row",
                                    line=1, column=column, value=column))
        seen.add(column)
    for row, line in zip(rows, lines):
        if len(row) != len(header):
            raise DataError(Finding(
                "error", name, f"has {len(row)} values where the header has {len(header)} columns",
                line=line, value=",".join(row)))

    return Table(name, header, tuple(rows), tuple(lines), tuple(trimmed))
