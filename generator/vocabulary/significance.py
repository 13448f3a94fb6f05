"""How the tests against rewired networks read: the plain sentence of each test, the clause an
assortativity reading adds, the columns of significance.csv and the method as the methods page
states it."""

from __future__ import annotations

from typing import TYPE_CHECKING

from .formatting import count, list_in_words, number, plural

if TYPE_CHECKING:
    from ..analyse.nulls import NullTest, SignificanceResult

__all__ = [
    "NULL_REFERENCES",
    "SIGNIFICANCE_COLUMNS",
    "SIGNIFICANCE_LEVEL",
    "is_clear",
    "null_clause",
    "null_reading",
    "null_subject",
    "null_subject_inline",
    "p_text",
    "significance_method",
    "untested_reason",
]

SIGNIFICANCE_LEVEL = 0.05  # p below this reads as a clear difference from the rewired networks
NULL_REFERENCES = ("maslov2002", "north2002")
_NULLS = "rewired networks with the same degrees"

# The columns of files/<id>/significance.csv, in order, with what each holds.
SIGNIFICANCE_COLUMNS: tuple[tuple[str, str], ...] = (
    ("statistic", "the statistic tested, as named in statistics.csv (transitivity, reciprocity, "
     "degree_assortativity, assortativity:<attribute>, ei_index:<attribute>, modularity)"),
    ("observed", "its value on the network as measured"),
    ("null_mean", "its mean over the rewired networks with the same degrees"),
    ("null_sd", "its standard deviation over the rewired networks (N - 1 in the denominator)"),
    ("z", "(observed - null_mean) / null_sd; empty when null_sd is 0"),
    ("p", "two-sided empirical p-value (k + 1) / (N + 1), k counting the rewired networks at "
     "least as far from null_mean as the observed value"),
    ("samples", "N, the rewired networks on which the statistic is defined"),
)

_SUBJECTS = {
    "transitivity": "Clustering (transitivity)",
    "reciprocity": "Reciprocity",
    "degree_assortativity": "Degree assortativity",
    "modularity": "Modularity of the communities found",
}

_UNTESTED = {
    "not_requested": "Not tested against chance: [significance] null_samples is 0.",
    "no_ties": "Not tested against chance: the network has no ties to rewire.",
}


def null_subject(statistic: str) -> str:
    """The statistic as the subject of a sentence: "Assortativity by clinic", "E-I index of
    clinic"."""
    base, _, attribute = statistic.partition(":")
    if base == "ei_index":
        return f"E-I index of {attribute}"
    return f"Assortativity by {attribute}" if attribute else _SUBJECTS[base]


def null_subject_inline(statistic: str) -> str:
    """The subject inside a sentence: "assortativity by clinic", "E-I index of clinic"."""
    subject = null_subject(statistic)
    return subject if subject.startswith("E-I") else subject[0].lower() + subject[1:]


def p_text(p: float) -> str:
    return f"p = {number(p, 2)}"


def is_clear(test: NullTest) -> bool:
    """The observed value is unlikely under the rewired networks (p below 0.05)."""
    return test.p is not None and test.p < SIGNIFICANCE_LEVEL


def _higher(test: NullTest) -> bool:
    return test.null_mean is not None and test.observed > test.null_mean


def _how_many(test: NullTest) -> str:
    """ "higher than in all 200 rewired networks with the same degrees", "lower than in 180 of
    200 ...". """
    beaten = test.below if _higher(test) else test.above
    side = "higher" if _higher(test) else "lower"
    if test.samples == 1:
        return f"{side} than in the one rewired network with the same degrees"
    of = (f"all {count(test.samples)}" if beaten == test.samples
          else f"{count(beaten)} of {count(test.samples)}")
    return f"{side} than in {of} {_NULLS}"


