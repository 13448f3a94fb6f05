"""Render stage: every page is written, links resolve, data is escaped, output is reproducible."""

from __future__ import annotations

import re
from dataclasses import replace
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import unquote, urljoin, urlsplit

import pytest

import generator.render as render
from generator.analyse import Statistic, analyse_network
from generator.analyse.communities import CommunityResult
from generator.config import (
    CommunitiesConfig,
    EdgeListSource,
    MatrixSource,
    MeasuresConfig,
    NetworkConfig,
    SiteConfig,
    StudyConfig,
)
from generator.draw.figure import Figure
from generator.errors import ConfigError, DataError
from generator.ingest import read_network
from generator.publish.downloads import network_files
from generator.render import CAUTIONS, NetworkPageInput, render_site
from generator.render.describe import references_of, stability_reading
from generator.render.network_page import statistic_rows, top_tables
from generator.render.notes import render_markdown
from generator.render.theme import packaged_themes
from generator.vocabulary import number, value_text

EVIL = "<script>alert(1)</script>"
BUILD = {"netfolio": "0.0-test", "built": ""}

NODES = f"""id,name,team,years
a1,Ada Quist,north,3
a2,{EVIL},north,5
a3,Cyd Moray,south,
a4,Dov Lark,south,12
a5,Eli Fenn,east,1
a6,Fay Orrin,east,7
"""
# Directed and weighted, with a repeated tie (a1->a2 twice) and a self-loop (a3->a3).
ADVICE = """source,target,weight
a1,a2,2
a1,a2,1
a2,a1,1
a2,a3,4
a3,a3,1
a3,a1,2
a4,a5,3
a5,a6,1
a6,a4,2
a4,a1,1
"""
WORK = """source,target
a1,a2
a2,a3
a1,a3
a4,a5
a5,a6
a3,a4
"""
SUMMARY = """# Render test study

The summary talks about <b>bold claims</b> and links to [the other note](extra.md).

<div class="raw">a raw block</div>
"""
EXTRA = """# Extra note

| a | b |
|---|---|
| 1 | 2 |

```
<kept as code>
```

Inline <em onclick="x()">html</em> and a [bad link](javascript:alert(2)).
"""


def _study(root: Path, *, theme: str = "default", allow_html: bool = False,
           measures: MeasuresConfig | None = None) -> StudyConfig:
    data = root / "data"
    data.mkdir(parents=True, exist_ok=True)
    (data / "people.csv").write_text(NODES, encoding="utf-8")
    (data / "advice.csv").write_text(ADVICE, encoding="utf-8")
    (data / "work.csv").write_text(WORK, encoding="utf-8")
    return StudyConfig(
        root=root,
        title="Render <test> & study",
        output=root / "out",
        seed=3,
        networks=(
            NetworkConfig(id="advice", title="Advice <ties>",
                          data=EdgeListSource(path=data / "advice.csv", weight="weight"),
                          nodes=data / "people.csv", label="name", directed=True, color_by="team"),
            NetworkConfig(id="work", title="Works with", data=EdgeListSource(path=data / "work.csv"),
                          nodes=data / "people.csv", label="name"),
        ),
        communities=CommunitiesConfig(runs=5),
        measures=measures or MeasuresConfig(),
        site=SiteConfig(theme=theme, allow_html=allow_html),
    )


def _figures(network_id: str) -> list[Figure]:
    return [Figure(name=name, title=f"{network_id} {name}", alt=f"{name} of {EVIL}",
                   caption=f"What the {name} figure shows.", svg=b"<svg/>", png=b"")
            for name in ("map", "degree", "betweenness", "communities")]


def _inputs(study: StudyConfig) -> list[NetworkPageInput]:
    items = []
    for net in study.networks:
        clean = read_network(study, net)
        analysis = analyse_network(clean, communities=study.communities, measures=study.measures,
                                   seed=study.seed)
        items.append(NetworkPageInput(net, analysis, _figures(net.id)))
    return items


def _render(study: StudyConfig, items: list[NetworkPageInput], **kwargs) -> dict[str, bytes]:
    options = {"notes": {"index": SUMMARY, "extra": EXTRA}, "summary": SUMMARY,
               "build_info": BUILD} | kwargs
    return render_site(study, items, **options)


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    study = _study(tmp_path_factory.mktemp("study"))
    items = _inputs(study)
    return study, items, _render(study, items)


class _Page(HTMLParser):
    """Collects the tags, attributes and text of one page."""

    def __init__(self, text: str):
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.text: list[str] = []
        self.feed(text)

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_startendtag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_data(self, data):
        self.text.append(data)

    def all(self, tag: str) -> list[dict[str, str | None]]:
        return [attrs for name, attrs in self.tags if name == tag]


def _pages(site: dict[str, bytes]) -> dict[str, str]:
    return {path: data.decode("utf-8") for path, data in site.items() if path.endswith(".html")}


def _rows(html: str, table_class: str) -> list[str]:
    body = re.search(rf'<table class="[^"]*\b{table_class}\b[^"]*".*?<tbody>(.*?)</tbody>', html, re.S)
    assert body, f"no table of class {table_class}"
    return re.findall(r"<tr\b", body.group(1))


def _downloads(items: list[NetworkPageInput]) -> set[str]:
    paths = {"files/datapackage.json", "files/all-data.zip", "files/study-statistics.csv",
             "manifest.json"}
    for item in items:
        paths |= set(network_files(item.analysis))  # what the publish stage writes
        paths |= {f"networks/{item.id}/figures/{f.name}.{ext}" for f in item.figures
                  for ext in ("svg", "png")}
    return paths


