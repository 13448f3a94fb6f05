"""Publish: download files, the data package, the manifest and the atomic, careful site write."""

from __future__ import annotations

import csv
import io
import json
import os
import shutil
import socket
import subprocess
import sys
import time
from pathlib import Path

import pytest
from conftest import analyse, edge_study, load_network

from generator.errors import LockError, OutputError
from generator.publish import MARKER, datapackage_json, network_files, write_site
from generator.publish import lock as lock_module
from generator.publish.lock import LOCK_NAME, hold_study_lock
from generator.publish.site import recover_interrupted_site


@pytest.fixture()
def small(tmp_path):
    root = edge_study(tmp_path / "study", "source,target,w\na,b,2\nb,c,0.5\nc,a,1\n",
                      nodes="id,name,age,label\na,Ana,31,x\nb,Bo,40,y\nc,Cy,,z\nd,Di,29,w\n",
                      label="name", weight="w", directed=True)
    return analyse(load_network(root))


def rows(data: bytes) -> list[list[str]]:
    return list(csv.reader(io.StringIO(data.decode("utf-8"))))


def test_statistics_csv_writes_counts_as_whole_numbers_and_undefined_as_empty(small) -> None:
    table = dict(rows(network_files(small)["files/net/statistics.csv"])[1:])
    assert table["nodes"] == "4" and table["edges"] == "3" and table["components"] == "2"
    assert float(table["density"]) == pytest.approx(3 / 12)  # m / (n(n-1)), directed (practice)
    assert table["diameter"] != ""


def test_node_attribute_named_like_a_written_column_is_kept_under_another_name(small) -> None:
    header = rows(network_files(small)["files/net/nodes.csv"])[0]
    assert header[:4] == ["id", "label", "age", "label_attribute"]
    assert len(header) == len(set(header))
    fix = [f for f in small.findings if f.column == "label"]
    assert fix and "kept as 'label_attribute'" in fix[0].message and fix[0].line == 1


def test_a_column_called_label_is_the_display_label_when_none_is_set(tmp_path) -> None:
    root = edge_study(tmp_path / "s", "source,target\na,b\n", nodes="id,label\na,Alpha\nb,\n")
    clean = load_network(root)
    assert list(clean.nodes["label"]) == ["Alpha", "b"]  # an empty label shows the id
    assert "label_attribute" not in clean.nodes.columns


def test_graphml_holds_attributes_and_measures_and_leaves_missing_values_out(small) -> None:
    import networkx as nx

    graph = nx.read_graphml(io.BytesIO(network_files(small)["files/net/network.graphml"]))
    assert graph.is_directed() and graph.number_of_nodes() == 4 and graph.number_of_edges() == 3
    assert graph.nodes["a"]["label"] == "Ana" and graph.nodes["a"]["age"] == 31
    assert "age" not in graph.nodes["c"]
    assert graph.nodes["a"]["pagerank"] == pytest.approx(small.measures.loc["a", "pagerank"])
    assert graph.edges["b", "c"]["weight"] == 0.5


def test_datapackage_describes_every_column_of_every_csv(small) -> None:
    package = json.loads(datapackage_json([small], title="T"))
    assert package["profile"] == "tabular-data-package"
    files = network_files(small)
    for resource in package["resources"]:
        header = rows(files["files/" + resource["path"]])[0]
        assert [f["name"] for f in resource["schema"]["fields"]] == header
    nodes = package["resources"][0]["schema"]["fields"]
    types = {f["name"]: f["type"] for f in nodes}
    assert types["id"] == "string" and types["age"] == "integer" and types["degree"] == "integer"
    assert types["betweenness"] == "number"
    assert all(f["description"] for f in nodes if f["name"] != "label_attribute")


def test_site_write_adds_marker_and_manifest_and_replaces_the_old_site(tmp_path) -> None:
    out = tmp_path / "site"
    write_site(out, {"a.html": b"one", "sub/b.txt": b"two"}, inputs=[])
    assert (out / MARKER).is_file()
    write_site(out, {"c.html": b"three"}, inputs=[])
    assert sorted(p.name for p in out.iterdir()) == sorted([MARKER, "c.html", "manifest.json"])
    manifest = json.loads((out / "manifest.json").read_text())
    assert [e["path"] for e in manifest["files"]] == [MARKER, "c.html"]
    assert not list(tmp_path.glob(".site.*"))  # no staging or previous folder left behind


