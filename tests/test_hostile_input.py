"""A study folder from someone else, with hostile text in every string it can hold: node ids and
labels, attribute values, a column name, the study's and the network's titles, notes and the
sharing contact. Every file of the built site and of a partner bundle is parsed as what it is
(HTML, SVG and GraphML as markup, the .js data files and JSON as JSON, CSV as CSV, zips opened),
and the hostile text must be there only as text: never a tag, an attribute or code of its own."""

from __future__ import annotations

import csv
import io
import json
import re
import xml.etree.ElementTree as ElementTree
import zipfile
from collections.abc import Iterator
from html.parser import HTMLParser
from pathlib import Path

import networkx as nx
import pytest
from conftest import write_study

from generator.build import build_study
from generator.cli import main
from generator.pack import pack_study

# Each ends a different context: a script element, a quoted attribute, a CDATA section or a
# comment. The words after each make them easy to find, decoded, in the files.
SCRIPT = "</script><script>alert(1)</script>Quennell"
ATTRIBUTE = '"><svg onload=alert(2)>Marrowfield'
CDATA = ']]><x y="z">--Tolliver'
HOSTILE = (SCRIPT, ATTRIBUTE, CDATA)
# What any of them would leave in a file if it were written unescaped.
RAW_MARKUP = ("<script>alert", "<svg onload", '<x y="z">')

NOTE = f"""# Field work {SCRIPT}

<script>alert(5)</script>

<iframe src="https://evil.example/"></iframe>

[click me](javascript:alert(6)) and [also](JaVaScRiPt&#58;alert(7))

<img src=x onerror=alert(8)>
"""


def _csv(rows: list[list[str]]) -> str:
    """Rows as CSV, every cell quoted as the hostile text's quotes and commas need."""
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n", quoting=csv.QUOTE_ALL).writerows(rows)
    return buffer.getvalue()


def _hostile_study(root: Path) -> Path:
    # A hostile id too: ids are shown beside labels and written to every download.
    edges = [["source", "target"], ["a", "b"], ["b", "c"], ["c", "a"], ["c", ATTRIBUTE],
             [ATTRIBUTE, "a"]]
    nodes = [["id", "name", "team", f"score{ATTRIBUTE}"],
             ["a", SCRIPT, ATTRIBUTE, "1"], ["b", ATTRIBUTE, CDATA, "2"],
             ["c", CDATA, SCRIPT, "3"], [ATTRIBUTE, "Dorrit Vane", ATTRIBUTE, "4"]]
    return write_study(
        root, networks=[{"id": "net", "title": f"Ties {ATTRIBUTE} {CDATA}",
                         "edges": "data/edges.csv", "nodes": "data/nodes.csv", "label": "name",
                         "color_by": "team"}],
        files={"data/edges.csv": _csv(edges), "data/nodes.csv": _csv(nodes),
               "notes/field.md": NOTE},
        study={"title": f"Study {SCRIPT} {ATTRIBUTE} {CDATA}"},
        tables={"sharing": {"pseudonymize": False, "drop": [], "min_group": 1,
                            "contact": f"the desk {SCRIPT} {ATTRIBUTE} {CDATA}"}})


# ---------------------------------------------------------------------------------------------
# Reading each kind of file as what it is


class _Markup(HTMLParser):
    """Every start tag with its attributes, and every text and attribute value, decoded."""

    def __init__(self, text: str) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.texts: list[str] = []
        self.script_bodies: list[str] = []
        self._in_script = False
        self.feed(text)
        self.close()

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append((tag, dict(attrs)))
        self.texts += [value for _, value in attrs if value]
        self._in_script = tag == "script"

    def handle_endtag(self, tag: str) -> None:
        self._in_script = False

    def handle_data(self, data: str) -> None:
        (self.script_bodies if self._in_script else self.texts).append(data)


def _check_html(name: str, data: bytes) -> list[str]:
    page = _Markup(data.decode("utf-8"))
    for tag, attrs in page.tags:
        assert tag not in ("x", "iframe", "object", "embed"), (name, tag, attrs)
        assert not [a for a in attrs if a.startswith("on")], (name, tag, attrs)
        if tag == "script":  # the site's own files only, by a relative address
            assert re.fullmatch(r"(\.\./)*[\w/.-]+\.js", attrs.get("src") or ""), (name, attrs)
        for key in ("href", "src"):
            value = (attrs.get(key) or "").strip().lower()
            assert not value.startswith(("javascript:", "vbscript:", "data:")), (name, attrs)
    assert "".join(page.script_bodies).strip() == "", name  # no inline script at all
    return page.texts


