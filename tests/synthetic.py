"""Seeded synthetic studies for the large-network tests and benchmarks: one directed weighted
network with community structure and skewed degrees, written as a node list and an edge list.

Each node belongs to one of about ``nodes / 250`` units of unequal size; each tie starts at a node
drawn with probability proportional to a Pareto-distributed activity and, four times in five, ends
at a node of the same unit drawn by a Pareto popularity (else anywhere), so in- and out-degrees
are skewed as in citation or messaging networks and the units are communities a method can find.
Duplicate ties and self-ties are dropped, so a network holds slightly fewer ties than asked for;
``write_study`` returns the true count. All names and values are invented."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

__all__ = ["SyntheticNetwork", "synthetic_network", "write_study"]


@dataclass(frozen=True)
class SyntheticNetwork:
    nodes: pd.DataFrame  # id, unit
    edges: pd.DataFrame  # source, target, weight (ids as strings)


def synthetic_network(ties: int, *, nodes: int | None = None, seed: int = 11,
                      inside: float = 0.8) -> SyntheticNetwork:
    n = nodes or max(ties // 10, 20)
    rng = np.random.default_rng(seed)
    units = max(n // 250, 2)
    unit_of = np.sort(rng.choice(units, size=n, p=_shares(rng, units)))
    activity = rng.pareto(1.6, n) + 1.0
    popularity = rng.pareto(1.4, n) + 1.0
    asked = int(ties * 1.3) + 10  # room for the duplicates dropped below
    sources = rng.choice(n, size=asked, p=activity / activity.sum())
    anywhere = rng.choice(n, size=asked, p=popularity / popularity.sum())
    # Same unit: a popularity-weighted draw inside the source's unit, by inverse cumulative sums.
    starts = np.searchsorted(unit_of, np.arange(units))
    ends = np.searchsorted(unit_of, np.arange(units), side="right")
    cumulative = np.cumsum(popularity)
    before = np.where(starts > 0, cumulative[np.maximum(starts - 1, 0)], 0.0)
    unit = unit_of[sources]
    low, high = before[unit], cumulative[ends[unit] - 1]
    picks = np.searchsorted(cumulative, low + rng.random(asked) * (high - low), side="right")
    picks = np.minimum(picks, ends[unit] - 1)
    targets = np.where(rng.random(asked) < inside, picks, anywhere)
    pairs = pd.DataFrame({"s": sources, "t": targets})
    pairs = pairs[pairs["s"] != pairs["t"]].drop_duplicates().head(ties)
    weights = rng.integers(1, 6, size=len(pairs))
    ids = np.array([f"n{i}" for i in range(n)], dtype=object)
    edges = pd.DataFrame({"source": ids[pairs["s"].to_numpy()], "target": ids[pairs["t"].to_numpy()],
                          "weight": weights})
    node_table = pd.DataFrame({"id": ids, "unit": [f"unit {u + 1}" for u in unit_of]})
    return SyntheticNetwork(node_table, edges)


def _shares(rng: np.random.Generator, units: int) -> np.ndarray:
    raw = rng.pareto(2.0, units) + 1.0
    shares: np.ndarray = raw / raw.sum()
    return shares


def write_study(root: Path, ties: int, *, nodes: int | None = None, seed: int = 11,
                toml_extra: str = "") -> int:
    """A study folder at ``root`` with the network ``big``; returns its number of ties."""
    network = synthetic_network(ties, nodes=nodes, seed=seed)
    (root / "data").mkdir(parents=True, exist_ok=True)
    network.edges.to_csv(root / "data" / "edges.csv", index=False)
    network.nodes.to_csv(root / "data" / "nodes.csv", index=False)
    (root / "study.toml").write_text(
        '[study]\ntitle = "Invented records network"\n\n[[network]]\nid = "big"\n'
        'title = "Records network"\nedges = "data/edges.csv"\nnodes = "data/nodes.csv"\n'
        f'directed = true\nweight = "weight"\n{toml_extra}')
    return len(network.edges)
