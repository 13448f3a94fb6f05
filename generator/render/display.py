"""Kept for the checks page while it moves to ``generator.vocabulary``; use that instead."""

from __future__ import annotations

from ..vocabulary import MISSING

__all__ = ["MISSING"]
