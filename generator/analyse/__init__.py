"""Pure analysis of a cleaned network: node measures, statistics, communities and a layout."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import pandas as pd

from ..config import CommunitiesConfig, MeasuresConfig, SignificanceConfig
from ..errors import Finding
from ..ingest import CleanNetwork
from .communities import CommunityResult, find_communities
from .graph import build_graph, tie_strengths, undirected_version
from .layout import network_layout
from .measures import Omission, PathSampling, node_measures
from .mixing import GroupMixing, MixingTable, categorical_attributes, mixing_table
from .nulls import NOT_REQUESTED, NullTest, SignificanceResult, null_model_tests
from .provenance import library_versions
from .statistics import Statistic, network_statistics

__all__ = [
    "CommunityResult",
    "GroupMixing",
    "MixingTable",
    "NetworkAnalysis",
    "NullTest",
    "Omission",
    "PathSampling",
    "SignificanceResult",
    "Statistic",
    "analyse_network",
    "tie_strengths",
]


@dataclass(frozen=True)
class NetworkAnalysis:
    """Everything computed for one network, with the settings and versions that made it.

    ``measures`` has one row per node (index: id) and the measure columns that apply, including
    ``community``; ``layout`` holds an (x, y) in the unit square per node, in node order. Names
    and numbers only: how results are worded, coloured or drawn is decided downstream.
    """

    network_id: str
    title: str
    directed: bool
    weighted: bool
    weight_means: str
    measures: pd.DataFrame
    statistics: tuple[Statistic, ...]
    communities: CommunityResult
    layout: tuple[tuple[float, float], ...]
    omitted: dict[str, Omission]
    sampling: PathSampling | None
    seed: int
    nodes: pd.DataFrame  # the cleaned node table: index id, "label", then node attributes
    edges: pd.DataFrame  # the cleaned edge list: source, target, weight (if weighted)
    attributes: tuple[str, ...]  # node attribute columns of ``nodes``
    findings: tuple[Finding, ...]  # the data checks of ingest, passed on for the checks page
    versions: dict[str, str] = field(default_factory=dict)
    significance: SignificanceResult = NOT_REQUESTED  # tests against rewired networks
    mixing: tuple[MixingTable, ...] = ()  # one per categorical attribute, in column order
    listed_nodes: int | None = None  # nodes in the node list; None when there is none

    def statistic(self, name: str) -> float | None:
        return next((s.value for s in self.statistics if s.name == name), None)

    @property
    def labels(self) -> list[str]:
        return [str(v) for v in self.nodes["label"]]


def analyse_network(network: CleanNetwork, *, communities: CommunitiesConfig,
                    measures: MeasuresConfig, seed: int,
                    significance: SignificanceConfig | None = None,
                    progress: Callable[[int, int], None] | None = None) -> NetworkAnalysis:
    """Compute every measure, statistic and the community partition of one network, and (when
    ``significance`` asks for null samples) test the statistics against rewired networks;
    ``progress(done, samples)`` follows those tests."""
    graph = build_graph(network)
    weighted = network.weighted
    node = node_measures(graph, weighted=weighted, exact_up_to=measures.exact_paths_up_to,
                         sample_sources=measures.path_sample_sources, seed=seed)
    undirected = undirected_version(graph)
    found = find_communities(undirected, method=communities.method,
                             resolution=communities.resolution, runs=communities.runs, seed=seed,
                             weighted=weighted)
    table = node.table.copy()
    table["community"] = list(found.membership)
    attributes = network.nodes[list(network.attributes)]
    stats = network_statistics(graph, weighted=weighted, betweenness=list(table["betweenness"]),
                               attributes=attributes,
                               modularity=found.modularity, communities=found.count)
    return NetworkAnalysis(
        network_id=network.id,
        title=network.config.title,
        directed=network.directed,
        weighted=weighted,
        weight_means=network.config.weight_means,
        measures=table,
        statistics=tuple(stats),
        communities=found,
        layout=tuple(network_layout(graph, seed=seed, weighted=weighted)),
        omitted=node.omitted,
        sampling=node.sampling,
        seed=seed,
        nodes=network.nodes,
        edges=network.edges,
        attributes=network.attributes,
        findings=tuple(network.checks.findings),
        versions=library_versions(),
        significance=null_model_tests(
            graph, weighted=weighted, attributes=network.nodes[list(network.attributes)],
            method=communities.method, resolution=communities.resolution, runs=communities.runs,
            samples=significance.null_samples if significance else 0, seed=seed,
            progress=progress),
        mixing=tuple(mixing_table(graph, attributes[column], column)
                     for column in categorical_attributes(attributes)),
        listed_nodes=network.listed,
    )
