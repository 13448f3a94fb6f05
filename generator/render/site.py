"""Render every page of the site and collect the theme's static files."""

from __future__ import annotations

import hashlib
import json
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path
from urllib.parse import unquote

from markupsafe import Markup

from ..analyse.across import study_table
from ..config import StudyConfig
from ..errors import Finding
from .checks import checks_context
from .communities_page import communities_context
from .compare import SeriesInput, compare_context, series_title
from .contents import with_contents
from .downloads import downloads_context
from .inputs import NetworkPageInput
from .methods import methods_context
from .network_page import network_context
from .node_view import Appearances, node_appearances, node_view_contexts
from .nodes_page import nodes_context
from .notes import RenderedNote, render_markdown
from .overview import StudyOverview, overview_context
from .relations_page import RelationsInput, relations_context, relations_downloads
from .search import SEARCH_INDEX, search_entries, search_index
from .site_map import (
    CHECKS,
    DOWNLOADS,
    EXPLORE_SCRIPT,
    INDEX,
    METHODS,
    SHARING,
    PageFrame,
    SiteMap,
    communities_page,
    compare_page,
    explorer_file,
    network_page,
    node_view,
    nodes_page,
    note_page,
    page_href,
)
from .theme import load_theme
from .two_mode_page import TwoModeInput, two_mode_downloads, two_mode_methods, two_mode_page

__all__ = ["NotePage", "PageReuse", "PartnerCopy", "RenderedNotes", "SharingPage", "render_notes",
           "render_site"]


@dataclass(frozen=True)
class NotePage:
    """Everything ``note.html`` shows."""

    page: PageFrame
    body: Markup
    has_title: bool  # the note opens with its own level-1 heading


@dataclass(frozen=True, kw_only=True)
class PartnerCopy:
    """What turns the site into a partner copy: the notice in every page's header and what the
    sharing page says. The caller words them; this stage lays them out. ``terms`` is markdown,
    rendered as notes are; ``labels`` lets the network maps name nodes."""

    notice: str
    terms: str | None
    terms_file: str  # where the terms were read, as findings name it
    protections: tuple[str, ...]  # what was protected and how, one sentence each
    cautions: tuple[str, ...]
    contact: str | None
    labels: bool = False


@dataclass(frozen=True)
class SharingPage:
    """Everything ``sharing.html`` shows."""

    page: PageFrame
    terms: Markup | None
    protections: tuple[str, ...]
    cautions: tuple[str, ...]
    contact: str | None

TABLE_SCRIPT = "static/table.js"


def _stem_title(stem: str) -> str:
    words = stem.replace("-", " ").replace("_", " ").strip()
    return words[:1].upper() + words[1:] if words else stem


def _note_linker(page: str, stems: set[str]) -> Callable[[str], str | None]:
    def href(stem: str) -> str | None:
        return page_href(page, note_page(stem)) if stem in stems else None
    return href


# Files a note may show as an image, copied into the site under MEDIA from the notes folder.
IMAGE_SUFFIXES = frozenset({".png", ".jpg", ".jpeg", ".gif", ".webp", ".svg"})
MEDIA = "media"


def note_images(study: StudyConfig) -> list[Path]:
    """Every image file in the study's notes folder and its subfolders (what notes can show,
    and so what a rebuild must notice when it changes)."""
    folder = study.root / "notes"
    if not folder.is_dir():
        return []
    return sorted(path for path in folder.rglob("*")
                  if path.suffix.lower() in IMAGE_SUFFIXES and note_image(study, path) is not None)


def note_image(study: StudyConfig, path: Path) -> Path | None:
    """``path`` resolved, when it is an image file inside the study's notes folder (links are
    followed, and must stay inside it); None otherwise."""
    try:
        found = path.resolve(strict=True)
        folder = (study.root / "notes").resolve(strict=True)
    except (OSError, RuntimeError):  # missing, or a link that leads back to itself
        return None
    if (not found.is_relative_to(folder) or found.suffix.lower() not in IMAGE_SUFFIXES
            or not found.is_file() or found.is_relative_to(study.output.resolve())):
        return None
    return found


