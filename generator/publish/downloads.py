"""The downloadable files of one network: nodes.csv, edges.csv, statistics.csv, network.graphml,
and the Frictionless Data Package descriptor of every CSV."""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from typing import Any

import networkx as nx
import pandas as pd

from ..analyse import MixingTable, NetworkAnalysis, PathSampling
from ..analyse.across import StudyTable
from ..vocabulary import (
    COMMUNITY,
    COMMUNITY_CONFIDENCE,
    ESTIMATE_COLUMNS,
    PATH_MEASURES,
    SIGNIFICANCE_COLUMNS,
    community_method,
    estimate_label,
    exact_text,
    measure,
)
from ..vocabulary.communities import community_columns
from ..vocabulary.mixing import mixing_csv_names
from .archive import ZipTime, zip_bytes
from .graphml import graphml_bytes

__all__ = ["ALL_DATA_SUFFIXES", "all_data_zip", "communities_csv", "datapackage_json", "edges_csv",
           "graphml", "has_estimates", "mixing_csv", "mixing_files", "network_files", "nodes_csv",
           "significance_csv", "statistic_estimate", "statistics_csv", "study_statistics_csv",
           "study_statistics_resource"]


def _csv(frame: pd.DataFrame) -> bytes:
    return frame.to_csv(index=False, lineterminator="\n").encode("utf-8")


def node_table(analysis: NetworkAnalysis) -> pd.DataFrame:
    """id, label, node attributes, then the measures, one row per node in node order."""
    table = analysis.nodes.join(analysis.measures)
    table.insert(0, "id", table.index.astype(str))
    ordered: pd.DataFrame = table.reset_index(drop=True)
    return ordered


def nodes_csv(analysis: NetworkAnalysis) -> bytes:
    return _csv(node_table(analysis))


def edges_csv(analysis: NetworkAnalysis) -> bytes:
    edges = analysis.edges
    if "weight" in edges and (edges["weight"] % 1 == 0).all():
        edges = edges.assign(weight=edges["weight"].astype("int64"))  # counts as written: 4, not 4.0
    return _csv(edges)


def has_estimates(analysis: NetworkAnalysis) -> bool:
    """Whether some statistic of ``analysis`` is sampled or a bound (statistics.csv then has the
    columns of ESTIMATE_COLUMNS)."""
    return analysis.sampling is not None and any(s.estimate is not None
                                                 for s in analysis.statistics)


def _estimate_text(estimate: str | None, value: float | None, sampling: PathSampling | None
                   ) -> str:
    if value is None:
        return ""
    if sampling is None:
        return estimate_label(None, sources=0, seed=0)
    return estimate_label(estimate, sources=sampling.sources, seed=sampling.seed)


def statistic_estimate(analysis: NetworkAnalysis, name: str) -> tuple[str, str]:
    """(standard error, how it was found) of one statistic, as statistics.csv writes them;
    ("", "") when ``analysis`` has no such statistic."""
    found = next((st for st in analysis.statistics if st.name == name), None)
    if found is None:
        return "", ""
    return (exact_text(found.standard_error),
            _estimate_text(found.estimate, found.value, analysis.sampling))


def statistics_csv(analysis: NetworkAnalysis) -> bytes:
    """statistic, value; with standard_error and estimate when some statistic is estimated."""
    if not has_estimates(analysis):
        rows = [(s.name, exact_text(s.value)) for s in analysis.statistics]
        return _csv(pd.DataFrame(rows, columns=["statistic", "value"]))
    wide = [(s.name, exact_text(s.value), exact_text(s.standard_error),
             _estimate_text(s.estimate, s.value, analysis.sampling)) for s in analysis.statistics]
    return _csv(pd.DataFrame(wide, columns=["statistic", "value",
                                            *(name for name, _ in ESTIMATE_COLUMNS)]))


def _study_columns(table: StudyTable) -> list[tuple[str, str, str]]:
    """(column, statistic, part) in order: each statistic's value, then, when some network's
    value of it is estimated, its standard error (if any has one) and how it was found."""
    columns = []
    for name in table.statistics:
        columns.append((name, name, "value"))
        if table.estimates and table.estimated(name):
            if table.has_error(name):
                columns.append((f"{name}_standard_error", name, "standard_error"))
            columns.append((f"{name}_estimate", name, "estimate"))
    return columns


