"""Every network of a study side by side: one row per network, one column per statistic, and
how each statistic is spread across the networks (for studies of many groups, teams or schools).

Nothing is recomputed: the table arranges the statistics each network's analysis already holds.
"""

from __future__ import annotations

import math
import statistics as stats
from collections.abc import Sequence
from dataclasses import dataclass

from . import NetworkAnalysis, PathSampling

__all__ = ["Spread", "StudyTable", "spread", "study_table"]


@dataclass(frozen=True)
class StudyTable:
    """``values[i][j]`` is statistic ``statistics[j]`` of network ``networks[i]``; None where the
    statistic is not defined for that network or does not apply to it (reciprocity of an
    undirected network, the assortativity of an attribute it lacks). ``estimates[i][j]`` and
    ``errors[i][j]`` are the value's ``Statistic.estimate`` (None when exact) and standard error,
    and ``sampling[i]`` the path sampling of network i (None when its paths are exact)."""

    networks: tuple[str, ...]  # network ids, in study order
    titles: tuple[str, ...]
    statistics: tuple[str, ...]  # every statistic any network has, in order of first appearance
    values: tuple[tuple[float | None, ...], ...]
    estimates: tuple[tuple[str | None, ...], ...] = ()
    errors: tuple[tuple[float | None, ...], ...] = ()
    sampling: tuple[PathSampling | None, ...] = ()

    def column(self, name: str) -> tuple[float | None, ...]:
        j = self.statistics.index(name)
        return tuple(row[j] for row in self.values)

    def estimated(self, name: str) -> bool:
        """Whether any network's value of ``name`` is an estimate or a bound."""
        j = self.statistics.index(name)
        return any(row[j] is not None for row in self.estimates)

    def has_error(self, name: str) -> bool:
        """Whether any network's value of ``name`` has a standard error."""
        j = self.statistics.index(name)
        return any(row[j] is not None for row in self.errors)


def study_table(analyses: Sequence[NetworkAnalysis]) -> StudyTable:
    names: dict[str, None] = {}
    for analysis in analyses:
        names.update((s.name, None) for s in analysis.statistics)
    order = tuple(names)
    values, estimates, errors = [], [], []
    for analysis in analyses:
        own = {s.name: s for s in analysis.statistics}
        values.append(tuple(own[name].value if name in own else None for name in order))
        estimates.append(tuple(own[name].estimate if name in own else None for name in order))
        errors.append(tuple(own[name].standard_error if name in own else None for name in order))
    return StudyTable(networks=tuple(a.network_id for a in analyses),
                      titles=tuple(a.title for a in analyses), statistics=order,
                      values=tuple(values), estimates=tuple(estimates), errors=tuple(errors),
                      sampling=tuple(a.sampling for a in analyses))


@dataclass(frozen=True)
class Spread:
    """How one statistic is spread over the networks that have it."""

    networks: int  # how many networks have a value
    low: float
    median: float
    high: float
    lowest: str  # id of the (first) network with the lowest value
    highest: str


def spread(table: StudyTable, name: str) -> Spread | None:
    """None when no network has a finite value of ``name``."""
    pairs = [(v, net) for net, v in zip(table.networks, table.column(name))
             if v is not None and math.isfinite(v)]
    if not pairs:
        return None
    values = [v for v, _ in pairs]
    low, high = min(values), max(values)
    return Spread(networks=len(pairs), low=low, median=float(stats.median(values)), high=high,
                  lowest=next(net for v, net in pairs if v == low),
                  highest=next(net for v, net in pairs if v == high))
