"""The page context of one network's communities: a profile of each, how stable they are across
runs and under perturbed data, the co-assignment figure, and communities against attributes."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..analyse import AttributeComparison, NetworkAnalysis
from ..draw.coassignment import COASSIGNMENT
from ..vocabulary import (
    COMMUNITY_CONFIDENCE,
    count_of,
    left_out_sentence,
    measure,
    number,
    share,
    undefined_reason,
)
from ..vocabulary.communities import community_methods_text
from .describe import method_title
from .figures import FigureView, figure_views
from .inputs import NetworkPageInput
from .network_page import RankedNode, ranked_nodes, statistic_rows
from .site_map import DOWNLOADS, METHODS, PageFrame, network_file, network_page, nodes_page

__all__ = ["CENTRAL_COUNT", "CROSS_TABLE_ROWS", "AttributeTable", "CommunitiesPage",
           "CommunityLine", "central_measure", "communities_context", "stability_methods"]

CENTRAL_COUNT = 3  # the most central members shown per community
CROSS_TABLE_ROWS = 30  # communities shown one by one in a cross-table; the rest are summed


@dataclass(frozen=True)
class CommunityLine:
    number: int
    size: str
    internal: str
    external: str
    density: str
    conductance: str
    confidence: str
    central: tuple[RankedNode, ...]


@dataclass(frozen=True)
class CrossRow:
    label: str
    counts: tuple[str, ...]
    total: str


@dataclass(frozen=True)
class AttributeTable:
    attribute: str
    anchor: str
    nmi: str
    reading: str
    values: tuple[str, ...]
    rows: tuple[CrossRow, ...]
    left_out: str  # a sentence on nodes without a value, "" when none


@dataclass(frozen=True)
class CommunitiesPage:
    """Everything ``communities.html`` shows."""

    page: PageFrame
    network_title: str
    intro: str
    central_title: str
    rows: tuple[CommunityLine, ...]
    single_node: str  # a sentence on the communities of one node left out of the table
    agreement: tuple[tuple[str, str], ...]  # (label, value) pairs
    stability: str
    figures: tuple[FigureView, ...]
    attributes: tuple[AttributeTable, ...]
    no_attributes: str
    links: dict[str, str]


def central_measure(item: NetworkPageInput) -> str:
    """The measure that ranks members: the network's size_by where it is a measure it has, else
    PageRank."""
    size_by = item.config.size_by
    columns = item.analysis.measures.columns
    return size_by if size_by is not None and size_by in columns else "pagerank"


def _optional(value: float | None) -> str:
    return "–" if value is None else number(value)


def _community_lines(item: NetworkPageInput) -> tuple[CommunityLine, ...]:
    analysis = item.analysis
    membership = analysis.communities.membership
    ranking = central_measure(item)
    measures = analysis.measures.reindex(analysis.nodes.index)
    values = (measures[ranking].to_numpy(dtype=float, na_value=np.nan)
              if ranking in measures.columns else np.full(len(membership), np.nan))
    labels = analysis.labels
    ids = [str(node) for node in analysis.nodes.index]
    # Every community's members in node order, found in one pass over the membership.
    grouped = np.argsort(np.asarray(membership, dtype=np.int64), kind="stable")
    bounds = np.searchsorted(np.asarray(membership, dtype=np.int64)[grouped],
                             [p.community for p in analysis.community_profiles])
    lines = []
    for profile, start in zip(analysis.community_profiles, bounds.tolist()):
        if profile.size < 2:
            continue
        members = grouped[start:start + profile.size].tolist()
        central, _ = ranked_nodes(values[members], [labels[v] for v in members],
                                  [ids[v] for v in members], CENTRAL_COUNT)
        lines.append(CommunityLine(
            number=profile.community, size=number(profile.size),
            internal=number(profile.internal), external=number(profile.external),
            density=_optional(profile.density), conductance=_optional(profile.conductance),
            confidence=_optional(profile.confidence), central=central))
    return tuple(lines)


def _stability_sentence(analysis: NetworkAnalysis) -> str:
    s = analysis.stability
    if s.perturbations == 0:
        return ("Reruns on perturbed data were turned off ([communities] perturbations = 0), so "
                "community confidence is not reported.")
    if s.why is not None:
        return "The network has no ties to remove, so no reruns on perturbed data ran."
    robustness = ("their agreement with the communities above is not defined" if
                  s.robustness_ari is None else
                  f"their mean adjusted Rand index with the communities above is "
                  f"{number(s.robustness_ari)} (1: the same communities)")
    return (f"The same method ran again {count_of(s.perturbations, 'time')}, each time on the "
            f"network with {share(s.share)} of its ties ({count_of(s.removed, 'tie')}) removed "
            f"at random; {robustness}. A community's confidence is the mean, over its members, "
            "of how often a rerun kept a member with the others (1: always together).")


def _cross_rows(comparison: AttributeComparison, sizes: tuple[int, ...]) -> tuple[CrossRow, ...]:
    rows = []
    rest = [0] * len(comparison.values)
    rest_communities = 0
    for c, counts in enumerate(comparison.counts, start=1):
        if c <= CROSS_TABLE_ROWS and sizes[c - 1] > 1:
            rows.append(CrossRow(f"Community {c}", tuple(number(v) for v in counts),
                                 number(sum(counts))))
        else:
            rest = [a + b for a, b in zip(rest, counts)]
            rest_communities += 1
    if rest_communities:
        rows.append(CrossRow(f"Other {count_of(rest_communities, 'community', 'communities')}",
                             tuple(number(v) for v in rest), number(sum(rest))))
    totals = [sum(col) for col in zip(*comparison.counts)] if comparison.counts else []
    rows.append(CrossRow("All nodes with a value", tuple(number(v) for v in totals),
                         number(sum(totals))))
    return tuple(rows)


def _attribute_tables(analysis: NetworkAnalysis, rows_by_name: dict[str, str]
                      ) -> tuple[AttributeTable, ...]:
    tables = []
    for comparison in analysis.attribute_comparisons:
        name = f"community_attribute_nmi:{comparison.attribute}"
        left_out = ""
        if comparison.nmi is None:
            reading = undefined_reason(comparison.why) if comparison.why else ""
            left_out = left_out_sentence(comparison.left_out)
        else:  # the statistic's reading already says how many nodes were left out
            reading = rows_by_name.get(name, "")
        tables.append(AttributeTable(
            attribute=comparison.attribute,
            anchor="attribute-" + "".join(ch if ch.isalnum() else "-"
                                          for ch in comparison.attribute),
            nmi=_optional(comparison.nmi), reading=reading, values=comparison.values,
            rows=_cross_rows(comparison, analysis.communities.sizes), left_out=left_out))
    return tuple(tables)


def communities_context(item: NetworkPageInput, frame: PageFrame) -> CommunitiesPage:
    analysis = item.analysis
    found = analysis.communities
    readings = {row.name: row.reading for row in statistic_rows(analysis)}
    single = sum(1 for size in found.sizes if size == 1)
    ranking = central_measure(item)
    intro = (f"{method_title(found.method)} found "
             f"{count_of(found.count, 'community', 'communities')} in {item.title} (best of "
             f"{found.runs} seeded runs, seed {found.seed}). Ties are counted on the undirected "
             "version, each tie once, weights ignored.")
    agreement: tuple[tuple[str, str], ...] = (
        ("Mean adjusted Rand index across runs", _optional(found.mean_ari)),
        ("Mean normalised mutual information across runs", _optional(found.mean_nmi)),
        ("Runs that found this partition", share(found.best_run_share)),
    )
    if analysis.stability.ran:
        agreement += (("Mean adjusted Rand index under perturbed data",
                       _optional(analysis.stability.robustness_ari)),)
    anchor = f"network-{item.id}"
    return CommunitiesPage(
        page=frame,
        network_title=item.title,
        intro=intro,
        central_title=f"Most central members (by {measure(ranking).plain})",
        rows=_community_lines(item),
        single_node=(f"{count_of(single, 'node')} form communities of their own and are not "
                     "listed." if single > 1 else
                     "1 node forms a community of its own and is not listed." if single else ""),
        agreement=agreement,
        stability=_stability_sentence(analysis),
        figures=tuple(f for f in figure_views(frame, item.id, item.figures)
                      if f.name == COASSIGNMENT),
        attributes=_attribute_tables(analysis, readings),
        no_attributes=("" if analysis.attribute_comparisons else
                       "The network has no categorical node attribute to compare with."),
        links={
            "network": frame.href(network_page(item.id)),
            "nodes": frame.href(nodes_page(item.id)),
            "methods": frame.href(f"{METHODS}#{anchor}-communities"),
            "csv": frame.href(network_file(item.id, "communities.csv")),
            "downloads": frame.href(f"{DOWNLOADS}#{anchor}"),
            "confidence": COMMUNITY_CONFIDENCE,
        },
    )


def stability_methods(analysis: NetworkAnalysis) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """The methods page's paragraphs on community profiles, stability and attributes, with the
    reference keys each cites."""
    s = analysis.stability
    c = analysis.communities
    return community_methods_text(
        perturbations=s.perturbations, share_removed=s.share, removed=s.removed, seed=s.seed,
        runs=c.runs, method=method_title(c.method), why=s.why if s.perturbations else None,
        matrix=s.together is not None)
