"""The Figure record every drawing function returns."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Figure"]


@dataclass(frozen=True)
class Figure:
    """One figure of one network, in SVG and PNG, with the words a page needs around it.

    ``name`` is the file stem (``map``, ``degree``, ``betweenness``, ``communities``...); publish
    writes ``networks/<network id>/figures/<name>.svg`` and ``.png``.
    """

    name: str
    title: str
    alt: str  # alt text: what the figure shows, in words, for screen readers
    caption: str  # one or two sentences under the figure for a non-specialist
    svg: bytes
    png: bytes
