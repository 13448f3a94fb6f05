"""Two-mode networks: reading edge lists and incidence matrices keyed by (mode, id), degree
share and density, the projections onto each mode, their pages and files, and bad input.

The reference data set is Davis, Gardner & Gardner's southern women (Davis, Gardner & Gardner
1941, "Deep South"), as networkx ships it (davis_southern_women_graph): 18 women, 14 events,
89 attendances. Projections are checked against networkx.algorithms.bipartite."""

from __future__ import annotations

import csv
import io
import json
import zipfile
from pathlib import Path

import networkx as nx
import pytest
from conftest import csv_text, write_study
from networkx.algorithms import bipartite

from generator.analyse.two_mode import analyse_two_mode, project, projected_ties
from generator.cli import main
from generator.config import load_study
from generator.ingest.two_mode import read_two_mode

DAVIS = nx.davis_southern_women_graph()
WOMEN = sorted(DAVIS.graph["top"])
EVENTS = sorted(DAVIS.graph["bottom"])


def _davis_rows() -> list[tuple[str, str]]:
    women = set(WOMEN)
    return sorted((a, b) if a in women else (b, a) for a, b in DAVIS.edges())


def davis_study(root: Path, **network: object) -> Path:
    settings = {"id": "davis", "edges": "data/attendance.csv", "source": "woman",
                "target": "event", "two_mode": True, "modes": ["woman", "event"], **network}
    return write_study(root, networks=[settings],
                       files={"data/attendance.csv": csv_text(["woman", "event"], _davis_rows())})


def _two_mode(root: Path):
    study = load_study(root)
    return study, read_two_mode(study, study.two_mode[0])


def test_davis_density_and_degree_shares(tmp_path: Path) -> None:
    study, network = _two_mode(davis_study(tmp_path))
    result = analyse_two_mode(network, seed=1)
    # Davis, Gardner & Gardner 1941: 18 women, 14 events, 89 attendances.
    assert result.statistic("nodes:woman") == 18
    assert result.statistic("nodes:event") == 14
    assert result.statistic("edges") == 89
    # Two-mode density m / (n1 n2) (Borgatti & Everett 1997), and networkx's bipartite density.
    assert result.statistic("density") == pytest.approx(89 / (18 * 14))
    assert result.statistic("density") == pytest.approx(bipartite.density(DAVIS, WOMEN))
    # Degree share: degree over the size of the other mode (Borgatti & Everett 1997), which is
    # networkx's bipartite degree centrality.
    expected = bipartite.degree_centrality(DAVIS, WOMEN)
    for mode, node, degree, shared in zip(result.nodes["mode"], result.nodes["id"],
                                          result.nodes["degree"], result.nodes["degree_share"]):
        assert degree == DAVIS.degree(node)
        assert float(shared) == pytest.approx(expected[node])
        assert float(shared) == pytest.approx(degree / (14 if mode == "woman" else 18))
    # Evelyn Jefferson attended 8 of the 14 events (Davis, Gardner & Gardner 1941).
    evelyn = result.nodes[result.nodes["id"] == "Evelyn Jefferson"].iloc[0]
    assert (evelyn["degree"], float(evelyn["degree_share"])) == (8, pytest.approx(8 / 14))


@pytest.mark.parametrize("weighting", ["shared", "newman"])
@pytest.mark.parametrize("mode", ["woman", "event"])
def test_davis_projections_match_networkx(tmp_path: Path, weighting: str, mode: str) -> None:
    _, network = _two_mode(davis_study(tmp_path, projection=weighting))
    ours = projected_ties(network, mode, weighting)
    nodes = WOMEN if mode == "woman" else EVENTS
    reference = (bipartite.weighted_projected_graph(DAVIS, nodes) if weighting == "shared"
                 else bipartite.collaboration_weighted_projected_graph(DAVIS, nodes))
    assert len(ours) == reference.number_of_edges()
    for (a, b), weight in ours.items():
        assert weight == pytest.approx(reference[a][b]["weight"])