# ---------------------------------------------------------------------------------------------
# The site as a whole


def test_public_api_is_small_and_sorted():
    assert render.__all__ == sorted(render.__all__)
    assert {"NetworkPageInput", "render_site"} <= set(render.__all__)


def test_every_expected_page_and_static_file_is_rendered(built):
    _, _, site = built
    expected = {"index.html", "methods.html", "checks.html", "downloads.html",
                "networks/advice/index.html", "networks/advice/nodes.html",
                "networks/work/index.html", "networks/work/nodes.html",
                "notes/index.html", "notes/extra.html", "static/site.css", "static/table.js"}
    assert expected <= set(site)
    assert all(isinstance(data, bytes) and data for data in site.values())
    assert list(site) == sorted(site)


def test_every_relative_link_points_at_a_page_or_a_download(built):
    _, items, site = built
    targets = set(site) | _downloads(items)
    for path, html in _pages(site).items():
        page = _Page(html)
        ids = {attrs["id"] for _, attrs in page.tags if attrs.get("id")}
        links = [a.get("href") for a in page.all("a")] + [a.get("href") for a in page.all("link")]
        links += [a.get("src") for a in page.all("img")] + [a.get("src") for a in page.all("script")]
        for link in filter(None, links):
            parts = urlsplit(link)
            if parts.scheme:
                assert link.startswith("https://doi.org/"), (path, link)
                continue
            if not parts.path:
                assert parts.fragment in ids, (path, link)
                continue
            resolved = Path(Path(path).parent, unquote(parts.path)).as_posix()
            normalised = Path(*[p for p in resolved.split("/")]).as_posix()
            stack: list[str] = []
            for part in normalised.split("/"):
                if part == "..":
                    assert stack, f"{path}: {link} leaves the site"
                    stack.pop()
                elif part not in ("", "."):
                    stack.append(part)
            assert "/".join(stack) in targets, (path, link)


def test_no_external_address_except_doi_links(built):
    study, items, site = built
    for path, html in _pages(site).items():
        for address in re.findall(r"""(?:href|src)=["']?([a-z]+:[^"' >]*)""", html):
            assert address.startswith("https://doi.org/"), (path, address)
    methods = site["methods.html"].decode()
    assert 'href="https://doi.org/10.2307/3033543"' in methods
    plain = _render(study, items, link_dois=False)
    for path, html in _pages(plain).items():
        assert "https://" not in html and "http://" not in html, path
    assert "doi:10.2307/3033543" in plain["methods.html"].decode()


CSP = ("default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; "
       "base-uri 'none'; form-action 'none'")


def test_every_page_carries_the_content_security_policy_and_needs_no_inline_code(built):
    _, _, site = built
    for path, html in _pages(site).items():
        page = _Page(html)
        metas = [m for m in page.all("meta") if m.get("http-equiv") == "Content-Security-Policy"]
        assert [m["content"] for m in metas] == [CSP], path
        first = [tag for tag, _ in page.tags if tag in ("meta", "link", "script", "style")][:2]
        assert first == ["meta", "meta"], path  # right after the charset, before any resource
        assert all(s.get("src") for s in page.all("script")), path  # no inline script
        assert not page.all("style"), path
        assert not [a for _, a in page.tags if "style" in a or any(k.startswith("on") for k in a)], path


def test_rendering_twice_gives_identical_bytes(built):
    study, items, site = built
    assert _render(study, items) == site


def test_built_date_appears_only_when_given(built):
    study, items, site = built
    assert b"Built " not in site["index.html"]
    dated = _render(study, items, build_info={"netfolio": "0.0-test", "built": "2024-05-01"})
    assert "Built 2024-05-01" in dated["index.html"].decode()
    assert {p: d for p, d in dated.items() if p != "index.html"} == \
        {p: d for p, d in site.items() if p != "index.html"}


def test_every_page_shares_the_navigation_and_marks_the_current_page(built):
    _, _, site = built
    for path, html in _pages(site).items():
        page = _Page(html)
        nav_links = [a for a in page.all("a") if a.get("href", "").endswith(
            ("index.html", "methods.html", "checks.html", "downloads.html"))]
        assert len(nav_links) >= 6, path
        current = [a["href"] for a in page.all("a") if a.get("aria-current") == "page"]
        # the site navigation, or a network's own page list, names this page (and nothing else)
        assert current and {Path(urlsplit(h).path).name for h in current} == {Path(path).name}, path
    nodes_page = _Page(site["networks/advice/nodes.html"].decode())
    section = [a["href"] for a in nodes_page.all("a") if a.get("aria-current") == "true"]
    assert set(section) == {"index.html"}  # the network's results page, in both navigations


def test_pages_are_accessible_in_structure(built):
    _, _, site = built
    for path, html in _pages(site).items():
        page = _Page(html)
        assert page.all("html")[0].get("lang") == "en", path
        assert page.all("a")[0].get("href") == "#main", path  # the skip link comes first
        assert page.all("main")[0].get("id") == "main", path
        assert len(page.all("h1")) == 1, path
        assert all(img.get("alt") for img in page.all("img")), path
        assert all(th.get("scope") in ("col", "row") for th in page.all("th")), path


# ---------------------------------------------------------------------------------------------
# Escaping


def test_a_script_label_appears_only_escaped_on_every_page(built):
    _, _, site = built
    for path, html in _pages(site).items():
        assert EVIL not in html, path
        assert "<script>" not in html, path
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in site["networks/advice/nodes.html"].decode()
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in site["networks/advice/index.html"].decode()
    assert "Render &lt;test&gt; &amp; study" in site["index.html"].decode()


