"""The table of contents of long pages: made from the sections a page turned out to have."""

from __future__ import annotations

import re

from generator.render.contents import CONTENTS_MARK, with_contents


def _page(*headings: str) -> str:
    sections = "".join(f'<section><h2 id="s{i}">{h}</h2><p>text</p></section>'
                       for i, h in enumerate(headings))
    return f'<main><h1>Title</h1><h2 id="before">Above the mark</h2>{CONTENTS_MARK}{sections}</main>'


def test_every_section_after_the_mark_is_listed_in_order_and_nothing_before_it():
    html = with_contents(_page("Statistics", "Tests <em>against</em> chance", "Communities &amp; more"))
    listed = re.findall(r'<li><a href="#([^"]+)">([^<]*)</a></li>', html)
    assert listed == [("s0", "Statistics"), ("s1", "Tests against chance"),
                      ("s2", "Communities &amp; more")]  # stays escaped as the heading was
    assert CONTENTS_MARK not in html
    assert html.index('class="page-contents"') < html.index('id="s0"')


def test_a_short_page_gets_no_contents_and_loses_the_mark():
    html = with_contents(_page("One", "Two"))
    assert "page-contents" not in html and CONTENTS_MARK not in html
    assert with_contents("<p>no mark</p>") == "<p>no mark</p>"


def test_the_built_network_page_lists_its_sections(tmp_path):
    from conftest import graph_study, karate_graph

    from generator.build import build_study

    site = build_study(graph_study(tmp_path / "k", karate_graph(), attributes=["club"])).output
    page = next((site / "networks").glob("*/index.html")).read_text("utf-8")
    contents, after = page.split('class="page-contents"')[1].split("</nav>", 1)
    listed = re.findall(r'<li><a href="#([^"]+)">', contents)
    ids = re.findall(r'<h2 id="([^"]+)"', after)
    assert listed == ids and {"statistics", "communities"} <= set(listed)
