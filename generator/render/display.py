"""How values are shown on pages: rounded for reading, with the exact value kept for sorting.

Full precision lives in the CSV downloads; pages round to a few significant digits.
"""

from __future__ import annotations

import math
from typing import Any

import pandas as pd

__all__ = ["MISSING", "is_missing", "shown", "sort_key", "significant"]

MISSING = "\u2014"  # an em dash marks a cell with no value
DEFAULT_DIGITS = 4


def is_missing(value: Any) -> bool:
    """True for None, NaN and pandas' NA; never raises on arrays or text."""
    if value is None:
        return True
    try:
        return bool(pd.isna(value))
    except (TypeError, ValueError):
        return False


def significant(value: float, digits: int = DEFAULT_DIGITS) -> str:
    """``value`` rounded to ``digits`` significant digits, without exponent where it reads better.

    Whole numbers keep every digit (with thousands separators); trailing zeros are dropped.
    """
    if math.isnan(value):
        return MISSING
    if math.isinf(value):
        return "\u221e" if value > 0 else "-\u221e"
    if float(value).is_integer() and abs(value) < 1e15:
        return str(int(value))  # no separators: years and codes (2015, 1234) read as written
    rounded = float(f"{value:.{digits}g}")  # round first, so 9.99996 becomes 10 before formatting
    if rounded == 0:
        return "0"
    magnitude = math.floor(math.log10(abs(rounded)))
    if magnitude < -4:
        return f"{rounded:.{digits - 1}e}"
    if magnitude >= digits - 1:
        return f"{rounded:,.0f}"
    text = f"{rounded:.{digits - 1 - magnitude}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text


def shown(value: Any, digits: int = DEFAULT_DIGITS) -> str:
    """Any cell value as page text: numbers rounded, missing values as an em dash."""
    if is_missing(value):
        return MISSING
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int) or (hasattr(value, "dtype") and pd.api.types.is_integer(value)):
        return f"{int(value):,}"
    if isinstance(value, float) or pd.api.types.is_float(value):
        return significant(float(value), digits)
    return str(value)


def sort_key(value: Any) -> str:
    """The exact value as text for the table sorter; empty when missing."""
    if is_missing(value):
        return ""
    if isinstance(value, bool):
        return "1" if value else "0"
    if pd.api.types.is_integer(value):
        return str(int(value))
    if pd.api.types.is_float(value):
        return repr(float(value))
    return str(value)