def _check_xml(name: str, data: bytes) -> list[str]:
    """SVG and GraphML: well-formed (so no CDATA or comment was ended early), no element or
    attribute the hostile text could have made."""
    root = ElementTree.fromstring(data)  # raises on any markup the text broke
    texts = []
    for element in root.iter():
        local = element.tag.rpartition("}")[2]
        assert local not in ("x", "script", "iframe", "foreignObject"), (name, local)
        assert not [a for a in element.attrib if a.rpartition("}")[2].startswith("on")], name
        texts += [element.text or "", element.tail or "", *element.attrib.values()]
    return texts


# The site's data scripts: a comment, then one assignment of a JSON value (the map's file
# first makes sure its table of maps exists).
_DATA_SCRIPT = re.compile(r'/\*[^*\n]*\*/\n(window\.netfolioMaps = window\.netfolioMaps \|\| \{\};\n)?'
                          r'window\.\w+(\["[a-z0-9-]+"\])? = (?P<json>.*);\n', re.S)


def _strings(value: object) -> Iterator[str]:
    if isinstance(value, str):
        yield value
    elif isinstance(value, dict):
        for key, item in value.items():
            yield key
            yield from _strings(item)
    elif isinstance(value, list):
        for item in value:
            yield from _strings(item)


def _check_js(name: str, data: bytes) -> list[str]:
    text = data.decode("utf-8")
    if name.startswith("static/"):  # the theme's own code: no data in it at all
        assert not [h for h in HOSTILE if h in text], name
        return []
    match = _DATA_SCRIPT.fullmatch(text)
    assert match, (name, text[:200])  # nothing but the one assignment: the text is all JSON
    return list(_strings(json.loads(match.group("json"))))


def _check_json(name: str, data: bytes) -> list[str]:
    return list(_strings(json.loads(data)))


def _check_csv(name: str, data: bytes) -> list[str]:
    return [cell for row in csv.reader(io.StringIO(data.decode("utf-8"))) for cell in row]


CHECKS = {".html": _check_html, ".svg": _check_xml, ".graphml": _check_xml, ".js": _check_js,
          ".json": _check_json, ".csv": _check_csv}


def _scan(files: dict[str, bytes]) -> dict[str, list[str]]:
    """Check every file (a zip's files too, under ``zip-name/``); what each holds as text."""
    found: dict[str, list[str]] = {}
    for name, data in sorted(files.items()):
        suffix = Path(name).suffix
        if suffix == ".zip":
            with zipfile.ZipFile(io.BytesIO(data)) as archive:
                inner = {entry: archive.read(entry) for entry in archive.namelist()}
            found.update({f"{name}/{k}": v for k, v in _scan(inner).items()})
            continue
        if suffix in (".html", ".svg", ".graphml"):
            assert not [m for m in RAW_MARKUP if m.encode() in data], name
        if suffix in CHECKS:
            found[name] = CHECKS[suffix](name, data)
    return found


def _holding(found: dict[str, list[str]], hostile: str) -> set[str]:
    """The files that hold ``hostile`` as text (decoded)."""
    return {name for name, texts in found.items() if any(hostile in t for t in texts)}


