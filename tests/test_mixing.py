"""Attribute mixing, E-I index, attribute types, directed degree centralization, brokerage and
the sentence on nodes without ties: each against a worked example or networkx."""

from __future__ import annotations

import csv
import io
import json
import math
import random

import networkx as nx
import pandas as pd
import pytest
from conftest import analyse, edge_study, graph_study, load_network, write_study

from generator.analyse import analyse_network
from generator.analyse.nulls import NullTest
from generator.build import build_study
from generator.cli import main
from generator.config import CommunitiesConfig, MeasuresConfig, SignificanceConfig
from generator.publish.downloads import mixing_csv
from generator.vocabulary import Reading, number, reading
from generator.vocabulary.mixing import isolates_sentence

EXACT = {"rel": 1e-12, "abs": 1e-12}

# ---------------------------------------------------------------------------------------------
# Worked examples, computed by hand (Krackhardt & Stern 1988, "Informal networks and
# organizational crises: an experimental simulation": E-I = (E - I) / (E + I))

TEAM_NODES = "id,team\na,X\nb,X\nc,X\nd,Y\ne,Y\nf,\n"


def _table(analysis, attribute="team"):
    return next(t for t in analysis.mixing if t.attribute == attribute)


def test_undirected_mixing_matrix_and_ei_index_match_a_hand_count(tmp_path):
    # Ties a-b, b-c (inside X), d-e (inside Y), a-d, c-e (between X and Y); e-f has an end with
    # no team and is left out. By hand: I = 3, E = 2, E-I = (2 - 3) / 5 = -0.2. The matrix is
    # symmetric: XX 2, XY = YX 2, YY 1. Group X: 2 inside, 2 out, E-I 0; group Y: 1 inside, 2
    # out, E-I (2 - 1) / 3.
    edges = "source,target\na,b\nb,c\na,d\nd,e\nc,e\ne,f\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, nodes=TEAM_NODES)))
    table = _table(analysis)
    assert table.groups == ("X", "Y")
    assert table.counts == ((2, 2), (2, 1))
    assert (table.internal, table.external, table.left_out_ties, table.left_out_nodes) == (3, 2, 1, 1)
    assert table.ei_index == pytest.approx(-0.2, **EXACT)
    assert analysis.statistic("ei_index:team") == pytest.approx(-0.2, **EXACT)
    x, y = table.per_group
    assert (x.nodes, x.internal, x.external, x.ei) == (3, 2, 2, 0.0)
    assert (y.nodes, y.internal, y.external) == (2, 1, 2)
    assert y.ei == pytest.approx(1 / 3, **EXACT)
    assert mixing_csv(table).decode() == "team,X,Y\nX,2,2\nY,2,1\n"


def test_directed_mixing_matrix_counts_from_row_to_column(tmp_path):
    # a->b, b->a (X to X), a->d (X to Y), d->a, e->c (Y to X), d->e (Y to Y). By hand:
    # matrix [[2, 1], [2, 1]], I = 3, E = 3, E-I = 0. Group X: 2 inside, 1 sent + 2 received
    # out, E-I (3 - 2) / 5 = 0.2; group Y: 1 inside, 2 sent + 1 received, E-I (3 - 1) / 4 = 0.5.
    edges = "source,target\na,b\nb,a\na,d\nd,a\ne,c\nd,e\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, nodes=TEAM_NODES, directed=True)))
    table = _table(analysis)
    assert table.directed and table.counts == ((2, 1), (2, 1))
    assert table.ei_index == pytest.approx(0.0, **EXACT)
    x, y = table.per_group
    assert (x.internal, x.external) == (2, 3) and x.ei == pytest.approx(0.2, **EXACT)
    assert (y.internal, y.external) == (1, 3) and y.ei == pytest.approx(0.5, **EXACT)
    assert mixing_csv(table).decode() == "team,X,Y\nX,2,1\nY,2,1\n"