def test_markdown_raw_html_is_escaped_by_default(built):
    _, _, site = built
    front = site["index.html"].decode()
    assert "&lt;b&gt;bold claims&lt;/b&gt;" in front and "<b>bold claims</b>" not in front
    assert '&lt;div class="raw"&gt;' in front
    extra = site["notes/extra.html"].decode()
    assert "&lt;em onclick" in extra and "<em onclick" not in extra
    assert "<table>" in extra and '<th scope="col">a</th>' in extra  # the tables extension ran
    assert "&lt;kept as code&gt;" in extra  # fenced code stays escaped
    assert "javascript:" not in extra


def test_allow_html_keeps_raw_html(tmp_path):
    study = _study(tmp_path, allow_html=True)
    site = _render(study, _inputs(study))
    assert "<b>bold claims</b>" in site["index.html"].decode()
    assert '<div class="raw">a raw block</div>' in site["index.html"].decode()
    extra = site["notes/extra.html"].decode()
    assert '<em onclick="x()">html</em>' in extra
    assert "javascript:" not in extra  # links that run code are dropped even then
    assert EVIL not in site["networks/advice/nodes.html"].decode()  # data is always escaped


def test_markdown_links_to_notes_point_at_their_pages():
    note = render_markdown("[m](methods.md#how) [x](missing.md) [w](https://example.org/a.md)",
                           note_href=lambda stem: f"notes/{stem}.html" if stem == "methods" else None)
    assert 'href="notes/methods.html#how"' in note.html
    assert 'href="missing.md"' in note.html
    assert 'href="https://example.org/a.md"' in note.html


def test_summary_drops_a_heading_that_repeats_the_study_title_and_demotes_the_rest():
    note = render_markdown("# My Study\n\n## Part\n\ntext", shift_headings=1, drop_title="my study")
    assert "<h1>" not in note.html and "My Study" not in note.html
    assert "<h3 id=\"section-part\">Part</h3>" in note.html
    assert note.title == "My Study"


def test_a_note_without_a_heading_gets_one_from_its_name(tmp_path):
    study = _study(tmp_path)
    site = _render(study, _inputs(study), notes={"field-work": "Just text."})
    page = _Page(site["notes/field-work.html"].decode())
    assert len(page.all("h1")) == 1
    assert "Field work" in "".join(page.text)


# Notes carry no script and load nothing from outside, however the address is spelled.

# Markdown whose link or image a browser would read as script: character references, control
# characters, case, reference-style definitions and autolinks.
SCRIPT_PAYLOADS = [
    "[x](&#106;avascript:alert(1))",
    "[x](javascript&#58;alert(1))",
    "[x](java&#x09;script:alert(1))",
    "[x](java&#10;script:alert(1))",
    "[x](java&Tab;script:alert(1))",
    "[x](&#x6A;&#x61;&#x76;&#x61;script&colon;alert(1))",
    "[x](JaVaScRiPt:alert(1))",
    "[x]( &#32;javascript:alert(1))",
    "[x](vbscript:msgbox(1))",
    "[x](VBScript&#58;msgbox(1))",
    "[x](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)",
    "[x](DaTa&#58;text/html,hi)",
    "[x][r]\n\n[r]: &#106;avascript:alert(1)",
    "[x][r]\n\n[r]: java&#10;script:alert(1) \"title\"",
    "![x](&#106;avascript:alert(1))",
    "![x](java&#x09;script:alert(1))",
    "![x](data:image/svg+xml;base64,PHN2Zy8+)",
    "![x][r]\n\n[r]: javascript&#58;alert(1)",
    "<javascript:alert(1)>",
    "<JAVASCRIPT&#58;alert(1)>",
    "<vbscript:msgbox(1)>",
    "<data:text/html,hi>",
]
EXTERNAL_IMAGES = [  # (markdown, the address as a browser reads it, the line it is written on)
    ("![chart](https://pics.example.org/c.png)", "https://pics.example.org/c.png", 5),
    ("![chart](HTTP://pics.example.org/c.png)", "HTTP://pics.example.org/c.png", 5),
    ("![chart](//pics.example.org/c.png)", "//pics.example.org/c.png", 5),
    ("![chart](&#104;ttps://pics.example.org/c.png)", "https://pics.example.org/c.png", 5),
    ("![chart](ht&#9;tps://pics.example.org/c.png)", "ht\ttps://pics.example.org/c.png", 5),
    ("![chart](ftp://pics.example.org/c.png)", "ftp://pics.example.org/c.png", 5),
    # a reference-style image: its address is written on the definition's line
    ("![chart][r]\n\n[r]: https://pics.example.org/r.png", "https://pics.example.org/r.png", 7),
]
_PAGE = "file:///study/output/notes/note.html"


def _resolved(address: str) -> tuple[str, str]:
    """(scheme, host) of an attribute value as a browser reads it; urlsplit, like a browser,
    drops tabs and newlines and trims leading controls and spaces; a backslash counts as a
    slash in a file: or http: address."""
    parts = urlsplit(urljoin(_PAGE, address.replace("\\", "/")))
    return parts.scheme.lower(), parts.netloc


def _unsafe_addresses(html: str) -> list[str]:
    """Every href that could run code and every src that is not a file of the site."""
    unsafe = []
    for tag, attrs in _Page(html).tags:
        for name in ("href", "src"):
            value = attrs.get(name)
            if value is None:
                continue
            scheme, host = _resolved(value)
            allowed = {"file", "http", "https", "mailto"} if name == "href" else {"file"}
            if scheme not in allowed or (name == "src" and host):
                unsafe.append(f"<{tag} {name}={value!r}>")
    return unsafe


