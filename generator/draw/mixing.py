"""Attribute mixing as figures: a heatmap of tie counts between the groups of each categorical
attribute, and an ego-alter scatter of each numeric one (drawing computes no measures)."""

from __future__ import annotations

from collections import Counter
from typing import Any

import numpy as np
import pandas as pd
from matplotlib.colors import LinearSegmentedColormap

from ..analyse import MixingTable, NetworkAnalysis
from ..analyse.mixing import numeric_attributes
from ..vocabulary import count_of, number
from ..vocabulary.mixing import mixing_file_stems
from .figure import Figure
from .style import BAR_COLOUR, INK, drawing_style, figure_bytes, new_chart, quiet_axes

__all__ = ["MIXING_FIGURE_PREFIX", "SCATTER_FIGURE_PREFIX", "draw_mixing", "mixing_figure_names"]

MIXING_FIGURE_PREFIX = "mixing-"
SCATTER_FIGURE_PREFIX = "scatter-"
# One hue from near-white to deep blue: more ties read as darker in colour and in grey print,
# and an empty cell stays white so the eye finds the pattern of the filled ones.
_COUNTS = LinearSegmentedColormap.from_list("tie-counts", ["#F7FBFF", "#9CC3DE", "#2B6A99",
                                                           "#0B2E4F"])
_DARK_FROM = 0.55  # cells darker than this share of the scale get white numbers


NUMBERED_GROUPS = 12  # up to this many groups each cell shows its count
NAMED_GROUPS = 40  # up to this many groups the rows and columns are named
MAX_SIDE = 9.0  # inches: the heatmap's side at most


def mixing_figure_names(analysis: NetworkAnalysis) -> dict[str, str]:
    """The figure stem of each attribute: ``mixing-clinic`` or ``scatter-years_in_post``."""
    stems = mixing_file_stems(analysis.attributes)
    numeric = set(numeric_attributes(analysis.nodes[list(analysis.attributes)]))
    return {a: (SCATTER_FIGURE_PREFIX if a in numeric else MIXING_FIGURE_PREFIX) + stems[a]
            for a in analysis.attributes}


def _heatmap(analysis: NetworkAnalysis, table: MixingTable, name: str) -> Figure:
    counts = np.array(table.counts, dtype=float)
    k = len(table.groups)
    numbered = k <= NUMBERED_GROUPS
    side = min(max(2.4, 0.55 * k + 0.8), MAX_SIDE)
    title = f"{analysis.title}: ties between {table.attribute} groups"
    with drawing_style():
        fig, (ax,) = new_chart(side + 2.6, side, title=title, left=1.6, right=1.0, bottom=1.1)
        top = float(counts.max()) if counts.size else 0.0
        image = ax.imshow(counts, cmap=_COUNTS, vmin=0, vmax=max(top, 1.0), aspect="auto",
                          interpolation="nearest")
        if numbered:
            for r in range(k):
                for c in range(k):
                    value = counts[r, c]
                    dark = top > 0 and value / top > _DARK_FROM
                    ax.text(c, r, f"{int(value):,}", ha="center", va="center", fontsize=8.5,
                            color="white" if dark else INK)
        if k <= NAMED_GROUPS:
            small: dict[str, Any] = {} if numbered else {"fontsize": 7}
            ax.set_xticks(range(k), labels=list(table.groups), rotation=45 if k > 3 else 0,
                          ha="right" if k > 3 else "center", **small)
            ax.set_yticks(range(k), labels=list(table.groups), **small)
        else:
            ax.set_xticks([])
            ax.set_yticks([])
        if table.directed:
            ax.set_ylabel(f"tie from ({table.attribute})")
            ax.set_xlabel(f"tie to ({table.attribute})")
        else:
            ax.set_ylabel(table.attribute)
            ax.set_xlabel(table.attribute)
        ax.tick_params(length=0)
        for spine in ax.spines.values():
            spine.set_visible(False)
        bar = fig.colorbar(image, ax=ax, fraction=0.08, pad=0.04)
        bar.set_label("ties")
        bar.outline.set_visible(False)
        svg, png = figure_bytes(fig)
    inside = table.internal
    between = table.external
    ei = "not defined" if table.ei_index is None else number(table.ei_index)
    how = ("rows send, columns receive" if table.directed
           else "symmetric: a tie between two groups appears in both of their cells")
    largest = max(((counts[r, c], r, c) for r in range(k) for c in range(k)), default=None)
    biggest = ""
    if largest is not None and largest[0] > 0:
        _, r, c = largest
        biggest = (f" The largest cell is {table.groups[r]} to {table.groups[c]} with "
                   f"{count_of(int(largest[0]), 'tie')}." if table.directed else
                   f" The largest cell is {table.groups[r]} with {table.groups[c]}, "
                   f"{count_of(int(largest[0]), 'tie')}.")
    printed = (", each cell printed with its count" if numbered else
               ", shaded by count (the counts are in the mixing table)")
    alt = (f"Heatmap of tie counts between the {count_of(k, 'group')} of {table.attribute} "
           f"({how}){printed}. {count_of(inside, 'tie')} stay inside "
           f"a group and {count_of(between, 'tie')} cross between groups; E-I index {ei}."
           f"{biggest}")
    caption = (f"Each cell counts ties between two {table.attribute} groups "
               f"({'from the row group to the column group' if table.directed else 'either way'})"
               "; the diagonal holds ties inside a group. Darker cells hold more ties.")
    if k > NAMED_GROUPS:
        caption += (f" With {number(k)} groups they are not named here: rows and columns "
                    "follow the order of the mixing table.")
    if table.left_out_ties:
        caption += (f" {count_of(table.left_out_ties, 'tie')} with an end that has no "
                    f"{table.attribute} {'is' if table.left_out_ties == 1 else 'are'} left out.")
    return Figure(name=name, title=title, alt=alt, caption=caption, svg=svg, png=png)