def _files(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


@pytest.fixture(scope="module")
def hostile(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, dict[str, bytes]]:
    study = _hostile_study(tmp_path_factory.mktemp("hostile") / "study")
    return study, _files(build_study(study).output)


# ---------------------------------------------------------------------------------------------
# The site


def test_every_file_of_the_site_holds_the_hostile_text_only_as_text(hostile) -> None:
    _, files = hostile
    found = _scan(files)
    kinds = {Path(name).suffix for name in found}
    assert {".html", ".svg", ".graphml", ".js", ".json", ".csv"} <= kinds
    for text in HOSTILE:  # and it is there, decoded: the checks above did look at it
        holding = _holding(found, text)
        assert {"index.html", "networks/net/nodes.html", "search-index.js",
                "networks/net/explore-data.js", "files/net/network.graphml",
                "files/net/nodes.csv", "networks/net/figures/map.svg"} <= holding, text
        assert "files/all-data.zip/net/network.graphml" in holding, text


def test_the_graphml_gives_back_every_hostile_label_and_value_exactly(hostile) -> None:
    _, files = hostile
    graph = nx.read_graphml(io.BytesIO(files["files/net/network.graphml"]))
    labels = {data["label"] for _, data in graph.nodes(data=True)}
    assert {SCRIPT, ATTRIBUTE, CDATA} <= labels
    assert {data["team"] for _, data in graph.nodes(data=True)} == {SCRIPT, ATTRIBUTE, CDATA}
    assert {data[f"score{ATTRIBUTE}"] for _, data in graph.nodes(data=True)} == {1, 2, 3, 4}


def test_a_hostile_column_name_is_a_plain_name_in_the_data_package(hostile) -> None:
    _, files = hostile
    package = json.loads(files["files/datapackage.json"])
    fields = [field["name"] for resource in package["resources"]
              for field in resource.get("schema", {}).get("fields", [])]
    assert f"score{ATTRIBUTE}" in fields


def test_a_note_with_script_iframe_and_script_links_keeps_only_their_text(hostile) -> None:
    _, files = hostile
    page = files["notes/field.html"].decode("utf-8")
    markup = _Markup(page)
    assert "iframe" not in {tag for tag, _ in markup.tags}
    assert not [a for _, a in markup.tags if (a.get("href") or "").lower().startswith("javascript")]
    assert [a for tag, a in markup.tags if tag == "img"] == []
    text = "".join(markup.texts)
    assert "<script>alert(5)</script>" in text and "click me" in text  # shown as text
    assert "evil.example" not in [a.get("src") for _, a in markup.tags]


# ---------------------------------------------------------------------------------------------
# The partner bundle


def test_every_file_of_a_partner_bundle_holds_the_hostile_text_only_as_text(hostile) -> None:
    study, _ = hostile
    result = pack_study(study, keep_labels=True)
    with zipfile.ZipFile(result.path) as archive:
        names = archive.namelist()
        files = {name: archive.read(name) for name in names}
    found = _scan(files)
    assert {".html", ".svg", ".graphml", ".js", ".json", ".csv"} <= {Path(n).suffix for n in found}
    for text in HOSTILE:
        holding = _holding(found, text)
        assert {"index.html", "sharing.html", "search-index.js", "files/net/network.graphml",
                "networks/net/explore-data.js"} <= holding, text


# ---------------------------------------------------------------------------------------------
# Links in the study folder that lead out of it: refused, and nothing behind them read


PRIVATE = "Private words from outside the study"


def _small_study(root: Path, **tables: dict) -> Path:
    return write_study(root, networks=[{"id": "net", "edges": "data/edges.csv"}],
                       files={"data/edges.csv": "source,target\na,b\nb,c\n"}, tables=tables)


def _outside(tmp_path: Path) -> Path:
    folder = tmp_path / "elsewhere"
    folder.mkdir(exist_ok=True)
    (folder / "diary.md").write_text(f"# Diary\n\n{PRIVATE}\n", encoding="utf-8")
    return folder


@pytest.mark.parametrize("link", ["a note", "the notes folder", "the summary", "the terms"])
def test_a_link_out_of_the_study_is_refused_and_what_it_leads_to_is_never_shown(
        tmp_path: Path, capsys: pytest.CaptureFixture, link: str) -> None:
    outside = _outside(tmp_path)
    study = _small_study(tmp_path / "study")
    verb = "build"
    if link == "a note":
        (study / "notes").mkdir()
        (study / "notes" / "diary.md").symlink_to(outside / "diary.md")
    elif link == "the notes folder":
        (study / "notes").symlink_to(outside, target_is_directory=True)
    elif link == "the summary":
        (study / "summary.md").symlink_to(outside / "diary.md")
        toml = study / "study.toml"
        toml.write_text(toml.read_text("utf-8").replace(
            "[study]\n", '[study]\nsummary = "summary.md"\n'), "utf-8")
    else:
        (study / "terms.md").symlink_to(outside / "diary.md")
        toml = study / "study.toml"
        toml.write_text(toml.read_text("utf-8") + '\n[sharing]\nterms = "terms.md"\n', "utf-8")
        verb = "pack"
    assert main([verb, str(study), "--quiet"]) == 1
    err = capsys.readouterr().err
    assert "outside the study folder" in err and "Traceback" not in err, err
    assert PRIVATE not in err
    assert not (study / "output").exists() and not (study / "bundles").exists()


def test_a_bundles_folder_linking_out_of_the_study_is_refused_without_out(
        tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    outside = _outside(tmp_path)
    study = _small_study(tmp_path / "study")
    (study / "bundles").symlink_to(outside, target_is_directory=True)
    assert main(["pack", str(study), "--quiet"]) == 1
    err = capsys.readouterr().err
    assert "leads out of the study folder" in err and "--out" in err and "Traceback" not in err
    assert sorted(p.name for p in outside.iterdir()) == ["diary.md"]  # nothing written there
    # Said on the command line, a place outside the study is the user's choice.
    assert main(["pack", str(study), "--quiet", "--out", str(outside / "partner.zip")]) == 0
    assert (outside / "partner.zip").is_file()
