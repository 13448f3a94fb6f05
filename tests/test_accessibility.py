"""Every kind of page in a real browser, as a reader meets it: axe-core finds no serious or
critical violation of WCAG rules, in the light and the dark scheme; at phone width (390 px) no
page scrolls sideways except inside a marked table container; screenshots at 390 and 1440 px
are written for a person to look at.

axe-core is the copy that the axe-playwright-python package ships (Deque Systems, "axe-core:
accessibility engine for automated Web UI testing"). Headless Chromium from the Debian package.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from browsing import build_example, chromium_session, require_chromium

pytestmark = pytest.mark.browser

require_chromium()
sync_api = pytest.importorskip("playwright.sync_api")
axe_module = pytest.importorskip("axe_playwright_python.sync_playwright")

# One page of every kind the site has.
PAGE_KINDS = {
    "front": "index.html",
    "network": "networks/advice/index.html",
    "nodes": "networks/advice/nodes.html",
    "node": "networks/advice/nodes/node-10.html",
    "undirected-network": "networks/coworking/index.html",
    "methods": "methods.html",
    "checks": "checks.html",
    "downloads": "downloads.html",
    "note": "notes/methods.html",
    "communities": "networks/advice/communities.html",
    "waves": "compare/advice.html",
    "two-mode": "networks/training/index.html",
    "relations": "compare/advice-and-coworking.html",
}
SERIOUS = {"serious", "critical"}
# Elements allowed to scroll sideways on a phone: they say so (a focusable region) themselves.
SIDEWAYS_OK = ".table-scroll, .explorer-stage, pre"


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return build_example(tmp_path_factory.mktemp("a11y"))


@pytest.fixture(scope="module")
def artifacts(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = Path(os.environ.get("NETFOLIO_SCREENSHOTS") or tmp_path_factory.mktemp("screenshots"))
    folder.mkdir(parents=True, exist_ok=True)
    print(f"\nscreenshots: {folder}")
    return folder


browser = pytest.fixture(scope="module")(chromium_session)


def _open(browser, path: Path, *, width: int, scheme: str):
    page = browser.new_page(viewport={"width": width, "height": 900}, color_scheme=scheme)
    errors: list[str] = []
    page.on("console", lambda m: errors.append(m.text) if m.type == "error" else None)
    page.on("pageerror", lambda e: errors.append(str(e)))
    page.goto(path.as_uri())
    page.wait_for_load_state("load")
    return page, errors


@pytest.mark.parametrize("scheme", ["light", "dark"])
@pytest.mark.parametrize("kind", sorted(PAGE_KINDS))
def test_axe_finds_no_serious_violation(site: Path, browser, kind: str, scheme: str) -> None:
    page, errors = _open(browser, site / PAGE_KINDS[kind], width=1280, scheme=scheme)
    try:
        if kind == "network":  # the map's panel holds a picked node, as a reader would see it
            page.locator("#explore .explorer-find input").fill("s10")
            page.locator("#explore .explorer-find input").press("Enter")
            page.wait_for_timeout(200)
        assert errors == []  # before axe runs: it reads the stylesheet itself, which the policy refuses
        results = axe_module.Axe().run(page)
        serious = [(v["id"], v["impact"], [n["target"] for n in v["nodes"]][:3])
                   for v in results.response["violations"] if v["impact"] in SERIOUS]
        assert serious == [], results.generate_report()
    finally:
        page.close()


def test_the_dark_scheme_is_dark_and_the_light_one_light(site: Path, browser) -> None:
    colours = {}
    for scheme in ("light", "dark"):
        page, _ = _open(browser, site / "index.html", width=1280, scheme=scheme)
        colours[scheme] = page.evaluate("getComputedStyle(document.body).backgroundColor")
        page.close()
    def brightness(rgb: str) -> float:
        red, green, blue = (int(x) for x in rgb[rgb.index("(") + 1:-1].split(",")[:3])
        return (red + green + blue) / 3
    assert brightness(colours["light"]) > 200 > 60 > brightness(colours["dark"])


SIDEWAYS = f"""() => {{
  const root = document.documentElement;
  const wide = [];
  for (const element of document.body.querySelectorAll("*")) {{
    if (element.closest("{SIDEWAYS_OK}")) continue;
    const box = element.getBoundingClientRect();
    if (box.width > 0 && box.right > root.clientWidth + 1) {{
      wide.push(element.tagName + "." + element.className);
    }}
  }}
  return [root.scrollWidth - root.clientWidth, wide.slice(0, 5)];
}}"""


# Chromium refuses to capture one image much taller than this (its texture limit); a longer
# page is captured from the top down to this height.
SCREENSHOT_MAX_HEIGHT = 12000


def _screenshot(page, path: Path) -> None:  # type: ignore[no-untyped-def]
    height = page.evaluate("() => document.documentElement.scrollHeight")
    if height <= SCREENSHOT_MAX_HEIGHT:
        page.screenshot(path=str(path), full_page=True)
    else:
        width = page.viewport_size["width"]
        page.screenshot(path=str(path), full_page=True,
                        clip={"x": 0, "y": 0, "width": width, "height": SCREENSHOT_MAX_HEIGHT})


@pytest.mark.parametrize("kind", sorted(PAGE_KINDS))
def test_no_page_scrolls_sideways_on_a_phone(site: Path, browser, artifacts: Path, kind: str
                                              ) -> None:
    for width in (390, 1440):
        page, errors = _open(browser, site / PAGE_KINDS[kind], width=width, scheme="light")
        try:
            if width == 390:
                overflow, wide = page.evaluate(SIDEWAYS)
                assert overflow <= 0 and wide == [], (kind, overflow, wide)
            _screenshot(page, artifacts / f"{kind}-{width}.png")
            assert errors == []
        finally:
            page.close()


def test_the_node_table_keeps_its_header_and_first_column_in_view_and_says_it_scrolls(
        site: Path, browser) -> None:
    page, errors = _open(browser, site / PAGE_KINDS["nodes"], width=390, scheme="light")
    try:
        box = page.locator(".table-scroll.pinned")
        assert page.locator(".scroll-hint").count() == 1  # wider than a phone: it says so
        header = page.locator("#node-table thead th").first
        first_cell = page.locator("#node-table tbody tr").nth(30).locator("th")
        box.scroll_into_view_if_needed()
        box.evaluate("box => { box.scrollTop = 600; box.scrollLeft = 400; }")
        page.wait_for_timeout(100)
        # Scrolled down inside its box, the header row sits at the top of the box.
        assert abs(header.bounding_box()["y"] - box.bounding_box()["y"]) < 2
        first_cell.scroll_into_view_if_needed()
        box.evaluate("box => { box.scrollLeft = 400; }")
        left = box.bounding_box()["x"]
        assert abs(first_cell.bounding_box()["x"] - left) < 2  # the id column stays at the left
        assert errors == []
    finally:
        page.close()
    wide, _ = _open(browser, site / "checks.html", width=1440, scheme="light")
    try:
        assert wide.locator(".scroll-hint").count() == 0  # nothing to say when everything fits
    finally:
        wide.close()
