"""The network map: nodes at the analysis layout, sized by a measure, coloured by a category
or a number, ties underneath, the five largest nodes named."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
from matplotlib import colormaps, patheffects
from matplotlib.axes import Axes
from matplotlib.backend_bases import RendererBase
from matplotlib.collections import LineCollection, PolyCollection
from matplotlib.colorbar import Colorbar
from matplotlib.colors import Normalize
from matplotlib.lines import Line2D

from ..analyse import NetworkAnalysis, tie_strengths
from ..vocabulary import count_of, list_in_words, node_name, number
from .community_map import LARGE_MAP_NODES, draw_community_map
from .figure import DEFAULT_SETTINGS, Figure, FigureSettings
from .label_placement import NodeDisc, place_labels
from .node_encoding import (
    LABELLED_NODES,
    NodeColours,
    NodeSizes,
    colour_nodes,
    size_nodes,
    top_nodes,
)
from .style import (
    INK,
    MISSING_EDGE,
    MISSING_GREY,
    NODE_EDGE,
    PNG_DPI,
    QUIET_INK,
    TIE_GREY,
    agg_renderer,
    drawing_style,
    figure_bytes,
    new_figure,
)
from .tie_geometry import arrow_shapes, tie_widths

__all__ = ["RASTER_TIES_ABOVE", "draw_map", "label_gid"]

# Above this many ties the tie layer of the SVG map is one embedded raster image (nodes, labels
# and keys stay vector shapes): 10,000 tie paths made a 3.6 MB SVG that browsers redraw slowly.
RASTER_TIES_ABOVE = 2000

# The frame, in inches: the map keeps the layout's proportions inside these bounds, the keys sit
# in their own column to its right so they never cover a node.
_MAP_MAX = (8.0, 6.0)
_MAP_MIN_SIDE = 2.5
_KEY_WIDTH = 2.6
_KEY_MIN_HEIGHT = 4.8
_TITLE_HEIGHT = 0.45
_MAX_LABEL = 28  # characters of a node label shown on the map
_PAD_POINTS = 14.0  # room around the outermost nodes for their markers


@dataclass(frozen=True)
class _Frame:
    width: float  # figure, inches
    height: float
    map_box: tuple[float, float, float, float]  # figure fractions
    key_box: tuple[float, float, float, float]
    xlim: tuple[float, float]
    ylim: tuple[float, float]
    points_per_unit: float


def label_gid(vertex: int) -> str:
    """The SVG group id of a node's name on the map (tests and style sheets can find them)."""
    return f"node-label-{vertex}"


def _frame(xy: np.ndarray) -> _Frame:
    """Size the map to the layout's shape so it fills its box at one scale in x and y."""
    low, high = (xy.min(axis=0), xy.max(axis=0)) if len(xy) else (np.zeros(2), np.ones(2))
    span = np.maximum(high - low, 1e-9)
    if span.max() <= 1e-9:
        span = np.ones(2)
    ratio = span[0] / span[1]
    width = min(_MAP_MAX[0], _MAP_MAX[1] * ratio)
    width = min(max(width, _MAP_MIN_SIDE), _MAP_MAX[0])
    height = min(max(width / ratio, _MAP_MIN_SIDE), _MAP_MAX[1])
    pad = _PAD_POINTS / 72.0  # inches
    scale = min((width - 2 * pad) / span[0], (height - 2 * pad) / span[1])  # inches per unit
    centre = (low + high) / 2
    half_w, half_h = width / (2 * scale), height / (2 * scale)
    fig_w = width + _KEY_WIDTH
    body = max(height, _KEY_MIN_HEIGHT)
    fig_h = body + _TITLE_HEIGHT
    map_bottom = (body - height) / 2
    return _Frame(
        width=fig_w, height=fig_h,
        map_box=(0.0, map_bottom / fig_h, width / fig_w, height / fig_h),
        key_box=((width + 0.25) / fig_w, 0.05 / fig_h, (_KEY_WIDTH - 0.3) / fig_w,
                 (body - 0.1) / fig_h),
        xlim=(centre[0] - half_w, centre[0] + half_w),
        ylim=(centre[1] - half_h, centre[1] + half_h),
        points_per_unit=72.0 * scale,
    )


def _radii_points(sizes: NodeSizes) -> np.ndarray:
    # A scatter marker of area s points^2 is a circle of diameter sqrt(s) points.
    radii: np.ndarray = np.sqrt(np.array(sizes.areas, dtype=float)) / 2
    return radii


def _tie_ends(analysis: NetworkAnalysis) -> tuple[tuple[tuple[int, int], ...], tuple[float, ...]]:
    """Every tie as a pair of node positions (node order) and its strength."""
    sources, targets = analysis.tie_vertices()
    edges = analysis.edges
    pairs = tuple(zip(sources.tolist(), targets.tolist()))
    if not analysis.weighted:
        return pairs, (1.0,) * len(pairs)
    strengths, _ = tie_strengths([float(w) for w in edges["weight"]], analysis.weight_means)
    return pairs, tuple(strengths)


