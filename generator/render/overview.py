"""The front page context: summary, networks at a glance, and the cautions every site carries."""

from __future__ import annotations

from dataclasses import dataclass

from markupsafe import Markup

from ..analyse import NetworkAnalysis
from ..analyse.across import StudyTable
from ..draw.figure import Figure
from ..vocabulary import exact_text, node_name, number, statistic_title, statistic_value
from ..vocabulary.findings import (
    bridge_finding,
    community_finding,
    reciprocity_finding,
    transitivity_finding,
    within_group_finding,
)
from .describe import network_kind
from .figures import FigureView, figure_view
from .inputs import NetworkPageInput
from .site_map import (
    STUDY_STATISTICS,
    PageFrame,
    figure_file,
    network_page,
    nodes_page,
    study_figure,
)

__all__ = ["CAUTIONS", "GLANCE_STATISTICS", "GlanceCell", "GlanceRow", "NetworkCard", "OverviewPage",
           "StudyOverview", "glance_columns", "glance_rows", "key_findings", "network_cards",
           "overview_context"]

MAP_FIGURE = "map"  # the static map each network page shows; the front page shows it small
MAX_FINDINGS = 5

CAUTIONS: tuple[str, ...] = (
    "Network data about people is personal data: names, attributes and ties identify people, and "
    "so can a position in the network alone.",
    "Use the data only within the consent people gave, and keep access to this report to those who "
    "need it for the study.",
    "Local data-protection law, research-ethics rules and the study's ethics approval take "
    "precedence over anything this report shows or allows.",
    "Pseudonymised does not mean anonymous: a person can often be recognised from their ties and "
    "attributes even without a name.",
    "Centrality describes a position in the measured network, not a person's worth or "
    "performance; someone with few ties may be new, part-time, or simply not named by others.",
)


# The statistics the front page's table gives for every network, when a network has them;
# files/study-statistics.csv has them all (attribute statistics too).
GLANCE_STATISTICS = ("nodes", "edges", "density", "reciprocity", "transitivity",
                     "average_clustering", "components", "largest_component_share", "diameter",
                     "average_path_length", "degree_assortativity", "modularity", "communities",
                     "degree_centralization", "betweenness_centralization")


@dataclass(frozen=True)
class StudyOverview:
    """What the front page shows of the study as a whole: every network's statistics, and how
    the main ones spread when there are many networks."""

    table: StudyTable
    spread: Figure | None = None


@dataclass(frozen=True)
class GlanceCell:
    text: str  # as read: rounded, a dash where not defined
    value: str  # the exact value the table sorts by; empty where not defined


@dataclass(frozen=True)
class GlanceRow:
    title: str
    href: str
    nodes_href: str
    kind: str
    cells: tuple[GlanceCell, ...]  # one per column of OverviewPage.columns


def glance_columns(table: StudyTable) -> tuple[str, ...]:
    """The statistics of GLANCE_STATISTICS that at least one network has."""
    return tuple(name for name in GLANCE_STATISTICS if name in table.statistics
                 and any(v is not None for v in table.column(name)))


def glance_rows(frame: PageFrame, networks: list[NetworkPageInput], table: StudyTable,
                columns: tuple[str, ...]) -> tuple[GlanceRow, ...]:
    at = {net: i for i, net in enumerate(table.networks)}
    rows = []
    for item in networks:
        row = at[item.id]
        values = table.values[row]
        cells = []
        for name in columns:
            j = table.statistics.index(name)
            value = values[j]
            text = number(value) if value is None or not table.estimates else statistic_value(
                value, estimate=table.estimates[row][j], standard_error=table.errors[row][j])
            cells.append(GlanceCell(text, exact_text(value)))
        rows.append(GlanceRow(
            title=item.title,
            href=frame.href(network_page(item.id)),
            nodes_href=frame.href(nodes_page(item.id)),
            kind=network_kind(item.analysis),
            cells=tuple(cells),
        ))
    return tuple(rows)


