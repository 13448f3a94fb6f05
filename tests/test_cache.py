"""The cache of results (generator/cache.py): keys follow exactly what a result depends on, a bad
entry is recomputed with a warning, and a cached build writes the same bytes as a fresh one."""

from __future__ import annotations

import io
import json
import shutil
from dataclasses import replace
from pathlib import Path

import pytest
from conftest import edge_study, write_study

from generator.build import Progress, build_study, clean_study
from generator.cache import (
    CACHE_DIR,
    CACHE_TAG,
    FORMAT_VERSION,
    analysis_from_json,
    analysis_key,
    analysis_to_json,
    figures_key,
)
from generator.cli import main
from generator.config import load_study
from generator.draw import FigureSettings
from generator.errors import OutputError

EXAMPLE = Path(__file__).resolve().parents[1] / "example_project"
EDGES = "source,target,w\na,b,2\nb,c,1\nc,a,3\nc,d,1\n"
NODES = "id,team,years\na,red,3\nb,red,\nc,blue,10\nd,blue,1\n"


def _study(root: Path, **keys) -> Path:
    return edge_study(root, EDGES, nodes=NODES, weight="w", **keys)


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def _build(root: Path, out: Path, *, fresh: bool = False) -> str:
    """Build and return the progress lines."""
    stream = io.StringIO()
    build_study(root, output=out, progress=Progress(stream), fresh=fresh)
    return stream.getvalue()


def _key(root: Path) -> str:
    study = load_study(root)
    return analysis_key(study, study.networks[0])


# ---------------------------------------------------------------------------------------------
# Keys


def test_the_key_is_stable_for_unchanged_inputs(tmp_path):
    root = _study(tmp_path)
    assert _key(root) == _key(root)


@pytest.mark.parametrize("edit", [
    lambda root: (root / "data" / "edges.csv").write_text(EDGES + "d,a,1\n"),
    lambda root: (root / "data" / "nodes.csv").write_text(NODES.replace("red", "rose")),
    # The same ties in another row order are other bytes: a new key (and, below, the same site).
    lambda root: (root / "data" / "edges.csv").write_text(
        "source,target,w\nc,d,1\na,b,2\nb,c,1\nc,a,3\n"),
])
def test_the_key_changes_with_any_input_byte(tmp_path, edit):
    root = _study(tmp_path)
    before = _key(root)
    edit(root)
    assert _key(root) != before


@pytest.mark.parametrize("keys, tables", [
    ({"directed": True}, {}),
    ({"weight_means": "distance"}, {}),
    ({"duplicates": "max"}, {}),
    ({}, {"communities": {"runs": 5}}),
    ({}, {"measures": {"exact_paths_up_to": 2}}),
    ({}, {"significance": {"null_samples": 10}}),
])
def test_the_key_changes_with_every_setting_that_affects_the_analysis(tmp_path, keys, tables):
    base = _key(write_study(tmp_path / "a", networks=[_net()], files=_files()))
    other = _key(write_study(tmp_path / "b", networks=[_net(**keys)], files=_files(),
                             tables=tables))
    assert base != other


def test_the_seed_and_the_versions_are_in_the_key(tmp_path, monkeypatch):
    root = write_study(tmp_path / "a", networks=[_net()], files=_files())
    seeded = write_study(tmp_path / "b", networks=[_net()], files=_files(),
                         study={"title": "Invented study", "seed": 2})
    assert _key(root) != _key(seeded)
    before = _key(root)
    import generator.cache as cache

    monkeypatch.setattr(cache, "library_versions", lambda: {"igraph": "0.0-other"})
    assert _key(root) != before


def test_figure_settings_change_the_figures_key_but_not_the_analysis_key(tmp_path):
    plain = _key(write_study(tmp_path / "a", networks=[_net()], files=_files()))
    coloured = _key(write_study(tmp_path / "b", networks=[_net(color_by="team")],
                                files=_files()))
    assert plain == coloured
    assert figures_key(plain, FigureSettings()) != figures_key(plain, FigureSettings(
        color_by="team"))


def _net(**keys):
    return {"id": "net", "edges": "data/edges.csv", "nodes": "data/nodes.csv", "weight": "w",
            **keys}


def _files():
    return {"data/edges.csv": EDGES, "data/nodes.csv": NODES}


# ---------------------------------------------------------------------------------------------
# Round trip and builds


def test_an_analysis_survives_the_round_trip_exactly(tmp_path):
    root = write_study(tmp_path, networks=[_net()], files=_files(), null_samples=4)
    result = build_study(root, output=tmp_path / "site")
    (analysis,) = result.networks
    again = analysis_from_json(json.loads(json.dumps(analysis_to_json(analysis))))
    assert analysis.significance.tests and again.significance == analysis.significance
    assert all(isinstance(t.nulls, tuple) for t in again.significance.tests)
    assert again.statistics == analysis.statistics and again.layout == analysis.layout
    assert again.communities == analysis.communities and again.versions == analysis.versions
    for frame in ("measures", "nodes", "edges"):
        left, right = getattr(analysis, frame), getattr(again, frame)
        assert list(left.dtypes.astype(str)) == list(right.dtypes.astype(str)), frame
        assert left.equals(right), frame
    assert list(again.versions) == list(analysis.versions)  # order, as the methods page lists it


