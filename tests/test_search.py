"""The search index every page's header box reads: what is in it and where each entry leads.

Typing in a real browser is tested in test_browser.py."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from conftest import write_study

from generator.build import build_study
from generator.render import search as search_module
from generator.render.notes import render_markdown


def _entries(site: Path) -> list[list[str]]:
    text = (site / "search-index.js").read_text("utf-8")
    match = re.search(r"window\.netfolioSearch = (\[.*\]);\n\Z", text, re.S)
    assert match
    return json.loads(match.group(1))


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    root = tmp_path_factory.mktemp("search")
    study = write_study(root / "study", networks=[{
        "id": "ties", "title": "Who works with whom", "edges": "data/ties.csv",
        "nodes": "data/people.csv", "label": "name"}], files={
        "data/ties.csv": "source,target\np1,p2\np2,p3\np3,p1\np3,p4\n",
        "data/people.csv": "id,name,unit\np1,Ada Brightwater,north\np2,<b>Bold</b> Name,south\n"
                           "p3,Cyril Fenmoor,north\np4,Dana Ollerby,\n",
        "notes/method.md": "# How we asked\n\nText.\n\n## Who answered\n\n## Who answered\n"})
    return build_study(study, output=root / "site").output


def test_every_node_is_indexed_with_its_attributes_and_row(site: Path) -> None:
    nodes = [e for e in _entries(site) if e[1] == "Node of Who works with whom"]
    assert [e[0] for e in nodes] == ["Ada Brightwater (p1)", "<b>Bold</b> Name (p2)",
                                     "Cyril Fenmoor (p3)", "Dana Ollerby (p4)"]
    assert [e[3] for e in nodes] == ["north", "south", "north", ""]
    # Each leads to the node's own page (networks this small have one per node).
    assert [e[2] for e in nodes] == [f"networks/ties/nodes/node-{k}.html" for k in range(1, 5)]
    for k, node in enumerate(("p1", "p2", "p3", "p4"), start=1):
        assert f"<code>{node}</code>" in (site / nodes[k - 1][2]).read_text("utf-8")


def test_networks_statistics_pages_and_note_headings_are_indexed(site: Path) -> None:
    entries = _entries(site)
    by_title = {e[0]: e for e in entries}
    assert by_title["Who works with whom"][2] == "networks/ties/index.html"
    assert by_title["Who works with whom"][1] == "Network: 4 nodes"
    density = by_title["Density"]
    assert density[2] == "networks/ties/index.html#statistic-density"
    page = (site / "networks/ties/index.html").read_text("utf-8")
    assert 'id="statistic-density"' in page
    # 4 ties among 4 nodes, undirected: 4 / (4 * 3 / 2) (the density's definition).
    assert density[1] == "Statistic of Who works with whom: 0.667"
    sections = [e for e in entries if e[1] == "Section of the note How we asked"]
    assert [(e[0], e[2]) for e in sections] == [
        ("Who answered", "notes/method.html#section-who-answered"),
        ("Who answered", "notes/method.html#section-who-answered-2")]
    note = (site / "notes/method.html").read_text("utf-8")
    assert '<h2 id="section-who-answered">' in note and 'id="section-who-answered-2"' in note
    assert [e[0] for e in entries[:4]] == ["Overview", "Methods", "Data checks", "Downloads"]


def test_every_page_loads_the_index_and_the_search_script_from_the_root(site: Path) -> None:
    for page in site.rglob("*.html"):
        depth = len(page.relative_to(site).parts) - 1
        text = page.read_text("utf-8")
        assert f'<script src="{"../" * depth}search-index.js" defer></script>' in text, page
        assert f'<script src="{"../" * depth}static/search.js" defer></script>' in text, page
        assert 'class="site-search" role="search"' in text


def test_a_heading_keeps_only_the_ids_netfolio_gives(tmp_path: Path) -> None:
    note = render_markdown('## Plan\n\n<h2 id="main">Raw</h2>\n', allow_html=False)
    assert '<h2 id="section-plan">Plan</h2>' in note.html
    assert '<h2 id="main">' not in note.html  # raw HTML is escaped text without allow_html
    assert note.headings == ((2, "Plan", "section-plan"),)


def test_a_very_large_network_indexes_its_first_nodes_only(tmp_path: Path, monkeypatch) -> None:
    monkeypatch.setattr(search_module, "SEARCH_MAX_NODES", 2)
    study = write_study(tmp_path / "study", networks=[{"id": "big", "edges": "data/e.csv"}],
                        files={"data/e.csv": "source,target\na,b\nb,c\nc,d\n"})
    site = build_study(study, output=tmp_path / "site").output
    assert [e[0] for e in _entries(site) if e[1].startswith("Node of")] == ["a", "b"]
