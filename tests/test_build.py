"""End to end: build the example study and hold the site to the output contract."""

from __future__ import annotations

import csv
import hashlib
import io
import json
import re
import shutil
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import unquote, urlparse

import pytest

from generator.build import build_study
from generator.cli import main

EXAMPLE = Path(__file__).resolve().parents[1] / "example_project"
NETWORKS = ("advice", "coworking")


def copy_example(dest: Path, *, null_samples: int | None = None) -> Path:
    """A copy of the example study; ``null_samples`` replaces its 200 rewired networks with
    fewer, for tests that need a full build but not the whole null-model test."""
    shutil.copytree(EXAMPLE, dest, ignore=shutil.ignore_patterns("output", ".netfolio-*", "bundles"))
    if null_samples is not None:
        toml = dest / "study.toml"
        text = toml.read_text("utf-8")
        assert "null_samples = 200" in text
        toml.write_text(text.replace("null_samples = 200", f"null_samples = {null_samples}"),
                        "utf-8")
    return dest


def site_files(root: Path) -> dict[str, bytes]:
    return {p.relative_to(root).as_posix(): p.read_bytes()
            for p in sorted(root.rglob("*")) if p.is_file()}


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    study = copy_example(tmp_path_factory.mktemp("a") / "example")
    result = build_study(study)
    return result.output


