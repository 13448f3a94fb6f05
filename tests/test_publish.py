"""Publish: download files, the data package, the manifest and the atomic, careful site write."""

from __future__ import annotations

import csv
import io
import json

import pytest

from conftest import analyse, edge_study, load_network
from generator.errors import OutputError
from generator.publish import MARKER, datapackage_json, network_files, write_site


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