@pytest.mark.parametrize("allow_html", [False, True], ids=["escaped", "allow_html"])
@pytest.mark.parametrize("payload", SCRIPT_PAYLOADS)
def test_no_link_or_image_in_a_note_resolves_to_script(payload, allow_html):
    note = render_markdown(f"Before.\n\n{payload}\n\nAfter.", allow_html=allow_html)
    assert _unsafe_addresses(note.html) == []
    assert "Before." in note.html and "After." in note.html


def test_the_sanitiser_keeps_ordinary_links_and_images():
    note = render_markdown("[a](https://example.org/x?y=1&z=2) [b](http://example.org) "
                           "[c](mailto:ana@example.org) <https://example.org/auto> [d](#part) "
                           "[e](../methods.html) ![f](img/chart.png \"Chart\")")
    links = {a["href"] for a in _Page(note.html).all("a")}
    assert links == {"https://example.org/x?y=1&z=2", "http://example.org", "mailto:ana@example.org",
                     "https://example.org/auto", "#part", "../methods.html"}
    assert _Page(note.html).all("img") == [{"alt": "f", "src": "img/chart.png", "title": "Chart"}]
    assert note.findings == ()


def test_only_the_tags_and_attributes_markdown_makes_survive():
    text = ("# T\n\n| a | b |\n|:--|--:|\n| 1 | 2 |\n\n```python\nx = '<b>'\n```\n\n"
            "```{.python #block .extra}\ny\n```\n\n> quote\n\n- *e* **s** `c`\n\n---\n")
    note = render_markdown(text)
    page = _Page(note.html)
    assert {tag for tag, _ in page.tags} == {"h1", "table", "thead", "tbody", "tr", "th", "td",
                                               "pre", "code", "blockquote", "p", "ul", "li", "em",
                                               "strong", "hr"}
    assert page.all("th") == [{"align": "left", "scope": "col"}, {"align": "right", "scope": "col"}]
    assert page.all("code")[:2] == [{"class": "language-python"}, {"class": "language-python"}]
    assert page.all("pre") == [{}, {}]  # no id or stray class from the attribute form
    assert "style=" not in note.html  # aligned columns need no inline style (the CSP has none)
    assert "x = &#x27;&lt;b&gt;&#x27;" in note.html or "x = '&lt;b&gt;'" in note.html


@pytest.mark.parametrize(("markdown_text", "address", "line"), EXTERNAL_IMAGES)
def test_an_external_image_shows_its_alt_text_and_is_reported_with_its_line(markdown_text, address,
                                                                            line):
    note = render_markdown(f"# Title\n\nSee:\n\n{markdown_text}\n", file="notes/pics.md")
    page = _Page(note.html)
    assert page.all("img") == [] and _unsafe_addresses(note.html) == []
    assert '<span class="image-alt">chart</span>' in note.html
    assert len(note.findings) == 1
    finding = note.findings[0]
    assert (finding.file, finding.line, finding.value) == ("notes/pics.md", line, address)
    assert finding.level == "fix" and "external image not loaded" in finding.message
    assert "copy the image into the study's notes folder" in finding.message


def test_each_external_image_is_reported_on_its_own_line():
    text = ("![a](https://h.example/1.png)\n\ntext\n\n"
            "![b](https://h.example/1.png) ![](//h.example/2.png)\n")
    note = render_markdown(text, file="notes/pics.md")
    assert [(f.line, f.value) for f in note.findings] == [
        (1, "https://h.example/1.png"), (5, "https://h.example/1.png"), (5, "//h.example/2.png")]
    assert '<span class="image-alt">(image not loaded)</span>' in note.html


def test_raw_html_images_are_reported_when_allow_html_keeps_them():
    note = render_markdown('Raw <img src="https://h.example/r.png" alt="r"> and ![m](//h.example/m.png)',
                           allow_html=True, file="notes/raw.md")
    assert sorted(f.value for f in note.findings) == ["//h.example/m.png", "https://h.example/r.png"]
    assert '<img src="https://h.example/r.png" alt="r">' in note.html  # the author's HTML, as written


def test_a_note_nested_too_deeply_is_a_data_error_naming_it():
    deep = "\n".join("    " * level + "- item" for level in range(250))
    with pytest.raises(DataError) as raised:
        render_markdown(deep, file="notes/deep.md")
    assert raised.value.findings[0].file == "notes/deep.md"
    assert "nested too deeply" in raised.value.findings[0].message


def test_checks_page_lists_the_findings_of_notes_and_summary_once(tmp_path):
    study = replace(_study(tmp_path), summary=tmp_path / "notes" / "index.md")
    summary = "Intro.\n\n![logo](https://pics.example.org/logo.png)\n"
    site = _render(study, _inputs(study), summary=summary,
                   notes={"index": summary, "field": "# Field\n\nx\n\n![map](//maps.example.org/m.png)"})
    html = site["checks.html"].decode()
    section = html[html.index('<h2 id="notes">Notes and summary</h2>'):]
    rows = re.findall(r"<tr>\s*<th scope=\"row\">(.*?)</th>\s*<td><code>(.*?)</code></td>\s*"
                      r"<td class=\"num\">(.*?)</td>\s*<td>.*?</td>\s*<td>(.*?)</td>", section, re.S)
    assert [(file, line, value) for _, file, line, value in rows] == [
        ("notes/field.md", "5", "//maps.example.org/m.png"),
        ("notes/index.md", "3", "https://pics.example.org/logo.png")]
    assert all("external image not loaded" in message for message, *_ in rows)
    for path in ("index.html", "notes/index.html", "notes/field.html"):
        sources = "".join(a.get("src") or "" for a in _Page(site[path].decode()).all("img"))
        assert "example.org" not in sources


