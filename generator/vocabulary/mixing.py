"""How attribute mixing reads: file names of the mixing matrices, the form each attribute was
read in, the per-group E-I readings, the methods text and the sentence on nodes with no ties."""

from __future__ import annotations

import re
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING

import pandas as pd

from .formatting import count, count_of, number

if TYPE_CHECKING:
    from ..analyse import NetworkAnalysis

__all__ = [
    "MIXING_REFERENCES",
    "attribute_form",
    "group_ei_reading",
    "isolates_sentence",
    "mixing_csv_names",
    "mixing_file_stems",
    "mixing_method",
    "mixing_method_text",
    "projection_isolates_sentence",
    "scatter_method",
]

MIXING_REFERENCES = ("krackhardt1988", "newman2003")


def mixing_file_stems(attributes: Iterable[str]) -> dict[str, str]:
    """The safe file-name part of each attribute: "clinic" stays "clinic"; other characters
    become dashes, and names that meet are kept apart with a number."""
    stems: dict[str, str] = {}
    taken: set[str] = set()
    for attribute in attributes:
        slug = re.sub(r"[^A-Za-z0-9_-]+", "-", attribute).strip("-") or "attribute"
        stem, n = slug, 2
        while stem.lower() in taken:
            stem, n = f"{slug}-{n}", n + 1
        taken.add(stem.lower())
        stems[attribute] = stem
    return stems


def mixing_csv_names(attributes: Iterable[str]) -> dict[str, str]:
    """The download of each attribute's mixing matrix: ``mixing-<attribute>.csv``."""
    return {a: f"mixing-{stem}.csv" for a, stem in mixing_file_stems(attributes).items()}


def attribute_form(*, numeric: bool, declared: bool) -> str:
    """Which form an attribute's assortativity and mixing used, and why."""
    why = "as declared in study.toml" if declared else "read from its values"
    if numeric:
        return (f"numeric ({why}): the numeric (Pearson) assortativity and an ego-alter scatter; "
                "no mixing matrix")
    return (f"categorical ({why}): the nominal assortativity, a mixing matrix and the E-I index")


def group_ei_reading(ei: float | None, internal: int, external: int) -> str:
    """One group's ties in words; a description, not a test."""
    if ei is None:
        return "No tie touches this group."
    total = internal + external
    return (f"{count(internal)} of its {count_of(total, 'tie')} stay inside it, {count(external)} "
            f"cross to other groups (E-I {number(ei)}).")


def mixing_method(*, directed: bool) -> str:
    if directed:
        cells = ("Cell (row A, column B) counts the ties sent from a node of group A to a node of "
                 "group B; the diagonal holds the ties inside each group.")
        group = ("A group's own index counts the ties inside it against those it sends to or "
                 "receives from other groups.")
    else:
        cells = ("The matrix is symmetric: a tie between groups A and B is counted in both cell "
                 "(A, B) and cell (B, A), and a tie inside A once in cell (A, A); the ties are "
                 "the diagonal plus the cells above it.")
        group = "A group's own index counts the ties inside it against those to other groups."
    return (f"For each categorical attribute the mixing matrix counts ties between its groups. "
            f"{cells} Ties with an end that has no value are left out. The E-I index is "
            "(E - I) / (E + I), with I the ties inside groups and E the ties between them, each "
            f"tie once: -1 when every tie stays inside its group, +1 when every tie crosses. "
            f"{group} The overall E-I index is tested against the rewired networks like the "
            "other statistics; a reading speaks of a preference or an avoidance only when that "
            "test gives p below 0.05.")


