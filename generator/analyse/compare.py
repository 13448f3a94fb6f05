"""Networks side by side: waves of one series, and relations measured on the same nodes.

Pure functions on the per-network analyses: names and numbers only, no wording and no I/O.
Every random step (the permutations of QAP and MRQAP) takes a seed derived from the study seed.

Waves: how ties and nodes changed between two consecutive waves, how each node's measures moved,
and where the members of each community went. Relations: how far two networks on the same nodes
share their ties (Jaccard), how their tie values correlate (QAP, Krackhardt 1987), and a
regression of one relation on others and on node attributes (MRQAP with double semi-partialling,
Dekker, Krackhardt & Snijders 2007).
"""

from __future__ import annotations

import random
from collections.abc import Sequence
from dataclasses import dataclass

import igraph as ig
import numpy as np
import pandas as pd

from ..vocabulary import CHANGE_MEASURES
from . import NetworkAnalysis

__all__ = [
    "CommunityFlow",
    "ModelTerm",
    "MoverRow",
    "NodeChange",
    "QapResult",
    "RegressionResult",
    "RelationPair",
    "RelationsComparison",
    "SeriesComparison",
    "TieChange",
    "community_flow",
    "compare_relations",
    "compare_series",
    "difference_matrix",
    "jaccard",
    "mrqap",
    "node_change",
    "qap_correlation",
    "relation_matrix",
    "same_matrix",
    "tie_change",
    "tie_set",
]


# ---------------------------------------------------------------------------------------------
# Waves


def tie_set(analysis: NetworkAnalysis) -> frozenset[tuple[str, str]]:
    """The ties as (source, target) id pairs; an undirected tie as its pair in sorted order."""
    pairs = zip(analysis.edges["source"].astype(str), analysis.edges["target"].astype(str))
    if analysis.directed:
        return frozenset(pairs)
    return frozenset((a, b) if a <= b else (b, a) for a, b in pairs)


def jaccard(first: frozenset[tuple[str, str]], second: frozenset[tuple[str, str]]) -> float | None:
    """|A ∩ B| / |A ∪ B|; None when both are empty."""
    union = len(first | second)
    return len(first & second) / union if union else None


@dataclass(frozen=True)
class TieChange:
    """The ties of two consecutive waves: kept (in both), added (new in the later wave) and
    dropped (gone from it), with the Jaccard index of the two tie sets."""

    earlier: str  # network ids
    later: str
    kept: int
    added: int
    dropped: int
    jaccard: float | None


def tie_change(earlier: NetworkAnalysis, later: NetworkAnalysis) -> TieChange:
    a, b = tie_set(earlier), tie_set(later)
    return TieChange(earlier.network_id, later.network_id, kept=len(a & b), added=len(b - a),
                     dropped=len(a - b), jaccard=jaccard(a, b))


@dataclass(frozen=True)
class MoverRow:
    node: str
    before: float
    after: float

    @property
    def change(self) -> float:
        return self.after - self.before


@dataclass(frozen=True)
class NodeChange:
    """Who is in one wave only (joined: only in the later; left: only in the earlier), and for
    the nodes in both, each measure's change, largest movers first."""

    earlier: str
    later: str
    joined: tuple[str, ...]
    left: tuple[str, ...]
    both: tuple[str, ...]
    movers: dict[str, tuple[MoverRow, ...]]  # measure -> rows, by |change| then node order




