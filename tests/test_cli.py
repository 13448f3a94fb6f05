"""The command line: exit codes, messages for bad input, and the last good site left untouched."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from generator.cli import main

STUDY = """
[study]
title = "Small study"
seed = 3

[[network]]
id = "ties"
edges = "data/edges.csv"
nodes = "data/nodes.csv"
label = "name"
weight = "w"

[significance]
null_samples = 5
"""

NODES = "id,name,team\na,Ana Sol,red\nb,Ben Ory,red\nc,Cai Lum,blue\nd,Dee Fen,blue\n"
EDGES = "source,target,w\na,b,2\nb,c,1\nc,d,3\na,c,1\n"


def make_study(root: Path, *, edges: str = EDGES, nodes: str = NODES, toml: str = STUDY) -> Path:
    (root / "data").mkdir(parents=True, exist_ok=True)
    (root / "study.toml").write_text(toml, encoding="utf-8")
    (root / "data" / "nodes.csv").write_text(nodes, encoding="utf-8")
    (root / "data" / "edges.csv").write_text(edges, encoding="utf-8")
    return root


def snapshot(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in folder.rglob("*") if p.is_file()}


@pytest.fixture()
def built(tmp_path: Path) -> Path:
    study = make_study(tmp_path / "study")
    assert main(["build", str(study), "--quiet"]) == 0
    return study


BAD_EDGES = [
    # (edge file, expected pieces of the message: file, line, value)
    ("source,target,w\na,b,2\nb,c,x\n", ["data/edges.csv", "line 3", "'x'", "not a number"]),
    ("source,target,w\na,b,2\nb,c,\n", ["data/edges.csv", "line 3", "missing"]),
    ("source,target,w\na,b,-1\n", ["data/edges.csv", "line 2", "'-1'", "negative"]),
    ("source,target,w\na,b,inf\n", ["data/edges.csv", "line 2", "'inf'", "infinite"]),
    ("source,target,w\na,b,2\nc,d,0\n", ["data/edges.csv", "line 3", "'0'", "weight is 0"]),
    ("source,target,weight\na,b,2\n",
     ["data/edges.csv", "line 1", "'w'", "'source', 'target', 'weight'"]),
    ("", ["data/edges.csv", "empty"]),
    ("source,target,w\n", ["data/edges.csv", "no data rows"]),
]


@pytest.mark.parametrize(("edges", "pieces"), BAD_EDGES)
def test_bad_edge_file_exits_1_with_file_line_value_and_leaves_site_untouched(
        built: Path, edges: str, pieces: list[str], capsys: pytest.CaptureFixture) -> None:
    before = snapshot(built / "output")
    (built / "data" / "edges.csv").write_text(edges, encoding="utf-8")
    assert main(["build", str(built)]) == 1
    err = capsys.readouterr().err
    assert "Traceback" not in err
    for piece in pieces:
        assert piece in err
    assert snapshot(built / "output") == before


def test_duplicate_node_id_is_an_error_naming_both_lines(built: Path,
                                                         capsys: pytest.CaptureFixture) -> None:
    before = snapshot(built / "output")
    (built / "data" / "nodes.csv").write_text(NODES + "b,Bo Twin,red\n", encoding="utf-8")
    assert main(["build", str(built)]) == 1
    err = capsys.readouterr().err
    assert ("data/nodes.csv, line 6, column 'id': node id is repeated (first on line 3) "
            "(value: 'b')") in err
    assert snapshot(built / "output") == before


def test_file_in_another_encoding_gets_a_clear_error(built: Path, capsys: pytest.CaptureFixture) -> None:
    (built / "data" / "nodes.csv").write_bytes("id,name,team\na,Zoé,red\n".encode("latin-1"))
    assert main(["build", str(built)]) == 1
    err = capsys.readouterr().err
    assert "data/nodes.csv, line 2" in err and "not UTF-8" in err and "Traceback" not in err


def test_config_error_names_the_dotted_key(built: Path, capsys: pytest.CaptureFixture) -> None:
    (built / "study.toml").write_text(STUDY.replace('weight = "w"',
                                                    'weight = "w"\nwieght_means = "strength"'))
    assert main(["build", str(built)]) == 1
    err = capsys.readouterr().err
    assert "network[1].wieght_means" in err and "did you mean 'weight_means'" in err


def test_output_folder_not_made_by_netfolio_is_never_overwritten(tmp_path: Path, capsys) -> None:
    study = make_study(tmp_path / "study")
    mine = study / "output"
    mine.mkdir()
    (mine / "thesis.docx").write_text("precious")
    assert main(["build", str(study)]) == 1
    assert "was not made by netfolio" in capsys.readouterr().err
    assert (mine / "thesis.docx").read_text() == "precious"


def test_negative_null_samples_exit_1_naming_the_key_without_a_traceback(tmp_path: Path,
                                                                         capsys) -> None:
    toml = STUDY.replace("null_samples = 5", "null_samples = -3")
    study = make_study(tmp_path / "study", toml=toml)
    for verb in ("build", "check"):
        assert main([verb, str(study)]) == 1
        err = capsys.readouterr().err
        assert "significance.null_samples" in err and "must be at least 0, got -3" in err
        assert "Traceback" not in err
    assert not (study / "output").exists()


def test_a_build_reports_its_null_samples_as_they_finish(tmp_path: Path, capsys) -> None:
    study = make_study(tmp_path / "study")
    assert main(["build", str(study)]) == 0
    err = capsys.readouterr().err
    assert "significance ties: 5/5 samples" in err
    assert (study / "output" / "files" / "ties" / "significance.csv").is_file()


def test_check_prints_every_finding_without_building(tmp_path: Path, capsys) -> None:
    study = make_study(tmp_path / "study", edges=EDGES + "a,a,1\na,z,1\nb,a,5\n")
    assert main(["check", str(study)]) == 0
    out = capsys.readouterr().out
    assert "self-loop" in out and "line 6" in out
    assert "line 7: node 'z' appears in ties" in out
    assert "repeated ties" in out
    assert not (study / "output").exists()


def test_check_reports_errors_of_every_network(tmp_path: Path, capsys) -> None:
    toml = STUDY + '\n[[network]]\nid = "second"\nedges = "data/second.csv"\n'
    study = make_study(tmp_path / "study", toml=toml, edges="source,target,w\na,b,x\n")
    (study / "data" / "second.csv").write_text("source,target\na,\n")
    assert main(["check", str(study)]) == 1
    err = capsys.readouterr().err
    assert "data/edges.csv, line 2" in err and "data/second.csv, line 2" in err


def test_usage_errors_exit_2_with_a_suggestion(capsys) -> None:
    assert main(["buidl"]) == 2
    assert "did you mean 'build'" in capsys.readouterr().err
    assert main(["build", "--bogus"]) == 2


def test_python_dash_m_generator_runs_and_an_unknown_folder_exits_1(tmp_path: Path) -> None:
    run = subprocess.run([sys.executable, "-m", "generator", "check", str(tmp_path / "nowhere")],
                         capture_output=True, text=True)
    assert run.returncode == 1
    assert "no study.toml" in run.stderr and "Traceback" not in run.stderr


def test_dollar_signs_in_labels_and_titles_are_text_not_mathematics(tmp_path: Path) -> None:
    toml = STUDY.replace('id = "ties"', 'id = "ties"\ntitle = "Spend $5 vs $10 per month"')
    study = make_study(tmp_path / "study", toml=toml, nodes=NODES.replace("Ana Sol", "Pay $_$"))
    assert main(["build", str(study), "--quiet"]) == 0
    svg = (study / "output/networks/ties/figures/degree.svg").read_text("utf-8")
    assert "Spend $5 vs $10 per month" in svg


def test_check_finds_what_build_would_refuse_about_the_output_and_theme(tmp_path: Path, capsys) -> None:
    study = make_study(tmp_path / "study")
    (study / "output").write_text("a file where the site should go")
    assert main(["check", str(study)]) == 1
    assert "is a file, not a folder" in capsys.readouterr().err
    (study / "output").unlink()
    (study / "study.toml").write_text(STUDY + '\n[site]\ntheme = "defualt"\n')
    assert main(["check", str(study)]) == 1
    assert "did you mean 'default'" in capsys.readouterr().err


def test_asymmetric_undirected_matrix_exits_1_naming_the_cell_and_leaves_site_untouched(
        tmp_path: Path, capsys) -> None:
    study = tmp_path / "study"
    (study / "data").mkdir(parents=True)
    (study / "study.toml").write_text('[study]\ntitle = "M"\n\n[[network]]\nid = "m"\n'
                                      'matrix = "data/m.csv"\n')
    (study / "data" / "m.csv").write_text(",a,b,c\na,0,1,0\nb,1,0,1\nc,0,1,0\n")
    assert main(["build", str(study), "--quiet"]) == 0
    before = snapshot(study / "output")
    (study / "data" / "m.csv").write_text(",a,b,c\na,0,1,0\nb,1,0,2\nc,0,1,0\n")
    assert main(["build", str(study)]) == 1
    err = capsys.readouterr().err
    assert "data/m.csv, line 3, column 'c'" in err and "not symmetric" in err and "(value: '2')" in err
    assert "Traceback" not in err
    assert snapshot(study / "output") == before


def test_check_finds_a_template_syntax_error_in_a_user_theme(tmp_path: Path, capsys) -> None:
    study = make_study(tmp_path / "study", toml=STUDY + '\n[site]\ntheme = "mytheme"\n')
    (study / "mytheme" / "templates").mkdir(parents=True)
    (study / "mytheme" / "templates" / "index.html").write_text("{% if %}\n")
    assert main(["check", str(study)]) == 1
    err = capsys.readouterr().err
    assert "[site.theme] template index.html, line 1" in err and "Traceback" not in err


def _deep_list(levels: int) -> str:
    return "\n".join("    " * level + "- item" for level in range(levels)) + "\n"


BAD_NOTES = [
    # (what to put at notes/<name>, expected pieces of the message)
    ("broken.md", "link", ["notes/broken.md", "link to a file that does not exist", "'gone.md'"]),
    ("folder.md", "folder", ["notes/folder.md", "is a folder, not a markdown file"]),
    ("deep.md", _deep_list(250), ["notes/deep.md", "nested too deeply"]),
]


@pytest.mark.parametrize("verb", ["build", "check"])
@pytest.mark.parametrize(("name", "content", "pieces"), BAD_NOTES, ids=["broken-link", "folder", "deep"])
def test_a_bad_note_exits_1_naming_it_and_leaves_the_site_untouched(
        built: Path, verb: str, name: str, content: str, pieces: list[str], capsys) -> None:
    (built / "notes").mkdir()
    (built / "notes" / "fine.md").write_text("# Fine\n\nA note.\n", encoding="utf-8")
    assert main(["build", str(built), "--quiet"]) == 0
    before = snapshot(built / "output")
    capsys.readouterr()
    path = built / "notes" / name
    if content == "link":
        path.symlink_to("gone.md")
    elif content == "folder":
        path.mkdir()
    else:
        path.write_text(content, encoding="utf-8")
    assert main([verb, str(built)]) == 1
    err = capsys.readouterr().err
    assert "Traceback" not in err
    for piece in pieces:
        assert piece in err
    assert snapshot(built / "output") == before


def test_a_list_nested_as_deep_as_markdown_can_render_still_builds(built: Path) -> None:
    (built / "notes").mkdir()
    (built / "notes" / "nested.md").write_text(_deep_list(40), encoding="utf-8")
    assert main(["check", str(built), "--quiet"]) == 0
    assert main(["build", str(built), "--quiet"]) == 0


def test_check_prints_an_external_image_in_a_note_with_its_line(built: Path, capsys) -> None:
    (built / "notes").mkdir()
    (built / "notes" / "pics.md").write_text("# Pictures\n\n![map](https://maps.example.org/m.png)\n",
                                             encoding="utf-8")
    assert main(["check", str(built)]) == 0
    out = capsys.readouterr().out
    assert "notes/pics.md, line 3: external image not loaded" in out
    assert "'https://maps.example.org/m.png'" in out


@pytest.mark.parametrize("change, key", [
    (('edges = "data/edges.csv"', 'edges = ""'), "network[1].edges"),
    (('nodes = "data/nodes.csv"\n', ''), "network[1].label"),
    (('nodes = "data/nodes.csv"', 'nodes = ""'), "network[1].nodes"),
    (('nodes = "data/nodes.csv"', 'nodes = "data"'), "network[1].nodes"),
])
@pytest.mark.parametrize("verb", ["build", "check"])
def test_empty_paths_a_label_without_nodes_and_a_folder_are_clear_errors(
        built: Path, capsys: pytest.CaptureFixture, change, key, verb) -> None:
    site = snapshot(built / "output")
    (built / "study.toml").write_text(STUDY.replace(*change), encoding="utf-8")
    assert main([verb, str(built)]) == 1
    err = capsys.readouterr().err
    assert f"[{key}]" in err and "Traceback" not in err
    assert snapshot(built / "output") == site
