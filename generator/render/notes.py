"""Markdown notes as safe HTML: what markdown makes passes an allow-list, and raw HTML is text
unless the study allows it.

python-markdown passes raw HTML through by default; removing its ``html_block`` preprocessor
and ``html`` inline pattern makes it treat ``<tag>`` as text, which the serializer escapes. Link
targets are still written as the author typed them, and a browser reads
``[x](&#106;avascript:...)`` as a ``javascript:`` link, so the HTML then goes through nh3 (the
ammonia sanitiser), which decodes character references and drops control characters as a
browser's parser does before it checks tags, attributes and URL schemes against the allow-lists
below. Images must come from the site itself: one from anywhere else is shown as its alt text
and reported, because the site loads nothing from outside.
"""

from __future__ import annotations

import html
import re
import xml.etree.ElementTree as etree
from collections.abc import Callable
from dataclasses import dataclass
from html.parser import HTMLParser
from typing import Any

import markdown
import nh3
from markdown.extensions import Extension
from markdown.postprocessors import Postprocessor
from markdown.treeprocessors import Treeprocessor
from markdown.util import HTML_PLACEHOLDER_RE
from markupsafe import Markup

from ..errors import DataError, Finding

__all__ = ["MARKDOWN_EXTENSIONS", "RenderedNote", "render_markdown"]

MARKDOWN_EXTENSIONS = ("tables", "fenced_code")
# Column alignment as align="left" rather than style="text-align: left": the pages' CSP allows no
# inline styles.
_EXTENSION_CONFIGS = {"tables": {"use_align_attribute": True}}

# What python-markdown writes with MARKDOWN_EXTENSIONS, plus the span an external image becomes.
_TAGS = frozenset({
    "h1", "h2", "h3", "h4", "h5", "h6", "p", "br", "hr", "blockquote", "pre", "code",
    "em", "strong", "ul", "ol", "li", "a", "img", "span",
    "table", "thead", "tbody", "tr", "th", "td",
})
_ATTRIBUTES = {
    "a": {"href", "title"},
    "img": {"src", "alt", "title"},
    "code": {"class"},  # language-<name> from a fenced block's info string
    "span": {"class"},  # image-alt
    **{f"h{level}": {"id"} for level in range(1, 7)},  # section-<words>, for links and search
}
_ALIGN = {"left", "center", "right"}
_ATTRIBUTE_VALUES = {"th": {"scope": {"col", "row"}, "align": _ALIGN}, "td": {"align": _ALIGN}}
# Schemes a link may use; relative links always pass. Images pass only as relative paths.
_LINK_SCHEMES = frozenset({"http", "https", "mailto"})
_CLASSES = {"code": re.compile(r"language-[\w+#.-]+"), "span": re.compile(r"image-alt")}
_HEADING_ID = re.compile(r"section-[\w-]+")  # the only ids a heading keeps

# How a URL parser reads the start of an address (WHATWG URL standard, "basic URL parser"): it
# trims C0 controls and spaces, deletes tabs and newlines anywhere, then looks for a scheme or a
# host ("//host", where a backslash counts as a slash).
_URL_TRIM = "".join(chr(c) for c in range(0x21))
_TAB_OR_NEWLINE = re.compile(r"[\t\n\r]")
_SCHEME = re.compile(r"[A-Za-z][A-Za-z0-9+.\-]*:")
_HOST = re.compile(r"[/\\]{2}")

_TAG = re.compile(r"<[^>]*>")
_MD_LINK = re.compile(r"^(?P<stem>[^/:?#]+)\.md(?P<fragment>#[^\s]*)?$")
_EXTERNAL_IMAGE = ("external image not loaded; the site loads nothing from outside — copy the "
                   "image into the study's notes folder and link it relatively")
_MISSING_IMAGE = ("image not shown: the site copies PNG, JPEG, GIF, WebP and SVG files from the "
                  "study's notes folder (and its subfolders), and this address names none; it is "
                  "shown as its alt text")
_TOO_DEEP = ("is nested too deeply to render (lists or quotes inside one another); flatten the "
             "deepest part")
_LONGEST_VALUE = 200  # a data: image can be megabytes; the checks page shows its start


@dataclass(frozen=True)
class RenderedNote:
    html: Markup
    title: str | None  # the text of a level-1 heading that opens the note, if any
    findings: tuple[Finding, ...] = ()  # images not loaded, with the line where each is written
    headings: tuple[tuple[int, str, str], ...] = ()  # (level as shown, text, id), in order


def _is_local_image(src: str) -> bool:
    """Whether an image address (as a browser reads it, references decoded) stays on the site:
    a path with neither a scheme nor a host."""
    address = _TAB_OR_NEWLINE.sub("", src.strip(_URL_TRIM))
    return not (_SCHEME.match(address) or _HOST.match(address))


