"""The work a large network gets by default: community runs, perturbed reruns and rewired
networks scaled down with the number of ties, so a network of a million ties builds in minutes,
never for a setting the study chose itself.

Each of these repeats a pass over every tie (a community run, a rewiring and its statistics), so
their cost grows with the ties times the count. Above SCALE_FROM_TIES ties a default count is cut
in proportion (SCALE_FROM_TIES / ties), never below its floor: 5 community runs (the best of a
few Leiden runs is close to the best of many: Traag, Waltman & van Eck 2019), 5 perturbed reruns
and 20 rewired networks (a p-value then cannot fall below 1/21, which the page states). What was
scaled is recorded with the analysis, printed by the build and stated on the methods page."""

from __future__ import annotations

from dataclasses import replace

from ..config import CommunitiesConfig, SignificanceConfig

__all__ = ["FLOORS", "SCALE_FROM_TIES", "scaled_for_size"]

SCALE_FROM_TIES = 100_000
FLOORS = {"runs": 5, "perturbations": 5, "null_samples": 20}


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
