"""netfolio pack: partner bundles that protect respondents (codes, removed columns, merged small
groups, a leak scan), and that describe and verify themselves."""

from __future__ import annotations

import errno
import hashlib
import hmac
import io
import json
import os
import random
import re
import shutil
import struct
import subprocess
import zipfile
import zlib
from pathlib import Path

import pandas as pd
import pytest
from conftest import csv_text, write_study

from generator.build import Progress, build_study
from generator.cli import main
from generator.config import load_study
from generator.errors import Finding
from generator.pack import pack_study
from generator.pack.bundle import BUNDLE_COMMENT, sha256sums, title_slug, zip_time
from generator.pack.codes import KEY_FILE, node_codes, read_study_key
from generator.pack.leaks import Leak, Secret, SecretMatcher, find_leaks, png_text
from generator.pack.protect import Protection, other_group, protect_analysis, redact_finding
from generator.pack.wording import BundleFacts, readme_text
from generator.publish.archive import zip_bytes

# ---------------------------------------------------------------------------------------------
# An invented study whose ids, names and e-mail addresses are distinctive strings, so that any
# of them left in a bundle can be found by a plain search.

CLINICS = ["Northgate"] * 7 + ["Riverside"] * 7 + ["Tidewell"] * 2  # Tidewell: below min_group
ROLES = ["nurse", "physician", "outreach worker", "nurse"] * 4
FIRST = ["Quillon", "Marisode", "Tavrenna", "Odelphine", "Brisket", "Callowen", "Ysmerel",
         "Fenwarda", "Gorrindel", "Hallowyn", "Istrade", "Jovarney", "Kestrelle", "Lumbrow",
         "Mirathel", "Norrowick"]
IDS = [f"kx-{name.lower()}-{100 + i}" for i, name in enumerate(FIRST)]
NAMES = [f"{name} Brackenford" if i % 2 else f"{name} Vellumsby" for i, name in enumerate(FIRST)]
EMAILS = [f"{name.lower()}.{i}@ridgeway-clinic.example" for i, name in enumerate(FIRST)]
STRANGER = "kx-wanderer-200"  # in a tie, not in the node list: a finding quotes it
SMALL_GROUP = "Tidewell"
TERMS = ("# Sharing terms\n\nUse this copy only to evaluate the outreach programme; delete it "
         "when the evaluation ends.\n")
CONTACT = "the evaluation desk, evaluation@clinics.example"


def _edges() -> list[tuple[str, str, int]]:
    rng = random.Random(11)
    pairs = {tuple(sorted(rng.sample(range(len(IDS)), 2))) for _ in range(40)}
    return [(IDS[a], IDS[b], rng.randint(1, 9)) for a, b in sorted(pairs)] + [
        (IDS[0], STRANGER, 2)]


def _nodes_csv() -> str:
    rows = [(node, NAMES[i], EMAILS[i], CLINICS[i], ROLES[i], 3 + i)
            for i, node in enumerate(IDS)]
    return csv_text(["id", "name", "email", "clinic", "role", "years"], rows)


def _study(root: Path, *, sharing: dict | None = None, notes: dict[str, str] | None = None,
           network: dict | None = None, tables: dict[str, dict] | None = None) -> Path:
    files: dict[str, str | bytes] = {
        "data/edges.csv": csv_text(["source", "target", "weight"], _edges()),
        "data/nodes.csv": _nodes_csv(),
        "notes/sharing.md": TERMS,
    }
    files.update({f"notes/{stem}.md": text for stem, text in (notes or {}).items()})
    net = {"id": "outreach", "title": "Outreach advice", "edges": "data/edges.csv",
           "nodes": "data/nodes.csv", "label": "name", "weight": "weight", "color_by": "clinic",
           **(network or {})}
    rules = {"pseudonymize": True, "drop": ["name", "email"], "min_group": 5,
             "terms": "notes/sharing.md", "contact": CONTACT, **(sharing or {})}
    return write_study(root, networks=[net], files=files, tables={"sharing": rules,
                                                                   **(tables or {})},
                       study={"title": "Ridgeway clinics: outreach", "seed": 3})


def _unzip(path: Path) -> dict[str, bytes]:
    with zipfile.ZipFile(path) as archive:
        return {name: archive.read(name) for name in archive.namelist()}


def _bundle_path(root: Path) -> Path:
    return root / "bundles" / "ridgeway-clinics-outreach.zip"


@pytest.fixture(autouse=True)
def _no_build_date(monkeypatch):
    monkeypatch.delenv("SOURCE_DATE_EPOCH", raising=False)


