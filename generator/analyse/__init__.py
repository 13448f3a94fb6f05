"""Pure analysis of a cleaned network: node measures, statistics, communities and a layout."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..config import CommunitiesConfig, MeasuresConfig, SignificanceConfig
from ..errors import Finding
from ..ingest import CleanNetwork
from .budget import path_sources, scaled_for_size
from .communities import (
    NOT_PERTURBED,
    AttributeComparison,
    CommunityProfile,
    CommunityResult,
    CommunityTies,
    StabilityResult,
    community_profiles,
    community_ties,
    compare_with_attribute,
    find_communities,
    perturbed_stability,
)
from .graph import build_graph, tie_strengths, undirected_version
from .layout import network_layout
from .measures import Omission, PathSampling, node_measures
from .mixing import GroupMixing, MixingTable, categorical_attributes, mixing_table
from .nulls import NOT_REQUESTED, NullTest, SignificanceResult, null_model_tests
from .provenance import library_versions
from .statistics import Statistic, network_statistics

__all__ = [
    "AttributeComparison",
    "CommunityProfile",
    "CommunityResult",
    "CommunityTies",
    "GroupMixing",
    "MixingTable",
    "NetworkAnalysis",
    "NullTest",
    "Omission",
    "PathSampling",
    "SignificanceResult",
    "StabilityResult",
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
    stability: StabilityResult = NOT_PERTURBED  # communities rerun on perturbed ties
    community_profiles: tuple[CommunityProfile, ...] = ()  # one per community, 1..k
    attribute_comparisons: tuple[AttributeComparison, ...] = ()  # one per categorical attribute
    scaled: tuple[str, ...] = ()  # default settings cut down for the network's size (budget.py)

    def statistic(self, name: str) -> float | None:
        return next((s.value for s in self.statistics if s.name == name), None)

    @property
    def labels(self) -> list[str]:
        return [str(v) for v in self.nodes["label"]]

    def tie_vertices(self) -> tuple[np.ndarray, np.ndarray]:
        """Each tie's source and target as positions in node order."""
        index = pd.Index(self.nodes.index)
        return (index.get_indexer(self.edges["source"]).astype(np.int64),
                index.get_indexer(self.edges["target"]).astype(np.int64))

    def community_ties(self) -> CommunityTies:
        """The ties inside and between the communities found."""
        sources, targets = self.tie_vertices()
        return community_ties(self.communities.membership, sources, targets,
                              directed=self.directed)


def analyse_network(network: CleanNetwork, *, communities: CommunitiesConfig,
                    measures: MeasuresConfig, seed: int,
                    significance: SignificanceConfig | None = None,
                    progress: Callable[[int, int], None] | None = None,
                    stability_progress: Callable[[int, int], None] | None = None,
                    runs_progress: Callable[[int, int], None] | None = None,
                    null_workers: int | None = None) -> NetworkAnalysis:
    """Compute every measure, statistic and the community partition of one network, and (when
    ``significance`` asks for null samples) test the statistics against rewired networks;
    ``progress(done, samples)`` follows those tests, ``runs_progress(done, runs)`` the community
    runs, ``stability_progress(done, total)`` the
    community reruns on perturbed ties. ``null_workers`` is passed to ``null_model_tests``
    (1: no processes of its own, as when the network is already analysed in a worker)."""
    communities, scaled_significance, scaled = scaled_for_size(
        communities, significance or SignificanceConfig(null_samples=0), len(network.edges))
    measures, fewer_sources = path_sources(measures, len(network.edges))
    if fewer_sources and len(network.nodes) > measures.exact_paths_up_to:
        scaled += ("path_sample_sources",)
    if significance is not None:
        significance = scaled_significance
    graph = build_graph(network)
    weighted = network.weighted
    node = node_measures(graph, weighted=weighted, exact_up_to=measures.exact_paths_up_to,
                         sample_sources=measures.path_sample_sources, seed=seed)
    undirected = undirected_version(graph)
    found = find_communities(undirected, method=communities.method,
                             resolution=communities.resolution, runs=communities.runs, seed=seed,
                             weighted=weighted, progress=runs_progress)
    stability = perturbed_stability(
        undirected, found.membership, method=communities.method,
        resolution=communities.resolution, runs=communities.runs, seed=seed, weighted=weighted,
        perturbations=communities.perturbations, share=communities.perturb_share,
        progress=stability_progress)
    table = node.table.copy()
    table["community"] = list(found.membership)
    if stability.ran:
        table["community_confidence"] = list(stability.confidence)
    attributes = network.nodes[list(network.attributes)]
    compared = tuple(compare_with_attribute(str(name), found.membership,
                                            [None if pd.isna(v) else v for v in attributes[name]])
                     for name in categorical_attributes(attributes))
    stats = network_statistics(graph, weighted=weighted, betweenness=list(table["betweenness"]),
                               attributes=attributes,
                               modularity=found.modularity, communities=found.count,
                               paths=node.paths)
    stats += community_statistics(found, stability, compared)
    return NetworkAnalysis(
        network_id=network.id,
        title=network.config.title,
        directed=network.directed,
        weighted=weighted,
        weight_means=network.config.weight_means,
        measures=table,
        statistics=tuple(stats),
        communities=found,
        layout=tuple(network_layout(graph, seed=seed, weighted=weighted,
                                    membership=found.membership)),
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
            progress=progress, workers=null_workers),
        mixing=tuple(mixing_table(graph, attributes[column], column)
                     for column in categorical_attributes(attributes)),
        listed_nodes=network.listed,
        stability=stability,
        scaled=scaled,
        community_profiles=community_profiles(undirected, found.membership, stability.confidence),
        attribute_comparisons=compared,
    )


def community_statistics(found: CommunityResult, stability: StabilityResult,
                         compared: tuple[AttributeComparison, ...]) -> list[Statistic]:
    """The statistics.csv rows of community stability and of communities against attributes:
    ``community_agreement_ari`` and ``community_agreement_nmi`` (the runs against the kept
    partition), ``community_robustness_ari`` (perturbed reruns, when they ran) and
    ``community_attribute_nmi:<attribute>`` per categorical attribute."""
    why = "no_ties" if found.objective is None else "trivial_partition"
    rows = [Statistic("community_agreement_ari", found.mean_ari,
                      None if found.mean_ari is not None else why),
            Statistic("community_agreement_nmi", found.mean_nmi,
                      None if found.mean_nmi is not None else why)]
    if stability.perturbations > 0:
        robust_why = stability.why if stability.why else (
            None if stability.robustness_ari is not None else "trivial_partition")
        rows.append(Statistic("community_robustness_ari", stability.robustness_ari, robust_why))
    rows += [Statistic(f"community_attribute_nmi:{c.attribute}", c.nmi, c.why,
                       left_out=c.left_out) for c in compared]
    return rows
