"""The map of a large network: its communities as a graph of their own beside a density image of
the whole layout.

Thousands of node circles and tie lines make an SVG that browsers crawl through and a picture in
which nobody can follow a tie. Above ``LARGE_MAP_NODES`` nodes the map therefore shows (left) each
community as one circle at the mean position of its members, its area growing with its members,
joined by lines whose width grows with the ties between the two communities, and (right) where
the nodes and ties of the whole layout lie, as a raster image: a two-dimensional histogram of
points along every tie and of the nodes, on a logarithmic scale. Both panels share the layout's
coordinates, so a dense patch on the right sits where its community's circle sits on the left.
The SVG stays small whatever the network's size: the circles and lines are one collection each
and the density image is one embedded raster.
"""

from __future__ import annotations

import numpy as np
from matplotlib import patheffects
from matplotlib.collections import LineCollection
from matplotlib.colors import LogNorm

from ..analyse import NetworkAnalysis
from ..vocabulary import count_of, list_in_words, number
from .figure import DEFAULT_SETTINGS, Figure, FigureSettings
from .node_encoding import colour_nodes
from .style import INK, NODE_EDGE, QUIET_INK, TIE_GREY, drawing_style, figure_bytes, new_figure
from .tie_geometry import tie_widths

__all__ = ["DENSITY_BINS", "LARGE_MAP_NODES", "MAP_COMMUNITIES", "MAP_COMMUNITY_LINKS",
           "draw_community_map"]

LARGE_MAP_NODES = 2000  # above this many nodes the map is drawn at community level
MAP_COMMUNITIES = 150  # the largest communities drawn as circles; smaller ones are left out
MAP_COMMUNITY_LINKS = 400  # lines drawn between communities, the pairs with most ties first
DENSITY_BINS = 240  # cells along each side of the density image
_POINTS_PER_TIE = 9  # points sampled along each tie for the density image
_LABELLED = 5  # the largest communities named on the map
_AREA = (30.0, 1400.0)  # marker areas (points^2) of the smallest and the largest community
_COVER = 0.3  # the circles' areas add up to at most this share of their panel
_PANEL = 4.3  # inches, each panel's side


def _community_colours(analysis: NetworkAnalysis) -> list[str]:
    member = colour_nodes(analysis, FigureSettings(color_by="community")).colours
    membership = np.asarray(analysis.communities.membership, dtype=np.int64)
    k = len(analysis.communities.sizes)
    first = np.full(k + 1, -1, dtype=np.int64)
    # the first member of each community, in node order, gives the community its colour
    order = np.arange(len(membership))[::-1]
    first[membership[order]] = order
    return [member[int(first[c])] for c in range(1, k + 1)]


def _centres(xy: np.ndarray, membership: np.ndarray, k: int) -> np.ndarray:
    counts = np.bincount(membership, minlength=k + 1)[1:].astype(float)
    sums = np.column_stack([np.bincount(membership, weights=xy[:, d], minlength=k + 1)[1:]
                            for d in (0, 1)])
    centres: np.ndarray = sums / np.maximum(counts, 1)[:, None]
    return centres