@pytest.fixture(scope="module")
def packed(tmp_path_factory) -> tuple[Path, dict[str, bytes]]:
    """One packed study (its folder and the files of its bundle), shared by read-only tests."""
    saved = os.environ.pop("SOURCE_DATE_EPOCH", None)
    try:
        root = _study(tmp_path_factory.mktemp("packed") / "study")
        result = pack_study(root)
    finally:
        if saved is not None:
            os.environ["SOURCE_DATE_EPOCH"] = saved
    assert result.path == _bundle_path(root)
    return root, _unzip(result.path)


def _texts(files: dict[str, bytes]) -> dict[str, str]:
    return {name: data.decode("utf-8", errors="replace").casefold() for name, data in files.items()}


# ---------------------------------------------------------------------------------------------
# Protection in the bundle


def test_no_id_name_or_email_appears_in_any_file_of_the_bundle(packed):
    _, files = packed
    texts = _texts(files)
    assert len(files) > 30  # pages, figures, downloads, README, sums
    for value in IDS + [STRANGER] + NAMES + EMAILS + [n.split()[0] for n in NAMES]:
        holding = [name for name, text in texts.items() if value.casefold() in text]
        assert holding == [], f"{value} is in {holding}"


def test_removed_columns_are_named_nowhere_not_even_in_datapackage(packed):
    _, files = packed
    package = json.loads(files["files/datapackage.json"])
    fields = [f["name"] for r in package["resources"] for f in r["schema"]["fields"]]
    assert "email" not in fields and "name" not in fields
    assert files["files/outreach/nodes.csv"].splitlines()[0].startswith(
        b"id,label,clinic,role,years,degree")
    assert [name for name, text in _texts(files).items() if "email" in text] == []


def test_ids_and_labels_become_keyed_codes_ordered_by_code(packed):
    root, files = packed
    key = bytes.fromhex((root / KEY_FILE).read_text().strip())
    nodes = pd.read_csv(io.BytesIO(files["files/outreach/nodes.csv"]), dtype=str)
    expected = {"n-" + hmac.new(key, node.encode(), hashlib.sha256).hexdigest()[:8]
                for node in IDS}
    assert set(nodes["id"]) - expected == {
        "n-" + hmac.new(key, STRANGER.encode(), hashlib.sha256).hexdigest()[:8]}
    assert list(nodes["id"]) == sorted(nodes["id"])
    assert list(nodes["label"]) == list(nodes["id"])
    edges = pd.read_csv(io.BytesIO(files["files/outreach/edges.csv"]), dtype=str)
    assert set(edges["source"]) | set(edges["target"]) <= set(nodes["id"])
    assert list(zip(edges["source"], edges["target"])) == sorted(zip(edges["source"],
                                                                     edges["target"]))


def test_every_node_keeps_the_numbers_of_the_full_report(packed, tmp_path):
    root, files = packed
    site = tmp_path / "site"
    build_study(root, output=site)
    full = pd.read_csv(site / "files/outreach/nodes.csv", dtype={"id": str})
    key = bytes.fromhex((root / KEY_FILE).read_text().strip())
    full["id"] = ["n-" + hmac.new(key, n.encode(), hashlib.sha256).hexdigest()[:8]
                  for n in full["id"]]
    part = pd.read_csv(io.BytesIO(files["files/outreach/nodes.csv"]), dtype={"id": str})
    measures = [c for c in part.columns if c not in ("label", "clinic", "role")]  # merged
    pd.testing.assert_frame_equal(full[measures].sort_values("id").reset_index(drop=True),
                                  part[measures].reset_index(drop=True))
    full_statistics = (site / "files/outreach/statistics.csv").read_text().splitlines()
    # Every statistic as in the full report (the assortativity of clinic too, computed over the
    # original groups), but those of the removed columns.
    assert files["files/outreach/statistics.csv"].decode().splitlines() == [
        line for line in full_statistics
        if not line.startswith(("assortativity:email,", "ei_index:email,",
                                "community_attribute_nmi:email,"))]


def test_a_group_below_min_group_appears_in_no_table_or_figure(packed):
    _, files = packed
    assert [name for name, text in _texts(files).items() if SMALL_GROUP.casefold() in text] == []
    nodes = pd.read_csv(io.BytesIO(files["files/outreach/nodes.csv"]))
    assert nodes["clinic"].value_counts().to_dict() == {"Northgate": 7, "Riverside": 7,
                                                       "other (n < 5)": 2}
    page = files["networks/outreach/index.html"].decode()
    assert "other (n &lt; 5): 2 nodes" in page  # the map's legend, as its alt text says it