def mixing_method_text(analysis: NetworkAnalysis, *, categorical: Sequence[str],
                       numeric: Sequence[str], isolates: str
                       ) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """The methods page's account of attribute types, mixing, brokerage and nodes without
    ties: short paragraphs, each with the keys of the references it cites."""
    out: list[tuple[str, tuple[str, ...]]] = []
    forms = []
    for attribute in analysis.attributes:
        is_numeric = bool(pd.api.types.is_numeric_dtype(analysis.nodes[attribute].dtype))
        declared = attribute in categorical or attribute in numeric
        forms.append(f"{attribute}: {attribute_form(numeric=is_numeric, declared=declared)}")
    if forms:
        out.append(("Each node attribute is read as categories or as numbers: as study.toml "
                    "declares it ([[network]] categorical = [...] or numeric = [...]), else as "
                    "numbers when every filled cell is a plainly written number. The type "
                    "decides the form of its assortativity (Newman's nominal coefficient for "
                    "categories, the numeric Pearson form for numbers), its tests against "
                    "rewired networks and whether it gets a mixing matrix. Here: "
                    + "; ".join(forms) + ".", ("newman2003",)))
        if analysis.mixing:
            out.append((mixing_method(directed=analysis.directed), ("krackhardt1988",)))
        if len(forms) > len(analysis.mixing):
            out.append((scatter_method(), ("newman2003",)))
    out.append((
        "Brokerage (constraint and effective_size in nodes.csv) is computed on the undirected "
        "version, " + ("with tie strengths as weights (a reciprocated pair of a directed "
                       "network adds its two strengths)" if analysis.weighted else
                       "every tie counting 1") + ", exactly as networkx defines constraint and "
        "effective_size with a weight. Effective size follows networkx's node-by-node "
        "definition (m_jq divides j's tie to q by j's own strongest tie); networkx's faster "
        "all-nodes path (taken when SciPy is installed) divides by the wrong node's strongest "
        "tie on weighted graphs, which this implementation does not copy. Both are undefined "
        "for a node with no ties, and left as empty cells in nodes.csv.", ("burt1992",)))
    out.append((isolates, ()))
    return tuple(out)


def scatter_method() -> str:
    return ("For each numeric attribute the ego-alter scatter places every tie at (value of its "
            "source, value of its target); an undirected tie is drawn both ways, so the cloud is "
            "symmetric. Points with the same pair of values are drawn once, larger the more ties "
            "they stand for. Its summary is the numeric assortativity, Pearson's correlation of "
            "these pairs.")


def isolates_sentence(isolates: int, listed: int, *, listed_in_node_list: bool) -> str:
    """How many listed nodes have no tie at all, and how the measures treat them."""
    if not listed_in_node_list:
        return ("Every node is named in a tie (there is no node list), so no node is without "
                "ties.")
    if isolates == 0:
        return (f"Every one of the {count(listed)} nodes of the node list has at least one tie, "
                "so no listed node looks like a non-respondent.")
    who = "node has" if isolates == 1 else "nodes have"
    return (f"{count(isolates)} of the {count(listed)} listed {who} no ties at all: "
            f"{'it may be a person' if isolates == 1 else 'they may be people'} who did not "
            f"respond rather than {'a person' if isolates == 1 else 'people'} without ties. "
            "Nodes without ties are kept in the network: they count in n "
            "(so in density, centralization and every normalisation), score 0 for degree, "
            "strength, betweenness, closeness, harmonic closeness, local clustering and coreness "
            "(and eigenvector, where it is reported), get only the random-jump share of "
            "PageRank, form communities of their own, take no part in mixing matrices, and "
            "have no constraint or effective size (empty cells in nodes.csv).")


def projection_isolates_sentence(isolates: int, total: int, *, mode: str, other: str) -> str:
    """How many nodes of a projection share no node of the other mode with anyone."""
    if isolates == 0:
        return (f"Every one of the {count(total)} {mode} nodes shares at least one {other} with "
                f"another {mode} node, so each has a tie in this projection.")
    who = "nodes shares" if isolates == 1 else "nodes share"
    return (f"{count(isolates)} of the {count(total)} {mode} {who} no {other} with another "
            f"{mode} node, so {'it has' if isolates == 1 else 'they have'} no ties in this "
            "projection. They are kept: they count in n, score 0 for degree and the other "
            "centralities, and form communities of their own.")
