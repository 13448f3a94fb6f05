"""The network page's section on attribute mixing: per attribute, the form it was read in, its
mixing matrix and E-I indices (categorical) or its ego-alter scatter (numeric), and the sentence
on nodes with no ties."""

from __future__ import annotations

from dataclasses import dataclass

import pandas as pd

from ..analyse import MixingTable, NetworkAnalysis
from ..config import NetworkConfig
from ..draw.mixing import MIXING_FIGURE_PREFIX, SCATTER_FIGURE_PREFIX, mixing_figure_names
from ..vocabulary import MISSING, count_of, number
from ..vocabulary.mixing import (
    attribute_form,
    group_ei_reading,
    isolates_sentence,
    mixing_csv_names,
    projection_isolates_sentence,
)
from .figures import FigureView
from .inputs import NetworkPageInput
from .site_map import PageFrame, network_file

__all__ = ["GroupRow", "MixingSection", "MixingView", "is_mixing_figure", "isolates_text",
           "mixing_section"]


@dataclass(frozen=True)
class GroupRow:
    group: str
    nodes: int
    internal: int
    external: int
    ei: str
    reading: str


@dataclass(frozen=True)
class MixingView:
    attribute: str
    numeric: bool
    form: str  # which form the assortativity (and mixing) used, and why
    assortativity: str  # the statistic's reading, from the statistics table
    assortativity_anchor: str
    ei_reading: str  # the overall E-I index's reading (categorical only)
    ei_anchor: str
    groups: tuple[str, ...]
    matrix: tuple[tuple[str, tuple[int, ...]], ...]  # (row group, counts)
    per_group: tuple[GroupRow, ...]
    left_out: str
    csv_href: str | None
    figure: FigureView | None
    directed: bool
    matrix_left_out: str = ""  # why the matrix is only in the CSV (too many groups for a page)


# Up to this many groups the page shows the mixing matrix (a 40 x 40 table); beyond, its
# cells are in the CSV, so a page stays light with hundreds of groups.
MATRIX_ON_PAGE = 40


@dataclass(frozen=True)
class MixingSection:
    isolates: str
    attributes: tuple[MixingView, ...]


def is_mixing_figure(name: str) -> bool:
    return name.startswith((MIXING_FIGURE_PREFIX, SCATTER_FIGURE_PREFIX))


def isolates_text(analysis: NetworkAnalysis, config: NetworkConfig | None = None) -> str:
    """How many nodes have no ties and how measures treat them; a projection (``config`` says
    which) speaks of nodes sharing nothing, not of non-respondents."""
    degrees = analysis.measures["degree"]
    isolates = int((degrees == 0).sum())
    mode = config.projected_mode if config is not None else None
    if config is not None and mode is not None:
        other = config.modes[1] if mode == config.modes[0] else config.modes[0]
        return projection_isolates_sentence(isolates, len(analysis.nodes), mode=mode, other=other)
    listed = analysis.listed_nodes
    return isolates_sentence(isolates, listed if listed is not None else len(analysis.nodes),
                             listed_in_node_list=listed is not None)


def _left_out(table: MixingTable) -> str:
    parts = []
    if table.left_out_nodes:
        parts.append(f"{count_of(table.left_out_nodes, 'node')} without a value")
    if table.left_out_ties:
        parts.append(f"{count_of(table.left_out_ties, 'tie')} touching them")
    return f"Left out: {' and '.join(parts)}." if parts else ""


def mixing_section(item: NetworkPageInput, frame: PageFrame, figures: tuple[FigureView, ...],
                   readings: dict[str, tuple[str, str]]) -> MixingSection:
    """``readings`` maps a statistic to (its reading, its row's anchor) in the statistics table."""
    analysis = item.analysis
    names = mixing_figure_names(analysis)
    by_name = {f.name: f for f in figures}
    tables = {t.attribute: t for t in analysis.mixing}
    files = mixing_csv_names(analysis.attributes)
    declared = set(item.config.categorical) | set(item.config.numeric)
    views = []
    for attribute in analysis.attributes:
        numeric = bool(pd.api.types.is_numeric_dtype(analysis.nodes[attribute].dtype))
        assort, assort_anchor = readings.get(f"assortativity:{attribute}", ("", ""))
        ei_text, ei_anchor = readings.get(f"ei_index:{attribute}", ("", ""))
        table = tables.get(attribute)
        file = files[attribute] if table is not None else None
        views.append(MixingView(
            attribute=attribute, numeric=numeric,
            form=attribute_form(numeric=numeric, declared=attribute in declared),
            assortativity=assort, assortativity_anchor=assort_anchor,
            ei_reading=ei_text, ei_anchor=ei_anchor,
            groups=table.groups if table else (),
            matrix=tuple(zip(table.groups, table.counts))
            if table and len(table.groups) <= MATRIX_ON_PAGE else (),
            matrix_left_out=(f"With {number(len(table.groups))} groups the matrix of ties "
                             "between them is not shown here; the CSV holds every cell."
                             if table and len(table.groups) > MATRIX_ON_PAGE else ""),
            per_group=tuple(GroupRow(g.group, g.nodes, g.internal, g.external,
                                     MISSING if g.ei is None else number(g.ei),
                                     group_ei_reading(g.ei, g.internal, g.external))
                            for g in table.per_group) if table else (),
            left_out=_left_out(table) if table else "",
            csv_href=frame.href(network_file(item.id, file)) if file else None,
            figure=by_name.get(names[attribute]),
            directed=analysis.directed,
        ))
    return MixingSection(isolates=isolates_text(analysis, item.config), attributes=tuple(views))