def test_the_maps_name_no_node_without_keep_labels(packed):
    _, files = packed
    page = files["networks/outreach/index.html"].decode()
    assert "No node is named on the map." in page
    assert b"node-label-" not in files["networks/outreach/figures/map.svg"]


def test_data_checks_quote_no_value(packed):
    _, files = packed
    checks = files["checks.html"].decode()
    assert "node … appears in ties but not in the node list data/nodes.csv" in checks
    assert "kx-" not in checks and "wanderer" not in checks


# ---------------------------------------------------------------------------------------------
# The bundle describes and verifies itself


def test_readme_says_what_the_bundle_is_how_to_open_and_verify_it_and_the_terms(packed):
    _, files = packed
    readme = files["README.txt"].decode()
    assert readme.startswith("Ridgeway clinics: outreach\nPartner bundle made with netfolio ")
    assert "index.html" in readme and "sha256sum -c SHA256SUMS" in readme
    assert "Use this copy only to evaluate the outreach programme" in readme
    assert any(line.endswith("evaluation@clinics.example.") for line in readme.splitlines())
    assert " on 20" not in readme.splitlines()[1]  # no date without SOURCE_DATE_EPOCH


def test_readme_dates_the_bundle_from_source_date_epoch(tmp_path, monkeypatch):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1767225600")  # 2026-01-01 00:00 UTC
    result = pack_study(_study(tmp_path / "s"))
    files = _unzip(result.path)
    assert files["README.txt"].decode().splitlines()[1].endswith(" on 2026-01-01 00:00 UTC")
    assert {info.date_time for info in zipfile.ZipFile(result.path).infolist()} == {
        (2026, 1, 1, 0, 0, 0)}


def test_every_page_says_it_is_a_partner_copy_and_the_sharing_page_gives_terms_and_contact(packed):
    _, files = packed
    pages = [name for name in files if name.endswith(".html")]
    assert "sharing.html" in pages and len(pages) >= 8
    for name in pages:
        assert "<strong>Partner copy.</strong> Identities are protected" in files[name].decode()
    sharing = files["sharing.html"].decode()
    assert "Use this copy only to evaluate the outreach programme" in sharing
    assert "Pseudonymised is not anonymous" in sharing
    assert "evaluation@clinics.example" in sharing
    assert "other (n &lt; 5)" in sharing and "years" in sharing  # numeric attributes as they are


def test_sha256sum_checks_the_unzipped_bundle(packed, tmp_path):
    root, _ = packed
    with zipfile.ZipFile(_bundle_path(root)) as archive:
        archive.extractall(tmp_path)
    done = subprocess.run(["sha256sum", "-c", "SHA256SUMS"], cwd=tmp_path, capture_output=True,
                          text=True, check=False)
    assert done.returncode == 0, done.stdout + done.stderr
    lines = done.stdout.splitlines()
    assert len(lines) == len(list(_unzip(_bundle_path(root)))) - 1
    assert all(line.endswith(": OK") for line in lines)
    (tmp_path / "index.html").write_text("changed")
    assert subprocess.run(["sha256sum", "--quiet", "-c", "SHA256SUMS"], cwd=tmp_path,
                          capture_output=True, check=False).returncode == 1


def test_manifest_lists_every_file_but_itself_and_the_sums(packed):
    _, files = packed
    manifest = json.loads(files["manifest.json"])
    listed = {entry["path"]: entry["sha256"] for entry in manifest["files"]}
    assert set(listed) == set(files) - {"manifest.json", "SHA256SUMS"}
    assert listed["index.html"] == hashlib.sha256(files["index.html"]).hexdigest()


def test_datapackage_validates_with_frictionless_against_the_csvs(packed, tmp_path):
    frictionless = pytest.importorskip("frictionless")
    root, _ = packed
    with zipfile.ZipFile(_bundle_path(root)) as archive:
        archive.extractall(tmp_path)
    report = frictionless.validate(str(tmp_path / "files/datapackage.json"))
    assert report.valid, report.flatten(["rowNumber", "fieldName", "message"])
    assert report.stats["tasks"] == 7  # nodes, edges, statistics, communities, mixing of clinic
    #                                    and of role, and the study's table of statistics
    package = json.loads((tmp_path / "files/datapackage.json").read_text())
    assert all(r["schema"]["missingValues"] == [""] for r in package["resources"])
    # The check can fail: a word in a number column is reported.
    edges = tmp_path / "files/outreach/edges.csv"
    edges.write_text(edges.read_text() + "n-x,n-y,many\n")
    assert not frictionless.validate(str(tmp_path / "files/datapackage.json")).valid


