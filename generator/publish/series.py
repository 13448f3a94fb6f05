"""The downloads of one series of waves, under ``files/series/<series>/``: statistics per wave,
tie change, node measures per wave and community flow; with their Data Package resources."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import pandas as pd

from ..analyse import NetworkAnalysis
from ..analyse.compare import SeriesComparison
from ..vocabulary import COMMUNITY, ESTIMATE_COLUMNS, WHOLE_MEASURES, exact_text
from .downloads import has_estimates, statistic_estimate

__all__ = ["SERIES_FILES", "series_files", "series_resources"]

_WHOLE = (COMMUNITY, *WHOLE_MEASURES)  # written as whole numbers
SERIES_FILES = ("statistics.csv", "ties.csv", "nodes.csv", "community_flow.csv")


def _csv(frame: pd.DataFrame) -> bytes:
    return frame.to_csv(index=False, lineterminator="\n").encode("utf-8")


def _node_table(comparison: SeriesComparison, analyses: Mapping[str, NetworkAnalysis]
                ) -> pd.DataFrame:
    """One row per node of any wave (first seen first), then ``<measure>:<network id>`` for
    every measure of every wave; empty where the node is absent from that wave."""
    waves = [analyses[i] for i in comparison.networks]
    ids = list(dict.fromkeys(str(n) for a in waves for n in a.nodes.index))
    labels: dict[str, str] = {}
    for a in waves:
        for node, label in zip(a.nodes.index, a.nodes["label"]):
            labels.setdefault(str(node), str(label))
    table: pd.DataFrame = pd.DataFrame({"id": ids, "label": [labels[i] for i in ids]})
    for a in waves:
        measures = a.measures.set_axis([str(n) for n in a.measures.index])
        for column in measures.columns:
            table[f"{column}:{a.network_id}"] = measures[column].reindex(ids).to_numpy()
    return table


def series_files(comparison: SeriesComparison, analyses: Mapping[str, NetworkAnalysis]
                 ) -> dict[str, bytes]:
    prefix = f"files/series/{comparison.series}/"
    statistics = pd.DataFrame(
        [[name, *(exact_text(v) for v in values)] for name, values in comparison.statistics],
        columns=["statistic", *comparison.networks])
    for network in reversed(comparison.networks):  # a wave's estimates follow its values
        if has_estimates(analyses[network]):
            at = statistics.columns.get_loc(network) + 1
            found = [statistic_estimate(analyses[network], name)
                     for name, _ in comparison.statistics]
            for offset, (part, _) in enumerate(ESTIMATE_COLUMNS):
                statistics.insert(at + offset, f"{network}_{part}", [f[offset] for f in found])
    ties = pd.DataFrame([(t.earlier, t.later, t.kept, t.added, t.dropped, exact_text(t.jaccard))
                         for t in comparison.ties],
                        columns=["from", "to", "kept", "added", "dropped", "jaccard"])
    flow = pd.DataFrame([(f.earlier, a, f.later, b, n) for f in comparison.flows
                         for a, b, n in f.flows],
                        columns=["from_network", "from_community", "to_network", "to_community",
                                 "members"])
    nodes = _node_table(comparison, analyses)
    for column in nodes.columns[2:]:
        measure = column.partition(":")[0]
        if measure in _WHOLE:  # counts as written (3, not 3.0), empty where absent
            nodes[column] = nodes[column].astype("Int64")
    return {prefix + "statistics.csv": _csv(statistics), prefix + "ties.csv": _csv(ties),
            prefix + "nodes.csv": _csv(nodes), prefix + "community_flow.csv": _csv(flow)}


def _resource(series: str, name: str, title: str, fields: list[dict[str, str]]) -> dict[str, Any]:
    return {"name": f"series-{series}-{name.removesuffix('.csv').replace('_', '-')}",
            "path": f"series/{series}/{name}", "profile": "tabular-data-resource",
            "format": "csv", "mediatype": "text/csv", "encoding": "utf-8", "title": title,
            "schema": {"fields": fields}}


def series_resources(comparison: SeriesComparison, analyses: Mapping[str, NetworkAnalysis]
                     ) -> list[dict[str, Any]]:
    s = comparison.series

    def field(name: str, kind: str, description: str) -> dict[str, str]:
        return {"name": name, "type": kind, "description": description}

    waves = []
    for i, w in zip(comparison.networks, comparison.waves):
        estimated = has_estimates(analyses[i])
        waves.append(field(i, "number", f"Value in {analyses[i].title} (wave {w}); empty where "
                           "not defined." + (f" Sampled or a lower bound where {i}_estimate says "
                                             "so." if estimated else "")))
        if estimated:
            waves += [field(f"{i}_{part}", "number" if part == "standard_error" else "string",
                            f"In {analyses[i].title}: {meaning}.")
                      for part, meaning in ESTIMATE_COLUMNS]
    node_fields = [field("id", "string", "Node id as written in the input."),
                   field("label", "string", "Display label.")]
    for column in _node_table(comparison, analyses).columns[2:]:
        measure, _, network = column.partition(":")
        kind = "integer" if measure in _WHOLE else "number"
        node_fields.append(field(column, kind, f"{measure} in {analyses[network].title}; empty "
                                 "where the node is not in that wave."))
    return [
        _resource(s, "statistics.csv", f"Series {s}: network statistics per wave",
                  [field("statistic", "string", "Statistic name; see methods.html."), *waves]),
        _resource(s, "ties.csv", f"Series {s}: tie change between consecutive waves", [
            field("from", "string", "Network id of the earlier wave."),
            field("to", "string", "Network id of the later wave."),
            field("kept", "integer", "Ties in both waves."),
            field("added", "integer", "Ties only in the later wave."),
            field("dropped", "integer", "Ties only in the earlier wave."),
            field("jaccard", "number", "Kept ties divided by the ties of either wave.")]),
        _resource(s, "nodes.csv", f"Series {s}: node measures per wave", node_fields),
        _resource(s, "community_flow.csv", f"Series {s}: community flow between waves", [
            field("from_network", "string", "Network id of the earlier wave."),
            field("from_community", "integer", "Community in the earlier wave."),
            field("to_network", "string", "Network id of the later wave."),
            field("to_community", "integer", "Community in the later wave."),
            field("members", "integer", "Nodes present in both waves that moved so.")]),
    ]