def test_ei_index_of_groups_with_no_tie_between_them_is_minus_one(tmp_path):
    # Every tie inside its group: E = 0, so E-I = -1 (the definition's lower bound).
    edges = "source,target\na,b\nb,c\nd,e\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, nodes=TEAM_NODES)))
    assert analysis.statistic("ei_index:team") == -1.0


# ---------------------------------------------------------------------------------------------
# In- and out-degree centralization (Freeman 1979, "Centrality in social networks: conceptual
# clarification": sum(max - d) / max possible sum; for directed degree the maximum is (n-1)^2)


def test_in_star_has_in_degree_centralization_one(tmp_path):
    # Four leaves all point to the centre: in-degrees 4, 0, 0, 0, 0 -> 16 / 16 = 1; out-degrees
    # 0, 1, 1, 1, 1 -> (1 - 0) / 16 = 0.0625 (hand count).
    edges = "source,target\nb,a\nc,a\nd,a\ne,a\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, directed=True)))
    assert analysis.statistic("in_degree_centralization") == pytest.approx(1.0, **EXACT)
    assert analysis.statistic("out_degree_centralization") == pytest.approx(1 / 16, **EXACT)


def test_directed_line_centralizations_by_hand(tmp_path):
    # a->b->c->d: in-degrees 0,1,1,1 and out-degrees 1,1,1,0: each sum is 1, over (n-1)^2 = 9.
    edges = "source,target\na,b\nb,c\nc,d\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges, directed=True)))
    assert analysis.statistic("in_degree_centralization") == pytest.approx(1 / 9, **EXACT)
    assert analysis.statistic("out_degree_centralization") == pytest.approx(1 / 9, **EXACT)


def test_directed_centralizations_recompute_from_networkx_degrees_and_the_node_columns(tmp_path):
    graph = nx.gnp_random_graph(25, 0.15, seed=4, directed=True)
    graph.add_node(25)  # an isolate counts in n
    analysis = analyse(load_network(graph_study(tmp_path, graph)))
    n = graph.number_of_nodes()
    for mode, degrees in (("in", dict(graph.in_degree())), ("out", dict(graph.out_degree()))):
        top = max(degrees.values())
        expected = sum(top - d for d in degrees.values()) / (n - 1) ** 2
        assert analysis.statistic(f"{mode}_degree_centralization") == pytest.approx(expected, **EXACT)
        column = analysis.measures[f"{mode}_degree"]  # what a reader sees in nodes.csv
        assert sum(column.max() - column) / (n - 1) ** 2 == pytest.approx(expected, **EXACT)


def test_undirected_networks_have_no_directed_centralization(tmp_path):
    analysis = analyse(load_network(edge_study(tmp_path, "source,target\na,b\nb,c\n")))
    names = [s.name for s in analysis.statistics]
    assert "in_degree_centralization" not in names and "out_degree_centralization" not in names


# ---------------------------------------------------------------------------------------------
# Brokerage (Burt 1992, "Structural Holes"), against networkx's constraint and effective_size


def _assert_matches_networkx(analysis, graph: nx.Graph, weight: str | None) -> None:
    constraint = nx.constraint(graph, weight=weight)
    # networkx's all-nodes effective_size takes a vectorised path when SciPy is installed that
    # divides by the wrong node's strongest tie on weighted graphs (networkx pull request 8906);
    # asking node by node takes the path that follows the documented definition.
    effective = nx.effective_size(graph, nodes=list(graph), weight=weight)
    for node in graph:
        ours_c = analysis.measures.loc[str(node), "constraint"]
        ours_e = analysis.measures.loc[str(node), "effective_size"]
        if math.isnan(constraint[node]):
            assert math.isnan(ours_c) and math.isnan(ours_e)
            continue
        assert ours_c == pytest.approx(constraint[node], **EXACT)
        assert ours_e == pytest.approx(effective[node], **EXACT)


