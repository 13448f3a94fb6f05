"""Turn analyses into the ones a partner bundle shows: codes for ids and labels, removed
columns, small groups merged, data checks without the values they quoted.

Pure functions, analyses in and analyses out. Every number stays exactly as the full report has
it: each node keeps its measures, its community and its place in the layout; only the names and
the order of rows change (rows are ordered by code, so the order says nothing of the ids).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass, replace

import pandas as pd

from ..analyse import NetworkAnalysis
from ..analyse.communities import merge_values
from ..analyse.compare import RelationsComparison
from ..analyse.mixing import merge_groups
from ..config import NetworkConfig, StudyConfig
from ..errors import Finding
from ..vocabulary import exact_text
from .leaks import Secret, SecretMatcher

__all__ = [
    "Protection", "WITHHELD", "label_column", "other_group", "protect_analysis",
    "protect_relations", "protect_study",
    "redact_finding", "secrets_of", "shown_values", "small_groups",
]

# Kinds of secret, as the leak scan names them.
ID, LABEL, SMALL_GROUP = "node id", "node label", "small-group value"

# What a finding says instead when its message would quote a protected value.
WITHHELD = {
    "fix": "a fix was applied (details withheld in partner copies)",
    "note": "a note on the data (details withheld in partner copies)",
    "warning": "a warning (details withheld in partner copies)",
    "error": "an error (details withheld in partner copies)",
}
_QUOTED = re.compile(r"'[^']*'|\"[^\"]*\"")


@dataclass(frozen=True, kw_only=True)
class Protection:
    """How a bundle protects respondents: ``codes`` maps every id to its code (None keeps ids
    as written); ``drop`` names node columns that appear nowhere; categorical groups of fewer
    than ``min_group`` nodes are merged into one."""

    codes: Mapping[str, str] | None
    drop: frozenset[str]
    min_group: int


def other_group(min_group: int) -> str:
    """The name of the group that small groups are merged into."""
    return f"other (n < {min_group})"


def label_column(net: NetworkConfig) -> str:
    """The node-list column the labels come from (``label`` when none is set: ingest reads a
    column of that name as the labels)."""
    return net.label or "label"


def _labels_dropped(net: NetworkConfig, protection: Protection) -> bool:
    return label_column(net) in protection.drop or "label" in protection.drop


def _categorical(nodes: pd.DataFrame, column: str) -> bool:
    return not pd.api.types.is_numeric_dtype(nodes[column].dtype)


def small_groups(analysis: NetworkAnalysis, protection: Protection) -> dict[str, tuple[str, ...]]:
    """Per kept categorical attribute, its values held by fewer than ``min_group`` nodes."""
    found: dict[str, tuple[str, ...]] = {}
    for column in analysis.attributes:
        if column in protection.drop or not _categorical(analysis.nodes, column):
            continue
        counts = analysis.nodes[column].dropna().astype(str).value_counts()
        small = tuple(sorted(str(v) for v, n in counts.items() if n < protection.min_group))
        if small:
            found[column] = small
    return found


def _merged(nodes: pd.DataFrame, column: str, small: tuple[str, ...], name: str) -> pd.Series:
    values = nodes[column]
    merged: pd.Series = values.where(~values.astype(str).isin(small) | values.isna(), name)
    return merged


def protect_analysis(analysis: NetworkAnalysis, net: NetworkConfig, protection: Protection, *,
                     withheld: SecretMatcher) -> NetworkAnalysis:
    """The analysis as a bundle shows it (``net`` is its [[network]] as written; ``withheld``
    finds the protected values a finding's message may quote)."""
    kept = tuple(a for a in analysis.attributes if a not in protection.drop)
    nodes = analysis.nodes[["label", *kept]].copy()
    ids = [str(node) for node in analysis.nodes.index]
    codes = protection.codes
    if codes is not None:
        nodes["label"] = pd.array([codes[node] for node in ids], dtype="string")
    elif _labels_dropped(net, protection):
        nodes["label"] = pd.array(ids, dtype="string")
    name = other_group(protection.min_group)
    merged = small_groups(analysis, protection)
    for column, small in merged.items():
        nodes[column] = _merged(nodes, column, small, name)
    mixing = tuple(merge_groups(t, merged.get(t.attribute, ()), name) for t in analysis.mixing
                   if t.attribute not in protection.drop)

    new_ids = [codes[node] for node in ids] if codes is not None else ids
    order = sorted(range(len(ids)), key=lambda i: new_ids[i]) if codes is not None else \
        list(range(len(ids)))
    index = pd.Index([new_ids[i] for i in order], name=analysis.nodes.index.name)
    nodes = nodes.iloc[order].set_axis(index)
    measures = analysis.measures.reindex(analysis.nodes.index).iloc[order].set_axis(index)
    membership = analysis.communities.membership
    communities = replace(analysis.communities,
                          membership=tuple(membership[i] for i in order))
    dropped_statistics = {f"{kind}:{column}" for column in protection.drop
                          for kind in ("assortativity", "ei_index", "community_attribute_nmi")}
    compared = tuple(merge_values(c, merged.get(c.attribute, ()), name)
                     for c in analysis.attribute_comparisons if c.attribute not in protection.drop)
    stability = analysis.stability
    if stability.ran:  # per-vertex results follow the rows into code order
        together = stability.together
        stability = replace(
            stability, confidence=tuple(stability.confidence[i] for i in order),
            together=None if together is None else
            tuple(tuple(together[i][j] for j in order) for i in order))
    return replace(
        analysis,
        nodes=nodes,
        measures=measures,
        layout=tuple(analysis.layout[i] for i in order),
        communities=communities,
        edges=_coded_edges(analysis, codes),
        attributes=kept,
        statistics=tuple(s for s in analysis.statistics if s.name not in dropped_statistics),
        significance=replace(analysis.significance, tests=tuple(
            t for t in analysis.significance.tests if t.statistic not in dropped_statistics)),
        findings=tuple(redact_finding(f, drop=protection.drop, withheld=withheld)
                       for f in analysis.findings),
        mixing=mixing,
        stability=stability,
        attribute_comparisons=compared,
    )


def protect_relations(comparison: RelationsComparison, protection: Protection
                      ) -> RelationsComparison:
    """The comparison with node ids replaced by codes and its rows in code order; every number
    stays as the full report has it (it was computed on the full analyses, attributes and all)."""
    codes = protection.codes
    if codes is None:
        return comparison
    rows = sorted(zip((codes[node] for node in comparison.nodes), comparison.degrees))
    return replace(comparison, nodes=tuple(code for code, _ in rows),
                   degrees=tuple(degrees for _, degrees in rows))


def _coded_edges(analysis: NetworkAnalysis, codes: Mapping[str, str] | None) -> pd.DataFrame:
    """Ties between codes, sorted by code; an undirected tie runs from the smaller code."""
    edges = analysis.edges
    if codes is None:
        return edges
    source = [codes[str(node)] for node in edges["source"]]
    target = [codes[str(node)] for node in edges["target"]]
    if not analysis.directed:
        source, target = ([min(a, b) for a, b in zip(source, target)],
                          [max(a, b) for a, b in zip(source, target)])
    coded = edges.assign(source=pd.Series(source, index=edges.index).astype(edges["source"].dtype),
                         target=pd.Series(target, index=edges.index).astype(edges["target"].dtype))
    ordered: pd.DataFrame = coded.sort_values(["source", "target"], kind="stable").reset_index(
        drop=True)
    return ordered


def redact_finding(finding: Finding, *, drop: frozenset[str], withheld: SecretMatcher) -> Finding:
    """The finding without the values it quoted: level, file, line and count stay; the value
    goes, quoted values leave the message, and a message that still names a protected value is
    replaced by a sentence saying details are withheld. A removed column is not named."""
    message = _QUOTED.sub("…", finding.message)
    if withheld.kinds_in(message):
        message = WITHHELD.get(finding.level, WITHHELD["note"])
    column = None if finding.column in drop else finding.column
    return Finding(finding.level, finding.file, message, line=finding.line, column=column,
                   value=None, count=finding.count)


def protect_study(study: StudyConfig, protection: Protection) -> StudyConfig:
    """The study as a bundle describes it: no label column where labels are codes or removed,
    and maps coloured by community where their colour attribute is removed."""
    networks = []
    for net in study.networks:
        hide_labels = protection.codes is not None or _labels_dropped(net, protection)
        networks.append(replace(
            net, label=None if hide_labels else net.label,
            color_by=None if net.color_by in protection.drop else net.color_by))
    return replace(study, networks=tuple(networks))


def _text(value: object) -> str | None:
    if value is None or value is pd.NA or (isinstance(value, float) and math.isnan(value)):
        return None
    if isinstance(value, (int, float)) or hasattr(value, "item"):
        try:
            return exact_text(float(value))  # type: ignore[arg-type]
        except (TypeError, ValueError):
            return str(value)
    return str(value)


def secrets_of(analysis: NetworkAnalysis, net: NetworkConfig, protection: Protection
               ) -> list[Secret]:
    """Every original value of one network a bundle must not show: ids and labels when they
    are replaced by codes, every value of a removed column, and every small group's value."""
    found: list[Secret] = []
    ids = [str(node) for node in analysis.nodes.index]
    labels = [str(label) for label in analysis.nodes["label"]]
    written_labels = [label for label, node in zip(labels, ids) if label != node]
    if protection.codes is not None:
        found += [Secret(ID, node) for node in ids]
        found += [Secret(LABEL, label) for label in written_labels]
    elif _labels_dropped(net, protection):
        kind = f"value of the removed column '{label_column(net)}'"
        found += [Secret(kind, label) for label in written_labels]
    for column in analysis.attributes:
        if column in protection.drop:
            kind = f"value of the removed column '{column}'"
            found += [Secret(kind, text) for text in map(_text, analysis.nodes[column])
                      if text is not None]
    found += [Secret(SMALL_GROUP, value) for values in small_groups(analysis, protection).values()
              for value in values]
    return found


def shown_values(analysis: NetworkAnalysis) -> set[str]:
    """Every id, label and attribute value a protected analysis shows on purpose."""
    shown = {str(node) for node in analysis.nodes.index}
    for column in analysis.nodes.columns:
        shown |= {text for text in map(_text, analysis.nodes[column]) if text is not None}
    return shown