def test_zip_has_sorted_relative_entries_fixed_time_and_mode_and_netfolio_comment(packed):
    root, files = packed
    with zipfile.ZipFile(_bundle_path(root)) as archive:
        infos = archive.infolist()
        assert archive.comment == BUNDLE_COMMENT
    names = [info.filename for info in infos]
    assert names == sorted(names) and "README.txt" in names and "SHA256SUMS" in names
    assert all(not n.startswith("/") and ".." not in n.split("/") for n in names)
    assert {info.date_time for info in infos} == {(1980, 1, 1, 0, 0, 0)}
    assert {info.external_attr >> 16 for info in infos} == {0o100644}
    assert KEY_FILE not in names and ".netfolio-site" not in names


def test_the_bundle_links_only_to_its_own_files(packed):
    _, files = packed
    for name, data in files.items():
        if not name.endswith(".html"):
            continue
        for href in re.findall(r'(?:href|src)="([^"]+)"', data.decode()):
            if href.startswith(("https://doi.org/", "#", "mailto:")):
                continue
            target = os.path.normpath(os.path.join(os.path.dirname(name), href.split("#")[0]))
            assert target in files, f"{name} links to {href}, not in the bundle"


# ---------------------------------------------------------------------------------------------
# Keys, codes and repeatability


def test_two_packs_give_identical_bytes(tmp_path):
    root = _study(tmp_path / "s")
    first = pack_study(root, out=tmp_path / "a.zip").path.read_bytes()
    second = pack_study(root, out=tmp_path / "b.zip").path.read_bytes()
    assert first == second


def test_codes_are_stable_with_one_key_and_differ_with_another(tmp_path):
    root = _study(tmp_path / "s")
    first = _unzip(pack_study(root, out=tmp_path / "a.zip").path)["files/outreach/nodes.csv"]
    again = _unzip(pack_study(root, out=tmp_path / "b.zip").path)["files/outreach/nodes.csv"]
    assert first == again
    (root / KEY_FILE).unlink()
    other = _unzip(pack_study(root, out=tmp_path / "c.zip").path)["files/outreach/nodes.csv"]
    codes = set(pd.read_csv(io.BytesIO(first))["id"])
    assert codes.isdisjoint(set(pd.read_csv(io.BytesIO(other))["id"]))


def test_key_file_is_made_on_first_pack_readable_by_its_owner_only(tmp_path):
    root = _study(tmp_path / "s")
    assert not (root / KEY_FILE).exists()
    result = pack_study(root)
    assert result.new_key and result.key_file == root / KEY_FILE
    assert (root / KEY_FILE).stat().st_mode & 0o777 == 0o600
    assert len(bytes.fromhex((root / KEY_FILE).read_text().strip())) == 32
    assert not pack_study(root).new_key


def test_codes_are_the_hmac_sha256_of_the_id_under_the_key():
    key = bytes(range(32))
    codes = node_codes(["s01", "s02"], key)
    assert codes["s01"] == "n-" + hmac.new(key, b"s01", hashlib.sha256).hexdigest()[:8]
    assert codes == node_codes(["s02", "s01", "s01"], key)
    assert codes != node_codes(["s01", "s02"], bytes(32))


def test_codes_grow_until_no_two_collide(monkeypatch):
    import generator.pack.codes as codes_module

    monkeypatch.setattr(codes_module, "CODE_DIGITS", 2)  # 256 codes: 60 ids will collide
    ids = [f"s{i}" for i in range(60)]
    codes = node_codes(ids, bytes(32))
    assert len(set(codes.values())) == 60
    assert {len(code) for code in codes.values()} == {len("n-") + 4}  # 2 digits, then 4


# ---------------------------------------------------------------------------------------------
# The leak scan


def test_a_note_quoting_a_label_fails_the_pack_and_leaves_no_zip(tmp_path, capsys):
    root = _study(tmp_path / "s", notes={"people": f"Thanks to {NAMES[3]} for the roster.\n"})
    assert main(["pack", str(root), "-q"]) == 1
    err = capsys.readouterr().err
    assert "notes/people.html holds a node label" in err
    assert "Odelphine" not in err and "Traceback" not in err
    assert not (root / "bundles").exists() or list((root / "bundles").iterdir()) == []
    assert not (root / KEY_FILE).exists()  # a failed pack makes no key either


def test_a_note_quoting_an_email_is_reported_as_a_removed_column_value(tmp_path, capsys):
    root = _study(tmp_path / "s", notes={"contacts": f"Write to {EMAILS[0].upper()}.\n"})
    assert main(["pack", str(root), "-q"]) == 1
    err = capsys.readouterr().err
    assert "notes/contacts.html holds a value of the removed column 'email'" in err
    assert "ridgeway" not in err.casefold()