def test_projection_is_a_one_mode_network_with_strength_weights(tmp_path: Path) -> None:
    study, network = _two_mode(davis_study(tmp_path))
    assert [n.id for n in study.networks] == ["davis-woman", "davis-event"]
    clean = project(network, study.networks[0])
    assert clean.weighted and clean.config.weight_means == "strength"
    assert list(clean.nodes.index) == sorted(WOMEN, key=lambda s: s)  # natural order = text here
    # Evelyn Jefferson and Theresa Anderson attended 7 events together (networkx's projection).
    row = clean.edges[(clean.edges["source"] == "Evelyn Jefferson")
                      & (clean.edges["target"] == "Theresa Anderson")]
    assert row["weight"].tolist() == [7.0]


def test_same_text_names_a_node_of_each_mode_without_clashing(tmp_path: Path) -> None:
    # Worked example by hand: "x" is a person and an event; person x attends events x and y.
    root = write_study(tmp_path, networks=[{
        "id": "m", "edges": "data/e.csv", "two_mode": True, "modes": ["person", "event"]}],
        files={"data/e.csv": csv_text(["source", "target"],
                                      [("x", "x"), ("x", "y"), ("z", "x")])})
    _, network = _two_mode(root)
    assert list(zip(network.nodes["mode"], network.nodes["id"])) == [
        ("person", "x"), ("person", "z"), ("event", "x"), ("event", "y")]
    result = analyse_two_mode(network, seed=1)
    assert result.statistic("edges") == 3  # no tie read as a self-loop
    assert result.statistic("density") == pytest.approx(3 / 4)
    assert projected_ties(network, "person", "shared") == {("x", "z"): 1.0}
    assert projected_ties(network, "event", "shared") == {("x", "y"): 1.0}
    # Newman: event x has two people, so 1/(2-1); y has one person and adds nothing.
    assert projected_ties(network, "person", "newman") == {("x", "z"): 1.0}


def test_incidence_matrix_equals_the_edge_list(tmp_path: Path) -> None:
    _, from_edges = _two_mode(davis_study(tmp_path / "edges"))
    rows = [[w] + ["1" if DAVIS.has_edge(w, e) else "0" for e in EVENTS] for w in WOMEN]
    root = write_study(tmp_path / "matrix", networks=[{
        "id": "davis", "matrix": "data/m.csv", "two_mode": True, "modes": ["woman", "event"]}],
        files={"data/m.csv": csv_text([""] + EVENTS, rows)})
    _, from_matrix = _two_mode(root)
    assert from_matrix.edges.equals(from_edges.edges)
    assert from_matrix.nodes.equals(from_edges.nodes)
    assert not from_matrix.weighted


def test_weighted_incidence_matrix_keeps_weights(tmp_path: Path) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "w", "matrix": "data/m.csv", "two_mode": True, "modes": ["person", "event"]}],
        files={"data/m.csv": "id,e1,e2\na,2,0\nb,1,3\n"})
    _, network = _two_mode(root)
    assert network.weighted
    assert network.edges.to_dict("list") == {"first": ["a", "b", "b"], "second": ["e1", "e1", "e2"],
                                             "weight": [2.0, 1.0, 3.0]}


def _cli_error(root: Path, capsys: pytest.CaptureFixture) -> str:
    assert main(["build", str(root), "--out", str(root / "site")]) == 1
    err: str = capsys.readouterr().err
    assert "Traceback" not in err
    assert not (root / "site").exists()
    return err


def test_incidence_matrix_with_a_non_numeric_cell_exits_1(tmp_path: Path, capsys) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "w", "matrix": "data/m.csv", "two_mode": True, "modes": ["person", "event"]}],
        files={"data/m.csv": "id,e1,e2\na,1,0\nb,yes,1\n"})
    err = _cli_error(root, capsys)
    for piece in ("data/m.csv", "line 3", "'e1'", "yes", "must be a number"):
        assert piece in err


def test_node_of_one_mode_in_the_other_side_column_exits_1(tmp_path: Path, capsys) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "t", "edges": "data/e.csv", "nodes": "data/n.csv", "two_mode": True,
        "modes": ["person", "event"]}],
        files={"data/e.csv": "source,target\na,e1\ne1,e2\n",
               "data/n.csv": "id,mode\na,person\ne1,event\ne2,event\n"})
    err = _cli_error(root, capsys)
    for piece in ("data/e.csv", "line 3", "'source'", "'e1'", "listed as an event", "data/n.csv"):
        assert piece in err


