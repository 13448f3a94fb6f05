"""A page per node: its ego network, ties, measures with rank and percentile, community, and the
same node in the study's other networks."""

from __future__ import annotations

import re
from pathlib import Path

import networkx as nx
import pytest
from conftest import analyse_graph, csv_text, edge_study, write_study

from generator.build import build_study
from generator.cli import main
from generator.draw.ego import EGO_MAX_ALTERS, ego_figures
from generator.render import node_view as node_view_module
from generator.vocabulary import ordinal


def _page(site: Path, network: str, position: int) -> str:
    return (site / f"networks/{network}/nodes/node-{position}.html").read_text("utf-8")


def _cells(page: str, title: str) -> list[str]:
    row = re.search(rf'<th scope="row">{title}</th>\s*(.*?)</tr>', page, re.S)
    assert row, title
    cells = re.findall(r"<td[^>]*>(.*?)</td>", row.group(1), re.S)
    return [re.sub(r"<[^>]+>", "", c).strip() for c in cells]


def test_ordinals_are_written_as_english_writes_them() -> None:
    assert [ordinal(k) for k in (1, 2, 3, 4, 11, 12, 13, 21, 22, 101, 111, 1001)] == [
        "1st", "2nd", "3rd", "4th", "11th", "12th", "13th", "21st", "22nd", "101st", "111th",
        "1,001st"]


@pytest.fixture(scope="module")
def star_site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    # A star of five leaves (a worked example: the centre has degree 5, each leaf 1).
    root = tmp_path_factory.mktemp("star")
    edges = csv_text(("source", "target"), [("hub", f"leaf{k}") for k in range(1, 6)])
    study = edge_study(root / "study", edges)
    return build_study(study, output=root / "site").output


def test_ranks_and_percentiles_of_a_star(star_site: Path) -> None:
    hub = _page(star_site, "net", 1)
    assert _cells(hub, "Degree") == ["5", "1st of 6", "higher than 100% of the other nodes"]
    leaf = _page(star_site, "net", 2)
    # Five leaves share the rank after the hub, and are higher than none of the others.
    assert _cells(leaf, "Degree") == ["1", "2nd of 6", "higher than 0% of the other nodes"]
    assert "Ties (5)" in hub and "Ties (1)" in leaf
    assert re.search(r'<a href="node-1.html">hub</a>', leaf)
    assert "not a judgement of the person" in hub


def test_every_node_has_a_page_linked_from_the_node_table(star_site: Path) -> None:
    pages = sorted((star_site / "networks/net/nodes").glob("*.html"))
    assert len(pages) == 6
    table = (star_site / "networks/net/nodes.html").read_text("utf-8")
    for k in range(1, 7):
        assert f'href="nodes/node-{k}.html"' in table


def test_directed_ties_out_and_in_with_weights(tmp_path: Path) -> None:
    edges = "source,target,w\na,b,2\nc,a,5\na,c,1\n"
    study = edge_study(tmp_path / "study", edges, directed=True, weight="w")
    site = build_study(study, output=tmp_path / "site").output
    page = _page(site, "net", 1)  # a
    out = page[page.index("Ties out"):page.index("Ties in")]
    incoming = page[page.index("Ties in"):]
    assert re.findall(r'>(\w)</a> <span class="tie-weight">weight (\d)', out) == [("b", "2"), ("c", "1")]
    assert re.findall(r'>(\w)</a> <span class="tie-weight">weight (\d)', incoming)[:1] == [("c", "5")]


def test_the_ego_figure_holds_the_ego_network_networkx_finds(karate_case) -> None:
    graph, analysis = karate_case
    figures = ego_figures(analysis)
    lookup = {str(v): v for v in graph.nodes}
    ids = [lookup[str(v)] for v in analysis.nodes.index]
    for position, figure in enumerate(figures):
        node = ids[position]
        ego = nx.ego_graph(graph, node, radius=1)  # networkx: the node, its neighbours, their ties
        assert figure.alters == ego.number_of_nodes() - 1
        if figure.alters <= EGO_MAX_ALTERS:
            assert figure.drawn == figure.alters
            assert len(figure.ties) == ego.number_of_edges()
            assert {ids[n.position] for n in figure.nodes} == set(ego.nodes)
        assert figure.nodes[0].is_ego and figure.nodes[0].position == position
        assert sum(1 for t in figure.ties if t.touches_ego) == graph.degree(node)