def test_a_second_build_reuses_everything_and_writes_the_same_site(tmp_path):
    study = tmp_path / "example"
    shutil.copytree(EXAMPLE, study, ignore=shutil.ignore_patterns("output", CACHE_DIR))
    first = _build(study, tmp_path / "fresh", fresh=True)
    second = _build(study, tmp_path / "cached")
    assert "analyse  advice: " in first and "advice: cached" not in first
    for line in ("analyse  advice: cached", "analyse  coworking: cached",
                 "draw     advice: cached", "draw     coworking: cached"):
        assert line in second
    assert "ingest" not in second  # unchanged data is not even read
    assert _snapshot(tmp_path / "fresh") == _snapshot(tmp_path / "cached")


def test_rows_in_another_order_give_the_same_site_from_the_cache_or_not(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "one")
    (root / "data" / "edges.csv").write_text("source,target,w\nc,d,1\na,b,2\nb,c,1\nc,a,3\n")
    lines = _build(root, tmp_path / "two")
    assert "analyse  net: cached" not in lines  # other bytes: computed again
    assert _snapshot(tmp_path / "one") == _snapshot(tmp_path / "two")


def test_a_note_edit_recomputes_nothing(tmp_path):
    root = _study(tmp_path / "study")
    (root / "notes").mkdir()
    (root / "notes" / "about.md").write_text("# About\n\nFirst words.\n")
    _build(root, tmp_path / "site")
    (root / "notes" / "about.md").write_text("# About\n\nSecond words.\n")
    lines = _build(root, tmp_path / "site")
    assert "analyse  net: cached" in lines and "draw     net: cached" in lines
    assert "Second words." in (tmp_path / "site" / "notes" / "about.html").read_text()


def test_a_colour_change_redraws_without_analysing(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "site")
    toml = (root / "study.toml").read_text()
    (root / "study.toml").write_text(toml.replace('weight = "w"', 'weight = "w"\ncolor_by = "team"'))
    lines = _build(root, tmp_path / "site")
    assert "analyse  net: cached" in lines
    # The figures as before plus the heatmap of team's mixing matrix and the scatter of years.
    assert "draw     net: 10 figures" in lines or "draw     net: 9 figures" in lines


def test_fresh_ignores_the_cache_and_writes_it_anew(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "site")
    lines = _build(root, tmp_path / "site", fresh=True)
    assert "cached" not in lines and "up to date" not in lines
    assert "cached" in _build(root, tmp_path / "other")


def test_a_build_with_nothing_changed_writes_nothing(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "site")
    before = _snapshot(tmp_path / "site")
    stamp = (tmp_path / "site" / "index.html").stat().st_mtime_ns
    lines = _build(root, tmp_path / "site")
    assert "nothing changed" in lines and "analyse  net: cached" in lines
    assert "ingest" not in lines and "render" not in lines
    assert (tmp_path / "site" / "index.html").stat().st_mtime_ns == stamp
    assert _snapshot(tmp_path / "site") == before


@pytest.mark.parametrize("change", ["note", "site file", "theme"])
def test_any_change_to_what_the_site_shows_builds_again(tmp_path, change):
    root = _study(tmp_path / "study")
    (root / "notes").mkdir()
    (root / "notes" / "a.md").write_text("# A\n\nx\n")
    _build(root, tmp_path / "site")
    if change == "note":
        (root / "notes" / "a.md").write_text("# A\n\ny\n")
    elif change == "site file":  # a file of the site edited by hand is put right
        (tmp_path / "site" / "index.html").write_text("edited")
    else:
        (root / "mytheme" / "static").mkdir(parents=True)
        (root / "mytheme" / "static" / "extra.css").write_text("p { margin: 0; }")
        toml = (root / "study.toml").read_text()
        (root / "study.toml").write_text(toml + '\n[site]\ntheme = "mytheme"\n')
    lines = _build(root, tmp_path / "site")
    assert "nothing changed" not in lines and "publish  wrote" in lines
    assert (tmp_path / "site" / "index.html").read_text() != "edited"


# ---------------------------------------------------------------------------------------------
# Entries that cannot be trusted


def _entries(root: Path, kind: str) -> list[Path]:
    return sorted((root / CACHE_DIR).glob(f"{kind}-*.json"))