def test_incidence_matrix_column_of_the_wrong_mode_exits_1(tmp_path: Path, capsys) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "t", "matrix": "data/m.csv", "nodes": "data/n.csv", "two_mode": True,
        "modes": ["person", "event"]}],
        files={"data/m.csv": "id,e1,b\na,1,1\n",
               "data/n.csv": "id,mode\na,person\nb,person\ne1,event\n"})
    err = _cli_error(root, capsys)
    for piece in ("data/m.csv", "line 1", "'b'", "listed as a person", "data/n.csv (line 3)"):
        assert piece in err


def test_unknown_mode_in_the_node_list_exits_1(tmp_path: Path, capsys) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "t", "edges": "data/e.csv", "nodes": "data/n.csv", "two_mode": True,
        "modes": ["person", "event"]}],
        files={"data/e.csv": "source,target\na,e1\n", "data/n.csv": "id,mode\na,persn\n"})
    err = _cli_error(root, capsys)
    for piece in ("data/n.csv", "line 2", "'mode'", "persn"):
        assert piece in err


def test_two_mode_settings_are_checked(tmp_path: Path, capsys) -> None:
    root = davis_study(tmp_path, projection="jaccard")
    err = _cli_error(root, capsys)
    assert "network[1].projection" in err and "shared, newman" in err
    root = davis_study(tmp_path / "b", modes=["woman", "woman"])
    assert "network[1].modes" in _cli_error(root, capsys)


def test_a_projection_with_no_ties_builds_with_a_warning(tmp_path: Path, capsys) -> None:
    # Each person attends a different event: no two people share one, no two events share a
    # person; both projections have nodes but no ties.
    root = write_study(tmp_path, networks=[{
        "id": "lone", "edges": "data/e.csv", "two_mode": True, "modes": ["person", "event"]}],
        files={"data/e.csv": "source,target\na,e1\nb,e2\n"})
    assert main(["build", str(root), "--out", str(tmp_path / "site")]) == 0
    err = capsys.readouterr().err
    assert "the projection lone-person has no ties" in err
    page = (tmp_path / "site" / "networks" / "lone" / "index.html").read_text(encoding="utf-8")
    assert "No two person nodes share a event" in page
    assert (tmp_path / "site" / "networks" / "lone-person" / "index.html").is_file()


def test_a_mode_with_no_nodes_is_a_clear_error_not_a_crash(tmp_path: Path, capsys) -> None:
    # An incidence matrix of rows only: people, but no event at all.
    root = write_study(tmp_path, networks=[{
        "id": "half", "matrix": "data/m.csv", "two_mode": True, "modes": ["person", "event"]}],
        files={"data/m.csv": "id\na\nb\n"})
    err = _cli_error(root, capsys)
    assert "data/m.csv, line 1: names no event node" in err
    assert "projection onto event would be empty" in err


def _csv_rows(path: Path) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(path.read_text(encoding="utf-8"))))


