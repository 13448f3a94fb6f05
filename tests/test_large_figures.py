"""Figures and pages that scale (generator/draw/community_map.py, the degree distribution's
complementary cumulative form, the large layout and the shortened node table), on a seeded
synthetic network of 2,400 nodes: above the map's node limit, small enough for the suite."""

from __future__ import annotations

import re
from pathlib import Path

import igraph as ig
import numpy as np
import pytest
from conftest import analyse, load_network
from synthetic import write_study

from generator.analyse import NetworkAnalysis
from generator.analyse.layout import (
    LARGE_LAYOUT_NODES,
    LAYOUT_ITERATIONS,
    MIN_ITERATIONS,
    layout_iterations,
    network_layout,
)
from generator.build import build_study
from generator.draw import draw_network
from generator.draw.community_map import (
    LARGE_MAP_NODES,
    MAP_COMMUNITIES,
    MAP_COMMUNITY_LINKS,
    draw_community_map,
)
from generator.draw.distributions import ccdf_points, draw_degree
from generator.render.nodes_page import NODE_TABLE_ROWS

NODES = 2400
TIES = 12_000


@pytest.fixture(scope="module")
def large(tmp_path_factory) -> NetworkAnalysis:
    root = tmp_path_factory.mktemp("large")
    write_study(root, TIES, nodes=NODES)
    return analyse(load_network(root), runs=2)


def _svg_elements(svg: bytes) -> int:
    return len(re.findall(rb"<(?:path|use|image|text|g)\b", svg))


def test_the_map_of_a_large_network_shows_communities_and_a_density_image(large):
    assert len(large.layout) > LARGE_MAP_NODES
    figure = next(f for f in draw_network(large) if f.name == "map")
    assert figure.title.endswith("network map by community")
    # one embedded raster holds the whole layout; the rest is a few hundred shapes at most
    assert figure.svg.count(b"<image") == 1
    assert _svg_elements(figure.svg) < 3000
    assert len(figure.svg) < 1_000_000
    # nodes without ties (each a community of its own) are left out of the drawing
    degree = large.measures["degree"].reindex(large.nodes.index).to_numpy()
    with_ties = {c for c, d in zip(large.communities.membership, degree) if d > 0}
    isolated = int((degree == 0).sum())
    assert f"{min(len(with_ties), MAP_COMMUNITIES):,} communities as circles" in figure.alt
    assert isolated and f"The {isolated} nodes without ties are left out" in figure.caption
    largest = int(np.argmax(large.communities.sizes)) + 1
    assert f"community {largest} ({large.communities.sizes[largest - 1]:,} nodes)" in figure.alt
    assert "positions in the drawing are not path lengths" in figure.caption.lower()


def test_a_map_with_many_ties_draws_them_as_one_raster_layer(tmp_path):
    # 300 nodes and 2,500 ties: every node is drawn, and the ties become one embedded image
    # instead of 2,500 paths (and as many arrowheads); a map with fewer ties keeps them vector.
    from generator.draw.network_map import RASTER_TIES_ABOVE, draw_map

    write_study(tmp_path / "many", RASTER_TIES_ABOVE + 500, nodes=300)
    many = draw_map(analyse(load_network(tmp_path / "many"), runs=2))
    assert many.svg.count(b"<image") == 1
    assert _svg_elements(many.svg) < 300 + 200  # the nodes, labels and keys
    write_study(tmp_path / "few", 600, nodes=300)
    few = draw_map(analyse(load_network(tmp_path / "few"), runs=2))
    assert few.svg.count(b"<image") == 0 and _svg_elements(few.svg) > 600


def test_the_community_map_draws_the_pairs_with_most_ties_first(large):
    counted = large.community_ties()
    merged: dict[tuple[int, int], int] = {}
    for (a, b), n in zip(counted.pairs, counted.counts):
        pair = (min(a, b), max(a, b))
        merged[pair] = merged.get(pair, 0) + n
    best = max(merged, key=lambda p: (merged[p], -p[0], -p[1]))
    figure = draw_community_map(large)
    assert (f"join communities {best[0]} and {best[1]} ({merged[best]:,})" in figure.alt)
    assert len(merged) <= MAP_COMMUNITY_LINKS or "pairs" not in figure.alt


