"""The page of one ``[[relations]]`` table, ``compare/<id>.html``: networks on the same nodes
side by side (tie overlap, QAP correlation, each node's degree, the MRQAP model), with its
sections of the methods and downloads pages."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from ..analyse.compare import RelationsComparison
from ..publish.relations import MODEL_FILE, PAIRS_FILE, relation_file_names
from ..vocabulary import MISSING, count, file_size, node_name, number, signed
from ..vocabulary.relations import (
    PERMUTATION_CAUTION,
    correlation_reading,
    jaccard_reading,
    model_fit_reading,
    p_reading,
    relations_method,
    term_reading,
    term_title,
)
from .inputs import NetworkPageInput
from .site_map import PageFrame, compare_page, network_page, relations_file

__all__ = ["ModelRow", "PairView", "RelationsDownloads", "RelationsInput", "RelationsMethods",
           "RelationsPage", "relations_context", "relations_downloads", "relations_methods"]


@dataclass(frozen=True)
class RelationsInput:
    """What the build hands the render stage for one ``[[relations]]`` table."""

    comparison: RelationsComparison
    title: str

    @property
    def id(self) -> str:
        return self.comparison.relation


@dataclass(frozen=True)
class NetworkLink:
    title: str
    href: str


@dataclass(frozen=True)
class PairView:
    heading: str
    anchor: str
    jaccard: str
    correlation: str
    p: str
    readings: tuple[str, ...]  # overlap, correlation, p-value


@dataclass(frozen=True)
class ModelRow:
    term: str
    coefficient: str
    std_coefficient: str
    p: str
    reading: str


@dataclass(frozen=True)
class RelationsPage:
    """Everything ``relations.html`` shows."""

    page: PageFrame
    networks: tuple[NetworkLink, ...]
    nodes: str  # "61 nodes"
    caution: str
    pairs: tuple[PairView, ...]
    model_heading: str  # "" without a model
    model_intro: str
    model_rows: tuple[ModelRow, ...]
    model_fit: str
    degree_note: str  # how a directed network's degree counts; "" when none is directed
    degree_columns: tuple[str, ...]  # network titles
    degrees: tuple[tuple[str, tuple[str, ...]], ...]  # node name, degree in each network
    files: tuple[tuple[str, str], ...]  # (path, href)


def _p_text(p: float | None) -> str:
    return MISSING if p is None else number(p)


def _unit(item: NetworkPageInput) -> str | None:
    """What the outcome's tie value counts: its weight column in words; None when unweighted."""
    if not item.analysis.weighted:
        return None
    weight = item.config.weight
    return weight.replace("_", " ") if weight else "units of tie weight"


