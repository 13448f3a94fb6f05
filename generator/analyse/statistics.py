"""Network-level statistics: size, density, reciprocity, clustering, connectivity, path lengths,
assortativity, modularity and centralization (definitions and references of each live in
``generator.vocabulary.statistics``)."""

from __future__ import annotations

import math
from dataclasses import dataclass

import igraph as ig
import pandas as pd

from .graph import undirected_version
from .mixing import categorical_attributes, mixing_table
from .paths import SourcePaths, diameter_lower_bound, mean_path_length, source_paths

__all__ = ["LOWER_BOUND", "SAMPLED", "Statistic", "network_statistics"]

SAMPLED = "sampled"  # estimated from the sampled sources of the node path measures
LOWER_BOUND = "lower_bound"  # the largest value found, which the exact value may exceed


@dataclass(frozen=True)
class Statistic:
    """One network statistic (a row of statistics.csv).

    ``value`` is None when the statistic is not defined for the network, and ``why`` then names
    the reason by key (the wording lives with the presentation). ``left_out`` counts the nodes an
    attribute statistic skipped for having no value; ``steps`` is a path statistic of a weighted
    network recomputed counting every tie as one step.

    ``estimate`` is None for an exact value, ``SAMPLED`` for one estimated from the sampled
    sources (with its ``standard_error`` where one is known, and ``steps_standard_error`` for
    ``steps``), ``LOWER_BOUND`` for a bound found from them (``steps`` then is one too).
    """

    name: str
    value: float | None
    why: str | None = None
    left_out: int = 0
    steps: float | None = None
    estimate: str | None = None
    standard_error: float | None = None
    steps_standard_error: float | None = None


def _defined(value: float) -> float | None:
    return None if value is None or math.isnan(value) else float(value)


def _assortativity(graph: ig.Graph, values: pd.Series, name: str) -> Statistic:
    present = [i for i, v in enumerate(values) if not pd.isna(v)]
    sub = graph.induced_subgraph(present) if len(present) < graph.vcount() else graph
    kept = [values.iloc[i] for i in present]
    left_out = graph.vcount() - len(present)
    if sub.ecount() == 0:
        return Statistic(name, None, "no_valued_ties", left_out)
    if len(set(kept)) < 2:
        return Statistic(name, None, "one_value", left_out)
    if pd.api.types.is_numeric_dtype(values.dtype):
        result = sub.assortativity(types1=[float(v) for v in kept], directed=graph.is_directed())
    else:
        codes = {v: i for i, v in enumerate(sorted(set(kept)))}
        result = sub.assortativity_nominal(types=[codes[v] for v in kept],
                                           directed=graph.is_directed())
    value = _defined(result)
    return Statistic(name, value, None if value is not None else "no_variance", left_out)


def _directed_degree_centralization(graph: ig.Graph) -> list[Statistic]:
    """Freeman's centralization of in-degree and of out-degree: sum(max - d) / (n-1)^2.

    (n-1)^2 is the largest possible sum, reached by a star whose ties all point to (or all
    leave) the centre; ties are counted as in the in_degree and out_degree columns.

    References: Freeman, L. C.: Centrality in social networks: conceptual clarification. Social
    Networks 1(3):215-239, 1979. doi:10.1016/0378-8733(78)90021-7
    """
    n = graph.vcount()
    if n < 2:
        return [Statistic(f"{mode}_degree_centralization", None, "fewer_than_two_nodes")
                for mode in ("in", "out")]
    stats = []
    for mode in ("in", "out"):
        degrees = graph.degree(mode=mode)
        top = max(degrees)
        stats.append(Statistic(f"{mode}_degree_centralization",
                               sum(top - d for d in degrees) / (n - 1) ** 2))
    return stats


def _sampled_path_statistics(graph: ig.Graph, paths: SourcePaths, lengths: list[float] | None
                             ) -> list[Statistic]:
    """Diameter (a lower bound) and average path length (a ratio estimate with its standard
    error) from shortest paths out of the sampled sources; a weighted network (``lengths``
    given) keeps both counting every tie as one step too, from the same sources."""
    if not any(paths.reached):
        return [Statistic("diameter", None, "no_sampled_paths"),
                Statistic("average_path_length", None, "no_sampled_paths")]
    mean = mean_path_length(paths)
    steps_bound = steps_mean = steps_error = None
    if lengths is not None:
        steps = source_paths(graph, paths.sources, None)
        steps_bound = diameter_lower_bound(graph, steps, None)
        in_steps = mean_path_length(steps)
        steps_mean, steps_error = in_steps.value, in_steps.standard_error
    return [Statistic("diameter", diameter_lower_bound(graph, paths, lengths), steps=steps_bound,
                      estimate=LOWER_BOUND),
            Statistic("average_path_length", mean.value, steps=steps_mean, estimate=SAMPLED,
                      standard_error=mean.standard_error, steps_standard_error=steps_error)]


