"""Palette, fonts and the byte-stable save settings every figure shares."""

from __future__ import annotations

import io
import textwrap
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any, Literal

import matplotlib
import matplotlib.style
from matplotlib.axes import Axes
from matplotlib.backend_bases import RendererBase
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure as CanvasFigure

__all__ = [
    "BAR_COLOUR",
    "INK",
    "MISSING_EDGE",
    "MISSING_GREY",
    "NODE_EDGE",
    "OKABE_ITO",
    "OTHER_GREY",
    "PNG_DPI",
    "QUIET_INK",
    "SEQUENTIAL_COLORMAP",
    "TIE_GREY",
    "agg_renderer",
    "drawing_style",
    "figure_bytes",
    "new_chart",
    "new_figure",
    "quiet_axes",
    "wrap_title",
]

# Colour-blind-safe qualitative palette, in the authors' order, with black last:
# Okabe M, Ito K: Color Universal Design (CUD) - how to make figures and presentations that are
# friendly to colorblind people. J*Fly, 2008. https://jfly.uni-koeln.de/color/
OKABE_ITO = ("#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2", "#D55E00", "#CC79A7",
             "#000000")
OTHER_GREY = "#9A9A9A"  # the groups beyond the seventh, merged
MISSING_GREY = "#E4E4E4"  # nodes with no value; drawn with a darker rim so they stay visible
MISSING_EDGE = "#8A8A8A"
# A dark rim keeps light fills (yellow, sky blue) above 3:1 contrast against the white page
# (WCAG 2.1, 1.4.11 non-text contrast) and separates overlapping nodes.
NODE_EDGE = "#404040"
TIE_GREY = "#C4C4C4"
BAR_COLOUR = "#3B6F8F"  # one quiet blue for charts where colour carries no category
INK = "#262626"
QUIET_INK = "#6B6B6B"

PNG_DPI = 150
# zlib level of the PNG copies: 3 writes them in two thirds of the time of the default 6 for
# files about 15% larger (the SVG is the figure the pages show).
PNG_COMPRESSION = 3
_PAD_INCHES = 0.12  # white margin kept around the drawing
_TITLE_CHAR_INCHES = 0.095  # a generous average width of one bold title character
# Perceptually uniform and still ordered when printed in grey (Smith & van der Walt: A Better
# Default Colormap for Matplotlib. SciPy 2015 conference talk).
SEQUENTIAL_COLORMAP = "viridis"

# rcParams applied while a figure is built and saved. Fixing the hash salt makes the SVG ids
# the same on every run; DejaVu Sans ships with matplotlib, so text metrics (and so every
# coordinate) do not depend on the fonts of the machine.
_RC: dict[Any, Any] = {
    "svg.hashsalt": "netfolio",
    # Labels and titles come from the data: "$5 vs $10" is text, not mathematics.
    "text.parse_math": False,
    "svg.fonttype": "none",
    "svg.image_inline": True,
    "font.family": ["sans-serif"],
    "font.sans-serif": ["DejaVu Sans"],  # SVG text then reads "'DejaVu Sans', sans-serif"
    "font.size": 9.0,
    "axes.titlesize": 10.5,
    "axes.titleweight": "bold",
    "axes.titlelocation": "left",
    "axes.labelsize": 9.0,
    "axes.edgecolor": QUIET_INK,
    "axes.labelcolor": INK,
    "axes.linewidth": 0.7,
    "xtick.color": QUIET_INK,
    "ytick.color": QUIET_INK,
    "xtick.labelcolor": INK,
    "ytick.labelcolor": INK,
    "text.color": INK,
    "legend.frameon": False,
    "legend.fontsize": 8.5,
    "legend.title_fontsize": 9.0,
    "figure.facecolor": "white",
    "savefig.facecolor": "white",
    "path.simplify": False,  # keep every tie, however short
    "image.interpolation": "nearest",
}


# How many drawing_style blocks are open in each thread (figures of one network are drawn in one
# thread; rcParams are global, so only the outermost block applies and restores them).
_STYLE = threading.local()