def node_change(earlier: NetworkAnalysis, later: NetworkAnalysis,
                measures: Sequence[str] = CHANGE_MEASURES) -> NodeChange:
    """Nodes are matched by id. A node absent from a wave is absent there, never a zero."""
    before_ids = [str(i) for i in earlier.nodes.index]
    after_ids = [str(i) for i in later.nodes.index]
    before_set, after_set = set(before_ids), set(after_ids)
    both = tuple(i for i in before_ids if i in after_set)
    movers: dict[str, tuple[MoverRow, ...]] = {}
    for name in measures:
        if name not in earlier.measures or name not in later.measures:
            continue
        first = earlier.measures[name].set_axis(before_ids)
        second = later.measures[name].set_axis(after_ids)
        rows = [MoverRow(i, float(first[i]), float(second[i])) for i in both
                if not (pd.isna(first[i]) or pd.isna(second[i]))]
        order = {node: k for k, node in enumerate(both)}
        rows.sort(key=lambda row: (-abs(row.change), order[row.node]))
        movers[name] = tuple(rows)
    return NodeChange(earlier.network_id, later.network_id,
                      joined=tuple(i for i in after_ids if i not in before_set),
                      left=tuple(i for i in before_ids if i not in after_set),
                      both=both, movers=movers)


@dataclass(frozen=True)
class CommunityFlow:
    """Where the members of each community of the earlier wave are in the later one, counted
    over the nodes present in both; ``nmi`` compares the two partitions on those nodes
    (Danon et al. 2005)."""

    earlier: str
    later: str
    flows: tuple[tuple[int, int, int], ...]  # (earlier community, later community, members)
    nmi: float | None

    @property
    def members(self) -> int:
        return sum(n for _, _, n in self.flows)


def community_flow(earlier: NetworkAnalysis, later: NetworkAnalysis) -> CommunityFlow:
    before = dict(zip((str(i) for i in earlier.nodes.index), earlier.communities.membership))
    after = dict(zip((str(i) for i in later.nodes.index), later.communities.membership))
    shared = [node for node in before if node in after]
    counts: dict[tuple[int, int], int] = {}
    for node in shared:
        pair = (int(before[node]), int(after[node]))
        counts[pair] = counts.get(pair, 0) + 1
    nmi = None
    if len(shared) > 1:
        nmi = float(ig.compare_communities([before[n] for n in shared], [after[n] for n in shared],
                                           method="nmi"))
    return CommunityFlow(earlier.network_id, later.network_id,
                         tuple((a, b, n) for (a, b), n in sorted(counts.items())), nmi)


# ---------------------------------------------------------------------------------------------
# Relations on the same nodes


def relation_matrix(analysis: NetworkAnalysis, order: Sequence[str]) -> np.ndarray:
    """The adjacency matrix in the node ``order`` given: the tie weight as written for a weighted
    network (a strength; a distance-weighted network gives 1/weight so bigger still means
    stronger), 1 for a tie otherwise; symmetric for an undirected network."""
    index = {node: k for k, node in enumerate(order)}
    matrix = np.zeros((len(order), len(order)))
    edges = analysis.edges
    values = np.ones(len(edges))
    if analysis.weighted:
        values = edges["weight"].to_numpy(dtype=float)
        if analysis.weight_means == "distance":
            values = 1.0 / values
    rows = [index[str(s)] for s in edges["source"]]
    cols = [index[str(t)] for t in edges["target"]]
    matrix[rows, cols] = values
    if not analysis.directed:
        matrix[cols, rows] = values
    return matrix


def same_matrix(values: Sequence[object]) -> np.ndarray:
    """1 where both nodes share a (present) value of a categorical attribute, else 0."""
    series = pd.Series(list(values), dtype=object)
    present = series.notna().to_numpy()
    codes = pd.factorize(series)[0]
    same: np.ndarray = (codes[:, None] == codes[None, :]) & present[:, None] & present[None, :]
    return same.astype(float)


def difference_matrix(values: Sequence[float]) -> np.ndarray:
    """|x_i - x_j| for a numeric attribute (a missing value gives NaN, which the caller refuses)."""
    x = np.array(values, dtype=float)
    difference: np.ndarray = np.abs(x[:, None] - x[None, :])
    return difference


def _cells(matrix: np.ndarray, directed: bool) -> np.ndarray:
    """The cells a dyadic analysis uses: every off-diagonal cell of a directed relation, the
    upper triangle of an undirected one."""
    n = len(matrix)
    if directed:
        mask = ~np.eye(n, dtype=bool)
        return matrix[mask]
    return matrix[np.triu_indices(n, k=1)]