def test_scan_finds_values_in_any_case_and_as_html_escapes_them():
    matcher = SecretMatcher([Secret("node label", "Ann O'Brien"), Secret("node id", "s-077")])
    files = {"a.html": b"<p>ann o&#x27;brien</p>", "b.csv": b"S-077,1\n",
             "c.json": b'{"x": "Ann O\'Brien"}', "d.txt": b"nothing here"}
    assert [(leak.file, leak.kind) for leak in find_leaks(files, matcher)] == [
        ("a.html", "node label"), ("b.csv", "node id"), ("c.json", "node label")]


def test_scan_opens_zips_in_the_bundle_so_a_deflated_table_hides_nothing():
    matcher = SecretMatcher([Secret("node label", "Tavrenna Quill")])
    inner = zip_bytes({"nodes.csv": b"id,label\n1,Tavrenna Quill\n"}, date_time=zip_time(None))
    outer = zip_bytes({"deeper/all.zip": inner}, date_time=zip_time(None))
    assert b"Tavrenna" not in inner  # deflated: a plain search of the bytes misses it
    files = {"files/all-data.zip": inner, "x.zip": outer, "y.html": b"<p>clean</p>"}
    assert [(leak.file, leak.kind) for leak in find_leaks(files, matcher)] == [
        ("files/all-data.zip/nodes.csv", "node label"),
        ("x.zip/deeper/all.zip/nodes.csv", "node label")]


def test_scan_matches_whole_values_only_and_skips_short_ones():
    matcher = SecretMatcher([Secret("node label", "Ann"), Secret("node id", "101"),
                             Secret("node id", "s1")])
    assert matcher.count == 2  # "s1" is shorter than three characters
    assert matcher.kinds_in("Annual report, 0.1013 and 1101") == set()
    assert matcher.kinds_in("Thanks, Ann.") == {"node label"}
    assert matcher.kinds_in("node 101 of 120") == {"node id"}


def test_scan_leaves_out_values_the_bundle_shows_on_purpose():
    matcher = SecretMatcher([Secret("node label", "Riverside")], exempt=["riverside"])
    assert matcher.kinds_in("clinic: Riverside") == set()


def _png(*chunks: tuple[bytes, bytes]) -> bytes:
    body = b"".join(struct.pack(">I", len(data)) + kind + data
                    + struct.pack(">I", zlib.crc32(kind + data)) for kind, data in chunks)
    return b"\x89PNG\r\n\x1a\n" + body


def test_scan_reads_png_text_chunks_including_compressed_ones():
    png = _png((b"IHDR", bytes(13)),
               (b"tEXt", b"Title\0plain Quillon"),
               (b"zTXt", b"Comment\0\0" + zlib.compress(b"squeezed Marisode")),
               (b"iTXt", b"Author\0\1\0en\0\0" + zlib.compress("Tavrenna é".encode())),
               (b"IDAT", zlib.compress(b"Odelphine")),  # pixels: not text
               (b"IEND", b""))
    text = png_text(png)
    assert "plain Quillon" in text and "squeezed Marisode" in text and "Tavrenna é" in text
    assert "Odelphine" not in text
    matcher = SecretMatcher([Secret("node label", "Tavrenna")])
    assert find_leaks({"f.png": png}, matcher)[0].kind == "node label"


def test_a_png_embedded_in_an_svg_is_read_for_its_text_not_its_base64_letters():
    import base64

    # Pixel bytes chosen so that their base64 reads "+s01/" (an id between two non-word
    # characters): a chance match in image data, which made a bundle fail its check.
    # (One byte first: the pixels then start 42 bytes in, a whole number of base64 groups.)
    pixels = b"\0" + base64.b64decode("AAAA+s01/AAA")
    png = _png((b"IHDR", bytes(13)), (b"IDAT", pixels), (b"tEXt", b"Title\0by Quillon"),
               (b"IEND", b""))
    encoded = base64.b64encode(png).decode()
    encoded = "\n".join(encoded[i:i + 76] for i in range(0, len(encoded), 76))  # as matplotlib
    assert "+s01/" in encoded.replace("\n", "")
    svg = f'<svg><image xlink:href="data:image/png;base64,\n{encoded}"/></svg>'.encode()
    matcher = SecretMatcher([Secret("node id", "s01"), Secret("node label", "Quillon")])
    assert find_leaks({"map.svg": svg}, matcher) == [Leak("map.svg", "node label")]
    # Text outside the image is still read.
    assert {leak.kind for leak in find_leaks({"map.svg": svg + b"<text>s01</text>"}, matcher)} \
        == {"node id", "node label"}


