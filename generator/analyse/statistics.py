"""Network-level statistics: size, density, reciprocity, clustering, connectivity, path lengths,
assortativity, modularity and centralization."""

from __future__ import annotations

import math
from dataclasses import dataclass

import igraph as ig
import pandas as pd

from .graph import undirected_version

__all__ = ["STATISTIC_INFO", "Statistic", "StatisticInfo", "network_statistics"]


@dataclass(frozen=True)
class StatisticInfo:
    title: str
    definition: str
    reading: str  # a plain one-line reading for a non-specialist; {value} is filled in
    references: tuple[str, ...] = ()


STATISTIC_INFO: dict[str, StatisticInfo] = {
    "nodes": StatisticInfo("Nodes", "Number of nodes n, isolates included.", ""),
    "edges": StatisticInfo("Ties", "Number of ties m after cleaning (repeats merged, self-loops "
                           "removed).", ""),
    "density": StatisticInfo("Density", "m / (n(n-1)/2) undirected, m / (n(n-1)) directed.",
                             "{percent} of all possible ties are present.", ("wasserman1994",)),
    "reciprocity": StatisticInfo("Reciprocity", "Share of directed ties whose reverse tie exists.",
                                 "{percent} of ties are returned.", ("wasserman1994",)),
    "transitivity": StatisticInfo("Transitivity", "3 x triangles / connected triples, on the "
                                  "undirected version.", "When two people share a contact, they "
                                  "are tied to each other {percent} of the time.", ("wasserman1994",)),
    "average_clustering": StatisticInfo("Average clustering", "Mean local clustering over all "
                                        "nodes (0 for nodes with fewer than two neighbours).",
                                        "On average {percent} of the pairs of a node's contacts are "
                                        "tied to each other.",
                                        ("watts1998",)),
    "components": StatisticInfo("Components", "Connected components (weakly connected when "
                                "directed); isolates count as components.",
                                "The network falls into {value} separate part(s)."),
    "strong_components": StatisticInfo("Strong components", "Strongly connected components: sets in "
                                       "which every node reaches every other along tie directions.",
                                       "{value} sets in which everyone can reach everyone."),
    "largest_component_share": StatisticInfo("Largest component share", "Nodes in the largest "
                                             "component / n.", "{percent} of nodes are in the "
                                             "largest connected part."),
    "diameter": StatisticInfo("Diameter", "Longest shortest path over pairs joined by a path, in "
                              "path lengths.", "The farthest two connected nodes are {value} apart."),
    "average_path_length": StatisticInfo("Average path length", "Mean shortest path length over "
                                         "ordered pairs joined by a path.",
                                         "Connected pairs are on average {value} apart."),
    "degree_assortativity": StatisticInfo(
        "Degree assortativity", "Newman's coefficient of degree correlation across ties (directed: "
        "out-degree of the source against in-degree of the target), unweighted.",
        "{sign_reading}", ("newman2002",)),
    "modularity": StatisticInfo("Modularity", "Newman-Girvan modularity (resolution 1) of the "
                                "reported communities, on the undirected version with strengths.",
                                "{strength_reading}", ("newman2004",)),
    "communities": StatisticInfo("Communities", "Number of communities in the reported partition "
                                 "(isolates form their own).", "{value} communities were found."),
    "degree_centralization": StatisticInfo(
        "Degree centralization", "Freeman: sum(max degree - degree) / ((n-1)(n-2)) on the "
        "undirected version; 1 for a star, 0 when all degrees are equal.",
        "{value} on a scale from 0 (all equal) to 1 (a star).", ("freeman1979",)),
    "betweenness_centralization": StatisticInfo(
        "Betweenness centralization", "Freeman: sum(max - betweenness) / (n-1) over normalised "
        "betweenness; 1 for a star.", "{value} on a scale from 0 (all equal) to 1 (a star).",
        ("freeman1979",)),
}


@dataclass(frozen=True)
class Statistic:
    name: str
    value: float | None
    note: str = ""  # why the value is missing, or how it was estimated
    unit: str = ""  # e.g. "in path length units (1/weight)" for weighted path statistics

    def reading(self) -> str:
        """A plain one-line reading of the value for a non-specialist."""
        if self.value is None:
            return self.note
        info = STATISTIC_INFO.get(self.name) or STATISTIC_INFO.get(self.name.split(":")[0])
        v = self.value
        if info is None:
            return _plain(v)
        if self.name in _COUNTED:
            one, many = _COUNTED[self.name]
            return (one if v == 1 else many).format(value=_plain(v))
        if self.name.startswith("assortativity:") or self.name == "degree_assortativity":
            what = ("similar" if self.name == "degree_assortativity" else "alike in "
                    + self.name.split(":", 1)[1])
            if self.name == "degree_assortativity":
                what = "of similar degree"
            r = f"{v:.2f}".replace("-0.00", "0.00")
            if abs(v) < 0.05:
                return f"Ties show no clear preference for nodes {what} (r = {r})."
            side = "prefer" if v > 0 else "avoid"
            return f"Ties {side} nodes {what} (r = {r})."
        if self.name == "modularity":
            level = "strong" if v >= 0.4 else "moderate" if v >= 0.3 else "weak"
            return f"A {level} community structure (Q = {v:.2f}; above about 0.3 is usually read as clear)."
        text = info.reading.format(value=_plain(v), percent=f"{v:.0%}" if abs(v) <= 1 else _plain(v))
        return f"{text[:-1]} {self.unit}." if self.unit else text


