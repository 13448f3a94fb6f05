"""Reading and cleaning data files (generator/ingest/): every fix and refusal names its file,
line and value; results do not depend on the order of rows."""

from __future__ import annotations

import random
import subprocess
import sys
import textwrap

import pandas as pd
import pytest
from conftest import (
    analyse,
    csv_text,
    directed_weighted_graph,
    edge_study,
    karate_graph,
    load_network,
    matrix_study,
)
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from generator.errors import ConfigError, DataError, Finding

EDGES = "data/edges.csv"
NODES = "data/nodes.csv"
MATRIX = "data/matrix.csv"


def data_error(root) -> DataError:
    with pytest.raises(DataError) as caught:
        load_network(root)
    return caught.value


def only(findings, level: str) -> Finding:
    matching = [f for f in findings if f.level == level]
    assert len(matching) == 1, matching
    return matching[0]


def edge_rows(clean) -> list[tuple]:
    return [tuple(row) for row in clean.edges.itertuples(index=False)]


# ---------------------------------------------------------------------------------------------
# Node lists


def test_repeated_node_id_is_an_error_with_its_line(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id,unit\na,x\nb,y\nb,z\n")
    (finding,) = data_error(root).findings
    assert (finding.level, finding.file, finding.line, finding.column, finding.value) == (
        "error", NODES, 4, "id", "b")
    assert finding.message == "node id is repeated (first on line 3)"


def test_every_repeated_node_id_is_listed(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id\na\nb\na\nb\n")
    findings = data_error(root).findings
    assert [(f.line, f.value) for f in findings] == [(4, "a"), (5, "b")]


def test_empty_node_id_is_an_error_with_its_line(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id,unit\na,x\n,y\nb,z\n")
    (finding,) = data_error(root).findings
    assert (finding.line, finding.column, finding.message) == (3, "id", "a node has an empty id")


def test_edge_to_unknown_node_is_added_and_reported_with_its_line(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\nb,q\nr,a\nq,a\n",
                      nodes="id,unit\na,x\nb,y\n")
    clean = load_network(root)
    finding = only(clean.checks.findings, "fix")
    assert (finding.file, finding.value, finding.count) == (EDGES, "q", 2)
    assert finding.message == ("2 nodes appear in ties but not in the node list data/nodes.csv; "
                               "added with no attributes: 'q' (line 3), 'r' (line 4)")
    assert list(clean.nodes.index) == ["a", "b", "q", "r"]
    assert clean.nodes.loc["q", "label"] == "q"  # no label: the id stands in
    assert pd.isna(clean.nodes.loc["r", "unit"])


def test_isolates_in_the_node_list_are_kept_and_counted(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id\na\nb\nc\nd\n")
    clean = load_network(root)
    finding = only(clean.checks.findings, "note")
    assert (finding.file, finding.count) == (EDGES, 2)
    assert finding.message == "2 isolates with no ties, kept in the network: c, d"
    assert list(clean.nodes.index) == ["a", "b", "c", "d"]
    measures = analyse(clean, runs=2).measures
    assert list(measures["degree"]) == [1, 1, 0, 0]


def test_ids_are_read_as_text_and_keep_leading_zeros(tmp_path):
    root = edge_study(tmp_path, "source,target\n007,010\n010,1\n",
                      nodes="id,floor\n007,2\n010,3\n1,4\n")
    clean = load_network(root)
    assert list(clean.nodes.index) == ["1", "007", "010"]  # natural order: 1 < 7 < 10
    assert edge_rows(clean) == [("1", "010"), ("007", "010")]
    assert list(analyse(clean, runs=2).measures.index) == ["1", "007", "010"]


def test_attribute_columns_are_numbers_only_when_every_filled_cell_is_a_number(tmp_path):
    nodes = "id,years,share,unit,code\na,3,0.5,x,1\nb,,1.5,y,B2\nc,12,,z,3\n"
    clean = load_network(edge_study(tmp_path, "source,target\na,b\nb,c\n", nodes=nodes))
    assert clean.attributes == ("years", "share", "unit", "code")
    assert clean.nodes["years"].dtype == "Int64" and pd.isna(clean.nodes.loc["b", "years"])
    assert clean.nodes["share"].dtype == "Float64" and clean.nodes.loc["b", "share"] == 1.5
    assert clean.nodes["unit"].dtype == "string"
    assert list(clean.nodes["code"]) == ["1", "B2", "3"]  # one text cell keeps the column text


def test_label_column_becomes_the_label(tmp_path):
    nodes = "id,display\na,North desk\nb,South desk\n"
    clean = load_network(edge_study(tmp_path, "source,target\na,b\n", nodes=nodes, label="display"))
    assert list(clean.nodes["label"]) == ["North desk", "South desk"]
    assert clean.attributes == ()


def test_labels_that_look_like_numbers_stay_as_written(tmp_path):
    nodes = "id,badge\na,007\nb,010\n"
    clean = load_network(edge_study(tmp_path, "source,target\na,b\n", nodes=nodes, label="badge"))
    assert list(clean.nodes["label"]) == ["007", "010"]


def test_unknown_colour_attribute_is_refused_listing_the_choices(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id,unit\na,x\nb,y\n",
                      color_by="team")
    # A setting of study.toml: the error names its key and line there, and the node list read.
    with pytest.raises(ConfigError) as caught:
        load_network(root)
    error = caught.value
    assert error.key == "network[1].color_by" and error.line is not None
    assert f"study.toml, line {error.line}: [network[1].color_by]" in error.format_message()
    assert str(error) == ("'team' is not a node attribute of the node list data/nodes.csv; use "
                          "one of: community, unit")


# ---------------------------------------------------------------------------------------------
# Edge lists: refusals


@pytest.mark.parametrize("cell, message", [
    ("", "weight is missing"),
    ("heavy", "weight is not a number"),
    ("nan", "weight is not a number"),
    ("-2", "weight is negative; netfolio reads weights as tie strengths or distances, which "
           "cannot be below 0"),
    ("inf", "weight is infinite"),
    ("-inf", "weight is infinite"),
])
def test_bad_weight_is_an_error_with_its_line_and_value(tmp_path, cell, message):
    root = edge_study(tmp_path, f"source,target,w\na,b,1\nb,c,{cell}\nc,a,2\n", weight="w")
    (finding,) = data_error(root).findings
    assert (finding.level, finding.file, finding.line, finding.column, finding.value) == (
        "error", EDGES, 3, "w", cell)
    assert finding.message == message


@pytest.mark.parametrize("weight_means, reason", [
    ("strength", "as a tie strength it would become an infinite path length"),
    ("distance", "as a distance it would make the tie infinitely strong"),
])
@pytest.mark.parametrize("cell", ["0", "0.0", "-0"])
def test_zero_weight_is_refused_with_its_line(tmp_path, weight_means, reason, cell):
    root = edge_study(tmp_path, f"source,target,w\na,b,1\nb,c,{cell}\n", weight="w",
                      weight_means=weight_means)
    (finding,) = data_error(root).findings
    assert (finding.level, finding.line, finding.column, finding.value) == ("error", 3, "w", cell)
    assert finding.message.startswith("weight is 0: " + reason)


def test_every_bad_row_is_reported_at_once(tmp_path):
    root = edge_study(tmp_path, "source,target,w\na,b,x\nb,c,1\nc,d,-1\n,d,2\n", weight="w")
    error = data_error(root)
    assert [(f.line, f.column, f.value) for f in error.findings] == [
        (2, "w", "x"), (4, "w", "-1"), (5, "source", "")]
    assert error.exit_code == 1
    assert error.format_message().splitlines()[0] == (
        "data/edges.csv, line 2, column 'w': weight is not a number (value: 'x')")


def test_line_numbers_count_blank_lines_and_quoted_line_breaks(tmp_path):
    edges = 'source,target,w,note\na,b,1,"first\nsecond"\n\nb,c,oops,plain\n'
    (finding,) = data_error(edge_study(tmp_path, edges, weight="w")).findings
    # the header is line 1, the quoted note spans lines 2-3, line 4 is blank: the row is line 5
    assert (finding.line, finding.value) == (5, "oops")


def test_empty_file_is_refused(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "")).findings
    assert (finding.file, finding.line) == (EDGES, None)
    assert finding.message == "is empty; it needs a header row and data rows"


@pytest.mark.parametrize("text", ["source,target\n", "source,target\n\n\n", "source,target"])
def test_header_only_file_is_refused(tmp_path, text):
    (finding,) = data_error(edge_study(tmp_path, text)).findings
    assert (finding.file, finding.line) == (EDGES, 1)
    assert finding.message == "has a header row but no data rows"


def test_header_only_node_list_is_refused(tmp_path):
    root = edge_study(tmp_path, "source,target\na,b\n", nodes="id,unit\n")
    (finding,) = data_error(root).findings
    assert (finding.file, finding.message) == (NODES, "has a header row but no data rows")


def test_missing_column_is_refused_listing_the_columns_that_are_there(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "from,to\na,b\n")).findings
    assert (finding.file, finding.line, finding.column) == (EDGES, 1, "source")
    assert finding.message == ("the edge list has no column 'source'; the columns are 'from', "
                               "'to' (set the column name in study.toml)")


def test_missing_weight_column_is_refused(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "source,target,weight\na,b,1\n",
                                       weight="times")).findings
    assert finding.column == "times"
    assert "the columns are 'source', 'target', 'weight'" in finding.message


def test_missing_node_id_and_label_columns_are_refused(tmp_path):
    (finding,) = data_error(edge_study(tmp_path / "a", "source,target\na,b\n",
                                       nodes="code\na\nb\n")).findings
    assert (finding.file, finding.column) == (NODES, "id")
    assert finding.message.startswith("the node list has no column 'id'; the columns are 'code'")
    (finding,) = data_error(edge_study(tmp_path / "b", "source,target\na,b\n",
                                       nodes="id\na\nb\n", label="name")).findings
    assert finding.column == "name"


def test_row_with_the_wrong_number_of_values_is_refused_with_its_line(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "source,target\na,b\nb,c,d\n")).findings
    assert (finding.line, finding.value) == (3, "b,c,d")
    assert finding.message.startswith("has 3 values where the header has 2 columns; check for")


