"""Relations on the same nodes: the [[relations]] table, its page, files and errors.

Checked against answers known by construction, against networkx (degrees), and the QAP
correlation and MRQAP coefficients against numpy (Pearson's r with ``numpy.corrcoef``, ordinary
least squares with ``numpy.linalg.lstsq``) on the same off-diagonal cells."""

from __future__ import annotations

import csv
import io
import json
import random

import networkx as nx
import numpy as np
import pytest
from conftest import analyse_graph, csv_text, write_study

from generator.analyse.compare import compare_relations, same_matrix
from generator.build import build_study
from generator.cli import main
from generator.config import load_study
from generator.errors import ConfigError

IDS = [f"p{i:02d}" for i in range(1, 21)]
UNITS = ["north"] * 7 + ["south"] * 7 + ["east"] * 6


def _ties(seed: int, count: int) -> list[tuple[str, str]]:
    rng = random.Random(seed)
    pairs: set[tuple[str, str]] = set()
    while len(pairs) < count:
        a, b = rng.sample(IDS, 2)
        pairs.add((a, b))
    return sorted(pairs)


def _relations_study(root, relations: str, *, second_nodes: str | None = None,
                     series: bool = False):
    nodes = csv_text(["id", "name", "unit", "years"],
                     [(n, f"Person {n}", UNITS[i], 2 + i % 9) for i, n in enumerate(IDS)])
    files = {"data/nodes.csv": nodes, "data/nodes2.csv": second_nodes or nodes,
             "data/help.csv": csv_text(["source", "target"], _ties(1, 60)),
             "data/work.csv": csv_text(["source", "target"], _ties(2, 40))}
    networks = [
        {"id": "help", "title": "Help", "edges": "data/help.csv", "nodes": "data/nodes.csv",
         "directed": True, "label": "name", **({"series": "team", "wave": 1} if series else {})},
        {"id": "work", "title": "Work", "edges": "data/work.csv", "nodes": "data/nodes2.csv",
         "label": "name", **({"series": "team", "wave": 2} if series else {})},
    ]
    write_study(root, networks=networks, files=files, study={"title": "Relations", "seed": 5})
    with open(root / "study.toml", "a", encoding="utf-8") as toml:
        toml.write("\n" + relations)
    return root


RELATIONS = '''[[relations]]
id = "help-and-work"
title = "Help and work"
networks = ["help", "work"]
permutations = 99
model = { outcome = "help", predictors = ["work"], same = ["unit"], difference = ["years"] }
'''


def test_compare_relations_against_numpy_and_networkx(tmp_path):
    # Built so the answers are known: ties a-b, b-c, c-d in the first, a-b, c-d, a-d in the
    # second: 2 shared of 4 in either, Jaccard 1/2.
    first = analyse_graph(tmp_path / "one", nx.Graph([("a", "b"), ("b", "c"), ("c", "d")]),
                          id="one")
    second = analyse_graph(tmp_path / "two", nx.Graph([("a", "b"), ("c", "d"), ("a", "d")]),
                           id="two")
    result = compare_relations("r", [first, second], permutations=49, seed=3)
    pair = result.pairs[0]
    assert pair.jaccard == pytest.approx(0.5)
    x = np.array([[0, 1, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1], [0, 0, 1, 0]], dtype=float)
    y = np.array([[0, 1, 0, 1], [1, 0, 0, 0], [0, 0, 0, 1], [1, 0, 1, 0]], dtype=float)
    upper = np.triu_indices(4, k=1)
    assert pair.qap.correlation == pytest.approx(np.corrcoef(x[upper], y[upper])[0, 1])
    assert result.nodes == ("a", "b", "c", "d")
    g2 = nx.Graph([("a", "b"), ("c", "d"), ("a", "d")])
    assert result.degrees == tuple((nx.path_graph("abcd").degree(n), g2.degree(n))
                                   for n in "abcd")


def test_identical_relations_give_correlation_one_and_the_smallest_p(tmp_path):
    graph = nx.gnm_random_graph(15, 30, seed=4)
    one = analyse_graph(tmp_path / "one", graph, id="one")
    two = analyse_graph(tmp_path / "two", graph, id="two")
    result = compare_relations("r", [one, two], permutations=99, seed=1)
    assert result.pairs[0].jaccard == 1.0
    assert result.pairs[0].qap.correlation == pytest.approx(1.0)
    assert result.pairs[0].qap.p == pytest.approx(1 / 100)  # 1 / (permutations + 1)


def test_a_relation_and_an_independent_random_one_get_a_large_p(tmp_path):
    one = analyse_graph(tmp_path / "one", nx.gnm_random_graph(25, 60, seed=1), id="one")
    two = analyse_graph(tmp_path / "two", nx.gnm_random_graph(25, 60, seed=2), id="two")
    result = compare_relations("r", [one, two], permutations=199, seed=7)
    again = compare_relations("r", [one, two], permutations=199, seed=7)
    assert result.pairs[0].qap.p is not None and result.pairs[0].qap.p > 0.1
    assert result == again  # the seed fixes every permutation


