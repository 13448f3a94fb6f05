"""The co-assignment matrix: for every pair of nodes, the share of perturbed reruns that put them
in one community, nodes ordered by their kept community."""

from __future__ import annotations

from matplotlib.patches import Rectangle

from ..analyse import NetworkAnalysis
from ..vocabulary import count_of, number, share
from .figure import Figure
from .style import INK, drawing_style, figure_bytes, new_chart

__all__ = ["COASSIGNMENT", "draw_coassignment"]

COASSIGNMENT = "coassignment"  # the figure's name (file stem)
_LABELLED_FROM = 3  # communities this big or bigger get a tick label at their middle


def draw_coassignment(analysis: NetworkAnalysis) -> Figure | None:
    """A heat map of the co-assignment matrix, or None when it was not kept (no perturbed
    reruns, or more nodes than the analysis keeps a matrix for)."""
    stability = analysis.stability
    if not stability.ran or stability.together is None:
        return None
    membership = list(analysis.communities.membership)
    order = sorted(range(len(membership)), key=lambda v: (membership[v], v))
    runs = stability.perturbations
    matrix = [[stability.together[i][j] / runs for j in order] for i in order]
    # Where each community starts and ends in the order, for its borders and labels.
    spans: list[tuple[int, int, int]] = []
    for position, vertex in enumerate(order):
        c = membership[vertex]
        if spans and spans[-1][0] == c:
            spans[-1] = (c, spans[-1][1], position + 1)
        else:
            spans.append((c, position, position + 1))
    n = len(order)
    title = f"{analysis.title}: how often nodes stay together"
    with drawing_style():
        fig, (ax,) = new_chart(6.4, 5.2, title=title, left=1.0, right=1.2, bottom=0.9)
        image = ax.imshow(matrix, cmap="Blues", vmin=0.0, vmax=1.0, interpolation="nearest",
                          aspect="equal")
        for _, start, end in spans:
            if end - start > 1:
                ax.add_patch(Rectangle((start - 0.5, start - 0.5), end - start, end - start,
                                       fill=False, edgecolor=INK, linewidth=0.8))
        ticks = [(start + end - 1) / 2 for _, start, end in spans if end - start >= _LABELLED_FROM]
        names = [str(c) for c, start, end in spans if end - start >= _LABELLED_FROM]
        ax.set_xticks(ticks, names)
        ax.set_yticks(ticks, names)
        ax.set_xlabel("nodes, grouped by community (numbers: communities)")
        ax.set_ylabel("nodes, grouped by community")
        ax.tick_params(length=0, labelsize=8)
        for side in ax.spines.values():
            side.set_visible(False)
        bar = fig.colorbar(image, ax=ax, fraction=0.046, pad=0.03)
        bar.set_label("share of perturbed reruns together", fontsize=8)
        bar.ax.tick_params(labelsize=8)
        svg, png = figure_bytes(fig, crop=True)  # the square plot leaves margins
    robustness = ("" if stability.robustness_ari is None else
                  f" The mean adjusted Rand index with the kept communities is "
                  f"{number(stability.robustness_ari)}.")
    alt = (f"Heat map of {n} by {n} cells, one row and one column per node, nodes grouped by "
           f"their {count_of(analysis.communities.count, 'community', 'communities')} (largest "
           f"first, outlined). A cell's shade is the share of {runs} reruns, each with "
           f"{share(stability.share)} of the ties removed at random, that put the two nodes in "
           f"one community: dark squares along the diagonal are communities that hold together, "
           f"shade outside them marks nodes that move between communities.{robustness}")
    caption = (f"Each cell is a pair of nodes; the darker it is, the more often the {runs} reruns "
               f"on data with {share(stability.share)} of the ties removed kept the two together. "
               "Outlined squares are the communities reported.")
    return Figure(name=COASSIGNMENT, title=title, alt=alt, caption=caption, svg=svg, png=png)