def test_utf8_file_with_byte_order_mark_is_read(tmp_path):
    edges = "\ufeffsource,target\nä1,b\n".encode("utf-8")
    nodes = "\ufeffid,place\nä1,café\nb,kiosk\n".encode("utf-8")
    clean = load_network(edge_study(tmp_path, edges, nodes=nodes))
    assert list(clean.nodes.index) == ["b", "ä1"]
    assert clean.nodes.loc["ä1", "place"] == "café"
    assert edge_rows(clean) == [("b", "ä1")]


def test_latin1_file_is_refused_naming_the_line(tmp_path):
    nodes = "id,place\na,north\nb,café\n".encode("latin-1")
    (finding,) = data_error(edge_study(tmp_path, "source,target\na,b\n", nodes=nodes)).findings
    assert (finding.file, finding.line) == (NODES, 3)
    assert finding.message.startswith("is not UTF-8 text: byte 0xE9 cannot be read")


# ---------------------------------------------------------------------------------------------
# Edge lists: fixes


@pytest.mark.parametrize("rule, merged", [("sum", 12.0), ("mean", 4.0), ("max", 7.0)])
def test_repeated_ties_are_merged_as_the_duplicates_rule_says(tmp_path, rule, merged):
    edges = "source,target,w\na,b,2\nb,c,1\na,b,3\na,b,7\n"
    clean = load_network(edge_study(tmp_path, edges, weight="w", directed=True, duplicates=rule))
    assert edge_rows(clean) == [("a", "b", merged), ("b", "c", 1.0)]
    finding = only(clean.checks.findings, "fix")
    assert (finding.file, finding.count) == (EDGES, 2)
    assert finding.message == f"2 repeated ties merged, weights combined by {rule}; lines 2, 4, 5"