def test_site_write_refuses_a_folder_it_did_not_make_and_one_holding_inputs(tmp_path) -> None:
    foreign = tmp_path / "mine"
    foreign.mkdir()
    (foreign / "notes.txt").write_text("keep")
    with pytest.raises(OutputError, match="was not made by netfolio"):
        write_site(foreign, {"a.html": b"x"}, inputs=[])
    assert (foreign / "notes.txt").read_text() == "keep"
    data = tmp_path / "out" / "edges.csv"
    data.parent.mkdir()
    data.write_text("source,target\n")
    with pytest.raises(OutputError, match="holds the input file"):
        write_site(tmp_path / "out", {"a.html": b"x"}, inputs=[data])


def test_site_write_refuses_paths_that_escape_the_site(tmp_path) -> None:
    with pytest.raises(OutputError, match="outside the site folder"):
        write_site(tmp_path / "site", {"../evil.html": b"x"}, inputs=[])
    assert not (tmp_path / "evil.html").exists() and not (tmp_path / "site").exists()


# ---------------------------------------------------------------------------------------------
# What killed or overlapping builds leave beside the site


def old_site(tmp_path: Path) -> Path:
    out = tmp_path / "site"
    write_site(out, {"index.html": b"old site", "files/a.csv": b"a\n1\n"}, inputs=[])
    return out


