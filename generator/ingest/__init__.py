"""Read a network's node list, edge list or adjacency matrix, check it, and clean it."""

from __future__ import annotations

from .network import CleanNetwork, DataChecks, read_network

__all__ = ["CleanNetwork", "DataChecks", "read_network"]
