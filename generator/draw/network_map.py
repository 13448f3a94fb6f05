"""The network map: nodes at the analysis layout, sized by a measure, coloured by a category
or a number, ties underneath, the five largest nodes named."""

from __future__ import annotations

import math

import numpy as np
from matplotlib.axes import Axes
from matplotlib.collections import LineCollection
from matplotlib.colorbar import Colorbar
from matplotlib.colors import Normalize
from matplotlib.lines import Line2D
from matplotlib.patches import FancyArrowPatch
from matplotlib import colormaps, patheffects

from ..analyse import NetworkAnalysis
from .figure import Figure
from .node_encoding import (LABELLED_NODES, NodeColours, NodeSizes, colour_nodes, size_nodes,
                            top_nodes)
from .style import (MISSING_EDGE, MISSING_GREY, NODE_EDGE, QUIET_INK, TIE_GREY, drawing_style, figure_bytes,
                    new_figure)
from .wording import count_of, format_value, list_in_words, node_name

__all__ = ["draw_map", "label_gid"]

_MAP_SIZE = (9.0, 6.6)  # inches; the map takes the left 72%, the keys the rest
_MAP_BOX = (0.0, 0.0, 0.72, 0.93)
_KEY_BOX = (0.74, 0.02, 0.26, 0.9)
_MAX_LABEL = 28  # characters of a node label shown on the map
_ARROW_CURVE = 0.08  # directed ties bend slightly so a reciprocal pair shows as two lines


def label_gid(vertex: int) -> str:
    """The SVG group id of a node's name on the map (tests and style sheets can find them)."""
    return f"node-label-{vertex}"


def _tie_widths(analysis: NetworkAnalysis) -> np.ndarray:
    m = len(analysis.edge_pairs)
    base = 0.6 if m <= 1500 else 0.3
    strengths = np.array(analysis.edge_strengths, dtype=float)
    if not analysis.weighted or m == 0 or strengths.max() == strengths.min():
        return np.full(m, base)
    # Mild growth: the strongest tie is drawn about three times as wide as the weakest.
    share = (strengths - strengths.min()) / (strengths.max() - strengths.min())
    return base * (1.0 + 2.0 * share)


def _draw_ties(ax: Axes, analysis: NetworkAnalysis, xy: np.ndarray, sizes: NodeSizes) -> None:
    if not analysis.edge_pairs:
        return
    widths = _tie_widths(analysis)
    if not analysis.directed:
        segments = [(tuple(xy[a]), tuple(xy[b])) for a, b in analysis.edge_pairs]
        ax.add_collection(LineCollection(segments, colors=TIE_GREY, linewidths=widths, zorder=1,
                                         capstyle="round"))
        return
    # Arrows stop at the rim of the target marker: marker area s (points^2) has diameter sqrt(s).
    radius = [math.sqrt(a) / 2 for a in sizes.areas]
    head = "-|>,head_length=0.55,head_width=0.25"
    for (a, b), width in zip(analysis.edge_pairs, widths):
        ax.add_patch(FancyArrowPatch(
            tuple(xy[a]), tuple(xy[b]), arrowstyle=head, mutation_scale=7 + 2 * width,
            connectionstyle=f"arc3,rad={_ARROW_CURVE}", shrinkA=radius[a], shrinkB=radius[b] + 0.5,
            color=TIE_GREY, linewidth=width, zorder=1, joinstyle="miter"))


def _draw_nodes(ax: Axes, xy: np.ndarray, colours: NodeColours, sizes: NodeSizes) -> None:
    edges = [MISSING_EDGE if c == MISSING_GREY else NODE_EDGE for c in colours.colours]
    ax.scatter(xy[:, 0], xy[:, 1], s=list(sizes.areas), c=list(colours.colours),
               edgecolors=edges, linewidths=0.7, zorder=2)


def _short(label: str) -> str:
    return label if len(label) <= _MAX_LABEL else label[:_MAX_LABEL - 1] + "…"


def _draw_labels(ax: Axes, analysis: NetworkAnalysis, xy: np.ndarray, sizes: NodeSizes,
                 labelled: list[int]) -> None:
    labels = analysis.labels
    halo = [patheffects.withStroke(linewidth=3.0, foreground="white")]
    for vertex in labelled:
        lift = math.sqrt(sizes.areas[vertex]) / 2 + 1.5
        text = ax.annotate(_short(labels[vertex]), xy=tuple(xy[vertex]), xytext=(0, lift),
                           textcoords="offset points", ha="center", va="bottom", fontsize=8.5,
                           fontweight="bold", zorder=4, path_effects=halo)
        text.set_gid(label_gid(vertex))


def _colour_key(key_ax: Axes, colours: NodeColours) -> float:
    """Draw the colour key at the top of the key panel; return where the next key may start."""
    if colours.scale is not None:
        cax = key_ax.inset_axes((0.02, 0.56, 0.07, 0.36))
        norm = Normalize(colours.scale.low, max(colours.scale.high, colours.scale.low + 1e-12))
        bar = Colorbar(cax, cmap=colormaps[colours.scale.colormap], norm=norm)
        bar.outline.set_linewidth(0.5)
        cax.set_title(colours.attribute, loc="left", fontsize=9, fontweight="bold", pad=8)
        cax.tick_params(labelsize=8, length=2)
        top = 0.52
        if not colours.groups:
            return top
        handles = [_dot(g.colour, MISSING_EDGE) for g in colours.groups]
        key_ax.legend(handles, [f"{g.label} ({g.nodes})" for g in colours.groups], loc="upper left",
                      bbox_to_anchor=(0.0, top), borderaxespad=0.0)
        return top
    handles = [_dot(g.colour, MISSING_EDGE if g.missing else NODE_EDGE) for g in colours.groups]
    legend = key_ax.legend(handles, [f"{g.label} ({g.nodes})" for g in colours.groups],
                           title=colours.attribute, loc="upper left", bbox_to_anchor=(0.0, 1.0),
                           borderaxespad=0.0, alignment="left", handletextpad=0.4,
                           labelspacing=0.45)
    key_ax.add_artist(legend)
    return 1.0


