"""netfolio: turn a network-study folder into a complete, self-contained report website."""

from __future__ import annotations

__all__ = ["__version__"]

__version__ = "0.1.0"
