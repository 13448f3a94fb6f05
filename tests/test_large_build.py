"""A network of 200,000 ties builds end to end inside the normal suite: sampled path statistics,
the map by community, the shortened node table, light pages and every download."""

from __future__ import annotations

import csv
import io
import time
from pathlib import Path

import pandas as pd
import pytest
from synthetic import write_study

from generator.build import Progress, build_study

TIES = 200_000
NODES = 20_000


@pytest.fixture(scope="module")
def built(tmp_path_factory) -> tuple[Path, float]:
    root = tmp_path_factory.mktemp("large") / "study"
    write_study(root, TIES, nodes=NODES, toml_extra=(
        "\n[communities]\nruns = 2\nperturbations = 0\n\n[significance]\nnull_samples = 0\n"
        "\n[measures]\npath_sample_sources = 500\n"))
    start = time.perf_counter()
    build_study(root, output=root.parent / "site", progress=Progress(quiet=True))
    return root.parent / "site", time.perf_counter() - start


def test_the_site_is_complete_and_every_page_is_light(built):
    site, seconds = built
    assert (site / "index.html").is_file() and (site / "networks" / "big" / "index.html").is_file()
    for page in site.rglob("*.html"):
        assert page.stat().st_size <= 2_000_000, page
    assert seconds < 600  # measured about a minute on two cores; the bound only catches hangs


def test_every_node_and_tie_is_in_the_downloads(built):
    site, _ = built
    nodes = pd.read_csv(site / "files" / "big" / "nodes.csv")
    edges = pd.read_csv(site / "files" / "big" / "edges.csv")
    assert len(nodes) == NODES and len(edges) == TIES
    import networkx as nx
    graph = nx.read_graphml(site / "files" / "big" / "network.graphml")
    assert graph.number_of_nodes() == NODES and graph.number_of_edges() == TIES


def test_path_statistics_are_stated_as_estimates(built):
    site, _ = built
    rows = {row["statistic"]: row for row in csv.DictReader(io.StringIO(
        (site / "files" / "big" / "statistics.csv").read_text()))}
    assert rows["nodes"]["value"] == str(NODES)
    page = (site / "networks" / "big" / "index.html").read_text()
    assert "at least" in page  # the diameter is a lower bound from sampled sources
    assert "network map by community" in page
    # 80 units: the matrix of ties between them is left to the CSV, the page says so
    assert "groups the matrix of ties between them is not shown here" in page
