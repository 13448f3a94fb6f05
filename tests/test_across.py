"""Studies of many networks: every network's statistics side by side on the front page and in
files/study-statistics.csv, and how the main statistics spread across the networks.

The table arranges what each network's analysis holds, so it is checked against each network's
own statistics.csv and, for density and reciprocity, against networkx computing them again from
the cleaned edge lists the site publishes."""

from __future__ import annotations

import csv
import io
import json
import re
import statistics
from pathlib import Path

import networkx as nx
import pytest
from conftest import csv_text, write_study

from generator.analyse.across import StudyTable, spread
from generator.build import build_study
from generator.draw.across import MANY_NETWORKS
from generator.vocabulary import number

NETWORKS = 7


def _graph(index: int) -> nx.Graph:
    # Each network a different size and density, so every column has something to sort.
    generator = nx.gnp_random_graph(12 + 3 * index, 0.1 + 0.05 * index, seed=index,
                                    directed=index % 2 == 1)
    return generator


@pytest.fixture(scope="module")
def groups(tmp_path_factory: pytest.TempPathFactory) -> Path:
    root = tmp_path_factory.mktemp("groups")
    files: dict[str, str | bytes] = {}
    networks = []
    for index in range(NETWORKS):
        graph = _graph(index)
        files[f"data/team{index}.csv"] = csv_text(
            ["source", "target"], [(f"n{a}", f"n{b}") for a, b in sorted(graph.edges)])
        networks.append({"id": f"team-{index}", "title": f"Team {index}",
                         "edges": f"data/team{index}.csv", "directed": graph.is_directed()})
    write_study(root, networks=networks, files=files, study={"title": "Teams", "seed": 3})
    return build_study(root).output


def _table(path: Path) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(path.read_text("utf-8"))))


def test_one_row_per_network_with_the_values_of_each_network_s_own_statistics(groups: Path):
    rows = _table(groups / "files" / "study-statistics.csv")
    assert [row["network"] for row in rows] == [f"team-{i}" for i in range(NETWORKS)]
    assert [row["title"] for row in rows] == [f"Team {i}" for i in range(NETWORKS)]
    for row in rows:
        own = {r["statistic"]: r["value"] for r in _table(
            groups / "files" / row["network"] / "statistics.csv")}
        # Every statistic of the network, as its own file writes it; empty for the others.
        assert {k: v for k, v in row.items() if k in own} == own
        assert all(v == "" for k, v in row.items() if k not in own and k not in ("network", "title"))


def test_density_and_reciprocity_match_networkx_on_the_published_ties(groups: Path):
    # networkx.density and networkx.reciprocity of the cleaned edge list each network publishes.
    for index, row in enumerate(_table(groups / "files" / "study-statistics.csv")):
        ties = _table(groups / "files" / row["network"] / "edges.csv")
        graph = (nx.DiGraph() if index % 2 else nx.Graph())
        graph.add_nodes_from(r["id"] for r in _table(groups / "files" / row["network"] / "nodes.csv"))
        graph.add_edges_from((t["source"], t["target"]) for t in ties)
        assert float(row["density"]) == pytest.approx(nx.density(graph), rel=1e-12)
        if graph.is_directed():
            assert float(row["reciprocity"]) == pytest.approx(nx.reciprocity(graph), rel=1e-12)
        else:
            assert row["reciprocity"] == ""  # not a statistic of an undirected network


def test_the_data_package_describes_the_study_table_and_it_validates(groups: Path, tmp_path):
    descriptor = json.loads((groups / "files" / "datapackage.json").read_text("utf-8"))
    resource = next(r for r in descriptor["resources"] if r["name"] == "study-statistics")
    header = next(csv.reader(io.StringIO(
        (groups / "files" / "study-statistics.csv").read_text("utf-8"))))
    assert [f["name"] for f in resource["schema"]["fields"]] == header
    assert resource["path"] == "study-statistics.csv"
    import frictionless

    report = frictionless.validate(resource, basepath=str(groups / "files"))
    assert report.valid, report.flatten(["rowNumber", "fieldName", "message"])


