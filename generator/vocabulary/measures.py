"""Every node measure netfolio writes: its column name, how it is titled, defined, cited and read.

This is the one place a measure's name is defined. The analysis computes the columns; figures,
pages, the downloads and datapackage.json take their words from here, so adding a measure means
its computation plus one entry below."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "COMMUNITY",
    "CHANGE_MEASURES",
    "COMMUNITY_CONFIDENCE",
    "HISTOGRAM_MEASURES",
    "MEASURES",
    "MEASURE_NAMES",
    "OMISSION_REASONS",
    "PATH_MEASURES",
    "SIZE_MEASURES",
    "WHOLE_MEASURES",
    "MeasureEntry",
    "measure",
    "omission_reason",
]


@dataclass(frozen=True, kw_only=True)
class MeasureEntry:
    """One column of nodes.csv.

    ``reads`` says how the measure uses tie weights: "strength", "length" (path measures) or
    "none". ``plain`` is the name inside a sentence ("harmonic closeness"); ``meaning`` one plain
    sentence for a reader new to the measure; ``unit`` what one unit of the value is, where a
    reader needs it to hold the number.
    """

    name: str
    title: str
    plain: str
    definition: str
    meaning: str
    references: tuple[str, ...] = ()
    reads: str = "none"
    axis_label: str = ""
    unit: str = ""
    whole: bool = False  # a count: written as a whole number
    path_based: bool = False  # estimated from sampled sources on large networks
    directed_only: bool = False
    weighted_only: bool = False
    histogram: bool = False  # drawn as a distribution on the network page
    sizes_nodes: bool = True  # may set node size on the map (size_by)


COMMUNITY = "community"
COMMUNITY_CONFIDENCE = "community_confidence"

MEASURES: tuple[MeasureEntry, ...] = (
    MeasureEntry(name="degree", title="Degree", plain="degree", whole=True,
            definition="Number of ties at the node; in a directed network the sum of incoming "
            "and outgoing ties.",
            meaning="Degree is the number of ties a node has.", references=("freeman1979",)),
    MeasureEntry(name="in_degree", title="In-degree", plain="in-degree", whole=True, directed_only=True,
            definition="Number of ties pointing to the node.",
            meaning="In-degree counts the ties a node receives.", references=("freeman1979",)),
    MeasureEntry(name="out_degree", title="Out-degree", plain="out-degree", whole=True,
            directed_only=True, definition="Number of ties leaving the node.",
            meaning="Out-degree counts the ties a node sends.", references=("freeman1979",)),
    MeasureEntry(name="strength", title="Strength", plain="strength", reads="strength",
            weighted_only=True,
            definition="Sum of the strengths of the node's ties (all directions).",
            meaning="Strength adds up the strengths of a node's ties.",
            references=("opsahl2010",)),
    MeasureEntry(name="in_strength", title="In-strength", plain="in-strength", reads="strength",
            directed_only=True, weighted_only=True,
            definition="Sum of the strengths of incoming ties.",
            meaning="In-strength adds up the strengths of the ties a node receives.",
            references=("opsahl2010",)),
    MeasureEntry(name="out_strength", title="Out-strength", plain="out-strength", reads="strength",
            directed_only=True, weighted_only=True,
            definition="Sum of the strengths of outgoing ties.",
            meaning="Out-strength adds up the strengths of the ties a node sends.",
            references=("opsahl2010",)),
    MeasureEntry(name="betweenness", title="Betweenness", plain="betweenness", reads="length",
            path_based=True, histogram=True,
            axis_label="betweenness (share of shortest paths through the node)",
            unit="share of shortest paths between other pairs",
            definition="Share of shortest paths between other pairs that pass through the node "
            "(Brandes' algorithm over path lengths), normalised as Freeman: raw value divided by "
            "(n-1)(n-2)/2 in an undirected network and (n-1)(n-2) in a directed one.",
            meaning="Betweenness is the share of shortest paths between other nodes that pass "
            "through a node; high values mark nodes that bridge parts of the network.",
            references=("freeman1977", "brandes2001")),
    MeasureEntry(name="closeness", title="Closeness", plain="closeness", reads="length",
            path_based=True, histogram=True, axis_label="closeness (1 / mean path length)",
            unit="1 / mean path length",
            definition="Wasserman-Faust form: ((r-1)/(n-1)) x ((r-1)/sum of path lengths from the "
            "r-1 nodes that reach the node); 0 when no node reaches it. Directed: paths to the "
            "node.",
            meaning="Closeness is higher the shorter the paths between a node and the others.",
            references=("wasserman1994",)),
    MeasureEntry(name="harmonic", title="Harmonic closeness", plain="harmonic closeness",
            reads="length", path_based=True, histogram=True,
            axis_label="harmonic closeness (mean of 1 / path length)",
            unit="mean of 1 / path length",
            definition="Sum over the other nodes of 1/path length to the node (0 for nodes that "
            "cannot reach it), divided by n-1.",
            meaning="Harmonic closeness averages one over the path length to every other node, "
            "so it still works when some nodes cannot reach each other.",
            references=("marchiori2000", "boldi2014")),
    MeasureEntry(name="eigenvector", title="Eigenvector", plain="eigenvector centrality",
            reads="strength", histogram=True,
            axis_label="eigenvector centrality (highest node = 1)", unit="share of the highest",
            definition="Leading eigenvector of the tie-strength matrix, scaled so the largest value "
            "is 1. Directed: a node scores high when high-scoring nodes point to it. Computed only "
            "when it is defined for the whole network: a directed network must be strongly "
            "connected, and the ties of an undirected one must form a single component (isolates "
            "then score 0).",
            meaning="Eigenvector centrality is high for nodes tied to other well-tied nodes.",
            references=("bonacich1972",)),
    MeasureEntry(name="pagerank", title="PageRank", plain="PageRank", reads="strength",
            histogram=True, axis_label="PageRank (all nodes together = 1)",
            unit="share of all nodes together",
            definition="Stationary share of a random walk that follows ties in proportion to their "
            "strength and jumps to a random node with probability 0.15 (damping 0.85); nodes with "
            "no outgoing tie spread their share over all nodes. Sums to 1.",
            meaning="PageRank is the share of time a random walk along the ties spends at a node.",
            references=("brin1998",)),
    MeasureEntry(name="coreness", title="Coreness", plain="coreness", whole=True,
            definition="k-core number on the undirected version: the largest k such that the node "
            "belongs to a subgraph where every node has at least k ties.",
            meaning="Coreness is the largest k such that the node sits in a group where everyone "
            "has at least k ties.", references=("seidman1983",)),
    MeasureEntry(name="clustering", title="Local clustering", plain="local clustering",
            sizes_nodes=False, unit="share of neighbour pairs",
            definition="Share of pairs of the node's neighbours that are tied to each other, on "
            "the undirected version, ignoring weights; 0 below two neighbours.",
            meaning="Local clustering is the share of a node's neighbour pairs that are tied.",
            references=("watts1998",)),
    MeasureEntry(name="constraint", title="Constraint", plain="constraint", reads="strength",
            sizes_nodes=False, unit="sum of squared dependence (higher = fewer structural holes)",
            definition="Burt's constraint on the undirected version, tie strengths as weights "
            "(every tie 1 when unweighted): the sum over the node's neighbours j of (p_ij + sum "
            "over its other neighbours q of p_iq p_qj)^2, where p_ij is the share of i's tie "
            "strength that goes to j; as networkx's constraint with weight. Empty for an isolate, "
            "where it is not defined.",
            meaning="Constraint is high when a node's contacts are tied to each other, so it "
            "bridges no gaps between them; low constraint marks a broker.",
            references=("burt1992",)),
    MeasureEntry(name="effective_size", title="Effective size", plain="effective size",
            reads="strength", sizes_nodes=False, unit="non-redundant contacts",
            definition="Burt's effective size on the undirected version, tie strengths as weights "
            "(every tie 1 when unweighted): the sum over the node's neighbours j of (1 - sum over "
            "its other neighbours q of p_iq m_jq), where p_iq is the share of i's tie strength "
            "that goes to q and m_jq is j's tie to q divided by j's strongest tie; unweighted, the "
            "number of neighbours n less 2t/n, t counting the ties among them. As networkx's "
            "effective_size with weight, node by node. Empty for an isolate, where it is not "
            "defined.",
            meaning="Effective size counts a node's contacts less the redundancy among them: the "
            "number of contacts that are not tied to each other.",
            references=("burt1992",)),
    MeasureEntry(name=COMMUNITY, title="Community", plain="community", whole=True, reads="strength",
            sizes_nodes=False,
            definition="Number of the node's community in the partition kept (the best of several "
            "seeded runs by modularity, on the undirected version with strengths): 1 is the "
            "largest community; equal sizes are ordered by their first member. An isolate forms a "
            "community of its own.",
            meaning="The community a node was placed in; 1 is the largest."),
    MeasureEntry(name=COMMUNITY_CONFIDENCE, title="Community confidence",
            plain="community confidence", sizes_nodes=False, unit="share of community members",
            definition="Over the reruns of the community method on the network with a share of "
            "its ties removed at random, the mean share of the other members of the node's "
            "community that the rerun put in the node's community; 1 for a node alone in its "
            "community. A node left without ties by a rerun counts as separated from all.",
            meaning="Community confidence is how often a node stays with its community when a "
            "few ties are taken away at random; 1 is always.",
            references=("karrer2008",)),
)

_BY_NAME = {m.name: m for m in MEASURES}
MEASURE_NAMES: tuple[str, ...] = tuple(_BY_NAME)
PATH_MEASURES: tuple[str, ...] = tuple(m.name for m in MEASURES if m.path_based)
HISTOGRAM_MEASURES: tuple[str, ...] = tuple(m.name for m in MEASURES if m.histogram)
SIZE_MEASURES: tuple[str, ...] = tuple(m.name for m in MEASURES if m.sizes_nodes)
# The measures whose change between waves the series page follows, node by node.
CHANGE_MEASURES: tuple[str, ...] = ("degree", "in_degree", "betweenness")
WHOLE_MEASURES: tuple[str, ...] = tuple(m.name for m in MEASURES if m.whole)


def measure(name: str) -> MeasureEntry:
    """The entry of a measure column; KeyError for a name that is not a measure."""
    return _BY_NAME[name]


# Why a measure is left out of a network, by the reason key the analysis gives.
OMISSION_REASONS = {
    "no_ties": "the network has no ties",
    "not_strongly_connected": "the network is directed and not strongly connected, so the leading "
    "eigenvector gives zero to every node outside one strong component; see PageRank instead",
    "several_components": "the ties form {count} separate components, so the leading eigenvector "
    "gives zero to every node outside one of them; see PageRank or harmonic closeness instead",
}


def omission_reason(key: str, count: int = 0) -> str:
    return OMISSION_REASONS[key].format(count=count)
