"""The methods page context, written from what actually ran for each network."""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from urllib.parse import quote

from ..analyse import NetworkAnalysis
from ..analyse.layout import LARGE_LAYOUT_NODES, LARGE_LAYOUT_TRAVEL, layout_iterations
from ..config import EdgeListSource
from ..draw.community_map import LARGE_MAP_NODES
from ..vocabulary import (
    LAYOUT_REFERENCES,
    SAMPLING_REFERENCES,
    STABILITY_REFERENCES,
    WEIGHT_REFERENCES,
    Reference,
    community_method,
    list_in_words,
    measure,
    number,
    share,
    significance_method,
    statistic,
)
from ..vocabulary.mixing import mixing_method_text
from ..vocabulary.references import REFERENCES
from ..vocabulary.relations import RELATIONS_REFERENCES
from .communities_page import stability_methods
from .describe import a_network, method_title, references_of, weight_reading, weights_sentence
from .inputs import NetworkPageInput
from .mixing import isolates_text
from .network_page import omitted_measures, sampling_sentence
from .relations_page import RelationsInput, RelationsMethods, relations_methods
from .site_map import CHECKS, PageFrame, network_page

__all__ = [
    "Citation", "MeasureMethod", "MethodsPage", "NetworkMethods", "ReferenceEntry",
    "StatisticMethod",
    "methods_context", "network_methods", "reference_entries",
]



@dataclass(frozen=True)
class Citation:
    number: int
    href: str  # "#ref-<key>"


@dataclass(frozen=True)
class ReferenceEntry:
    number: int
    anchor: str
    text: str
    doi: str | None
    doi_href: str | None  # None when DOIs are shown as plain text


@dataclass(frozen=True)
class MeasureMethod:
    column: str
    title: str
    definition: str
    weights: str
    citations: tuple[Citation, ...]


@dataclass(frozen=True)
class StatisticMethod:
    title: str
    names: tuple[str, ...]  # statistic rows it covers, e.g. assortativity:clinic
    definition: str
    citations: tuple[Citation, ...]


@dataclass(frozen=True)
class NetworkMethods:
    id: str
    title: str
    anchor: str
    page_href: str
    checks_href: str
    kind: str  # "A directed, weighted network"
    cleaning: tuple[str, ...]
    weights: str
    weight_citations: tuple[Citation, ...]
    measures: tuple[MeasureMethod, ...]
    omitted: tuple[tuple[str, str], ...]
    sampling: str | None
    sampling_citations: tuple[Citation, ...]
    statistics: tuple[StatisticMethod, ...]
    community_parameters: tuple[tuple[str, str], ...]
    communities: tuple[str, ...]
    community_citations: tuple[Citation, ...]
    stability: str
    stability_citations: tuple[Citation, ...]
    community_checks: tuple[tuple[str, tuple[Citation, ...]], ...]  # profiles, perturbations
    perturbation_parameters: tuple[tuple[str, str], ...]
    significance: tuple[tuple[str, tuple[Citation, ...]], ...]  # paragraphs, each with its cites
    layout: str
    layout_citations: tuple[Citation, ...]
    seed: int
    versions: tuple[tuple[str, str], ...]
    # Attribute mixing, brokerage and nodes without ties: paragraphs, each with its cites.
    mixing: tuple[tuple[str, tuple[Citation, ...]], ...] = ()
    scaled: str | None = None  # what was cut down for the network's size


class _Citations:
    """Numbers references in first-use order over the whole site."""

    def __init__(self, references: Iterable[Reference]):
        self.order: dict[str, Reference] = {}
        for ref in references:
            self.order.setdefault(ref.key, ref)
        self.numbers = {key: i for i, key in enumerate(self.order, start=1)}

    def cite(self, keys: Iterable[str]) -> tuple[Citation, ...]:
        known = sorted((k for k in dict.fromkeys(keys) if k in self.numbers),
                       key=self.numbers.__getitem__)
        return tuple(Citation(self.numbers[k], f"#ref-{k}") for k in known)


