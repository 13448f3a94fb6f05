"""Where every page and download lives, how pages link to each other, and the shared navigation."""

from __future__ import annotations

import posixpath
from dataclasses import dataclass
from urllib.parse import quote

__all__ = [
    "ALL_DATA", "CHECKS", "DATAPACKAGE", "DOWNLOADS", "INDEX", "MANIFEST", "METHODS", "SHARING", "Link",
    "EXPLORE_SCRIPT", "PageFrame", "SiteMap", "communities_page", "compare_figure", "compare_page",
    "explorer_file", "figure_file", "network_file",
    "network_page", "node_view", "nodes_page", "note_page", "page_href", "relations_file",
    "series_file", "STUDY_STATISTICS", "study_figure",
]

INDEX = "index.html"
METHODS = "methods.html"
CHECKS = "checks.html"
DOWNLOADS = "downloads.html"
DATAPACKAGE = "files/datapackage.json"
ALL_DATA = "files/all-data.zip"  # every table, GraphML file and the descriptor, in one zip
MANIFEST = "manifest.json"
STUDY_STATISTICS = "files/study-statistics.csv"  # every network's statistics, one row each
SHARING = "sharing.html"  # only in a partner copy: its terms and what was protected
EXPLORE_SCRIPT = "static/explore.js"  # the theme's explorable map
NAV_NETWORKS = 12  # up to this many networks each have a link in every page's navigation


def compare_page(series: str) -> str:
    return f"compare/{series}.html"


def compare_figure(series: str, name: str, ext: str) -> str:
    return f"compare/{series}/{name}.{ext}"


def study_figure(name: str, ext: str) -> str:
    """A figure of the whole study (the front page's), not of one network."""
    return f"figures/{name}.{ext}"


def series_file(series: str, name: str) -> str:
    return f"files/series/{series}/{name}"


def relations_file(relation: str, name: str) -> str:
    """A download of one comparison of relations (its page is ``compare_page(relation)``)."""
    return f"files/relations/{relation}/{name}"


def network_page(network_id: str) -> str:
    return f"networks/{network_id}/index.html"


def nodes_page(network_id: str) -> str:
    return f"networks/{network_id}/nodes.html"


def communities_page(network_id: str) -> str:
    """One network's communities: profiles, stability and the comparison with attributes."""
    return f"networks/{network_id}/communities.html"


def node_view(network_id: str, position: int) -> str:
    """One node's own page, by its place in node order (from 1): ids may hold any character,
    and a file name may not."""
    return f"networks/{network_id}/nodes/node-{position + 1}.html"


def note_page(stem: str) -> str:
    return f"notes/{stem}.html"


def network_file(network_id: str, name: str) -> str:
    """A download of one network: nodes.csv, edges.csv, statistics.csv or network.graphml."""
    return f"files/{network_id}/{name}"


def explorer_file(network_id: str) -> str:
    """The explorable map's data of one network, a script beside its page."""
    return f"networks/{network_id}/explore-data.js"


def figure_file(network_id: str, figure: str, extension: str) -> str:
    return f"networks/{network_id}/figures/{figure}.{extension}"


def _relative(target: str, folder: str) -> str:
    """``posixpath.relpath(target, folder)`` for paths inside the site (relative, no ".."),
    without asking the file system for the working folder: pages make many links."""
    to = [part for part in target.split("/") if part not in ("", ".")]
    start = [part for part in folder.split("/") if part not in ("", ".")]
    common = 0
    while common < min(len(to), len(start)) and to[common] == start[common]:
        common += 1
    parts = [".."] * (len(start) - common) + to[common:]
    return "/".join(parts) if parts else "."


def page_href(from_path: str, to_path: str) -> str:
    """A relative link from one site file to another (works from file:// and any sub-path)."""
    target, _, fragment = to_path.partition("#")
    relative = _relative(target, posixpath.dirname(from_path))
    return quote(relative, safe="/") + (f"#{quote(fragment, safe='')}" if fragment else "")


