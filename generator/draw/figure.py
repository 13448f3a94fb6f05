"""The Figure record every drawing function returns, and the settings figures are drawn with."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["DEFAULT_SETTINGS", "Figure", "FigureSettings"]


@dataclass(frozen=True, kw_only=True)
class FigureSettings:
    """How one network's figures encode nodes: the node attribute (or "community") that colours
    them and the measure that sizes them; None takes the defaults (community, degree).
    ``labels`` False draws the map without node names (a partner copy names no one)."""

    color_by: str | None = None
    size_by: str | None = None
    labels: bool = True


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


DEFAULT_SETTINGS = FigureSettings()  # colour by community, size by degree