def relations_context(relation: RelationsInput, networks: Mapping[str, NetworkPageInput],
                      frame: PageFrame) -> RelationsPage:
    comparison = relation.comparison
    titles = {i: networks[i].title for i in comparison.networks}
    pairs = []
    for pair in comparison.pairs:
        a, b = titles[pair.network_a], titles[pair.network_b]
        qap = pair.qap
        pairs.append(PairView(
            heading=f"{a} and {b}", anchor=f"pair-{pair.network_a}-{pair.network_b}",
            jaccard=MISSING if pair.jaccard is None else number(pair.jaccard),
            correlation=MISSING if qap.correlation is None else signed(qap.correlation),
            p=_p_text(qap.p),
            readings=(jaccard_reading(pair.jaccard, a, b),
                      correlation_reading(qap.correlation, a, b),
                      p_reading(qap.p, qap.permutations, "a correlation at least this far "
                                "from zero"))))
    model = comparison.model
    heading = intro = fit = ""
    rows: tuple[ModelRow, ...] = ()
    if model is not None:
        outcome = titles[model.outcome]
        heading = f"What goes with {outcome} ties"
        others = [term_title(t.term, titles) for t in model.terms if t.term != "intercept"]
        intro = (f"A regression of the {outcome} tie of each pair of nodes on "
                 f"{', '.join(others[:-1]) + ' and ' + others[-1] if len(others) > 1 else others[0]}"
                 " together (MRQAP). Each coefficient is the difference a term makes with the "
                 "others held fixed; the standardised coefficient puts the terms on one scale, so "
                 "their sizes can be compared. A term can go with the outcome on its own (as in "
                 "the correlation above) and still add little once the others are in the model, "
                 "when they tell the same story.")
        unit = _unit(networks[model.outcome])
        weighted = frozenset(i for i in comparison.networks if networks[i].analysis.weighted)
        rows = tuple(ModelRow(
            term=term_title(t.term, titles), coefficient=number(t.coefficient),
            std_coefficient=MISSING if t.std_coefficient is None else signed(t.std_coefficient),
            p=_p_text(t.p),
            reading=term_reading(t.term, t.coefficient, t.p, model.permutations, titles=titles,
                                 outcome=outcome, unit=unit, weighted=weighted))
            for t in model.terms)
        fit = model_fit_reading(model.r_squared, model.dyads, outcome, comparison.model_directed)
    first = networks[comparison.networks[0]].analysis
    labels = {str(node): node_name(label, str(node))
              for node, label in zip(first.nodes.index, first.labels)}
    files = [relations_file(comparison.relation, name) for name in relation_file_names(comparison)]
    return RelationsPage(
        page=frame,
        networks=tuple(NetworkLink(titles[i], frame.href(network_page(i)))
                       for i in comparison.networks),
        nodes=f"{count(len(comparison.nodes))} nodes",
        caution=PERMUTATION_CAUTION,
        pairs=tuple(pairs), model_heading=heading, model_intro=intro, model_rows=rows,
        model_fit=fit,
        degree_note=_degree_note([titles[i] for i in comparison.networks
                                  if networks[i].analysis.directed]),
        degree_columns=tuple(titles[i] for i in comparison.networks),
        degrees=tuple((labels.get(node, node), tuple(count(d) for d in row))
                      for node, row in zip(comparison.nodes, comparison.degrees)),
        files=tuple((path, frame.href(path)) for path in files),
    )


def _degree_note(directed: list[str]) -> str:
    if not directed:
        return ""
    which = directed[0] if len(directed) == 1 else ", ".join(directed[:-1]) + " and " + directed[-1]
    return f"In {which} a tie has a direction, so degree counts the ties sent and received."


@dataclass(frozen=True)
class RelationsMethods:
    id: str
    title: str
    anchor: str
    page_href: str
    parameters: tuple[tuple[str, str], ...]
    paragraphs: tuple[tuple[str, tuple[Any, ...]], ...]  # text, its citations (reference keys
    # until the methods page numbers them)


def relations_methods(relation: RelationsInput, frame: PageFrame,
                      titles: Mapping[str, str]) -> RelationsMethods:
    comparison = relation.comparison
    parameters = [("Networks", ", ".join(titles[i] for i in comparison.networks)),
                  ("Permutations", count(comparison.permutations)),
                  ("Seed", str(comparison.seed))]
    if comparison.model is not None:
        terms = [t.term for t in comparison.model.terms if t.term != "intercept"]
        parameters += [("Model outcome", comparison.model.outcome),
                       ("Model terms", ", ".join(terms))]
    return RelationsMethods(
        id=relation.id, title=relation.title, anchor=f"relations-{relation.id}",
        page_href=frame.href(compare_page(relation.id)), parameters=tuple(parameters),
        paragraphs=relations_method(comparison.permutations, comparison.seed))


@dataclass(frozen=True)
class RelationsFile:
    path: str
    href: str
    description: str
    size: str


@dataclass(frozen=True)
class RelationsDownloads:
    id: str
    title: str
    anchor: str
    files: tuple[RelationsFile, ...]


def relations_downloads(relation: RelationsInput, frame: PageFrame, sizes: Mapping[str, int]
                        ) -> RelationsDownloads:
    comparison = relation.comparison
    described = {
        PAIRS_FILE: "One row per pair of networks: network_a, network_b, jaccard (ties in both "
                    "over ties in either), qap_correlation, qap_p (against node-label "
                    "permutations) and permutations.",
        MODEL_FILE: "The MRQAP model, one row per term: term, coefficient, std_coefficient, p "
                    "(double semi-partialling permutations) and permutations; the last row, "
                    "r_squared, holds R² in its coefficient column.",
    }
    files = []
    for name in relation_file_names(comparison):
        path = relations_file(comparison.relation, name)
        files.append(RelationsFile(path, frame.href(path), described[name],
                                   file_size(sizes[path]) if path in sizes else ""))
    return RelationsDownloads(relation.id, relation.title, f"relations-{relation.id}",
                              tuple(files))