def null_reading(test: NullTest) -> str:
    """The plain reading of one test, for the significance table."""
    subject = null_subject(test.statistic)
    if test.p is None:
        return f"{subject} is not defined on the rewired networks, so it could not be tested."
    if test.why == "no_null_variance" and test.above == test.below == 0:
        return (f"{subject}: every rewired network gives the value observed; with these degrees "
                f"it cannot vary, so the test says nothing ({p_text(test.p)}).")
    if is_clear(test):
        text = f"{subject} is {_how_many(test)} ({p_text(test.p)})."
    else:
        text = f"{subject} is not clearly different from {_NULLS} ({p_text(test.p)})."
    if test.why == "no_null_variance":
        text += " Every rewired network gives the same value, so z is not defined."
    return text


def null_clause(test: NullTest) -> str:
    """What an assortativity reading adds about its test: "higher than in all 200 rewired
    networks with the same degrees, whose mean is -0.02 (p = 0.005, below 0.05)"."""
    assert test.p is not None and test.null_mean is not None
    below = "below" if is_clear(test) else "not below"
    return (f"{_how_many(test)}, whose mean is {number(test.null_mean)} ({p_text(test.p)}, "
            f"{below} {number(SIGNIFICANCE_LEVEL)})")


def untested_reason(key: str) -> str:
    return _UNTESTED[key]


def significance_method(result: SignificanceResult, *, directed: bool, weighted: bool,
                        method: str, runs: int, resolution: str
                        ) -> tuple[tuple[str, tuple[str, ...]], ...]:
    """The methods page's account of the tests: short paragraphs, each with the keys of the
    references it cites."""
    if not result.tests:
        return ((untested_reason(result.why or "not_requested"), ()),)
    n = result.samples
    tested = [null_subject_inline(t.statistic) for t in result.tests]
    keeps = ("every node keeps its in-degree and its out-degree" if directed
             else "every node keeps its degree")
    sentences: list[tuple[str, tuple[str, ...]]] = [(
        f"Each statistic was compared with its values on {count(n)} "
        f"{plural(n, 'network')} made by degree-preserving rewiring of this one: two ties chosen "
        f"at random exchange one end each (a-b and c-d become a-d and c-b), and the swap is kept "
        f"only if it makes no self-loop and no repeated tie. {result.swaps_per_tie} swaps per tie "
        f"(10 x m) were tried for each rewired network, so {keeps}, the number of ties stays the "
        "same and the network stays simple, while who is tied to whom is randomised.", ("maslov2002",))]
    if weighted:
        sentences.append(("The network is weighted: after rewiring, the tie weights were "
                          "shuffled at random over the new ties, so the rewired network has the "
                          "same weights, but not on the same pairs.", ()))
    sentences += [(
        f"Each rewired network has its own seed: the i-th is the i-th draw of randrange(2^31) "
        f"from Python's random.Random seeded with the text \"nulls:{result.seed}\" (the study "
        f"seed is {result.seed}). The rewiring draws from random.Random(that seed), the shuffle "
        "of weights from random.Random(\"weights:\" + that seed), and the community runs on "
        "that network take it as the reported communities take the study seed; so the same study "
        "seed gives the same results, however many processes shared the work.", ()), (
        f"Tested here: {list_in_words(tested)}. Modularity on each rewired network comes from "
        f"the same method as the communities reported ({method}, resolution {resolution}, best "
        f"of {count(runs)} {plural(runs, 'run')}), rerun on that network. A statistic not "
        "defined on the network as measured is not tested.", ()), (
        "For each statistic: the observed value, the mean and standard deviation (N - 1 in the "
        "denominator) over the rewired networks, z = (observed - mean) / sd (not defined when sd "
        "is 0), and a two-sided empirical p-value p = (k + 1) / (N + 1), where N counts the "
        "rewired networks on which the statistic is defined and k those whose value is at least "
        "as far from the mean as the observed value (|null - mean| >= |observed - mean|, equal "
        "to within 10^-12 counting as equally far). The smallest possible p is 1 / (N + 1).",
        ("north2002",)), (
        f"A reading calls a statistic higher or lower than chance, and an assortativity or an "
        f"E-I index a preference or an avoidance, only when p is below {number(SIGNIFICANCE_LEVEL)}; "
        "otherwise it says no clear difference or tendency was found. Several statistics are "
        "tested at once, so one p below 0.05 in many can arise by chance.", ())]
    return tuple(sentences)
