"""Tests of generator.draw: the figures of one network, their words and their byte stability."""

from __future__ import annotations

import hashlib
import json
import math
import os
import pickle
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import matplotlib
import networkx as nx
import numpy as np
import pandas as pd
import pytest

from generator.analyse import NetworkAnalysis, analyse_network
from generator.config import CommunitiesConfig, EdgeListSource, MeasuresConfig, NetworkConfig
from generator.draw import Figure, FigureSettings, draw_network
from generator.draw.community_sizes import draw_communities
from generator.draw.network_map import draw_map, label_gid
from generator.draw.node_encoding import (
    colour_groups,
    colour_nodes,
    size_measure,
    size_nodes,
    top_nodes,
)
from generator.draw.style import BAR_COLOUR, MISSING_GREY, OKABE_ITO, OTHER_GREY
from generator.draw.tie_geometry import arrow_shapes, tie_widths
from generator.ingest import CleanNetwork, DataChecks
from generator.vocabulary import list_in_words, number

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
SVG_NS = "{http://www.w3.org/2000/svg}"
# Then a heatmap per categorical attribute (club, team) and a scatter per numeric one (age).
MIXING_NAMES = ["mixing-club", "mixing-team", "scatter-age"]
UNDIRECTED_NAMES = ["map", "degree", "betweenness", "closeness", "harmonic", "eigenvector",
                    "pagerank", "communities", *MIXING_NAMES]
DIRECTED_NAMES = ["map", "degree", "betweenness", "closeness", "harmonic", "pagerank",
                  "communities", *MIXING_NAMES]


def _named(figures, name):
    return next(f for f in figures if f.name == name)


# ---------------------------------------------------------------------------------------------
# A small real network: Zachary's karate club (34 members, 78 ties; Zachary, J Anthropol Res
# 33(4):452-473, 1977), with invented attributes that exercise every colour rule.


def _karate_nodes() -> pd.DataFrame:
    graph = nx.karate_club_graph()
    ids = [f"k{i + 1:02d}" for i in graph.nodes]
    ages = [20 + (i * 7) % 40 for i in graph.nodes]
    ages[5] = None  # one member without an age
    return pd.DataFrame({
        "label": pd.array([f"Member {i + 1}" for i in graph.nodes], dtype="string"),
        "club": pd.array([graph.nodes[i]["club"] for i in graph.nodes], dtype="string"),
        "age": pd.array(ages, dtype="Int64"),
        "team": pd.array([f"t{i % 10}" for i in graph.nodes], dtype="string"),  # ten groups
    }, index=pd.Index(ids, name="id"))


def karate_network(*, directed: bool = False) -> CleanNetwork:
    """The karate club as ingest would hand it over. Directed: each tie runs from the lower to
    the higher member, and back as well when the two numbers sum to a multiple of 3; the
    directed version carries weights 1-4."""
    graph = nx.karate_club_graph()
    nodes = _karate_nodes()
    name = list(nodes.index)
    pairs = sorted((min(u, v), max(u, v)) for u, v in graph.edges)
    if directed:
        pairs = sorted(pairs + [(v, u) for u, v in pairs if (u + v) % 3 == 0])
    edges = pd.DataFrame({"source": [name[a] for a, _ in pairs],
                          "target": [name[b] for _, b in pairs]})
    if directed:
        edges["weight"] = [float(1 + (a * b) % 4) for a, b in pairs]
    source = EdgeListSource(path=Path("data/karate.csv"), weight="weight" if directed else None)
    config = NetworkConfig(id="karate", title="Karate club", data=source, directed=directed,
                           label="label")
    return CleanNetwork(config=config, nodes=nodes, edges=edges, weighted=directed,
                        attributes=("club", "age", "team"), checks=DataChecks(), files=())


def karate_analysis(*, directed: bool = False) -> NetworkAnalysis:
    return analyse_network(karate_network(directed=directed),
                           communities=CommunitiesConfig(runs=5, perturbations=0),
                           measures=MeasuresConfig(),
                           seed=1)


UNDIRECTED_SETTINGS = FigureSettings(color_by="club", size_by="betweenness")
DIRECTED_SETTINGS = FigureSettings(size_by="pagerank")


