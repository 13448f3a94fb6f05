"""Render stage: jinja2 pages from a theme, markdown notes, and methods written from the results."""

from __future__ import annotations

from .inputs import NetworkPageInput
from .overview import CAUTIONS
from .site import render_site

__all__ = ["CAUTIONS", "NetworkPageInput", "render_site"]