def test_build_writes_the_two_mode_page_files_and_projection_pages(tmp_path: Path) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "tr", "title": "Training", "edges": "data/e.csv", "nodes": "data/n.csv",
        "two_mode": True, "modes": ["staff", "session"], "projection": "newman"}],
        files={"data/e.csv": "source,target\np1,s1\np2,s1\np3,s1\np1,s2\np2,s2\n",
               "data/n.csv": "id,mode,topic\np1,staff,\np2,staff,\np3,staff,\n"
                             "s1,session,triage\ns2,session,records\n"})
    assert main(["build", str(root), "--out", str(tmp_path / "site")]) == 0
    site = tmp_path / "site"
    nodes = _csv_rows(site / "files" / "tr" / "nodes.csv")
    assert [(r["id"], r["mode"], r["degree"], r["degree_share"]) for r in nodes] == [
        ("p1", "staff", "2", "1.0"), ("p2", "staff", "2", "1.0"), ("p3", "staff", "1", "0.5"),
        ("s1", "session", "3", "1.0"), ("s2", "session", "2", "0.6666666666666666")]
    stats = {r["statistic"]: r["value"] for r in _csv_rows(site / "files" / "tr" / "statistics.csv")}
    assert stats == {"nodes:staff": "3", "nodes:session": "2", "edges": "5",
                     "density": str(5 / 6)}
    # Newman weights by hand: p1-p2 share s1 (k = 3: 1/2) and s2 (k = 2: 1), so 1.5.
    edges = _csv_rows(site / "files" / "tr-staff" / "edges.csv")
    assert {(r["source"], r["target"]): float(r["weight"]) for r in edges} == {
        ("p1", "p2"): 1.5, ("p1", "p3"): 0.5, ("p2", "p3"): 0.5}
    assert {r["id"]: r["topic"] for r in _csv_rows(site / "files" / "tr-session" / "nodes.csv")} \
        == {"s1": "triage", "s2": "records"}
    page = (site / "networks" / "tr" / "index.html").read_text(encoding="utf-8")
    assert "two-mode-map.svg" in page and "rounded square" in page
    assert "../tr-staff/index.html" in page and "../tr-session/index.html" in page
    assert (site / "networks" / "tr-staff" / "index.html").is_file()
    assert (site / "networks" / "tr" / "figures" / "two-mode-map.png").is_file()
    methods = (site / "methods.html").read_text(encoding="utf-8")
    assert 'id="tr-two-mode"' in methods and "Borgatti" in methods and "1/(k - 1)" in methods
    assert "projection of the two-mode network &#39;tr&#39; onto its staff nodes" in methods
    downloads = (site / "downloads.html").read_text(encoding="utf-8")
    assert "files/tr/nodes.csv" in downloads
    package = json.loads((site / "files" / "datapackage.json").read_text(encoding="utf-8"))
    fields = {r["name"]: [f["name"] for f in r["schema"]["fields"]] for r in package["resources"]}
    assert fields["tr-nodes"] == ["id", "mode", "label", "topic", "degree", "degree_share"]
    assert "tr-staff-nodes" in fields


def test_a_partner_bundle_carries_the_projections_but_not_the_unprotected_two_mode_files(
        tmp_path: Path, capsys) -> None:
    root = write_study(tmp_path, networks=[{
        "id": "tr", "edges": "data/e.csv", "two_mode": True, "modes": ["staff", "session"]}],
        files={"data/e.csv": "source,target\np1,s1\np2,s1\np3,s1\np1,s2\np2,s2\n"})
    bundle = tmp_path / "bundle.zip"
    assert main(["pack", str(root), "--out", str(bundle)]) == 0
    assert "left out of partner copies" in capsys.readouterr().err
    names = zipfile.ZipFile(bundle).namelist()
    assert any("files/tr-staff/nodes.csv" in n for n in names)
    assert not any("files/tr/" in n or "networks/tr/" in n for n in names)


def test_checks_page_lists_the_two_mode_files_checks_once_before_its_projections(
        tmp_path: Path) -> None:
    # p4 attends nothing (a node with no ties in the two-mode network); p3 shares no session
    # with another staff node, so p3 and p4 have no ties in the staff projection.
    root = write_study(tmp_path, networks=[{
        "id": "tr", "title": "Training", "edges": "data/e.csv", "nodes": "data/n.csv",
        "two_mode": True, "modes": ["staff", "session"]}],
        files={"data/e.csv": "source,target\np1,s1\np2,s1\np1,s1\np3,s2\n",
               "data/n.csv": "id,mode\np1,staff\np2,staff\np3,staff\np4,staff\n"
                             "s1,session\ns2,session\n"})
    assert main(["build", str(root), "--out", str(tmp_path / "site")]) == 0
    html = (tmp_path / "site" / "checks.html").read_text(encoding="utf-8")
    order = [html.index(f'<h2 id="network-{i}"') for i in ("tr", "tr-staff", "tr-session")]
    assert order == sorted(order)
    own, staff, session = (html[order[0]:order[1]], html[order[1]:order[2]], html[order[2]:])
    assert "1 repeated tie merged" in own and "1 node with no ties" in own
    for projection in (staff, session):
        assert "repeated tie" not in projection and "with no ties, kept" not in projection
        assert "Made from the two-mode network Training" in projection
    assert "2 of the 4 staff nodes share no session with another staff node" in staff
    assert "2 of the 2 session nodes share no staff with another session node" in session
