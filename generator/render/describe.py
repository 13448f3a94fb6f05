"""Plain words for settings and results that several pages share: kinds, weights, methods,
stability and the references of what ran."""

from __future__ import annotations

from ..analyse import CommunityResult, NetworkAnalysis
from ..config import NetworkConfig
from ..vocabulary import (
    LAYOUT_REFERENCES,
    MEASURE_NAMES,
    NULL_REFERENCES,
    PALETTE_REFERENCES,
    REFERENCES,
    SAMPLING_REFERENCES,
    STABILITY_REFERENCES,
    WEIGHT_REFERENCES,
    Reference,
    community_method,
    is_missing,
    measure,
    number,
    share,
    statistic,
)
from ..vocabulary.communities import CONDUCTANCE_REFERENCES, PERTURBATION_REFERENCES

__all__ = [
    "a_network", "measure_title", "method_title", "network_kind", "references_of",
    "stability_reading", "weight_reading", "weights_sentence",
]


def measure_title(column: str) -> str:
    return measure(column).title if column in MEASURE_NAMES else column.replace("_", " ").capitalize()


def method_title(key: str) -> str:
    """A community method as every sentence writes it: "Leiden", "Label propagation"."""
    return community_method(key).title


def network_kind(analysis: NetworkAnalysis) -> str:
    return (f"{'directed' if analysis.directed else 'undirected'}, "
            f"{'weighted' if analysis.weighted else 'unweighted'}")


def a_network(analysis: NetworkAnalysis) -> str:
    """ "A directed, weighted network" or "An undirected, unweighted network"."""
    kind = network_kind(analysis)
    return f"{'An' if kind.startswith('u') else 'A'} {kind} network"


def weights_sentence(config: NetworkConfig, analysis: NetworkAnalysis) -> str:
    """Where the weights came from and what they mean, in one sentence."""
    if not analysis.weighted:
        return "Ties are unweighted: every tie counts the same (strength 1, path length 1)."
    source = (f"the column '{config.weight}'" if config.weight is not None
              else "the cells of the adjacency matrix")
    if config.projected_mode is not None:
        source = (f"the projection of the two-mode network '{config.projected_from}' onto its "
                  f"{config.projected_mode} nodes ({config.projection} weighting)")
    if analysis.weight_means == "strength":
        return (f"Tie weights come from {source} and are read as strengths: a bigger weight is a "
                "stronger tie, and a tie's path length is 1/weight.")
    return (f"Tie weights come from {source} and are read as distances: a bigger weight puts the "
            "two nodes farther apart (path length = weight), and a tie's strength is 1/weight.")


def weight_reading(reads: str, analysis: NetworkAnalysis) -> str:
    """How one measure used the weights: ``reads`` is "strength", "length" or "none"."""
    if reads == "none":
        return "counts ties; ignores weights"
    if not analysis.weighted:
        return "every tie has strength 1 and length 1 (unweighted)"
    if reads == "strength":
        return ("tie strength = weight" if analysis.weight_means == "strength"
                else "tie strength = 1/weight")
    return ("path length = 1/weight" if analysis.weight_means == "strength"
            else "path length = weight")


def stability_reading(result: CommunityResult) -> str:
    """A plain sentence on how far the seeded runs agreed with the partition kept."""
    if result.mean_ari is None and result.modularity is None:
        return ("The network has no ties, so every node forms its own community and there is "
                "nothing to compare.")
    if result.runs == 1:
        return ("Only one run was made, so agreement between runs cannot be judged; raise "
                "[communities] runs to check how stable the communities are.")
    runs = result.runs
    found = share(result.best_run_share)
    if result.distinct_partitions == 1:
        return f"All {runs} runs found exactly the same communities: the split is stable."
    if result.mean_ari is None or is_missing(result.mean_ari):
        return (f"The {runs} runs found {result.distinct_partitions} different partitions "
                f"({found} found this one); their agreement could not be measured.")
    if result.mean_ari >= 0.9:
        return (f"The {runs} runs agreed closely: {found} found exactly this partition and the "
                "others differed only slightly.")
    if result.mean_ari >= 0.7:
        return (f"The {runs} runs mostly agreed: the main groups are stable, but some nodes moved "
                f"between communities from run to run ({found} of runs found this exact "
                "partition).")
    return (f"The {runs} runs disagreed (mean adjusted Rand index {number(result.mean_ari)}): this "
            "partition is one of several about equally good ones, so read the communities as "
            "tentative.")


def references_of(analysis: NetworkAnalysis) -> list[Reference]:
    """The references of every method that ran for ``analysis``, in first-use order."""
    keys: list[str] = list(WEIGHT_REFERENCES) if analysis.weighted else []
    for column in analysis.measures.columns:
        keys += measure(column).references
    if analysis.sampling:
        keys += SAMPLING_REFERENCES
    for stat in analysis.statistics:
        if stat.value is not None:  # a statistic that could not be computed used no method
            keys += statistic(stat.name).references
    if analysis.communities.objective is not None:  # the runs happened (the network has ties)
        keys += community_method(analysis.communities.method).references
        keys += STABILITY_REFERENCES
        keys += CONDUCTANCE_REFERENCES  # the communities page profiles every community
        if analysis.stability.ran:
            keys += PERTURBATION_REFERENCES
    if analysis.significance.tests:
        keys += NULL_REFERENCES
    keys += LAYOUT_REFERENCES + PALETTE_REFERENCES  # the map's layout and colours
    return [REFERENCES[k] for k in dict.fromkeys(keys)]