def reference_entries(references: Iterable[Reference], *, link_dois: bool = True
                      ) -> tuple[ReferenceEntry, ...]:
    unique: dict[str, Reference] = {}
    for ref in references:
        unique.setdefault(ref.key, ref)
    return tuple(ReferenceEntry(
        number=i, anchor=f"ref-{ref.key}", text=ref.text, doi=ref.doi,
        doi_href=(f"https://doi.org/{quote(ref.doi, safe='/()-._;:')}"
                  if ref.doi and link_dois else None),
    ) for i, ref in enumerate(unique.values(), start=1))


def _cleaning(item: NetworkPageInput, relative: dict[str, str]) -> tuple[str, ...]:
    config, analysis = item.config, item.analysis
    data = relative.get("data", "")
    if config.projected_mode is not None:
        return (f"This network is the projection of the two-mode network "
                f"'{config.projected_from}' (read from {data}) onto its {config.projected_mode} "
                "nodes; how it was read, cleaned and projected is in that network's section on "
                "this page.",)
    if isinstance(config.data, EdgeListSource):
        source = config.data
        weight = f", weight '{source.weight}'" if source.weight else ""
        read = (f"Ties were read from the edge list {data} (columns '{source.source}' and "
                f"'{source.target}'{weight}).")
    else:
        read = (f"Ties were read from the adjacency matrix {data} (rows send, columns receive; a "
                "cell is the tie's weight, an empty cell or 0 means no tie).")
    if "nodes" in relative:
        read += (f" Node attributes came from {relative['nodes']} (id column '{config.node_id}'"
                 + (f", label column '{config.label}'" if config.label else "") + ").")
        nodes = ("Nodes of the node list with no ties were kept as isolates; nodes named in ties "
                 "but missing from the node list were added without attributes.")
    else:
        nodes = "The nodes are the ids named in the ties; there is no node list."
    direction = ("in the same direction" if analysis.directed
                 else "in either direction, as the network is undirected")
    combine = (f", their weights combined by {config.duplicates}" if analysis.weighted else "")
    sentences = [read]
    if config.matrix is None:  # a matrix has one cell per pair, so nothing can repeat
        sentences.append(f"Repeated ties between the same pair ({direction}) were merged into one "
                         f"tie{combine}.")
    sentences += [
        "Self-loops (ties from a node to itself) were removed.",
        f"{nodes} Results do not depend on the order of rows in the files.",
    ]
    if analysis.directed:
        sentences.append("Measures computed on the undirected version turn each directed tie into "
                         "an undirected one, merging reciprocal pairs with their strengths summed.")
    return tuple(sentences)


def _statistic_methods(item: NetworkPageInput, cite: _Citations) -> tuple[StatisticMethod, ...]:
    grouped: dict[str, list[str]] = {}
    for stat in item.analysis.statistics:
        grouped.setdefault(statistic(stat.name).name, []).append(stat.name)
    methods = []
    for base, names in grouped.items():
        entry = statistic(base)
        title = entry.title
        attributes = [n.split(":", 1)[1] for n in names if ":" in n]
        if attributes:
            title = f"{title} ({', '.join(attributes)})"
        methods.append(StatisticMethod(title, tuple(names), entry.definition,
                                       cite.cite(entry.references)))
    return tuple(methods)


def _runs(runs: int) -> str:
    return "One run" if runs == 1 else f"{runs} independent runs"


def _community_text(item: NetworkPageInput) -> tuple[tuple[tuple[str, str], ...], tuple[str, ...]]:
    result, analysis = item.analysis.communities, item.analysis
    method = method_title(result.method)
    resolution = number(result.resolution)
    parameters = (("Method", method), ("Resolution", resolution), ("Runs", str(result.runs)),
                  ("Seed", str(result.seed)))
    on = "with tie strengths as weights" if analysis.weighted else "unweighted"
    if result.method == "label-propagation":
        how = (f"{method} on the undirected version, {on}. Label propagation has no resolution "
               f"parameter; the resolution ({resolution}) only scores the runs when the best is "
               "chosen.")
    else:
        how = (f"{method} optimising modularity at resolution {resolution} on the undirected "
               f"version, {on}.")
    return parameters, (
        how,
        f"{_runs(result.runs)}, each with its own seed derived from the study seed "
        f"{result.seed}; the partition with the highest modularity at that resolution was kept and "
        "its communities numbered 1, 2, ... by size, largest first (equal sizes ordered by their "
        "first member).",
        "The modularity shown on the network page is the standard Newman-Girvan modularity "
        "(resolution 1) of the kept partition.",
    )


