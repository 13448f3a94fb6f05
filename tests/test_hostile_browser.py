"""The site of a study full of hostile text (tests/test_hostile_input.py) in a real browser:
every page opened from disk, the search box and the explorable map used, and no script of the
text's ever runs (it would open a dialog) nor breaks the pages' own."""

from __future__ import annotations

from pathlib import Path

import pytest
from browsing import chromium_session, require_chromium
from test_hostile_input import _hostile_study

from generator.build import build_study

pytestmark = pytest.mark.browser

require_chromium()
sync_api = pytest.importorskip("playwright.sync_api",
                               reason="needs Playwright for Python (pip install -e '.[test]')")


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    study = _hostile_study(tmp_path_factory.mktemp("hostile-browser") / "study")
    return build_study(study).output


browser = pytest.fixture(scope="module")(chromium_session)


def test_no_page_runs_the_hostile_text_as_script(site: Path, browser) -> None:
    page = browser.new_page()
    page.set_default_timeout(15000)
    dialogs: list[str] = []
    errors: list[str] = []
    page.on("dialog", lambda dialog: (dialogs.append(dialog.message), dialog.dismiss()))
    page.on("pageerror", lambda error: errors.append(str(error)))
    pages = sorted(site.rglob("*.html"))
    assert len(pages) > 8
    for path in pages:
        page.goto(path.as_uri())
        page.wait_for_load_state("load")
        search = page.locator("#site-search-input")
        search.fill("quennell")  # every label that holds hostile text, listed as results
        page.wait_for_timeout(50)
        if path.relative_to(site).as_posix() == "index.html":
            results = page.locator(".site-search-results a")
            assert results.count() >= 1
            assert "</script><script>alert(1)</script>Quennell" in results.first.inner_text()
    network = site / "networks" / "net" / "index.html"
    page.goto(network.as_uri())
    page.wait_for_load_state("load")
    finder = page.locator("#explore-find-net")
    finder.fill("marrowfield")
    finder.press("Enter")
    page.wait_for_timeout(100)
    assert page.locator(".explorer-labels text").count() >= 1  # the map drew its labels
    # Each payload would have opened a dialog (alert(1), alert(2), ...) had it run.
    assert dialogs == [] and errors == []
    page.close()