def figure_digests(figures: list[Figure]) -> dict[str, list[str]]:
    """SHA-256 of each figure's SVG and PNG, by name (used across processes)."""
    return {f.name: [hashlib.sha256(f.svg).hexdigest(), hashlib.sha256(f.png).hexdigest()]
            for f in figures}


@pytest.fixture(scope="module")
def undirected() -> NetworkAnalysis:
    return karate_analysis()


@pytest.fixture(scope="module")
def directed() -> NetworkAnalysis:
    return karate_analysis(directed=True)


@pytest.fixture(scope="module")
def undirected_figures(undirected: NetworkAnalysis) -> list[Figure]:
    return draw_network(undirected, UNDIRECTED_SETTINGS)


@pytest.fixture(scope="module")
def directed_figures(directed: NetworkAnalysis) -> list[Figure]:
    return draw_network(directed, DIRECTED_SETTINGS)


def _svg_text(figure: Figure) -> str:
    return figure.svg.decode("utf-8")


# ---------------------------------------------------------------------------------------------
# Which figures, in which order


def test_public_surface_is_figure_its_settings_and_draw_network():
    import generator.draw as draw
    assert draw.__all__ == ["Figure", "FigureSettings", "draw_network"]


def test_undirected_network_gives_map_degree_every_centrality_and_communities(undirected_figures):
    assert [f.name for f in undirected_figures] == UNDIRECTED_NAMES


def test_directed_network_leaves_out_the_eigenvector_the_analysis_omitted(directed,
                                                                          directed_figures):
    assert "eigenvector" in directed.omitted
    assert "eigenvector" not in directed.measures.columns
    assert [f.name for f in directed_figures] == DIRECTED_NAMES


def test_every_figure_has_a_title_alt_text_and_caption(undirected_figures, directed_figures):
    for figure in undirected_figures + directed_figures:
        assert figure.title.startswith("Karate club: ")
        assert len(figure.alt) > 40 and figure.alt.endswith(".")
        assert 20 < len(figure.caption) < 400


# ---------------------------------------------------------------------------------------------
# Valid files, byte-identical every time


def test_every_svg_parses_as_xml_and_every_png_has_the_signature(undirected_figures,
                                                                   directed_figures):
    for figure in undirected_figures + directed_figures:
        root = ET.fromstring(figure.svg)
        assert root.tag == f"{SVG_NS}svg"
        assert figure.png.startswith(PNG_SIGNATURE)
        width, height = (int.from_bytes(figure.png[16 + 4 * i:20 + 4 * i], "big") for i in (0, 1))
        assert 300 < width < 3000 and 300 < height < 3000


def test_svg_and_png_carry_no_date_or_software_stamp(undirected_figures):
    for figure in undirected_figures:
        assert b"<dc:date>" not in figure.svg and b"Matplotlib v" not in figure.svg
        assert b"Software" not in figure.png


def test_two_calls_give_identical_bytes(undirected, undirected_figures):
    again = draw_network(undirected, UNDIRECTED_SETTINGS)
    assert figure_digests(again) == figure_digests(undirected_figures)


def test_a_fresh_process_gives_identical_bytes(directed, directed_figures, tmp_path):
    # The analysis goes over as a pickle, so the new process runs only the draw stage, with
    # another hash seed and another default backend.
    (tmp_path / "analysis.pickle").write_bytes(pickle.dumps((directed, DIRECTED_SETTINGS)))
    script = ("import hashlib, json, pickle, sys; from generator.draw import draw_network; "
              "a, s = pickle.loads(open(sys.argv[1], 'rb').read()); "
              "print(json.dumps({f.name: [hashlib.sha256(f.svg).hexdigest(), "
              "hashlib.sha256(f.png).hexdigest()] for f in draw_network(a, s)}))")
    env = dict(os.environ, PYTHONHASHSEED="4321", MPLBACKEND="svg")
    done = subprocess.run([sys.executable, "-c", script, str(tmp_path / "analysis.pickle")],
                          capture_output=True, text=True, env=env, check=True, timeout=120)
    assert json.loads(done.stdout.strip().splitlines()[-1]) == figure_digests(directed_figures)


def test_drawing_leaves_global_matplotlib_settings_alone(undirected):
    before = dict(matplotlib.rcParams)
    draw_communities(undirected)
    assert dict(matplotlib.rcParams) == before


