"""Give igraph's random steps a private generator seeded from the study seed."""

from __future__ import annotations

import random
from collections.abc import Iterator
from contextlib import contextmanager

import igraph as ig

__all__ = ["seeded_igraph"]


@contextmanager
def seeded_igraph(seed: int | str) -> Iterator[None]:
    """igraph draws from Python's global ``random`` unless told otherwise; inside this block it
    draws from ``random.Random(seed)`` instead, and the default comes back afterwards."""
    ig.set_random_number_generator(random.Random(seed))
    try:
        yield
    finally:
        ig.set_random_number_generator(random)
