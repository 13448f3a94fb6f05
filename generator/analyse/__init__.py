"""Pure analysis of a cleaned network: node measures, statistics, communities and a layout."""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from ..config import CommunitiesConfig, MeasuresConfig
from ..errors import Finding
from ..ingest import CleanNetwork
from .communities import COMMUNITY_REFERENCES, CommunityResult, find_communities
from .graph import build_graph, undirected_version
from .layout import network_layout
from .measures import MEASURE_INFO, PATH_MEASURES, PathSampling, node_measures
from .provenance import library_versions
from .references import REFERENCES, Reference
from .statistics import STATISTIC_INFO, Statistic, network_statistics

__all__ = [
    "COMMUNITY_REFERENCES",
    "MEASURE_INFO",
    "PATH_MEASURES",
    "REFERENCES",
    "STATISTIC_INFO",
    "CommunityResult",
    "NetworkAnalysis",
    "PathSampling",
    "Reference",
    "Statistic",
    "analyse_network",
]


@dataclass(frozen=True)
class NetworkAnalysis:
    """Everything computed for one network, with the settings and versions that made it.

    ``measures`` has one row per node (index: id) and the design's measure columns, including
    ``community``; ``layout`` holds an (x, y) in the unit square per node, in node order.
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
    omitted: dict[str, str]
    sampling: PathSampling | None
    seed: int
    nodes: pd.DataFrame  # the cleaned node table: index id, "label", then node attributes
    edges: pd.DataFrame  # the cleaned edge list: source, target, weight (if weighted)
    attributes: tuple[str, ...]  # node attribute columns of ``nodes``
    findings: tuple[Finding, ...]  # the data checks of ingest, passed on for the checks page
    color_by: str | None
    size_by: str | None
    versions: dict[str, str] = field(default_factory=dict)
    edge_pairs: tuple[tuple[int, int], ...] = ()  # ties as vertex-index pairs, for drawing
    edge_strengths: tuple[float, ...] = ()

    def statistic(self, name: str) -> float | None:
        return next((s.value for s in self.statistics if s.name == name), None)

    @property
    def labels(self) -> list[str]:
        return [str(v) for v in self.nodes["label"]]

    @property
    def references(self) -> list[Reference]:
        """The references of every method that ran, in first-use order."""
        keys: list[str] = ["opsahl2010", "newman2001"] if self.weighted else []
        for column in self.measures.columns:
            keys += MEASURE_INFO[column].references if column in MEASURE_INFO else ()
        if self.sampling:
            keys.append("brandes2007")
        for stat in self.statistics:
            info = STATISTIC_INFO.get(stat.name) or STATISTIC_INFO.get(stat.name.split(":")[0])
            keys += info.references if info else ()
        if self.communities.objective is not None:  # the runs happened (the network has ties)
            keys += COMMUNITY_REFERENCES[self.communities.method] + ("hubert1985", "danon2005")
        keys += ["fruchterman1991", "okabe2008"]  # the map's layout and colours
        return [REFERENCES[k] for k in dict.fromkeys(keys)]


def analyse_network(network: CleanNetwork, *, communities: CommunitiesConfig,
                    measures: MeasuresConfig, seed: int) -> NetworkAnalysis:
    """Compute every measure, statistic and the community partition of one network."""
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
    stats = network_statistics(graph, weighted=weighted, betweenness=list(table["betweenness"]),
                               attributes=network.nodes[list(network.attributes)],
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
        color_by=network.config.color_by,
        size_by=network.config.size_by,
        versions=library_versions(),
        edge_pairs=tuple(tuple(e.tuple) for e in graph.es),
        edge_strengths=tuple(graph.es["strength"]),
    )