_COUNTED = {
    "nodes": ("One node is in the network.", "{value} nodes are in the network."),
    "edges": ("One distinct tie remains after cleaning.",
              "{value} distinct ties remain after cleaning."),
    "components": ("The network is one connected whole.",
                   "The network falls into {value} separate parts."),
    "strong_components": ("Everyone can reach everyone along tie directions.",
                          "{value} sets within which everyone can reach everyone along tie "
                          "directions (single nodes count as sets)."),
    "communities": ("One community was found.", "{value} communities were found."),
}

STATISTIC_INFO["assortativity"] = StatisticInfo(
    "Attribute assortativity", "Newman's nominal assortativity for text attributes, the numeric "
    "(Pearson) form for numbers; directed networks use the directed mixing matrix. Nodes missing "
    "the attribute are left out.", "", ("newman2003",))


def _plain(value: float) -> str:
    return f"{value:,.0f}" if float(value).is_integer() else f"{value:.3g}"


def _length_unit(graph: ig.Graph, weighted: bool) -> str:
    if not weighted:
        return "(in ties)"
    meaning = graph["weight_means"] if "weight_means" in graph.attributes() else "strength"
    return "(path length = 1/weight)" if meaning == "strength" else "(path length = weight)"


def _defined(value: float) -> float | None:
    return None if value is None or math.isnan(value) else float(value)


def _assortativity(graph: ig.Graph, values: pd.Series, name: str) -> Statistic:
    present = [i for i, v in enumerate(values) if not pd.isna(v)]
    sub = graph.induced_subgraph(present) if len(present) < graph.vcount() else graph
    kept = [values.iloc[i] for i in present]
    left_out = graph.vcount() - len(present)
    note = (f" ({left_out} {'node' if left_out == 1 else 'nodes'} without a value left out)"
            if left_out else "")
    if sub.ecount() == 0:
        return Statistic(name, None, "not defined: no ties among nodes with a value" + note)
    if len(set(kept)) < 2:
        return Statistic(name, None, "not defined: every node has the same value" + note)
    if pd.api.types.is_numeric_dtype(values.dtype):
        result = sub.assortativity(types1=[float(v) for v in kept], directed=graph.is_directed())
    else:
        codes = {v: i for i, v in enumerate(sorted(set(kept)))}
        result = sub.assortativity_nominal(types=[codes[v] for v in kept],
                                           directed=graph.is_directed())
    value = _defined(result)
    return Statistic(name, value, note.strip() if value is not None else
                     "not defined: the mixing pattern has no variance" + note)


def network_statistics(graph: ig.Graph, *, weighted: bool, betweenness: list[float],
                       attributes: pd.DataFrame, modularity: float | None,
                       communities: int) -> list[Statistic]:
    """Every network statistic that applies, in the order of the design's list."""
    n, m = graph.vcount(), graph.ecount()
    directed = graph.is_directed()
    undirected = undirected_version(graph)
    lengths = graph.es["length"] if weighted else None
    stats = [Statistic("nodes", n), Statistic("edges", m)]
    pairs = n * (n - 1) / (1 if directed else 2)
    stats.append(Statistic("density", m / pairs if pairs else None, "" if pairs else
                           "not defined for fewer than two nodes"))
    if directed:
        stats.append(Statistic("reciprocity", graph.reciprocity(ignore_loops=True, mode="default")
                               if m else None, "" if m else "not defined: no ties"))
    transitivity = _defined(undirected.transitivity_undirected())
    stats.append(Statistic("transitivity", transitivity, "" if transitivity is not None else
                           "not defined: no node has two neighbours"))
    local = undirected.transitivity_local_undirected(mode="zero")
    stats.append(Statistic("average_clustering", sum(local) / n if n else None))
    weak = graph.connected_components(mode="weak")
    stats.append(Statistic("components", len(weak)))
    if directed:
        stats.append(Statistic("strong_components", len(graph.connected_components(mode="strong"))))
    stats.append(Statistic("largest_component_share", max(weak.sizes()) / n if n else None))
    unit = _length_unit(graph, weighted)
    if m:
        stats.append(Statistic("diameter", float(graph.diameter(directed=directed, unconn=True,
                                                                weights=lengths)), unit=unit))
        stats.append(Statistic("average_path_length", graph.average_path_length(
            directed=directed, unconn=True, weights=lengths), unit=unit))
    else:
        stats += [Statistic("diameter", None, "not defined: no ties"),
                  Statistic("average_path_length", None, "not defined: no ties")]
    if directed:
        degree_r = graph.assortativity(types1=graph.outdegree(), types2=graph.indegree(), directed=True)
    else:
        degree_r = graph.assortativity_degree(directed=False)
    degree_r = _defined(degree_r) if m else None
    stats.append(Statistic("degree_assortativity", degree_r, "" if degree_r is not None else
                           "not defined: no ties" if not m else
                           "not defined: the degrees at the ends of ties do not vary"))
    for column in attributes.columns:
        stats.append(_assortativity(graph, attributes[column], f"assortativity:{column}"))
    stats.append(Statistic("modularity", modularity, "" if modularity is not None else
                           "not defined: the network has no ties"))
    stats.append(Statistic("communities", communities))
    if n >= 3:
        degrees = undirected.degree()
        top = max(degrees)
        stats.append(Statistic("degree_centralization",
                               sum(top - d for d in degrees) / ((n - 1) * (n - 2))))
        top_b = max(betweenness)
        stats.append(Statistic("betweenness_centralization",
                               sum(top_b - b for b in betweenness) / (n - 1)))
    else:
        stats += [Statistic("degree_centralization", None, "not defined below three nodes"),
                  Statistic("betweenness_centralization", None, "not defined below three nodes")]
    return stats
