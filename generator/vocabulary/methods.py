"""The names and references of the methods behind every result: community detection, weights,
path sampling, run agreement and the figures' layout and colours."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "COMMUNITY_METHODS",
    "LAYOUT_REFERENCES",
    "PALETTE_REFERENCES",
    "SAMPLING_REFERENCES",
    "STABILITY_REFERENCES",
    "WEIGHT_REFERENCES",
    "CommunityMethod",
    "community_method",
]


@dataclass(frozen=True)
class CommunityMethod:
    key: str  # as written in study.toml
    title: str  # as written in every sentence: "Leiden", never "leiden"
    references: tuple[str, ...]


COMMUNITY_METHODS: tuple[CommunityMethod, ...] = (
    CommunityMethod("leiden", "Leiden", ("traag2019", "newman2004")),
    CommunityMethod("louvain", "Louvain", ("blondel2008", "newman2004")),
    CommunityMethod("label-propagation", "Label propagation", ("raghavan2007", "newman2004")),
)
_BY_KEY = {m.key: m for m in COMMUNITY_METHODS}


def community_method(key: str) -> CommunityMethod:
    return _BY_KEY[key]


WEIGHT_REFERENCES = ("opsahl2010", "newman2001")  # strength and path length from one weight
# Path measures from sampled sources; the average path length's ratio estimate and the
# diameter's lower bound from the same sources.
SAMPLING_REFERENCES = ("brandes2007", "cochran1977", "magnien2009")
STABILITY_REFERENCES = ("hubert1985", "danon2005")  # agreement between community runs
LAYOUT_REFERENCES = ("fruchterman1991",)
PALETTE_REFERENCES = ("okabe2008",)