class _Links(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.links: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        for name, value in attrs:
            if name in ("href", "src") and value:
                self.links.append(value)


def test_every_page_of_the_contract_exists(site: Path) -> None:
    expected = ["index.html", "methods.html", "checks.html", "downloads.html", "manifest.json",
                "notes/index.html", "notes/methods.html", "files/datapackage.json"]
    for net in NETWORKS:
        expected += [f"networks/{net}/index.html", f"networks/{net}/nodes.html",
                     f"files/{net}/nodes.csv", f"files/{net}/edges.csv",
                     f"files/{net}/statistics.csv", f"files/{net}/network.graphml",
                     f"networks/{net}/figures/map.svg", f"networks/{net}/figures/map.png"]
    missing = [p for p in expected if not (site / p).is_file()]
    assert missing == []


def test_every_internal_link_resolves_and_no_page_reaches_outside(site: Path) -> None:
    broken, external = [], []
    for page in site.rglob("*.html"):
        parser = _Links()
        parser.feed(page.read_text(encoding="utf-8"))
        for link in parser.links:
            url = urlparse(link)
            if url.scheme in ("http", "https"):
                if url.netloc != "doi.org":  # references on the methods page only
                    external.append((page.name, link))
                continue
            if url.scheme or link.startswith("#"):
                assert url.scheme in ("", "mailto"), link
                continue
            target = (page.parent / unquote(url.path)).resolve()
            if not target.exists():
                broken.append((page.relative_to(site).as_posix(), link))
    assert broken == []
    assert external == []
    for asset in list(site.rglob("*.css")) + list(site.rglob("*.js")):
        # The SVG namespace is a name scripts must pass to createElementNS, never fetched.
        text = asset.read_text(encoding="utf-8").replace('"http://www.w3.org/2000/svg"', "")
        assert not re.search(r"https?://", text), asset


def test_downloads_have_the_documented_columns(site: Path) -> None:
    nodes = list(csv.reader(io.StringIO((site / "files/advice/nodes.csv").read_text("utf-8"))))
    assert nodes[0][:5] == ["id", "label", "clinic", "role", "years_in_post"]
    # Directed and weighted: in/out columns present, eigenvector left out (not strongly connected).
    assert nodes[0][5:] == ["degree", "in_degree", "out_degree", "strength", "in_strength",
                            "out_strength", "betweenness", "closeness", "harmonic", "pagerank",
                            "coreness", "clustering", "constraint", "effective_size", "community",
                            "community_confidence"]
    assert len(nodes) - 1 == 61  # 60 staff and one id found only in the ties
    ids = [row[0] for row in nodes[1:]]
    assert "s01" in ids and "s61" in ids  # ids stay text, zero padding kept
    coworking = list(csv.reader(io.StringIO((site / "files/coworking/nodes.csv").read_text("utf-8"))))
    assert "in_degree" not in coworking[0] and "strength" not in coworking[0]
    assert "eigenvector" in coworking[0]
    edges = list(csv.reader(io.StringIO((site / "files/advice/edges.csv").read_text("utf-8"))))
    assert edges[0] == ["source", "target", "weight"]
    assert list(csv.reader(io.StringIO((site / "files/coworking/edges.csv").read_text("utf-8"))))[0] \
        == ["source", "target"]
    stats = list(csv.reader(io.StringIO((site / "files/advice/statistics.csv").read_text("utf-8"))))
    assert stats[0] == ["statistic", "value"]
    names = [row[0] for row in stats[1:]]
    assert names[:4] == ["nodes", "edges", "density", "reciprocity"]
    assert "assortativity:clinic" in names and "betweenness_centralization" in names
    package = json.loads((site / "files/datapackage.json").read_text("utf-8"))
    for resource in package["resources"]:
        header = next(csv.reader(io.StringIO((site / "files" / resource["path"]).read_text("utf-8"))))
        assert [f["name"] for f in resource["schema"]["fields"]] == header


def test_manifest_lists_every_file_with_its_size_and_hash(site: Path) -> None:
    manifest = json.loads((site / "manifest.json").read_text("utf-8"))
    listed = {entry["path"]: entry for entry in manifest["files"]}
    on_disk = set(site_files(site)) - {"manifest.json"}
    assert set(listed) == on_disk
    for path, entry in listed.items():
        data = (site / path).read_bytes()
        assert entry["size"] == len(data)
        assert entry["sha256"] == hashlib.sha256(data).hexdigest()


def test_a_second_build_from_another_folder_is_byte_identical(site: Path, tmp_path: Path) -> None:
    again = build_study(copy_example(tmp_path / "elsewhere" / "study")).output
    assert site_files(again) == site_files(site)


def test_a_label_with_markup_is_escaped_on_every_page(tmp_path: Path) -> None:
    study = copy_example(tmp_path / "study", null_samples=10)
    staff = study / "data" / "staff.csv"
    text = staff.read_text("utf-8").replace("Zoë Marrowby", "<script>alert(1)</script>")
    assert "<script>" in text
    staff.write_text(text, "utf-8")
    out = build_study(study).output
    pages = list(out.rglob("*.html")) + list(out.rglob("*.svg"))
    assert pages
    # The .js data files hold the label as a plain string; the site's scripts only ever put
    # text into the page as text, never as markup.
    for script in (out / "static").glob("*.js"):
        code = script.read_text("utf-8")
        assert "innerHTML" not in code and "insertAdjacentHTML" not in code, script
    escaped = set()
    for page in pages:
        body = page.read_text("utf-8")
        assert "<script>alert(1)" not in body, page
        if "&lt;script&gt;alert(1)&lt;/script&gt;" in body:
            escaped.add(page.relative_to(out).as_posix())
    # Shown, escaped, on the pages that list members or nodes by label, the comparisons too.
    assert {"networks/advice/communities.html", "compare/advice-and-coworking.html",
            "networks/advice/nodes.html"} <= escaped


def test_cli_build_prints_a_progress_line_per_stage(tmp_path: Path,
                                                    capsys: pytest.CaptureFixture) -> None:
    study = copy_example(tmp_path / "study", null_samples=8)
    # One job: the samples are counted in this process (workers report whole networks).
    assert main(["build", str(study), "--jobs", "1"]) == 0
    err = capsys.readouterr().err
    for stage in ("config", "ingest", "analyse", "draw", "render", "publish"):
        assert re.search(rf"^{stage}\s+.*\(\d+\.\d\d s\)$", err, re.M), stage
    for net in NETWORKS:
        assert re.search(rf"^significance {net}: 8/8 samples$", err, re.M), net
    assert main(["build", str(study), "--quiet"]) == 0
    assert capsys.readouterr().err == ""


def test_top_node_tables_show_the_id_beside_the_label(site: Path) -> None:
    page = (site / "networks/advice/index.html").read_text("utf-8")
    top = page[page.index('id="top-pagerank"'):]
    top = top[:top.index("</table>")]
    # the node with the highest PageRank, read from nodes.csv
    rows = list(csv.DictReader(io.StringIO((site / "files/advice/nodes.csv").read_text("utf-8"))))
    best = max(rows, key=lambda r: float(r["pagerank"]))
    assert f'{best["label"]} <span class="node-id">{best["id"]}</span>' in top


def test_every_network_of_the_example_is_tested_against_200_rewired_networks(site: Path) -> None:
    for net in NETWORKS:
        rows = list(csv.DictReader(io.StringIO(
            (site / f"files/{net}/significance.csv").read_text("utf-8"))))
        assert {r["samples"] for r in rows} == {"200"}
        names = [r["statistic"] for r in rows]
        assert names[0] == "transitivity" and names[-1] == "modularity"
        assert "assortativity:clinic" in names
        assert ("reciprocity" in names) == (net == "advice")
        for row in rows:
            p = float(row["p"])
            assert 1 / 201 - 1e-12 <= p <= 1  # (k + 1) / (N + 1) with N = 200
            assert round(p * 201) == pytest.approx(p * 201)
        page = (site / f"networks/{net}/index.html").read_text("utf-8")
        assert 'id="significance"' in page and "figures/null-modularity.svg" in page
        assert (site / f"networks/{net}/figures/null-assortativity-clinic.png").is_file()
    # The example's own question: does advice stay inside clinics? The reading may say so only
    # because the test backs it.
    page = (site / "networks/advice/index.html").read_text("utf-8")
    assert "Ties strongly prefer nodes alike in clinic" in page and "below 0.05" in page
    methods = (site / "methods.html").read_text("utf-8")
    assert "p = (k + 1) / (N + 1)" in methods and "doi:10.1126/science.1065103" in methods


def test_all_data_zip_holds_every_table_graphml_and_the_descriptor_and_validates(
        site: Path, tmp_path: Path) -> None:
    import zipfile

    files = site_files(site)
    expected = {path.removeprefix("files/"): data for path, data in files.items()
                if path.startswith("files/") and path.endswith((".csv", ".graphml", ".json"))}
    with zipfile.ZipFile(site / "files/all-data.zip") as archive:
        inside = {name: archive.read(name) for name in archive.namelist()}
        stamps = {entry.date_time for entry in archive.infolist()}
    assert inside == expected and "datapackage.json" in inside
    assert {"advice/nodes.csv", "coworking/network.graphml"} <= set(inside)
    assert stamps == {(1980, 1, 1, 0, 0, 0)}  # no clock time: the same results, the same bytes
    # Unzipped anywhere, the descriptor's paths hold: the Frictionless validator reads every
    # table against its schema (Frictionless Data, "Data Package" standard, v1).
    for name, data in inside.items():
        (tmp_path / name).parent.mkdir(parents=True, exist_ok=True)
        (tmp_path / name).write_bytes(data)
    import frictionless

    report = frictionless.validate(str(tmp_path / "datapackage.json"))
    assert report.valid, report.flatten(["rowNumber", "fieldName", "message"])


def test_the_downloads_page_gives_each_file_its_size(site: Path) -> None:
    from generator.vocabulary import file_size

    page = (site / "downloads.html").read_text("utf-8")
    for path in ("files/advice/nodes.csv", "files/coworking/edges.csv", "files/all-data.zip",
                 "files/datapackage.json", "networks/advice/figures/map.png"):
        size = file_size((site / path).stat().st_size)
        assert re.search(rf'<code>{re.escape(path)}</code></a> <span class="file-size">'
                         rf'{re.escape(size)}</span>', page), path