def test_constraint_and_effective_size_match_networkx_on_the_karate_club(tmp_path):
    graph = nx.karate_club_graph()  # Zachary 1977, as networkx ships it
    for u, v in graph.edges:
        graph[u][v].pop("weight", None)
    analysis = analyse(load_network(graph_study(tmp_path, graph)))
    _assert_matches_networkx(analysis, graph, None)


def test_weighted_constraint_and_effective_size_match_networkx(tmp_path):
    graph = nx.gnm_random_graph(30, 80, seed=3)
    graph.add_node(30)  # an isolate: networkx gives NaN
    rng = random.Random(3)
    for u, v in graph.edges:
        graph[u][v]["w"] = rng.choice([1, 2, 3, 5])
    analysis = analyse(load_network(graph_study(tmp_path, graph, weight="w")))
    _assert_matches_networkx(analysis, graph, "w")
    assert math.isnan(analysis.measures.loc["30", "constraint"])


def test_directed_brokerage_uses_the_undirected_version_with_summed_strengths(tmp_path):
    directed = nx.gnp_random_graph(20, 0.2, seed=8, directed=True)
    rng = random.Random(8)
    for u, v in directed.edges:
        directed[u][v]["w"] = rng.choice([1, 2, 4])
    undirected = nx.Graph()
    undirected.add_nodes_from(directed)
    for u, v, d in directed.edges(data=True):  # a reciprocated pair adds its two strengths
        before = undirected[u][v]["w"] if undirected.has_edge(u, v) else 0
        undirected.add_edge(u, v, w=before + d["w"])
    analysis = analyse(load_network(graph_study(tmp_path, directed, weight="w")))
    _assert_matches_networkx(analysis, undirected, "w")


def test_star_brokerage_by_hand(tmp_path):
    # Burt 1992: a centre of k unconnected contacts has constraint k (1/k)^2 = 1/k and effective
    # size k; a leaf, tied to one node only, has constraint 1 and effective size 1.
    edges = "source,target\nc,a\nc,b\nc,d\nc,e\n"
    analysis = analyse(load_network(edge_study(tmp_path, edges)))
    assert analysis.measures.loc["c", "constraint"] == pytest.approx(0.25, **EXACT)
    assert analysis.measures.loc["c", "effective_size"] == pytest.approx(4.0, **EXACT)
    assert analysis.measures.loc["a", "constraint"] == pytest.approx(1.0, **EXACT)
    assert analysis.measures.loc["a", "effective_size"] == pytest.approx(1.0, **EXACT)


# ---------------------------------------------------------------------------------------------
# Declared attribute types (Newman 2003, "Mixing patterns in networks": nominal and numeric
# assortativity, as networkx computes them)


def _unit_study(root, **keys):
    graph = nx.karate_club_graph()
    for node in graph:
        graph.nodes[node]["unit_code"] = node % 4
    return graph, graph_study(root, graph, attributes=("unit_code",), **keys)


def test_whole_number_codes_are_numeric_unless_declared_categorical(tmp_path):
    graph, root = _unit_study(tmp_path / "plain")
    plain = analyse(load_network(root))
    assert plain.statistic("assortativity:unit_code") == pytest.approx(
        nx.numeric_assortativity_coefficient(graph, "unit_code"), abs=1e-9)
    assert plain.mixing == () and plain.statistic("ei_index:unit_code") is None

    graph, root = _unit_study(tmp_path / "declared", categorical=["unit_code"])
    declared = analyse(load_network(root))
    assert declared.statistic("assortativity:unit_code") == pytest.approx(
        nx.attribute_assortativity_coefficient(graph, "unit_code"), abs=1e-9)
    assert [t.attribute for t in declared.mixing] == ["unit_code"]
    assert declared.mixing[0].groups == ("0", "1", "2", "3")


