"""Every network statistic netfolio writes: its row name in statistics.csv, title, definition,
references, and its plain reading for a non-specialist as a function of the value.

Readings claim no more than the number supports. An attribute assortativity or E-I index claims a
preference or an avoidance only when its test against rewired networks gives p below 0.05 (and
says so); tested and not below, it reads as no clear tendency; untested, it describes the value
and says that no preference is claimed."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from .formatting import (
    ERROR_DIGITS,
    about,
    at_least,
    count,
    count_of,
    number,
    share,
    with_standard_error,
)
from .significance import is_clear, null_clause

if TYPE_CHECKING:
    from ..analyse.nulls import NullTest

__all__ = [
    "ESTIMATE_COLUMNS",
    "NEUTRAL_BELOW",
    "STATISTICS",
    "UNDEFINED_REASONS",
    "Reading",
    "StatisticEntry",
    "estimate_label",
    "path_statistics_sentence",
    "reading",
    "statistic",
    "statistic_value",
    "statistic_title",
    "left_out_sentence",
    "undefined_reason",
]

NEUTRAL_BELOW = 0.1  # |r| below this reads as no clear tendency
_MODERATE, _STRONG = 0.3, 0.5  # |r| bands: weak below 0.3, moderate below 0.5, strong above
_CLEAR_MODULARITY, _STRONG_MODULARITY = 0.3, 0.4
# Agreement (ARI, NMI) bands for readings: much the same from 0.9, partly from 0.5 (practice).
_HIGH_AGREEMENT, _SOME_AGREEMENT = 0.9, 0.5


@dataclass(frozen=True, kw_only=True)
class Reading:
    """What a reading may use: the value and the facts of the network it belongs to."""

    value: float
    attribute: str = ""  # for assortativity:<attribute>
    numeric: bool = False  # the attribute is numeric (Pearson form) rather than categories
    directed: bool = False
    weighted: bool = False
    weight_means: str = "strength"
    steps: float | None = None  # the same path statistic counting each tie as one step
    test: NullTest | None = None  # the statistic's test against rewired networks, if it ran
    estimate: str | None = None  # None: exact; "sampled" or "lower_bound" (Statistic.estimate)
    standard_error: float | None = None  # of a sampled value
    steps_standard_error: float | None = None  # of a sampled ``steps``


@dataclass(frozen=True, kw_only=True)
class StatisticEntry:
    """One row of statistics.csv (``name`` may be a prefix: ``assortativity`` covers
    ``assortativity:<attribute>``)."""

    name: str
    title: str
    definition: str
    read: Callable[[Reading], str]
    references: tuple[str, ...] = ()
    whole: bool = False


def _counted(one: str, many: str) -> Callable[[Reading], str]:
    def read(r: Reading) -> str:
        return one if r.value == 1 else many.format(value=number(r.value))
    return read


def _percent(template: str) -> Callable[[Reading], str]:
    def read(r: Reading) -> str:
        return template.format(percent=share(r.value))
    return read


def _length_unit(r: Reading) -> str:
    if r.weight_means == "strength":
        return "in path length (1/weight per tie)"
    return "in path length (the weight of each tie)"


def _steps(value: float) -> str:
    return "1 step" if value == 1 else f"{number(value)} steps"


def _error(error: float | None) -> str:
    return "" if error is None else f", standard error {number(error, ERROR_DIGITS)}"


def _diameter(r: Reading) -> str:
    if r.estimate == "lower_bound":
        return _diameter_bound(r)
    if not r.weighted:
        return f"No two connected nodes are more than {_steps(r.value)} (ties) apart."
    text = f"The farthest two connected nodes are {number(r.value)} apart {_length_unit(r)}."
    if r.steps is not None:
        text += (f" Counting every tie as one step, no two connected nodes are more than "
                 f"{_steps(r.steps)} apart.")
    return text


def _diameter_bound(r: Reading) -> str:
    found = ("the longest shortest path found from the sampled source nodes, so the diameter is "
             "at least this and may be larger")
    if not r.weighted:
        return f"Some connected nodes are {_steps(r.value)} (ties) apart: {found}."
    text = f"Some connected nodes are {number(r.value)} apart {_length_unit(r)}: {found}."
    if r.steps is not None:
        text += (f" Counting every tie as one step, some are {_steps(r.steps)} apart, so the "
                 "diameter in steps is at least that.")
    return text


def _average_path(r: Reading) -> str:
    if r.estimate == "sampled":
        return _average_path_sampled(r)
    if not r.weighted:
        return f"Connected pairs are on average {_steps(r.value)} (ties) apart."
    text = f"Connected pairs are on average {number(r.value)} apart {_length_unit(r)}."
    if r.steps is not None:
        text += f" Counting every tie as one step, they are on average {_steps(r.steps)} apart."
    return text


def _average_path_sampled(r: Reading) -> str:
    how = "estimated from the pairs that start at the sampled source nodes"
    if not r.weighted:
        return (f"Connected pairs are on average about {_steps(r.value)} (ties) apart ({how}"
                f"{_error(r.standard_error)}).")
    text = (f"Connected pairs are on average about {number(r.value)} apart {_length_unit(r)} "
            f"({how}{_error(r.standard_error)}).")
    if r.steps is not None:
        text += (f" Counting every tie as one step, they are on average about {_steps(r.steps)} "
                 f"apart{_error(r.steps_standard_error)}.")
    return text


def _strength_word(r: float) -> str:
    size = abs(r)
    return "strongly" if size >= _STRONG else "clearly" if size >= _MODERATE else "slightly"


def _tested(r: Reading) -> NullTest | None:
    """The test a reading may lean on: one that ran and gave a p-value."""
    test = r.test
    return test if test is not None and test.p is not None and test.null_mean is not None else None


def _above_chance(r: Reading, test: NullTest) -> bool:
    return test.null_mean is not None and r.value > test.null_mean


def _degree_assortativity(r: Reading) -> str:
    shown = number(r.value)
    test = _tested(r)
    if test is not None:
        if not is_clear(test):
            return ("No clear tendency to join nodes of similar or of different degree was found: "
                    f"r = {shown} is {null_clause(test)}.")
        side = ("nodes of similar degree" if _above_chance(r, test)
                else "well-tied nodes with little-tied ones")
        return (f"Ties join {side} more often than chance would with these degrees: r = {shown} "
                f"is {null_clause(test)}.")
    if abs(r.value) < NEUTRAL_BELOW:
        return ("Ties show no clear tendency to join nodes of similar or of different degree "
                f"(r = {shown}).")
    side = ("nodes of similar degree" if r.value > 0
            else "well-tied nodes with little-tied ones")
    return (f"r = {shown}: ties join {side} more often than random mixing would. This was not "
            "tested against chance, so it claims no tendency.")


def _attribute_assortativity(r: Reading) -> str:
    shown = number(r.value)
    test = _tested(r)
    if test is not None:
        if not is_clear(test):
            return (f"No clear tendency to join nodes alike or unlike in {r.attribute} was found: "
                    f"r = {shown} is {null_clause(test)}.")
        if _above_chance(r, test):
            how = f"{_strength_word(r.value)} " if r.value > 0 else ""
            return (f"Ties {how}prefer nodes alike in {r.attribute}: r = {shown} is "
                    f"{null_clause(test)}.")
        return (f"Ties avoid nodes alike in {r.attribute}, joining unlike ones more often than "
                f"chance would: r = {shown} is {null_clause(test)}.")
    alike = f"with similar {r.attribute}" if r.numeric else f"of the same {r.attribute}"
    unlike = f"with different {r.attribute}" if r.numeric else f"of a different {r.attribute}"
    if abs(r.value) < NEUTRAL_BELOW:
        return f"Ties show no clear tendency to join nodes {alike} or {unlike} (r = {shown})."
    side = alike if r.value > 0 else unlike
    return (f"r = {shown}: ties join nodes {side} more often than random mixing would. This was "
            "not tested against chance, so it claims no tendency.")


def _ei_index(r: Reading) -> str:
    shown = number(r.value)
    inside = share((1 - r.value) / 2)
    test = _tested(r)
    if test is not None:
        if not is_clear(test):
            return (f"No clear tendency for ties to stay inside or cross {r.attribute} groups "
                    f"was found: E-I = {shown} is {null_clause(test)}.")
        if not _above_chance(r, test):
            return (f"Ties prefer nodes alike in {r.attribute}, staying inside groups more often "
                    f"than chance would: E-I = {shown} is {null_clause(test)}.")
        return (f"Ties avoid nodes alike in {r.attribute}, crossing groups more often than chance "
                f"would: E-I = {shown} is {null_clause(test)}.")
    return (f"E-I = {shown}: {inside} of the ties join nodes of the same {r.attribute}. This was "
            "not tested against chance, so it claims no tendency.")


def _modularity(r: Reading) -> str:
    shown = number(r.value)
    if r.value >= _STRONG_MODULARITY:
        level = "A strong community structure"
    elif r.value >= _CLEAR_MODULARITY:
        level = "A clear community structure"
    else:
        level = "A weak community structure"
    return (f"{level}: Q = {shown}, where values above about 0.3 are usually read as clear "
            "communities (more ties inside them than across).")


def _agreement(what: str) -> Callable[[Reading], str]:
    def read(r: Reading) -> str:
        shown = number(r.value)
        if r.value >= _HIGH_AGREEMENT:
            return f"The communities are much the same across {what} ({shown}; 1 is identical)."
        if r.value >= _SOME_AGREEMENT:
            return (f"The communities are partly the same across {what} ({shown}; 1 is "
                    "identical): read the borders between them with care.")
        return (f"The communities differ a lot across {what} ({shown}; 1 is identical): the "
                "split is one of several that fit the ties about as well.")
    return read


def _attribute_nmi(r: Reading) -> str:
    shown = number(r.value)
    if r.value >= _HIGH_AGREEMENT:
        return f"The communities follow {r.attribute} closely (NMI {shown}; 1 is identical)."
    if r.value >= _SOME_AGREEMENT:
        return f"The communities follow {r.attribute} in part (NMI {shown}; 1 is identical)."
    return (f"The communities have little to do with {r.attribute} (NMI {shown}; 0 is "
            "independent).")


def _centralization(r: Reading) -> str:
    return f"{number(r.value)} on a scale from 0 (all nodes equal) to 1 (a star)."


STATISTICS: tuple[StatisticEntry, ...] = (
    StatisticEntry(name="nodes", title="Nodes", whole=True,
              definition="Number of nodes n, isolates included.",
              read=_counted("One node is in the network.", "{value} nodes are in the network.")),
    StatisticEntry(name="edges", title="Ties", whole=True,
              definition="Number of ties m after cleaning (repeats merged, self-loops removed).",
              read=_counted("One distinct tie remains after cleaning.",
                            "{value} distinct ties remain after cleaning.")),
    StatisticEntry(name="density", title="Density", references=("wasserman1994",),
              definition="m / (n(n-1)/2) undirected, m / (n(n-1)) directed.",
              read=_percent("{percent} of all possible ties are present.")),
    StatisticEntry(name="reciprocity", title="Reciprocity", references=("wasserman1994",),
              definition="Share of directed ties whose reverse tie exists.",
              read=_percent("{percent} of ties are returned.")),
    StatisticEntry(name="transitivity", title="Transitivity", references=("wasserman1994",),
              definition="3 x triangles / connected triples, on the undirected version.",
              read=_percent("When two nodes share a neighbour, they are tied to each other "
                            "{percent} of the time.")),
    StatisticEntry(name="average_clustering", title="Average clustering", references=("watts1998",),
              definition="Mean local clustering over all nodes (0 for nodes with fewer than two "
              "neighbours).",
              read=_percent("On average {percent} of the pairs of a node's neighbours are tied "
                            "to each other.")),
    StatisticEntry(name="components", title="Components", whole=True,
              definition="Connected components (weakly connected when directed); isolates count "
              "as components.",
              read=_counted("The network is one connected whole.",
                            "The network falls into {value} separate parts.")),
    StatisticEntry(name="strong_components", title="Strong components", whole=True,
              definition="Strongly connected components: sets in which every node reaches every "
              "other along tie directions.",
              read=_counted("Everyone can reach everyone along tie directions.",
                            "{value} sets within which everyone can reach everyone along tie "
                            "directions (single nodes count as sets).")),
    StatisticEntry(name="largest_component_share", title="Largest component share",
              definition="Nodes in the largest component / n.",
              read=_percent("{percent} of nodes are in the largest connected part.")),
    StatisticEntry(name="diameter", title="Diameter",
              definition="Longest shortest path over pairs joined by a path, in path lengths.",
              read=_diameter),
    StatisticEntry(name="average_path_length", title="Average path length",
              definition="Mean shortest path length over ordered pairs joined by a path.",
              read=_average_path),
    StatisticEntry(name="degree_assortativity", title="Degree assortativity",
              references=("newman2002",),
              definition="Newman's coefficient of degree correlation across ties (directed: "
              "out-degree of the source against in-degree of the target), unweighted.",
              read=_degree_assortativity),
    StatisticEntry(name="assortativity", title="Attribute assortativity", references=("newman2003",),
              definition="Newman's nominal assortativity for text attributes, the numeric "
              "(Pearson) form for numbers; directed networks use the directed mixing matrix. "
              "Nodes missing the attribute are left out.",
              read=_attribute_assortativity),
    StatisticEntry(name="ei_index", title="E-I index", references=("krackhardt1988",),
              definition="Krackhardt and Stern's E-I index of a categorical attribute: (E - I) / "
              "(E + I), where I counts the ties joining two nodes of the same group and E the ties "
              "joining nodes of different groups, each tie once; -1 when every tie stays inside "
              "its group, +1 when every tie crosses. Ties with an end that has no value are left "
              "out. The mixing matrix it comes from is mixing-<attribute>.csv.",
              read=_ei_index),
    StatisticEntry(name="modularity", title="Modularity", references=("newman2004",),
              definition="Newman-Girvan modularity (resolution 1) of the reported communities, on "
              "the undirected version with strengths.", read=_modularity),
    StatisticEntry(name="communities", title="Communities", whole=True,
              definition="Number of communities in the reported partition (isolates form their "
              "own).",
              read=_counted("One community was found.", "{value} communities were found.")),
    StatisticEntry(name="community_agreement_ari", title="Agreement between community runs (ARI)",
              references=("hubert1985",),
              definition="Mean adjusted Rand index between the kept partition and the partition "
              "of every seeded run (the kept run included): 1 when every run found the same "
              "communities, near 0 when the runs agree no more than chance.",
              read=_agreement("the separate runs")),
    StatisticEntry(name="community_agreement_nmi", title="Agreement between community runs (NMI)",
              references=("danon2005",),
              definition="Mean normalised mutual information, 2 I(A; B) / (H(A) + H(B)), between "
              "the kept partition and the partition of every seeded run: 1 when every run found "
              "the same communities, 0 when they share no information.",
              read=_agreement("the separate runs")),
    StatisticEntry(name="community_robustness_ari", title="Robustness of communities (ARI)",
              references=("hubert1985", "karrer2008"),
              definition="Mean adjusted Rand index between the kept partition and the partition "
              "found on each perturbed copy of the network (a share of its ties removed at "
              "random, the same community method rerun), over the nodes that keep a tie.",
              read=_agreement("reruns on data with ties removed at random")),
    StatisticEntry(name="community_attribute_nmi", title="Communities against attribute (NMI)",
              references=("danon2005",),
              definition="Normalised mutual information between the communities and the groups "
              "of a categorical node attribute, over the nodes with a value: 1 when the "
              "communities are exactly the groups, 0 when they are independent of them.",
              read=_attribute_nmi),
    StatisticEntry(name="degree_centralization", title="Degree centralization",
              references=("freeman1979",),
              definition="Freeman: sum(max degree - degree) / ((n-1)(n-2)) on the undirected "
              "version; 1 for a star, 0 when all degrees are equal. In a directed network the "
              "degree here counts each neighbour once whatever the direction (a reciprocated "
              "pair is one tie), so it is not the degree column of nodes.csv (in + out); the "
              "in- and out-degree centralizations use those columns.", read=_centralization),
    StatisticEntry(name="in_degree_centralization", title="In-degree centralization",
              references=("freeman1979",),
              definition="Freeman: sum(max in-degree - in-degree) / (n-1)^2, over the in_degree "
              "column (ties received, as counted in nodes.csv); (n-1)^2 is the largest possible "
              "sum, reached when every other node points to one centre and to no one else. 1 for "
              "such a star, 0 when every node receives as many ties.", read=_centralization),
    StatisticEntry(name="out_degree_centralization", title="Out-degree centralization",
              references=("freeman1979",),
              definition="Freeman: sum(max out-degree - out-degree) / (n-1)^2, over the "
              "out_degree column (ties sent, as counted in nodes.csv); 1 when one node sends a "
              "tie to every other and no one else sends any, 0 when every node sends as many.",
              read=_centralization),
    StatisticEntry(name="betweenness_centralization", title="Betweenness centralization",
              references=("freeman1979",),
              definition="Freeman: sum(max - betweenness) / (n-1) over normalised betweenness; 1 "
              "for a star.", read=_centralization),
)

_BY_NAME = {s.name: s for s in STATISTICS}


def statistic(name: str) -> StatisticEntry:
    """The entry of a statistics.csv row name; ``assortativity:clinic`` finds ``assortativity``."""
    return _BY_NAME[name] if name in _BY_NAME else _BY_NAME[name.partition(":")[0]]


def statistic_title(name: str) -> str:
    """``assortativity:clinic`` reads "Attribute assortativity: clinic"."""
    attribute = name.partition(":")[2]
    title = statistic(name).title
    return f"{title}: {attribute}" if attribute else title


def reading(name: str, context: Reading) -> str:
    """The plain one-line reading of a defined statistic."""
    return statistic(name).read(context)


# Why a statistic has no value, by the reason key the analysis gives.
UNDEFINED_REASONS = {
    "fewer_than_two_nodes": "The network has fewer than two nodes.",
    "below_three_nodes": "It needs at least three nodes.",
    "no_ties": "The network has no ties.",
    "no_two_neighbours": "No node has two neighbours.",
    "no_valued_ties": "No ties join nodes that have a value.",
    "one_value": "Every node has the same value.",
    "no_variance": "The mixing pattern has no variance.",
    "constant_degrees": "The degrees at the ends of ties do not vary.",
    "trivial_partition": "Every partition compared puts all nodes together (or each alone), so "
    "agreement is not defined.",
    "one_group": "The communities and the attribute each have a single group.",
    "no_values": "No node has a value.",
    "no_sampled_paths": "None of the sampled source nodes has a tie, so no path could be "
    "followed from them.",
}


def undefined_reason(key: str) -> str:
    return UNDEFINED_REASONS[key]


def left_out_sentence(count: int) -> str:
    """Said after an assortativity that left nodes without a value out."""
    return f"{count_of(count, 'node')} without a value left out." if count else ""


def statistic_value(value: float, *, estimate: str | None, standard_error: float | None) -> str:
    """A defined statistic as a page shows it: rounded; a lower bound as "at least 12"; a sampled
    estimate with its standard error, "4.21 (SE 0.031)", or as "about 0.123" without one."""
    if estimate == "lower_bound":
        return at_least(value)
    if estimate == "sampled":
        return about(value) if standard_error is None else with_standard_error(value,
                                                                               standard_error)
    return number(value)


# The columns statistics.csv gains when some statistic of the network is estimated.
ESTIMATE_COLUMNS = (
    ("standard_error", "the standard error of a sampled estimate, over the sampled source nodes "
     "(Cochran's ratio-estimator form); empty for exact values and bounds"),
    ("estimate", "how the value was found: exact, sampled (from how many source nodes, with "
     "which seed) or a lower bound (the largest value found; the exact one may be larger)"),
)


def estimate_label(estimate: str | None, *, sources: int, seed: int) -> str:
    """The estimate column of statistics.csv: "exact", "sampled from 2000 sources, seed 1" or
    "lower bound from 2000 sampled sources, seed 1"."""
    if estimate == "sampled":
        return f"sampled from {sources} sources, seed {seed}"
    if estimate == "lower_bound":
        return f"lower bound from {sources} sampled sources, seed {seed}"
    return "exact"


def path_statistics_sentence(sources: int, seed: int, sweeps: int) -> str:
    """How the path statistics of a network with sampled path measures were found."""
    return (f"The average path length is estimated from the shortest paths out of the same "
            f"{count(sources)} sampled source nodes (seed {seed}): the total length of the paths "
            "to every node they reach over the number of such pairs (a ratio estimate), shown "
            "with its standard error over the sources (Cochran's ratio-estimator form, with the "
            "finite population correction). The diameter is a lower bound, shown as \"at "
            "least\": the longest of those paths and of the paths out of up to "
            f"{count(sweeps)} further nodes, each the far end of the longest path the search "
            "before found (double sweeps); the exact diameter may be larger. No all-pairs "
            "search was run.")
