"""Plain words for settings and results that several pages share: titles, weights, methods."""

from __future__ import annotations

from ..analyse import MEASURE_INFO, PATH_MEASURES, STATISTIC_INFO, CommunityResult, NetworkAnalysis
from ..config import NetworkConfig
from .display import is_missing, significant

__all__ = [
    "COMMUNITY_METHOD_TITLES", "PATH_MEASURES", "a_network", "measure_title", "network_kind",
    "stability_reading", "statistic_title", "weight_reading", "weights_sentence",
]

COMMUNITY_METHOD_TITLES = {
    "leiden": "Leiden",
    "louvain": "Louvain",
    "label-propagation": "Label propagation",
}


def measure_title(column: str) -> str:
    if column in MEASURE_INFO:
        return MEASURE_INFO[column].title
    if column == "community":
        return "Community"
    return column.replace("_", " ").capitalize()


def statistic_title(name: str) -> str:
    """``assortativity:clinic`` reads "Attribute assortativity: clinic"."""
    base, _, attribute = name.partition(":")
    info = STATISTIC_INFO.get(name) or STATISTIC_INFO.get(base)
    title = info.title if info else base.replace("_", " ").capitalize()
    return f"{title}: {attribute}" if attribute else title


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
    share = f"{result.best_run_share:.0%}"
    if result.distinct_partitions == 1:
        return f"All {runs} runs found exactly the same communities: the split is stable."
    if is_missing(result.mean_ari):
        return (f"The {runs} runs found {result.distinct_partitions} different partitions "
                f"({share} found this one); their agreement could not be measured.")
    if result.mean_ari >= 0.9:
        return (f"The {runs} runs agreed closely: {share} found exactly this partition and the "
                "others differed only slightly.")
    if result.mean_ari >= 0.7:
        return (f"The {runs} runs mostly agreed: the main groups are stable, but some nodes moved "
                f"between communities from run to run ({share} of runs found this exact "
                "partition).")
    ari = significant(result.mean_ari, 2)
    return (f"The {runs} runs disagreed (mean adjusted Rand index {ari}): this partition is one "
            "of several about equally good ones, so read the communities as tentative.")