def test_a_text_column_declared_numeric_with_numbers_gets_the_numeric_form(tmp_path):
    # "007" is read as a code unless declared; declared numeric it is the number 7.
    graph = nx.path_graph(6)
    for node in graph:
        graph.nodes[node]["level"] = f"00{node % 3}"
    root = graph_study(tmp_path, graph, attributes=("level",), numeric=["level"])
    analysis = analyse(load_network(root))
    numbers = nx.Graph(graph)
    for node in numbers:
        numbers.nodes[node]["level"] = node % 3
    assert analysis.statistic("assortativity:level") == pytest.approx(
        nx.numeric_assortativity_coefficient(numbers, "level"), abs=1e-9)


def test_the_page_says_which_form_each_attribute_used(tmp_path):
    _, root = _unit_study(tmp_path, categorical=["unit_code"])
    build_study(root)
    page = (root / "output" / "networks" / "net" / "index.html").read_text()
    assert "Read as categorical (as declared in study.toml)" in page
    _, other = _unit_study(tmp_path / "other")
    build_study(other)
    page = (other / "output" / "networks" / "net" / "index.html").read_text()
    assert "Read as numeric (read from its values)" in page


@pytest.mark.parametrize("keys, pieces", [
    ({"numeric": ["team"]}, ["data/nodes.csv", "line 2", "column 'team'", "'X'", "not a number"]),
    ({"categorical": ["unit"]}, ["study.toml", "network[1].categorical", "'unit'",
                                 "not a node attribute of the node list data/nodes.csv",
                                 "'team'"]),
    ({"categorical": ["team"], "numeric": ["team"]}, ["study.toml", "network[1].numeric",
                                                      "'team'", "both categorical and numeric"]),
])
def test_bad_declarations_exit_1_with_a_clear_message(tmp_path, capsys, keys, pieces):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id,team\na,X\nb,Y\n", **keys)
    assert main(["build", str(root), "--quiet"]) == 1
    err = capsys.readouterr().err
    assert "Traceback" not in err
    for piece in pieces:
        assert piece in err
    assert not (root / "output").exists()


# ---------------------------------------------------------------------------------------------
# Readings claim a tendency only when the test against rewired networks gives p < 0.05


def _test(name, observed, mean, p, *, below, above):
    return NullTest(name, observed, mean, 0.05, (observed - mean) / 0.05, p, 200, below, above,
                    None, ())


@pytest.mark.parametrize("p, claims", [(1 / 201, True), (0.049, True), (0.05, False), (0.4, False)])
def test_ei_reading_claims_a_preference_only_below_0_05(p, claims):
    test = _test("ei_index:clinic", -0.6, 0.1, p, below=0, above=200)
    text = reading("ei_index:clinic", Reading(value=-0.6, attribute="clinic", test=test))
    assert ("prefer" in text) == claims
    assert f"p = {number(p, 2)}" in text
    if not claims:
        assert text.startswith("No clear tendency")
    untested = reading("ei_index:clinic", Reading(value=-0.6, attribute="clinic"))
    assert "prefer" not in untested and "avoid" not in untested and "not tested" in untested
    assert "80% of the ties" in untested  # (1 - E-I) / 2 of the ties stay inside


def test_ei_reading_calls_crossing_ties_an_avoidance():
    test = _test("ei_index:clinic", 0.7, 0.1, 1 / 201, below=200, above=0)
    text = reading("ei_index:clinic", Reading(value=0.7, attribute="clinic", test=test))
    assert text.startswith("Ties avoid nodes alike in clinic")


def _planted(seed: int) -> nx.Graph:
    # Two blocks (stochastic block model, fixed seed) with ties mostly inside; "clinic" follows
    # the blocks, "shuffled" is the same labels in random order.
    graph = nx.stochastic_block_model([12, 12], [[0.5, 0.04], [0.04, 0.5]], seed=seed)
    labels = ["A" if graph.nodes[n]["block"] == 0 else "B" for n in graph]
    shuffled = labels[:]
    random.Random(seed).shuffle(shuffled)
    for node, a, b in zip(graph, labels, shuffled):
        graph.nodes[node]["clinic"] = a
        graph.nodes[node]["shuffled"] = b
        del graph.nodes[node]["block"]
    return graph


