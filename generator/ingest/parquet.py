"""Read a Parquet file (an edge list or a node list) as a Table of text, so every check and fix
of a CSV file applies to it unchanged.

Parquet keeps types, so each value is turned into the text a person would write for it:
text as it is, whole numbers in decimal digits, other numbers in plain decimal notation with the
network's decimal mark (3.0 as "3", 1e-05 as "0.00001"), true/false, dates and times in ISO
8601; a missing value (null, or NaN in a column of numbers) is an empty cell. Parquet has no
lines: findings name the data row, counted from 1. pyarrow reads the file; it is an optional
extra (``pip install 'netfolio[parquet]'``)."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import DataError, Finding
from .csvfile import Table, table_from_columns

__all__ = ["INSTALL_HINT", "read_parquet_table"]

INSTALL_HINT = "pip install 'netfolio[parquet]'"


def _pyarrow() -> tuple[Any, Any, Any]:
    try:
        import pyarrow as pa
        import pyarrow.compute as pc
        import pyarrow.parquet as pq
    except ImportError:
        return None, None, None
    return pa, pc, pq


def read_parquet_table(path: Path, name: str, *, decimal: str = ".") -> Table:
    pa, pc, pq = _pyarrow()
    if pa is None:
        raise DataError(Finding(
            "error", name, "is a Parquet file, and reading Parquet needs the optional pyarrow "
            f"package, which is not installed; install netfolio with it: {INSTALL_HINT} (or "
            "save the file as CSV)"))
    try:
        table = pq.read_table(path)
    except (pa.ArrowException, OSError) as exc:
        raise DataError(Finding("error", name, f"cannot be read as Parquet: {exc}")) from None
    header = [str(field.name) for field in table.schema]
    columns = [_as_text(table.column(i), header[i], name, decimal, pa, pc)
               for i in range(table.num_columns)]
    return table_from_columns(name, header, columns)


def _as_text(column: Any, column_name: str, name: str, decimal: str, pa: Any, pc: Any
             ) -> np.ndarray:
    """One Parquet column as an object array of str, "" where a value is missing."""
    kind = column.type
    if pa.types.is_dictionary(kind):
        column = column.cast(kind.value_type)
        kind = kind.value_type
    if pa.types.is_floating(kind):
        values = column.to_numpy(zero_copy_only=False).astype(np.float64)
        texts = [_decimal_text(v, decimal) for v in values.tolist()]
    elif (pa.types.is_string(kind) or pa.types.is_large_string(kind)
          or pa.types.is_integer(kind) or pa.types.is_boolean(kind) or pa.types.is_date(kind)
          or pa.types.is_timestamp(kind) or pa.types.is_time(kind)
          or pa.types.is_decimal(kind) or _is_string_view(kind, pa)):
        as_text = pc.cast(column, pa.string()) if not pa.types.is_string(kind) else column
        texts = pc.fill_null(as_text, "").to_pylist()
        if pa.types.is_decimal(kind) and decimal != ".":
            texts = [t.replace(".", decimal) for t in texts]
    else:
        raise DataError(Finding(
            "error", name, f"column {column_name!r} holds values of the Parquet type {kind}; "
            "netfolio reads text, numbers, true/false, dates and times", column=column_name))
    array = np.empty(len(texts), dtype=object)
    array[:] = texts
    return array


def _is_string_view(kind: Any, pa: Any) -> bool:
    check = getattr(pa.types, "is_string_view", None)
    return bool(check and check(kind))


def _decimal_text(value: float, decimal: str) -> str:
    """A float as a person writes it: plain decimal notation, the shortest digits that read
    back as the same number, no ".0" on whole numbers; NaN is missing."""
    if math.isnan(value):
        return ""
    if math.isinf(value):
        return "inf" if value > 0 else "-inf"
    text = repr(value)  # the shortest digits that read back as the same number
    if "e" in text:
        text = np.format_float_positional(value, unique=True, trim="-")
    elif text.endswith(".0"):
        text = text[:-2]
    return text.replace(".", decimal) if decimal != "." else text