def network_methods(item: NetworkPageInput, frame: PageFrame, cite: _Citations,
                    relative: dict[str, str]) -> NetworkMethods:
    """``relative`` maps "data" (and "nodes" if there is a node list) to paths as written."""
    analysis = item.analysis
    measures = []
    for column in analysis.measures.columns:
        entry = measure(column)
        if column == "community":
            measures.append(MeasureMethod(column, entry.title, entry.definition,
                                          "see Communities", cite.cite(community_method(
                                              analysis.communities.method).references)))
            continue
        measures.append(MeasureMethod(column, entry.title, entry.definition,
                                      weight_reading(entry.reads, analysis),
                                      cite.cite(entry.references)))
    parameters, community_sentences = _community_text(item)
    pull = ", stronger ties pulling harder" if analysis.weighted else ""
    return NetworkMethods(
        id=item.id,
        title=item.title,
        anchor=f"network-{item.id}",
        page_href=frame.href(network_page(item.id)),
        checks_href=frame.href(f"{CHECKS}#network-{item.id}"),
        kind=a_network(analysis),
        cleaning=_cleaning(item, relative),
        weights=weights_sentence(item.config, analysis),
        weight_citations=cite.cite(WEIGHT_REFERENCES) if analysis.weighted else (),
        measures=tuple(measures),
        omitted=omitted_measures(analysis),
        sampling=sampling_sentence(analysis, statistics=True),
        sampling_citations=cite.cite(SAMPLING_REFERENCES) if analysis.sampling else (),
        statistics=_statistic_methods(item, cite),
        community_parameters=parameters,
        communities=community_sentences,
        community_citations=cite.cite(community_method(analysis.communities.method).references),
        stability=("Agreement between the kept partition and each run is measured by the adjusted "
                   "Rand index and by normalised mutual information, averaged over the runs: 1 "
                   "means every run found the same communities, values near 0 no more agreement "
                   "than chance. The share of runs that found exactly the kept partition is "
                   "reported too."),
        stability_citations=cite.cite(STABILITY_REFERENCES),
        community_checks=tuple((text, cite.cite(keys))
                               for text, keys in stability_methods(analysis)),
        perturbation_parameters=(
            ("Perturbed reruns", str(analysis.stability.perturbations)),
            ("Share of ties removed", number(analysis.stability.share)),
            ("Seed", str(analysis.seed))) if analysis.stability.perturbations else (),
        significance=tuple((text, cite.cite(keys)) for text, keys in significance_method(
            analysis.significance, directed=analysis.directed, weighted=analysis.weighted,
            method=method_title(analysis.communities.method), runs=analysis.communities.runs,
            resolution=number(analysis.communities.resolution))),
        layout=_layout_text(analysis, pull),
        layout_citations=cite.cite(LAYOUT_REFERENCES),
        seed=analysis.seed,
        scaled=_capital(scaled_sentence(analysis)),
        versions=tuple(analysis.versions.items()),
        mixing=tuple((text, cite.cite(keys)) for text, keys in mixing_method_text(
            analysis, categorical=item.config.categorical, numeric=item.config.numeric,
            isolates=isolates_text(analysis, item.config))),
    )


_SCALED_WORDS = {"runs": ("community runs", "[communities] runs"),
                 "perturbations": ("perturbed reruns", "[communities] perturbations"),
                 "null_samples": ("rewired networks", "[significance] null_samples"),
                 "path_sample_sources": ("sampled path sources",
                                         "[measures] path_sample_sources")}