def test_checks_page_says_when_the_notes_needed_nothing(built):
    _, _, site = built
    html = site["checks.html"].decode()
    section = html[html.index('<h2 id="notes">Notes and summary</h2>'):]
    assert "No fixes were needed." in section


# ---------------------------------------------------------------------------------------------
# Page content


def test_front_page_carries_the_cautions_and_the_glance_table(built):
    _, items, site = built
    front = site["index.html"].decode()
    for caution in CAUTIONS:
        assert caution.replace("'", "&#39;") in front
    for words in ("personal data", "consent", "ethics approval", "Pseudonymised does not mean "
                  "anonymous", "not a person&#39;s worth or performance"):
        assert words in front
    assert len(_rows(front, "data")) == len(items)
    assert "networks/advice/index.html" in front and "networks/work/nodes.html" in front


def test_statistics_table_has_one_row_per_statistic(built):
    _, items, site = built
    for item in items:
        html = site[f"networks/{item.id}/index.html"].decode()
        assert len(_rows(html, "statistics")) == len(item.analysis.statistics)


def test_undefined_statistic_shows_not_defined_and_why(built):
    _, items, _ = built
    analysis = replace(items[0].analysis, statistics=(
        Statistic("nodes", 4), Statistic("assortativity:team", None, "one_value")))
    rows = statistic_rows(analysis)
    assert rows[0].value == "4" and rows[0].defined
    assert rows[1].value == "not defined" and not rows[1].defined
    assert rows[1].reading == "Every node has the same value."
    assert rows[1].title == "Attribute assortativity: team"


def test_nodes_page_has_one_row_per_node_and_sort_values(built):
    _, items, site = built
    for item in items:
        html = site[f"networks/{item.id}/nodes.html"].decode()
        assert len(_rows(html, "nodes")) == len(item.analysis.nodes)
        assert "table.js" in html and "data-sortable" in html
    advice = site["networks/advice/nodes.html"].decode()
    pagerank = float(items[0].analysis.measures.loc["a1", "pagerank"])
    assert f'data-value="{pagerank!r}">{number(pagerank)}<' in advice


def test_the_network_page_lists_the_largest_communities_and_says_where_the_rest_are(tmp_path):
    from conftest import edge_study

    from generator.build import build_study
    from generator.render.network_page import COMMUNITY_ROWS

    # COMMUNITY_ROWS + 5 separate triangles: each is a community of its own (any modularity
    # method finds the components of a graph of disjoint cliques).
    triangles = COMMUNITY_ROWS + 5
    rows = [f"t{k}a,t{k}b\nt{k}b,t{k}c\nt{k}c,t{k}a" for k in range(triangles)]
    study = edge_study(tmp_path / "study", "source,target\n" + "\n".join(rows) + "\n")
    site = build_study(study, output=tmp_path / "site").output
    page = (site / "networks/net/index.html").read_text("utf-8")
    sizes = page[page.index("<h3>Community sizes</h3>"):]
    sizes = sizes[:sizes.index("</table>")]
    assert sizes.count('<th scope="row">') == COMMUNITY_ROWS
    assert (f"The {COMMUNITY_ROWS} largest of the {triangles} communities of two or more nodes "
            "are listed") in page
    listed = (site / "files/net/communities.csv").read_text("utf-8").splitlines()
    assert len(listed) == triangles + 1  # the download holds every one


def test_network_page_shows_figures_top_nodes_and_communities(built):
    _, items, site = built
    html = site["networks/advice/index.html"].decode()
    page = _Page(html)
    assert [img["src"] for img in page.all("img")] == [
        "figures/map.svg", "figures/degree.svg", "figures/betweenness.svg", "figures/communities.svg"]
    assert "figures/map.png" in html
    # Every centrality gets a top-nodes table; the community and its confidence do not.
    measured = [c for c in items[0].analysis.measures.columns
                if c not in ("community", "community_confidence")]
    assert len(re.findall(r'<table class="data compact" id="top-', html)) == len(measured)
    assert "Mean adjusted Rand index" in html and "Runs that found this partition" in html
    assert "Leiden" in html


def test_omitted_measures_are_explained(built):
    _, items, site = built
    advice = items[0].analysis
    assert "eigenvector" in advice.omitted  # directed and not strongly connected
    assert "Not computed for this network" in site["networks/advice/index.html"].decode()
    assert "Left out" in site["methods.html"].decode()


def test_path_sampling_is_reported(tmp_path):
    study = _study(tmp_path, measures=MeasuresConfig(exact_paths_up_to=3, path_sample_sources=2))
    site = _render(study, _inputs(study))
    assert "randomly chosen source nodes" in site["networks/work/index.html"].decode()
    assert "randomly chosen source nodes" in site["networks/work/nodes.html"].decode()
    assert "Brandes, U. &amp; Pich, C." in site["methods.html"].decode()
    assert "sampled source nodes" in site["downloads.html"].decode()