# ---------------------------------------------------------------------------------------------
# Protection as pure functions


def _analysis(root: Path):
    from generator.analyse import analyse_network
    from generator.ingest import read_network

    study = load_study(root)
    clean = read_network(study, study.networks[0])
    return study, analyse_network(clean, communities=study.communities, measures=study.measures,
                                  seed=study.seed)


def test_protected_analysis_keeps_each_nodes_measures_community_and_position(tmp_path):
    study, analysis = _analysis(_study(tmp_path / "s", tables={"communities": {
        "runs": 3, "perturbations": 4}}))
    assert analysis.stability.ran and analysis.stability.together is not None
    codes = node_codes(IDS + [STRANGER], bytes(32))
    protection = Protection(codes=codes, drop=frozenset({"name", "email"}), min_group=5)
    protected = protect_analysis(analysis, study.networks[0], protection,
                                 withheld=SecretMatcher([], min_length=1))
    assert list(protected.nodes.index) == sorted(codes.values())
    assert protected.attributes == ("clinic", "role", "years")
    for i, node in enumerate(analysis.nodes.index):
        j = list(protected.nodes.index).index(codes[node])
        assert protected.layout[j] == analysis.layout[i]
        assert protected.communities.membership[j] == analysis.communities.membership[i]
        assert protected.measures.iloc[j].equals(analysis.measures.iloc[i])
        assert protected.stability.confidence[j] == analysis.stability.confidence[i]
        for k, other in enumerate(analysis.nodes.index):
            m = list(protected.nodes.index).index(codes[other])
            assert protected.stability.together[j][m] == analysis.stability.together[i][k]
    # Communities against attributes: the removed column is gone, small clinics are merged
    # into one column with their counts added up; the NMI is that of the full report.
    assert [c.attribute for c in protected.attribute_comparisons] == ["clinic", "role"]
    full = next(c for c in analysis.attribute_comparisons if c.attribute == "clinic")
    shown = protected.attribute_comparisons[0]
    assert shown.nmi == full.nmi and shown.values[-1] == other_group(5)
    assert SMALL_GROUP not in shown.values and SMALL_GROUP in full.values
    assert shown.counts == full.counts  # one small clinic: its column becomes the merged one
    assert protected.statistics == tuple(s for s in analysis.statistics
                                         if s.name not in ("assortativity:email",
                                                           "ei_index:email",
                                                           "community_attribute_nmi:email"))


def test_a_finding_keeps_file_line_and_count_but_not_its_values():
    withheld = SecretMatcher([Secret("node id", "s07")], min_length=1)
    quoted = Finding("fix", "data/e.csv", "node 'zed' appears in ties but not in the node list",
                     line=4, column="source", value="zed", count=1)
    listed = Finding("note", "data/e.csv", "2 isolates with no ties, kept in the network: s07, s09",
                     count=2)
    dropped = Finding("fix", "data/n.csv", "3 values had spaces", line=2, column="email", count=3)
    first = redact_finding(quoted, drop=frozenset({"email"}), withheld=withheld)
    assert (first.message, first.value, first.line, first.column) == (
        "node … appears in ties but not in the node list", None, 4, "source")
    second = redact_finding(listed, drop=frozenset(), withheld=withheld)
    assert second.message == "a note on the data (details withheld in partner copies)"
    assert second.count == 2
    assert redact_finding(dropped, drop=frozenset({"email"}), withheld=withheld).column is None


def test_title_slug_and_zip_time():
    assert title_slug("Clinic collaborative: advice & co-working") == \
        "clinic-collaborative-advice-co-working"
    assert title_slug("Étude réseau") == "etude-reseau" and title_slug("???") == "study"
    assert zip_time(None) == (1980, 1, 1, 0, 0, 0) and zip_time("0") == (1980, 1, 1, 0, 0, 0)
    assert zip_time("1767225600") == (2026, 1, 1, 0, 0, 0)


def test_readme_keeps_an_address_whole_when_it_wraps_lines():
    facts = BundleFacts(title="T", pseudonymized=True, removed=(), min_group=5, merged=(),
                        categorical=(), numeric=(), labels=False, checked=3,
                        contact="the study team, study-team@clinics.example")
    readme = readme_text(facts, version="0", built="", terms=None)
    assert any("study-team@clinics.example." in line for line in readme.splitlines())
    assert all(len(line) <= 78 or " " not in line for line in readme.splitlines())