def test_the_users_matplotlib_settings_do_not_change_the_bytes(undirected):
    plain = draw_communities(undirected)
    with matplotlib.rc_context({"font.size": 15, "lines.linewidth": 4, "svg.hashsalt": None,
                                "axes.prop_cycle": matplotlib.cycler(color=["red"])}):
        styled = draw_communities(undirected)
    assert (styled.svg, styled.png) == (plain.svg, plain.png)


# ---------------------------------------------------------------------------------------------
# Words


def test_map_alt_text_gives_node_and_tie_counts_and_what_size_and_colour_show(undirected_figures):
    alt = undirected_figures[0].alt
    assert alt.startswith("Network map of 34 nodes and 78 ties;")
    assert "node size shows betweenness" in alt
    assert "colour shows club: 2 groups (Mr. Hi: 17 nodes and Officer: 17 nodes)" in alt


def test_directed_map_alt_text_says_arrows_and_weights(directed, directed_figures):
    alt = directed_figures[0].alt
    assert f"34 nodes and {len(directed.edges)} ties (directed" in alt
    assert "weighted, wider lines are stronger ties" in alt


def test_every_alt_text_mentions_the_number_of_nodes_it_describes(undirected_figures):
    for figure in undirected_figures[:UNDIRECTED_NAMES.index("communities")]:
        assert "34 nodes" in figure.alt, figure.name


def test_histogram_alt_text_names_the_top_node_with_its_value(undirected, undirected_figures):
    betweenness = next(f for f in undirected_figures if f.name == "betweenness")
    values = undirected.measures["betweenness"]
    # k01 (0.4376) and k34 (0.3041) lead the karate club on betweenness (computed with
    # networkx 3.6 on the graph networkx ships)
    top = values.idxmax()
    assert top == "k01"
    label = undirected.nodes.loc[top, "label"]
    assert f"the highest is {label} ({top}) with {number(values.max())}." in betweenness.alt
    assert f"values range from {number(values.min())} to" in betweenness.alt


def test_degree_alt_text_gives_range_and_most_common_degree(undirected, undirected_figures):
    degree = undirected_figures[1].alt
    counts = undirected.measures["degree"].value_counts()
    common = min(counts[counts == counts.max()].index)
    # Zachary 1977, as networkx ships it: member 12 has 1 tie, member 34 has 17
    assert "degree ranges from 1 to 17" in degree
    assert f"most common {common}, {counts[common]} nodes" in degree


def test_directed_degree_figure_has_in_and_out_degree_panels(directed_figures):
    degree = directed_figures[1]
    assert "in-degree ranges from" in degree.alt and "out-degree ranges from" in degree.alt
    assert "in-degree" in _svg_text(degree) and "out-degree" in _svg_text(degree)


def test_community_alt_lists_the_sizes_largest_first(undirected, undirected_figures):
    alt = _named(undirected_figures, "communities").alt
    sizes = list(undirected.communities.sizes)
    assert sizes == sorted(sizes, reverse=True)
    assert f"sizes of {len(sizes)} communities, largest first: " in alt
    assert list_in_words([str(s) for s in sizes]) + " nodes" in alt


# ---------------------------------------------------------------------------------------------
# Colour, size and names on the map


def test_two_groups_get_the_first_two_okabe_ito_colours_by_size_then_name(undirected):
    colours = colour_nodes(undirected, UNDIRECTED_SETTINGS)
    # networkx's "club" attribute splits the 34 members 17/17; the colours are the first two of
    # Okabe & Ito 2008, Color Universal Design (CUD)
    assert [(g.label, g.colour, g.nodes) for g in colours.groups] == [
        ("Mr. Hi", "#E69F00", 17), ("Officer", "#56B4E9", 17)]
    assert colours.colours[0] == "#E69F00"  # member 1 leads "Mr. Hi"
    assert colours.colours[33] == "#56B4E9"  # member 34 leads "Officer"


def test_ten_groups_keep_seven_colours_and_merge_the_rest_as_other(undirected):
    colours = colour_nodes(undirected, FigureSettings(color_by="team"))
    labels = [g.label for g in colours.groups]
    # t0-t3 hold 4 members each, t4-t9 hold 3: the seven largest (ties by name) keep a colour.
    assert labels == ["t0", "t1", "t2", "t3", "t4", "t5", "t6", "other (3 groups)"]
    assert [g.colour for g in colours.groups] == list(OKABE_ITO[:7]) + [OTHER_GREY]
    assert colours.groups[-1].nodes == 9
    assert colours.colours[7] == OTHER_GREY and colours.colours[17] == OTHER_GREY  # teams t7
    assert colours.colours[10] == OKABE_ITO[0]  # team t0