def _tie_values(analysis: NetworkAnalysis, attribute: str) -> list[tuple[float, float]]:
    """The attribute at both ends of every tie (both ways round when undirected), ties with a
    missing end left out, in tie order."""
    values = pd.to_numeric(analysis.nodes[attribute], errors="coerce").to_numpy(dtype=float)
    sources, targets = analysis.tie_vertices()
    a, b = values[sources], values[targets]
    kept = ~(np.isnan(a) | np.isnan(b))
    a, b = a[kept], b[kept]
    if analysis.directed:
        return list(zip(a.tolist(), b.tolist()))
    both = np.empty((2 * len(a), 2))
    both[0::2, 0], both[0::2, 1] = a, b
    both[1::2, 0], both[1::2, 1] = b, a
    return [(float(x), float(y)) for x, y in both]


def _scatter(analysis: NetworkAnalysis, attribute: str, name: str) -> Figure:
    pairs = _tie_values(analysis, attribute)
    together = sorted(Counter(pairs).items())
    title = f"{analysis.title}: {attribute} at the two ends of each tie"
    with drawing_style():
        fig, (ax,) = new_chart(4.8, 3.6, title=title, left=0.9)
        if together:
            xs = [p[0] for p, _ in together]
            ys = [p[1] for p, _ in together]
            sizes = [14 + 18 * (n - 1) for _, n in together]
            ax.scatter(xs, ys, s=sizes, color=BAR_COLOUR, alpha=0.6, linewidths=0.4,
                       edgecolors="white")
            low, high = min(xs + ys), max(xs + ys)
            pad = 0.05 * (high - low or 1.0)
            ax.plot([low - pad, high + pad], [low - pad, high + pad], color=INK, linewidth=0.8,
                    linestyle=(0, (4, 3)))
            ax.set_xlim(low - pad, high + pad)
            ax.set_ylim(low - pad, high + pad)
        if analysis.directed:
            ax.set_xlabel(f"{attribute} of the node sending the tie")
            ax.set_ylabel(f"{attribute} of the node receiving it")
        else:
            ax.set_xlabel(f"{attribute} at one end")
            ax.set_ylabel(f"{attribute} at the other end")
        quiet_axes(ax, grid="both")
        svg, png = figure_bytes(fig)
    r = analysis.statistic(f"assortativity:{attribute}")
    r_text = "not defined" if r is None else number(r)
    ties = len(pairs) if analysis.directed else len(pairs) // 2
    alt = (f"Scatter plot of {count_of(ties, 'tie')}: each point places a tie at the "
           f"{attribute} of its two ends"
           f"{' (sender across, receiver up)' if analysis.directed else ', drawn both ways'}; "
           f"larger points stand for several ties with the same pair of values; a dashed "
           f"diagonal marks equal values. Numeric assortativity r = {r_text}.")
    caption = (f"Points near the dashed diagonal are ties between nodes with similar {attribute}; "
               "the numeric assortativity summarises how closely they follow it. Larger points "
               "stand for several ties with the same pair of values.")
    if not analysis.directed:
        caption += " Each undirected tie is drawn both ways, so the cloud is symmetric."
    return Figure(name=name, title=title, alt=alt, caption=caption, svg=svg, png=png)


def draw_mixing(analysis: NetworkAnalysis) -> list[Figure]:
    """A heatmap per categorical attribute with ties, then a scatter per numeric attribute."""
    names = mixing_figure_names(analysis)
    figures = [_heatmap(analysis, t, names[t.attribute]) for t in analysis.mixing if t.groups]
    numeric = numeric_attributes(analysis.nodes[list(analysis.attributes)])
    figures += [_scatter(analysis, a, names[a]) for a in numeric]
    return figures