def network_statistics(graph: ig.Graph, *, weighted: bool, betweenness: list[float],
                       attributes: pd.DataFrame, modularity: float | None,
                       communities: int, paths: SourcePaths | None = None) -> list[Statistic]:
    """Every network statistic that applies, in a fixed order (size, reach, paths, mixing,
    communities, centralization).

    ``paths``: the shortest paths out of the sampled sources of the node path measures (in path
    lengths) when those were sampled; the diameter is then a lower bound and the average path
    length an estimate from them (``analyse.paths``), and the betweenness centralization, from
    the estimated betweenness, is marked as sampled too."""
    n, m = graph.vcount(), graph.ecount()
    directed = graph.is_directed()
    undirected = undirected_version(graph)
    lengths = graph.es["length"] if weighted else None
    stats = [Statistic("nodes", n), Statistic("edges", m)]
    pairs = n * (n - 1) / (1 if directed else 2)
    stats.append(Statistic("density", m / pairs if pairs else None,
                           None if pairs else "fewer_than_two_nodes"))
    if directed:
        stats.append(Statistic("reciprocity", graph.reciprocity(ignore_loops=True, mode="default")
                               if m else None, None if m else "no_ties"))
    transitivity = _defined(undirected.transitivity_undirected())
    stats.append(Statistic("transitivity", transitivity,
                           None if transitivity is not None else "no_two_neighbours"))
    local = undirected.transitivity_local_undirected(mode="zero")
    stats.append(Statistic("average_clustering", sum(local) / n if n else None))
    weak = graph.connected_components(mode="weak")
    stats.append(Statistic("components", len(weak)))
    if directed:
        stats.append(Statistic("strong_components", len(graph.connected_components(mode="strong"))))
    stats.append(Statistic("largest_component_share", max(weak.sizes()) / n if n else None))
    if m and paths is not None:
        stats += _sampled_path_statistics(graph, paths, lengths)
    elif m:
        # A weighted network's path lengths have no unit a reader can hold, so the same two
        # statistics are kept counting every tie as one step, for the readings.
        steps = (float(graph.diameter(directed=directed, unconn=True)),
                 graph.average_path_length(directed=directed, unconn=True)) if weighted else (None, None)
        stats.append(Statistic("diameter", float(graph.diameter(directed=directed, unconn=True,
                                                                weights=lengths)), steps=steps[0]))
        stats.append(Statistic("average_path_length", graph.average_path_length(
            directed=directed, unconn=True, weights=lengths), steps=steps[1]))
    else:
        stats += [Statistic("diameter", None, "no_ties"),
                  Statistic("average_path_length", None, "no_ties")]
    if directed:
        degree_r = graph.assortativity(types1=graph.outdegree(), types2=graph.indegree(), directed=True)
    else:
        degree_r = graph.assortativity_degree(directed=False)
    degree_r = _defined(degree_r) if m else None
    stats.append(Statistic("degree_assortativity", degree_r, None if degree_r is not None else
                           "no_ties" if not m else "constant_degrees"))
    for column in attributes.columns:
        stats.append(_assortativity(graph, attributes[column], f"assortativity:{column}"))
    for column in categorical_attributes(attributes):
        mixing = mixing_table(graph, attributes[column], column)
        stats.append(Statistic(f"ei_index:{column}", mixing.ei_index, mixing.why,
                               mixing.left_out_nodes))
    stats.append(Statistic("modularity", modularity, None if modularity is not None else
                           "no_ties"))
    stats.append(Statistic("communities", communities))
    if n >= 3:
        degrees = undirected.degree()
        top = max(degrees)
        stats.append(Statistic("degree_centralization",
                               sum(top - d for d in degrees) / ((n - 1) * (n - 2))))
    else:
        stats.append(Statistic("degree_centralization", None, "below_three_nodes"))
    if directed:
        stats += _directed_degree_centralization(graph)
    if n >= 3:
        top_b = max(betweenness)
        stats.append(Statistic("betweenness_centralization",
                               sum(top_b - b for b in betweenness) / (n - 1),
                               estimate=None if paths is None else SAMPLED))
    else:
        stats.append(Statistic("betweenness_centralization", None, "below_three_nodes"))
    return stats
