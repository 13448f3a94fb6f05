"""The page of a two-mode network, its section of the methods page and of the downloads page."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from ..analyse.two_mode import TwoModeAnalysis
from ..draw.figure import Figure
from ..vocabulary import count_of, file_size, number, share
from ..vocabulary.two_mode import (
    TWO_MODE_COLUMNS,
    TWO_MODE_REFERENCES,
    projection_text,
    statistic_description,
)
from .figures import FigureView, figure_views
from .site_map import CHECKS, DOWNLOADS, METHODS, PageFrame, network_file, network_page

__all__ = ["TwoModeDownloads", "TwoModeInput", "TwoModeMethods", "TwoModePage",
           "two_mode_downloads", "two_mode_methods", "two_mode_page"]


@dataclass(frozen=True)
class TwoModeInput:
    """One two-mode network's results and figures, ready to be written as pages; ``projected``
    maps each mode to whether its projection has any ties."""

    analysis: TwoModeAnalysis
    figures: list[Figure]
    files: tuple[str, ...]  # the input files as the user wrote them
    projected: dict[str, bool]

    @property
    def id(self) -> str:
        return self.analysis.network_id

    @property
    def title(self) -> str:
        return self.analysis.title


@dataclass(frozen=True)
class Row:
    cells: tuple[str, ...]


@dataclass(frozen=True)
class Link:
    text: str
    href: str
    note: str = ""


@dataclass(frozen=True)
class TwoModePage:
    page: PageFrame
    summary: str
    figures: tuple[FigureView, ...]
    statistics: tuple[Row, ...]
    projections: tuple[Link, ...]
    top: tuple[tuple[str, tuple[Row, ...]], ...]  # per mode: its nodes with most ties
    links: dict[str, str]


def _other(analysis: TwoModeAnalysis, mode: str) -> str:
    first, second = analysis.modes
    return second if mode == first else first


def _projection_links(item: TwoModeInput, frame: PageFrame) -> tuple[Link, ...]:
    a = item.analysis
    links = []
    for mode in a.modes:
        other = _other(a, mode)
        note = ("" if item.projected[mode] else f" No two {mode} nodes share a {other}, so this "
                "projection has no ties; its page says what that means for each measure.")
        links.append(Link(f"{mode.capitalize()} projection", frame.href(network_page(
            f"{a.network_id}-{mode}")), f"{mode.capitalize()} nodes tied when they share a "
            f"{other}; {projection_text(a.projection, mode, other)}.{note}"))
    return tuple(links)


def two_mode_page(item: TwoModeInput, frame: PageFrame) -> TwoModePage:
    a = item.analysis
    first, second = a.modes
    n1 = int(a.statistic(f"nodes:{first}") or 0)
    n2 = int(a.statistic(f"nodes:{second}") or 0)
    ties = int(a.statistic("edges") or 0)
    density = a.statistic("density")
    summary = (f"A two-mode network: {count_of(n1, f'{first} node')} and "
               f"{count_of(n2, f'{second} node')}, with {count_of(ties, 'tie')}, each joining a "
               f"{first} to a {second}. ")
    summary += (f"{share(density)} of the {n1 * n2} possible {first}–{second} pairs are tied."
                if density is not None else "One mode has no nodes, so density is not defined.")
    rows = []
    for s in a.statistics:
        value = "not defined" if s.value is None else (
            number(s.value) if s.name == "density" else str(int(s.value)))
        rows.append(Row((s.name, value, statistic_description(s.name, a.modes))))
    top = []
    for mode in a.modes:
        part = a.nodes[a.nodes["mode"] == mode].sort_values("degree", ascending=False,
                                                            kind="mergesort")[:10]
        top.append((mode, tuple(Row((str(r["label"]), str(r["degree"]),
                                     "" if r["degree_share"] is None or str(r["degree_share"]) == "<NA>"
                                     else number(float(r["degree_share"]))))
                                for _, r in part.iterrows())))
    return TwoModePage(
        page=frame, summary=summary,
        figures=tuple(figure_views(frame, a.network_id, item.figures)),
        statistics=tuple(rows), projections=_projection_links(item, frame), top=tuple(top),
        links={"methods": frame.href(f"{METHODS}#{a.network_id}-two-mode"),
               "checks": frame.href(CHECKS),
               "downloads": frame.href(f"{DOWNLOADS}#{a.network_id}-two-mode"),
               "nodes": frame.href(network_file(a.network_id, "nodes.csv"))})


@dataclass(frozen=True)
class TwoModeMethods:
    id: str
    title: str
    anchor: str
    page_href: str
    sentences: tuple[str, ...]
    columns: tuple[Row, ...]
    references: tuple[str, ...]


def two_mode_methods(item: TwoModeInput, frame: PageFrame) -> TwoModeMethods:
    a = item.analysis
    first, second = a.modes
    sentences = [
        f"Read from {', '.join(item.files)}. Values in the source column (or the rows of an "
        f"incidence matrix) are {first} nodes; values in the target column (or the matrix's "
        f"header) are {second} nodes. A node is known by its mode and its id, so the same text "
        "may name a node of each mode.",
        f"Density is the number of ties m divided by the n1 × n2 {first}–{second} pairs that "
        f"could be tied; ties within a mode are impossible, so the one-mode density "
        "2m / (n(n - 1)) would understate it (Borgatti & Everett 1997).",
        "Degree share is a node's degree divided by the number of nodes of the other mode "
        "(Borgatti & Everett 1997): a share of 1 means tied to every one of them.",
    ]
    for mode in a.modes:
        other = _other(a, mode)
        sentences.append(
            f"The {mode} projection (network {a.network_id}-{mode}) ties two {mode} nodes when "
            f"they share at least one {other}: {projection_text(a.projection, mode, other)}. "
            "Weights of the two-mode ties are not used: each tie counts once. The projected "
            "weights are read as tie strengths, and the projection is analysed as every one-mode "
            "network is (it has its own section on this page)."
            + ("" if item.projected[mode] else f" No two {mode} nodes share a {other}, so this "
               "projection has no ties."))
    columns = tuple(Row((name, text(a.modes))) for name, text in TWO_MODE_COLUMNS.items())
    refs = tuple(r.text + (f" doi:{r.doi}" if r.doi else "") for r in TWO_MODE_REFERENCES
                 if a.projection == "newman" or r.key != "newman2001")
    return TwoModeMethods(id=a.network_id, title=a.title, anchor=f"{a.network_id}-two-mode",
                          page_href=frame.href(network_page(a.network_id)),
                          sentences=tuple(sentences), columns=columns, references=refs)


@dataclass(frozen=True)
class TwoModeFile:
    path: str
    href: str
    description: str
    size: str


@dataclass(frozen=True)
class TwoModeDownloads:
    title: str
    anchor: str
    files: tuple[TwoModeFile, ...]


def two_mode_downloads(item: TwoModeInput, frame: PageFrame, sizes: Mapping[str, int]
                       ) -> TwoModeDownloads:
    a = item.analysis
    first, second = a.modes
    described = {
        "nodes.csv": f"One row per node of either mode: id, mode ({first} or {second}), label, "
                     "the node attributes, degree and degree_share (degree divided by the "
                     "number of nodes of the other mode).",
        "edges.csv": f"The cleaned ties, one row per tie: the {first} id, the {second} id"
                     + (" and the weight." if a.weighted else "."),
        "statistics.csv": f"statistic and value: nodes:{first}, nodes:{second}, edges and "
                          "density (m / (n1 × n2)).",
    }
    files = []
    for name, text in described.items():
        path = network_file(a.network_id, name)
        size = file_size(sizes[path]) if path in sizes else ""
        files.append(TwoModeFile(path, frame.href(path), text, size))
    for figure in item.figures:
        for ext in ("svg", "png"):
            path = f"networks/{a.network_id}/figures/{figure.name}.{ext}"
            size = file_size(sizes[path]) if path in sizes else ""
            files.append(TwoModeFile(path, frame.href(path), f"{figure.title} ({ext.upper()}).",
                                     size))
    return TwoModeDownloads(title=a.title, anchor=f"{a.network_id}-two-mode", files=tuple(files))
