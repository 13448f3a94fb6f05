"""The explorable map's data file: every node and tie of the analysis, at the layout's
positions, in the static map's colours, and no label that can escape its string.

Zooming, pointing and finding in a real browser are tested in test_browser.py."""

from __future__ import annotations

import json
import re
from pathlib import Path

import networkx as nx
import pytest
from conftest import analyse_graph, edge_study

from generator.build import build_study
from generator.draw import explorer as explorer_module
from generator.draw.explorer import community_explorer_data, explorer_data
from generator.draw.figure import FigureSettings
from generator.draw.node_encoding import colour_nodes
from generator.vocabulary import number


def _payload(script: bytes) -> dict:
    text = script.decode("utf-8")
    match = re.search(r'window\.netfolioMaps\["[a-z0-9-]+"\] = (\{.*\});\n\Z', text, re.S)
    assert match, text[:200]
    return json.loads(match.group(1))


def test_every_node_and_tie_of_the_karate_club_is_on_the_map(karate_case) -> None:
    graph, analysis = karate_case
    data = explorer_data(analysis)
    assert data is not None
    # Zachary (1977), "An information flow model for conflict and fission in small groups":
    # 34 members, 78 ties.
    assert len(data.ids) == 34 and len(data.ties) == 78
    pairs = {frozenset((data.ids[s], data.ids[t])) for s, t, _, _ in data.ties}
    assert pairs == {frozenset((str(u), str(v))) for u, v in graph.edges}
    for x, y in data.xy:
        assert 0 <= x <= data.width and 0 <= y <= data.height
    # Screen y runs downwards: the node highest in the layout is nearest the top.
    layout_y = [p[1] for p in analysis.layout]
    assert min(range(34), key=lambda i: data.xy[i][1]) == max(range(34), key=lambda i: layout_y[i])
    degree = next(values for title, values in data.facts if title == "Degree")
    assert list(degree) == [number(d) for d in dict(nx.degree(graph)).values()]


def test_the_map_keeps_the_layout_proportions(karate_case) -> None:
    _, analysis = karate_case
    data = explorer_data(analysis)
    assert data is not None
    xs = [p[0] for p in analysis.layout]
    ys = [p[1] for p in analysis.layout]
    span_x, span_y = max(xs) - min(xs), max(ys) - min(ys)
    map_x = max(p[0] for p in data.xy) - min(p[0] for p in data.xy)
    map_y = max(p[1] for p in data.xy) - min(p[1] for p in data.xy)
    assert map_x / map_y == pytest.approx(span_x / span_y, rel=1e-3)


def test_the_colourings_are_the_static_maps_and_the_first_is_the_studys(karate_case) -> None:
    _, analysis = karate_case
    settings = FigureSettings(color_by="club")
    data = explorer_data(analysis, settings)
    assert data is not None
    assert [c.name for c in data.colourings] == ["club", "community", "tenure"]
    assert data.colourings[0].colours == colour_nodes(analysis, settings).colours
    community = data.colourings[1]
    assert community.colours == colour_nodes(analysis, FigureSettings()).colours
    assert sum(count for _, _, count in community.key) == 34
    tenure = data.colourings[2]  # numeric: the key names the ends of the scale
    assert tenure.key[0][0].startswith("lowest: ") and tenure.key[1][0].startswith("highest: ")


def test_a_label_that_looks_like_markup_stays_inside_its_string(tmp_path: Path) -> None:
    label = '</script><script>alert("x")</script> Zoë'
    edges = "source,target\na,b\nb,c\n"
    nodes = f'id,name\na,"{label.replace(chr(34), chr(34) * 2)}"\nb,B\nc,C\n'
    study = edge_study(tmp_path / "study", edges, nodes=nodes, label="name")
    site = build_study(study, output=tmp_path / "site").output
    script = (site / "networks/net/explore-data.js").read_bytes()
    data = _payload(script)
    assert data["labels"][0] == f"{label} (a)"  # a label that is not the id names the id too
    assert label.encode("utf-8") not in script  # the quotes are escaped in the JSON string
    page = (site / "networks/net/index.html").read_text("utf-8")
    assert '<script src="explore-data.js" defer></script>' in page
    assert '<script src="../../static/explore.js" defer></script>' in page
    assert page.index("explore-data.js") < page.index("static/explore.js")  # data first
    row = r'<tr id="(node-\d+)">\s*<th scope="row"><a href="nodes/node-\d+.html">(\w+)</a></th>'
    rows = re.findall(row, (site / "networks/net/nodes.html").read_text("utf-8"))
    assert rows == [("node-1", "a"), ("node-2", "b"), ("node-3", "c")]
    assert data["anchors"] == ["node-1", "node-2", "node-3"]


def test_a_large_network_is_explored_by_its_communities(tmp_path: Path, monkeypatch) -> None:
    monkeypatch.setattr(explorer_module, "EXPLORER_MAX_NODES", 3)
    analysis = analyse_graph(tmp_path / "four", nx.path_graph(4))
    data = explorer_data(analysis)
    assert data is not None and data.level == "community"
    assert len(data.ids) == analysis.communities.count
    small = explorer_data(analyse_graph(tmp_path / "three", nx.path_graph(3)))
    assert small is not None and small.level == "node"


def test_the_community_map_counts_members_and_ties_within_and_between(tmp_path: Path) -> None:
    # Three cliques of 5, 4 and 3 nodes (sizes by which the communities are numbered), joined
    # by ties counted by hand: 2 between the first and second, 1 between the second and third.
    graph = nx.disjoint_union_all([nx.complete_graph(5), nx.complete_graph(4), nx.complete_graph(3)])
    graph.add_edges_from([(0, 5), (1, 6), (6, 9)])
    analysis = analyse_graph(tmp_path, graph)
    assert analysis.communities.sizes == (5, 4, 3)
    data = community_explorer_data(analysis)
    assert data is not None and data.labels == ("Community 1", "Community 2", "Community 3")
    facts = dict(data.facts)
    assert facts["Members"] == ("5", "4", "3")
    assert facts["Ties inside"] == ("10", "6", "3")  # n(n-1)/2 in each clique
    assert facts["Ties with other communities"] == ("2", "3", "1")
    assert [(a, b, text) for a, b, _, text in data.ties] == [(0, 1, "2"), (1, 2, "1")]
    assert data.radii[0] > data.radii[1] > data.radii[2]
    # Each community sits at the mean position of its members, and has their colour.
    nodes = explorer_data(analysis)
    assert nodes is not None
    first = [i for i, c in enumerate(analysis.communities.membership) if c == 1]
    mean_x = sum(nodes.xy[i][0] for i in first) / len(first)
    assert abs(data.xy[0][0] - mean_x) < 0.02
    assert data.colourings[0].colours[0] == dict(
        (c.name, c) for c in nodes.colourings)["community"].colours[first[0]]


def test_weights_and_directions_reach_the_map(tmp_path: Path) -> None:
    graph = nx.DiGraph()
    graph.add_weighted_edges_from([(1, 2, 1.0), (2, 3, 4.0), (3, 1, 2.5)])
    analysis = analyse_graph(tmp_path, graph, weight="weight")
    data = explorer_data(analysis)
    assert data is not None and data.directed
    texts = {(data.ids[s], data.ids[t]): text for s, t, _, text in data.ties}
    assert texts == {("1", "2"): "1", ("2", "3"): "4", ("3", "1"): "2.5"}
    widths = {(data.ids[s], data.ids[t]): w for s, t, w, _ in data.ties}
    assert widths[("2", "3")] > widths[("3", "1")] > widths[("1", "2")]  # stronger, wider