def _image_linker(study: StudyConfig, page: str, folder: Path, images: dict[str, Path]
                  ) -> Callable[[str], str | None]:
    """A local image address of a markdown file in ``folder`` -> its address on ``page``, the
    image noted in ``images`` (site path -> file) to be copied; None when there is none."""
    notes = study.root / "notes"

    def href(address: str) -> str | None:
        written = unquote(address.split("#", 1)[0].split("?", 1)[0])
        if not written or written.startswith(("/", "\\")) or "\\" in written:
            return None
        found = note_image(study, folder / written)
        if found is None:
            return None
        site_path = f"{MEDIA}/{found.relative_to(notes.resolve()).as_posix()}"
        images[site_path] = found
        return page_href(page, site_path)
    return href


@dataclass(frozen=True)
class RenderedNotes:
    notes: dict[str, RenderedNote]  # by stem, in order
    summary: RenderedNote | None
    findings: tuple[Finding, ...]  # of every note and the summary, each once
    images: dict[str, Path] = field(default_factory=dict)  # site path -> image file, to copy


def render_notes(study: StudyConfig, notes: dict[str, str], summary: str | None) -> RenderedNotes:
    """Render every note and the front page's summary as the site shows them.

    ``build`` gets them through ``render_site``; ``check`` calls this alone, so it finds what
    rendering would refuse (a DataError for a note nested too deeply) and what it reports.
    """
    allow_html = study.site.allow_html
    stems = set(notes)
    images: dict[str, Path] = {}
    folder = study.root / "notes"
    rendered = {
        stem: render_markdown(notes[stem], allow_html=allow_html,
                              note_href=_note_linker(note_page(stem), stems),
                              file=study.relative(folder / f"{stem}.md"),
                              image_href=_image_linker(study, note_page(stem), folder, images))
        for stem in sorted(notes)
    }
    front = None
    if summary is not None:
        front = render_markdown(summary, allow_html=allow_html,
                                note_href=_note_linker(INDEX, stems), shift_headings=1,
                                drop_title=study.title,
                                file=study.relative(study.summary) if study.summary else "summary",
                                image_href=_image_linker(
                                    study, INDEX, study.summary.parent if study.summary
                                    else folder, images))
    # The summary is often notes/index.md, a note too: the same finding is listed once.
    found = [f for note in (*rendered.values(), front) if note is not None for f in note.findings]
    findings = tuple(sorted(dict.fromkeys(found), key=lambda f: (f.file, f.line or 0)))
    return RenderedNotes(rendered, front, findings, dict(sorted(images.items())))


