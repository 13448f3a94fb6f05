"""The downloads page context: every file publish writes, with what it holds."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from ..draw.figure import Figure
from ..vocabulary import (
    COMMUNITY,
    ESTIMATE_COLUMNS,
    PATH_MEASURES,
    SIGNIFICANCE_COLUMNS,
    count,
    count_of,
    file_size,
    measure,
)
from ..vocabulary.communities import community_columns
from ..vocabulary.mixing import mixing_csv_names
from .describe import weight_reading
from .inputs import NetworkPageInput
from .site_map import (
    ALL_DATA,
    DATAPACKAGE,
    MANIFEST,
    STUDY_STATISTICS,
    PageFrame,
    figure_file,
    network_file,
    study_figure,
)

__all__ = ["ColumnInfo", "DownloadFile", "DownloadsPage", "FigureDownload", "NetworkDownloads",
           "downloads_context", "network_downloads", "node_columns_described"]


@dataclass(frozen=True)
class ColumnInfo:
    name: str
    meaning: str


@dataclass(frozen=True)
class DownloadFile:
    path: str  # relative to the site root, as written on the page
    href: str
    description: str
    columns: tuple[ColumnInfo, ...] = ()
    size: str = ""  # for reading ("4.2 kB"); empty when not known as the page is written


@dataclass(frozen=True)
class FigureDownload:
    title: str
    svg_path: str
    svg_href: str
    png_path: str
    png_href: str
    svg_size: str = ""
    png_size: str = ""


@dataclass(frozen=True)
class NetworkDownloads:
    id: str
    title: str
    anchor: str
    files: tuple[DownloadFile, ...]
    figures: tuple[FigureDownload, ...]


def node_columns_described(item: NetworkPageInput, nodes_file: str | None
                           ) -> tuple[ColumnInfo, ...]:
    """The columns of ``files/<id>/nodes.csv`` in order, each with its meaning."""
    config, analysis = item.config, item.analysis
    columns = [ColumnInfo("id", "node id as written in the data")]
    columns.append(ColumnInfo("label", f"display name, from the node-list column '{config.label}'"
                              if config.label else "display name (the id: no label column is set)"))
    source = f"from {nodes_file}" if nodes_file else "from the node list"
    columns += [ColumnInfo(a, f"node attribute {source}; empty when missing")
                for a in analysis.attributes]
    for column in analysis.measures.columns:
        if column == COMMUNITY:
            columns.append(ColumnInfo(column, "community number (1 = the largest community)"))
            continue
        entry = measure(column)
        meaning = f"{entry.title} ({weight_reading(entry.reads, analysis)})"
        if analysis.sampling is not None and column in PATH_MEASURES:
            meaning += (f"; estimated from {count(analysis.sampling.sources)} sampled source "
                        f"nodes of {count(analysis.sampling.nodes)}")
        columns.append(ColumnInfo(column, meaning))
    return tuple(columns)


def _edge_columns(item: NetworkPageInput) -> tuple[ColumnInfo, ...]:
    config, analysis = item.config, item.analysis
    if analysis.directed:
        ends = [ColumnInfo("source", "id of the node the tie comes from"),
                ColumnInfo("target", "id of the node the tie goes to")]
    else:
        ends = [ColumnInfo("source", "id of one end of the tie (the first in node order)"),
                ColumnInfo("target", "id of the other end")]
    if analysis.weighted:
        meaning = "strength" if analysis.weight_means == "strength" else "distance"
        ends.append(ColumnInfo("weight", f"tie weight as written in the data, read as a {meaning}; "
                               f"repeated ties combined by {config.duplicates}"))
    return tuple(ends)


def _estimated(item: NetworkPageInput) -> bool:
    return item.analysis.sampling is not None and any(
        s.estimate is not None for s in item.analysis.statistics)


def _size(sizes: Mapping[str, int], path: str) -> str:
    return file_size(sizes[path]) if path in sizes else ""


def network_downloads(item: NetworkPageInput, frame: PageFrame, nodes_file: str | None,
                      sizes: Mapping[str, int] | None = None) -> NetworkDownloads:
    """``sizes`` maps a file's path under the site root to its size in bytes."""
    known = sizes or {}

    def entry(name: str, description: str, columns: tuple[ColumnInfo, ...] = ()) -> DownloadFile:
        path = network_file(item.id, name)
        return DownloadFile(path, frame.href(path), description, columns, _size(known, path))

    files: tuple[DownloadFile, ...] = (
        entry("nodes.csv", "One row per node: id, label, node attributes, then every measure at "
              "full precision.", node_columns_described(item, nodes_file)),
        entry("edges.csv", "The cleaned tie list used for the analysis (repeats merged, self-loops "
              "removed).", _edge_columns(item)),
        entry("statistics.csv", "The network-level statistics at full precision.", (
            ColumnInfo("statistic", "the statistic's name (such as density or "
                       "assortativity:<attribute>), defined on the Methods page"),
            ColumnInfo("value", "its value; empty when the statistic is not defined for this "
                       "network (the network page says why)"),
            *(ColumnInfo(name, text) for name, text in ESTIMATE_COLUMNS
              if _estimated(item)))),
        entry("network.graphml", "The network as GraphML (an open XML format most network tools "
              "read), with node attributes and measures as node data and the weight on each tie."),
    )
    tested = item.analysis.significance
    if tested.tests:
        files += (entry("significance.csv", "Each statistic tested against chance: its value "
                        f"against {count_of(tested.samples, 'network')} rewired at random with "
                        "the same degrees (the Methods page says how), at full precision.",
                        tuple(ColumnInfo(n, text) for n, text in SIGNIFICANCE_COLUMNS)),)
    names = mixing_csv_names(item.analysis.attributes)
    for table in item.analysis.mixing:
        cells = ("ties sent from the row's group to this group" if table.directed else
                 "ties between the row's group and this group (symmetric; a tie inside a group "
                 "is counted once on the diagonal)")
        files += (entry(names[table.attribute], f"The mixing matrix of {table.attribute}: tie "
                        f"counts between its {count_of(len(table.groups), 'group')}, from which "
                        f"the E-I index ei_index:{table.attribute} is computed.", (
                            ColumnInfo(table.attribute, "the row's group" + (
                                " (the sending end)" if table.directed else "")),
                            ColumnInfo("one column per group", cells))),)
    files += (entry("communities.csv", "One row per community: its size, internal and "
                    "external ties, internal density, conductance"
                    + (" and the mean confidence of its members under perturbed data"
                       if item.analysis.stability.ran else "") + ", at full precision.",
                    tuple(ColumnInfo(n, text) for n, text in community_columns(
                        with_confidence=item.analysis.stability.ran))),)
    figures = tuple(FigureDownload(
        title=f.title,
        svg_path=figure_file(item.id, f.name, "svg"),
        svg_href=frame.href(figure_file(item.id, f.name, "svg")),
        png_path=figure_file(item.id, f.name, "png"),
        png_href=frame.href(figure_file(item.id, f.name, "png")),
        svg_size=_size(known, figure_file(item.id, f.name, "svg")),
        png_size=_size(known, figure_file(item.id, f.name, "png")),
    ) for f in item.figures)
    return NetworkDownloads(item.id, item.title, f"network-{item.id}", files, figures)


