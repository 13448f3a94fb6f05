"""The default theme's README names every template and static file, and the context fields it
lists for each page template are the fields the template really receives."""

from __future__ import annotations

import dataclasses
import importlib
import re
from pathlib import Path

THEME = Path(__file__).resolve().parents[1] / "themes" / "default"
README = (THEME / "README.md").read_text("utf-8")
ROW = re.compile(r"^\| `([a-z_]+\.html)` \| [^|]+ \| `(\w+)` \(`render/(\w+)\.py`\) \| (.+) \|$",
                 re.M)


def test_every_template_and_static_file_is_documented():
    for folder in ("templates", "static"):
        for path in sorted((THEME / folder).iterdir()):
            assert f"`{path.name}`" in README, path.name


def test_the_fields_listed_for_each_page_template_are_its_context_fields():
    rows = ROW.findall(README)
    assert len(rows) >= 9
    for template, name, module, fields in rows:
        assert (THEME / "templates" / template).is_file(), template
        context = getattr(importlib.import_module(f"generator.render.{module}"), name)
        real = {field.name for field in dataclasses.fields(context)}
        listed = set(re.findall(r"`(\w+)`", fields))
        assert listed <= real, (template, listed - real)
        assert real - {"page"} <= listed, (template, real - {"page"} - listed)