def test_pipeline_readings_claim_a_tendency_exactly_when_p_is_below_0_05(tmp_path):
    root = graph_study(tmp_path, _planted(5), attributes=("clinic", "shuffled"))
    analysis = analyse_network(load_network(root), communities=CommunitiesConfig(runs=2),
                               measures=MeasuresConfig(), seed=1,
                               significance=SignificanceConfig(null_samples=40))
    from generator.render.network_page import statistic_rows

    rows = {row.name: row.reading for row in statistic_rows(analysis)}
    clinic = analysis.significance.test("ei_index:clinic")
    assert clinic is not None and clinic.p is not None and clinic.p < 0.05  # planted blocks
    for name in ("ei_index:clinic", "ei_index:shuffled", "assortativity:clinic",
                 "assortativity:shuffled"):
        test = analysis.significance.test(name)
        assert test is not None and test.p is not None
        claims = "prefer" in rows[name] or "avoid" in rows[name]
        assert claims == (test.p < 0.05), (name, test.p, rows[name])
        if claims:
            assert "below 0.05" in rows[name]


# ---------------------------------------------------------------------------------------------
# Nodes without ties, and what a build writes


def test_isolates_sentence_counts_the_listed_nodes_without_ties():
    text = isolates_sentence(3, 20, listed_in_node_list=True)
    assert text.startswith("3 of the 20 listed nodes have no ties at all")
    assert "did not respond" in text and "empty cells" in text
    assert isolates_sentence(1, 5, listed_in_node_list=True).startswith(
        "1 of the 5 listed node has no ties at all: it may be a person")
    assert "at least one tie" in isolates_sentence(0, 5, listed_in_node_list=True)


def test_a_build_writes_mixing_files_new_columns_statistics_and_the_isolates_sentence(tmp_path):
    nodes = "id,team,years\na,X,1\nb,X,4\nc,X,2\nd,Y,7\ne,Y,3\nf,Y,5\ng,X,2\n"  # f, g: no ties
    edges = "source,target\na,b\nb,c\na,d\nd,e\nc,e\n"
    root = write_study(tmp_path, networks=[{"id": "net", "edges": "data/edges.csv",
                                            "nodes": "data/nodes.csv", "directed": True}],
                       files={"data/edges.csv": edges, "data/nodes.csv": nodes})
    build_study(root)
    out = root / "output"
    assert (out / "files/net/mixing-team.csv").read_text() == "team,X,Y\nX,2,2\nY,0,1\n"
    stats = dict(csv.reader(io.StringIO((out / "files/net/statistics.csv").read_text())))
    # I = 3 (a->b, b->c, d->e), E = 2 (a->d, c->e): E-I = -1/5.
    assert float(stats["ei_index:team"]) == pytest.approx(-0.2, **EXACT)
    assert {"in_degree_centralization", "out_degree_centralization"} <= set(stats)
    table = pd.read_csv(out / "files/net/nodes.csv", keep_default_na=False)
    assert {"constraint", "effective_size"} <= set(table.columns)
    isolated = table[table["id"].isin(["f", "g"])]
    assert (isolated["constraint"] == "").all() and (isolated["effective_size"] == "").all()
    package = json.loads((out / "files/datapackage.json").read_text())
    resources = {r["path"]: r for r in package["resources"]}
    fields = [f["name"] for f in resources["net/mixing-team.csv"]["schema"]["fields"]]
    assert fields == ["team", "X", "Y"]
    node_fields = {f["name"] for f in resources["net/nodes.csv"]["schema"]["fields"]}
    assert {"constraint", "effective_size"} <= node_fields
    sentence = "2 of the 7 listed nodes have no ties at all"
    assert sentence in (out / "networks/net/index.html").read_text()
    assert sentence in (out / "checks.html").read_text()
    assert sentence in (out / "methods.html").read_text()
    assert (out / "networks/net/figures/mixing-team.svg").is_file()
    assert (out / "networks/net/figures/scatter-years.svg").is_file()
    assert "mixing-team.csv" in (out / "downloads.html").read_text()