def render_site(study: StudyConfig, networks: list[NetworkPageInput], *, notes: dict[str, str],
                summary: str | None, build_info: dict[str, str],
                link_dois: bool = True, reuse: PageReuse | None = None,
                partner: PartnerCopy | None = None,
                sizes: Mapping[str, int] | None = None,
                series: Sequence[SeriesInput] = (),
                two_mode: Sequence[TwoModeInput] = (),
                relations: Sequence[RelationsInput] = (),
                overview: StudyOverview | None = None) -> dict[str, bytes]:
    """Every page and static file of the site as {relative posix path: bytes}.

    ``notes`` maps a note's stem to its markdown; ``summary`` is the front page's markdown;
    ``build_info`` holds "netfolio" (the version) and "built" (a date, or "" for none).
    ``link_dois`` makes each reference's DOI a link to https://doi.org/ (the only external
    address the site contains); without it DOIs are plain text.
    ``reuse`` keeps the bytes of the pages of each network (and of the methods and downloads
    pages) between builds in one process, keyed by what they show, so a note edit renders only
    the pages the notes appear on.
    ``partner`` makes a partner copy: every page says so in its header, and ``sharing.html``
    holds its terms and cautions.
    ``sizes`` maps the path of each download and figure to its size in bytes, for the downloads
    page. ``series`` holds the comparison of every series of two or more waves. ``two_mode``
    are the two-mode networks: each gets its page and its sections of the
    methods and downloads pages (their projections are among ``networks``). ``relations``
    are the comparisons of networks on the same nodes: a page each under compare/, and their
    sections of the methods and downloads pages. ``overview`` is the study-wide table and spread
    figure of the front page (built from ``networks`` when not given).
    Raises ConfigError (key ``site.theme``) for an unknown theme or a broken template.
    """
    theme = load_theme(study)
    written = render_notes(study, notes, summary)
    rendered = written.notes
    site = SiteMap(
        study_title=study.title,
        networks=[(item.id, item.title) for item in networks],
        notes=[(stem, note.title or _stem_title(stem)) for stem, note in rendered.items()],
        version=build_info.get("netfolio", ""),
        notice=partner.notice if partner is not None else "",
        series=[(s.comparison.series, series_title(s.comparison.series)) for s in series],
        two_mode=[(item.id, item.title) for item in two_mode],
        relations=[(item.id, item.title) for item in relations],
    )
    terms = None
    if partner is not None and partner.terms is not None:
        terms = render_markdown(partner.terms, allow_html=study.site.allow_html,
                                note_href=_note_linker(SHARING, set(notes)), shift_headings=2,
                                drop_title="Sharing terms", file=partner.terms_file)
    files_as_written: dict[str, dict[str, str]] = {}
    for item in networks:
        files_as_written[item.id] = {"data": study.relative(item.config.data_file)}
        if item.config.nodes is not None:
            files_as_written[item.id]["nodes"] = study.relative(item.config.nodes)
    pages: list[tuple[str, str, object]] = []
    reused: dict[str, bytes] = {}
    frame_key = _digest(site.study_title, site.networks, site.notes, site.series, site.relations,
                        site.version,
                        theme.digest(), link_dois, build_info.get("built", ""))

    def keep(path: str, *parts: object) -> bool:
        """True (and the page's bytes noted) when ``reuse`` holds this page for these inputs."""
        if reuse is None:
            return False
        key = _digest(path, frame_key, *parts)
        keys[path] = key
        if key in reuse.pages:
            reused[path] = reuse.pages[key]
            return True
        return False

    keys: dict[str, str] = {}
    every_network = [reuse.networks.get(item.id, "") for item in networks] if reuse else []

    summary_html = written.summary.html if written.summary is not None else None
    if overview is None:
        overview = StudyOverview(study_table([item.analysis for item in networks]))
    pages.append((INDEX, "index.html", overview_context(
        site.frame(INDEX, study.title, scripts=(TABLE_SCRIPT,)), networks, overview,
        summary=summary_html, built=build_info.get("built", ""))))

    appearances = node_appearances(networks)
    for item in networks:
        own = reuse.networks.get(item.id, "") if reuse else ""
        path = network_page(item.id)
        if not keep(path, own):
            scripts = (explorer_file(item.id), EXPLORE_SCRIPT) if item.explorer else ()
            pages.append((path, "network.html",
                          network_context(item, site.frame(path, item.title, scripts=scripts))))
        path = nodes_page(item.id)
        if not keep(path, own):
            frame = site.frame(path, f"{item.title}: every node", section=network_page(item.id),
                               scripts=(TABLE_SCRIPT,))
            pages.append((path, "nodes.html", nodes_context(item, frame)))
        path = communities_page(item.id)
        if not keep(path, own):
            frame = site.frame(path, f"{item.title}: communities", section=network_page(item.id))
            pages.append((path, "communities.html", communities_context(item, frame)))
        if item.ego is not None:
            pages += _node_views(item, appearances, site, keep, every_network)

    by_id = {item.id: item for item in networks}
    for compared in series:
        path = compare_page(compared.comparison.series)
        pages.append((path, "compare.html", compare_context(
            compared, by_id, site.frame(path, series_title(compared.comparison.series)))))

    for relation in relations:
        path = compare_page(relation.id)
        pages.append((path, "relations.html", relations_context(
            relation, by_id, site.frame(path, relation.title))))
    # What the relations sections of the methods and downloads pages show.
    relations_shown = [repr(relation.comparison) for relation in relations]

    for two in two_mode:
        path = network_page(two.id)
        pages.append((path, "two_mode.html", two_mode_page(two, site.frame(path, two.title))))
    if not keep(METHODS, every_network, relations_shown):
        frame = site.frame(METHODS, "Methods")
        pages.append((METHODS, "methods.html", replace(methods_context(
            frame, networks, files_as_written, link_dois=link_dois, relations=relations),
            two_mode=tuple(two_mode_methods(two, frame) for two in two_mode))))
    note_findings = written.findings if notes or summary is not None else None
    if terms is not None:  # the terms are often a note too: each finding is listed once
        note_findings = tuple(dict.fromkeys((*(note_findings or ()), *terms.findings)))
    pages.append((CHECKS, "checks.html", checks_context(
        site.frame(CHECKS, "Data checks"), networks, notes=note_findings, two_mode=two_mode)))
    node_files = {net_id: paths["nodes"] for net_id, paths in files_as_written.items()
                  if "nodes" in paths}
    if not keep(DOWNLOADS, every_network, sorted((sizes or {}).items()),
            relations_shown):
        frame = site.frame(DOWNLOADS, "Downloads")
        pages.append((DOWNLOADS, "downloads.html", replace(
            downloads_context(frame, networks, node_files, sizes, overview.spread),
            two_mode=tuple(two_mode_downloads(two, frame, sizes or {}) for two in two_mode),
            relations=tuple(relations_downloads(relation, frame, sizes or {})
                            for relation in relations))))

    for (stem, note), (_, title) in zip(rendered.items(), site.notes):
        path = note_page(stem)
        pages.append((path, "note.html", NotePage(page=site.frame(path, title), body=note.html,
                                                  has_title=note.title is not None)))
    if partner is not None:
        pages.append((SHARING, "sharing.html", SharingPage(
            page=site.frame(SHARING, "Sharing"), terms=terms.html if terms is not None else None,
            protections=partner.protections, cautions=partner.cautions,
            contact=partner.contact)))

    output = {path: with_contents(theme.render(template, context)).encode("utf-8")
              for path, template, context in pages}
    if reuse is not None:
        reuse.pages = {keys[path]: data for path, data in {**output, **reused}.items()
                       if path in keys}
    output.update(reused)
    output.update({f"static/{name}": data for name, data in theme.static.items()})
    output.update({path: image.read_bytes() for path, image in written.images.items()})
    output[SEARCH_INDEX] = search_index(search_entries(
        networks, rendered, {stem: title for stem, title in site.notes},
        node_pages=frozenset(item.id for item in networks if item.ego is not None)))
    return dict(sorted(output.items()))


