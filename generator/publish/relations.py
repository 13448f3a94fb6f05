"""The downloads of one comparison of relations, under ``files/relations/<id>/``: every pair's
overlap and QAP test, and the MRQAP model when one was asked for; with their Data Package
resources."""

from __future__ import annotations

from typing import Any

import pandas as pd

from ..analyse.compare import RelationsComparison
from ..vocabulary import exact_text

__all__ = ["MODEL_FILE", "PAIRS_FILE", "relation_file_names", "relation_files",
           "relation_resources"]

PAIRS_FILE = "pairs.csv"
MODEL_FILE = "model.csv"
R_SQUARED = "r_squared"  # the model.csv row holding R² in its coefficient column


def _csv(frame: pd.DataFrame) -> bytes:
    return frame.to_csv(index=False, lineterminator="\n").encode("utf-8")


def _text(value: float | None) -> str:
    return "" if value is None else exact_text(value)


def relation_file_names(comparison: RelationsComparison) -> tuple[str, ...]:
    """The files written for ``comparison``: pairs.csv, and model.csv when a model ran."""
    return (PAIRS_FILE, MODEL_FILE) if comparison.model is not None else (PAIRS_FILE,)


def relation_files(comparison: RelationsComparison) -> dict[str, bytes]:
    prefix = f"files/relations/{comparison.relation}/"
    pairs = pd.DataFrame(
        [(p.network_a, p.network_b, _text(p.jaccard), _text(p.qap.correlation), _text(p.qap.p),
          p.qap.permutations) for p in comparison.pairs],
        columns=["network_a", "network_b", "jaccard", "qap_correlation", "qap_p", "permutations"])
    files = {prefix + PAIRS_FILE: _csv(pairs)}
    model = comparison.model
    if model is not None:
        rows = [(t.term, _text(t.coefficient), _text(t.std_coefficient), _text(t.p),
                 model.permutations if t.p is not None else "") for t in model.terms]
        rows.append((R_SQUARED, _text(model.r_squared), "", "", ""))
        files[prefix + MODEL_FILE] = _csv(pd.DataFrame(
            rows, columns=["term", "coefficient", "std_coefficient", "p", "permutations"]))
    return files


def relation_resources(comparison: RelationsComparison, title: str) -> list[dict[str, Any]]:
    rel = comparison.relation

    def field(name: str, kind: str, description: str) -> dict[str, str]:
        return {"name": name, "type": kind, "description": description}

    def resource(name: str, what: str, fields: list[dict[str, str]]) -> dict[str, Any]:
        return {"name": f"relations-{rel}-{name.removesuffix('.csv')}",
                "path": f"relations/{rel}/{name}", "profile": "tabular-data-resource",
                "format": "csv", "mediatype": "text/csv", "encoding": "utf-8",
                "title": f"{title}: {what}", "schema": {"fields": fields}}

    found = [resource(PAIRS_FILE, "tie overlap and QAP correlation of each pair", [
        field("network_a", "string", "Network id of the first network."),
        field("network_b", "string", "Network id of the second network."),
        field("jaccard", "number", "Ties in both divided by ties in either; empty when "
              "neither has ties."),
        field("qap_correlation", "number", "Pearson correlation of the tie values over the "
              "pairs of distinct nodes; empty when one network has no variation."),
        field("qap_p", "number", "Two-sided p-value against permutations of the node labels, "
              "(k + 1) / (permutations + 1)."),
        field("permutations", "integer", "Node-label permutations behind qap_p.")])]
    if comparison.model is not None:
        found.append(resource(MODEL_FILE, f"MRQAP model of {comparison.model.outcome}", [
            field("term", "string", "intercept, a predictor network id, same:<attribute>, "
                  "difference:<attribute>; the last row, r_squared, holds R² in coefficient."),
            field("coefficient", "number", "Least-squares coefficient over the pairs of "
                  "distinct nodes (R² on the r_squared row)."),
            field("std_coefficient", "number", "Coefficient times the term's standard "
                  "deviation over the outcome's; empty for the intercept."),
            field("p", "number", "p-value by double semi-partialling permutations, "
                  "(k + 1) / (permutations + 1); empty for the intercept."),
            field("permutations", "integer", "Permutations behind p.")]))
    return found