def test_sha256sums_lines_are_hash_two_spaces_path():
    assert sha256sums({"b.txt": b"", "a b.txt": b"x"}) == (
        f"{hashlib.sha256(b'x').hexdigest()}  a b.txt\n"
        f"{hashlib.sha256(b'').hexdigest()}  b.txt\n").encode()


# ---------------------------------------------------------------------------------------------
# The command, the normal site, and bad input


def test_pack_leaves_the_normal_site_untouched(tmp_path):
    root = _study(tmp_path / "s")
    build_study(root)
    site = root / "output"
    before = {p: (p.read_bytes(), p.stat().st_mtime_ns) for p in site.rglob("*") if p.is_file()}
    pack_study(root)
    after = {p: (p.read_bytes(), p.stat().st_mtime_ns) for p in site.rglob("*") if p.is_file()}
    assert after == before
    assert build_study(root).up_to_date  # the pack changed nothing a build reads


def test_pack_command_prints_the_count_the_caution_and_where_the_bundle_is(tmp_path, capsys):
    root = _study(tmp_path / "s")
    assert main(["pack", str(root), "-q"]) == 0
    out = capsys.readouterr().out
    # ids, names and e-mail addresses, each of three characters or more
    assert f"checked {len(IDS) + 1 + len(NAMES) + len(EMAILS)} original values" in out
    assert f"bundle written to {_bundle_path(root)}" in out
    assert "Pseudonymised is not anonymous" in out
    assert f"made the study's key {root / KEY_FILE}" in out


def test_keep_labels_names_nodes_by_code_and_warns(tmp_path, capsys):
    root = _study(tmp_path / "s")
    result = pack_study(root, keep_labels=True, progress=Progress(quiet=True))
    assert "warning  --keep-labels" in capsys.readouterr().err
    files = _unzip(result.path)
    assert b"node-label-" in files["networks/outreach/figures/map.svg"]
    assert "Named on the map: the 5 nodes" in files["networks/outreach/index.html"].decode()
    assert [n for n, t in _texts(files).items() if any(v.casefold() in t for v in NAMES)] == []


def test_pack_replaces_a_bundle_it_wrote_before(tmp_path):
    root = _study(tmp_path / "s")
    target = tmp_path / "partner.zip"
    first = pack_study(root, out=target).path.read_bytes()
    (root / KEY_FILE).unlink()  # new codes: the second bundle differs from the first
    assert pack_study(root, out=target).path == target
    assert target.read_bytes() != first


def test_without_pseudonymize_ids_stay_and_removed_names_show_the_id(tmp_path):
    root = _study(tmp_path / "s", sharing={"pseudonymize": False})
    files = _unzip(pack_study(root).path)
    nodes = pd.read_csv(io.BytesIO(files["files/outreach/nodes.csv"]), dtype=str)
    assert sorted(nodes["id"]) == sorted(IDS + [STRANGER])
    assert list(nodes["label"]) == list(nodes["id"])  # the label column is removed
    assert [n for n, t in _texts(files).items() if any(v.casefold() in t for v in NAMES)] == []


BAD_INPUTS = {
    "drop names no column": ({"sharing": {"drop": ["name", "phone"]}}, None,
                             "[sharing.drop] names the column 'phone'"),
    "min_group below 1": ({"sharing": {"min_group": 0}}, None,
                          "[sharing.min_group] must be at least 1"),
    "terms file missing": ({"sharing": {"terms": "notes/terms.md"}}, None,
                           "[sharing.terms] the sharing terms file 'notes/terms.md' does not exist"),
    "malformed key": ({}, "key:0123", "is malformed"),
    "key is a folder": ({}, "key-folder", "is a folder"),
    "out inside the output folder": ({}, "out:output/bundle.zip", "inside the output folder"),
    "out onto a file netfolio did not write": ({}, "out:data/nodes.csv", "must name a .zip"),
    "out onto a zip netfolio did not write": ({}, "out:mine.zip",
                                             "is not a bundle netfolio wrote"),
}


@pytest.mark.parametrize("case", list(BAD_INPUTS), ids=list(BAD_INPUTS))
def test_bad_input_exits_1_with_a_clear_message_and_writes_nothing(case, tmp_path, capsys):
    tables, setup, expected = BAD_INPUTS[case]
    root = _study(tmp_path / "s", **tables)
    args = ["pack", str(root), "-q"]
    if setup == "key:0123":
        (root / KEY_FILE).write_text("0123\n")
    elif setup == "key-folder":
        (root / KEY_FILE).mkdir()
    elif setup and setup.startswith("out:"):
        target = root / setup[4:]
        if target.name == "mine.zip":
            with zipfile.ZipFile(target, "w") as archive:
                archive.writestr("x.txt", "mine")
        args += ["--out", str(target)]
    before = {p: p.read_bytes() for p in root.rglob("*") if p.is_file()}
    assert main(args) == 1
    err = capsys.readouterr().err
    assert err.startswith("error: ") and expected in err and "Traceback" not in err
    after = {p: p.read_bytes() for p in root.rglob("*") if p.is_file()
             if ".netfolio-cache" not in p.parts}
    assert after == {p: b for p, b in before.items()}
    assert not (root / "bundles").exists()


