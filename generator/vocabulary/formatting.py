"""How numbers, shares, counts and lists are written for readers: one set of rules for every page,
figure and message. Full precision lives in the CSV downloads (``exact_text``)."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np
import pandas as pd

__all__ = [
    "DIGITS",
    "ERROR_DIGITS",
    "MISSING",
    "about",
    "at_least",
    "count",
    "count_of",
    "exact_text",
    "file_size",
    "is_missing",
    "list_in_words",
    "node_name",
    "number",
    "plural",
    "share",
    "signed",
    "sort_key",
    "value_text",
    "with_standard_error",
]

MISSING = "\u2014"  # an em dash marks a value that is not there
DIGITS = 3  # significant digits of every rounded number a reader sees
ERROR_DIGITS = 2  # significant digits of a standard error beside its estimate


def is_missing(value: Any) -> bool:
    """True for None, NaN and pandas' NA; never raises on arrays or text."""
    if value is None:
        return True
    try:
        return bool(pd.isna(value))
    except (TypeError, ValueError):
        return False


def number(value: Any, digits: int = DIGITS) -> str:
    """A measure or statistic as a reader would write it: whole numbers in full with thousands
    separators, others to ``digits`` significant digits, never in exponent form
    (0.000146, not 1.46e-04); missing values as an em dash."""
    if is_missing(value):
        return MISSING
    x = float(value)
    if math.isinf(x):
        return "\u221e" if x > 0 else "-\u221e"
    if x.is_integer() and abs(x) < 1e15:
        return f"{int(x):,}"
    rounded = float(f"{x:.{digits}g}")  # round first, so 9.9996 becomes 10.0 before formatting
    if rounded.is_integer() and abs(rounded) >= 10 ** (digits - 1):
        return f"{int(rounded):,}"
    text = np.format_float_positional(rounded, precision=digits, unique=False, fractional=False,
                                      trim="-")
    return "0" if text in ("0", "-0") else text


def at_least(value: Any) -> str:
    """A lower bound: ``at least 12``."""
    return f"at least {number(value)}"


def about(value: Any) -> str:
    """An estimate whose error is not known: ``about 0.123``."""
    return f"about {number(value)}"


def with_standard_error(value: Any, error: Any) -> str:
    """An estimate and its standard error: ``4.21 (SE 0.031)``."""
    return f"{number(value)} (SE {number(error, ERROR_DIGITS)})"


def signed(value: float, digits: int = 2) -> str:
    """A correlation-like value with a fixed number of decimals: 0.14, -0.06, never -0.00."""
    text = f"{value:.{digits}f}"
    return text[1:] if text.startswith("-") and float(text) == 0 else text


def share(value: float) -> str:
    """A share as a whole percentage; a share that is neither 0 nor 1 never rounds to 0% or 100%."""
    percent = round(value * 100)
    if percent == 0 and value > 0:
        return "under 1%"
    if percent == 100 and value < 1:
        return "over 99%"
    return f"{percent}%"


def count(n: int) -> str:
    """A count with thousands separators: 1,234."""
    return f"{int(n):,}"


def plural(n: int, singular: str, many: str | None = None) -> str:
    """The word alone: ``node`` for 1, ``nodes`` otherwise."""
    return singular if n == 1 else (many or singular + "s")


def count_of(n: int, singular: str, many: str | None = None) -> str:
    """``1 node``, ``3 nodes``, ``1,200 communities``."""
    return f"{count(n)} {plural(n, singular, many)}"


def list_in_words(items: Sequence[str], *, limit: int = 10) -> str:
    """``a, b and c``; beyond ``limit`` items, ``a, b, ... and 4 more``."""
    items = list(items)
    if len(items) > limit:
        return ", ".join(items[:limit]) + f" and {len(items) - limit} more"
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def value_text(value: Any) -> str:
    """A node attribute as page text: whole numbers as written (2015, not 2,015: years and codes),
    other numbers rounded, text as it is, missing values as an em dash."""
    if is_missing(value):
        return MISSING
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if pd.api.types.is_integer(value):
        return str(int(value))
    if pd.api.types.is_float(value):
        x = float(value)
        return str(int(x)) if x.is_integer() and abs(x) < 1e15 else number(x)
    return str(value)


def sort_key(value: Any) -> str:
    """The exact value as text for the table sorter; empty when missing."""
    if is_missing(value):
        return ""
    if isinstance(value, (bool, np.bool_)):
        return "1" if value else "0"
    if pd.api.types.is_integer(value):
        return str(int(value))
    if pd.api.types.is_float(value):
        return repr(float(value))
    return str(value)


def exact_text(value: float | None) -> str:
    """A value for a CSV file: counts as whole numbers (60, not 60.0), others at full precision,
    missing as empty."""
    if value is None:
        return ""
    if isinstance(value, int) or float(value).is_integer():
        return str(int(value))
    return repr(float(value))


def node_name(label: str, node_id: str) -> str:
    """A node as a sentence names it: its label, with the id when the two differ."""
    return label if label == node_id else f"{label} ({node_id})"


def node_anchor(position: int) -> str:
    """The fragment of a node's row in the node table, by its place in node order (from 1):
    ids may hold any character, and the place is as stable as the node list."""
    return f"node-{position + 1}"


def ordinal(rank: int) -> str:
    """1st, 2nd, 3rd, 4th, 11th, 12th, 13th, 21st, 1,001st."""
    suffix = "th" if 10 <= rank % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(rank % 10, "th")
    return f"{rank:,}{suffix}"


def file_size(size: int) -> str:
    """A file's size for reading, in decimal units as file managers show them (common practice):
    ``812 bytes``, ``4.2 kB``, ``1.3 MB``."""
    if size < 1000:
        return count_of(size, "byte")
    for unit, scale in (("kB", 1e3), ("MB", 1e6), ("GB", 1e9)):
        if size < scale * 999.95 or unit == "GB":
            return f"{size / scale:.1f} {unit}"
    raise AssertionError("unreachable")
