"""Numbers and lists written out for alt text and captions."""

from __future__ import annotations

import math
from typing import Sequence

import numpy as np

__all__ = ["count_of", "format_value", "list_in_words", "node_name"]


def format_value(value: float) -> str:
    """A number as a reader would write it: whole numbers plainly, others to three significant
    figures, never in exponent form."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "no value"
    number = float(value)
    if number == 0:
        return "0"
    if number.is_integer() and abs(number) < 1e15:
        return f"{int(number):,}"
    if abs(number) >= 1000:
        return f"{number:,.0f}"
    # Three significant figures, written out in full (0.000146, not 1.46e-04).
    return np.format_float_positional(number, precision=3, unique=False, fractional=False,
                                      trim="-")

def list_in_words(items: Sequence[str], *, limit: int = 10) -> str:
    """``a, b and c``; beyond ``limit`` items, ``a, b, ... and 4 more``."""
    items = list(items)
    if len(items) > limit:
        shown = items[:limit]
        return ", ".join(shown) + f" and {len(items) - limit} more"
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def count_of(number: int, singular: str, plural: str | None = None) -> str:
    """``1 node``, ``3 nodes``."""
    word = singular if number == 1 else (plural or singular + "s")
    return f"{number:,} {word}"


def node_name(label: str, node_id: str) -> str:
    """A node as the alt text names it: its label, with the id when the two differ."""
    return label if label == node_id else f"{label} ({node_id})"
