"""Community sizes as horizontal bars, community 1 (the largest) at the top."""

from __future__ import annotations

from matplotlib.ticker import MaxNLocator

from ..analyse import NetworkAnalysis
from ..vocabulary import community_method, count_of, list_in_words, number
from .figure import Figure
from .node_encoding import NodeColours
from .style import BAR_COLOUR, OTHER_GREY, drawing_style, figure_bytes, new_chart, quiet_axes

__all__ = ["MAX_BARS", "draw_communities"]

MAX_BARS = 40  # beyond this many communities only the largest are drawn; the alt text says so


def _bar_colours(count: int, colours: NodeColours | None) -> list[str]:
    """The map's community colours when the map is coloured by community, else one quiet blue."""
    if colours is None or colours.attribute != "community" or colours.scale is not None:
        return [BAR_COLOUR] * count
    by_label = {g.label: g.colour for g in colours.groups if g.members == 1 and not g.missing}
    return [by_label.get(str(c), OTHER_GREY) for c in range(1, count + 1)]


def draw_communities(analysis: NetworkAnalysis, colours: NodeColours | None = None) -> Figure:
    """Horizontal bar chart of community sizes, as numbered by the analysis (largest first)."""
    found = analysis.communities
    sizes = list(found.sizes)
    shown = sizes[:MAX_BARS]
    k = len(sizes)
    title = f"{analysis.title}: community sizes"
    with drawing_style():
        fig, (ax,) = new_chart(6.4, 0.3 + 0.28 * len(shown), title=title, left=1.15)
        rows = list(range(len(shown)))
        ax.barh(rows, shown, height=0.72, color=_bar_colours(len(shown), colours), linewidth=0)
        ax.set_yticks(rows, [f"community {c}" for c in range(1, len(shown) + 1)])
        ax.invert_yaxis()  # community 1 at the top
        for row, size in zip(rows, shown):
            ax.annotate(str(size), xy=(size, row), xytext=(3, 0), textcoords="offset points",
                        va="center", ha="left", fontsize=8)
        ax.set_xlabel("number of nodes" if k <= MAX_BARS else
                      f"number of nodes (the {MAX_BARS} largest of {k} communities shown)")
        ax.xaxis.set_major_locator(MaxNLocator(integer=True))
        ax.set_xlim(0, max(shown, default=1) * 1.1 + 0.5)
        quiet_axes(ax, grid="x")
        ax.tick_params(axis="y", length=0)
        svg, png = figure_bytes(fig)
    modularity = (f"; modularity {number(found.modularity)}"
                  if found.modularity is not None else "")
    hidden = (f" Only the {MAX_BARS} largest are drawn; the other {k - MAX_BARS} hold "
              f"{count_of(sum(sizes[MAX_BARS:]), 'node')}." if k > MAX_BARS else "")
    alt = (f"Horizontal bar chart of the sizes of {count_of(k, 'community', 'communities')}, "
           f"largest first: {list_in_words([str(s) for s in sizes], limit=12)} nodes"
           f"{modularity}.{hidden}")
    if found.modularity is None:
        caption = "The network has no ties, so every node forms a community of its own."
    else:
        caption = (f"The {community_method(found.method).title} method (best of {found.runs} runs) "
                   "split the network into "
                   f"{count_of(k, 'community', 'communities')}: groups of nodes with more ties "
                   f"among themselves than to the rest. Each bar is one community; its length is "
                   f"the number of nodes in it.")
    return Figure(name="communities", title=title, alt=alt, caption=caption, svg=svg, png=png)
