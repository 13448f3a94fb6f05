"""The explorable map's data: where each node sits, how big and in which colour under each
colouring a reader can switch to, its ties and its main measures, written as a script file the
theme's ``explore.js`` reads (a script, not fetched JSON, so the map works opened from disk).

The colours and sizes are the static map's (``node_encoding``), so the two maps agree.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..analyse import NetworkAnalysis, tie_strengths
from ..vocabulary import COMMUNITY, measure, node_anchor, node_name, number
from .figure import DEFAULT_SETTINGS, FigureSettings
from .node_encoding import NodeColours, colour_measure, colour_nodes, size_nodes
from .tie_geometry import tie_widths

__all__ = ["COMMUNITY_LEVEL", "EXPLORER_MAX_NODES", "NODE_LEVEL", "ColourChoice", "ExplorerData",
           "community_explorer_data", "explorer_data"]

# Above this many nodes the explorable map shows the communities instead of the nodes:
# thousands of SVG nodes make a phone's browser crawl, and a map that dense shows nobody a tie.
EXPLORER_MAX_NODES = 2000
NODE_LEVEL = "node"
COMMUNITY_LEVEL = "community"
_COMMUNITY_RADII = (8.0, 60.0)  # view units: the smallest and the largest community
_VIEW = 1000.0  # the map's coordinates run 0..1000 along its longer side
_PAD = 40.0
_POINTS_PER_VIEW = 576.0 / _VIEW  # the static map is 8 in (576 pt) wide at most


@dataclass(frozen=True)
class ColourChoice:
    """One colouring the reader can pick: its name (the attribute, or ``community``), the
    title shown in the menu, every node's colour and the key."""

    name: str
    title: str
    colours: tuple[str, ...]
    key: tuple[tuple[str, str, int], ...]  # (text, colour, nodes)


@dataclass(frozen=True)
class ExplorerData:
    network_id: str
    directed: bool
    ids: tuple[str, ...]
    labels: tuple[str, ...]
    xy: tuple[tuple[float, float], ...]  # 0.._VIEW, y downwards as on screen
    radii: tuple[float, ...]
    ties: tuple[tuple[int, int, float, str], ...]  # source, target, line width, weight text
    colourings: tuple[ColourChoice, ...]  # the first is the one the static map uses
    facts: tuple[tuple[str, tuple[str, ...]], ...]  # (measure title, every node's value text)
    size_title: str
    width: float
    height: float
    level: str = NODE_LEVEL  # each circle is a node, or (COMMUNITY_LEVEL) a community

    def script(self) -> bytes:
        """The data file: one assignment of a JSON object. It is a script file of its own,
        never inlined in a page, and JSON string literals are valid script, so no label can
        end the script; texts are kept as written (UTF-8), so a search of the site's files for
        a name (as the partner bundle's leak check does) finds them here too."""
        data = {
            "network": self.network_id, "directed": self.directed,
            "width": self.width, "height": self.height,
            "ids": self.ids, "labels": self.labels,
            "x": [p[0] for p in self.xy], "y": [p[1] for p in self.xy],
            "r": self.radii, "ties": self.ties,
            "colourings": [{"name": c.name, "title": c.title, "colours": c.colours,
                            "key": c.key} for c in self.colourings],
            "facts": [{"title": t, "values": v} for t, v in self.facts],
            "anchors": [node_anchor(i) for i in range(len(self.ids))],
            "sizeTitle": self.size_title, "level": self.level,
        }
        text = json.dumps(data, ensure_ascii=False, separators=(",", ":"))
        return (f"/* netfolio: the explorable map of network {self.network_id}, read by "
                f"static/explore.js */\nwindow.netfolioMaps = window.netfolioMaps || {{}};\n"
                f"window.netfolioMaps[{json.dumps(self.network_id)}] = {text};\n").encode()


def _positions(analysis: NetworkAnalysis) -> tuple[np.ndarray, float, float]:
    """Layout positions scaled to the view, keeping proportions; y flipped to screen order."""
    xy = np.array(analysis.layout, dtype=float).reshape(-1, 2)
    if len(xy) == 0:
        return xy, _VIEW, _VIEW
    low, high = xy.min(axis=0), xy.max(axis=0)
    span = np.maximum(high - low, 1e-9)
    scale = (_VIEW - 2 * _PAD) / span.max()
    width = span[0] * scale + 2 * _PAD
    height = max(span[1] * scale + 2 * _PAD, 0.4 * _VIEW)  # a flat layout still has room
    x = (xy[:, 0] - low[0]) * scale + _PAD
    y = height - ((xy[:, 1] - low[1]) * scale + _PAD)
    if span[1] * scale + 2 * _PAD < height:  # centre a flat layout vertically
        y -= (height - (span[1] * scale + 2 * _PAD)) / 2
    return np.column_stack([x, y]), float(width), float(height)


def _choice(analysis: NetworkAnalysis, attribute: str) -> ColourChoice:
    colours: NodeColours = colour_nodes(analysis, FigureSettings(color_by=attribute))
    if colours.scale is not None:
        low, high = colours.scale.low, colours.scale.high
        present = [(c, v) for c, v in zip(colours.colours, analysis.nodes[attribute])
                   if not pd.isna(v)]
        lowest = next(c for c, v in present if float(v) == low)
        highest = next(c for c, v in present if float(v) == high)
        key = [(f"lowest: {number(low)}", lowest, sum(1 for _, v in present if float(v) == low)),
               (f"highest: {number(high)}", highest,
                sum(1 for _, v in present if float(v) == high))]
    else:
        key = []
    key += [(g.label, g.colour, g.nodes) for g in colours.groups]
    title = measure(COMMUNITY).title if attribute == COMMUNITY else attribute
    return ColourChoice(attribute, title, colours.colours, tuple(key))