@pytest.mark.parametrize("damage", [
    lambda text: text[: len(text) // 2],  # truncated
    # the payload changed, so its checksum fails
    lambda text: text.replace('\\"seed\\":', '\\"seed\\": 1, \\"x\\":', 1),
    # a later netfolio's entry
    lambda text: text.replace(f'"version": {FORMAT_VERSION}', '"version": 999', 1),
    lambda text: "not json at all",
])
def test_a_damaged_or_foreign_entry_is_recomputed_with_one_warning(tmp_path, damage):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "fresh")
    (entry,) = _entries(root, "analysis")
    entry.write_text(damage(entry.read_text(encoding="utf-8")), encoding="utf-8")
    lines = _build(root, tmp_path / "again")
    warnings = [line for line in lines.splitlines() if line.startswith("warning")]
    assert len(warnings) == 1 and entry.name in warnings[0]
    assert "analyse  net: cached" not in lines
    assert _snapshot(tmp_path / "fresh") == _snapshot(tmp_path / "again")
    assert "analyse  net: cached" in _build(root, tmp_path / "third")  # written anew


def test_damaged_figures_are_redrawn_and_a_wrong_key_is_refused(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "fresh")
    (figures,) = _entries(root, "figures")
    (analysis, ) = _entries(root, "analysis")
    other = analysis.with_name(analysis.name.replace("analysis-", "analysis-0"))
    shutil.copy(analysis, other)  # an entry filed under a key it was not made for
    figures.write_bytes(figures.read_bytes()[:100])
    lines = _build(root, tmp_path / "again")
    assert "draw     net: cached" not in lines and "analyse  net: cached" in lines
    assert _snapshot(tmp_path / "fresh") == _snapshot(tmp_path / "again")


def test_entries_the_study_no_longer_needs_are_removed(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "site")
    before = set(_entries(root, "analysis"))
    (root / "data" / "edges.csv").write_text(EDGES + "d,a,1\n")
    _build(root, tmp_path / "site")
    after = set(_entries(root, "analysis"))
    assert len(after) == 1 and not (before & after)
    assert (root / CACHE_DIR / CACHE_TAG).read_text().startswith(
        "Signature: 8a477f597d28d172789f06886806bc55")


# ---------------------------------------------------------------------------------------------
# netfolio clean


def test_clean_removes_the_cache_and_the_site_and_nothing_else(tmp_path, capsys):
    root = _study(tmp_path / "study")
    assert main(["build", str(root), "--quiet"]) == 0
    inputs = {p for p in root.rglob("*") if "output" not in p.parts and CACHE_DIR not in p.parts}
    assert main(["clean", str(root)]) == 0
    out = capsys.readouterr().out
    assert f"removed {root.resolve() / CACHE_DIR}" in out and "output" in out
    assert not (root / CACHE_DIR).exists() and not (root / "output").exists()
    assert {p for p in root.rglob("*")} == inputs


def test_clean_leaves_folders_netfolio_did_not_make(tmp_path, capsys):
    root = _study(tmp_path / "study")
    (root / "output").mkdir()
    (root / "output" / "mine.txt").write_text("keep me")
    with pytest.raises(OutputError, match="not made by netfolio"):
        clean_study(root)
    (root / CACHE_DIR).mkdir()
    assert main(["clean", str(root)]) == 1
    assert "has no CACHEDIR.TAG" in capsys.readouterr().err
    assert (root / "output" / "mine.txt").read_text() == "keep me"


def test_cached_build_keeps_the_methods_page_versions_in_order(tmp_path):
    root = _study(tmp_path / "study")
    _build(root, tmp_path / "fresh")
    _build(root, tmp_path / "cached")
    one = (tmp_path / "fresh" / "methods.html").read_text()
    two = (tmp_path / "cached" / "methods.html").read_text()
    assert one == two and one.index(">netfolio<") < one.index(">python<") < one.index(">igraph<")


def test_replace_is_not_needed_to_read_a_cached_analysis(tmp_path):
    # The cached analysis is a complete NetworkAnalysis: dataclass replace works on it.
    root = _study(tmp_path / "study")
    (analysis,) = build_study(root, output=tmp_path / "site").networks
    loaded = analysis_from_json(analysis_to_json(analysis))
    assert replace(loaded, title="Other").title == "Other"


def test_a_rebuilder_reuses_pages_yet_writes_what_a_fresh_build_writes(tmp_path):
    from generator.build import Rebuilder

    root = _study(tmp_path / "study")
    (root / "notes").mkdir()
    (root / "notes" / "a.md").write_text("# First title\n\nx\n")
    stream = io.StringIO()
    rebuilder = Rebuilder(root, output=tmp_path / "preview", progress=Progress(stream))
    rebuilder.build()
    for text in ("# First title\n\ny\n", "# Second title\n\ny\n"):  # body, then the nav title
        (root / "notes" / "a.md").write_text(text)
        rebuilder.build()
        _build(root, tmp_path / "fresh", fresh=True)
        assert _snapshot(tmp_path / "preview") == _snapshot(tmp_path / "fresh")
    page = (tmp_path / "preview" / "networks" / "net" / "index.html").read_text()
    assert "Second title" in page and "First title" not in page
    assert stream.getvalue().count("analyse  net: cached") == 2