def test_a_node_with_many_ties_draws_its_strongest(tmp_path: Path) -> None:
    graph = nx.star_graph(EGO_MAX_ALTERS + 5)
    for k, (u, v) in enumerate(graph.edges):
        graph[u][v]["weight"] = k + 1
    analysis = analyse_graph(tmp_path, graph, weight="weight")
    figure = ego_figures(analysis)[0]
    assert figure.alters == EGO_MAX_ALTERS + 5 and figure.drawn == EGO_MAX_ALTERS
    drawn = {analysis.nodes.index[n.position] for n in figure.nodes[1:]}
    assert drawn == {str(k) for k in range(6, EGO_MAX_ALTERS + 6)}  # the 5 weakest left out


def test_the_same_node_links_to_its_page_in_the_other_networks(tmp_path: Path) -> None:
    study = write_study(tmp_path / "study", networks=[
        {"id": "one", "title": "First", "edges": "data/one.csv"},
        {"id": "two", "title": "Second", "edges": "data/two.csv"}],
        files={"data/one.csv": "source,target\nx,y\ny,z\n", "data/two.csv": "source,target\nz,w\n"})
    site = build_study(study, output=tmp_path / "site").output
    z_in_one = _page(site, "one", 3)
    # Node order sorts the ids (w, z), so z is the second node of Second.
    assert '<a href="../../two/nodes/node-2.html">z in Second</a>' in z_in_one
    assert "In the study's other networks" not in _page(site, "one", 1)  # x is only in one


def test_a_node_in_many_networks_links_its_series_first_and_counts_the_rest(
        tmp_path: Path, monkeypatch) -> None:
    # Five team networks whose ids repeat; the first and the last are two waves of one series.
    networks = [{"id": f"t{k}", "title": f"Team {k}", "edges": f"data/t{k}.csv"} for k in range(5)]
    networks[0].update(series="teams", wave=1)
    networks[4].update(series="teams", wave=2)
    study = write_study(tmp_path / "study", networks=networks,
                        files={f"data/t{k}.csv": "source,target\na,b\n" for k in range(5)})
    monkeypatch.setattr(node_view_module, "ELSEWHERE_SHOWN", 2)
    page = _page(build_study(study, output=tmp_path / "site").output, "t0", 1)
    links = re.findall(r'<li><a href="([^"]+)">a in (Team \d)</a></li>', page)
    assert links == [("../../t4/nodes/node-1.html", "Team 4"),
                     ("../../t1/nodes/node-1.html", "Team 1")]
    assert "also in 2 more networks of the study" in page


def test_node_views_can_be_turned_off_and_stop_at_a_size(tmp_path: Path, monkeypatch) -> None:
    study = write_study(tmp_path / "off", networks=[{"id": "net", "edges": "data/e.csv"}],
                        files={"data/e.csv": "source,target\na,b\n"},
                        tables={"site": {"node_views": False}})
    site = build_study(study, output=tmp_path / "off-site").output
    assert not (site / "networks/net/nodes").exists()
    assert 'href="nodes/node-1.html"' not in (site / "networks/net/nodes.html").read_text("utf-8")
    monkeypatch.setattr(node_view_module, "NODE_VIEW_LIMIT", 2)
    big = edge_study(tmp_path / "big", "source,target\na,b\nb,c\n")
    assert not (build_study(big, output=tmp_path / "big-site").output / "networks/net/nodes").exists()


def test_node_views_must_be_true_or_false(tmp_path: Path, capsys) -> None:
    study = write_study(tmp_path / "study", networks=[{"id": "net", "edges": "data/e.csv"}],
                        files={"data/e.csv": "source,target\na,b\n"},
                        tables={"site": {"node_views": "yes"}})
    assert main(["check", str(study)]) == 1
    err = capsys.readouterr().err
    assert "site.node_views" in err and "Traceback" not in err


def test_a_label_with_markup_is_escaped_on_its_page_and_in_its_figure(tmp_path: Path) -> None:
    nodes = 'id,name\na,"<script>alert(1)</script>"\nb,Bea\n'
    study = edge_study(tmp_path / "study", "source,target\na,b\n", nodes=nodes, label="name")
    site = build_study(study, output=tmp_path / "site").output
    for position in (1, 2):
        page = _page(site, "net", position)
        assert "<script>alert" not in page
        assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