def test_the_model_is_least_squares_on_the_off_diagonal_cells(tmp_path):
    root = _relations_study(tmp_path / "s", RELATIONS)
    from generator.build import Progress, study_analyses
    from generator.cache import CACHE_DIR, ResultCache, analysis_key

    study = load_study(root)
    cache = ResultCache(root / CACHE_DIR, warn=print)
    cache.begin_build()
    analyses = study_analyses(study, {n.id: analysis_key(study, n) for n in study.networks},
                              Progress(quiet=True), cache)
    result = compare_relations("r", analyses, permutations=49, seed=5, outcome="help",
                               predictors=["work"], same=["unit"], difference=["years"])
    index = {n: k for k, n in enumerate(IDS)}
    help_m, work_m = np.zeros((20, 20)), np.zeros((20, 20))
    for a, b in _ties(1, 60):
        help_m[index[a], index[b]] = 1
    for a, b in _ties(2, 40):
        work_m[index[a], index[b]] = work_m[index[b], index[a]] = 1
    years = np.array([2 + i % 9 for i in range(20)], dtype=float)
    mask = ~np.eye(20, dtype=bool)  # help is directed: every ordered pair
    design = np.column_stack([np.ones(mask.sum()), work_m[mask], same_matrix(UNITS)[mask],
                              np.abs(years[:, None] - years[None, :])[mask]])
    reference, *_ = np.linalg.lstsq(design, help_m[mask], rcond=None)
    assert result.model is not None and result.model_directed
    assert [t.term for t in result.model.terms] == ["intercept", "work", "same:unit",
                                                    "difference:years"]
    assert [t.coefficient for t in result.model.terms] == pytest.approx(list(reference))
    assert result.model.dyads == 20 * 19


def test_a_relations_table_gets_its_page_files_and_resources(tmp_path):
    site = build_study(_relations_study(tmp_path / "s", RELATIONS)).output
    page = (site / "compare/help-and-work.html").read_text("utf-8")
    assert "<h1>Help and work</h1>" in page
    assert "permutations of the node labels" in page or "relabelled at random" in page
    assert "Same unit" in page and "Difference in years" in page
    assert "Person p01 (p01)" in page  # the degree table names nodes
    pairs = list(csv.DictReader(io.StringIO(
        (site / "files/relations/help-and-work/pairs.csv").read_text())))
    assert [(p["network_a"], p["network_b"], p["permutations"]) for p in pairs] == [
        ("help", "work", "99")]
    p = float(pairs[0]["qap_p"])
    assert 1 / 100 <= p <= 1 and round(p * 100) == p * 100  # (k + 1) / (permutations + 1)
    model = list(csv.DictReader(io.StringIO(
        (site / "files/relations/help-and-work/model.csv").read_text())))
    assert [row["term"] for row in model] == ["intercept", "work", "same:unit",
                                              "difference:years", "r_squared"]
    assert 0 <= float(model[-1]["coefficient"]) <= 1
    package = json.loads((site / "files/datapackage.json").read_text())
    names = {r["name"] for r in package["resources"]}
    assert {"relations-help-and-work-pairs", "relations-help-and-work-model"} <= names
    import frictionless

    report = frictionless.validate(str(site / "files/datapackage.json"))
    assert report.valid, report.flatten(["rowNumber", "fieldName", "message"])
    index = (site / "index.html").read_text("utf-8")
    assert 'href="compare/help-and-work.html"' in index  # in the navigation of every page
    methods = (site / "methods.html").read_text("utf-8")
    assert "Krackhardt, D.: QAP partialling as a test of spuriousness" in methods
    assert "Dekker, D., Krackhardt, D. &amp; Snijders, T. A. B." in methods
    assert "derives from the study seed 5" in methods
    downloads = (site / "downloads.html").read_text("utf-8")
    assert "files/relations/help-and-work/model.csv" in downloads


def test_a_relations_table_without_a_model_writes_only_the_pairs(tmp_path):
    root = _relations_study(tmp_path / "s", '[[relations]]\nid = "both"\n'
                            'networks = ["help", "work"]\npermutations = 19\n')
    site = build_study(root).output
    assert (site / "files/relations/both/pairs.csv").is_file()
    assert not (site / "files/relations/both/model.csv").exists()
    assert "What goes with" not in (site / "compare/both.html").read_text("utf-8")


def _error(root) -> ConfigError:
    with pytest.raises(ConfigError) as caught:
        build_study(root)
    return caught.value


def _line_of(root, text: str) -> int:
    lines = (root / "study.toml").read_text().splitlines()
    return next(i for i, line in enumerate(lines, start=1) if line.startswith(text))


def test_an_unknown_network_is_refused_with_its_line_and_value(tmp_path, capsys):
    root = _relations_study(tmp_path / "s", RELATIONS.replace('["help", "work"]',
                                                              '["help", "wrok"]'))
    assert main(["build", str(root), "--quiet"]) == 1
    err = capsys.readouterr().err
    assert f"study.toml, line {_line_of(root, 'networks =')}: [relations[1].networks]" in err
    assert "'wrok'" in err and "did you mean 'work'?" in err
    assert "Traceback" not in err
    assert not (root / "output").exists()