def study_statistics_csv(table: StudyTable) -> bytes:
    """One row per network (its id and title), one column per statistic at full precision;
    empty where the statistic is not defined for the network or does not apply to it. A
    statistic some network estimates is followed by its standard error and how it was found."""
    columns = _study_columns(table)
    rows = []
    for i, (net, title, values) in enumerate(zip(table.networks, table.titles, table.values)):
        row = [net, title]
        for _, name, part in columns:
            j = table.statistics.index(name)
            if part == "value":
                row.append(exact_text(values[j]))
            elif part == "standard_error":
                row.append(exact_text(table.errors[i][j]))
            else:
                row.append(_estimate_text(table.estimates[i][j], values[j], table.sampling[i]))
        rows.append(row)
    return _csv(pd.DataFrame(rows, columns=["network", "title", *(c for c, _, _ in columns)]))


def study_statistics_resource(table: StudyTable, path: str) -> dict[str, Any]:
    """The Data Package resource of ``study_statistics_csv``; ``path`` relative to files/."""
    fields = [{"name": "network", "type": "string", "description": "Network id."},
              {"name": "title", "type": "string", "description": "Network title."}]
    described = dict(ESTIMATE_COLUMNS)
    for column, name, part in _study_columns(table):
        if part == "value":
            text = (f"Statistic {name} (see methods.html); empty where not defined for the "
                    "network or not applicable to it.")
            if table.estimates and table.estimated(name):
                text += f" Estimated or a bound where {name}_estimate says so."
            fields.append({"name": column, "type": "number", "description": text})
        else:
            fields.append({"name": column, "type": "number" if part == "standard_error"
                           else "string", "description": f"Of {name}: {described[part]}."})
    return {"name": "study-statistics", "path": path, "profile": "tabular-data-resource",
            "format": "csv", "mediatype": "text/csv", "encoding": "utf-8",
            "title": "Every network's statistics, one row per network",
            "schema": {"fields": fields, "primaryKey": ["network"]}}


def significance_csv(analysis: NetworkAnalysis) -> bytes:
    """One row per statistic tested against rewired networks, at full precision."""
    rows = [(t.statistic, exact_text(t.observed), exact_text(t.null_mean), exact_text(t.null_sd),
             exact_text(t.z), exact_text(t.p), str(t.samples))
            for t in analysis.significance.tests]
    return _csv(pd.DataFrame(rows, columns=[name for name, _ in SIGNIFICANCE_COLUMNS]))


def mixing_files(analysis: NetworkAnalysis) -> dict[str, MixingTable]:
    """The file name of each mixing matrix (``mixing-<attribute>.csv``) and its table."""
    names = mixing_csv_names(analysis.attributes)
    return {names[t.attribute]: t for t in analysis.mixing}


def mixing_csv(table: MixingTable) -> bytes:
    """The mixing matrix: one row per group (the first column names it), one column per group;
    directed: rows send, columns receive; undirected: symmetric."""
    frame = pd.DataFrame([list(row) for row in table.counts], columns=list(table.groups))
    frame.insert(0, table.attribute, list(table.groups))
    return _csv(frame)


def _mixing_resource(a: NetworkAnalysis, file: str, table: MixingTable) -> dict[str, Any]:
    cell = ("Ties from the row's group to this group." if table.directed else
            "Ties between the row's group and this group (symmetric; a tie inside a group is "
            "counted once on the diagonal).")
    fields = [{"name": table.attribute, "type": "string",
               "description": f"Group of the node attribute {table.attribute!r}"
               + (" (the sending end)." if table.directed else ".")}]
    fields += [{"name": g, "type": "integer", "description": cell} for g in table.groups]
    return {"name": f"{a.network_id}-{file.removesuffix('.csv')}".lower(),
            "path": f"{a.network_id}/{file}", "profile": "tabular-data-resource",
            "format": "csv", "mediatype": "text/csv", "encoding": "utf-8",
            "title": f"{a.title}: mixing matrix of {table.attribute}",
            "schema": {"fields": fields}}
def _community_columns(analysis: NetworkAnalysis) -> tuple[tuple[str, str], ...]:
    return community_columns(with_confidence=analysis.stability.ran)


def communities_csv(analysis: NetworkAnalysis) -> bytes:
    """One row per community of the kept partition, at full precision."""
    names = [name for name, _ in _community_columns(analysis)]
    rows = []
    for p in analysis.community_profiles:
        row = [str(p.community), str(p.size), str(p.internal), str(p.external),
               exact_text(p.density), exact_text(p.conductance)]
        if "confidence" in names:
            row.append(exact_text(p.confidence))
        rows.append(row)
    return _csv(pd.DataFrame(rows, columns=names))