def test_methods_page_is_written_from_what_ran(built):
    _, items, site = built
    html = site["methods.html"].decode()
    for item in items:
        for column in item.analysis.measures.columns:
            assert f"<code>{column}</code>" in html
        for name, version in item.analysis.versions.items():
            assert f"<th scope=\"row\">{name}</th><td>{version}</td>" in html
    assert "combined by sum" in html and "Self-loops" in html
    assert "Fruchterman-Reingold" in html and "seed 3" in html
    references = re.findall(r'<li id="ref-([a-z0-9]+)">', html)
    expected = list(dict.fromkeys(r.key for item in items for r in references_of(item.analysis)))
    assert references == expected


def test_checks_page_lists_fixes_and_says_when_none_were_needed(built):
    _, items, site = built
    html = site["checks.html"].decode()
    assert "self-loop" in html and "repeated ties merged" in html
    assert "No fixes were needed." in html  # the co-working network needed none
    assert len(_rows(html, "findings")) == sum(len(i.analysis.findings) for i in items)


def test_downloads_page_describes_every_file_and_the_columns(built):
    _, items, site = built
    html = site["downloads.html"].decode()
    for path in _downloads(items):
        assert f'href="{path}"' in html, path
    for column in ("id", "label", "team", "years", *items[0].analysis.measures.columns):
        assert f"<code>{column}</code>" in html
    assert "<code>weight</code>" in html


def test_a_tiny_matrix_network_without_node_list_reads_plainly(tmp_path):
    (tmp_path / "m.csv").write_text(",p,q\np,0,1\nq,1,0\n", encoding="utf-8")
    study = StudyConfig(root=tmp_path, title="Tiny", output=tmp_path / "out", networks=(
        NetworkConfig(id="pair", title="A pair", data=MatrixSource(path=tmp_path / "m.csv")),),
        communities=CommunitiesConfig(runs=2))
    site = _render(study, _inputs(study), notes={}, summary=None)
    network = site["networks/pair/index.html"].decode()
    assert "not defined" in network and "It needs at least three nodes." in network
    methods = site["methods.html"].decode()
    assert "adjacency matrix m.csv" in methods and "there is no node list" in methods
    assert "Repeated ties" not in methods
    downloads = site["downloads.html"].decode()
    assert "the id: no label column is set" in downloads
    assert "<code>weight</code>" not in downloads  # 0/1 cells: unweighted
    assert "Notes" not in _Page(site["index.html"].decode()).text  # no notes, no notes menu


def test_figures_keep_their_size_and_wide_ones_take_the_row(tmp_path):
    study = _study(tmp_path)
    items = _inputs(study)
    wide = Figure(name="degree", title="Wide", alt="two panels", caption="c",
                  svg=b'<?xml version="1.0"?><svg width="600pt" height="200pt" viewBox="0 0 600 200">',
                  png=b"")
    site = _render(study, [replace(items[0], figures=[wide])] + items[1:])
    html = site["networks/advice/index.html"].decode()
    assert 'class="figure figure-wide"' in html
    assert 'width="800" height="267"' in html


# ---------------------------------------------------------------------------------------------
# Themes


def test_the_default_theme_ships_inside_the_package():
    assert "default" in packaged_themes()


def test_an_unknown_theme_is_a_config_error(tmp_path):
    study = _study(tmp_path, theme="defualt")
    with pytest.raises(ConfigError) as caught:
        _render(study, [])
    assert caught.value.key == "site.theme"
    assert "did you mean 'default'" in caught.value.format_message()


def test_a_user_theme_folder_overrides_one_template_and_adds_static_files(tmp_path):
    study = _study(tmp_path, theme="my-theme")
    templates = tmp_path / "my-theme" / "templates"
    templates.mkdir(parents=True)
    (templates / "note.html").write_text(
        '{% extends "base.html" %}{% block content %}<h1>Custom {{ page.title }}</h1>'
        "<article>{{ body }}</article>{% endblock %}", encoding="utf-8")
    (tmp_path / "my-theme" / "static").mkdir()
    (tmp_path / "my-theme" / "static" / "extra.css").write_text("body{}", encoding="utf-8")
    site = _render(study, _inputs(study))
    assert "<h1>Custom Extra note</h1>" in site["notes/extra.html"].decode()
    assert "Read and share with care" in site["index.html"].decode()  # default index.html
    assert site["static/extra.css"] == b"body{}" and "static/site.css" in site


def test_a_broken_user_template_is_a_config_error_naming_the_template(tmp_path):
    study = _study(tmp_path, theme="broken")
    (tmp_path / "broken" / "templates").mkdir(parents=True)
    (tmp_path / "broken" / "templates" / "checks.html").write_text("{% if %}", encoding="utf-8")
    with pytest.raises(ConfigError, match="checks.html"):
        _render(study, _inputs(study))


# A study folder may come from someone else: its theme is data, not code. These payloads are the
# usual ways out of an unsandboxed jinja template to Python's os module (server-side template
# injection, as jinja's own documentation of its sandbox describes).
THEME_ESCAPES = [
    "{{ cycler.__init__.__globals__.os.popen('touch PWNED').read() }}",
    "{{ ''.__class__.__mro__[1].__subclasses__() }}",
    "{{ self._TemplateReference__context }}",
    "{{ page.__class__.__init__.__globals__ }}",
    "{{ lipsum.__globals__['os'].popen('touch PWNED').read() }}",
]


@pytest.mark.parametrize("payload", THEME_ESCAPES)
def test_a_study_theme_cannot_reach_python_from_a_template(tmp_path, payload, monkeypatch):
    monkeypatch.chdir(tmp_path)
    study = _study(tmp_path, theme="their-theme")
    templates = tmp_path / "their-theme" / "templates"
    templates.mkdir(parents=True)
    (templates / "note.html").write_text(
        '{% extends "base.html" %}{% block content %}' + payload + "{% endblock %}",
        encoding="utf-8")
    with pytest.raises(ConfigError, match="unsafe|undefined|has no attribute") as caught:
        _render(study, _inputs(study))
    assert caught.value.key == "site.theme"
    assert not (tmp_path / "PWNED").exists()


