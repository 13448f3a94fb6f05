"""What the build hands the render stage for one network."""

from __future__ import annotations

from dataclasses import dataclass

from ..analyse import NetworkAnalysis
from ..config import NetworkConfig
from ..draw.ego import EgoFigure
from ..draw.explorer import ExplorerData
from ..draw.figure import Figure

__all__ = ["NetworkPageInput"]


@dataclass(frozen=True)
class NetworkPageInput:
    """One network's settings, analysis results and figures, ready to be written as pages."""

    config: NetworkConfig
    analysis: NetworkAnalysis
    figures: list[Figure]
    explorer: ExplorerData | None = None  # the explorable map's data; None: static map only
    ego: tuple[EgoFigure, ...] | None = None  # every node's ego figure, when nodes get pages

    @property
    def id(self) -> str:
        return self.config.id

    @property
    def title(self) -> str:
        return self.config.title
