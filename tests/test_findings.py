"""The front page's key findings: each sentence words one result, and says only what the result
and its test support."""

from __future__ import annotations

import re

import networkx as nx
from conftest import graph_study, karate_graph

from generator.analyse.nulls import NullTest
from generator.build import build_study
from generator.vocabulary.findings import (
    bridge_finding,
    community_finding,
    reciprocity_finding,
    transitivity_finding,
    within_group_finding,
)


def _test(statistic: str, observed: float, mean: float, p: float, below: int, above: int
          ) -> NullTest:
    return NullTest(statistic, observed, mean, 0.03, (observed - mean) / 0.03, p, 200, below,
                    above, None, ())


def test_the_largest_community_is_given_as_a_count_and_a_share():
    assert community_finding((18, 12, 11), 61) == (
        "The largest of 3 communities holds 18 of the 61 nodes (30%).")
    assert community_finding((5,), 5) == (
        "All 5 nodes fall in one community: no division into groups was found.")
    assert community_finding((), 0) is None


def test_the_share_of_ties_within_groups_follows_from_the_e_i_index():
    # Worked by hand: 10 ties, 7 inside groups and 3 between them. E-I = (E - I) / (E + I)
    # = (3 - 7) / 10 = -0.4 (Krackhardt & Stern 1988), so the share inside is (1 + 0.4) / 2 = 70%.
    text = within_group_finding("clinic", -0.4, None)
    assert text == "70% of ties join nodes of the same clinic (E-I index -0.4)."


def test_a_tendency_to_keep_within_groups_is_claimed_only_when_its_test_says_so():
    clear = _test("assortativity:clinic", 0.31, 0.01, 0.005, below=200, above=0)
    vague = _test("assortativity:clinic", 0.04, 0.01, 0.41, below=120, above=80)
    assert within_group_finding("clinic", -0.4, clear).endswith(
        "; ties keep to their own clinic more than in networks rewired at random with the same "
        "degrees (p = 0.005).")
    unclear = within_group_finding("clinic", -0.4, vague)
    assert "no clear tendency" in unclear and "p = 0.41" in unclear and "more than" not in unclear


def test_the_bridge_finding_names_the_node_and_calls_it_a_position():
    text = bridge_finding("Ada Brell (s04)", 0.25, 0.125)
    assert text.startswith("Ada Brell (s04) lies on more shortest paths between others than "
                           "anyone else (betweenness 0.25; next highest 0.125)")
    assert "not a judgement of the person" in text
    assert bridge_finding("x", 0.0, None) == (
        "No node lies between others on a shortest path: nobody bridges.")


def test_reciprocity_and_clustering_read_with_the_test_when_there_is_one():
    assert reciprocity_finding(0.381) == "38% of ties are returned (reciprocity 0.381)."
    plain = transitivity_finding(0.538, None)
    assert plain == ("Where two nodes share a tie partner, they are tied themselves in 54% of "
                     "cases (transitivity 0.538).")
    tested = transitivity_finding(0.538, _test("transitivity", 0.538, 0.2, 0.005, 200, 0))
    assert tested.startswith(plain + " ") and "higher than in all 200" in tested


def test_the_front_page_gives_each_network_a_small_map_and_its_findings(tmp_path):
    # Zachary's karate club (Zachary 1977, "An information flow model for conflict and fission
    # in small groups"), as networkx ships it: the node networkx ranks first by betweenness
    # (Brandes 2001, "A faster algorithm for betweenness centrality") is the bridge named.
    graph = karate_graph()
    study = graph_study(tmp_path / "karate", graph, attributes=["club"], title="Karate club")
    site = build_study(study).output
    page = (site / "index.html").read_text("utf-8")
    ranked = nx.betweenness_centrality(graph)
    top = max(ranked, key=ranked.get)
    cards = re.findall(r'<article class="card".*?</article>', page, flags=re.S)
    assert len(cards) == 1
    card = cards[0]
    assert re.search(rf"<li>{top} lies on more shortest paths between others than anyone else "
                     rf"\(betweenness {ranked[top]:.3f}", card)
    assert '<img class="card-map" src="networks/' in card and "/figures/map.svg" in card
    assert (site / re.search(r'src="([^"]+map\.svg)"', card).group(1)).is_file()
    assert re.search(r"<li>The largest of \d+ communities holds \d+ of the 34 nodes", card)
    findings = re.findall(r"<li>", card)
    assert 3 <= len(findings) <= 5
