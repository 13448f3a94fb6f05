"""The data-checks page context: every fix and note found while reading each network and
rendering the notes."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from ..errors import Finding
from ..vocabulary import MISSING, count
from .inputs import NetworkPageInput
from .mixing import isolates_text
from .site_map import PageFrame, network_page
from .two_mode_page import TwoModeInput

__all__ = ["LEVEL_TITLES", "NOTES_RULES", "ChecksPage", "FindingGroup", "FindingRow", "NetworkChecks",
           "NotesChecks", "checks_context", "finding_groups"]

# In the order shown. Errors stop a build, so a built site normally shows only fixes and notes.
LEVEL_TITLES = {"error": "Errors", "warning": "Warnings", "fix": "Fixes applied", "note": "Notes"}
_NONE_FOUND = {"fix": "No fixes were needed.", "note": "Nothing else to note."}

# What rendering does to every note and the front-page summary, said above their findings.
NOTES_RULES = (
    "Raw HTML is shown as text unless [site] allow_html = true; links and images pass an "
    "allow-list, and a link whose address could run code is left without its address.",
    "Images load only from inside the site: an image from another address is shown as its alt "
    "text.",
)


@dataclass(frozen=True)
class FindingRow:
    file: str
    line: str
    column: str
    value: str
    count: str
    message: str


@dataclass(frozen=True)
class FindingGroup:
    level: str
    title: str
    rows: tuple[FindingRow, ...]
    none_found: str  # said instead of an empty table


@dataclass(frozen=True)
class NetworkChecks:
    id: str
    title: str
    anchor: str
    page_href: str
    rules: tuple[str, ...]
    groups: tuple[FindingGroup, ...]
    isolates: str = ""  # how many listed nodes have no ties, and how measures treat them


@dataclass(frozen=True)
class NotesChecks:
    title: str
    anchor: str
    rules: tuple[str, ...]
    groups: tuple[FindingGroup, ...]


def _row(finding: Finding) -> FindingRow:
    return FindingRow(
        file=finding.file,
        line=MISSING if finding.line is None else str(finding.line),
        column=MISSING if finding.column is None else finding.column,
        value=MISSING if finding.value is None else finding.value,
        count=count(finding.count),
        message=finding.message,
    )


def finding_groups(findings: tuple[Finding, ...] | list[Finding]) -> tuple[FindingGroup, ...]:
    """Findings grouped by level; fixes and notes always appear, errors only when present."""
    groups = []
    for level, title in LEVEL_TITLES.items():
        rows = tuple(_row(f) for f in findings if f.level == level)
        if rows or level in _NONE_FOUND:
            groups.append(FindingGroup(level, title, rows, _NONE_FOUND.get(level, "")))
    return tuple(groups)


def _rules(item: NetworkPageInput, parent: TwoModeInput | None = None) -> tuple[str, ...]:
    config, analysis = item.config, item.analysis
    if config.projected_from is not None:
        if parent is None:  # a partner copy leaves the two-mode network out
            return ("Made from a two-mode network whose own page and file checks are left out "
                    "of this copy.",)
        return (f"Made from the two-mode network {parent.title}: the checks of its files are "
                "listed under it, once.",)
    how = f", weights combined by {config.duplicates}" if analysis.weighted else ""
    repeats = (() if config.matrix is not None else
               (f"Repeated ties between the same pair are merged into one tie{how}.",))
    return (*repeats, "Self-loops (ties from a node to itself) are removed.",
            "Lines count as in a text editor: the header is line 1.")


@dataclass(frozen=True)
class ChecksPage:
    """Everything ``checks.html`` shows."""

    page: PageFrame
    networks: tuple[NetworkChecks, ...]
    notes: NotesChecks | None


def _two_mode_rules(item: TwoModeInput) -> tuple[str, ...]:
    first, second = item.analysis.modes
    return (f"Each tie joins a {first} node to a {second} node; the same text may name a node of "
            "each mode.",
            "Repeated ties between the same pair are merged into one tie (a fix below says how "
            "their weights were combined).",
            "Lines count as in a text editor: the header is line 1.")


def checks_context(frame: PageFrame, networks: list[NetworkPageInput], *,
                   notes: tuple[Finding, ...] | None = None,
                   two_mode: Sequence[TwoModeInput] = ()) -> ChecksPage:
    """``notes``: the findings of rendering the notes and summary (None: the study has none).
    A two-mode network's file checks are listed once, before its projections."""
    sections: list[NetworkChecks] = []
    shown: set[str] = set()
    by_id = {two.id: two for two in two_mode}
    for item in networks:
        source = item.config.projected_from
        if source in by_id and source not in shown:
            shown.add(source)
            two = by_id[source]
            sections.append(NetworkChecks(
                id=two.id, title=two.title, anchor=f"network-{two.id}",
                page_href=frame.href(network_page(two.id)), rules=_two_mode_rules(two),
                groups=finding_groups(two.analysis.findings)))
        sections.append(NetworkChecks(
            id=item.id, title=item.title, anchor=f"network-{item.id}",
            page_href=frame.href(network_page(item.id)),
            rules=_rules(item, by_id.get(source) if source is not None else None),
            groups=finding_groups(item.analysis.findings),
            isolates=isolates_text(item.analysis, item.config)))
    return ChecksPage(
        page=frame,
        networks=tuple(sections),
        notes=None if notes is None else NotesChecks(
            title="Notes and summary", anchor="notes", rules=NOTES_RULES,
            groups=finding_groups(notes)),
    )