def _weight_text(value: object) -> str:
    return "" if value is None or (isinstance(value, float) and math.isnan(value)) else number(value)


def community_explorer_data(analysis: NetworkAnalysis) -> ExplorerData | None:
    """The map of the communities: each community a circle at the mean position of its members,
    its area growing with its members, and one line per pair of communities with ties between
    them, its width growing with their count (directed: one line per direction). None for a
    network without nodes."""
    sizes = analysis.communities.sizes
    if not sizes:
        return None
    k = len(sizes)
    membership = np.array(analysis.communities.membership, dtype=int)
    xy, width, height = _positions(analysis)
    centres = [xy[membership == c].mean(axis=0) for c in range(1, k + 1)]
    low, high = _COMMUNITY_RADII
    largest = max(sizes)
    radii = tuple(round(low + (high - low) * math.sqrt(size / largest), 2) for size in sizes)
    counted = analysis.community_ties()
    inside = counted.inside
    # 0-based communities from here on, as the map's circles are numbered
    between = {(a - 1, b - 1): n for (a, b), n in zip(counted.pairs, counted.counts)}
    pairs = sorted(between)
    counts = tuple(float(between[pair]) for pair in pairs)
    widths = tie_widths(counts, weighted=True) / _POINTS_PER_VIEW
    ties = tuple((a, b, round(float(w), 2), number(between[(a, b)]))
                 for (a, b), w in zip(pairs, widths))
    member_colours = colour_nodes(analysis, FigureSettings(color_by=COMMUNITY)).colours
    colours = tuple(member_colours[int(np.flatnonzero(membership == c)[0])] for c in range(1, k + 1))
    key = tuple((f"community {c}", colours[c - 1], sizes[c - 1]) for c in range(1, k + 1))
    outside = [0] * k
    for (a, b), n in between.items():
        outside[a] += n
        outside[b] += n
    facts = (("Members", tuple(number(size) for size in sizes)),
             ("Ties inside", tuple(number(n) for n in inside)),
             ("Ties with other communities", tuple(number(n) for n in outside)))
    return ExplorerData(
        network_id=analysis.network_id, directed=analysis.directed,
        ids=tuple(str(c) for c in range(1, k + 1)),
        labels=tuple(f"Community {c}" for c in range(1, k + 1)),
        xy=tuple((round(float(x), 2), round(float(y), 2)) for x, y in centres),
        radii=radii, ties=ties,
        colourings=(ColourChoice(COMMUNITY, measure(COMMUNITY).title, colours, key),),
        facts=facts, size_title="members", width=round(width, 2), height=round(height, 2),
        level=COMMUNITY_LEVEL,
    )


def explorer_data(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS
                  ) -> ExplorerData | None:
    """The explorable map of ``analysis``: of its nodes, or above ``EXPLORER_MAX_NODES`` nodes
    of its communities."""
    n = len(analysis.nodes)
    if n > EXPLORER_MAX_NODES:
        return community_explorer_data(analysis)
    xy, width, height = _positions(analysis)
    sizes = size_nodes(analysis, settings)
    # A marker of area s points^2 has radius sqrt(s)/2 points; the view is 1000 units wide.
    radii = tuple(round(math.sqrt(a) / 2 / _POINTS_PER_VIEW, 2) for a in sizes.areas)
    sources, targets = analysis.tie_vertices()
    edges = analysis.edges
    weights: list[object] = [None] * len(edges)
    strengths = (1.0,) * len(edges)
    if analysis.weighted:
        written = [float(w) for w in edges["weight"]]
        weights = list(written)
        strengths = tuple(tie_strengths(written, analysis.weight_means)[0])
    widths = tie_widths(strengths, weighted=analysis.weighted) / _POINTS_PER_VIEW
    ties = tuple((s, t, round(float(w), 2), _weight_text(weight))
                 for s, t, w, weight in zip(sources.tolist(), targets.tolist(), widths, weights))
    first = colour_measure(settings)
    names = [first] + [COMMUNITY] + [a for a in analysis.attributes]
    colourings = tuple(_choice(analysis, a) for a in dict.fromkeys(names))
    facts = tuple((measure(name).title, tuple(
        number(v) if not pd.isna(v) else "" for v in analysis.measures[name]))
        for name in analysis.measures.columns)  # every measure, in nodes.csv order
    labels = tuple(node_name(str(label), str(node)) for node, label
                   in zip(analysis.nodes.index, analysis.nodes["label"]))
    return ExplorerData(
        network_id=analysis.network_id, directed=analysis.directed,
        ids=tuple(str(i) for i in analysis.nodes.index), labels=labels,
        xy=tuple((round(float(x), 2), round(float(y), 2)) for x, y in xy),
        radii=radii, ties=ties, colourings=colourings, facts=facts,
        size_title=measure(sizes.measure).title, width=round(width, 2), height=round(height, 2),
    )