def test_the_map_legend_shows_other_when_there_are_more_than_eight_groups(undirected):
    figure = draw_map(undirected, FigureSettings(color_by="team"))
    assert "other (3 groups) (9)" in _svg_text(figure)
    assert "colour shows team: 10 groups" in figure.alt
    assert "other (3 groups): 9 nodes" in figure.alt


def test_eight_groups_use_the_whole_palette_without_other():
    values = [f"g{i}" for i in range(8) for _ in range(8 - i)]
    colours, groups = colour_groups(values)
    assert [g.colour for g in groups] == list(OKABE_ITO)
    assert not any(g.label.startswith("other") for g in groups)


def test_equal_communities_keep_their_numbering_when_coloured():
    colours, groups = colour_groups([c for c in range(1, 11) for _ in range(3)])
    assert [g.label for g in groups] == ["1", "2", "3", "4", "5", "6", "7", "other (3 groups)"]
    assert colours[3 * 9] == OTHER_GREY  # community 10 is among the "other" groups


def test_missing_values_are_grey_and_listed_as_no_value():
    colours, groups = colour_groups(["a", None, "b", "a", pd.NA])
    assert colours == [OKABE_ITO[0], MISSING_GREY, OKABE_ITO[1], OKABE_ITO[0], MISSING_GREY]
    assert (groups[-1].label, groups[-1].nodes, groups[-1].missing) == ("no value", 2, True)


def test_a_numeric_attribute_is_shown_on_a_colour_scale(undirected):
    settings = FigureSettings(color_by="age")
    colours = colour_nodes(undirected, settings)
    ages = undirected.nodes["age"]
    assert colours.scale is not None
    assert (colours.scale.low, colours.scale.high) == (ages.min(), ages.max())
    assert colours.colours[5] == MISSING_GREY  # the member without an age
    young, old = int(ages.idxmin()[1:]) - 1, int(ages.idxmax()[1:]) - 1
    # the two ends of matplotlib's viridis colour map (common practice)
    assert colours.colours[young] == "#440154" and colours.colours[old] == "#fde725"
    figure = draw_map(undirected, settings)
    assert ET.fromstring(figure.svg).tag == f"{SVG_NS}svg"
    assert f"colour shows age on a scale from {ages.min()} (dark purple) to {ages.max()}" in figure.alt
    assert ">no value (1)</text>" in _svg_text(figure)
    assert ">age</text>" in _svg_text(figure)  # the colour bar's title


def test_only_the_five_largest_nodes_are_named_on_the_map(undirected, undirected_figures):
    svg = _svg_text(undirected_figures[0])
    named = sorted(int(part.split('"')[0]) for part in svg.split('id="node-label-')[1:])
    expected = undirected.measures["betweenness"].nlargest(5, keep="first")
    assert len(named) == 5
    assert named == sorted(undirected.measures.index.get_indexer(expected.index))
    assert label_gid(named[0]) in svg


def test_size_measure_falls_back_to_degree_when_the_analysis_lacks_it(directed):
    settings = FigureSettings(size_by="eigenvector")
    assert size_measure(directed, settings) == "degree"
    assert size_measure(directed, FigureSettings()) == "degree"
    assert "node size shows degree" in draw_map(directed, settings).alt


def test_node_area_grows_linearly_with_the_measure(undirected):
    sizes = size_nodes(undirected, UNDIRECTED_SETTINGS)
    values = np.array(sizes.values)
    areas = np.array(sizes.areas)
    assert areas[values.argmin()] == pytest.approx(18.0)
    assert areas[values.argmax()] == pytest.approx(420.0)
    middle = (values.min() + values.max()) / 2
    assert sizes.area_for(middle) == pytest.approx((18.0 + 420.0) / 2)
    order = np.argsort(values, kind="stable")
    assert np.all(np.diff(areas[order]) >= 0)


def test_top_nodes_break_ties_by_node_order_and_put_missing_last():
    assert top_nodes([3.0, 5.0, 5.0, math.nan, 1.0], 4) == [1, 2, 0, 4]


