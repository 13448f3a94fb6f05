"""The downloads of a two-mode network: nodes.csv (with mode, degree and degree share),
edges.csv and statistics.csv, and their Data Package resources."""

from __future__ import annotations

from typing import Any

import pandas as pd

from ..analyse.two_mode import TwoModeAnalysis
from ..vocabulary import exact_text
from ..vocabulary.two_mode import TWO_MODE_COLUMNS, statistic_description
from .downloads import _csv, _field_type

__all__ = ["two_mode_files", "two_mode_resources"]


def _nodes(analysis: TwoModeAnalysis) -> pd.DataFrame:
    columns = ["id", "mode", "label", *analysis.attributes, "degree", "degree_share"]
    table: pd.DataFrame = analysis.nodes[columns].reset_index(drop=True)
    return table


def _edges(analysis: TwoModeAnalysis) -> pd.DataFrame:
    first, second = analysis.modes
    edges = analysis.edges.rename(columns={"first": first, "second": second})
    if "weight" in edges and (edges["weight"] % 1 == 0).all():
        edges = edges.assign(weight=edges["weight"].astype("int64"))
    result: pd.DataFrame = edges
    return result


def _statistics(analysis: TwoModeAnalysis) -> pd.DataFrame:
    rows = [(s.name, exact_text(s.value)) for s in analysis.statistics]
    table: pd.DataFrame = pd.DataFrame(rows, columns=["statistic", "value"])
    return table


def two_mode_files(analysis: TwoModeAnalysis) -> dict[str, bytes]:
    prefix = f"files/{analysis.network_id}/"
    return {prefix + "nodes.csv": _csv(_nodes(analysis)),
            prefix + "edges.csv": _csv(_edges(analysis)),
            prefix + "statistics.csv": _csv(_statistics(analysis))}


def _fields(frame: pd.DataFrame, described: dict[str, str]) -> list[dict[str, str]]:
    return [{"name": str(c), "type": _field_type(frame[c]), "description": described[str(c)]}
            for c in frame.columns]


def two_mode_resources(analysis: TwoModeAnalysis) -> list[dict[str, Any]]:
    """The Data Package resources of the two-mode network's three CSV files."""
    first, second = analysis.modes
    described = {"id": "Node id as written in the input; unique within its mode.",
                 "label": "Display label."}
    described |= {c: "Node attribute from the node list." for c in analysis.attributes}
    described |= {name: text(analysis.modes) for name, text in TWO_MODE_COLUMNS.items()}
    base = {"profile": "tabular-data-resource", "format": "csv", "mediatype": "text/csv",
            "encoding": "utf-8"}
    net = analysis.network_id
    edge_text = {first: f"Id of the tie's {first} node.", second: f"Id of the tie's {second} node.",
                 "weight": "Tie weight as written; repeated ties combined as the methods page "
                           "says."}
    return [
        {"name": f"{net}-nodes", "path": f"{net}/nodes.csv", **base,
         "title": f"{analysis.title}: nodes of both modes and their degrees",
         "schema": {"fields": _fields(_nodes(analysis), described),
                    "primaryKey": ["mode", "id"]}},
        {"name": f"{net}-edges", "path": f"{net}/edges.csv", **base,
         "title": f"{analysis.title}: cleaned ties, each from a {first} to a {second}",
         "schema": {"fields": _fields(_edges(analysis), edge_text)}},
        {"name": f"{net}-statistics", "path": f"{net}/statistics.csv", **base,
         "title": f"{analysis.title}: two-mode network statistics",
         "schema": {"fields": [
             {"name": "statistic", "type": "string",
              "description": "Statistic name: " + "; ".join(
                  f"{s.name}: {statistic_description(s.name, analysis.modes)}"
                  for s in analysis.statistics)},
             {"name": "value", "type": "number", "description": "Value; empty where not "
              "defined."}]}},
    ]
