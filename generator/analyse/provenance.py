"""Which libraries computed the results, kept with every result."""

from __future__ import annotations

import platform

import igraph
import networkx
import numpy

from .. import __version__

__all__ = ["library_versions"]


def library_versions() -> dict[str, str]:
    return {
        "netfolio": __version__,
        "python": platform.python_version(),
        "igraph": igraph.__version__,
        "networkx": networkx.__version__,
        "numpy": numpy.__version__,
    }