def test_undirected_ties_in_either_direction_count_as_repeats(tmp_path):
    edges = "source,target,w\na,b,2\nb,a,3\nc,b,1\n"
    clean = load_network(edge_study(tmp_path, edges, weight="w"))
    assert edge_rows(clean) == [("a", "b", 5.0), ("b", "c", 1.0)]  # source first in node order
    finding = only(clean.checks.findings, "fix")
    assert finding.count == 1
    assert finding.message == ("1 repeated ties (either direction, as the network is undirected) "
                               "merged, weights combined by sum; lines 2, 3")


def test_directed_ties_in_opposite_directions_are_not_repeats(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\na,b\nb,a\n", directed=True))
    assert edge_rows(clean) == [("a", "b"), ("b", "a")]
    assert clean.checks.findings == []


def test_repeated_unweighted_ties_are_kept_once(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\na,b\na,b\nb,c\n"))
    assert edge_rows(clean) == [("a", "b"), ("b", "c")]
    assert list(clean.edges.columns) == ["source", "target"]
    assert only(clean.checks.findings, "fix").message == (
        "1 repeated ties (either direction, as the network is undirected) merged, kept once; "
        "lines 2, 3")


def test_self_loops_are_removed_and_counted_with_their_lines(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\nb,b\na,b\na,a\n"))
    assert edge_rows(clean) == [("a", "b")]
    finding = only(clean.checks.findings, "fix")
    assert (finding.file, finding.count, finding.value) == (EDGES, 2, "b")
    assert finding.message == ("2 self-loops removed (a tie from a node to itself) on lines "
                               "2, 4")
    assert list(clean.nodes.index) == ["a", "b"]


def test_many_lines_are_listed_up_to_twenty_then_counted(tmp_path):
    edges = "source,target\n" + "a,a\n" * 25 + "a,b\n"
    finding = only(load_network(edge_study(tmp_path, edges)).checks.findings, "fix")
    assert finding.count == 25
    assert finding.message.endswith("on lines " + ", ".join(str(i) for i in range(2, 22))
                                    + " and 5 more")


def test_cells_are_stripped_of_surrounding_spaces(tmp_path):
    clean = load_network(edge_study(tmp_path, "source , target,w\n a ,b , 2 \n", weight="w",
                                    directed=True))
    assert edge_rows(clean) == [("a", "b", 2.0)]


# ---------------------------------------------------------------------------------------------
# Adjacency matrices


def test_directed_matrix_rows_are_sources_and_cells_weights(tmp_path):
    matrix = ",a,b,c\na,0,2,\nb,0,0,3\nc,1.5,0,0\n"
    clean = load_network(matrix_study(tmp_path, matrix, directed=True))
    assert clean.weighted
    assert edge_rows(clean) == [("a", "b", 2.0), ("b", "c", 3.0), ("c", "a", 1.5)]


def test_symmetric_zero_one_matrix_is_an_unweighted_undirected_network(tmp_path):
    matrix = ",x,y,z\nx,0,1,1\ny,1,0,0\nz,1,0,0\n"
    clean = load_network(matrix_study(tmp_path, matrix))
    assert not clean.weighted
    assert edge_rows(clean) == [("x", "y"), ("x", "z")]


def test_matrix_diagonal_is_removed_as_self_loops(tmp_path):
    clean = load_network(matrix_study(tmp_path, ",a,b\na,4,1\nb,1,0\n"))
    assert edge_rows(clean) == [("a", "b", 1.0)]
    assert only(clean.checks.findings, "fix").message.endswith("on line 2")


def test_asymmetric_undirected_matrix_names_the_first_asymmetric_cell(tmp_path):
    matrix = ",a,b,c\na,0,1,0\nb,1,0,2\nc,0,5,0\n"  # b-c and c-b differ; so would a-c if swapped
    (finding,) = data_error(matrix_study(tmp_path, matrix)).findings
    assert (finding.file, finding.line, finding.column, finding.value) == (MATRIX, 3, "c", "2")
    assert finding.message == ("the network is undirected but the matrix is not symmetric: row 'b' "
                               "column 'c' holds 2, row 'c' column 'b' holds 5")


def test_matrix_labels_that_differ_are_refused(tmp_path):
    (finding,) = data_error(matrix_study(tmp_path, ",a,b,c\na,0,1,0\nb,1,0,0\nd,0,0,0\n")).findings
    assert (finding.file, finding.line, finding.value) == (MATRIX, 4, "d")  # the row's own line
    assert finding.message == ("an adjacency matrix needs the same labels in its header row and "
                               "first column: row label 'd' has no column")


def test_matrix_with_a_repeated_column_label_is_refused(tmp_path):
    (finding,) = data_error(matrix_study(tmp_path, ",a,a\na,0,1\nb,1,0\n")).findings
    assert (finding.line, finding.value) == (1, "a")


def test_bad_matrix_cell_names_its_line_and_column_label(tmp_path):
    (finding,) = data_error(matrix_study(tmp_path, ",a,b\na,0,x\nb,1,0\n", directed=True)).findings
    assert (finding.line, finding.column, finding.value) == (2, "b", "x")
    assert finding.message == "weight is not a number"


def test_undirected_matrix_ids_with_equal_natural_order_keep_one_tie(tmp_path):
    clean = load_network(matrix_study(tmp_path, ",a1,a01\na1,0,3\na01,3,0\n"))
    assert [w for _, _, w in edge_rows(clean)] == [3.0]
    assert [f for f in clean.checks.findings if f.level == "fix"] == []


# ---------------------------------------------------------------------------------------------
# Order of rows does not matter


def _analysis_of(root):
    # igraph's eigenvector solver draws on Python's global random generator, which moves its
    # last bits (see the xfail test below); pin it so these tests see only the row order.
    random.seed(0)
    return analyse(load_network(root), runs=5)


def _same(first, second) -> None:
    pd.testing.assert_frame_equal(first.measures, second.measures, check_exact=True)
    assert first.statistics == second.statistics
    assert first.communities == second.communities
    assert first.layout == second.layout
    pd.testing.assert_frame_equal(first.edges, second.edges, check_exact=True)
    pd.testing.assert_frame_equal(first.nodes, second.nodes, check_exact=True)


def _directed_rows() -> tuple[list[tuple], list[tuple]]:
    graph = directed_weighted_graph()
    edges = [(u, v, d["weight"]) for u, v, d in graph.edges(data=True)]
    # repeats whose float sum depends on the order of addition: 0.1 + 0.2 + 0.7 != 0.7 + 0.2 + 0.1
    edges += [("b4", "a9", 0.1), ("b4", "a9", 0.2), ("b4", "a9", 0.7)]
    nodes = [(n, d["team"] or "", d["years"]) for n, d in graph.nodes(data=True)]
    return edges, nodes


def _write_directed(root, edges, nodes):
    return edge_study(root, csv_text(("source", "target", "w"), edges),
                      nodes=csv_text(("id", "team", "years"), nodes), weight="w", directed=True)


@pytest.fixture(scope="module")
def directed_baseline(tmp_path_factory):
    edges, nodes = _directed_rows()
    return _analysis_of(_write_directed(tmp_path_factory.mktemp("base"), edges, nodes))


@settings(max_examples=8, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(order=st.randoms(use_true_random=False))
def test_shuffled_rows_give_identical_results(order, directed_baseline, tmp_path_factory):
    edges, nodes = _directed_rows()
    order.shuffle(edges)
    order.shuffle(nodes)
    shuffled = _analysis_of(_write_directed(tmp_path_factory.mktemp("shuffled"), edges, nodes))
    _same(directed_baseline, shuffled)


@pytest.mark.parametrize("shuffle_seed", [1, 2, 3])
def test_shuffled_and_flipped_undirected_rows_give_identical_results(tmp_path, shuffle_seed):
    graph = karate_graph()
    rows = [(u, v) for u, v in graph.edges]
    nodes = [(n, graph.nodes[n]["club"]) for n in graph.nodes]
    base = _analysis_of(edge_study(tmp_path / "base", csv_text(("source", "target"), rows),
                                   nodes=csv_text(("id", "club"), nodes)))
    rng = random.Random(shuffle_seed)
    flipped = [(v, u) if rng.random() < 0.5 else (u, v) for u, v in rows]  # a-b is b-a
    rng.shuffle(flipped)
    rng.shuffle(nodes)
    other = _analysis_of(edge_study(tmp_path / "other", csv_text(("source", "target"), flipped),
                                    nodes=csv_text(("id", "club"), nodes)))
    _same(base, other)


def test_analysis_does_not_depend_on_the_global_random_generator(tmp_path):
    graph = karate_graph()
    clean = load_network(edge_study(tmp_path, csv_text(("source", "target"), graph.edges)))
    results = []
    for state in (1, 2):  # stands for two fresh processes, whose generators differ
        random.seed(state)
        results.append(analyse(clean, runs=2).measures)
    # Same inputs and seed give byte-identical output (README, Output reference).
    pd.testing.assert_frame_equal(results[0], results[1], check_exact=True)


def test_node_order_is_the_same_in_every_process(tmp_path):
    (tmp_path / "data").mkdir()
    (tmp_path / "data" / "edges.csv").write_text("source,target\na1,b\na01,b\n")
    (tmp_path / "study.toml").write_text(
        '[study]\ntitle = "t"\n[[network]]\nid = "n"\nedges = "data/edges.csv"\n')
    script = textwrap.dedent(f"""
        from generator.config import load_study
        from generator.ingest import read_network
        study = load_study({str(tmp_path)!r})
        print(list(read_network(study, study.networks[0]).nodes.index))
    """)
    orders = set()
    for hash_seed in range(3):  # with these hash seeds the two orders both occur (checked)
        done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                              env={"PYTHONHASHSEED": str(hash_seed), "PATH": ""}, check=True)
        orders.add(done.stdout.strip())
    assert len(orders) == 1, orders


# --- Odd but realistic input found in review --------------------------------------------------


def test_label_may_be_the_id_column_itself(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\na,b\n", nodes="id,team\na,x\nb,y\n",
                                    label="id"))
    assert list(clean.nodes["label"]) == ["a", "b"]
    assert clean.attributes == ("team",)


def test_codes_with_leading_zeros_stay_text_and_plain_numbers_become_numbers(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\na,b\n",
                                    nodes="id,zip,year,share\na,01234,2015,0.5\nb,20000,2016,1\n"))
    assert list(clean.nodes["zip"]) == ["01234", "20000"]
    assert list(clean.nodes["year"]) == [2015, 2016]
    assert pd.api.types.is_integer_dtype(clean.nodes["year"].dtype)
    assert pd.api.types.is_float_dtype(clean.nodes["share"].dtype)


@pytest.mark.parametrize("text", ["1_000", "\u0663", "1,5", "0x10", "1.2.3"])
def test_weights_must_be_plain_decimal_numbers(tmp_path, text):
    edges = f'source,target,w\na,b,"{text}"\n'
    (finding,) = data_error(edge_study(tmp_path, edges, weight="w")).findings
    assert (finding.line, finding.column, finding.value) == (2, "w", text)
    assert finding.message.startswith("weight is not a number")
    # A decimal comma gets a hint on how to declare it; the other forms need none.
    assert ("decimal = \",\"" in finding.message) == (text == "1,5")


def test_a_repeated_column_name_is_refused(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "source,target,source\na,b,c\n")).findings
    assert (finding.file, finding.line, finding.column) == (EDGES, 1, "source")
    assert "repeated in the header row" in finding.message