@dataclass(frozen=True)
class DownloadsPage:
    """Everything ``downloads.html`` shows."""

    page: PageFrame
    networks: tuple[NetworkDownloads, ...]
    site_files: tuple[DownloadFile, ...]
    two_mode: tuple[object, ...] = ()  # the two-mode networks' files (render.two_mode_page)
    relations: tuple[object, ...] = ()  # each [[relations]] table's files (render.relations_page)


def downloads_context(frame: PageFrame, networks: list[NetworkPageInput],
                      node_files: dict[str, str], sizes: Mapping[str, int] | None = None,
                      spread: Figure | None = None) -> DownloadsPage:
    """``node_files`` maps a network id to its node list as the user wrote the path; ``sizes``
    a file's path to its size in bytes (the manifest's own size is not known yet); ``spread``
    the front page's figure of statistics across networks, when it has one."""
    known = sizes or {}
    spread_files = []
    if spread is not None:
        for ext, kind in (("svg", "SVG"), ("png", "PNG")):
            path = study_figure(spread.name, ext)
            spread_files.append(DownloadFile(path, frame.href(path), f"{spread.title} ({kind}): "
                                             "the front page's figure.", size=_size(known, path)))
    return DownloadsPage(
        page=frame,
        networks=tuple(network_downloads(item, frame, node_files.get(item.id), known)
                       for item in networks),
        site_files=(
            DownloadFile(STUDY_STATISTICS, frame.href(STUDY_STATISTICS),
                         "Every network's statistics side by side at full precision, one row per "
                         "network: the table on the front page, with every statistic.", (
                             ColumnInfo("network", "the network's id"),
                             ColumnInfo("title", "the network's title"),
                             ColumnInfo("one column per statistic", "named as in each network's "
                                        "statistics.csv and defined on the Methods page; empty "
                                        "where the statistic is not defined for the network or "
                                        "does not apply to it"),
                             *((ColumnInfo("<statistic>_standard_error, <statistic>_estimate",
                                           "after a statistic that some network estimates: "
                                           f"{ESTIMATE_COLUMNS[0][1]}; and "
                                           f"{ESTIMATE_COLUMNS[1][1]}"),)
                               if any(_estimated(item) for item in networks) else ()),
                         ), size=_size(known, STUDY_STATISTICS)),
            *spread_files,
            DownloadFile(ALL_DATA, frame.href(ALL_DATA),
                         "Every table (CSV) and GraphML file above with the Data Package "
                         "descriptor, in one zip laid out as the files/ folder is. The same "
                         "results give the same zip, byte for byte.", size=_size(known, ALL_DATA)),
            DownloadFile(DATAPACKAGE, frame.href(DATAPACKAGE),
                         "Frictionless Data Package descriptor (an open standard): every CSV file "
                         "above with its columns and their types, so other tools can check and "
                         "load the tables.", size=_size(known, DATAPACKAGE)),
            DownloadFile(MANIFEST, frame.href(MANIFEST),
                         "Every file of this site with its size in bytes and SHA-256 checksum, to "
                         "confirm a copy is complete and unchanged."),
        ),
    )