def test_the_front_page_table_is_sortable_and_holds_exact_values(groups: Path):
    page = (groups / "index.html").read_text("utf-8")
    table = re.search(r'<table class="data" id="glance-table" data-sortable>(.*?)</table>', page,
                      re.S)
    assert table, "no sortable table of the networks on the front page"
    body = table.group(1)
    assert len(re.findall(r"<tr>", body.split("<tbody>")[1])) == NETWORKS
    headings = re.findall(r'<th scope="col" data-type="number" class="num">([^<]+)</th>', body)
    assert {"Nodes", "Ties", "Density", "Reciprocity", "Modularity"} <= set(headings)
    column = headings.index("Density")
    rows = _table(groups / "files" / "study-statistics.csv")
    cells = [re.findall(r'<td class="num" data-value="([^"]*)">([^<]*)</td>', row)
             for row in body.split("<tbody>")[1].split("</tr>")[:-1]]
    for row, found in zip(rows, cells):
        value, text = found[column]
        assert value == row["density"] and text == number(float(row["density"]))
    assert "static/table.js" in page
    assert 'href="files/study-statistics.csv"' in page


def test_from_several_networks_on_the_front_page_shows_how_statistics_spread(groups: Path):
    assert NETWORKS >= MANY_NETWORKS
    page = (groups / "index.html").read_text("utf-8")
    assert 'src="figures/study-statistics.svg"' in page
    svg = (groups / "figures" / "study-statistics.svg").read_bytes()
    assert svg.startswith(b"<?xml") and (groups / "figures" / "study-statistics.png").is_file()
    densities = [float(r["density"]) for r in _table(groups / "files" / "study-statistics.csv")]
    alt = re.search(r'<img src="figures/study-statistics.svg" alt="([^"]+)"', page).group(1)
    assert (f"density from {number(min(densities))} to {number(max(densities))}, median "
            f"{number(statistics.median(densities))}") in alt
    downloads = (groups / "downloads.html").read_text("utf-8")
    assert "<code>figures/study-statistics.svg</code>" in downloads
    assert "<code>files/study-statistics.csv</code>" in downloads


def test_a_study_of_a_few_networks_has_the_table_but_no_spread_figure(tmp_path):
    files: dict[str, str | bytes] = {"data/a.csv": "source,target\na,b\nb,c\n",
                                     "data/b.csv": "source,target\na,b\nb,c\nc,a\n"}
    write_study(tmp_path, files=files, networks=[
        {"id": "one", "edges": "data/a.csv"}, {"id": "two", "edges": "data/b.csv"}])
    output = build_study(tmp_path).output
    assert not (output / "figures").exists()
    rows = _table(output / "files" / "study-statistics.csv")
    assert [(r["network"], r["edges"], r["transitivity"]) for r in rows] == [
        ("one", "2", "0"), ("two", "3", "1")]  # a path has no triangle; a triangle is closed


def test_spread_gives_the_lowest_median_and_highest_and_who_holds_them():
    table = StudyTable(networks=("a", "b", "c", "d"), titles=("A", "B", "C", "D"),
                       statistics=("density", "reciprocity"),
                       values=((0.2, None), (0.5, 0.1), (0.1, None), (0.5, 0.3)))
    found = spread(table, "density")
    assert found is not None
    assert (found.networks, found.low, found.median, found.high) == (4, 0.1, 0.35, 0.5)
    assert (found.lowest, found.highest) == ("c", "b")  # the first network with the maximum
    assert spread(table, "reciprocity").networks == 2
    assert spread(StudyTable(("a",), ("A",), ("density",), ((None,),)), "density") is None


def test_with_many_networks_the_navigation_links_their_table_not_each_network():
    from generator.render.site_map import NAV_NETWORKS, SiteMap

    def nav(count: int, path: str) -> list[tuple[str, str, str | None]]:
        site = SiteMap(study_title="S", networks=[(f"g{i}", f"Group {i}") for i in range(count)],
                       notes=[], version="1")
        return [(link.label, link.href, link.current) for link in site.frame(path, "t").nav]

    few = nav(NAV_NETWORKS, "index.html")
    assert [label for label, _, _ in few[1:NAV_NETWORKS + 1]] == [
        f"Group {i}" for i in range(NAV_NETWORKS)]
    many = nav(300, "networks/g7/nodes/node-3.html")
    assert many[:2] == [("Overview", "../../../index.html", None),
                        ("All 300 networks", "../../../index.html#glance", "true")]
    assert len(many) == 5  # with Methods, Data checks and Downloads
    # The pages of one network keep their own sub-navigation.
    site = SiteMap(study_title="S", networks=[(f"g{i}", f"G{i}") for i in range(300)], notes=[],
                   version="1")
    assert [link.label for link in site.frame("networks/g7/index.html", "t").subnav] == [
        "Results", "Every node", "Communities"]