def _capital(text: str | None) -> str | None:
    return None if text is None else text[0].upper() + text[1:]


def scaled_sentence(analysis: NetworkAnalysis) -> str | None:
    """What was cut down for the network's size (``analysis.scaled``), in words, or None."""
    if not analysis.scaled:
        return None
    counts = {"runs": analysis.communities.runs,
              "perturbations": analysis.stability.perturbations,
              "null_samples": analysis.significance.samples,
              "path_sample_sources": analysis.sampling.sources if analysis.sampling else 0}
    parts = [f"{number(counts[name])} {_SCALED_WORDS[name][0]}" for name in analysis.scaled]
    keys = [_SCALED_WORDS[name][1] for name in analysis.scaled]
    return (f"with {number(len(analysis.edges))} ties this network got {list_in_words(parts)} "
            f"instead of the defaults, so the build stays within minutes; set "
            f"{list_in_words(keys)} in study.toml to choose.")


def _layout_text(analysis: NetworkAnalysis, pull: str) -> str:
    tied = int((analysis.measures["degree"] > 0).sum())
    iterations = layout_iterations(tied)
    if tied > LARGE_LAYOUT_NODES:
        start = (f"in {number(iterations)} iterations (a budget for {number(tied)} nodes with "
                 "ties, on a grid that lets only nearby nodes repel), started from the layout of "
                 "the communities' own graph with each member placed at random near its "
                 f"community, drawn with the study seed {analysis.seed}; the steps are kept so "
                 f"small that a node moves at most {share(LARGE_LAYOUT_TRAVEL)} of the drawing's "
                 "width in all, so the iterations refine where the communities are placed "
                 "instead of mixing them")
    else:
        start = (f"in {number(iterations)} iterations, started from positions drawn with the "
                 f"study seed {analysis.seed}")
    large = (f" Above {number(LARGE_MAP_NODES)} nodes the map shows the communities and a "
             "density image of the whole layout instead of every node."
             if len(analysis.layout) > LARGE_MAP_NODES else "")
    return (f"Figures place nodes with the Fruchterman-Reingold force-directed layout on the "
            f"undirected version{pull}, {start}, and scaled into a square, so the same data "
            f"give the same picture.{large} Distances in a drawing are not path lengths: read "
            "who is tied to whom, not how far apart nodes are drawn.")


@dataclass(frozen=True)
class MethodsPage:
    """Everything ``methods.html`` shows."""

    page: PageFrame
    networks: tuple[NetworkMethods, ...]
    references: tuple[ReferenceEntry, ...]
    two_mode: tuple[object, ...] = ()  # the two-mode networks' sections (render.two_mode_page)
    relations: tuple[RelationsMethods, ...] = ()  # one per [[relations]] table


def methods_context(frame: PageFrame, networks: list[NetworkPageInput],
                    relative_paths: dict[str, dict[str, str]], *, link_dois: bool = True,
                    relations: Sequence[RelationsInput] = ()) -> MethodsPage:
    """``relative_paths`` maps a network id to its input files as the user wrote them;
    ``relations`` are the comparisons of networks on the same nodes, each with its section."""
    references = [ref for item in networks for ref in references_of(item.analysis)]
    titles = {item.id: item.title for item in networks}
    sections = [relations_methods(relation, frame, titles) for relation in relations]
    if sections:
        keys = [k for section in sections for _, cited in section.paragraphs for k in cited]
        references += [REFERENCES[k] for k in dict.fromkeys((*RELATIONS_REFERENCES, *keys))]
    cite = _Citations(references)
    return MethodsPage(
        page=frame,
        networks=tuple(network_methods(item, frame, cite, relative_paths.get(item.id, {}))
                       for item in networks),
        references=reference_entries(references, link_dois=link_dois),
        relations=tuple(replace(section, paragraphs=tuple(
            (text, cite.cite(cited)) for text, cited in section.paragraphs))
            for section in sections),
    )