def test_networks_on_different_nodes_are_refused(tmp_path, capsys):
    fewer = csv_text(["id", "name", "unit", "years"],
                     [(n, n, UNITS[i], 3) for i, n in enumerate(IDS[:-1])]
                     + [("q99", "q99", "east", 3)])
    root = _relations_study(tmp_path / "s", RELATIONS, second_nodes=fewer)
    error = _error(root)
    assert error.line == _line_of(root, "networks =")
    assert "'help' and 'work' are not on the same nodes" in error.format_message()
    assert main(["check", str(root)]) == 1  # check finds it too
    assert "not on the same nodes" in capsys.readouterr().err


def test_an_unknown_or_text_attribute_in_the_model_is_refused(tmp_path):
    root = _relations_study(tmp_path / "s", RELATIONS.replace('same = ["unit"]',
                                                              'same = ["unti"]'))
    error = _error(root)
    assert error.line == _line_of(root, "model =")
    assert "'unti' is not a node attribute of 'help'; did you mean 'unit'?" in str(error)
    root = _relations_study(tmp_path / "t", RELATIONS.replace('difference = ["years"]',
                                                              'difference = ["unit"]'))
    assert "'difference' needs a numeric attribute" in str(_error(root))


def test_a_duplicate_id_or_one_clashing_with_a_series_is_refused(tmp_path):
    root = _relations_study(tmp_path / "s", RELATIONS + "\n" + RELATIONS)
    with pytest.raises(ConfigError) as caught:
        load_study(root)
    lines = [i for i, line in enumerate((root / "study.toml").read_text().splitlines(), start=1)
             if line.startswith("id = \"help-and-work\"")]
    assert caught.value.line == lines[1]  # the second table's id line
    assert "id 'help-and-work' is already used by relations[1]" in str(caught.value)
    root = _relations_study(tmp_path / "t", RELATIONS.replace('"help-and-work"', '"team"'),
                            series=True)
    with pytest.raises(ConfigError) as caught:
        load_study(root)
    assert "also the name of a series of waves" in str(caught.value)
    assert caught.value.line == _line_of(root, 'id = "team"')


@pytest.mark.parametrize(("change", "message"), [
    (('permutations = 99', 'permutations = 0'), "must be a whole number, 1 or more"),
    (('networks = ["help", "work"]', 'networks = ["help"]'), "needs two or more"),
    (('outcome = "help"', 'outcome = "nobody"'), "outcome 'nobody' is not one of"),
    (('predictors = ["work"]', 'predictors = ["help"]'), "both the outcome and a predictor"),
])
def test_bad_relations_settings_are_refused(tmp_path, change, message):
    root = _relations_study(tmp_path / "s", RELATIONS.replace(*change))
    with pytest.raises(ConfigError) as caught:
        load_study(root)
    assert message in str(caught.value) and caught.value.line is not None


def test_a_directed_and_an_undirected_relation_overlap_as_undirected_pairs(tmp_path):
    # a->b and b->a are one pair; with c-d in both and b-c only undirected: 2 of 3 pairs shared.
    asks = analyse_graph(tmp_path / "a", nx.DiGraph([("a", "b"), ("b", "a"), ("d", "c")]),
                         id="asks")
    works = analyse_graph(tmp_path / "w", nx.Graph([("a", "b"), ("b", "c"), ("c", "d")]),
                          id="works")
    result = compare_relations("r", [asks, works], permutations=9, seed=1)
    assert result.pairs[0].jaccard == pytest.approx(2 / 3)


def test_readings_say_what_the_numbers_mean():
    from generator.vocabulary.relations import p_reading, term_reading

    smallest = p_reading(1 / 1001, 1000, "a correlation this far from zero")
    assert "came up in none of them" in smallest
    assert "(p = 0.000999, the smallest possible with 1,000 relabellings)" in smallest
    large = p_reading(0.4, 99, "a correlation this far from zero")
    assert "39 times (p = 0.4)" in large and "chance could explain it" in large
    unweighted = term_reading("same:unit", 0.12, 0.01, 99, titles={}, outcome="Help",
                              unit=None)
    assert unweighted.startswith("For a pair who share the same unit, a Help tie is 12 "
                                 "percentage points more likely on average")
    weighted = term_reading("work", -0.5, 0.5, 99, titles={"work": "Work"}, outcome="Help",
                            unit="times per month", weighted=frozenset({"work"}))
    assert weighted.startswith("For a pair tied in Work (per unit of its tie weight), Help is "
                               "0.5 times per month lower")


def test_a_model_term_without_variation_gets_no_p_value():
    from generator.analyse.compare import mrqap

    rng = np.random.default_rng(2)
    outcome = (rng.random((12, 12)) < 0.3).astype(float)
    np.fill_diagonal(outcome, 0)
    everyone = same_matrix(["north"] * 12)  # every pair shares the value
    result = mrqap(outcome, {"same:unit": everyone}, directed=True, permutations=19, seed=1)
    term = {t.term: t for t in result.terms}["same:unit"]
    assert term.p is None and term.std_coefficient is None
