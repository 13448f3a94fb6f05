"""Shared helpers: write small invented studies into a temporary folder, read and analyse them,
and build the reference graphs the cross-checks with networkx use."""

from __future__ import annotations

import json
import random
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any

import networkx as nx
import pytest

from generator.analyse import NetworkAnalysis, analyse_network
from generator.config import CommunitiesConfig, MeasuresConfig, load_study
from generator.ingest import CleanNetwork, read_network

# ---------------------------------------------------------------------------------------------
# Writing studies


def toml_value(value: Any) -> str:
    """A Python value as TOML (only the kinds study.toml uses)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value)  # a JSON string is a valid TOML basic string
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    raise TypeError(f"no TOML form for {value!r}")


# Test studies run no tests against rewired networks unless they ask: 200 rewired networks and
# their figures cost seconds per build. ``null_samples=None`` leaves the table out altogether.
TEST_NULL_SAMPLES = 0
# Nor do they rerun communities on perturbed ties unless they ask (``perturbations=`` or a
# ``communities`` table that names it): 50 reruns of 20 runs cost a second per network.
# ``perturbations=None`` leaves the key out, so the documented default applies.
TEST_PERTURBATIONS = 0


def study_toml(*, study: dict | None = None, networks: Sequence[dict] = (),
               tables: dict[str, dict] | None = None,
               null_samples: int | None = TEST_NULL_SAMPLES,
               perturbations: int | None = TEST_PERTURBATIONS) -> str:
    """The text of a study.toml; ``study`` defaults to a title only."""
    study = {"title": "Invented study"} if study is None else study
    if null_samples is not None and "significance" not in (tables or {}):
        tables = {**(tables or {}), "significance": {"null_samples": null_samples}}
    communities = (tables or {}).get("communities", {})
    if perturbations is not None and "perturbations" not in communities:
        tables = {**(tables or {}), "communities": {**communities,
                                                     "perturbations": perturbations}}
    parts = ["[study]"] + [f"{k} = {toml_value(v)}" for k, v in study.items()]
    for net in networks:
        parts += ["", "[[network]]"] + [f"{k} = {toml_value(v)}" for k, v in net.items()]
    for name, table in (tables or {}).items():
        parts += ["", f"[{name}]"] + [f"{k} = {toml_value(v)}" for k, v in table.items()]
    return "\n".join(parts) + "\n"


def csv_text(header: Sequence[str], rows: Iterable[Sequence[Any]]) -> str:
    lines = [",".join(header)] + [",".join(str(cell) for cell in row) for row in rows]
    return "\n".join(lines) + "\n"


def write_study(root: Path, *, networks: Sequence[dict],
                files: dict[str, str | bytes] | None = None, study: dict | None = None,
                tables: dict[str, dict] | None = None,
                null_samples: int | None = TEST_NULL_SAMPLES,
                perturbations: int | None = TEST_PERTURBATIONS) -> Path:
    """Write study.toml and the given data files (text is written as UTF-8) under ``root``."""
    root.mkdir(parents=True, exist_ok=True)
    for name, content in (files or {}).items():
        path = root / name
        path.parent.mkdir(parents=True, exist_ok=True)
        if isinstance(content, bytes):
            path.write_bytes(content)
        else:
            path.write_text(content, encoding="utf-8")
    (root / "study.toml").write_text(study_toml(study=study, networks=networks, tables=tables,
                                                null_samples=null_samples,
                                                perturbations=perturbations), encoding="utf-8")
    return root


def edge_study(root: Path, edges: str | bytes, *, nodes: str | bytes | None = None,
               **network: Any) -> Path:
    """A one-network study: ``edges`` is the text of data/edges.csv, ``nodes`` of data/nodes.csv;
    keyword arguments are further [[network]] keys."""
    files: dict[str, str | bytes] = {"data/edges.csv": edges}
    net = {"id": "net", "edges": "data/edges.csv"}
    if nodes is not None:
        files["data/nodes.csv"] = nodes
        net["nodes"] = "data/nodes.csv"
    net.update(network)
    return write_study(root, networks=[net], files=files)


def matrix_study(root: Path, matrix: str, **network: Any) -> Path:
    return write_study(root, networks=[{"id": "net", "matrix": "data/matrix.csv", **network}],
                       files={"data/matrix.csv": matrix})


def load_network(root: Path, index: int = 0) -> CleanNetwork:
    study = load_study(root)
    return read_network(study, study.networks[index])


def analyse(clean: CleanNetwork, *, seed: int = 1, method: str = "leiden", runs: int = 20,
            resolution: float = 1.0, exact_up_to: int = 5000,
            sample_sources: int = 500, perturbations: int = TEST_PERTURBATIONS,
            perturb_share: float = 0.1) -> NetworkAnalysis:
    return analyse_network(
        clean,
        communities=CommunitiesConfig(method=method, resolution=resolution, runs=runs,
                                      perturbations=perturbations, perturb_share=perturb_share),
        measures=MeasuresConfig(exact_paths_up_to=exact_up_to, path_sample_sources=sample_sources),
        seed=seed,
    )


def graph_study(root: Path, graph: nx.Graph, *, weight: str | None = None,
                attributes: Sequence[str] = (), edge_order: Sequence[int] | None = None,
                node_order: Sequence[int] | None = None, **network: Any) -> Path:
    """Write a networkx graph as an edge list (and a node list with ``attributes``).

    Node ids are written as ``str(node)``; ``weight`` names the edge attribute written to the
    "weight" column. ``edge_order``/``node_order`` permute the rows.
    """
    edge_rows = [(u, v) + ((d[weight],) if weight else ()) for u, v, d in graph.edges(data=True)]
    node_rows = [(n,) + tuple("" if graph.nodes[n].get(a) is None else graph.nodes[n][a]
                              for a in attributes) for n in graph.nodes]
    if edge_order is not None:
        edge_rows = [edge_rows[i] for i in edge_order]
    if node_order is not None:
        node_rows = [node_rows[i] for i in node_order]
    edges = csv_text(("source", "target") + (("weight",) if weight else ()), edge_rows)
    nodes = csv_text(("id",) + tuple(attributes), node_rows)
    keys = {"directed": graph.is_directed(), **network}
    if weight:
        keys["weight"] = "weight"
    return edge_study(root, edges, nodes=nodes, **keys)


def analyse_graph(root: Path, graph: nx.Graph, **kwargs: Any) -> NetworkAnalysis:
    analysis_keys = {k: kwargs.pop(k) for k in ("seed", "method", "runs", "resolution",
                                                "exact_up_to", "sample_sources", "perturbations",
                                                "perturb_share") if k in kwargs}
    return analyse(load_network(graph_study(root, graph, **kwargs)), **analysis_keys)


def by_id(analysis: NetworkAnalysis, column: str) -> dict[str, float]:
    return {str(k): float(v) for k, v in analysis.measures[column].items()}


# ---------------------------------------------------------------------------------------------
# Reference graphs (networkx side of every cross-check)


def add_strength_and_length(graph: nx.Graph, weight_means: str = "strength") -> nx.Graph:
    """Give every edge the "strength" and "length" attributes as the project reads a weight
    (weight_means in the README; the methods page words it: read as strength, a tie's path
    length is 1/weight; read as distance, its strength is 1/weight)."""
    for _, _, data in graph.edges(data=True):
        w = float(data.get("weight", 1.0))
        if weight_means == "strength":
            data["strength"], data["length"] = w, 1.0 / w
        else:
            data["strength"], data["length"] = 1.0 / w, w
    return graph


def undirected_version_nx(graph: nx.Graph) -> nx.Graph:
    """The undirected version the README defines, built by hand: reciprocal ties merge with
    strengths summed.

    (networkx's own ``to_undirected`` keeps the data of one of the two ties, not their sum.)
    """
    if not graph.is_directed():
        return graph
    undirected = nx.Graph()
    undirected.add_nodes_from(graph.nodes(data=True))
    for u, v, data in graph.edges(data=True):
        if undirected.has_edge(u, v):
            undirected[u][v]["strength"] += data.get("strength", 1.0)
        else:
            undirected.add_edge(u, v, strength=data.get("strength", 1.0))
    for _, _, data in undirected.edges(data=True):
        data["length"] = 1.0 / data["strength"]
    return undirected


def karate_graph() -> nx.Graph:
    """The karate club (Zachary 1977, An information flow model for conflict and fission in
    small groups, J. Anthropological Research 33(4):452-473) as networkx ships it, unweighted
    (the known answers the tests check are of the unweighted graph), ids "0".."33".

    The two club names are recoded to neutral codes (assortativity does not depend on the
    labels), and an invented whole-number attribute ``tenure`` is added for numeric
    assortativity.
    """
    source = nx.karate_club_graph()
    rng = random.Random(34)
    graph = nx.Graph()
    first_club = source.nodes[0]["club"]
    for node, data in source.nodes(data=True):
        graph.add_node(str(node), club="club-a" if data["club"] == first_club else "club-b",
                       tenure=rng.randint(1, 9))
    graph.add_edges_from((str(u), str(v)) for u, v in source.edges())
    return graph


def directed_weighted_graph() -> nx.DiGraph:
    """Directed, weighted, two weak components plus two isolates, not strongly connected.

    Weights are powers of two so that 1/weight path lengths add up exactly: tied shortest paths
    then tie in both libraries, and their counts must agree.
    """
    rng = random.Random(2024)
    weights = (0.5, 1.0, 2.0, 4.0)
    graph = nx.DiGraph()
    big = [f"a{i}" for i in range(1, 11)]
    small = ["b1", "b2", "b3", "b4"]
    graph.add_nodes_from(big + small + ["z1", "z2"])
    for i in range(len(big) - 1):  # a backbone keeps the big part weakly connected
        u, v = big[i], big[i + 1]
        graph.add_edge(*((u, v) if rng.random() < 0.6 else (v, u)), weight=rng.choice(weights))
    for u in big:
        for v in big:
            if u != v and not graph.has_edge(u, v) and rng.random() < 0.15:
                graph.add_edge(u, v, weight=rng.choice(weights))
    graph.add_edge("a1", "a2", weight=2.0)
    graph.add_edge("a2", "a1", weight=0.5)  # a reciprocal pair with different weights
    for u, v, w in (("b1", "b2", 1.0), ("b2", "b3", 2.0), ("b3", "b1", 4.0), ("b3", "b4", 0.5),
                    ("b2", "b1", 1.0)):
        graph.add_edge(u, v, weight=w)
    teams = ("red", "blue", "green")
    for node in graph.nodes:
        graph.nodes[node]["team"] = rng.choice(teams)
        graph.nodes[node]["years"] = rng.randint(0, 12)
        graph.nodes[node]["score"] = rng.choice((0.5, 1.25, 2.75, 3.5))
    graph.nodes["a3"]["team"] = None  # a missing value: left out of assortativity
    return graph


def distance_graph() -> nx.Graph:
    """Undirected, weights read as distances (whole numbers 1..5, so sums are exact), with one
    isolate."""
    rng = random.Random(7)
    graph = nx.gnm_random_graph(14, 30, seed=11)
    graph = nx.relabel_nodes(graph, {i: f"d{i}" for i in graph.nodes})
    for u, v in graph.edges:
        graph[u][v]["weight"] = rng.randint(1, 5)
    graph.add_node("d99")
    for node in graph.nodes:
        graph.nodes[node]["group"] = rng.choice(("north", "south"))
        graph.nodes[node]["floor"] = rng.randint(1, 3)
    return graph


def strongly_connected_graph() -> nx.DiGraph:
    """Directed, weighted and strongly connected (a directed cycle plus random chords)."""
    rng = random.Random(5)
    nodes = [f"s{i}" for i in range(1, 13)]
    graph = nx.DiGraph()
    for i, u in enumerate(nodes):
        graph.add_edge(u, nodes[(i + 1) % len(nodes)], weight=rng.choice((1.0, 2.0, 4.0)))
    for u in nodes:
        for v in nodes:
            if u != v and not graph.has_edge(u, v) and rng.random() < 0.2:
                graph.add_edge(u, v, weight=rng.choice((0.5, 1.0, 2.0, 4.0)))
    assert nx.is_strongly_connected(graph)
    for node in graph.nodes:
        graph.nodes[node]["site"] = rng.choice(("harbour", "hill", "mill"))
        graph.nodes[node]["level"] = rng.randint(1, 4)
    return graph


# ---------------------------------------------------------------------------------------------
# Analyses shared by the measure and statistic cross-checks (computed once per session)


@pytest.fixture(scope="session")
def karate_case(tmp_path_factory) -> tuple[nx.Graph, NetworkAnalysis]:
    graph = karate_graph()
    analysis = analyse_graph(tmp_path_factory.mktemp("karate"), graph,
                             attributes=("club", "tenure"))
    return add_strength_and_length(graph), analysis


@pytest.fixture(scope="session")
def directed_case(tmp_path_factory) -> tuple[nx.DiGraph, NetworkAnalysis]:
    graph = directed_weighted_graph()
    analysis = analyse_graph(tmp_path_factory.mktemp("directed"), graph, weight="weight",
                             attributes=("team", "years", "score"))
    return add_strength_and_length(graph), analysis


@pytest.fixture(scope="session")
def distance_case(tmp_path_factory) -> tuple[nx.Graph, NetworkAnalysis]:
    graph = distance_graph()
    analysis = analyse_graph(tmp_path_factory.mktemp("distance"), graph, weight="weight",
                             weight_means="distance", attributes=("group", "floor"))
    return add_strength_and_length(graph, "distance"), analysis


@pytest.fixture(scope="session")
def strong_case(tmp_path_factory) -> tuple[nx.DiGraph, NetworkAnalysis]:
    graph = strongly_connected_graph()
    analysis = analyse_graph(tmp_path_factory.mktemp("strong"), graph, weight="weight",
                             attributes=("site", "level"))
    return add_strength_and_length(graph), analysis


CROSS_CHECK_CASES = ("karate_case", "directed_case", "distance_case", "strong_case")