def test_an_id_with_a_line_break_is_refused_but_a_quoted_note_may_span_lines(tmp_path):
    (finding,) = data_error(edge_study(tmp_path / "a", 'source,target\n"a\nb",c\n')).findings
    assert (finding.line, finding.column, finding.value) == (2, "source", "a\nb")
    clean = load_network(edge_study(tmp_path / "b", 'source,target,note\na,b,"two\nlines"\n'))
    assert len(clean.edges) == 1


def test_spaces_around_ids_are_removed_and_reported(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\n a,b\nb,c \nc,a\n"))
    assert list(clean.nodes.index) == ["a", "b", "c"]
    fixes = [f for f in clean.checks.findings if "spaces" in f.message]
    assert [(f.column, f.line, f.count) for f in fixes] == [("source", 2, 1), ("target", 3, 1)]


# ---------------------------------------------------------------------------------------------
# Messy files from spreadsheets and survey tools: nothing is silently misread


def test_unclosed_quote_in_a_node_list_is_an_error_naming_the_line_where_it_opened(tmp_path):
    nodes = 'id,clinic,note\na,north,ok\nb,south,"starts here\nc,east,x\nd,west,y\ne,north,z\n'
    root = edge_study(tmp_path, "source,target\na,b\nc,d\nd,e\n", nodes=nodes)
    (finding,) = data_error(root).findings
    assert (finding.file, finding.line) == (NODES, 3)
    assert "never closed" in finding.message


def test_a_quoted_value_spanning_too_many_lines_is_refused_but_a_short_one_is_read(tmp_path):
    long_note = "\n".join(f"line {i}" for i in range(12))
    nodes = f'id,note\na,"{long_note}"\nb,"two\nlines"\n'
    (finding,) = data_error(edge_study(tmp_path / "long", "source,target\na,b\n", nodes=nodes)).findings
    assert (finding.file, finding.line) == (NODES, 2)
    assert "runs over 12 lines" in finding.message
    clean = load_network(edge_study(tmp_path / "short", "source,target\na,b\n",
                                    nodes='id,note\na,"two\nlines"\nb,x\n'))
    assert clean.nodes.loc["a", "note"] == "two\nlines"


def test_an_edge_list_naming_every_tie_in_both_directions_is_read_once(tmp_path):
    # Undirected lists exported with each tie twice (a,b,3 and b,a,3) must not double strengths.
    edges = "source,target,w\na,b,3\nb,a,3\nb,c,1\nc,b,1\n"
    clean = load_network(edge_study(tmp_path, edges, weight="w"))
    assert [tuple(r) for r in clean.edges.itertuples(index=False)] == [("a", "b", 3.0),
                                                                      ("b", "c", 1.0)]
    fix = only(clean.checks.findings, "fix")
    assert "listed twice, once in each direction" in fix.message and fix.count == 2
    strengths = analyse(clean).measures["strength"].to_dict()
    assert strengths == {"a": 3.0, "b": 4.0, "c": 1.0}


def test_some_ties_in_both_directions_follow_duplicates_with_a_warning_that_counts_them(tmp_path):
    edges = "source,target,w\na,b,3\nb,a,3\nb,c,1\n"
    clean = load_network(edge_study(tmp_path, edges, weight="w"))
    assert list(clean.edges["weight"]) == [6.0, 1.0]  # duplicates = "sum", as configured
    warning = only(clean.checks.findings, "warning")
    assert (warning.count, warning.line) == (1, 2)
    assert "'a','b' on line 2 and 'b','a' on line 3" in warning.message


def test_repeated_distances_add_their_strengths_so_a_repeat_is_never_weaker(tmp_path):
    # Summing lengths would turn two ties of distance 2 into one of distance 4 (weaker than
    # either); adding strengths 1/2 + 1/2 gives distance 1 (the harmonic rule, exact fractions).
    edges = "source,target,d\na,b,2\na,b,2\nb,c,3\nb,c,6\nc,d,5\n"
    clean = load_network(edge_study(tmp_path, edges, weight="d", weight_means="distance",
                                    directed=True))
    assert list(clean.edges["weight"]) == [1.0, 2.0, 5.0]
    assert "adding their strengths" in only(clean.checks.findings, "fix").message


def test_trailing_empty_columns_from_a_spreadsheet_are_dropped_with_a_fix(tmp_path):
    nodes = "id,clinic,,\na,north,,\nb,south,,\n"
    clean = load_network(edge_study(tmp_path, "source,target,\na,b,\n", nodes=nodes))
    assert clean.attributes == ("clinic",)
    dropped = [f for f in clean.checks.findings if "empty column" in f.message]
    assert sorted((f.file, f.count) for f in dropped) == [(EDGES, 1), (NODES, 2)]


def test_a_column_with_no_name_but_values_is_refused(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "source,,target\na,x,b\n")).findings
    assert (finding.line, finding.value) == (2, "x")
    assert "column 2 has no name" in finding.message


