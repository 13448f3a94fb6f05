"""The registry of measures and statistics and the one formatter (generator/vocabulary/): every
result has its words, readings claim no more than their band allows, numbers read one way."""

from __future__ import annotations

import ast
import math
from pathlib import Path

import pytest
from conftest import analyse, directed_weighted_graph, graph_study, karate_graph, load_network

from generator.vocabulary import (
    MEASURE_NAMES,
    MEASURES,
    NEUTRAL_BELOW,
    REFERENCES,
    STATISTICS,
    Reading,
    count_of,
    exact_text,
    file_size,
    list_in_words,
    measure,
    node_name,
    number,
    omission_reason,
    reading,
    share,
    signed,
    statistic,
    statistic_title,
    undefined_reason,
    value_text,
)
from generator.vocabulary.measures import OMISSION_REASONS
from generator.vocabulary.statistics import UNDEFINED_REASONS

GENERATOR = Path(__file__).resolve().parents[1] / "generator"


# ---------------------------------------------------------------------------------------------
# One formatter


@pytest.mark.parametrize("value, text", [
    (0, "0"), (3, "3"), (1234, "1,234"), (2.0, "2"), (0.10684, "0.107"), (0.5, "0.5"),
    (12.345, "12.3"), (1234.5, "1,230"), (99.96, "100"), (0.000146, "0.000146"),
    (-0.0612, "-0.0612"), (float("nan"), "\u2014"), (None, "\u2014"), (math.inf, "\u221e"),
])
def test_numbers_read_with_three_significant_digits_and_never_an_exponent(value, text):
    assert number(value) == text


@pytest.mark.parametrize("value, text", [
    (0.0, "0%"), (0.004, "under 1%"), (0.25, "25%"), (0.996, "over 99%"), (1.0, "100%"),
])
def test_shares_never_round_a_partial_share_to_none_or_all(value, text):
    assert share(value) == text


@pytest.mark.parametrize(("size", "text"), [
    (0, "0 bytes"), (1, "1 byte"), (999, "999 bytes"), (1000, "1.0 kB"), (4_249, "4.2 kB"),
    (999_949, "999.9 kB"), (999_999, "1.0 MB"), (3_400_000, "3.4 MB"), (2_500_000_000, "2.5 GB")])
def test_file_sizes_read_in_decimal_units(size, text):
    # Decimal prefixes (1 kB = 1000 bytes), as the SI defines them: common practice in file managers.
    assert file_size(size) == text


def test_counts_plurals_lists_and_names():
    assert (count_of(1, "node"), count_of(1200, "community", "communities")) == (
        "1 node", "1,200 communities")
    assert list_in_words(["a", "b", "c"]) == "a, b and c"
    assert list_in_words([str(i) for i in range(12)], limit=3) == "0, 1, 2 and 9 more"
    assert node_name("Ana", "s1") == "Ana (s1)" and node_name("s1", "s1") == "s1"


def test_attribute_values_keep_whole_numbers_as_written():
    # Years and codes: 2015 is not 2,015 (only counts and measures get separators).
    assert (value_text(2015), value_text(2015.0), value_text("007"), value_text(0.12345)) == (
        "2015", "2015", "007", "0.123")
    assert value_text(None) == "\u2014"


def test_exact_text_keeps_full_precision_for_the_csv_files():
    assert (exact_text(60.0), exact_text(0.1 + 0.2), exact_text(None)) == (
        "60", "0.30000000000000004", "")


def test_signed_never_prints_minus_zero():
    assert (signed(-0.001), signed(0.144)) == ("0.00", "0.14")


# ---------------------------------------------------------------------------------------------
# One registry


def test_every_measure_the_analysis_writes_has_an_entry(tmp_path):
    directed = analyse(load_network(graph_study(tmp_path / "d", directed_weighted_graph(),
                                                weight="weight")))
    karate = analyse(load_network(graph_study(tmp_path / "k", karate_graph())))
    for analysis in (directed, karate):
        for column in analysis.measures.columns:
            entry = measure(column)
            assert entry.title and entry.definition and entry.meaning, column
            assert all(key in REFERENCES for key in entry.references), column
        for stat in analysis.statistics:
            entry = statistic(stat.name)
            assert entry.title and entry.definition, stat.name
            assert all(key in REFERENCES for key in entry.references), stat.name
            if stat.value is not None:
                assert reading(stat.name, Reading(value=stat.value, weighted=analysis.weighted,
                                                  steps=stat.steps)).endswith(".")
            else:
                assert stat.why in UNDEFINED_REASONS