class _LinksAndHeadings(Treeprocessor):
    """Point links to other notes at their pages, show external images as their alt text, give
    table headers their scope, shift headings, and remember a level-1 heading that opens the note
    as its title."""

    def __init__(self, md: markdown.Markdown, *, note_href: Callable[[str], str | None],
                 shift: int, drop_title: str | None, dropped_images: list[tuple[str, str]],
                 image_href: Callable[[str], str | None] | None = None,
                 missing_images: list[tuple[str, str]] | None = None):
        super().__init__(md)
        self.note_href = note_href
        self.image_href = image_href  # a local image's address on the page; None: not found
        self.missing_images = missing_images if missing_images is not None else []
        self.shift = shift
        self.drop_title = drop_title
        self.dropped_images = dropped_images  # (address as written, address as read)
        self.title: str | None = None
        self.headings: list[tuple[int, str, str]] = []

    def _text(self, element: etree.Element) -> str:
        raw = "".join(element.itertext())
        stash = self.md.htmlStash.rawHtmlBlocks

        def unstash(match: re.Match[str]) -> str:
            index = int(match.group(1))
            # stashed raw HTML (allowed tags, entities) counts only by its text
            return html.unescape(_TAG.sub("", str(stash[index]))) if index < len(stash) else ""

        return " ".join(HTML_PLACEHOLDER_RE.sub(unstash, raw).split())

    def _show_alt_text(self, image: etree.Element) -> None:
        written = image.get("src", "")
        read = html.unescape(written)  # python-markdown keeps references; the browser decodes them
        if _is_local_image(read):
            if self.image_href is None:
                return
            target = self.image_href(read)
            if target is not None:
                image.set("src", target)
                return
            self.missing_images.append((written, read))
        else:
            self.dropped_images.append((written, read))
        alt = image.get("alt") or "(image not loaded)"
        image.tag = "span"
        image.attrib.clear()
        image.set("class", "image-alt")
        image.text = alt

    def run(self, root: etree.Element) -> None:
        first = next(iter(root), None)
        if first is not None and first.tag == "h1":
            self.title = self._text(first)
            if self.drop_title is not None and self.title.casefold() == self.drop_title.casefold():
                root.remove(first)
        for element in root.iter():
            if element.tag == "img":
                self._show_alt_text(element)
            link = _MD_LINK.match(element.get("href", "")) if element.tag == "a" else None
            if link:
                target = self.note_href(link.group("stem"))
                if target is not None:
                    element.set("href", target + (link.group("fragment") or ""))
            if element.tag == "th" and "scope" not in element.attrib:
                element.set("scope", "col")  # markdown tables have one header row
            if re.fullmatch(r"h[1-6]", element.tag):
                if self.shift:
                    element.tag = f"h{min(6, int(element.tag[1]) + self.shift)}"
                self._name_heading(element)

    def _name_heading(self, heading: etree.Element) -> None:
        """Give a heading an id from its words (section-..., numbered when repeated), so a
        search result or a link can open the note at it."""
        text = self._text(heading)
        words = re.sub(r"[^\w]+", "-", text.casefold()).strip("-_") or "part"
        anchor = f"section-{words[:60].rstrip('-')}"
        taken = {a for _, _, a in self.headings}
        number = 2
        unique = anchor
        while unique in taken:
            unique = f"{anchor}-{number}"
            number += 1
        heading.set("id", unique)
        self.headings.append((int(heading.tag[1]), text, unique))


def _sanitise(text: str, dropped_images: list[tuple[str, str]]) -> str:
    """Keep only the allow-listed tags, attributes and URL schemes (nh3 decodes references and
    strips control characters before it checks them)."""

    def attribute_filter(tag: str, attribute: str, value: str) -> str | None:
        # nh3 calls this with the decoded value, after dropping URLs of other schemes; it must
        # not raise (an exception only strips the attribute).
        if tag == "img" and attribute == "src" and not _is_local_image(value):
            dropped_images.append((value, value))
            return None
        if attribute == "id":
            return value if _HEADING_ID.fullmatch(value) else None
        if attribute == "class":
            pattern = _CLASSES.get(tag)
            kept = [name for name in value.split() if pattern and pattern.fullmatch(name)]
            return " ".join(kept) or None
        return value

    return nh3.clean(text, tags=set(_TAGS), attributes={k: set(v) for k, v in _ATTRIBUTES.items()},
                     tag_attribute_values=_ATTRIBUTE_VALUES, url_schemes=set(_LINK_SCHEMES),
                     attribute_filter=attribute_filter, link_rel=None, strip_comments=True)


