"""A page's table of contents, made from the sections the page turned out to have.

A template asks for one by writing ``CONTENTS_MARK`` where the list belongs; once the page is
rendered, the mark becomes a list of links to every ``<h2 id=...>`` after it (or nothing, on a
page with fewer than ``CONTENTS_AT_LEAST`` such sections). Made after rendering, so a section
that a network has only sometimes (tests against chance, a map) is listed exactly when shown."""

from __future__ import annotations

import re

__all__ = ["CONTENTS_AT_LEAST", "CONTENTS_MARK", "with_contents"]

CONTENTS_MARK = "<!-- netfolio: page contents -->"
CONTENTS_AT_LEAST = 3
_HEADING = re.compile(r'<h2\b[^>]*\bid="([^"]+)"[^>]*>(.*?)</h2>', re.S)
_TAG = re.compile(r"<[^>]+>")


def with_contents(html: str) -> str:
    """``html`` with its contents mark replaced (the heading text stays escaped as it was)."""
    if CONTENTS_MARK not in html:
        return html
    before, after = html.split(CONTENTS_MARK, 1)
    headings = [(anchor, " ".join(_TAG.sub("", text).split()))
                for anchor, text in _HEADING.findall(after)]
    headings = [(anchor, text) for anchor, text in headings if text]
    if len(headings) < CONTENTS_AT_LEAST:
        return before + after
    items = "\n".join(f'  <li><a href="#{anchor}">{text}</a></li>' for anchor, text in headings)
    contents = ('<nav class="page-contents" aria-labelledby="page-contents-title">\n'
                '<p class="page-contents-title" id="page-contents-title">On this page</p>\n'
                f'<ol>\n{items}\n</ol>\n</nav>')
    return before + contents + after
