"""The front page context: summary, networks at a glance, and the cautions every site carries."""

from __future__ import annotations

from dataclasses import dataclass

from markupsafe import Markup

from ..vocabulary import count, number
from .describe import network_kind
from .inputs import NetworkPageInput
from .site_map import PageFrame, network_page, nodes_page

__all__ = ["CAUTIONS", "GlanceRow", "OverviewPage", "glance_rows", "overview_context"]

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


@dataclass(frozen=True)
class GlanceRow:
    title: str
    href: str
    nodes_href: str
    nodes: str
    ties: str
    kind: str
    density: str
    communities: str


def glance_rows(frame: PageFrame, networks: list[NetworkPageInput]) -> tuple[GlanceRow, ...]:
    rows = []
    for item in networks:
        analysis = item.analysis
        nodes, ties = analysis.statistic("nodes"), analysis.statistic("edges")
        density = analysis.statistic("density")
        rows.append(GlanceRow(
            title=item.title,
            href=frame.href(network_page(item.id)),
            nodes_href=frame.href(nodes_page(item.id)),
            nodes=count(len(analysis.nodes) if nodes is None else int(nodes)),
            ties=count(len(analysis.edges) if ties is None else int(ties)),
            kind=network_kind(analysis),
            density="not defined" if density is None else number(density),
            communities=count(analysis.communities.count),
        ))
    return tuple(rows)


@dataclass(frozen=True)
class OverviewPage:
    """Everything ``index.html`` shows."""

    page: PageFrame
    summary: Markup | None
    networks: tuple[GlanceRow, ...]
    cautions: tuple[str, ...]
    built: str


def overview_context(frame: PageFrame, networks: list[NetworkPageInput], *,
                     summary: Markup | None, built: str) -> OverviewPage:
    return OverviewPage(page=frame, summary=summary, networks=glance_rows(frame, networks),
                        cautions=CAUTIONS, built=built)
