"""Markdown notes as safe HTML: raw HTML is shown as text unless the study allows it.

python-markdown passes raw HTML through by default; removing its ``html_block`` preprocessor
and ``html`` inline pattern makes it treat ``<tag>`` as text, which the serializer escapes.
"""

from __future__ import annotations

import html
import re
import xml.etree.ElementTree as etree
from dataclasses import dataclass
from typing import Callable

import markdown
from markdown.extensions import Extension
from markdown.treeprocessors import Treeprocessor
from markdown.util import HTML_PLACEHOLDER_RE
from markupsafe import Markup

__all__ = ["MARKDOWN_EXTENSIONS", "RenderedNote", "render_markdown"]

MARKDOWN_EXTENSIONS = ("tables", "fenced_code")
# Schemes that run code when a reader follows the link; dropped from markdown links and images.
# Raw HTML, when [site] allow_html lets it through, is the study author's own and kept as written.
_UNSAFE_SCHEME = re.compile(r"^\s*(javascript|vbscript|data)\s*:", re.IGNORECASE)
_CONTROL = re.compile(r"[\x00-\x20]+")
_TAG = re.compile(r"<[^>]*>")
_MD_LINK = re.compile(r"^(?P<stem>[^/:?#]+)\.md(?P<fragment>#[^\s]*)?$")


@dataclass(frozen=True)
class RenderedNote:
    html: Markup
    title: str | None  # the text of a level-1 heading that opens the note, if any


class _LinksAndHeadings(Treeprocessor):
    """Drop unsafe link targets, point links to other notes at their pages, give table headers
    their scope, shift headings, and remember a level-1 heading that opens the note as its title."""

    def __init__(self, md: markdown.Markdown, *, note_href: Callable[[str], str | None],
                 shift: int, drop_title: str | None):
        super().__init__(md)
        self.note_href = note_href
        self.shift = shift
        self.drop_title = drop_title
        self.title: str | None = None

    def _text(self, element: etree.Element) -> str:
        raw = "".join(element.itertext())
        stash = self.md.htmlStash.rawHtmlBlocks

        def unstash(match: re.Match[str]) -> str:
            index = int(match.group(1))
            # stashed raw HTML (allowed tags, entities) counts only by its text
            return html.unescape(_TAG.sub("", str(stash[index]))) if index < len(stash) else ""

        return " ".join(HTML_PLACEHOLDER_RE.sub(unstash, raw).split())

    def run(self, root: etree.Element) -> None:
        first = next(iter(root), None)
        if first is not None and first.tag == "h1":
            self.title = self._text(first)
            if self.drop_title is not None and self.title.casefold() == self.drop_title.casefold():
                root.remove(first)
        for element in root.iter():
            for attribute in ("href", "src"):
                value = element.get(attribute)
                if value is None:
                    continue
                if _UNSAFE_SCHEME.match(_CONTROL.sub("", value)):
                    del element.attrib[attribute]
                    continue
                link = _MD_LINK.match(value)
                if attribute == "href" and link:
                    target = self.note_href(link.group("stem"))
                    if target is not None:
                        element.set("href", target + (link.group("fragment") or ""))
            if element.tag == "th" and "scope" not in element.attrib:
                element.set("scope", "col")  # markdown tables have one header row
            if self.shift and re.fullmatch(r"h[1-6]", element.tag):
                element.tag = f"h{min(6, int(element.tag[1]) + self.shift)}"


class _NoteExtension(Extension):
    def __init__(self, *, allow_html: bool, processor_args: dict):
        super().__init__()
        self.allow_html = allow_html
        self.processor_args = processor_args
        self.processor: _LinksAndHeadings | None = None

    def extendMarkdown(self, md: markdown.Markdown) -> None:  # noqa: N802 - python-markdown's name
        if not self.allow_html:
            md.preprocessors.deregister("html_block")
            md.inlinePatterns.deregister("html")
        self.processor = _LinksAndHeadings(md, **self.processor_args)
        # Below the inline processor (priority 20), so link and heading text is final.
        md.treeprocessors.register(self.processor, "netfolio_links_headings", 5)


def render_markdown(text: str, *, allow_html: bool = False,
                    note_href: Callable[[str], str | None] = lambda stem: None,
                    shift_headings: int = 0, drop_title: str | None = None) -> RenderedNote:
    """Render one note.

    ``note_href(stem)`` gives the page address for a link to ``<stem>.md`` (None leaves it);
    ``shift_headings`` demotes headings (1: h1 -> h2) for notes shown inside another page;
    ``drop_title`` removes a leading level-1 heading with that text (the page already shows it).
    """
    extension = _NoteExtension(allow_html=allow_html, processor_args={
        "note_href": note_href, "shift": shift_headings, "drop_title": drop_title})
    md = markdown.Markdown(extensions=[*MARKDOWN_EXTENSIONS, extension], output_format="html")
    body = md.convert(text)
    title = extension.processor.title if extension.processor else None
    return RenderedNote(Markup(body), title)