def tree(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def test_staging_folders_of_killed_builds_are_removed_and_nothing_else(tmp_path) -> None:
    out = old_site(tmp_path)
    for name in (".site.building-k2x9_q1a", ".site.building-0a1b2c3d"):
        (tmp_path / name / "networks").mkdir(parents=True)
        (tmp_path / name / "networks" / "index.html").write_bytes(b"half written")
    keep = {".site.building-notes.txt": "file", ".site.buildings": "dir",
            ".other.building-k2x9_q1a": "dir", "site.building-k2x9_q1a": "dir",
            ".site.building-my notes": "dir", ".site.building-": "dir"}
    for name, kind in keep.items():
        if kind == "file":
            (tmp_path / name).write_text("keep")
        else:
            (tmp_path / name).mkdir()
            (tmp_path / name / "keep.txt").write_text("keep")
    target = tmp_path / "elsewhere"
    target.mkdir()
    (target / "keep.txt").write_text("keep")
    (tmp_path / ".site.building-linked01").symlink_to(target, target_is_directory=True)
    write_site(out, {"index.html": b"new"}, inputs=[])
    left = sorted(p.name for p in tmp_path.iterdir())
    assert left == sorted([*keep, "elsewhere", "site", ".site.building-linked01"])
    assert (target / "keep.txt").read_text() == "keep"
    assert (out / "index.html").read_bytes() == b"new"


def test_a_missing_site_is_restored_from_the_previous_copy_a_killed_swap_left(tmp_path) -> None:
    out = old_site(tmp_path)
    before = tree(out)
    out.rename(tmp_path / ".site.previous")  # killed between the two renames
    recover_interrupted_site(out)
    assert tree(out) == before and not (tmp_path / ".site.previous").exists()


def test_a_previous_copy_beside_a_whole_site_is_removed(tmp_path) -> None:
    out = old_site(tmp_path)
    before = tree(out)
    shutil.copytree(out, tmp_path / ".site.previous")
    recover_interrupted_site(out)
    assert tree(out) == before and not (tmp_path / ".site.previous").exists()


def test_a_previous_folder_netfolio_did_not_make_is_never_moved_or_removed(tmp_path) -> None:
    mine = tmp_path / ".site.previous"
    mine.mkdir()
    (mine / "draft.txt").write_text("mine")
    recover_interrupted_site(tmp_path / "site")
    assert not (tmp_path / "site").exists() and (mine / "draft.txt").read_text() == "mine"
    write_site(tmp_path / "site", {"index.html": b"x"}, inputs=[])
    with pytest.raises(OutputError, match=r"\.site\.previous .*not made by netfolio"):
        write_site(tmp_path / "site", {"index.html": b"y"}, inputs=[])
    assert (mine / "draft.txt").read_text() == "mine"
    assert (tmp_path / "site" / "index.html").read_bytes() == b"x"
    assert not list(tmp_path.glob(".site.building-*"))


def test_a_previous_copy_that_another_build_removes_first_is_not_an_error(tmp_path,
                                                                          monkeypatch) -> None:
    out = old_site(tmp_path)
    shutil.copytree(out, tmp_path / ".site.previous")
    real_rmtree = shutil.rmtree

    def removed_by_someone_else_first(path, *args, **kwargs):
        real_rmtree(path, ignore_errors=True)  # the other build wins the race to remove it
        return real_rmtree(path, *args, **kwargs)

    monkeypatch.setattr(shutil, "rmtree", removed_by_someone_else_first)
    write_site(out, {"index.html": b"new"}, inputs=[])
    assert (out / "index.html").read_bytes() == b"new"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


def test_a_failed_rename_of_the_new_site_puts_the_last_site_back(tmp_path, monkeypatch) -> None:
    out = old_site(tmp_path)
    before = tree(out)
    real_rename = Path.rename

    def refuse_to_move_staging_in(self, target):
        if self.name.startswith(".site.building-"):
            raise PermissionError(13, "Permission denied", str(self))
        return real_rename(self, target)

    monkeypatch.setattr(Path, "rename", refuse_to_move_staging_in)
    with pytest.raises(OutputError, match="could not move the new site into place"):
        write_site(out, {"index.html": b"new"}, inputs=[])
    assert tree(out) == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


# ---------------------------------------------------------------------------------------------
# The study lock


def test_the_lock_names_its_owner_and_is_removed_when_released(tmp_path) -> None:
    with hold_study_lock(tmp_path) as owner:
        held = json.loads((tmp_path / LOCK_NAME).read_text())
        assert held["pid"] == os.getpid() == owner.pid
        assert held["host"] == socket.gethostname() == owner.host
        assert held["since"].endswith("Z")
    assert not (tmp_path / LOCK_NAME).exists()


def test_the_lock_is_released_when_the_work_inside_it_fails(tmp_path) -> None:
    with pytest.raises(RuntimeError), hold_study_lock(tmp_path):
        raise RuntimeError("stage failed")
    assert not (tmp_path / LOCK_NAME).exists()


def test_a_second_holder_waits_then_gets_an_exit_1_error_naming_the_first(tmp_path,
                                                                         monkeypatch) -> None:
    monkeypatch.setattr(lock_module, "WAIT_SECONDS", 0.3)
    waited_for = []
    with hold_study_lock(tmp_path) as first:
        with pytest.raises(LockError) as caught:
            with hold_study_lock(tmp_path, on_wait=waited_for.append):
                pass
    assert caught.value.exit_code == 1 and caught.value.pid == first.pid
    assert waited_for == [first]
    message = caught.value.format_message()
    assert f"process {first.pid}" in message and first.host in message and "waited 0.3 s" in message


def test_a_lock_released_while_waiting_is_taken(tmp_path, monkeypatch) -> None:
    monkeypatch.setattr(lock_module, "WAIT_SECONDS", 5.0)
    path = tmp_path / LOCK_NAME
    path.write_text(json.dumps({"pid": os.getpid(), "host": socket.gethostname(),
                                "since": "2024-03-01T09:30:00Z"}))
    released = []

    def release_soon(owner) -> None:
        os.unlink(path)  # the first build finishes while the second waits
        released.append(owner.pid)

    with hold_study_lock(tmp_path, on_wait=release_soon) as owner:
        assert json.loads(path.read_text())["pid"] == owner.pid
    assert released == [os.getpid()] and not path.exists()


def test_a_lock_replaced_by_someone_else_is_not_removed_on_release(tmp_path) -> None:
    path = tmp_path / LOCK_NAME
    with hold_study_lock(tmp_path):
        path.unlink()  # removed by hand, and another build took the study
        path.write_text(json.dumps({"pid": 1, "host": "records-server-2", "since": ""}))
    assert json.loads(path.read_text())["host"] == "records-server-2"


def test_a_stale_lock_from_a_dead_process_on_this_host_is_taken_over(tmp_path) -> None:
    child = subprocess.Popen([sys.executable, "-c", "pass"])
    child.wait()  # reaped: its id now names no process
    path = tmp_path / LOCK_NAME
    path.write_text(json.dumps({"pid": child.pid, "host": socket.gethostname(),
                                "since": "2024-03-01T09:30:00Z"}))
    with hold_study_lock(tmp_path) as owner:
        assert json.loads(path.read_text())["pid"] == owner.pid == os.getpid()
    assert sorted(p.name for p in tmp_path.iterdir()) == []


def test_a_lock_with_no_readable_owner_is_taken_over_only_once_it_is_old(tmp_path,
                                                                      monkeypatch) -> None:
    monkeypatch.setattr(lock_module, "WAIT_SECONDS", 0.2)
    path = tmp_path / LOCK_NAME
    path.write_bytes(b"")  # the owner was stopped right after creating it
    with pytest.raises(LockError, match="names no owner"):
        with hold_study_lock(tmp_path):
            pass
    old = time.time() - lock_module.UNREADABLE_GRACE_SECONDS - 5
    os.utime(path, (old, old))
    with hold_study_lock(tmp_path) as owner:
        assert json.loads(path.read_text())["pid"] == owner.pid


def test_a_lock_path_that_is_not_a_plain_file_is_refused_untouched(tmp_path) -> None:
    (tmp_path / LOCK_NAME).mkdir()
    (tmp_path / LOCK_NAME / "keep.txt").write_text("keep")
    with pytest.raises(LockError, match="not a lock file"):
        with hold_study_lock(tmp_path):
            pass
    assert (tmp_path / LOCK_NAME / "keep.txt").read_text() == "keep"


GRAPHML_CASES = {
    # name: (edges, nodes, network settings)
    "directed, weighted, missing values": (
        "source,target,w\na,b,2\nb,c,0.5\nc,a,1\nd,a,3\n",
        "id,name,age,label\na,Ana,31,x\nb,Bo,40,y\nc,Cy,,z\nd,Di,29,w\ne,Ed,,\n",
        dict(label="name", weight="w", directed=True)),
    "undirected, listed from either end": (
        "source,target\nz,a\nb,a\nm,z\na,m\nq,b\n", None, {}),
    "markup, quotes, spaces and unicode in ids and values": (
        'source,target\n"a&b","<c>"\n"d ""q""",a&b\nÅsa,"<c>"\n',
        'id,team,note\na&b,"x < y",\n<c>,"tab\there",ok\n"d ""q""",Öst,"a ""b"""\nÅsa,,\n',
        dict(categorical=["team"])),
}


@pytest.mark.parametrize("case", sorted(GRAPHML_CASES))
def test_graphml_matches_networkx(tmp_path, case) -> None:
    # Reference: networkx's own GraphML writer (``generate_graphml``) on the same graph, which
    # the column-by-column writer must reproduce byte for byte.
    from generator.publish.downloads import graphml, networkx_graphml

    edges, nodes, settings = GRAPHML_CASES[case]
    analysis = analyse(load_network(edge_study(tmp_path / "s", edges, nodes=nodes, **settings)))
    assert _as_networkx_writes(graphml(analysis)) == networkx_graphml(analysis)


def _as_networkx_writes(data: bytes) -> bytes:
    """Ours is UTF-8, so names stay readable and searchable; networkx writes characters beyond
    ASCII as character references (&#197;), the same document to any XML reader."""
    return data.decode("utf-8").encode("ascii", "xmlcharrefreplace")


def test_graphml_keeps_names_beyond_ascii_readable(tmp_path) -> None:
    import networkx as nx

    from generator.publish.downloads import graphml

    root = edge_study(tmp_path / "s", "source,target\nÅsa,Öst\n")
    data = graphml(analyse(load_network(root)))
    assert "Åsa".encode() in data
    assert set(nx.read_graphml(io.BytesIO(data))) == {"Åsa", "Öst"}


def test_graphml_of_the_example_study_matches_networkx(tmp_path) -> None:
    from generator.analyse import analyse_network
    from generator.config import load_study
    from generator.ingest import read_network
    from generator.publish.downloads import graphml, networkx_graphml

    study = load_study(Path(__file__).parents[1] / "example_project")
    for net in study.networks:
        if net.projected_from is not None:
            continue
        analysis = analyse_network(read_network(study, net), communities=study.communities,
                                   measures=study.measures, seed=study.seed)
        assert _as_networkx_writes(graphml(analysis)) == networkx_graphml(analysis), net.id


# ---------------------------------------------------------------------------------------------
# Zip entries: relative paths only, so unzipping writes nowhere but the chosen folder


@pytest.mark.parametrize("member", ["../x.csv", "files/../../x.csv", "/etc/x.csv", "a\\..\\x.csv",
                                    "C:\\x.csv", "./x.csv", "a//x.csv", "a/", "", "a/./x.csv"])
def test_a_zip_entry_that_is_not_a_plain_relative_path_is_refused(tmp_path, member) -> None:
    from generator.pack.bundle import write_zip
    from generator.publish.archive import safe_member, zip_bytes

    assert not safe_member(member)
    with pytest.raises(ValueError, match="not a plain relative path"):
        zip_bytes({"ok.csv": b"a\n", member: b"b\n"}, date_time=(1980, 1, 1, 0, 0, 0))
    with pytest.raises(ValueError, match="not a plain relative path"):
        write_zip(tmp_path / "b.zip", {member: b"b\n"}, date_time=(1980, 1, 1, 0, 0, 0))
    assert not (tmp_path / "b.zip").exists()


def test_plain_relative_zip_entries_are_kept_as_they_are() -> None:
    import zipfile

    from generator.publish.archive import safe_member, zip_bytes

    names = ["datapackage.json", "net/nodes.csv", "net/é-unité.csv"]
    assert all(safe_member(name) for name in names)
    data = zip_bytes(dict.fromkeys(names, b"x"), date_time=(1980, 1, 1, 0, 0, 0))
    with zipfile.ZipFile(io.BytesIO(data)) as archive:
        assert archive.namelist() == sorted(names)
