"""Which libraries computed the results, kept with every result."""

from __future__ import annotations

import platform

import igraph
import matplotlib
import networkx
import numpy
import pandas

from .. import __version__

__all__ = ["library_versions"]


def library_versions() -> dict[str, str]:
    return {
        "netfolio": __version__,
        "python": platform.python_version(),
        "igraph": igraph.__version__,
        "networkx": networkx.__version__,
        "numpy": numpy.__version__,
        "pandas": pandas.__version__,
        "matplotlib": matplotlib.__version__,
    }
