"""How the comparison of relations on the same nodes reads: tie overlap, QAP correlation and the
MRQAP model, in plain words for readers who are not specialists."""

from __future__ import annotations

from .formatting import count, count_of, number, share, signed
from .significance import SIGNIFICANCE_LEVEL

__all__ = ["PERMUTATION_CAUTION", "RELATIONS_REFERENCES", "correlation_reading",
           "jaccard_reading", "model_fit_reading", "p_reading", "relations_method",
           "term_reading", "term_title"]

RELATIONS_REFERENCES = ("krackhardt1987", "dekker2007")  # QAP; MRQAP with double semi-partialling

# Rough bands for how strongly two relations' tie values go together (|r|); practice, not law.
_CORRELATION_WORDS = ((0.1, "hardly go together"), (0.3, "go together weakly"),
                      (0.5, "go together moderately"), (1.01, "go together strongly"))

PERMUTATION_CAUTION = (
    "Each p-value here comes from shuffling which node is which: the nodes of one network are "
    "relabelled at random, keeping its ties whole, and the result is recomputed each time. A "
    "small p says the observed value is rare among those relabellings of these very nodes, so it "
    "is not an accident of a few busy people. It does not say the pattern would hold in another "
    "group, and it says nothing of cause: both relations may follow from something not measured.")


def jaccard_reading(value: float | None, first: str, second: str) -> str:
    if value is None:
        return f"Neither {first} nor {second} has any ties, so their overlap is not defined."
    return (f"Of all pairs of people tied in {first} or in {second}, {share(value)} are tied in "
            "both (1 would mean exactly the same ties, 0 none in common).")


def correlation_reading(value: float | None, first: str, second: str) -> str:
    if value is None:
        return (f"The correlation is not defined: {first} or {second} has the same value for "
                "every pair of nodes.")
    words = next(text for limit, text in _CORRELATION_WORDS if abs(value) < limit)
    direction = ("pairs tied (or tied more strongly) in one tend to be tied in the other"
                 if value > 0 else
                 "pairs tied in one tend not to be tied in the other")
    return f"A correlation of {signed(value)}: the two relations {words}; {direction}."


def p_reading(p: float | None, permutations: int, what: str) -> str:
    """``what`` names the observed value: "a correlation this far from zero"."""
    if p is None:
        return "No p-value: there is no variation to test."
    smallest = 1 / (permutations + 1)
    rare = f"rare among random relabellings (p = {number(p)}"
    if p <= smallest:
        rare += f", the smallest possible with {count(permutations)} relabellings"
    rare += ")"
    if p < SIGNIFICANCE_LEVEL:
        return (f"In {count(permutations)} random relabellings of the nodes, {what} came up "
                f"{_times(p, permutations)}: {rare}.")
    return (f"In {count(permutations)} random relabellings of the nodes, {what} came up "
            f"{_times(p, permutations)} (p = {number(p)}): common enough that chance could "
            "explain it.")


def _times(p: float, permutations: int) -> str:
    k = round(p * (permutations + 1)) - 1
    return "in none of them" if k == 0 else f"{count_of(k, 'time')}"


def term_title(term: str, titles: dict[str, str]) -> str:
    """A model term as a heading: the network's title, "Same clinic", "Difference in age"."""
    kind, _, attribute = term.partition(":")
    if kind == "same" and attribute:
        return f"Same {attribute}"
    if kind == "difference" and attribute:
        return f"Difference in {attribute}"
    if term == "intercept":
        return "Intercept"
    return titles.get(term, term)


def term_reading(term: str, coefficient: float, p: float | None, permutations: int, *,
                 titles: dict[str, str], outcome: str, unit: str | None,
                 weighted: frozenset[str] = frozenset()) -> str:
    """One coefficient in words, holding the other terms fixed; ``unit`` is what the outcome's
    tie value counts ("times per month"), None for an unweighted outcome (a 1/0 tie, so a
    coefficient is a change in the chance of a tie); ``weighted`` names the predictor networks
    whose ties carry weights (their coefficient is per unit of weight)."""
    kind, _, attribute = term.partition(":")
    if term == "intercept":
        return (f"The expected {outcome} tie value of a pair with every other term at zero: "
                f"{number(coefficient)}.")
    if kind == "same" and attribute:
        subject = f"For a pair who share the same {attribute}"
    elif kind == "difference" and attribute:
        subject = f"For each one-unit larger difference in {attribute} between the two"
    else:
        subject = f"For a pair tied in {titles.get(term, term)}" + (
            " (per unit of its tie weight)" if term in weighted else "")
    size = abs(coefficient)
    if unit is None:
        points = f"{number(size * 100)} percentage points"
        change = (f"a {outcome} tie is {points} {'more' if coefficient >= 0 else 'less'} "
                  "likely")
    else:
        change = (f"{outcome} is {number(size)} {unit} {'higher' if coefficient >= 0 else 'lower'}")
    sentence = f"{subject}, {change} on average, the other terms held fixed."
    return sentence + " " + p_reading(p, permutations, "an effect at least this large")


def model_fit_reading(r_squared: float, dyads: int, outcome: str, directed: bool) -> str:
    pairs = "ordered pairs (each direction counted)" if directed else "pairs"
    return (f"Together the terms account for {share(r_squared)} of the variation in {outcome} "
            f"tie values over the {count(dyads)} {pairs} of nodes (R² = {number(r_squared)}).")


def relations_method(permutations: int, seed: int) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """The methods page's paragraphs, each with the reference keys it cites."""
    return (
        ("Tie overlap is the Jaccard index of the two tie sets: ties in both divided by ties in "
         "either. A directed network is compared with an undirected one as undirected pairs "
         "(a tie in either direction counts); two directed networks are compared direction by "
         "direction.", ()),
        ("The QAP correlation is Pearson's correlation of the two networks' tie values (the "
         "weight read as a strength, 1 for a tie, 0 for none) over every pair of distinct nodes: "
         "each ordered pair when either network is directed, each pair once otherwise. Its "
         f"p-value comes from {count(permutations)} permutations of the node labels of the "
         "second network (rows and columns together, so its structure stays whole): the share of "
         "permutations whose correlation is at least as far from zero as the observed one, "
         "counted as (k + 1) / (permutations + 1), so the smallest possible p is "
         f"{number(1 / (permutations + 1))}.", ("krackhardt1987", "north2002")),
        ("The model is an ordinary least-squares regression over the same pairs of the outcome "
         "network's tie values on the predictor networks' tie values, on 1/0 for \"both nodes "
         "share the value\" of each categorical attribute named under same, and on the absolute "
         "difference of each numeric attribute named under difference. Standardised "
         "coefficients are the coefficient times the term's standard deviation over the "
         "outcome's. Each p-value uses double semi-partialling: the term is regressed on the "
         "other terms, its residuals are permuted as a matrix (rows and columns together) "
         f"{count(permutations)} times, and the |t| of each refit is compared with the observed "
         "one, again as (k + 1) / (permutations + 1). This keeps the test honest when terms are "
         "correlated with each other and when ties cluster around some nodes.",
         ("dekker2007",)),
        (f"Every permutation derives from the study seed {seed}, so a rebuild gives the same "
         "p-values.", ()),
    )