def _permuted(matrix: np.ndarray, rng: np.random.Generator) -> np.ndarray:
    order = rng.permutation(len(matrix))
    return matrix[np.ix_(order, order)]


def _rng(seed: int, purpose: str) -> np.random.Generator:
    return np.random.default_rng(random.Random(f"{purpose}:{seed}").randrange(2**63))


def _correlation(x: np.ndarray, y: np.ndarray) -> float | None:
    if x.std() == 0 or y.std() == 0:
        return None
    return float(np.corrcoef(x, y)[0, 1])


@dataclass(frozen=True)
class QapResult:
    """The correlation of two relations' tie values over the dyads, and how often relabelling
    the nodes of one at random gives a correlation at least as far from zero: a two-sided
    p = (k + 1) / (N + 1) over N permutations."""

    first: str
    second: str
    correlation: float | None
    p: float | None
    permutations: int


def qap_correlation(first: np.ndarray, second: np.ndarray, *, directed: bool, permutations: int,
                    seed: int, label: tuple[str, str] = ("", "")) -> QapResult:
    """QAP correlation test (Krackhardt 1987, "QAP partialling as a test of spuriousness"):
    rows and columns of ``second`` are permuted together, which keeps its structure whole."""
    x, y = _cells(first, directed), _cells(second, directed)
    observed = _correlation(x, y)
    if observed is None or permutations == 0:
        return QapResult(*label, observed, None, permutations)
    rng = _rng(seed, f"qap:{label[0]}:{label[1]}")
    extreme = 0
    for _ in range(permutations):
        r = _correlation(x, _cells(_permuted(second, rng), directed))
        if r is not None and abs(r) >= abs(observed) - 1e-12:
            extreme += 1
    return QapResult(*label, observed, (extreme + 1) / (permutations + 1), permutations)


@dataclass(frozen=True)
class ModelTerm:
    term: str  # "intercept", a predictor network id, "same:<attribute>", "difference:<attribute>"
    coefficient: float
    std_coefficient: float | None  # coefficient x sd(predictor) / sd(outcome); None: intercept
    p: float | None  # permutation p-value; None for the intercept


@dataclass(frozen=True)
class RegressionResult:
    outcome: str
    terms: tuple[ModelTerm, ...]
    r_squared: float
    dyads: int
    permutations: int


def _ols(y: np.ndarray, x: np.ndarray) -> tuple[np.ndarray, np.ndarray, float]:
    """Coefficients, their t statistics and R² of y on x (x holds an intercept column)."""
    coefficients, *_ = np.linalg.lstsq(x, y, rcond=None)
    residuals = y - x @ coefficients
    dof = len(y) - x.shape[1]
    sigma2 = float(residuals @ residuals) / dof if dof > 0 else float("nan")
    covariance = sigma2 * np.linalg.pinv(x.T @ x)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = coefficients / np.sqrt(np.diag(covariance))
    total = float(((y - y.mean()) ** 2).sum())
    r_squared = 1.0 - float(residuals @ residuals) / total if total > 0 else float("nan")
    return coefficients, t, r_squared


