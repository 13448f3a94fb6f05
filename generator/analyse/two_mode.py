"""Two-mode networks: degree, degree share and density of the two-mode network itself, and its
projections onto each mode, which are then analysed as any one-mode network.

Pure functions: names and numbers only."""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations

import igraph as ig
import pandas as pd

from ..config import NetworkConfig
from ..errors import Finding
from ..ingest import CleanNetwork, DataChecks
from ..ingest.network import natural_key
from ..ingest.two_mode import TwoModeNetwork, projection_findings, typed_mode_attributes
from .layout import network_layout
from .statistics import Statistic

__all__ = ["TwoModeAnalysis", "analyse_two_mode", "project", "projected_ties"]


@dataclass(frozen=True)
class TwoModeAnalysis:
    """The two-mode network's own results.

    ``nodes`` has one row per node (first mode, then second): mode, id, label, the attributes,
    ``degree`` (ties to nodes of the other mode) and ``degree_share`` (degree divided by the
    number of nodes of the other mode; undefined, NA, when that mode is empty). ``statistics``
    holds ``nodes:<mode>`` for each mode, ``edges`` and ``density``. ``layout`` is an (x, y) per
    node in the unit square, in node order."""

    network_id: str
    title: str
    modes: tuple[str, str]
    projection: str
    weighted: bool
    nodes: pd.DataFrame
    edges: pd.DataFrame
    attributes: tuple[str, ...]
    statistics: tuple[Statistic, ...]
    layout: tuple[tuple[float, float], ...]
    findings: tuple[Finding, ...]
    seed: int

    def statistic(self, name: str) -> float | None:
        return next((s.value for s in self.statistics if s.name == name), None)


def _graph(network: TwoModeNetwork) -> ig.Graph:
    keys = list(zip(network.nodes["mode"], network.nodes["id"]))
    index = {key: i for i, key in enumerate(keys)}
    first, second = network.modes
    pairs = [(index[(first, a)], index[(second, b)])
             for a, b in zip(network.edges["first"], network.edges["second"])]
    graph = ig.Graph(n=len(keys), edges=pairs)
    weights = ([float(w) for w in network.edges["weight"]] if network.weighted
               else [1.0] * len(pairs))
    graph.es["weight"] = weights
    graph.es["strength"] = weights
    graph.es["length"] = [1.0 / w for w in weights]
    return graph


def analyse_two_mode(network: TwoModeNetwork, *, seed: int) -> TwoModeAnalysis:
    """Degree and degree share of every node (Borgatti & Everett 1997), and the counts and
    density m / (n1 × n2) of the two-mode network."""
    first, second = network.modes
    graph = _graph(network)
    degree = graph.degree()
    sizes = {mode: int((network.nodes["mode"] == mode).sum()) for mode in network.modes}
    other = {first: sizes[second], second: sizes[first]}
    nodes = network.nodes.copy()
    nodes["degree"] = pd.Series(degree, dtype="Int64", index=nodes.index)
    nodes["degree_share"] = pd.Series(
        [d / other[m] if other[m] else None for d, m in zip(degree, nodes["mode"])],
        dtype="Float64", index=nodes.index)
    edges = len(network.edges)
    cells = sizes[first] * sizes[second]
    stats = [Statistic(f"nodes:{first}", float(sizes[first])),
             Statistic(f"nodes:{second}", float(sizes[second])),
             Statistic("edges", float(edges)),
             Statistic("density", edges / cells if cells else None,
                       why=None if cells else "empty_mode")]
    return TwoModeAnalysis(
        network_id=network.id, title=network.config.title, modes=network.modes,
        projection=network.config.projection, weighted=network.weighted, nodes=nodes,
        edges=network.edges, attributes=network.attributes, statistics=tuple(stats),
        layout=tuple(network_layout(graph, seed=seed, weighted=False)),
        findings=tuple(network.checks.findings), seed=seed)


def projected_ties(network: TwoModeNetwork, mode: str, weighting: str
                   ) -> dict[tuple[str, str], float]:
    """The ties of the projection onto ``mode``: each pair of its nodes that share at least one
    node of the other mode, with its weight.

    ``shared``: the number of other-mode nodes the pair shares. ``newman``: the sum over the
    shared nodes of 1/(k - 1), k being the shared node's degree (Newman 2001, "Scientific
    collaboration networks. II", Phys Rev E 64, 016132); a shared node of degree 1 cannot be
    shared, so it adds nothing. Ties of the two-mode network count once whatever their weight.
    Pairs are (a, b) with a before b in natural id order."""
    first, _ = network.modes
    own, others = ("first", "second") if mode == first else ("second", "first")
    members: dict[str, set[str]] = {}
    for node, other in zip(network.edges[own], network.edges[others]):
        members.setdefault(str(other), set()).add(str(node))
    ties: dict[tuple[str, str], float] = {}
    for other in sorted(members, key=natural_key):
        group = sorted(members[other], key=natural_key)
        k = len(group)
        if k < 2:
            continue
        add = 1.0 if weighting == "shared" else 1.0 / (k - 1)
        for a, b in combinations(group, 2):
            ties[(a, b)] = ties.get((a, b), 0.0) + add
    return ties


def project(network: TwoModeNetwork, config: NetworkConfig) -> CleanNetwork:
    """The projection that ``config`` (from ``config.projections``) describes, as a one-mode
    network the rest of the analysis takes like any other. Its weights are strengths."""
    mode = config.projected_mode
    assert mode is not None, "not a projection"
    rows = network.nodes[network.nodes["mode"] == mode]
    ids = [str(v) for v in rows["id"]]
    attributes = typed_mode_attributes(network, mode)
    labels = pd.Series([str(v) for v in rows["label"]], index=pd.Index(ids, name="id"),
                       dtype="string", name="label")
    nodes = pd.concat([labels, attributes], axis=1)
    ties = projected_ties(network, mode, network.config.projection)
    order = {node: i for i, node in enumerate(ids)}
    pairs = sorted(ties, key=lambda p: (order[p[0]], order[p[1]]))
    edges = pd.DataFrame({"source": pd.Series([a for a, _ in pairs], dtype=str),
                          "target": pd.Series([b for _, b in pairs], dtype=str),
                          "weight": pd.Series([ties[p] for p in pairs], dtype=float)})
    # The two-mode network's file checks are its own (listed once, under it); the projection
    # says how it was made.
    checks = DataChecks(projection_findings(network, mode, tied=bool(pairs)))
    return CleanNetwork(config, nodes, edges, True, tuple(attributes.columns), checks,
                        network.files)
