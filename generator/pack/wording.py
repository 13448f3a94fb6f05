"""What a partner bundle says about itself: the notice on every page, what was protected and
how, the cautions, and README.txt. Words only; the facts come from the pack."""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

from ..draw.node_encoding import LABELLED_NODES
from ..vocabulary import count_of, list_in_words
from .leaks import MIN_LENGTH
from .protect import other_group

__all__ = ["BundleFacts", "CAUTIONS", "SHORT_CAUTION", "notice", "protections", "readme_text"]

CAUTIONS = (
    "Pseudonymised is not anonymous. In a small network a person can often be recognised from "
    "their ties, their position or a rare mix of attributes alone, with no name shown.",
    "Do not try to find out who a code stands for, and do not link this copy with other data "
    "that could tell.",
    "Use and keep this copy only as the sharing terms allow, and pass it on to no one they do not "
    "name. Local data-protection law, research-ethics rules and the study's ethics approval take "
    "precedence.",
    "Centrality describes a position in the measured network, not a person's worth or "
    "performance.",
)

SHORT_CAUTION = ("Pseudonymised is not anonymous: people in a small network can often be "
                 "recognised from their ties alone. Share this bundle only as its sharing terms "
                 "allow.")


@dataclass(frozen=True, kw_only=True)
class BundleFacts:
    """What one bundle did to protect respondents."""

    title: str
    pseudonymized: bool
    removed: tuple[str, ...]  # node columns removed, as [sharing] drop names them (never shown)
    min_group: int
    merged: tuple[tuple[str, int], ...]  # (attribute, how many of its groups were merged)
    categorical: tuple[str, ...]  # text attributes shown, with small groups merged
    numeric: tuple[str, ...]  # numeric attributes shown as they are
    labels: bool  # the network maps name nodes
    checked: int  # distinct values the leak scan searched for
    contact: str | None


def notice(facts: BundleFacts) -> str:
    """One sentence for every page's header."""
    if facts.pseudonymized:
        return ("Identities are protected: node ids and names are replaced by codes, and small "
                "groups are merged.")
    return ("Node ids are shown as the study wrote them; removed columns and small groups are "
            "protected.")


def _groups(facts: BundleFacts) -> list[str]:
    other = other_group(facts.min_group)
    lines = []
    if facts.categorical:
        merged = list_in_words([f"{count_of(n, 'group')} of {name}" for name, n in facts.merged])
        done = f" In this copy that merged {merged}." if facts.merged else \
            " No group in this copy was that small."
        lines.append(f"In every text attribute ({list_in_words(list(facts.categorical))}), groups "
                     f"of fewer than {count_of(facts.min_group, 'node')} are shown merged into "
                     f"one group, \"{other}\", in every table, figure and download.{done}")
        lines.append("Only the group names and counts shown change: every statistic is that of "
                     "the full report, so the assortativity of an attribute is its value over "
                     "the original groups, not over the merged ones.")
    if facts.numeric:
        lines.append(f"Numeric attributes ({list_in_words(list(facts.numeric))}) are shown as "
                     "they are, not grouped.")
    return lines


def protections(facts: BundleFacts) -> tuple[str, ...]:
    """What was protected and how, one sentence or two each."""
    lines = []
    if facts.pseudonymized:
        lines.append("Every node id and name is replaced by a code such as n-3f9a2c7d, made from "
                     "the id with a secret key that only the study team holds (HMAC-SHA-256). "
                     "A code stands for the same node in every table, figure and download, and "
                     "in other copies the study team makes with the same key; without the key a "
                     "code cannot be traced back to its id.")
        lines.append("Rows are ordered by code, not by the study's ids; every measure, community "
                     "number and the layout of the maps are exactly those of the full report.")
    else:
        lines.append("Node ids are shown as the study wrote them ([sharing] pseudonymize is "
                     "false).")
    if facts.removed:  # named nowhere in the bundle, not even here
        lines.append(f"Removed from every table, figure and download: "
                     f"{count_of(len(facts.removed), 'node column')} that the study marked for "
                     "removal ([sharing] drop).")
    else:
        lines.append("No node column was removed.")
    lines += _groups(facts)
    if facts.labels:
        by = "code" if facts.pseudonymized else "label"
        lines.append(f"The network maps name their {LABELLED_NODES} largest nodes, by {by}.")
    else:
        lines.append("No figure names a node.")
    lines.append("The data checks keep each finding's file, line and count, but not the values "
                 "it quoted.")
    lines.append("Notes are included as the study team wrote them.")
    lines.append(f"Before this copy was written, every file in it was searched for the study's "
                 f"{count_of(facts.checked, 'original value')} (ids, names and removed values of "
                 f"{MIN_LENGTH} or more characters); none was found.")
    return tuple(lines)


def _paragraph(text: str) -> str:
    """Wrapped at 78 characters; text already laid out (indented, or on several lines, as the
    terms' markdown is) stays as written."""
    if text.startswith(" ") or "\n" in text:
        return text
    indent = "  " if text.startswith("* ") else ""
    # Addresses and codes stay whole: no break at a hyphen or inside a long word.
    return textwrap.fill(text, width=78, subsequent_indent=indent, break_on_hyphens=False,
                         break_long_words=False)


def _section(title: str, paragraphs: list[str]) -> str:
    body = "\n\n".join(_paragraph(p) for p in paragraphs)
    return f"{title}\n{'-' * len(title)}\n{body}\n"


def readme_text(facts: BundleFacts, *, version: str, built: str, terms: str | None) -> str:
    """README.txt at the root of the bundle: what it is, how to open and verify it, the terms."""
    made = f" on {built}" if built else ""
    head = f"{facts.title}\nPartner bundle made with netfolio {version}{made}\n"
    contact = (f"Questions about this bundle, the data or the terms: {facts.contact}."
               if facts.contact else
               "The study names no contact for this bundle: ask whoever sent it to you.")
    sections = [
        head,
        _section("What this is", [
            f"A copy of the report website of the network study \"{facts.title}\", made to be "
            f"shared with partners. {notice(facts)} sharing.html in the bundle says what was "
            "protected and how."]
            + [f"* {line}" for line in protections(facts)]),
        _section("How to open it", [
            "Unzip the bundle into a folder of its own and open index.html in a web browser. "
            "It works offline, straight from the folder: nothing is loaded from the internet. "
            "Every table is also a CSV file under files/, described by "
            "files/datapackage.json (a Frictionless Data Package)."]),
        _section("How to check it is complete", [
            "In the unzipped folder, run:",
            "    sha256sum -c SHA256SUMS",
            "Every line should end in OK. manifest.json lists the site's files with their sizes "
            "and SHA-256 checksums too."]),
        _section("Sharing terms", [terms.strip() if terms else
                                   "The study sets no written terms for this bundle. Ask the "
                                   "study team before you share it further.", contact]),
        _section("Cautions", list(CAUTIONS)),
    ]
    return "\n".join(sections)
