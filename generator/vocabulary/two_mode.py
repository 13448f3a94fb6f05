"""The words of two-mode results: column and statistic definitions, projection methods and the
plain readings the two-mode page and the methods page use."""

from __future__ import annotations

from collections.abc import Callable

from .references import REFERENCES, Reference

__all__ = ["PROJECTION_METHODS", "TWO_MODE_COLUMNS", "TWO_MODE_REFERENCES", "projection_text",
           "statistic_description"]

Modes = tuple[str, str]

TWO_MODE_COLUMNS: dict[str, Callable[[Modes], str]] = {
    "mode": lambda m: f"The node's mode: {m[0]!r} (source column) or {m[1]!r} (target column).",
    "degree": lambda m: "Number of ties: for a node of one mode, the nodes of the other mode it "
                        "is tied to.",
    "degree_share": lambda m: "Degree divided by the number of nodes of the other mode: the "
                              "share of them the node is tied to, 0 to 1 (Borgatti & Everett "
                              "1997).",
}


def statistic_description(name: str, modes: Modes) -> str:
    if name.startswith("nodes:"):
        return f"number of {name.split(':', 1)[1]} nodes"
    if name == "edges":
        return f"number of ties, each joining a {modes[0]} to a {modes[1]}"
    if name == "density":
        return (f"ties divided by the ties possible, m / (n1 × n2) with n1 {modes[0]} and n2 "
                f"{modes[1]} nodes (Borgatti & Everett 1997)")
    raise KeyError(name)


PROJECTION_METHODS = {
    "shared": "the weight of a tie between two {mode} nodes is the number of {other} nodes "
              "both are tied to",
    "newman": "the weight of a tie between two {mode} nodes is the sum, over the {other} nodes "
              "both are tied to, of 1/(k - 1), k being the number of {mode} nodes tied to that "
              "{other} (Newman 2001); a {other} tied to one {mode} node only adds nothing, and "
              "every node's strength is the number of {other} nodes it shares with anyone",
}


def projection_text(method: str, mode: str, other: str) -> str:
    return PROJECTION_METHODS[method].format(mode=mode, other=other)



TWO_MODE_REFERENCES: tuple[Reference, ...] = (REFERENCES["borgatti1997"], REFERENCES["newman2001"])