@dataclass(frozen=True)
class Link:
    label: str
    href: str
    current: str | None = None  # aria-current: "page" for this page, "true" for its section


@dataclass(frozen=True)
class PageFrame:
    """What every page shows around its content."""

    path: str
    title: str
    study_title: str
    root: str  # relative prefix to the site root: "", "../" or "../../"
    nav: tuple[Link, ...]
    notes_nav: tuple[Link, ...]
    version: str
    scripts: tuple[str, ...] = ()  # hrefs of scripts the page loads
    subnav: tuple[Link, ...] = ()  # the pages of one network, on those pages
    notice: str = ""  # a partner copy says so in every page's header; "" in the full report
    notice_href: str = ""  # the sharing page, linked from the notice

    @property
    def stylesheet(self) -> str:
        return self.root + "static/site.css"

    def href(self, to_path: str) -> str:
        return page_href(self.path, to_path)


class SiteMap:
    """The pages of one site, their titles, and the navigation built for each of them."""

    def __init__(self, *, study_title: str, networks: list[tuple[str, str]],
                 notes: list[tuple[str, str]], version: str, notice: str = "",
                 series: list[tuple[str, str]] | None = None,
                 two_mode: list[tuple[str, str]] | None = None,
                 relations: list[tuple[str, str]] | None = None):
        self.study_title = study_title
        self.two_mode = two_mode or []  # (id, title) of two-mode networks, listed first
        self.networks = networks  # (id, title) in study order
        self._one_mode = frozenset(net_id for net_id, _ in networks)
        self.series = series or []  # (series, title) of every series with two or more waves
        self.relations = relations or []  # (id, title) of every [[relations]] table
        self.notes = notes  # (stem, title), sorted by stem
        self.version = version
        self.notice = notice  # set for a partner copy, which also has the sharing page

    def frame(self, path: str, title: str, *, section: str | None = None,
              scripts: tuple[str, ...] = ()) -> PageFrame:
        """The frame of the page at ``path``; ``section`` is the nav target it belongs under."""

        def link(label: str, target: str) -> Link:
            current = "page" if target == path else "true" if target == section else None
            return Link(label, page_href(path, target), current)

        nav = [link("Overview", INDEX)]
        pages = [*self.two_mode, *self.networks]
        if len(pages) <= NAV_NETWORKS:
            nav += [link(net_title, network_page(net_id)) for net_id, net_title in pages]
        else:  # a study of many groups: the front page's table lists and sorts them
            nav.append(Link(f"All {len(pages):,} networks", page_href(path, INDEX + "#glance"),
                            "true" if path.startswith("networks/") else None))
        nav += [link(series_title, compare_page(name)) for name, series_title in self.series]
        nav += [link(title, compare_page(rel_id)) for rel_id, title in self.relations]
        nav += [link("Methods", METHODS), link("Data checks", CHECKS), link("Downloads", DOWNLOADS)]
        if self.notice:
            nav.append(link("Sharing", SHARING))
        notes = tuple(link(note_title, note_page(stem)) for stem, note_title in self.notes)
        subnav: tuple[Link, ...] = ()
        net_id = path.split("/")[1] if path.startswith("networks/") else ""
        if net_id in self._one_mode:
            if path in (network_page(net_id), nodes_page(net_id), communities_page(net_id)):
                subnav = (link("Results", network_page(net_id)),
                          link("Every node", nodes_page(net_id)),
                          link("Communities", communities_page(net_id)))
            elif path.startswith(f"networks/{net_id}/nodes/"):  # a node's own page
                subnav = (link("Results", network_page(net_id)),
                          Link("Every node", page_href(path, nodes_page(net_id)), "true"),
                          link("Communities", communities_page(net_id)))
        root = "../" * path.count("/")
        return PageFrame(path=path, title=title, study_title=self.study_title, root=root,
                         nav=tuple(nav), notes_nav=notes, version=self.version,
                         scripts=tuple(page_href(path, s) for s in scripts), subnav=subnav,
                         notice=self.notice,
                         notice_href=page_href(path, SHARING) if self.notice else "")