class _SanitiseBeforeRawHtml(Postprocessor):
    """With ``allow_html``: sanitise what markdown made, before the author's raw HTML, kept as
    written, goes back in (python-markdown's ``raw_html`` postprocessor, priority 30)."""

    def __init__(self, md: markdown.Markdown, dropped_images: list[tuple[str, str]]):
        super().__init__(md)
        self.dropped_images = dropped_images

    def run(self, text: str) -> str:
        # python-markdown writes the "&" of its own references as a placeholder that its
        # amp_substitute postprocessor (priority 20) restores; restore it first so that the
        # sanitiser sees the references a browser will decode.
        return _sanitise(text.replace(markdown.util.AMP_SUBSTITUTE, "&"), self.dropped_images)


class _RawImageSources(HTMLParser):
    """The external image addresses left in the author's raw HTML (kept with ``allow_html``;
    the pages' Content-Security-Policy stops a browser from loading them)."""

    def __init__(self, body: str):
        super().__init__(convert_charrefs=True)
        self.external: list[str] = []
        self.feed(body)
        self.close()

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        src = dict(attrs).get("src") if tag == "img" else None
        if src is not None and not _is_local_image(src):
            self.external.append(src)


class _NoteExtension(Extension):
    def __init__(self, *, allow_html: bool, processor_args: dict[str, Any]):
        super().__init__()
        self.allow_html = allow_html
        self.processor_args = processor_args
        self.processor: _LinksAndHeadings | None = None

    def extendMarkdown(self, md: markdown.Markdown) -> None:  # noqa: N802 - python-markdown's name
        if not self.allow_html:
            md.preprocessors.deregister("html_block")
            md.inlinePatterns.deregister("html")
        else:
            md.postprocessors.register(_SanitiseBeforeRawHtml(
                md, self.processor_args["dropped_images"]), "netfolio_sanitise", 35)
        self.processor = _LinksAndHeadings(md, **self.processor_args)
        # Below the inline processor (priority 20), so link and heading text is final.
        md.treeprocessors.register(self.processor, "netfolio_links_headings", 5)


def _image_findings(text: str, file: str, dropped: list[tuple[str, str]],
                    message: str = _EXTERNAL_IMAGE, level: str = "fix") -> list[Finding]:
    """One finding per image not loaded, on the line where its address is written (best effort:
    the n-th image with an address is looked for after the (n-1)-th)."""
    findings: list[Finding] = []
    searched_from: dict[str, int] = {}
    for written, read in dropped:
        start = searched_from.get(read, 0)
        index = text.find(written, start) if written else -1
        if index < 0 and read != written:
            index = text.find(read, start)
        line = None
        if index >= 0:
            searched_from[read] = index + 1
            line = text.count("\n", 0, index) + 1
        value = read if len(read) <= _LONGEST_VALUE else read[:_LONGEST_VALUE] + "…"
        findings.append(Finding(level, file, message, line=line, value=value))
    return findings


def render_markdown(text: str, *, allow_html: bool = False,
                    note_href: Callable[[str], str | None] = lambda stem: None,
                    shift_headings: int = 0, drop_title: str | None = None,
                    file: str = "note",
                    image_href: Callable[[str], str | None] | None = None) -> RenderedNote:
    """Render one note.

    ``note_href(stem)`` gives the page address for a link to ``<stem>.md`` (None leaves it);
    ``shift_headings`` demotes headings (1: h1 -> h2) for notes shown inside another page;
    ``drop_title`` removes a leading level-1 heading with that text (the page already shows it);
    ``file`` names the note in findings and errors (``notes/x.md``);
    ``image_href(address)`` gives the page's address for a local image (copied into the site), or
    None when there is no such image: it is then shown as its alt text, with a warning. Without
    it local image addresses are left as written.

    Without ``allow_html`` the whole page goes through the sanitiser; with it, the author's raw
    HTML is kept as written (pages' Content-Security-Policy still stops any script in it from
    running) and everything markdown made from the text is sanitised.
    Raises DataError when the note is nested too deeply for python-markdown, which recurses.
    """
    dropped: list[tuple[str, str]] = []
    missing: list[tuple[str, str]] = []
    extension = _NoteExtension(allow_html=allow_html, processor_args={
        "note_href": note_href, "shift": shift_headings, "drop_title": drop_title,
        "dropped_images": dropped, "image_href": image_href, "missing_images": missing})
    md = markdown.Markdown(extensions=[*MARKDOWN_EXTENSIONS, extension],
                           extension_configs=_EXTENSION_CONFIGS, output_format="html")
    try:
        body = md.convert(text)
    except RecursionError:
        raise DataError(Finding("error", file, _TOO_DEEP)) from None
    if allow_html:
        dropped += [(src, src) for src in _RawImageSources(body).external]
    else:
        body = _sanitise(body, dropped)
    processor = extension.processor
    title = processor.title if processor else None
    headings = tuple(processor.headings) if processor else ()
    findings = (_image_findings(text, file, dropped)
                + _image_findings(text, file, missing, _MISSING_IMAGE, "warning"))
    findings.sort(key=lambda f: (f.line is None, f.line or 0))
    return RenderedNote(Markup(body), title, tuple(findings), headings)
