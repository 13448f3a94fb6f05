"""Images in notes: files from the study's notes folder are copied into the site under media/
and shown; an address naming no such file is shown as its alt text with a warning; nothing from
outside the notes folder is ever copied."""

from __future__ import annotations

import os
from pathlib import Path

from conftest import edge_study

from generator.build import build_study
from generator.cli import main

# The bytes of a one-pixel PNG; any bytes would do, as an image is copied as it is.
PIXEL = bytes.fromhex(
    "89504e470d0a1a0a0000000d4948445200000001000000010806000000"
    "1f15c4890000000d49444154789c6360000002000154a24f5d0000000049454e44ae426082")


def _study(root: Path, note: str, *, summary: str | None = None) -> Path:
    study = edge_study(root, "source,target\na,b\n")
    notes = study / "notes"
    (notes / "figures").mkdir(parents=True)
    (notes / "figures" / "chart.png").write_bytes(PIXEL)
    (notes / "report.md").write_text(note, encoding="utf-8")
    if summary is not None:
        (notes / "index.md").write_text(summary, encoding="utf-8")
        toml = (study / "study.toml").read_text("utf-8")
        (study / "study.toml").write_text(toml.replace("[study]\n", '[study]\nsummary = '
                                                       '"notes/index.md"\n', 1), "utf-8")
    return study


def test_a_note_image_is_copied_and_shown_from_the_note_and_the_front_page(tmp_path):
    study = _study(tmp_path / "s", "# Report\n\n![The chart](figures/chart.png)\n",
                   summary="Overview\n\n![Front chart](figures/chart.png)\n")
    site = build_study(study, output=tmp_path / "site").output
    assert (site / "media/figures/chart.png").read_bytes() == PIXEL
    note = (site / "notes/report.html").read_text("utf-8")
    assert '<img alt="The chart" src="../media/figures/chart.png">' in note
    front = (site / "index.html").read_text("utf-8")
    assert '<img alt="Front chart" src="media/figures/chart.png">' in front
    checks = (site / "checks.html").read_text("utf-8")
    assert "image not shown" not in checks


def test_an_image_that_is_not_in_the_notes_folder_is_its_alt_text_with_a_warning(tmp_path,
                                                                                 capsys):
    # Line 3 names a missing file, line 5 a data file outside notes/, line 7 a non-image.
    note = ("# Report\n\n![Missing](figures/none.png)\n\n![Data](../data/edges.csv)\n\n"
            "![Toml](../study.toml)\n")
    study = _study(tmp_path / "s", note)
    assert main(["check", str(study)]) == 0
    out = capsys.readouterr()
    text = out.out + out.err
    for line in (3, 5, 7):
        assert f"notes/report.md, line {line}: image not shown" in text
    site = build_study(study, output=tmp_path / "site").output
    page = (site / "notes/report.html").read_text("utf-8")
    assert '<span class="image-alt">Missing</span>' in page
    assert "<img" not in page.split("<main", 1)[1].split("</main>", 1)[0]
    assert sorted(p.relative_to(site).as_posix() for p in (site / "media").rglob("*")
                  if p.is_file()) == []  # chart.png is not named by this note


def test_a_link_in_the_notes_folder_that_leads_outside_it_is_not_followed(tmp_path):
    study = _study(tmp_path / "s", "![Secret](figures/secret.png)\n")
    outside = tmp_path / "secret.png"
    outside.write_bytes(PIXEL)
    os.symlink(outside, study / "notes" / "figures" / "secret.png")
    site = build_study(study, output=tmp_path / "site").output
    assert not (site / "media/figures/secret.png").exists()
    assert '<span class="image-alt">Secret</span>' in (site / "notes/report.html").read_text()


def test_changing_only_an_image_rebuilds_the_site(tmp_path):
    study = _study(tmp_path / "s", "![The chart](figures/chart.png)\n")
    site = build_study(study, output=tmp_path / "site").output
    (study / "notes" / "figures" / "chart.png").write_bytes(PIXEL + b"\0")
    build_study(study, output=tmp_path / "site")
    assert (site / "media/figures/chart.png").read_bytes() == PIXEL + b"\0"


def test_a_partner_bundle_carries_the_images_and_says_to_look_at_them(tmp_path, capsys):
    import zipfile

    study = _study(tmp_path / "s", "![The chart](figures/chart.png)\n")
    assert main(["pack", str(study), "--out", str(tmp_path / "bundle.zip"), "--quiet"]) == 0
    out = capsys.readouterr()
    assert ("1 image from the notes goes into the bundle as it is; the search for original "
            "values cannot read names shown in a picture") in out.out + out.err
    with zipfile.ZipFile(tmp_path / "bundle.zip") as bundle:
        assert any(name.endswith("media/figures/chart.png") for name in bundle.namelist())
