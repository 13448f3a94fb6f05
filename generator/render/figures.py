"""How figures appear on a network page: addresses of their files, natural size and width."""

from __future__ import annotations

import re
from dataclasses import dataclass

from ..draw.figure import Figure
from .site_map import PageFrame, figure_file

__all__ = ["FigureView", "figure_view", "figure_views"]


@dataclass(frozen=True)
class FigureView:
    name: str
    title: str
    alt: str
    caption: str
    svg_href: str
    png_href: str
    anchor: str
    width: int | None  # CSS pixels at natural size, from the <svg> tag; None if unknown
    height: int | None
    wide: bool  # much wider than tall (several panels): shown across the full page width


_SVG_TAG = re.compile(rb"<svg\b[^>]*>", re.S)
_LENGTH = {"": 1.0, "px": 1.0, "pt": 4 / 3, "in": 96.0, "cm": 96 / 2.54, "mm": 96 / 25.4}
_WIDE = 1.8  # width / height above which a figure gets the whole row


def _svg_length(tag: str, name: str) -> float | None:
    match = re.search(rf"""\b{name}=["']\s*([\d.]+)\s*([a-z]*)\s*["']""", tag)
    if not match or match.group(2) not in _LENGTH:
        return None
    try:
        return float(match.group(1)) * _LENGTH[match.group(2)]
    except ValueError:
        return None


def _svg_size(svg: bytes) -> tuple[int, int] | None:
    """The figure's natural size in CSS pixels, from the width and height of its <svg> tag."""
    match = _SVG_TAG.search(svg[:8192])
    if not match:
        return None
    tag = match.group(0).decode("utf-8", "replace")
    width, height = _svg_length(tag, "width"), _svg_length(tag, "height")
    if not width or not height:
        return None
    return round(width), round(height)


def figure_view(frame: PageFrame, figure: Figure, svg_path: str, png_path: str) -> FigureView:
    """How ``figure``, written at ``svg_path`` and ``png_path`` in the site, shows on a page."""
    size = _svg_size(figure.svg)
    return FigureView(
        name=figure.name, title=figure.title, alt=figure.alt, caption=figure.caption,
        svg_href=frame.href(svg_path), png_href=frame.href(png_path),
        anchor=f"figure-{figure.name}",
        width=size[0] if size else None,
        height=size[1] if size else None,
        wide=bool(size and size[0] / size[1] > _WIDE),
    )


def figure_views(frame: PageFrame, network_id: str, figures: list[Figure]
                 ) -> tuple[FigureView, ...]:
    return tuple(figure_view(frame, f, figure_file(network_id, f.name, "svg"),
                             figure_file(network_id, f.name, "png")) for f in figures)