def test_a_theme_folder_outside_the_study_is_a_config_error(tmp_path):
    study = _study(tmp_path / "study", theme="../elsewhere")
    (tmp_path / "elsewhere" / "templates").mkdir(parents=True)
    with pytest.raises(ConfigError, match="lies outside the study folder") as caught:
        _render(study, [])
    assert caught.value.key == "site.theme"


@pytest.mark.parametrize("where", ["static/stolen.txt", "templates/note.html", "static/away",
                                   "templates"])
def test_a_theme_file_linking_out_of_the_theme_folder_is_refused_unread(tmp_path, where):
    secret = tmp_path / "private"
    secret.mkdir()
    (secret / "note.html").write_text("private words", encoding="utf-8")
    (secret / "stolen.txt").write_text("private words", encoding="utf-8")
    study = _study(tmp_path / "study", theme="their-theme")
    folder = tmp_path / "study" / "their-theme"
    (folder / "static").mkdir(parents=True)
    if where != "templates":
        (folder / "templates").mkdir()
    link = folder / where
    target = secret if where in ("static/away", "templates") else secret / link.name
    link.symlink_to(target, target_is_directory=target.is_dir())
    with pytest.raises(ConfigError, match="leads out of the theme folder") as caught:
        _render(study, _inputs(study))
    assert caught.value.key == "site.theme"


def test_a_theme_link_to_another_file_of_the_theme_is_followed(tmp_path):
    study = _study(tmp_path, theme="my-theme")
    static = tmp_path / "my-theme" / "static"
    static.mkdir(parents=True)
    (static / "real.css").write_text("body{}", encoding="utf-8")
    (static / "alias.css").symlink_to(static / "real.css")
    site = _render(study, _inputs(study))
    assert site["static/alias.css"] == site["static/real.css"] == b"body{}"


# ---------------------------------------------------------------------------------------------
# Small pieces


# How numbers read (three significant digits) is tested with the one formatter, in
# tests/test_vocabulary.py; pages only have to use it.


def test_missing_values_show_as_a_dash():
    import pandas as pd
    assert value_text(pd.NA) == value_text(None) == value_text(float("nan")) == "\u2014"
    assert value_text(7) == "7" and value_text("north") == "north"


def test_top_tables_rank_ties_together_and_count_ties_past_the_cut(built):
    _, items, _ = built
    tables = {t.column: t for t in top_tables(items[1].analysis, count=2)}
    degree = tables["degree"]
    values = sorted(items[1].analysis.measures["degree"], reverse=True)
    assert [r.value for r in degree.rows] == [str(v) for v in values[:2]]
    assert degree.more_tied == sum(1 for v in values[2:] if v == values[1])
    ranks = [r.rank for r in degree.rows]
    assert ranks[0] == 1 and (ranks[1] == 1) == (values[0] == values[1])
    assert "community" not in tables


@pytest.mark.parametrize("seed", range(20))
def test_ranked_nodes_give_the_competition_ranks_pandas_gives(seed):
    # Reference: pandas' Series.rank(method="min", ascending=False), the competition ("1224")
    # ranking, on values with many ties and missing ones; equal values keep node order.
    import numpy as np
    import pandas as pd

    from generator.render.network_page import ranked_nodes

    rng = np.random.default_rng(seed)
    values = rng.integers(0, 6, size=40).astype(float)
    values[rng.random(40) < 0.2] = np.nan
    labels = [f"n{i}" for i in range(40)]
    count = int(rng.integers(1, 12))
    rows, more = ranked_nodes(values, labels, labels, count)
    series = pd.Series(values)
    expected = series.dropna().sort_values(ascending=False, kind="stable")
    assert [r.label for r in rows] == [labels[i] for i in expected.index[:count]]
    ranks = series.rank(method="min", ascending=False)
    assert [r.rank for r in rows] == [int(ranks[i]) for i in expected.index[:count]]
    cut = expected.iloc[min(count, len(expected)) - 1]
    assert more == int((expected.iloc[count:] == cut).sum())


def _partition(**changes) -> CommunityResult:
    base = CommunityResult("leiden", 1.0, 20, 1, (1, 1, 2, 2), (2, 2), 0.4, 0.4, 1.0, 1.0, 1, 1.0)
    return replace(base, **changes)


def test_stability_reading_follows_agreement_between_runs():
    assert "All 20 runs found exactly the same" in stability_reading(_partition())
    assert "agreed closely" in stability_reading(_partition(mean_ari=0.95, distinct_partitions=2,
                                                            best_run_share=0.8))
    assert "mostly agreed" in stability_reading(_partition(mean_ari=0.8, distinct_partitions=4))
    assert "tentative" in stability_reading(_partition(mean_ari=0.3, distinct_partitions=9))
    assert "no ties" in stability_reading(_partition(mean_ari=None, mean_nmi=None, modularity=None))
    assert "could not be measured" in stability_reading(_partition(mean_ari=float("nan"),
                                                                   distinct_partitions=2))
    assert "Only one run" in stability_reading(_partition(runs=1))