def test_the_community_map_is_the_same_drawn_twice(large):
    first, second = draw_community_map(large), draw_community_map(large)
    assert first.svg == second.svg and first.png == second.png


def test_ccdf_points_are_the_share_of_nodes_with_at_least_each_degree():
    # Reference: the definition, P(X >= k), counted directly (common practice; Clauset, Shalizi
    # & Newman 2009, "Power-law distributions in empirical data", SIAM Review).
    values = np.array([0, 1, 1, 2, 3, 3, 3, 7, 12, 40, 41, 100], dtype=float)
    ks, shares = ccdf_points(values, points=8)
    assert ks[0] == 1 and ks[-1] == 100
    assert list(ks) == sorted(set(ks))
    for k, share in zip(ks, shares):
        assert share == pytest.approx((values >= k).sum() / len(values))
    assert shares[0] == pytest.approx(11 / 12)  # the node of degree 0 counts, undrawn


def test_a_large_network_gets_the_complementary_cumulative_degree_plot(large):
    figure = draw_degree(large)
    assert "log scales" in figure.alt and "at least" in figure.alt
    assert b"log scale" in figure.svg


def test_a_small_network_keeps_one_bar_per_degree(karate_case):
    _, analysis = karate_case
    figure = draw_degree(analysis)
    assert figure.alt.startswith("Bar chart of the degree of 34 nodes")


def test_the_layout_budget_keeps_small_layouts_and_shrinks_for_large_ones():
    assert layout_iterations(LARGE_LAYOUT_NODES) == LAYOUT_ITERATIONS
    assert layout_iterations(4 * LARGE_LAYOUT_NODES) == LAYOUT_ITERATIONS // 4
    assert layout_iterations(10**7) == MIN_ITERATIONS


def test_a_large_layout_starts_from_the_communities_and_puts_members_together(monkeypatch):
    # Two dense groups joined by one tie: with the community start the members of each group
    # end up nearer each other than to the other group.
    import generator.analyse.layout as layout
    monkeypatch.setattr(layout, "LARGE_LAYOUT_NODES", 50)
    groups = [ig.Graph.Erdos_Renyi(n=60, p=0.2) for _ in range(2)]
    graph = ig.disjoint_union(groups)
    graph.add_edge(0, 60)
    graph.es["strength"] = [1.0] * graph.ecount()
    membership = [1] * 60 + [2] * 60
    xy = np.array(network_layout(graph, seed=3, weighted=False, membership=membership))
    a, b = xy[:60].mean(axis=0), xy[60:].mean(axis=0)
    spread = max(np.linalg.norm(xy[:60] - a, axis=1).mean(),
                 np.linalg.norm(xy[60:] - b, axis=1).mean())
    assert np.linalg.norm(a - b) > 1.5 * spread
    again = network_layout(graph, seed=3, weighted=False, membership=membership)
    assert [tuple(p) for p in xy] == again
    assert xy.min() == 0.0 and xy.max() == 1.0


def test_the_node_table_of_a_large_network_lists_the_top_nodes_and_stays_light(tmp_path: Path):
    root = tmp_path / "study"
    write_study(root, TIES, nodes=NODES, toml_extra='size_by = "in_degree"\n'
                '\n[communities]\nruns = 2\nperturbations = 0\n'
                '\n[significance]\nnull_samples = 0\n')
    out = tmp_path / "site"
    build_study(root, output=out)
    page = (out / "networks" / "big" / "nodes.html").read_text()
    assert page.count("<tr id=") == NODE_TABLE_ROWS
    assert f"the {NODE_TABLE_ROWS:,} of {NODES:,} nodes with the highest in-degree" in page
    assert len(page.encode()) <= 2_000_000
    for path in out.rglob("*.html"):
        assert path.stat().st_size <= 2_000_000, path
    # highest in-degree first: the first row's node has the largest in-degree
    import pandas as pd
    nodes = pd.read_csv(out / "files" / "big" / "nodes.csv", dtype={"id": str})
    top = nodes.sort_values(["in_degree"], ascending=False, kind="stable")["id"].iloc[0]
    first = re.search(r'<tr id="[^"]+">\s*<th scope="row">(?:<a [^>]+>)?([^<]+)<', page)
    assert first is not None and first.group(1) == top
    assert len(nodes) == NODES  # the download keeps every node