def _draw_ties(ax: Axes, analysis: NetworkAnalysis, xy: np.ndarray, sizes: NodeSizes,
               frame: _Frame) -> None:
    pairs, strengths = _tie_ends(analysis)
    if not pairs:
        return
    widths = tie_widths(strengths, weighted=analysis.weighted)
    raster = len(pairs) > RASTER_TIES_ABOVE
    if not analysis.directed:
        segments = [(tuple(xy[a]), tuple(xy[b])) for a, b in pairs]
        ax.add_collection(LineCollection(segments, colors=TIE_GREY, linewidths=widths, zorder=1,
                                         capstyle="round", rasterized=raster), autolim=False)
        return
    segments, heads, drawn = arrow_shapes(xy, pairs, _radii_points(sizes), widths,
                                          frame.points_per_unit)
    ax.add_collection(LineCollection(segments, colors=TIE_GREY, linewidths=drawn or [0.6],
                                     zorder=1, capstyle="butt", rasterized=raster),
                      autolim=False)
    ax.add_collection(PolyCollection(heads, facecolors="#A8A8A8", edgecolors="none", zorder=1.5,
                                     rasterized=raster), autolim=False)


def _draw_nodes(ax: Axes, xy: np.ndarray, colours: NodeColours, sizes: NodeSizes) -> None:
    rims = [MISSING_EDGE if c == MISSING_GREY else NODE_EDGE for c in colours.colours]
    ax.scatter(xy[:, 0], xy[:, 1], s=list(sizes.areas), c=list(colours.colours),
               edgecolors=rims, linewidths=0.7, zorder=2)


def _short(label: str) -> str:
    return label if len(label) <= _MAX_LABEL else label[:_MAX_LABEL - 1] + "…"


def _draw_labels(ax: Axes, renderer: RendererBase, analysis: NetworkAnalysis, xy: np.ndarray,
                 sizes: NodeSizes, labelled: list[int]) -> None:
    labels = analysis.labels
    halo = [patheffects.withStroke(linewidth=3.0, foreground="white")]
    texts = []
    for vertex in labelled:
        text = ax.annotate(_short(labels[vertex]), xy=tuple(xy[vertex]), xytext=(0, 0),
                           textcoords="offset points", fontsize=8.5, fontweight="bold",
                           color=INK, zorder=4, path_effects=halo)
        text.set_gid(label_gid(vertex))
        texts.append(text)
    pixels = ax.transData.transform(xy) if len(xy) else np.zeros((0, 2))
    radii = _radii_points(sizes)
    discs = [NodeDisc(float(x), float(y), float(r) * PNG_DPI / 72.0)
             for (x, y), r in zip(pixels, radii)]
    place_labels(ax, renderer, texts, labelled, radii, discs)


def _dot(colour: str, rim: str, area: float = 60.0) -> Line2D:
    return Line2D([], [], linestyle="none", marker="o", markersize=math.sqrt(area),
                  markerfacecolor=colour, markeredgecolor=rim, markeredgewidth=0.7)


def _legend_text(colours: NodeColours) -> list[str]:
    return [f"{g.label} ({g.nodes})" for g in colours.groups]


def _colour_key(key_ax: Axes, colours: NodeColours) -> None:
    """The colour key at the top of the key column: a legend, or a colour bar for numbers."""
    style: dict[str, Any] = {"loc": "upper left", "borderaxespad": 0.0, "alignment": "left",
             "handletextpad": 0.4, "labelspacing": 0.45}
    handles = [_dot(g.colour, MISSING_EDGE if g.missing else NODE_EDGE) for g in colours.groups]
    if colours.scale is None:
        key_ax.add_artist(key_ax.legend(handles, _legend_text(colours), title=colours.attribute,
                                        bbox_to_anchor=(0.0, 1.0), **style))
        return
    cax = key_ax.inset_axes((0.02, 0.6, 0.07, 0.33))
    low, high = colours.scale.low, colours.scale.high
    bar = Colorbar(cax, cmap=colormaps[colours.scale.colormap],
                   norm=Normalize(low, high if high > low else low + 1.0))
    bar.outline.set_linewidth(0.5)
    cax.set_title(colours.attribute, loc="left", fontsize=9, fontweight="normal", pad=8)
    cax.tick_params(labelsize=8, length=2)
    if handles:
        key_ax.add_artist(key_ax.legend(handles, _legend_text(colours),
                                        bbox_to_anchor=(0.0, 0.56), **style))


def _size_key(key_ax: Axes, sizes: NodeSizes) -> None:
    finite = [v for v in sizes.values if math.isfinite(v)]
    if not finite:
        return
    low, high = min(finite), max(finite)
    shown = [low] if high == low else [low, (low + high) / 2, high]
    handles = [_dot("#C8C8C8", "#7A7A7A", sizes.area_for(v)) for v in shown]
    key_ax.legend(handles, [number(v) for v in shown], title=sizes.measure,
                  loc="lower left", bbox_to_anchor=(0.0, 0.05), borderaxespad=0.0,
                  alignment="left", labelspacing=1.1, borderpad=0.6, handletextpad=0.8)