def test_a_study_without_sharing_table_packs_with_the_default_rules(tmp_path):
    ids = ["alder-one", "birch-two", "cedar-three"]
    files = {"data/edges.csv": csv_text(["source", "target"], [ids[:2], ids[1:]])}
    root = write_study(tmp_path / "s", networks=[{"id": "net", "edges": "data/edges.csv"}],
                       files=files)
    bundle = _unzip(pack_study(root).path)
    assert [n for n, t in _texts(bundle).items() if any(i in t for i in ids)] == []
    assert "The study sets no written terms" in bundle["sharing.html"].decode()


def test_key_file_stays_out_of_the_bundle_even_when_a_note_shows_it(tmp_path, capsys):
    root = _study(tmp_path / "s")
    pack_study(root)
    key = (root / KEY_FILE).read_text().strip()
    shutil.rmtree(root / "bundles")
    (root / "notes" / "oops.md").write_text(f"key {key}\n")
    assert main(["pack", str(root), "-q"]) == 1
    err = capsys.readouterr().err
    assert "notes/oops.html holds a copy of the study's secret key" in err and key not in err


def test_a_relations_page_in_a_bundle_names_nodes_by_code_and_keeps_the_numbers(tmp_path):
    root = _study(tmp_path / "s")
    rng = random.Random(5)
    others = sorted({tuple(sorted(rng.sample(IDS, 2))) for _ in range(30)}) + [(IDS[3], STRANGER)]
    (root / "data/met.csv").write_text(csv_text(["source", "target"], others), encoding="utf-8")
    with open(root / "study.toml", "a", encoding="utf-8") as toml:
        toml.write('\n[[network]]\nid = "met"\nedges = "data/met.csv"\nnodes = "data/nodes.csv"\n'
                   'label = "name"\n\n[[relations]]\nid = "advice-and-met"\n'
                   'networks = ["outreach", "met"]\npermutations = 49\n'
                   'model = { outcome = "outreach", predictors = ["met"], same = ["clinic"] }\n')
    full = build_study(root).output
    files = _unzip(pack_study(root).path)  # the leak scan found no id, label or email
    page = files["compare/advice-and-met.html"].decode("utf-8")
    for secret in (*IDS, *NAMES, STRANGER):
        assert secret not in page
    codes = node_codes([*IDS, STRANGER], read_study_key(root).secret)
    assert all(f"<th scope=\"row\">{code}</th>" in page for code in codes.values())
    for name in ("pairs.csv", "model.csv"):  # computed on the full data: the same numbers
        path = f"files/relations/advice-and-met/{name}"
        assert files[path] == (full / path).read_bytes()


@pytest.mark.parametrize("failing", ["write_bytes", "replace"])
def test_a_full_disk_while_packing_exits_1_naming_the_folder_and_keeps_the_last_bundle(
        tmp_path, monkeypatch, capsys, failing):
    root = _study(tmp_path / "s")
    target = pack_study(root).path
    before = target.read_bytes()
    (root / KEY_FILE).unlink()  # so this pack would make a new key, and must not keep it
    full = OSError(errno.ENOSPC, "No space left on device")
    if failing == "write_bytes":
        real_write = Path.write_bytes

        def write_bytes(self, data):
            if self.name.endswith(".packing"):
                raise full
            return real_write(self, data)

        monkeypatch.setattr(Path, "write_bytes", write_bytes)
    else:
        def replace(source, destination):
            raise full

        monkeypatch.setattr(os, "replace", replace)
    assert main(["pack", str(root), "-q"]) == 1
    err = capsys.readouterr().err
    assert "Traceback" not in err and "No space left on device" in err, err
    assert f"in {target.parent}" in err, err
    assert target.read_bytes() == before
    assert sorted(p.name for p in target.parent.iterdir()) == [target.name]  # no temporary left
    if failing == "write_bytes":  # the zip never got written: the new key is not kept either
        assert not (root / KEY_FILE).exists()
    else:  # saved just before the move that failed: whole, so the next pack reads it
        assert read_study_key(root).new is False