def test_community_bars_take_the_map_colours_only_when_the_map_shows_communities(undirected):
    coloured = draw_communities(undirected, colour_nodes(undirected, FigureSettings()))
    plain = draw_communities(undirected, colour_nodes(undirected, UNDIRECTED_SETTINGS))
    assert OKABE_ITO[0].lower() in _svg_text(coloured).lower()
    assert OKABE_ITO[0].lower() not in _svg_text(plain).lower()
    assert BAR_COLOUR.lower() in _svg_text(plain).lower()
    assert ">community 1</text>" in _svg_text(coloured)


# ---------------------------------------------------------------------------------------------
# Geometry


def test_arrowheads_end_on_the_rim_of_the_target_node():
    xy = np.array([[0.0, 0.0], [1.0, 0.0]])
    segments, heads, widths = arrow_shapes(xy, ((0, 1),), np.array([5.0, 10.0]), np.array([1.0]),
                                           points_per_unit=100.0)
    tip = heads[0][0]
    assert tip == pytest.approx([1.0 - (10.0 + 0.8) / 100.0, 0.0])
    assert segments[0][0] == pytest.approx((0.05, 0.0))  # starts on the source rim
    assert widths == [1.0]


def test_ties_between_overlapping_nodes_are_not_drawn():
    xy = np.array([[0.0, 0.0], [0.01, 0.0]])
    segments, heads, _ = arrow_shapes(xy, ((0, 1),), np.array([5.0, 5.0]), np.array([1.0]), 100.0)
    assert segments == [] and heads == []


def test_tie_width_grows_mildly_with_strength():
    assert list(tie_widths((1.0, 2.0, 3.0), weighted=False)) == [0.6, 0.6, 0.6]
    assert list(tie_widths((1.0, 2.0, 3.0), weighted=True)) == pytest.approx([0.6, 1.2, 1.8])


def test_community_caption_writes_the_method_as_every_page_does(undirected_figures):
    # One capitalisation of method names: "Leiden", never "leiden".
    assert _named(undirected_figures, "communities").caption.startswith(
        "The Leiden method (best of")


# ---------------------------------------------------------------------------------------------
# Tests against chance


@pytest.fixture(scope="module")
def tested() -> NetworkAnalysis:
    from generator.config import SignificanceConfig

    return analyse_network(karate_network(), communities=CommunitiesConfig(runs=3, perturbations=0),
                           measures=MeasuresConfig(), seed=1,
                           significance=SignificanceConfig(null_samples=8))


def test_each_test_against_chance_gets_its_figure_after_the_others(tested):
    figures = draw_network(tested)
    names = [f.name for f in figures]
    assert names[:len(UNDIRECTED_NAMES)] == UNDIRECTED_NAMES
    assert names[len(UNDIRECTED_NAMES):] == [
        "null-transitivity", "null-degree-assortativity", "null-assortativity-club",
        "null-assortativity-age", "null-assortativity-team", "null-ei-index-club",
        "null-ei-index-team", "null-modularity"]
    assert figure_digests(draw_network(tested)) == figure_digests(figures)


def test_a_null_figure_says_in_words_where_the_observed_value_lies(tested):
    from generator.draw.null_models import draw_null_tests

    test = tested.significance.test("transitivity")
    (figure, *_) = draw_null_tests(tested)
    assert f"a line marks the observed value, {number(test.observed)}" in figure.alt
    assert f"on 8 rewired networks with the same degrees: values from {number(min(test.nulls))}" \
        in figure.alt
    assert "(p = " in figure.alt and "the solid line is the network as measured" in figure.caption
    ET.fromstring(figure.svg)
    assert figure.png.startswith(PNG_SIGNATURE)


def test_null_figure_names_keep_attributes_apart():
    from generator.analyse.nulls import NullTest
    from generator.draw.null_models import null_figure_names

    def test(name: str) -> NullTest:
        return NullTest(name, 0.1, 0.0, 0.1, 1.0, 0.5, 3, 2, 1, None, (0.0, 0.1, -0.1))

    names = null_figure_names((test("assortativity:a b"), test("assortativity:a-b"),
                               test("assortativity:Ünit")))
    assert list(names.values()) == ["null-assortativity-a-b", "null-assortativity-a-b-2",
                                    "null-assortativity-nit"]