def test_survey_export_with_question_and_import_code_rows_is_refused_naming_them(tmp_path):
    nodes = ("id,clinic,years\n"
             "Respondent ID,Which clinic do you work at?,How many years in post?\n"
             '{"ImportId":"QID1"},{"ImportId":"QID2"},{"ImportId":"QID3"}\n'
             "a,north,3\nb,south,4\nc,east,10\nd,west,1\n")
    root = edge_study(tmp_path, "source,target\na,b\nb,c\nc,d\n", nodes=nodes)
    (finding,) = data_error(root).findings
    assert (finding.file, finding.line, finding.value) == (NODES, 2, "Respondent ID")
    assert "column 'years' holds 'How many years in post?'" in finding.message
    assert "delete lines 2-3" in finding.message


def test_import_code_row_in_an_edge_list_is_refused(tmp_path):
    edges = 'source,target\n{"ImportId":"QID1"},{"ImportId":"QID2"}\na,b\n'
    (finding,) = data_error(edge_study(tmp_path, edges)).findings
    assert (finding.line, finding.column) == (2, "source")
    assert "import code" in finding.message


def test_a_node_missing_from_ties_with_ordinary_values_is_not_taken_for_a_header(tmp_path):
    nodes = "id,years\nz,5\na,3\nb,4\nc,10\n"
    clean = load_network(edge_study(tmp_path, "source,target\na,b\nb,c\n", nodes=nodes))
    assert list(clean.nodes.index) == ["a", "b", "c", "z"]


