"""The bundle's files/datapackage.json: the full report's descriptor, saying how each column
was protected, with ``missingValues`` stated so an empty cell reads as missing everywhere."""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any

from .protect import other_group

__all__ = ["partner_datapackage"]

MISSING_VALUES = [""]  # how nodes.csv and statistics.csv write a missing value


def _describe_field(field: dict[str, Any], *, pseudonymized: bool, grouped: set[str],
                    min_group: int) -> None:
    name = field["name"]
    if name == "id":
        field["description"] = ("Code standing for the node, made from its id with the study's "
                                "secret key (HMAC-SHA-256)." if pseudonymized else
                                "Node id as written in the input.")
    elif name == "label":
        field["description"] = ("The node's code: names are not shared." if pseudonymized else
                                field.get("description", "Display label."))
    elif name in grouped:
        field["description"] = (f"{field.get('description', '')} Groups of fewer than "
                                f"{min_group} nodes are merged into \"{other_group(min_group)}\"."
                                ).strip()
    elif name in ("source", "target") and pseudonymized:
        field["description"] = "Code of the node (as in nodes.csv)."


def partner_datapackage(descriptor: bytes, *, pseudonymized: bool,
                        grouped: Mapping[str, set[str]], min_group: int) -> bytes:
    """Rewrite the descriptor for a bundle. ``grouped`` maps a nodes resource name
    (``<id>-nodes``) to its text attributes, whose small groups were merged."""
    package = json.loads(descriptor)
    package["description"] = ("Partner copy of the study's tables: identities protected as "
                              "sharing.html describes.")
    for resource in package["resources"]:
        schema = resource["schema"]
        schema["missingValues"] = list(MISSING_VALUES)
        for field in schema["fields"]:
            _describe_field(field, pseudonymized=pseudonymized,
                            grouped=grouped.get(resource["name"], set()), min_group=min_group)
    return (json.dumps(package, indent=2, ensure_ascii=False) + "\n").encode("utf-8")