def _node_views(item: NetworkPageInput, appearances: Appearances, site: SiteMap,
                keep: Callable[..., bool], every_network: list[str]
                ) -> list[tuple[str, str, object]]:
    """The page of every node of ``item`` that ``keep`` does not already hold."""
    assert item.ego is not None
    labels = item.analysis.labels
    paths = [node_view(item.id, position) for position in range(len(labels))]
    wanted = [position for position, path in enumerate(paths) if not keep(path, every_network)]
    if not wanted:
        return []
    frames = [site.frame(paths[p], f"{labels[p]} in {item.title}",
                         section=network_page(item.id)) for p in range(len(paths))]
    contexts = node_view_contexts(item, frames, list(item.ego), appearances)
    return [(paths[p], "node.html", contexts[p]) for p in wanted]


@dataclass
class PageReuse:
    """Pages kept between builds in one process. ``networks`` maps a network id to a key of
    everything its pages show (its analysis and figures); ``pages`` holds the last build's
    reusable pages by the key of their inputs (replaced on every build)."""

    networks: dict[str, str] = field(default_factory=dict)
    pages: dict[str, bytes] = field(default_factory=dict)


def _digest(*parts: object) -> str:
    text = json.dumps(parts, sort_keys=True, default=str, separators=(",", ":"))
    return hashlib.sha256(text.encode("utf-8")).hexdigest()