def test_every_reason_key_the_analysis_gives_has_words():
    assert omission_reason("several_components", 3).startswith("the ties form 3 separate")
    assert set(OMISSION_REASONS) == {"no_ties", "not_strongly_connected", "several_components"}
    assert undefined_reason("one_value") == "Every node has the same value."


def test_measure_and_statistic_names_are_unique_and_titles_capitalised():
    assert len(MEASURE_NAMES) == len(set(MEASURE_NAMES)) == len(MEASURES)
    names = [s.name for s in STATISTICS]
    assert len(names) == len(set(names))
    for entry in (*MEASURES, *STATISTICS):
        assert entry.title[0].isupper(), entry.name
    assert statistic_title("assortativity:clinic") == "Attribute assortativity: clinic"


def _string_lists(path: Path) -> list[tuple[int, list[str]]]:
    found = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, (ast.Tuple, ast.List, ast.Set)):
            items = [e.value for e in node.elts if isinstance(e, ast.Constant)
                     and isinstance(e.value, str)]
            found.append((node.lineno, items))
    return found


def test_no_module_outside_the_registry_keeps_its_own_list_of_measure_names():
    for path in sorted(GENERATOR.rglob("*.py")):
        if path.parent.name == "vocabulary":
            continue
        for line, items in _string_lists(path):
            named = [i for i in items if i in MEASURE_NAMES]
            assert len(named) < 3, f"{path.relative_to(GENERATOR)}:{line} lists {named}"


def _docstrings(tree: ast.AST) -> set[int]:
    kinds = (ast.Module, ast.FunctionDef, ast.ClassDef, ast.AsyncFunctionDef)
    return {id(node.body[0].value) for node in ast.walk(tree)
            if isinstance(node, kinds) and node.body and isinstance(node.body[0], ast.Expr)
            and isinstance(node.body[0].value, ast.Constant)}


def test_the_analysis_holds_no_sentence_meant_for_a_reader():
    # igraph's own warning text, matched to silence it, is the one string of several words.
    allowed = {"Some eigenvector centralities are nearly zero"}
    for path in sorted((GENERATOR / "analyse").glob("*.py")):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        docs = _docstrings(tree)
        for node in ast.walk(tree):
            if (isinstance(node, ast.Constant) and isinstance(node.value, str)
                    and id(node) not in docs and node.value not in allowed):
                assert len(node.value.split()) <= 3, f"{path.name}:{node.lineno} {node.value!r}"


# ---------------------------------------------------------------------------------------------
# Readings at the edges of their bands


def _read(name: str, value: float, **facts) -> str:
    return reading(name, Reading(value=value, **facts))


@pytest.mark.parametrize("value, phrase", [
    (0.0, "no clear tendency"), (NEUTRAL_BELOW - 1e-9, "no clear tendency"),
    (-(NEUTRAL_BELOW - 1e-9), "no clear tendency"),
    (NEUTRAL_BELOW, "ties join nodes of similar degree more often than random mixing would"),
    (0.5, "ties join nodes of similar degree more often than random mixing would"),
    (-0.1, "ties join well-tied nodes with little-tied ones more often than random mixing"),
    (-0.5, "ties join well-tied nodes with little-tied ones"),
])
def test_degree_assortativity_reading_bands(value, phrase):
    # Untested, a reading describes the value and claims no preference however large r is.
    text = _read("degree_assortativity", value)
    assert phrase in text
    assert "prefer" not in text and "lean" not in text
    assert (("so it claims no tendency" in text) == (abs(value) >= NEUTRAL_BELOW))
    assert f"r = {number(value)}" in text  # the same precision as the value column


def test_attribute_assortativity_reading_names_the_attribute_and_its_kind():
    assert _read("assortativity:clinic", 0.72, attribute="clinic") == (
        "r = 0.72: ties join nodes of the same clinic more often than random mixing would. This "
        "was not tested against chance, so it claims no tendency.")
    assert _read("assortativity:years", -0.06, attribute="years", numeric=True) == (
        "Ties show no clear tendency to join nodes with similar years or with different years "
        "(r = -0.06).")
    assert "of a different clinic" in _read("assortativity:clinic", -0.2, attribute="clinic")


@pytest.mark.parametrize("value, level", [
    (0.2999, "A weak community structure"), (0.3, "A clear community structure"),
    (0.3999, "A clear community structure"), (0.4, "A strong community structure"),
])
def test_modularity_reading_bands(value, level):
    assert _read("modularity", value).startswith(f"{level}: Q = {number(value)}")