def _dot(colour: str, rim: str, area: float = 60.0) -> Line2D:
    return Line2D([], [], linestyle="none", marker="o", markersize=math.sqrt(area),
                  markerfacecolor=colour, markeredgecolor=rim, markeredgewidth=0.7)


def _size_key(key_ax: Axes, sizes: NodeSizes) -> None:
    finite = [v for v in sizes.values if math.isfinite(v)]
    if not finite:
        return
    low, high = min(finite), max(finite)
    shown = [low] if high == low else [low, (low + high) / 2, high]
    handles = [_dot("#BFBFBF", "#808080", sizes.area_for(v)) for v in shown]
    key_ax.legend(handles, [format_value(v) for v in shown], title=sizes.measure,
                  loc="lower left", bbox_to_anchor=(0.0, 0.0), borderaxespad=0.0,
                  alignment="left", labelspacing=1.1, borderpad=0.6, handletextpad=0.8)


def _limits(ax: Axes, xy: np.ndarray) -> None:
    if len(xy) == 0:
        return
    low, high = xy.min(axis=0), xy.max(axis=0)
    pad = 0.05 * max(float((high - low).max()), 1e-9) + 0.02
    ax.set_xlim(low[0] - pad, high[0] + pad)
    ax.set_ylim(low[1] - pad, high[1] + pad * 1.6)  # a little more above, for the names
    ax.set_aspect("equal", adjustable="box", anchor="C")
    ax.set_axis_off()


def _alt(analysis: NetworkAnalysis, colours: NodeColours, sizes: NodeSizes,
         labelled: list[int]) -> str:
    n, m = len(analysis.layout), len(analysis.edge_pairs)
    kind = []
    if analysis.directed:
        kind.append("directed, arrows point from source to target")
    if analysis.weighted:
        kind.append("weighted, wider lines are stronger ties")
    kinds = f" ({'; '.join(kind)})" if kind else ""
    finite = [v for v in sizes.values if math.isfinite(v)]
    size_range = (f" (from {format_value(min(finite))} to {format_value(max(finite))})"
                  if finite else "")
    if colours.scale is not None:
        colour_text = (f"colour shows {colours.attribute} on a scale from "
                       f"{format_value(colours.scale.low)} (dark purple) to "
                       f"{format_value(colours.scale.high)} (yellow)")
        if colours.missing:
            colour_text += f", with {count_of(colours.missing, 'node')} in grey for no value"
    else:
        parts = [f"{g.label}: {g.nodes}" for g in colours.groups]
        colour_text = (f"colour shows {colours.attribute}: "
                       f"{count_of(colours.categories, 'group')} ({list_in_words(parts)})")
    ids = list(analysis.measures.index)
    names = [node_name(analysis.labels[i], str(ids[i])) for i in labelled]
    return (f"Network map of {count_of(n, 'node')} and {count_of(m, 'tie')}{kinds}; node size "
            f"shows {sizes.measure}{size_range}; {colour_text}. Named on the map: the "
            f"{len(labelled)} nodes with the highest {sizes.measure}: {list_in_words(names)}.")


def _caption(analysis: NetworkAnalysis, colours: NodeColours, sizes: NodeSizes) -> str:
    colour = ("the communities found in the network" if colours.attribute == "community"
              else colours.attribute)
    arrows = " Arrows show the direction of each tie." if analysis.directed else ""
    return (f"Each circle is a node and each line a tie; bigger circles have a higher "
            f"{sizes.measure} and colours show {colour}.{arrows} Nodes drawn close together are "
            f"closely connected; where a node sits on the page has no meaning of its own.")


def draw_map(analysis: NetworkAnalysis, colours: NodeColours | None = None) -> Figure:
    """The network map of ``analysis`` as a Figure named ``map``."""
    colours = colours or colour_nodes(analysis)
    sizes = size_nodes(analysis)
    xy = np.array(analysis.layout, dtype=float).reshape(-1, 2)
    labelled = top_nodes(sizes.values, LABELLED_NODES)
    title = f"{analysis.title}: network map"
    with drawing_style():
        fig = new_figure(*_MAP_SIZE)
        ax = fig.add_axes(_MAP_BOX)
        _limits(ax, xy)
        _draw_ties(ax, analysis, xy, sizes)
        _draw_nodes(ax, xy, colours, sizes)
        _draw_labels(ax, analysis, xy, sizes, labelled)
        ax.set_title(title, loc="left", pad=10)
        key_ax = fig.add_axes(_KEY_BOX)
        key_ax.set_axis_off()
        _colour_key(key_ax, colours)
        _size_key(key_ax, sizes)
        fig.text(0.74, 0.0, f"{len(xy)} nodes, {len(analysis.edge_pairs)} ties", fontsize=7.5,
                 color=QUIET_INK, ha="left", va="top")
        svg, png = figure_bytes(fig)
    return Figure(name="map", title=title, alt=_alt(analysis, colours, sizes, labelled),
                  caption=_caption(analysis, colours, sizes), svg=svg, png=png)