def _communities_resource(a: NetworkAnalysis) -> dict[str, Any]:
    types = {"community": "integer", "size": "integer", "internal_ties": "integer",
             "external_ties": "integer"}
    return {"name": f"{a.network_id}-communities", "path": f"{a.network_id}/communities.csv",
            "profile": "tabular-data-resource", "format": "csv", "mediatype": "text/csv",
            "encoding": "utf-8", "title": f"{a.title}: one row per community",
            "schema": {"fields": [
                {"name": name, "type": types.get(name, "number"),
                 "description": text[0].upper() + text[1:] + "."}
                for name, text in _community_columns(a)], "primaryKey": ["community"]}}


def _significance_resource(a: NetworkAnalysis) -> dict[str, Any]:
    types = {"statistic": "string", "samples": "integer"}
    return {"name": f"{a.network_id}-significance", "path": f"{a.network_id}/significance.csv",
            "profile": "tabular-data-resource", "format": "csv", "mediatype": "text/csv",
            "encoding": "utf-8",
            "title": f"{a.title}: statistics against {a.significance.samples} rewired networks",
            "schema": {"fields": [
                {"name": name, "type": types.get(name, "number"),
                 "description": text[0].upper() + text[1:] + "."}
                for name, text in SIGNIFICANCE_COLUMNS]}}


def _plain_value(value: object) -> object | None:
    """A value GraphML can hold, or None for a missing one (left out of the file)."""
    if value is None or value is pd.NA or (isinstance(value, float) and math.isnan(value)):
        return None
    if hasattr(value, "item"):  # numpy scalar
        value = value.item()
    return value


def graphml(analysis: NetworkAnalysis) -> bytes:
    """network.graphml: the nodes with their attributes and measures, the ties with their
    weights (written column by column; see ``graphml.py``)."""
    table = node_table(analysis)
    if table.columns.is_unique:
        return graphml_bytes(table, analysis.edges, directed=analysis.directed,
                             title=analysis.title)
    return networkx_graphml(analysis)


def networkx_graphml(analysis: NetworkAnalysis) -> bytes:
    """network.graphml as networkx writes it (the reference ``graphml_bytes`` is held to, and
    the writer when two node columns share a name: networkx keeps the last)."""
    graph = nx.DiGraph() if analysis.directed else nx.Graph()
    graph.graph["title"] = analysis.title
    for row in node_table(analysis).to_dict("records"):
        node = row.pop("id")
        data = {str(k): v for k, v in ((k, _plain_value(v)) for k, v in row.items())
                if v is not None}
        graph.add_node(node, **data)
    for row in analysis.edges.to_dict("records"):
        extra = {"weight": float(row["weight"])} if "weight" in row else {}
        graph.add_edge(row["source"], row["target"], **extra)
    return ("\n".join(nx.generate_graphml(graph)) + "\n").encode("utf-8")


def _field_type(series: pd.Series) -> str:
    if pd.api.types.is_integer_dtype(series.dtype):
        return "integer"
    if pd.api.types.is_numeric_dtype(series.dtype):
        return "number"
    return "string"


def _measure_description(name: str, analysis: NetworkAnalysis) -> str:
    if name == COMMUNITY:
        c = analysis.communities
        return (f"Community from {community_method(c.method).title} (resolution "
                f"{c.resolution:g}, best of {c.runs} seeded runs, seed {c.seed}); 1 is the "
                "largest.")
    entry = measure(name)
    text = f"{entry.title}: {entry.definition}"
    if name == COMMUNITY_CONFIDENCE:
        s = analysis.stability
        text += (f" Over {s.perturbations} reruns, each removing {s.removed} ties "
                 f"(share {s.share:g}), seeds from the study seed {s.seed}.")
    if analysis.sampling and name in PATH_MEASURES:
        text += (f" Estimated from {analysis.sampling.sources} sampled source nodes of "
                 f"{analysis.sampling.nodes} (Brandes & Pich 2007), seed {analysis.sampling.seed}.")
    return text


def _fields(frame: pd.DataFrame, described: dict[str, str]) -> list[dict[str, str]]:
    return [{"name": c, "type": _field_type(frame[c]), "description": described.get(c, "")}
            for c in frame.columns]