def test_ids_are_normalised_to_nfc_so_one_name_typed_two_ways_is_one_node(tmp_path):
    composed, decomposed = "Zo\u00eb", "Zoe\u0308"
    clean = load_network(edge_study(tmp_path, f"source,target\n{composed},b\n{decomposed},c\n"))
    assert list(clean.nodes.index) == [composed, "b", "c"]
    fix = next(f for f in clean.checks.findings if "Unicode NFC" in f.message)
    assert (fix.file, fix.line) == (EDGES, 3)


def test_ids_equal_apart_from_case_stay_apart_with_a_warning(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target\na,b\nA,b\n"))
    assert list(clean.nodes.index) == ["A", "a", "b"]
    warning = only(clean.checks.findings, "warning")
    # Each spelling with the line that first writes it (a ends line 2, A line 3).
    assert "'A' (line 3) and 'a' (line 2)" in warning.message
    assert (warning.file, warning.line) == (EDGES, 3)


def test_ids_equal_apart_from_case_are_located_in_the_node_list_and_the_ties(tmp_path):
    # 'Ana' is listed on line 2 of the node list; 'ana' is only in the ties, on line 3.
    clean = load_network(edge_study(tmp_path, "source,target\nAna,b\nana,b\n",
                                    nodes="id\nAna\nb\n"))
    warning = only(clean.checks.findings, "warning")
    assert "'Ana' (line 2) and 'ana' (data/edges.csv, line 3)" in warning.message
    assert (warning.file, warning.line) == ("data/nodes.csv", 2)


def test_unused_edge_columns_are_named_with_a_hint_when_a_weight_key_is_missing(tmp_path):
    clean = load_network(edge_study(tmp_path, "source,target,weight,note\na,b,2,x\nb,c,1,y\n"))
    assert not clean.weighted
    note = next(f for f in clean.checks.findings if "not used" in f.message)
    assert note.level == "note" and note.count == 2
    assert "columns 'weight', 'note' are not used" in note.message
    assert 'set weight = "weight"' in note.message


def test_semicolon_file_is_refused_with_the_key_to_set(tmp_path):
    (finding,) = data_error(edge_study(tmp_path, "source;target;w\na;b;1,5\n")).findings
    assert finding.line == 1
    assert "seems to use ';' between values" in finding.message
    assert 'set delimiter = ";"' in finding.message and 'decimal = ","' in finding.message


def test_semicolons_and_decimal_commas_are_read_when_declared(tmp_path):
    root = edge_study(tmp_path, "source;target;w\na;b;1,5\nb;c;2\n", weight="w", delimiter=";",
                      decimal=",", nodes="id;share\na;0,25\nb;1\nc;0,5\n")
    clean = load_network(root)
    assert list(clean.edges["weight"]) == [1.5, 2.0]
    assert list(clean.nodes["share"]) == [0.25, 1.0, 0.5]


def test_a_tab_separated_file_is_read_with_its_delimiter(tmp_path):
    clean = load_network(edge_study(tmp_path, "source\ttarget\na\tb\n", delimiter="\t"))
    assert [tuple(r) for r in clean.edges.itertuples(index=False)] == [("a", "b")]


def test_blank_lines_before_the_header_are_skipped_and_lines_still_count(tmp_path):
    clean = load_network(edge_study(tmp_path, "\n\nsource,target\na,b\nb,b\n"))
    skipped = next(f for f in clean.checks.findings if "blank lines before the header" in f.message)
    assert (skipped.line, skipped.count) == (3, 2)
    loop = next(f for f in clean.checks.findings if "self-loop" in f.message)
    assert loop.line == 5  # line numbers are those of the file, blank lines included