def test_path_readings_give_steps_for_weighted_networks():
    assert _read("average_path_length", 2.0) == "Connected pairs are on average 2 steps (ties) apart."
    assert _read("diameter", 1.0) == "No two connected nodes are more than 1 step (ties) apart."
    weighted = _read("average_path_length", 0.986, weighted=True, steps=2.31)
    assert weighted == ("Connected pairs are on average 0.986 apart in path length (1/weight per "
                        "tie). Counting every tie as one step, they are on average 2.31 steps "
                        "apart.")
    distance = _read("diameter", 7.5, weighted=True, weight_means="distance", steps=3.0)
    assert "in path length (the weight of each tie)" in distance and "3 steps apart" in distance


@pytest.mark.parametrize("name, value, text", [
    ("nodes", 1, "One node is in the network."),
    ("nodes", 1234, "1,234 nodes are in the network."),
    ("edges", 1, "One distinct tie remains after cleaning."),
    ("components", 1, "The network is one connected whole."),
    ("components", 3, "The network falls into 3 separate parts."),
    ("communities", 1, "One community was found."),
    ("density", 0.5, "50% of all possible ties are present."),
    ("density", 0.001, "under 1% of all possible ties are present."),
    ("reciprocity", 1.0, "100% of ties are returned."),
    ("degree_centralization", 1.0, "1 on a scale from 0 (all nodes equal) to 1 (a star)."),
])
def test_counted_and_percent_readings(name, value, text):
    assert _read(name, value) == text


# ---------------------------------------------------------------------------------------------
# Readings that know their test against rewired networks


def _null(name: str, observed: float, mean: float, p: float, *, below: int, above: int,
          samples: int = 200):
    from generator.analyse.nulls import NullTest

    return NullTest(name, observed, mean, 0.03, (observed - mean) / 0.03, p, samples, below, above,
                    None, ())


def test_an_assortativity_claims_a_preference_only_when_its_test_says_so():
    clear = _null("assortativity:clinic", 0.42, -0.02, 1 / 201, below=200, above=0)
    assert _read("assortativity:clinic", 0.42, attribute="clinic", test=clear) == (
        "Ties clearly prefer nodes alike in clinic: r = 0.42 is higher than in all 200 rewired "
        "networks with the same degrees, whose mean is -0.02 (p = 0.005, below 0.05).")
    unclear = _null("assortativity:clinic", 0.42, 0.38, 0.34, below=140, above=60)
    text = _read("assortativity:clinic", 0.42, attribute="clinic", test=unclear)
    assert text.startswith("No clear tendency to join nodes alike or unlike in clinic was found")
    assert "higher than in 140 of 200 rewired networks" in text
    assert "(p = 0.34, not below 0.05)" in text and "prefer" not in text
    untested = _read("assortativity:clinic", 0.42, attribute="clinic")
    assert "not tested against chance" in untested and "prefer" not in untested


def test_an_assortativity_below_its_rewired_networks_reads_as_avoidance():
    low = _null("assortativity:unit", -0.3, 0.0, 0.01, below=0, above=198)
    text = _read("assortativity:unit", -0.3, attribute="unit", test=low)
    assert text.startswith("Ties avoid nodes alike in unit, joining unlike ones more often than")
    assert "lower than in 198 of 200 rewired networks" in text and "(p = 0.01, below 0.05)" in text


def test_degree_assortativity_reads_against_its_rewired_networks_not_zero():
    # r is negative, but higher than every rewired network: compared with chance, ties join
    # nodes of similar degree more often.
    test = _null("degree_assortativity", -0.1, -0.3, 1 / 201, below=200, above=0)
    text = _read("degree_assortativity", -0.1, test=test)
    assert text.startswith("Ties join nodes of similar degree more often than chance would")
    unclear = _null("degree_assortativity", -0.1, -0.12, 0.6, below=120, above=80)
    assert _read("degree_assortativity", -0.1, test=unclear).startswith(
        "No clear tendency to join nodes of similar or of different degree was found")


def test_the_significance_table_readings_follow_p():
    from generator.vocabulary import null_reading

    assert null_reading(_null("transitivity", 0.5, 0.2, 1 / 201, below=200, above=0)) == (
        "Clustering (transitivity) is higher than in all 200 rewired networks with the same "
        "degrees (p = 0.005).")
    assert null_reading(_null("transitivity", 0.5, 0.2, 21 / 201, below=180, above=20)) == (
        "Clustering (transitivity) is not clearly different from rewired networks with the same "
        "degrees (p = 0.1).")
    assert null_reading(_null("modularity", 0.5, 0.2, 0.03, below=195, above=5)) == (
        "Modularity of the communities found is higher than in 195 of 200 rewired networks "
        "with the same degrees (p = 0.03).")
    assert null_reading(_null("reciprocity", 0.1, 0.2, 0.02, below=3, above=197)).startswith(
        "Reciprocity is lower than in 197 of 200")
