"""Path statistics of large networks from shortest paths out of sampled sources: the average path
length as a ratio estimate with its standard error, and a lower bound of the diameter.

Above ``[measures] exact_paths_up_to`` nodes the node path measures already follow shortest paths
out of ``k`` sources drawn uniformly without replacement with the study seed (Brandes & Pich 2007);
the same rows of distances give, per source s, the number of other nodes it reaches (x_s), the
sum of their path lengths (y_s) and the longest of them (its eccentricity among reached nodes).

* Average path length over reachable ordered pairs = sum over all sources of y / sum of x. From
  the sample it is estimated by the ratio estimator R = sum_S y / sum_S x, whose standard error
  is the large-sample one of Cochran (1977, Sampling Techniques, 3rd ed., ch. 6; the equation
  from memory), with the sample mean of x in place of the unknown population mean:
  SE^2 = (1 - k/n) / (k xbar^2) * sum_S (y_s - R x_s)^2 / (k - 1). With every node a source it
  is the exact value, with SE 0; tests/test_sampled_paths.py checks it against the spread of
  the estimate over every possible sample of small graphs.
* Diameter: every distance found is a distance of the network, so the longest one found is a
  lower bound. Beside the sampled sources, a few sweeps (Magnien, Latapy & Habib 2009): the first
  searches out of the far end of the longest sampled path, each next one out of the far end of
  the path the previous search found longest; in a directed network the sweeps alternate between
  following ties backwards and forwards. Never all pairs.

Pure: numbers in, numbers out.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import igraph as ig
import numpy as np

__all__ = ["DIAMETER_SWEEPS", "MeanEstimate", "SourcePaths", "diameter_lower_bound",
           "mean_path_length", "source_paths", "source_rows"]

DIAMETER_SWEEPS = 4  # searches from far ends after the sampled sources (Magnien et al. 2009)
_CELLS = 2_000_000  # distances held at once (sources x nodes): bounded memory on large networks


@dataclass(frozen=True)
class SourcePaths:
    """Shortest paths out of each sampled source, in source order: how many other nodes it
    reaches, the sum of the path lengths to them, the longest such length (0 when it reaches
    none) and the first node at that length (the source itself when it reaches none)."""

    nodes: int  # n, the nodes of the network the sources were drawn from
    sources: tuple[int, ...]
    reached: tuple[int, ...]
    total: tuple[float, ...]
    longest: tuple[float, ...]
    farthest: tuple[int, ...]


@dataclass(frozen=True)
class MeanEstimate:
    """A ratio estimate; ``value`` None when no sampled source reaches another node;
    ``standard_error`` None when it cannot be estimated (a single source)."""

    value: float | None
    standard_error: float | None


def source_rows(dist: np.ndarray, block: Sequence[int]
                ) -> tuple[list[int], list[float], list[float], list[int]]:
    """Per row of ``dist`` (one row per source of ``block``, infinite where not reached, the
    source's own entry already infinite): reached count, sum, longest and its first node."""
    finite = np.isfinite(dist)
    reached = finite.sum(axis=1)
    total = np.where(finite, dist, 0.0).sum(axis=1)
    masked = np.where(finite, dist, -1.0)
    far = masked.argmax(axis=1)
    longest = masked[np.arange(len(block)), far]
    return ([int(r) for r in reached], [float(t) for t in total],
            [float(v) if r else 0.0 for v, r in zip(longest, reached)],
            [int(f) if r else int(s) for f, r, s in zip(far, reached, block)])


def source_paths(graph: ig.Graph, sources: Sequence[int], lengths: list[float] | None
                 ) -> SourcePaths:
    """Shortest paths out of ``sources`` (following tie directions), in path lengths
    ``lengths`` (one per tie) or in steps when None."""
    reached: list[int] = []
    total: list[float] = []
    longest: list[float] = []
    farthest: list[int] = []
    size = max(1, min(256, _CELLS // max(1, graph.vcount())))
    for start in range(0, len(sources), size):
        block = list(sources[start:start + size])
        dist = np.array(graph.distances(source=block, weights=lengths, mode="out"), dtype=float)
        dist[np.arange(len(block)), block] = math.inf  # a node does not reach itself
        r, t, lo, f = source_rows(dist, block)
        reached += r
        total += t
        longest += lo
        farthest += f
    return SourcePaths(nodes=graph.vcount(), sources=tuple(sources), reached=tuple(reached),
                       total=tuple(total), longest=tuple(longest), farthest=tuple(farthest))


def mean_path_length(paths: SourcePaths) -> MeanEstimate:
    """Mean path length over the reachable ordered pairs (source, target), estimated from the
    sampled sources by the ratio estimator, with Cochran's standard error (see the module)."""
    x = np.array(paths.reached, dtype=float)
    y = np.array(paths.total, dtype=float)
    k = len(x)
    if k == 0 or x.sum() == 0:
        return MeanEstimate(None, None)
    ratio = float(y.sum() / x.sum())
    if k < 2:
        return MeanEstimate(ratio, None)
    spared = max(0.0, 1.0 - k / paths.nodes)  # finite population correction
    residual = float(((y - ratio * x) ** 2).sum()) / (k - 1)
    mean_x = float(x.mean())
    return MeanEstimate(ratio, math.sqrt(spared * residual / (k * mean_x ** 2)))


def _sweep(graph: ig.Graph, start: int, lengths: list[float] | None, mode: str
           ) -> tuple[float, int]:
    dist = np.array(graph.distances(source=[start], weights=lengths, mode=mode)[0], dtype=float)
    dist[start] = math.inf
    _, _, longest, farthest = source_rows(dist[np.newaxis, :], [start])
    return longest[0], farthest[0]


def diameter_lower_bound(graph: ig.Graph, paths: SourcePaths, lengths: list[float] | None,
                         sweeps: int = DIAMETER_SWEEPS) -> float:
    """The longest shortest path found out of the sampled sources and up to ``sweeps`` further
    searches (see the module), a lower bound of the diameter: every length found is the length
    of a shortest path of the network. Undirected, the sweeps stop early at a far end that has
    already been searched from."""
    if not paths.sources:
        return 0.0
    best = int(np.argmax(np.array(paths.longest)))  # the first source with the longest path
    bound, end = paths.longest[best], paths.farthest[best]
    searched = set(paths.sources)
    directed = graph.is_directed()
    backwards = directed  # from the far end of a path out of s, search back towards it
    for _ in range(sweeps):
        if not directed and end in searched:
            break
        searched.add(end)
        longest, far = _sweep(graph, end, lengths, "in" if backwards else "out")
        if longest > bound:
            bound = longest
        end = far
        if directed:
            backwards = not backwards
    return float(bound)