def _ei_attribute(item: NetworkPageInput) -> str | None:
    """The attribute whose ties-within-groups finding the front page gives: the one the figures
    colour by if it has an E-I index, else the first that has one."""
    names = [s.name.partition(":")[2] for s in item.analysis.statistics
             if s.name.startswith("ei_index:") and s.value is not None]
    if item.config.color_by in names:
        return item.config.color_by
    return names[0] if names else None


def _bridge(analysis: NetworkAnalysis) -> str | None:
    if "betweenness" not in analysis.measures or analysis.measures["betweenness"].isna().all():
        return None
    ranked = analysis.measures["betweenness"].dropna().sort_values(ascending=False, kind="stable")
    top = str(ranked.index[0])
    runner_up = float(ranked.iloc[1]) if len(ranked) > 1 else None
    name = node_name(str(analysis.nodes.at[top, "label"]), top)
    return bridge_finding(name, float(ranked.iloc[0]), runner_up)


def key_findings(item: NetworkPageInput) -> tuple[str, ...]:
    """Three to five sentences from the results: the largest community, how much ties stay
    within a group, who bridges the most, then reciprocity and clustering."""
    analysis = item.analysis
    findings: list[str | None] = [community_finding(analysis.communities.sizes, len(analysis.nodes))]
    attribute = _ei_attribute(item)
    if attribute is not None:
        ei_index = analysis.statistic(f"ei_index:{attribute}")
        assert ei_index is not None
        findings.append(within_group_finding(
            attribute, ei_index, analysis.significance.test(f"assortativity:{attribute}")))
    findings.append(_bridge(analysis))
    reciprocity = analysis.statistic("reciprocity")
    if analysis.directed and reciprocity is not None:
        findings.append(reciprocity_finding(reciprocity))
    transitivity = analysis.statistic("transitivity")
    if transitivity is not None:
        findings.append(transitivity_finding(transitivity, analysis.significance.test("transitivity")))
    return tuple(f for f in findings if f is not None)[:MAX_FINDINGS]


@dataclass(frozen=True)
class NetworkCard:
    """One network on the front page: its map, small, and its key findings."""

    title: str
    href: str
    thumbnail: str | None  # the static map's SVG, when the network has one
    thumbnail_alt: str
    findings: tuple[str, ...]


def network_cards(frame: PageFrame, networks: list[NetworkPageInput]) -> tuple[NetworkCard, ...]:
    cards = []
    for item in networks:
        drawn = any(f.name == MAP_FIGURE for f in item.figures)
        cards.append(NetworkCard(
            title=item.title,
            href=frame.href(network_page(item.id)),
            thumbnail=frame.href(figure_file(item.id, MAP_FIGURE, "svg")) if drawn else None,
            thumbnail_alt=(f"Small map of the {item.title} network; its page has the map at full "
                           "size, to explore"),
            findings=key_findings(item),
        ))
    return tuple(cards)


@dataclass(frozen=True)
class OverviewPage:
    """Everything ``index.html`` shows."""

    page: PageFrame
    summary: Markup | None
    columns: tuple[str, ...]  # the statistics of the glance table, by title
    networks: tuple[GlanceRow, ...]
    spread: FigureView | None
    study_statistics: str  # href of files/study-statistics.csv
    cards: tuple[NetworkCard, ...]
    cautions: tuple[str, ...]
    built: str


def overview_context(frame: PageFrame, networks: list[NetworkPageInput], study: StudyOverview, *,
                     summary: Markup | None, built: str) -> OverviewPage:
    columns = glance_columns(study.table)
    spread = None
    if study.spread is not None:
        name = study.spread.name
        spread = figure_view(frame, study.spread, study_figure(name, "svg"),
                             study_figure(name, "png"))
    return OverviewPage(page=frame, summary=summary,
                        columns=tuple(statistic_title(name) for name in columns),
                        networks=glance_rows(frame, networks, study.table, columns),
                        spread=spread, study_statistics=frame.href(STUDY_STATISTICS),
                        cards=network_cards(frame, networks), cautions=CAUTIONS, built=built)
