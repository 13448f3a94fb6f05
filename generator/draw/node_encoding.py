"""How nodes look: which colour and size each node gets, read from the analysis results."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd
from matplotlib import colormaps
from matplotlib.colors import Normalize, to_hex

from ..analyse import NetworkAnalysis
from ..vocabulary import COMMUNITY
from .figure import DEFAULT_SETTINGS, FigureSettings
from .style import MISSING_GREY, OKABE_ITO, OTHER_GREY, SEQUENTIAL_COLORMAP

__all__ = [
    "ColourGroup",
    "ColourScale",
    "NodeColours",
    "NodeSizes",
    "colour_nodes",
    "colour_groups",
    "colour_measure",
    "size_measure",
    "size_nodes",
    "top_nodes",
]

MAX_GROUP_COLOURS = len(OKABE_ITO)  # up to this many groups each get their own colour
LABELLED_NODES = 5  # the map names this many nodes, those largest on the size measure
DEFAULT_SIZE_MEASURE = "degree"
DEFAULT_COLOUR = COMMUNITY
_AREA_RANGE = (18.0, 420.0)  # marker areas in points^2 for networks up to _FULL_SIZE_NODES nodes
_FULL_SIZE_NODES = 80


@dataclass(frozen=True)
class ColourGroup:
    """One legend entry: its text, its colour, and how many nodes it covers."""

    label: str
    colour: str
    nodes: int
    members: int = 1  # categories merged into this entry ("other" holds several)
    missing: bool = False


@dataclass(frozen=True)
class ColourScale:
    """A numeric attribute shown on a sequential colour scale from ``low`` to ``high``."""

    colormap: str
    low: float
    high: float


@dataclass(frozen=True)
class NodeColours:
    """Colour of every node (node order), and the key that explains it.

    For categories, ``groups`` lists each coloured category (largest first), then "other" and
    "no value" when present. For a numeric attribute, ``scale`` is set and ``groups`` holds at
    most the "no value" entry.
    """

    attribute: str
    colours: tuple[str, ...]
    groups: tuple[ColourGroup, ...]
    scale: ColourScale | None
    categories: int  # distinct values, missing not counted

    @property
    def missing(self) -> int:
        return sum(g.nodes for g in self.groups if g.missing)


@dataclass(frozen=True)
class NodeSizes:
    """Marker area (points^2) of every node, and the measure it shows."""

    measure: str
    values: tuple[float, ...]
    areas: tuple[float, ...]

    def area_for(self, value: float) -> float:
        return float(_scale_areas(np.array([value]), np.array(self.values, dtype=float))[0])


def colour_measure(settings: FigureSettings) -> str:
    """The attribute that colours the nodes: ``color_by``, else the communities."""
    return settings.color_by or DEFAULT_COLOUR


def size_measure(analysis: NetworkAnalysis, settings: FigureSettings) -> str:
    """The measure that sizes the nodes: ``size_by`` when the analysis has it, else degree."""
    wanted = settings.size_by or DEFAULT_SIZE_MEASURE
    return wanted if wanted in analysis.measures.columns else DEFAULT_SIZE_MEASURE


def _is_missing(value: object) -> bool:
    return value is None or value is pd.NA or (isinstance(value, float) and math.isnan(value))


def _value_order(value: object) -> tuple[int, float, str]:
    # Numbers (community 2 before community 10) before text, text case-insensitively.
    if isinstance(value, (int, float, np.integer, np.floating)):
        return (0, float(value), "")
    return (1, 0.0, str(value).casefold() + "\0" + str(value))


def colour_groups(values: list[object]) -> tuple[list[str], list[ColourGroup]]:
    """Categorical colours: groups ordered largest first (ties by value, so equal communities
    keep their numbering), the Okabe-Ito palette for up to eight groups; beyond eight, the
    seven largest keep a colour and the rest share one grey, so no two groups ever share a
    palette colour."""
    counts: dict[object, int] = {}
    for value in values:
        if not _is_missing(value):
            counts[value] = counts.get(value, 0) + 1
    ranked = sorted(counts, key=lambda v: (-counts[v], _value_order(v)))
    coloured = ranked if len(ranked) <= MAX_GROUP_COLOURS else ranked[:MAX_GROUP_COLOURS - 1]
    colour_of = {value: OKABE_ITO[i] for i, value in enumerate(coloured)}
    groups = [ColourGroup(str(v), colour_of[v], counts[v]) for v in coloured]
    rest = ranked[len(coloured):]
    if rest:
        groups.append(ColourGroup(f"other ({len(rest)} groups)", OTHER_GREY,
                                  sum(counts[v] for v in rest), members=len(rest)))
    missing = sum(1 for v in values if _is_missing(v))
    if missing:
        groups.append(ColourGroup("no value", MISSING_GREY, missing, missing=True))
    colours = [MISSING_GREY if _is_missing(v) else colour_of.get(v, OTHER_GREY) for v in values]
    return colours, groups


def colour_nodes(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS
                 ) -> NodeColours:
    """Colour every node by the communities or by a node attribute."""
    attribute = colour_measure(settings)
    if attribute == COMMUNITY:
        values: list[object] = [int(c) for c in analysis.measures["community"]]
        column = None
    else:
        column = analysis.nodes[attribute]
        values = [None if pd.isna(v) else v for v in column]
    numeric = (column is not None and pd.api.types.is_numeric_dtype(column)
               and not pd.api.types.is_bool_dtype(column))
    if numeric:
        return _numeric_colours(attribute, values)
    colours, groups = colour_groups(values)
    categories = len({v for v in values if not _is_missing(v)})
    return NodeColours(attribute, tuple(colours), tuple(groups), None, categories)


def _as_number(value: object) -> float:
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    raise TypeError(f"a numeric attribute holds {value!r}")


def _numeric_colours(attribute: str, values: list[object]) -> NodeColours:
    numbers = [None if _is_missing(v) else _as_number(v) for v in values]
    present = [v for v in numbers if v is not None]
    low, high = (min(present), max(present)) if present else (0.0, 1.0)
    norm = Normalize(vmin=low, vmax=high if high > low else low + 1.0)
    cmap = colormaps[SEQUENTIAL_COLORMAP]
    colours = [MISSING_GREY if v is None else to_hex(cmap(norm(v))) for v in numbers]
    missing = len(values) - len(present)
    groups = (ColourGroup("no value", MISSING_GREY, missing, missing=True),) if missing else ()
    return NodeColours(attribute, tuple(colours), groups,
                       ColourScale(SEQUENTIAL_COLORMAP, low, high), len(set(present)))


def _area_range(nodes: int) -> tuple[float, float]:
    # Shrink markers on big networks so they do not merge into one blot.
    shrink = min(1.0, math.sqrt(_FULL_SIZE_NODES / max(nodes, 1)))
    return max(4.0, _AREA_RANGE[0] * shrink), max(40.0, _AREA_RANGE[1] * shrink)


def _scale_areas(values: np.ndarray, reference: np.ndarray) -> np.ndarray:
    """Area grows linearly with the value between the smallest and largest marker, so a node
    twice as far along the range has twice the ink (areas, not radii, carry the value)."""
    smallest, largest = _area_range(len(reference))
    finite = reference[np.isfinite(reference)]
    if finite.size == 0 or finite.max() == finite.min():
        return np.full(values.shape, (smallest + largest) / 2)
    low, high = finite.min(), finite.max()
    share = np.clip((np.nan_to_num(values, nan=low) - low) / (high - low), 0.0, 1.0)
    areas: np.ndarray = smallest + share * (largest - smallest)
    return areas


def size_nodes(analysis: NetworkAnalysis, settings: FigureSettings = DEFAULT_SETTINGS) -> NodeSizes:
    measure = size_measure(analysis, settings)
    values = np.array(analysis.measures[measure], dtype=float)
    areas = _scale_areas(values, values)
    return NodeSizes(measure, tuple(float(v) for v in values), tuple(float(a) for a in areas))


def top_nodes(values: tuple[float, ...] | list[float], count: int = LABELLED_NODES) -> list[int]:
    """Vertex indices of the ``count`` largest values, ties to the earlier node; missing last."""
    def key(i: int) -> tuple[float, int]:
        v = values[i]
        return (-v if math.isfinite(v) else math.inf, i)
    return sorted(range(len(values)), key=key)[:count]
