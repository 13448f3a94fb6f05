"""The words of community results beyond the partition: the columns of communities.csv, and how
the methods page explains the profiles, the perturbed reruns and the comparison with attributes."""

from __future__ import annotations

from .formatting import count_of, share

__all__ = ["COMMUNITY_COLUMNS", "CONDUCTANCE_REFERENCES", "PERTURBATION_REFERENCES",
           "community_columns", "community_methods_text"]

# communities.csv, in column order: (name, description). "confidence" is written only when the
# perturbed reruns ran.
COMMUNITY_COLUMNS: tuple[tuple[str, str], ...] = (
    ("community", "community number, as in the community column of nodes.csv; 1 is the largest"),
    ("size", "number of nodes in the community"),
    ("internal_ties", "ties with both ends in the community (undirected version, each tie once, "
     "weights ignored)"),
    ("external_ties", "ties with one end in the community and the other outside it"),
    ("internal_density", "internal ties / (size x (size - 1) / 2); empty for a single node"),
    ("conductance", "external ties / the smaller of the degree sums inside and outside the "
     "community (Fortunato 2010); 0 for a community with no tie outside; empty when either sum "
     "is 0"),
    ("confidence", "mean community confidence of the members: how often, over the reruns on data "
     "with ties removed at random, a member stayed with the others"),
)



def community_columns(*, with_confidence: bool) -> tuple[tuple[str, str], ...]:
    """The columns of communities.csv with their descriptions; ``confidence`` only when the
    perturbed reruns ran."""
    return tuple((name, text) for name, text in COMMUNITY_COLUMNS
                 if name != "confidence" or with_confidence)


CONDUCTANCE_REFERENCES = ("fortunato2010",)
PERTURBATION_REFERENCES = ("karrer2008", "hubert1985")


def community_methods_text(*, perturbations: int, share_removed: float, removed: int, seed: int,
                           runs: int, method: str, why: str | None, matrix: bool
                           ) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """Paragraphs of the methods page on community profiles, perturbed reruns and attributes,
    each with the reference keys it cites."""
    paragraphs: list[tuple[str, tuple[str, ...]]] = [(
        "Each community is profiled on the undirected version, counting ties without weights: its "
        "size, its internal ties (both ends inside) and external ties (one end inside), its "
        "internal density (internal ties over the size x (size - 1) / 2 possible ones) and its "
        "conductance, the external ties divided by the smaller of the two degree sums inside and "
        "outside it (0: no tie leaves the community; near 1: most of its ties leave it). The "
        "most central members are those with the highest value of the measure that sizes the "
        "nodes of the figures (PageRank when none is set).", CONDUCTANCE_REFERENCES)]
    if perturbations == 0:
        paragraphs.append(("Reruns on perturbed data were turned off ([communities] "
                           "perturbations = 0).", ()))
    elif why is not None:
        paragraphs.append(("Reruns on perturbed data need ties to remove; the network has none, "
                           "so none ran.", ()))
    else:
        matrix_text = ("The co-assignment matrix on the communities page shows, for every pair "
                       "of nodes, the share of reruns that put them together." if matrix else
                       "The co-assignment matrix is not drawn for a network this large.")
        paragraphs.append((
            f"Stability under perturbed data: {count_of(perturbations, 'rerun')} of the same "
            f"community method ({method}, best of {runs} runs by modularity) on copies of the "
            f"network with {share(share_removed)} of its ties ({count_of(removed, 'tie')}) "
            "removed at random, without replacement. Each rerun has its own seed, drawn from "
            f"random.Random(\"perturbations:\" + the study seed {seed}); it draws the ties "
            "removed and seeds that rerun's community runs, so the same study gives the same "
            "results. community_robustness_ari is the mean adjusted Rand index between each "
            "rerun's partition and the kept one, over the nodes that keep at least one tie in "
            "that rerun (a node left without ties can only stand alone). A node's community "
            "confidence is the mean, over the reruns, of the share of the other members of its "
            "kept community that the rerun put in its community; a node alone in its community "
            f"gets 1, and a node a rerun leaves without ties counts as separated. {matrix_text}",
            PERTURBATION_REFERENCES))
    paragraphs.append((
        "Communities are compared with each categorical node attribute over the nodes that have "
        "a value: a cross-table counts the nodes of each community with each value, and the "
        "normalised mutual information (NMI = 2 I / (H(communities) + H(attribute)), natural "
        "logarithms) says how far the communities follow the attribute: 1 when they are exactly "
        "its groups, 0 when they are independent of it.", ("danon2005",)))
    return tuple(paragraphs)