def mrqap(outcome: np.ndarray, predictors: dict[str, np.ndarray], *, directed: bool,
          permutations: int, seed: int, outcome_name: str = "") -> RegressionResult:
    """Multiple regression QAP with double semi-partialling (Dekker, Krackhardt & Snijders
    2007, "Sensitivity of MRQAP tests to collinearity and autocorrelation conditions"): for each
    predictor, its residuals after regressing it on the other predictors are permuted (rows and
    columns together) and the outcome regressed on them and the others; the p-value is the share
    of permutations whose |t| reaches the observed |t|, as (k + 1) / (N + 1). Coefficients and
    R² are those of ordinary least squares on the dyads' cells."""
    names = list(predictors)
    y = _cells(outcome, directed)
    columns = [_cells(predictors[name], directed) for name in names]
    design = np.column_stack([np.ones(len(y)), *columns])
    coefficients, t_observed, r_squared = _ols(y, design)
    sd_y = y.std()
    p_values: list[float | None] = []
    for k, name in enumerate(names):
        if not np.isfinite(t_observed[k + 1]) or columns[k].std() == 0:
            # A term with no variation (every pair shares the clinic, a network with no ties)
            # has no t to beat: no p-value, rather than the smallest one by default.
            p_values.append(None)
            continue
        others = np.column_stack([np.ones(len(y))] + [c for j, c in enumerate(columns) if j != k])
        fitted, *_ = np.linalg.lstsq(others, columns[k], rcond=None)
        # Back to a matrix, so that its rows and columns are permuted together.
        residual = _fill(columns[k] - others @ fitted, len(outcome), directed)
        rng = _rng(seed, f"mrqap:{outcome_name}:{name}")
        extreme = 0
        for _ in range(permutations):
            shuffled = _cells(_permuted(residual, rng), directed)
            permuted_design = np.column_stack([others, shuffled])
            _, t, _ = _ols(y, permuted_design)
            if abs(t[-1]) >= abs(t_observed[k + 1]) - 1e-12:
                extreme += 1
        p_values.append((extreme + 1) / (permutations + 1) if permutations else None)
    terms = [ModelTerm("intercept", float(coefficients[0]), None, None)]
    for k, name in enumerate(names):
        sd_x = columns[k].std()
        std = float(coefficients[k + 1] * sd_x / sd_y) if sd_y > 0 and sd_x > 0 else None
        terms.append(ModelTerm(name, float(coefficients[k + 1]), std, p_values[k]))
    return RegressionResult(outcome_name, tuple(terms), r_squared, len(y), permutations)


def _fill(cells: np.ndarray, n: int, directed: bool) -> np.ndarray:
    """The matrix whose ``_cells`` are ``cells`` (the diagonal 0; undirected: symmetric)."""
    matrix = np.zeros((n, n))
    if directed:
        matrix[~np.eye(n, dtype=bool)] = cells
    else:
        upper = np.triu_indices(n, k=1)
        matrix[upper] = cells
        matrix[(upper[1], upper[0])] = cells
    return matrix


@dataclass(frozen=True)
class SeriesComparison:
    """The waves of one series in wave order, and what changed between each consecutive pair."""

    series: str
    networks: tuple[str, ...]  # ids in wave order
    waves: tuple[int, ...]
    statistics: tuple[tuple[str, tuple[float | None, ...]], ...]  # name, value per wave
    ties: tuple[TieChange, ...]  # one per consecutive pair
    nodes: tuple[NodeChange, ...]
    flows: tuple[CommunityFlow, ...]


def compare_series(series: str, waves: Sequence[tuple[int, NetworkAnalysis]]) -> SeriesComparison:
    """``waves``: (wave number, analysis) of every network of the series, in any order. The
    statistics are those of the first wave's statistics.csv, in its order, then any that only
    later waves have; a statistic a wave lacks is None there."""
    ordered = sorted(waves, key=lambda pair: pair[0])
    analyses = [analysis for _, analysis in ordered]
    names = list(dict.fromkeys(s.name for a in analyses for s in a.statistics))
    statistics = tuple((name, tuple(a.statistic(name) for a in analyses)) for name in names)
    pairs = list(zip(analyses, analyses[1:]))
    return SeriesComparison(
        series=series, networks=tuple(a.network_id for a in analyses),
        waves=tuple(w for w, _ in ordered), statistics=statistics,
        ties=tuple(tie_change(a, b) for a, b in pairs),
        nodes=tuple(node_change(a, b) for a, b in pairs),
        flows=tuple(community_flow(a, b) for a, b in pairs),
    )