def test_example_study_shows_mixing_and_brokerage_for_both_networks(tmp_path):
    import shutil
    from pathlib import Path

    source = Path(__file__).resolve().parents[1] / "example_project"
    root = tmp_path / "example"
    shutil.copytree(source, root, ignore=shutil.ignore_patterns("output", ".netfolio-cache",
                                                                 ".netfolio-lock*"))
    text = (root / "study.toml").read_text().replace("null_samples = 200", "null_samples = 0")
    (root / "study.toml").write_text(text)
    build_study(root)
    for network in ("advice", "coworking"):
        files = root / "output" / "files" / network
        assert (files / "mixing-clinic.csv").is_file() and (files / "mixing-role.csv").is_file()
        header = (files / "nodes.csv").read_text().splitlines()[0].split(",")
        assert "constraint" in header and "effective_size" in header
        page = (root / "output" / "networks" / network / "index.html").read_text()
        assert 'id="mixing"' in page and "E-I index of each clinic group" in page
        assert "listed nodes have no ties at all" in page or "at least one tie" in page


def test_repeated_or_empty_declarations_are_refused_with_the_key(tmp_path, capsys):
    for keys, piece in (({"categorical": ["team", "team"]}, "names 'team' twice"),
                        ({"numeric": [""]}, "must be a list of node-list column names")):
        root = edge_study(tmp_path / piece[:5], "source,target\na,b\n",
                          nodes="id,team\na,X\nb,Y\n", **keys)
        assert main(["build", str(root), "--quiet"]) == 1
        err = capsys.readouterr().err
        assert piece in err and "network[1]." in err and "Traceback" not in err


def test_merging_small_groups_adds_their_rows_and_columns(tmp_path):
    # Hand count on the undirected example above: merging X into "other" (with Y kept) leaves
    # the matrix as it was but renamed; merging both puts every valued tie on one diagonal cell
    # (5 ties), while the overall E-I stays that of the groups as measured.
    from generator.analyse.mixing import merge_groups

    edges = "source,target\na,b\nb,c\na,d\nd,e\nc,e\ne,f\n"
    table = _table(analyse(load_network(edge_study(tmp_path, edges, nodes=TEAM_NODES))))
    one = merge_groups(table, ("X",), "other")
    assert one.groups == ("Y", "other") and one.counts == ((1, 2), (2, 2))
    both = merge_groups(table, ("X", "Y"), "other")
    assert both.groups == ("other",) and both.counts == ((5,),)
    assert both.per_group[0].nodes == 5 and both.ei_index == pytest.approx(-0.2, **EXACT)


def test_many_groups_leave_the_matrix_to_its_csv_and_scroll_the_per_group_table(tmp_path):
    # 45 groups of two tied nodes, each group tied to the next: more groups than the page shows
    # as a matrix (MATRIX_ON_PAGE), so the page points to the CSV, and the per-group E-I table
    # keeps every group in a box of its own height.
    from generator.render.mixing import MATRIX_ON_PAGE

    groups = MATRIX_ON_PAGE + 5
    edges = [f"a{g},b{g}" for g in range(groups)] + [f"b{g},a{g + 1}" for g in range(groups - 1)]
    nodes = [f"a{g},g{g}\nb{g},g{g}" for g in range(groups)]
    root = edge_study(tmp_path, "source,target\n" + "\n".join(edges) + "\n",
                      nodes="id,unit\n" + "\n".join(nodes) + "\n")
    build_study(root)
    page = (root / "output" / "networks" / "net" / "index.html").read_text("utf-8")
    assert f"With {groups} groups the matrix of ties between them is not shown here" in page
    assert 'class="data compact mixing-matrix"' not in page
    table = page[page.index('<div class="table-scroll pinned"'):]
    table = table[:table.index("</table>")]
    assert "E-I index of each unit group" in table
    assert table.count('<th scope="row">') == groups
