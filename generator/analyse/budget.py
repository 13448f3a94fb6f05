"""The work a large network gets by default: community runs, perturbed reruns, rewired networks
and sampled path sources scaled down with the number of ties, so a network of a million ties
builds in minutes, never for a setting the study chose itself.

Each of these repeats a pass over every tie (a community run, a rewiring and its statistics), so
their cost grows with the ties times the count. Above SCALE_FROM_TIES ties a default count is cut
in proportion (SCALE_FROM_TIES / ties), never below its floor: 5 community runs (the best of a
few Leiden runs is close to the best of many: Traag, Waltman & van Eck 2019), 5 perturbed reruns
and 20 rewired networks (a p-value then cannot fall below 1/21, which the page states). What was
scaled is recorded with the analysis, printed by the build and stated on the methods page.

Sampled path sources (each a shortest-path search over every tie, twice: betweenness, then
distances) are held to PATH_WORK sources x ties, at least MIN_PATH_SOURCES: 2,000 sources up to
200,000 ties, 400 at 10^6. Brandes & Pich (2007) found the ranking error of sampled betweenness
to depend on the number of sources rather than on the network's size."""

from __future__ import annotations

from dataclasses import replace

from ..config import CommunitiesConfig, MeasuresConfig, SignificanceConfig

__all__ = ["FLOORS", "MIN_PATH_SOURCES", "PATH_WORK", "SCALE_FROM_TIES", "path_sources",
           "scaled_for_size"]

SCALE_FROM_TIES = 100_000
FLOORS = {"runs": 5, "perturbations": 5, "null_samples": 20}
PATH_WORK = 400_000_000  # sampled sources x ties
MIN_PATH_SOURCES = 250


def path_sources(measures: MeasuresConfig, ties: int) -> tuple[MeasuresConfig, bool]:
    """The measures settings for a network of ``ties`` ties, and whether the sampled sources
    were cut down for its size."""
    if "path_sample_sources" in measures.chosen or ties == 0:
        return measures, False
    sources = min(measures.path_sample_sources, max(MIN_PATH_SOURCES, PATH_WORK // ties))
    if sources == measures.path_sample_sources:
        return measures, False
    return replace(measures, path_sample_sources=sources), True


def _scaled(count: int, ties: int, floor: int) -> int:
    if count == 0:
        return 0  # switched off stays off
    return min(count, max(floor, round(count * SCALE_FROM_TIES / ties)))


def scaled_for_size(communities: CommunitiesConfig, significance: SignificanceConfig, ties: int
                    ) -> tuple[CommunitiesConfig, SignificanceConfig, tuple[str, ...]]:
    """The settings a network of ``ties`` ties is analysed with, and the names of those cut
    down (``runs``, ``perturbations``, ``null_samples``; none at or below SCALE_FROM_TIES)."""
    if ties <= SCALE_FROM_TIES:
        return communities, significance, ()
    changed: list[str] = []
    counts = {}
    for name, table in (("runs", communities), ("perturbations", communities)):
        value = getattr(table, name)
        counts[name] = value if name in table.chosen else _scaled(value, ties, FLOORS[name])
        if counts[name] != value:
            changed.append(name)
    samples = significance.null_samples
    if "null_samples" not in significance.chosen:
        samples = _scaled(samples, ties, FLOORS["null_samples"])
    if samples != significance.null_samples:
        changed.append("null_samples")
    return (replace(communities, runs=counts["runs"], perturbations=counts["perturbations"]),
            replace(significance, null_samples=samples), tuple(changed))
