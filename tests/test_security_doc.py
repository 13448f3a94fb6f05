"""SECURITY.md names the test that holds each protection: every name it gives must be a test."""

from __future__ import annotations

import ast
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
# `tests/file.py::name` names a file and a test; a following `::name` is another test of it.
_REFERENCE = re.compile(r"`(?:(tests/[\w/]+\.py))?(?:::(\w+))?`")


def _tests_of(path: Path) -> set[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    return {node.name for node in ast.walk(tree)
            if isinstance(node, ast.FunctionDef) and node.name.startswith("test_")}


def test_every_test_security_md_names_exists() -> None:
    text = (ROOT / "SECURITY.md").read_text(encoding="utf-8")
    named: list[tuple[str, str]] = []
    current = None
    for file, name in _REFERENCE.findall(text):
        current = file or current
        if name:
            assert current is not None, name
            named.append((current, name))
        elif file:
            assert (ROOT / file).is_file(), file
    assert len(named) > 60
    missing = [f"{file}::{name}" for file, name in named if name not in _tests_of(ROOT / file)]
    assert missing == []
