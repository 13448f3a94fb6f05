"""What the browser tests share: the Debian package's Chromium (Playwright's own browser
download is not used), the flags it runs with, and the example study built once per module.

A test module calls ``require_chromium()`` at import: in CI a missing browser is a failure, not a
silent skip; elsewhere the module is skipped with the command that installs it."""

from __future__ import annotations

import os
import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest

from generator.build import build_study

CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
                 "--disable-component-update", "--no-first-run", "--disable-sync"]
EXAMPLE = Path(__file__).resolve().parents[1] / "example_project"


def require_chromium() -> None:
    if not CHROMIUM.exists() and os.environ.get("CI"):
        raise RuntimeError("CI needs Chromium at /usr/bin/chromium for the browser tests")
    if not CHROMIUM.exists():
        pytest.skip("needs Chromium at /usr/bin/chromium (apt-get install chromium)",
                    allow_module_level=True)


def build_example(work: Path) -> Path:
    """The example study copied into ``work`` (without its site or cache) and built there."""
    study = shutil.copytree(EXAMPLE, work / "example",
                            ignore=shutil.ignore_patterns("output", ".netfolio-*", "bundles"))
    return build_study(study, output=work / "site").output


def launch(playwright):  # type: ignore[no-untyped-def]
    return playwright.chromium.launch(executable_path=str(CHROMIUM), args=CHROMIUM_ARGS)


def chromium_session() -> Iterator[object]:
    """One Chromium for a test module: ``browser = pytest.fixture(scope="module")(
    chromium_session)``."""
    from playwright import sync_api

    with sync_api.sync_playwright() as playwright:
        chromium = launch(playwright)
        yield chromium
        chromium.close()