def _statistics_fields(analysis: NetworkAnalysis) -> list[dict[str, str]]:
    fields = [{"name": "statistic", "type": "string",
               "description": "Statistic name; see methods.html."},
              {"name": "value", "type": "number",
               "description": "Value; empty where not defined."}]
    if has_estimates(analysis):
        fields[1]["description"] = ("Value; empty where not defined; an estimate or a lower "
                                    "bound where the estimate column says so.")
        fields += [{"name": name, "type": "number" if name == "standard_error" else "string",
                    "description": text[0].upper() + text[1:] + "."}
                   for name, text in ESTIMATE_COLUMNS]
    return fields


def datapackage_json(analyses: list[NetworkAnalysis], *, title: str,
                     extra: list[dict[str, Any]] | None = None) -> bytes:
    """A Frictionless Data Package descriptor (https://specs.frictionlessdata.io/) for every CSV;
    ``extra`` resources (those of two-mode networks) come first."""
    resources = list(extra or [])
    for a in analyses:
        nodes = node_table(a)
        described = {"id": "Node id as written in the input.", "label": "Display label."}
        described |= {c: "Node attribute from the node list." for c in a.attributes}
        described |= {c: _measure_description(c, a) for c in a.measures.columns}
        meaning = "strength" if a.weight_means == "strength" else "distance"
        weight_text = (f"Tie weight as written, read as a {meaning}; repeated ties combined as "
                       "the methods page says.")
        resources += [
            {"name": f"{a.network_id}-nodes", "path": f"{a.network_id}/nodes.csv",
             "profile": "tabular-data-resource", "format": "csv", "mediatype": "text/csv",
             "encoding": "utf-8",
             "title": f"{a.title}: nodes and measures",
             "schema": {"fields": _fields(nodes, described), "primaryKey": ["id"]}},
            {"name": f"{a.network_id}-edges", "path": f"{a.network_id}/edges.csv",
             "profile": "tabular-data-resource", "format": "csv", "mediatype": "text/csv",
             "encoding": "utf-8",
             "title": f"{a.title}: cleaned ties" + (" (directed: source to target)"
                                                   if a.directed else ""),
             "schema": {"fields": _fields(a.edges, {"source": "Node id.", "target": "Node id.",
                                                    "weight": weight_text})}},
            {"name": f"{a.network_id}-statistics", "path": f"{a.network_id}/statistics.csv",
             "profile": "tabular-data-resource", "format": "csv", "mediatype": "text/csv",
             "encoding": "utf-8", "title": f"{a.title}: network statistics",
             "schema": {"fields": _statistics_fields(a)}},
        ]
        resources.append(_communities_resource(a))
        if a.significance.tests:
            resources.append(_significance_resource(a))
        resources += [_mixing_resource(a, file, table) for file, table in mixing_files(a).items()]
    descriptor = {"profile": "tabular-data-package", "name": "netfolio-study", "title": title,
                  "resources": resources}
    return (json.dumps(descriptor, indent=2, ensure_ascii=False) + "\n").encode("utf-8")


def network_files(analysis: NetworkAnalysis) -> dict[str, bytes]:
    """Every download of one network, keyed by its path under files/<id>/."""
    prefix = f"files/{analysis.network_id}/"
    files = {
        prefix + "nodes.csv": nodes_csv(analysis),
        prefix + "edges.csv": edges_csv(analysis),
        prefix + "statistics.csv": statistics_csv(analysis),
        prefix + "network.graphml": graphml(analysis),
        prefix + "communities.csv": communities_csv(analysis),
    }
    if analysis.significance.tests:
        files[prefix + "significance.csv"] = significance_csv(analysis)
    for file, table in mixing_files(analysis).items():
        files[prefix + file] = mixing_csv(table)
    return files


ALL_DATA_SUFFIXES = (".csv", ".graphml", "datapackage.json")


def all_data_zip(files: Mapping[str, bytes], *, date_time: ZipTime) -> bytes:
    """Every CSV and GraphML file under ``files/`` and the Data Package descriptor, as one
    deterministic zip laid out as ``files/`` is (so the descriptor's paths hold inside it)."""
    members = {path.removeprefix("files/"): data for path, data in files.items()
               if path.startswith("files/") and path.endswith(ALL_DATA_SUFFIXES)}
    return zip_bytes(members, date_time=date_time)
