"""The key findings on the front page: a few plain sentences per network, each from one result.

Each function takes numbers and names and returns a sentence, or None when the result it words
is not there (a network without communities, an attribute without an E-I index, ...)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from .formatting import count, number, share
from .significance import is_clear, null_reading, p_text

if TYPE_CHECKING:
    from ..analyse.nulls import NullTest

__all__ = ["bridge_finding", "community_finding", "reciprocity_finding", "transitivity_finding",
           "within_group_finding"]


def community_finding(sizes: tuple[int, ...], nodes: int) -> str | None:
    """ "The largest of 5 communities holds 18 of the 61 nodes (30%)." """
    if not sizes or nodes == 0:
        return None
    if len(sizes) == 1:
        return f"All {count(nodes)} nodes fall in one community: no division into groups was found."
    return (f"The largest of {count(len(sizes))} communities holds {count(sizes[0])} of the "
            f"{count(nodes)} nodes ({share(sizes[0] / nodes)}).")


def within_group_finding(attribute: str, ei_index: float, test: NullTest | None) -> str:
    """ "64% of ties join nodes of the same clinic (E-I index -0.28), more than in all 200 ..."

    The share inside groups is (1 - E-I) / 2, as E-I = (E - I) / (E + I). A tendency is claimed
    only when the test of the attribute's assortativity says it is unlikely under chance."""
    inside = (1 - ei_index) / 2
    text = (f"{share(inside)} of ties join nodes of the same {attribute} "
            f"(E-I index {number(ei_index)})")
    if test is None or test.p is None:
        return text + "."
    if is_clear(test):
        more = "more" if test.null_mean is not None and test.observed > test.null_mean else "less"
        return (text + f"; ties keep to their own {attribute} {more} than in networks rewired "
                f"at random with the same degrees ({p_text(test.p)}).")
    return (text + f"; no clear tendency to keep to the same {attribute} was found against "
            f"networks rewired at random with the same degrees ({p_text(test.p)}).")


def bridge_finding(name: str, betweenness: float, runner_up: float | None) -> str | None:
    """Who lies on the most shortest paths between others."""
    if betweenness <= 0:
        return "No node lies between others on a shortest path: nobody bridges."
    text = (f"{name} lies on more shortest paths between others than anyone else "
            f"(betweenness {number(betweenness)}")
    if runner_up is not None and runner_up > 0:
        text += f"; next highest {number(runner_up)}"
    return text + "): the main bridge in these ties, a position and not a judgement of the person."


def reciprocity_finding(reciprocity: float) -> str:
    return f"{share(reciprocity)} of ties are returned (reciprocity {number(reciprocity)})."


def transitivity_finding(transitivity: float, test: NullTest | None) -> str:
    """Clustering, with its test against chance when it was tested."""
    text = (f"Where two nodes share a tie partner, they are tied themselves in "
            f"{share(transitivity)} of cases (transitivity {number(transitivity)}).")
    if test is not None:
        text += " " + null_reading(test)
    return text
