"""Figures of one analysed network, as SVG and PNG bytes; drawing computes no measures."""

from __future__ import annotations

import sys

import matplotlib

from ..analyse import NetworkAnalysis
from ..vocabulary import HISTOGRAM_MEASURES
from .coassignment import draw_coassignment
from .community_sizes import draw_communities
from .distributions import draw_centrality, draw_degree
from .figure import DEFAULT_SETTINGS, Figure, FigureSettings
from .mixing import draw_mixing
from .network_map import draw_map
from .node_encoding import colour_nodes
from .null_models import draw_null_tests
from .style import drawing_style

__all__ = ["Figure", "FigureSettings", "draw_network"]


def draw_network(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS
                 ) -> list[Figure]:
    """Every figure of one network, in page order: ``map``, ``degree``, one histogram per
    centrality measure the analysis holds (betweenness, closeness, harmonic, eigenvector,
    pagerank; a measure left out by the analysis is left out here), then ``communities``, then
    a ``mixing-<attribute>`` heatmap per categorical attribute and a ``scatter-<attribute>`` per
    numeric one, ``coassignment`` (when perturbed reruns ran and the matrix was kept; it belongs
    to the communities page), then one ``null-<statistic>`` per test against rewired networks.

    The same analysis gives byte-identical SVG and PNG in any process: figures live on their own
    Agg canvases (no pyplot state), the style is applied in an ``rc_context``, the SVG hash salt
    is fixed and no date or software stamp is written.
    """
    if "matplotlib.pyplot" not in sys.modules:
        # No display is needed; choosing Agg up front keeps a later pyplot import headless.
        # With pyplot already loaded (a notebook), its backend is left alone: we never use it.
        matplotlib.use("Agg")
    colours = colour_nodes(analysis, settings)
    with drawing_style():  # applied once for every figure of the network
        figures = [draw_map(analysis, settings, colours), draw_degree(analysis)]
        figures += [draw_centrality(analysis, measure) for measure in HISTOGRAM_MEASURES
                    if measure in analysis.measures.columns]
        figures.append(draw_communities(analysis, colours))
        figures += draw_mixing(analysis)
        coassignment = draw_coassignment(analysis)
        if coassignment is not None:
            figures.append(coassignment)
        figures += draw_null_tests(analysis)
    return figures