@contextmanager
def drawing_style() -> Iterator[None]:
    """Apply the house style for the duration of the block, leaving global rcParams untouched.

    The style starts from matplotlib's defaults, not from the current settings, so a user's
    matplotlibrc or a notebook's style cannot change the figures' bytes. Inside another
    ``drawing_style`` block it applies nothing again: a network's dozen figures share one
    application (setting every rcParam costs a few milliseconds per figure), and no figure
    changes rcParams, so each still starts from the same settings.
    """
    if getattr(_STYLE, "depth", 0):
        yield
        return
    with matplotlib.style.context("default"), matplotlib.rc_context(_RC):
        _STYLE.depth = 1
        try:
            yield
        finally:
            _STYLE.depth = 0


def new_figure(width: float, height: float) -> CanvasFigure:
    """A matplotlib figure on its own Agg canvas: no pyplot, so no global figure registry."""
    figure = CanvasFigure(figsize=(width, height), dpi=PNG_DPI)
    FigureCanvasAgg(figure)
    return figure


def agg_renderer(figure: CanvasFigure) -> RendererBase:
    """The renderer of a figure drawn on its own Agg canvas (as every figure here is)."""
    canvas = figure.canvas
    if not isinstance(canvas, FigureCanvasAgg):
        raise TypeError("figures are drawn on an Agg canvas")
    # matplotlib's own annotations leave get_renderer untyped.
    renderer: RendererBase = canvas.get_renderer()  # type: ignore[no-untyped-call]
    return renderer


def figure_bytes(figure: CanvasFigure, *, crop: bool = False) -> tuple[bytes, bytes]:
    """The figure as (SVG, PNG) bytes, with no date or software stamp.

    ``crop`` trims both files to one box around everything drawn (measured once for both
    formats); charts with a fixed layout skip it, as measuring costs nearly a full draw.
    """
    box = (figure.get_tightbbox(agg_renderer(figure)).padded(_PAD_INCHES) if crop else None)
    svg, png = io.BytesIO(), io.BytesIO()
    figure.savefig(svg, format="svg", bbox_inches=box, metadata={"Date": None, "Creator": None})
    figure.savefig(png, format="png", bbox_inches=box, dpi=PNG_DPI, metadata={"Software": None},
                   pil_kwargs={"compress_level": PNG_COMPRESSION})
    # No figure.clear(): clearing every axes costs a tenth of the drawing, and a figure on its
    # own canvas (no pyplot registry) is freed with its last reference anyway.
    return svg.getvalue(), png.getvalue()


def wrap_title(text: str, width_inches: float) -> str:
    """Break a long title over lines so a fixed-size figure never cuts it off."""
    return textwrap.fill(text, width=max(20, int(width_inches / _TITLE_CHAR_INCHES)),
                         break_long_words=True)


def new_chart(width: float, plot_height: float, *, title: str, left: float = 0.8,
              right: float = 0.3, bottom: float = 0.62, panels: int = 1, gap: float = 0.3
              ) -> tuple[CanvasFigure, list[Axes]]:
    """A chart with a fixed layout in inches: the title over ``panels`` side-by-side plots of
    ``plot_height``, margins sized for tick labels and axis labels. Later panels share the
    first one's y axis."""
    lines = wrap_title(title, width - 0.2)
    top = 0.25 + 0.2 * (lines.count("\n") + 1)
    height = plot_height + top + bottom
    figure = new_figure(width, height)
    panel = (width - left - right - gap * (panels - 1)) / panels
    axes: list[Axes] = []
    for index in range(panels):
        box = ((left + index * (panel + gap)) / width, bottom / height, panel / width,
               plot_height / height)
        axes.append(figure.add_axes(box, sharey=axes[0] if axes else None))
        if index:
            axes[-1].tick_params(labelleft=False)
    figure.text(0.1 / width, 1 - 0.1 / height, lines, ha="left", va="top", fontsize=10.5,
                fontweight="bold", color=INK)
    return figure, axes


def quiet_axes(ax: Axes, *, grid: Literal["both", "x", "y"] = "y") -> None:
    """Left and bottom spines only, with faint grid lines across ``grid`` behind the data."""
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.set_axisbelow(True)
    ax.grid(axis=grid, color="#E6E6E6", linewidth=0.7)
    ax.tick_params(length=3, width=0.7)