def test_real_figures_from_the_draw_stage_are_shown_with_their_alt_text(tmp_path):
    draw = pytest.importorskip("generator.draw")
    if not hasattr(draw, "draw_network"):
        pytest.skip("the draw stage has no draw_network yet")
    study = _study(tmp_path)
    items = [replace(item, figures=draw.draw_network(item.analysis)) for item in _inputs(study)]
    site = _render(study, items)
    page = _Page(site["networks/work/index.html"].decode())
    images = page.all("img")
    # The co-assignment figure belongs to the communities page.
    assert [img["src"] for img in images] == [f"figures/{f.name}.svg" for f in items[1].figures
                                              if f.name != "coassignment"]
    communities = _Page(site["networks/work/communities.html"].decode())
    assert "figures/coassignment.svg" in [img["src"] for img in communities.all("img")]
    assert all(img["alt"] for img in images)


def test_checks_page_shows_warnings_in_their_own_group(tmp_path):
    # Ids equal apart from case are two nodes, with a warning the analyst must see.
    root = tmp_path / "study"
    (root / "data").mkdir(parents=True)
    (root / "data" / "edges.csv").write_text("source,target\na,b\nA,b\n", encoding="utf-8")
    (root / "study.toml").write_text('[study]\ntitle = "T"\n[[network]]\nid = "n"\n'
                                     'edges = "data/edges.csv"\n', encoding="utf-8")
    from generator.build import build_study

    build_study(root, output=tmp_path / "site")
    html = (tmp_path / "site" / "checks.html").read_text(encoding="utf-8")
    warnings = html[html.index('id="network-n-warning"'):html.index('id="network-n-fix"')]
    assert "differ only in upper or lower case" in warnings
    assert "&#39;A&#39; (line 3) and &#39;a&#39; (line 2)" in warnings


# ---------------------------------------------------------------------------------------------
# Tests against chance


@pytest.fixture(scope="module")
def tested(tmp_path_factory):
    """The render study with 6 rewired networks per network, its real figures drawn."""
    from generator.config import SignificanceConfig
    from generator.draw import draw_network

    study = _study(tmp_path_factory.mktemp("tested"))
    items = []
    for net in study.networks:
        analysis = analyse_network(read_network(study, net), communities=study.communities,
                                   measures=study.measures, seed=study.seed,
                                   significance=SignificanceConfig(null_samples=6))
        items.append(NetworkPageInput(net, analysis, draw_network(analysis)))
    return study, items, _render(study, items)


def test_the_network_page_shows_each_test_with_its_reading_and_figure(tested):
    _, items, site = tested
    for item in items:
        html = site[f"networks/{item.id}/index.html"].decode()
        section = html[html.index('id="significance"'):html.index('id="positions"')]
        tests = item.analysis.significance.tests
        assert tests and len(_rows(section, "significance")) == len(tests)
        assert "6 networks rewired at random" in section and "p is below 0.05" in section
        for test in tests:
            slug = re.sub("[^a-z0-9]+", "-", test.statistic)
            assert f'id="figure-null-{slug}"' in section
        assert "rewired networks with the same degrees (p = " in section
        rest = html[html.index('id="positions"'):]
        assert "figure-null-" not in rest  # the null figures are not shown again under More figures
        assert 'href="../../files/' + item.id + '/significance.csv"' in section


def test_the_methods_page_defines_the_rewiring_the_seeds_and_the_p_value(tested):
    _, items, site = tested
    html = site["methods.html"].decode()
    assert html.count("Tests against chance</h3>") == len(items)
    assert "p = (k + 1) / (N + 1)" in html and "|null - mean| &gt;= |observed - mean|" in html
    assert "10 swaps per tie (10 x m)" in html and "6 networks made by degree-preserving" in html
    assert "in-degree and its out-degree" in html  # the directed network
    assert "tie weights were shuffled at random over the new ties" in html  # the weighted one
    assert "random.Random seeded with the text &#34;nulls:3&#34;" in html or \
        "random.Random seeded with the text &quot;nulls:3&quot;" in html
    assert '<li id="ref-maslov2002">' in html and "doi:10.1126/science.1065103" in html
    assert '<li id="ref-north2002">' in html


def test_the_downloads_page_lists_significance_csv_with_its_columns(tested):
    _, items, site = tested
    html = site["downloads.html"].decode()
    for item in items:
        assert f'href="files/{item.id}/significance.csv"' in html
    for column in ("null_mean", "null_sd", "z", "p", "samples"):
        assert f"<code>{column}</code>" in html


def test_untested_networks_say_so_on_the_page_and_the_methods_page(built):
    _, items, site = built
    html = site["networks/advice/index.html"].decode()
    section = html[html.index('id="significance"'):html.index('id="positions"')]
    assert "Not tested against chance: [significance] null_samples is 0." in section
    assert "significance.csv" not in site["downloads.html"].decode()
    assert "Not tested against chance" in site["methods.html"].decode()


def test_page_links_are_the_relative_paths_the_standard_library_computes():
    # posixpath.relpath is the reference; page_href does the same without the file system.
    import posixpath
    import random

    from generator.render.site_map import page_href

    parts = ["a", "b", "index.html", "networks", "x", "nodes", "node-1.html"]
    rng = random.Random(5)
    for _ in range(5000):
        target = "/".join(rng.choice(parts) for _ in range(rng.randint(1, 4)))
        page = "/".join(rng.choice(parts) for _ in range(rng.randint(1, 4)))
        expected = posixpath.relpath(target, posixpath.dirname(page) or ".")
        assert page_href(page, target) == expected, (page, target)
    assert page_href("networks/a/nodes/node-2.html", "index.html#glance") == "../../../index.html#glance"