def _alt(analysis: NetworkAnalysis, colours: NodeColours, sizes: NodeSizes,
         labelled: list[int], *, named: bool = True) -> str:
    """What the map shows, in words; ``named`` False: the map names no node."""
    n, m = len(analysis.layout), len(analysis.edges)
    kind = []
    if analysis.directed:
        kind.append("directed, arrows point from source to target")
    if analysis.weighted:
        kind.append("weighted, wider lines are stronger ties")
    kinds = f" ({'; '.join(kind)})" if kind else ""
    finite = [v for v in sizes.values if math.isfinite(v)]
    size_range = ("" if not finite else f" (all {number(finite[0])})"
                  if min(finite) == max(finite)
                  else f" (from {number(min(finite))} to {number(max(finite))})")
    if colours.scale is not None:
        colour_text = (f"colour shows {colours.attribute} on a scale from "
                       f"{number(colours.scale.low)} (dark purple) to "
                       f"{number(colours.scale.high)} (yellow)")
        if colours.missing:
            colour_text += f", with {count_of(colours.missing, 'node')} in grey for no value"
    else:
        prefix = "community " if colours.attribute == "community" else ""
        parts = [f"{prefix if g.members == 1 and not g.missing else ''}{g.label}: "
                 f"{count_of(g.nodes, 'node')}" for g in colours.groups]
        colour_text = (f"colour shows {colours.attribute}: "
                       f"{count_of(colours.categories, 'group')} ({list_in_words(parts)})")
    ids = list(analysis.measures.index)
    names = [node_name(analysis.labels[i], str(ids[i])) for i in labelled]
    who = (f" Named on the map: the {count_of(len(labelled), 'node')} with the highest "
           f"{sizes.measure}: {list_in_words(names)}." if named else
           " No node is named on the map.")
    return (f"Network map of {count_of(n, 'node')} and {count_of(m, 'tie')}{kinds}; node size "
            f"shows {sizes.measure}{size_range}; {colour_text}.{who}")


def _caption(analysis: NetworkAnalysis, colours: NodeColours, sizes: NodeSizes) -> str:
    colour = ("the communities found in the network" if colours.attribute == "community"
              else colours.attribute)
    arrows = " Arrows show the direction of each tie." if analysis.directed else ""
    return (f"Each circle is a node and each line a tie; bigger circles have a higher "
            f"{sizes.measure} and colours show {colour}.{arrows} Read who is tied to whom, not "
            "how far apart nodes are drawn: distances and positions in the drawing are not path "
            "lengths and have no meaning of their own.")


def draw_map(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS,
             colours: NodeColours | None = None) -> Figure:
    """The network map of ``analysis`` as a Figure named ``map``; above ``LARGE_MAP_NODES``
    nodes, the map by community (``community_map``)."""
    if len(analysis.layout) > LARGE_MAP_NODES:
        return draw_community_map(analysis, settings)
    colours = colours or colour_nodes(analysis, settings)
    sizes = size_nodes(analysis, settings)
    xy = np.array(analysis.layout, dtype=float).reshape(-1, 2)
    labelled = top_nodes(sizes.values, LABELLED_NODES) if settings.labels else []
    frame = _frame(xy)
    title = f"{analysis.title}: network map"
    with drawing_style():
        fig = new_figure(frame.width, frame.height)
        ax = fig.add_axes(frame.map_box)
        ax.set_xlim(*frame.xlim)
        ax.set_ylim(*frame.ylim)
        ax.set_axis_off()
        _draw_ties(ax, analysis, xy, sizes, frame)
        _draw_nodes(ax, xy, colours, sizes)
        if settings.labels:
            _draw_labels(ax, agg_renderer(fig), analysis, xy, sizes, labelled)
        fig.text(0.01, 1 - 0.12 / frame.height, title, ha="left", va="top", fontsize=10.5,
                 fontweight="bold")
        key_ax = fig.add_axes(frame.key_box)
        key_ax.set_axis_off()
        _colour_key(key_ax, colours)
        _size_key(key_ax, sizes)
        key_ax.text(0.0, 0.0, f"{count_of(len(xy), 'node')}, "
                    f"{count_of(len(analysis.edges), 'tie')}", fontsize=7.5,
                    color=QUIET_INK, ha="left", va="bottom", transform=key_ax.transAxes)
        svg, png = figure_bytes(fig, crop=True)  # legend text length varies
    alt = _alt(analysis, colours, sizes, labelled, named=settings.labels)
    return Figure(name="map", title=title, alt=alt, caption=_caption(analysis, colours, sizes),
                  svg=svg, png=png)