def _density(xy: np.ndarray, sources: np.ndarray, targets: np.ndarray, framed: np.ndarray
             ) -> tuple[np.ndarray, tuple[float, float, float, float]]:
    """Counts of nodes and of points along ties per cell of a DENSITY_BINS square grid around
    the ``framed`` positions (nodes outside it are not counted)."""
    low, high = framed.min(axis=0), framed.max(axis=0)
    span = float(max(high[0] - low[0], high[1] - low[1], 1e-9))
    extent = (float(low[0]), float(low[0]) + span, float(low[1]), float(low[1]) + span)
    grid = np.zeros((DENSITY_BINS, DENSITY_BINS))
    edges = (np.linspace(extent[0], extent[1], DENSITY_BINS + 1),
             np.linspace(extent[2], extent[3], DENSITY_BINS + 1))
    steps = np.linspace(0.0, 1.0, _POINTS_PER_TIE)
    chunk = max(1, 2_000_000 // _POINTS_PER_TIE)  # bounded memory on a million ties
    for start in range(0, len(sources), chunk):
        a, b = xy[sources[start:start + chunk]], xy[targets[start:start + chunk]]
        points = a[:, None, :] + (b - a)[:, None, :] * steps[None, :, None]
        counted, _, _ = np.histogram2d(points[..., 0].ravel(), points[..., 1].ravel(), bins=edges)
        grid += counted
    counted, _, _ = np.histogram2d(xy[:, 0], xy[:, 1], bins=edges)
    grid += counted
    return grid.T, extent  # rows are y for imshow


def _box(points: np.ndarray) -> tuple[float, float, float, float]:
    """A square around ``points``, centred on them."""
    if len(points) == 0:
        return (0.0, 1.0, 0.0, 1.0)
    low, high = points.min(axis=0), points.max(axis=0)
    half = max(float(high[0] - low[0]), float(high[1] - low[1]), 1e-6) / 2
    middle = (low + high) / 2
    return (float(middle[0]) - half, float(middle[0]) + half, float(middle[1]) - half,
            float(middle[1]) + half)


def draw_community_map(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS
                       ) -> Figure:
    """The map of a network above LARGE_MAP_NODES nodes, as the Figure named ``map``."""
    xy = np.array(analysis.layout, dtype=float).reshape(-1, 2)
    sizes = list(analysis.communities.sizes)
    k = len(sizes)
    membership = np.asarray(analysis.communities.membership, dtype=np.int64)
    centres = _centres(xy, membership, k)
    colours = _community_colours(analysis)
    sources, targets = analysis.tie_vertices()
    # Nodes without ties sit in a row of their own below the layout and each is a community of
    # its own; they would shrink the picture of everything else, so they are left out of both
    # panels (the caption says how many).
    tied = np.zeros(len(xy), dtype=bool)
    tied[sources] = True
    tied[targets] = True
    with_ties = np.bincount(membership[tied], minlength=k + 1)[1:] if k else np.zeros(0)
    shown = sorted((c for c in range(k) if with_ties[c] > 0),
                   key=lambda c: (-sizes[c], c))[:MAP_COMMUNITIES]
    drawn = set(shown)
    counted = analysis.community_ties()
    between: dict[tuple[int, int], int] = {}
    for (a, b), n in zip(counted.pairs, counted.counts):  # directions merged for the drawing
        if a - 1 in drawn and b - 1 in drawn:
            pair = (min(a, b) - 1, max(a, b) - 1)
            between[pair] = between.get(pair, 0) + n
    links = sorted(between, key=lambda p: (-between[p], p))[:MAP_COMMUNITY_LINKS]
    largest = max(sizes) if sizes else 1
    low, high = _AREA
    areas = np.array([low + (high - low) * sizes[c] / largest for c in shown])
    # Many communities of similar size would cover the panel several times over: the circles
    # shrink together until they fill at most _COVER of it, keeping their proportions.
    panel_area = (_PANEL * 72.0) ** 2  # points^2
    if areas.sum() > _COVER * panel_area:
        areas *= _COVER * panel_area / areas.sum()
    framed = xy[tied] if tied.any() else xy
    grid, extent = _density(xy, sources, targets, framed) if len(xy) else (
        np.zeros((1, 1)), (0.0, 1.0, 0.0, 1.0))
    isolated = int(len(xy) - tied.sum())
    title = f"{analysis.title}: network map by community"
    with drawing_style():
        fig = new_figure(2 * _PANEL + 0.5, _PANEL + 0.75)
        width, height = 2 * _PANEL + 0.5, _PANEL + 0.75
        left = fig.add_axes((0.15 / width, 0.2 / height, _PANEL / width, _PANEL / height))
        right = fig.add_axes(((_PANEL + 0.35) / width, 0.2 / height, _PANEL / width,
                              _PANEL / height))
        for ax, box in ((left, _box(centres[shown] if shown else centres)), (right, extent)):
            pad = 0.08 * max(box[1] - box[0], box[3] - box[2], 1e-9)
            ax.set_xlim(box[0] - pad, box[1] + pad)
            ax.set_ylim(box[2] - pad, box[3] + pad)
            ax.set_aspect("equal")
            ax.set_axis_off()
        if links:
            widths = tie_widths(tuple(float(between[p]) for p in links), weighted=True)
            left.add_collection(LineCollection(
                [(tuple(centres[a]), tuple(centres[b])) for a, b in links], colors=TIE_GREY,
                linewidths=widths, zorder=1, capstyle="round"), autolim=False)
        # ``shown`` runs largest first: the unlabelled circles are drawn largest first (smaller
        # ones over larger), then the labelled largest over all of them, so none is hidden.
        order = [*range(_LABELLED, len(shown)), *range(min(_LABELLED, len(shown)))]
        left.scatter(centres[shown, 0][order], centres[shown, 1][order], s=areas[order],
                     c=[colours[shown[i]] for i in order], edgecolors=NODE_EDGE,
                     linewidths=0.6, zorder=2)
        halo = [patheffects.withStroke(linewidth=2.5, foreground="white")]
        for c in shown[:_LABELLED]:  # above every circle, with a white rim to stay legible
            left.annotate(f"{c + 1}", xy=tuple(centres[c]), ha="center", va="center",
                          fontsize=8, fontweight="bold", color=INK, zorder=4,
                          path_effects=halo)
        left.set_title("communities and the ties between them", fontsize=9, loc="left",
                       color=QUIET_INK)
        filled = grid[grid > 0]
        if filled.size:
            right.imshow(np.where(grid > 0, grid, np.nan), origin="lower", extent=extent,
                         cmap="Blues", norm=LogNorm(vmin=float(filled.min()),
                                                    vmax=max(float(filled.max()),
                                                             float(filled.min()) + 1)),
                         interpolation="nearest", zorder=1)
        right.set_title("where the nodes and ties lie (darker: more)", fontsize=9, loc="left",
                        color=QUIET_INK)
        fig.text(0.1 / width, 1 - 0.1 / height, title, ha="left", va="top", fontsize=10.5,
                 fontweight="bold", color=INK)
        svg, png = figure_bytes(fig)
    return Figure(name="map", title=title, alt=_alt(analysis, shown, links, between),
                  caption=_caption(analysis, len(shown), int((with_ties > 0).sum()), isolated),
                  svg=svg, png=png)


def _alt(analysis: NetworkAnalysis, shown: list[int], links: list[tuple[int, int]],
         between: dict[tuple[int, int], int]) -> str:
    sizes = analysis.communities.sizes
    n, m = len(analysis.layout), len(analysis.edges)
    largest = [f"community {c + 1} ({count_of(sizes[c], 'node')})" for c in shown[:_LABELLED]]
    strongest = ""
    if links:
        a, b = links[0]
        strongest = (f" The most ties between two communities join communities {a + 1} and "
                     f"{b + 1} ({number(between[(a, b)])}).")
    return (f"Network map of {count_of(n, 'node')} and {count_of(m, 'tie')}, drawn by "
            f"community: {count_of(len(shown), 'community', 'communities')} as circles sized "
            "by their members; "
            f"the largest are {list_in_words(largest)}.{strongest} Beside it, a density image "
            "of where the nodes and ties of the whole layout lie.")


def _caption(analysis: NetworkAnalysis, shown: int, tied_communities: int, isolated: int) -> str:
    n = len(analysis.layout)
    left_out = (f" Only the {number(shown)} largest of the {number(tied_communities)} "
                "communities with ties are drawn." if shown < tied_communities else "")
    alone = (f" The {count_of(isolated, 'node')} without ties are left out of both drawings."
             if isolated else "")
    return (f"With {number(n)} nodes a map of every node would hide every tie, so each circle "
            f"on the left is one community (the numbers name the {_LABELLED} largest, as on "
            f"the communities page), bigger circles have more members and wider lines more "
            f"ties between two communities.{left_out} On the right, darker cells hold more "
            f"nodes and ties of the layout (a logarithmic scale).{alone} Positions in the "
            "drawing are not path lengths and have no meaning of their own.")