@dataclass(frozen=True)
class RelationPair:
    """Two relations on the same nodes: the Jaccard index of their tie sets (compared as
    undirected pairs unless both are directed) and the QAP test of their tie values."""

    network_a: str
    network_b: str
    jaccard: float | None
    qap: QapResult


@dataclass(frozen=True)
class RelationsComparison:
    """Networks on one node set compared: every pair, each node's degree in each network, and
    the regression of one relation on the others and on node attributes (None when not asked
    for). Remembers its permutations and seed."""

    relation: str
    networks: tuple[str, ...]
    nodes: tuple[str, ...]  # ids, in the first network's node order
    degrees: tuple[tuple[int, ...], ...]  # per node, its degree in each network
    pairs: tuple[RelationPair, ...]
    model: RegressionResult | None
    model_directed: bool  # the model used every ordered pair of nodes, not each pair once
    permutations: int
    seed: int


def _undirected_ties(analysis: NetworkAnalysis) -> frozenset[tuple[str, str]]:
    return frozenset((a, b) if a <= b else (b, a) for a, b in tie_set(analysis))


def compare_relations(relation: str, analyses: Sequence[NetworkAnalysis], *, permutations: int,
                      seed: int, outcome: str | None = None, predictors: Sequence[str] = (),
                      same: Sequence[str] = (), difference: Sequence[str] = ()
                      ) -> RelationsComparison:
    """``analyses`` are networks on the same node ids (the caller checks). Each pair gets its
    Jaccard index and a QAP correlation (directed cells when either network is directed; an
    undirected network's matrix is symmetric). With an ``outcome``, MRQAP regresses it on the
    ``predictors`` (network ids), on a 1/0 "same value" matrix per ``same`` attribute and on
    an absolute-difference matrix per ``difference`` attribute, attributes read from the
    outcome's node table. Term names: the network id, ``same:<attribute>``,
    ``difference:<attribute>``."""
    by_id = {a.network_id: a for a in analyses}
    first = analyses[0]
    order = [str(node) for node in first.nodes.index]
    matrices = {a.network_id: relation_matrix(a, order) for a in analyses}
    pairs = []
    for i, a in enumerate(analyses):
        for b in analyses[i + 1:]:
            both_directed = a.directed and b.directed
            ties_a = tie_set(a) if both_directed else _undirected_ties(a)
            ties_b = tie_set(b) if both_directed else _undirected_ties(b)
            qap = qap_correlation(matrices[a.network_id], matrices[b.network_id],
                                  directed=a.directed or b.directed, permutations=permutations,
                                  seed=seed, label=(a.network_id, b.network_id))
            pairs.append(RelationPair(a.network_id, b.network_id, jaccard(ties_a, ties_b), qap))
    degrees = []
    for a in analyses:
        column = a.measures["degree"].set_axis([str(n) for n in a.measures.index])
        degrees.append([int(column[node]) for node in order])
    model = None
    model_directed = False
    if outcome is not None:
        used = [by_id[outcome], *(by_id[name] for name in predictors)]
        model_directed = any(a.directed for a in used)
        terms = {name: matrices[name] for name in predictors}
        table = by_id[outcome].nodes.set_axis([str(n) for n in by_id[outcome].nodes.index])
        for attribute in same:
            terms[f"same:{attribute}"] = same_matrix(list(table[attribute].reindex(order)))
        for attribute in difference:
            terms[f"difference:{attribute}"] = difference_matrix(
                list(table[attribute].reindex(order).astype(float)))
        model = mrqap(matrices[outcome], terms, directed=model_directed,
                      permutations=permutations, seed=seed, outcome_name=outcome)
    return RelationsComparison(
        relation=relation, networks=tuple(a.network_id for a in analyses), nodes=tuple(order),
        degrees=tuple(tuple(row) for row in zip(*degrees)), pairs=tuple(pairs), model=model,
        model_directed=model_directed, permutations=permutations, seed=seed)
