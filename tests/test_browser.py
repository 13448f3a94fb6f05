"""The built site in a real browser, opened from disk: the Content-Security-Policy lets the site's
own stylesheet, script and figures through, and nothing in a note runs as script.

Headless Chromium from the Debian package, driven by Playwright (the browser download of
Playwright is not used). CI installs both (.ci/run, the test extra); without them this module
is skipped.
"""

from __future__ import annotations

import re
from collections.abc import Iterator
from pathlib import Path

import pytest
from browsing import build_example, chromium_session, require_chromium

from generator.build import build_study

pytestmark = pytest.mark.browser

require_chromium()
sync_api = pytest.importorskip("playwright.sync_api",
                               reason="needs Playwright for Python (pip install -e '.[test]')")

THEME_CSS = Path(__file__).resolve().parents[1] / "themes" / "default" / "static" / "site.css"
PAGES = ["index.html", "networks/advice/index.html", "networks/advice/nodes.html",
         "methods.html", "checks.html", "downloads.html", "notes/methods.html"]
# The four spellings of a javascript: link from the issue, each hidden from a plain text match.
ENCODED_LINKS = ["[one](&#106;avascript:alert(1))", "[two](javascript&#58;alert(2))",
                 "[three](java&#x09;script:alert(3))", "[four](java&#10;script:alert(4))"]
# With [site] allow_html = true the author's HTML is kept as written; the policy stops it running.
RAW_SCRIPT = ('<script>alert("inline")</script>\n\n'
              '<p><img src="missing.png" onerror="alert(\'onerror\')" alt="raw image">\n'
              '<a id="raw-link" href="javascript:alert(\'raw\')">raw link</a>\n'
              '<a id="raw-click" href="#" onclick="alert(\'onclick\')">raw handler</a></p>\n')

# Records every policy violation, from the first byte of each page on (an init script runs
# outside the page's policy).
WATCH_VIOLATIONS = """
window.__violations = [];
document.addEventListener("securitypolicyviolation", (event) => {
  window.__violations.push(event.violatedDirective + " " + (event.blockedURI || "inline"));
});
"""
# Waits (at most 10 s) for every figure, scrolling each into view: they load lazily.
LOAD_FIGURES = """
async () => {
  const images = Array.from(document.querySelectorAll("figure img"));
  for (const image of images) {
    image.scrollIntoView();
    const timeout = new Promise((resolve) => setTimeout(resolve, 10000));
    await Promise.race([image.decode().catch(() => null), timeout]);
  }
  return images.map((image) => [image.getAttribute("src"), image.naturalWidth]);
}
"""
UNSAFE_ADDRESSES = """
() => {
  const protocol = (address) => new URL(address, location).protocol;
  const links = Array.from(document.querySelectorAll("a"))
    .filter((a) => ["javascript:", "data:", "vbscript:"].includes(protocol(a.href)))
    .map((a) => a.outerHTML);
  const images = Array.from(document.images)
    .filter((image) => image.src && protocol(image.src) !== "file:")
    .map((image) => image.outerHTML);
  return links.concat(images);
}
"""


def _write_study(root: Path, note: str, *, allow_html: bool = False) -> Path:
    (root / "data").mkdir(parents=True)
    (root / "notes").mkdir()
    (root / "data" / "ties.csv").write_text("source,target\na,b\nb,c\nc,a\n", encoding="utf-8")
    (root / "notes" / "links.md").write_text(note, encoding="utf-8")
    site = "\n[site]\nallow_html = true\n" if allow_html else ""
    (root / "study.toml").write_text('[study]\ntitle = "Links"\n\n[[network]]\nid = "ties"\n'
                                     f'edges = "data/ties.csv"\n{site}', encoding="utf-8")
    return root


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return build_example(tmp_path_factory.mktemp("browser"))


@pytest.fixture(scope="module")
def note_sites(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    """A study whose note holds the encoded links (and an outside image), built twice: with raw
    HTML escaped, and with allow_html and raw script added."""
    work = tmp_path_factory.mktemp("notes")
    links = "# Links\n\n" + "\n\n".join(ENCODED_LINKS) + "\n\n![outside](https://img.example.org/x.png)\n"
    built = {}
    for name, allow_html, note in (("escaped", False, links),
                                   ("allow_html", True, links + "\n" + RAW_SCRIPT)):
        study = _write_study(work / name, note, allow_html=allow_html)
        built[name] = build_study(study, output=work / f"{name}-site").output
    return built


browser = pytest.fixture(scope="module")(chromium_session)


class _Tab:
    """One page in the browser with what it reported: console errors and warnings, script
    errors, policy violations and dialogs (dismissed)."""

    def __init__(self, browser) -> None:
        self.page = browser.new_page()
        self.page.set_default_timeout(15000)
        self.console: list[str] = []
        self.dialogs: list[str] = []
        self.page.add_init_script(WATCH_VIOLATIONS)
        self.page.on("console", lambda message: self.console.append(
            f"{message.type}: {message.text}") if message.type in ("error", "warning") else None)
        self.page.on("pageerror", lambda error: self.console.append(f"pageerror: {error}"))
        self.page.on("dialog", self._dialog)

    def _dialog(self, dialog) -> None:
        self.dialogs.append(dialog.message)
        dialog.dismiss()

    def open(self, path: Path) -> None:
        self.page.goto(path.as_uri())
        self.page.wait_for_load_state("load")

    def violations(self) -> list[str]:
        return self.page.evaluate("window.__violations") + [
            line for line in self.console if "Content Security Policy" in line]


@pytest.fixture()
def tab(browser) -> Iterator[_Tab]:
    opened = _Tab(browser)
    yield opened
    opened.page.close()


def _paper_colour() -> str:
    """The theme's --paper colour as the browser reports a computed colour."""
    hex_colour = re.search(r"--paper:\s*#([0-9a-fA-F]{6})", THEME_CSS.read_text("utf-8")).group(1)
    red, green, blue = (int(hex_colour[i:i + 2], 16) for i in (0, 2, 4))
    return f"rgb({red}, {green}, {blue})"


@pytest.mark.parametrize("path", PAGES)
def test_a_page_opened_from_disk_breaks_no_rule_of_its_policy_and_has_its_stylesheet(
        site: Path, tab: _Tab, path: str) -> None:
    tab.open(site / path)
    tab.page.evaluate(LOAD_FIGURES)
    assert tab.violations() == []
    assert tab.console == []
    assert tab.page.evaluate("getComputedStyle(document.body).backgroundColor") == _paper_colour()


def test_the_policy_of_the_pages_is_in_force(site: Path, tab: _Tab) -> None:
    # 'self' must not be so wide that it admits inline script: the same policy on a page of the
    # site refuses it (and says so).
    tab.open(site / "index.html")
    tab.page.evaluate("""() => {
      const script = document.createElement("script");
      script.textContent = "window.__ran = true;";
      document.head.appendChild(script);
    }""")
    tab.page.wait_for_timeout(100)
    assert tab.page.evaluate("window.__ran === undefined")
    assert any("script-src" in violation for violation in tab.violations())


def test_clicking_a_column_heading_sorts_the_node_table(site: Path, tab: _Tab) -> None:
    tab.open(site / "networks/advice/nodes.html")
    headers = tab.page.locator("#node-table thead th")
    numeric = [i for i in range(headers.count())
               if headers.nth(i).get_attribute("data-type") == "number"][0]
    values = f"""() => Array.from(document.querySelectorAll("#node-table tbody tr"))
                 .map((row) => row.cells[{numeric}].getAttribute("data-value"))
                 .filter((value) => value !== null && value !== "").map(Number)"""
    before = tab.page.evaluate(values)
    headers.nth(numeric).locator("button.sort").click()
    first = tab.page.evaluate(values)
    assert first == sorted(before, reverse=True)  # numbers sort high to low first
    assert headers.nth(numeric).get_attribute("aria-sort") == "descending"
    headers.nth(numeric).locator("button.sort").click()
    assert tab.page.evaluate(values) == sorted(before)
    names = """() => Array.from(document.querySelectorAll("#node-table tbody tr"))
               .map((row) => row.cells[0].textContent.trim())"""
    headers.nth(0).locator("button.sort").click()
    ids = tab.page.evaluate(names)
    assert ids == sorted(ids, key=str.casefold) and len(ids) > 1


def test_the_networks_on_the_front_page_sort_by_a_statistic(site: Path, tab: _Tab) -> None:
    tab.open(site / "index.html")
    headers = tab.page.locator("#glance-table thead th")
    titles = [headers.nth(i).inner_text().strip() for i in range(headers.count())]
    density = titles.index("Density")
    values = f"""() => Array.from(document.querySelectorAll("#glance-table tbody tr"))
                 .map((row) => Number(row.cells[{density}].getAttribute("data-value")))"""
    before = tab.page.evaluate(values)
    headers.nth(density).locator("button.sort").click()
    assert tab.page.evaluate(values) == sorted(before, reverse=True)
    assert "Sorted by Density, descending." in tab.page.locator(
        '[data-table-tools="glance-table"] .status').inner_text()
    assert tab.violations() == []


@pytest.mark.parametrize("network", ["advice", "coworking"])
def test_every_figure_loads(site: Path, tab: _Tab, network: str) -> None:
    tab.open(site / "networks" / network / "index.html")
    figures = tab.page.evaluate(LOAD_FIGURES)
    assert figures, "the network page shows no figure"
    assert [src for src, width in figures if width <= 0] == []
    assert tab.violations() == []


def test_no_link_in_a_note_resolves_to_script_and_no_image_comes_from_outside(
        note_sites: dict[str, Path], tab: _Tab) -> None:
    tab.open(note_sites["escaped"] / "notes" / "links.html")
    assert tab.page.evaluate(UNSAFE_ADDRESSES) == []
    assert tab.page.locator(".prose .image-alt").inner_text() == "outside"
    # With allow_html the author's own raw link is kept as written; the next test shows it
    # cannot run.
    tab.open(note_sites["allow_html"] / "notes" / "links.html")
    assert tab.page.evaluate(UNSAFE_ADDRESSES) == [
        "<a id=\"raw-link\" href=\"javascript:alert('raw')\">raw link</a>"]


@pytest.mark.parametrize("variant", ["escaped", "allow_html"])
def test_clicking_every_link_of_a_note_opens_no_dialog(note_sites: dict[str, Path], tab: _Tab,
                                                       variant: str) -> None:
    page_path = note_sites[variant] / "notes" / "links.html"
    tab.open(page_path)
    links = tab.page.locator(".prose a")
    labels = [links.nth(i).inner_text() for i in range(links.count())]
    assert {"one", "two", "three", "four"} <= set(labels)
    for i in range(links.count()):
        links.nth(i).click()
        tab.page.wait_for_timeout(100)
        if tab.page.url.split("#")[0] != page_path.as_uri():
            tab.open(page_path)  # a link that led elsewhere: come back for the next one
    assert tab.dialogs == []
    if variant == "allow_html":  # the raw script, handlers and link were there, and refused
        assert len(tab.violations()) >= 3


# ---------------------------------------------------------------------------------------------
# The explorable map

def _explorer(tab: _Tab, site: Path, network: str = "advice"):
    tab.open(site / "networks" / network / "index.html")
    section = tab.page.locator("#explore")
    section.scroll_into_view_if_needed()
    return section


def _node_circle(tab: _Tab, index: int):
    return tab.page.locator(f'#explore circle.explorer-node[data-index="{index}"]')


def test_the_explorable_map_draws_every_node_and_tie_of_the_downloads(site: Path, tab: _Tab
                                                                       ) -> None:
    import pandas as pd
    section = _explorer(tab, site)
    assert section.is_visible()
    nodes = pd.read_csv(site / "files/advice/nodes.csv")
    edges = pd.read_csv(site / "files/advice/edges.csv")
    assert tab.page.locator("#explore circle.explorer-node").count() == len(nodes)
    assert tab.page.locator("#explore line.explorer-tie").count() == len(edges)
    assert tab.page.locator("#explore path.explorer-head").count() == len(edges)  # directed
    assert tab.console == [] and tab.violations() == []


def test_the_map_zooms_with_the_wheel_the_buttons_and_the_keys(site: Path, tab: _Tab) -> None:
    section = _explorer(tab, site)
    stage = tab.page.locator("#explore .explorer-stage")
    assert section.get_attribute("data-scale") == "1.000"
    box = stage.bounding_box()
    tab.page.mouse.move(box["x"] + box["width"] / 2, box["y"] + box["height"] / 2)
    tab.page.mouse.wheel(0, -400)
    tab.page.wait_for_timeout(200)
    assert float(section.get_attribute("data-scale")) > 1.5
    tab.page.locator('#explore [data-zoom="reset"]').click()
    tab.page.wait_for_timeout(100)
    assert section.get_attribute("data-scale") == "1.000"
    tab.page.locator('#explore [data-zoom="in"]').click()
    tab.page.wait_for_timeout(100)
    assert section.get_attribute("data-scale") == "1.400"
    stage.focus()
    tab.page.keyboard.press("-")
    tab.page.wait_for_timeout(100)
    assert section.get_attribute("data-scale") == "1.000"
    transform = tab.page.locator("#explore g.explorer-view").get_attribute("transform")
    tab.page.keyboard.press("ArrowLeft")
    tab.page.wait_for_timeout(100)
    assert tab.page.locator("#explore g.explorer-view").get_attribute("transform") != transform


def test_pointing_at_a_node_highlights_exactly_its_ties(site: Path, tab: _Tab) -> None:
    import pandas as pd
    _explorer(tab, site)
    nodes = list(pd.read_csv(site / "files/advice/nodes.csv", dtype=str)["id"])
    edges = pd.read_csv(site / "files/advice/edges.csv", dtype=str)
    index = nodes.index("s10")
    touching = int(((edges["source"] == "s10") | (edges["target"] == "s10")).sum())
    neighbours = set(edges.loc[edges["source"] == "s10", "target"]) | set(
        edges.loc[edges["target"] == "s10", "source"])
    _node_circle(tab, index).hover(force=True)
    tab.page.wait_for_timeout(100)
    assert tab.page.locator("#explore svg.has-focus").count() == 1
    assert tab.page.locator("#explore line.explorer-tie.is-near").count() == touching
    marked = tab.page.locator("#explore circle.is-neighbour")
    assert {nodes[int(marked.nth(i).get_attribute("data-index"))]
            for i in range(marked.count())} == neighbours
    assert "s10" in tab.page.locator("#explore .explorer-details h3").inner_text()


def test_finding_a_node_by_label_pins_it_and_links_to_its_row(site: Path, tab: _Tab) -> None:
    import pandas as pd
    section = _explorer(tab, site)
    table = pd.read_csv(site / "files/advice/nodes.csv", dtype=str)
    label = table.loc[table["id"] == "s38", "label"].iloc[0]
    search = tab.page.locator("#explore .explorer-find input")
    search.fill(label.lower())
    search.press("Enter")
    tab.page.wait_for_timeout(200)
    assert tab.page.locator("#explore .explorer-find .status").inner_text() == (
        f"Found {label} (s38).")
    index = list(table["id"]).index("s38")
    assert "is-focus" in _node_circle(tab, index).get_attribute("class")
    assert float(section.get_attribute("data-scale")) >= 2.5  # zoomed in on it
    own = tab.page.locator("#explore .explorer-details a", has_text="Its own page")
    assert own.get_attribute("href") == f"nodes/node-{index + 1}.html"
    link = tab.page.locator("#explore .explorer-details a", has_text="node table")
    href = link.get_attribute("href")
    assert href == f"nodes.html#node-{index + 1}"
    link.click()
    tab.page.wait_for_url(f"**/nodes.html#node-{index + 1}")
    assert tab.page.evaluate("location.hash") == f"#node-{index + 1}"
    assert tab.page.evaluate("document.querySelector(location.hash).cells[0].textContent") == "s38"
    tab.open(site / "networks/advice/index.html")
    search = tab.page.locator("#explore .explorer-find input")
    search.fill("s38")
    search.press("Enter")
    tab.page.locator("#explore .explorer-details a", has_text="Its own page").click()
    tab.page.wait_for_url(f"**/networks/advice/nodes/node-{index + 1}.html")
    assert tab.page.locator("main h1").inner_text() == f"{label} (s38)"
    search_missing = "nobody by this name"
    tab.open(site / "networks/advice/index.html")
    search = tab.page.locator("#explore .explorer-find input")
    search.fill(search_missing)
    search.press("Enter")
    assert "No node matches" in tab.page.locator("#explore .explorer-find .status").inner_text()


def test_the_colouring_can_be_switched_and_the_key_follows(site: Path, tab: _Tab) -> None:
    _explorer(tab, site)
    title = tab.page.locator("#explore .explorer-key-title")
    assert title.inner_text() == "clinic"  # the study colours the advice map by clinic
    key = """() => Array.from(document.querySelectorAll("#explore .explorer-key li span:first-of-type"))
             .map((span) => span.textContent)"""
    assert "Alderbrook" in tab.page.evaluate(key)
    tab.page.locator("#explore .explorer-colour select").select_option(label="Community")
    assert title.inner_text() == "Community"
    import pandas as pd
    communities = pd.read_csv(site / "files/advice/nodes.csv")["community"]
    assert tab.page.evaluate(key) == [str(c) for c in sorted(set(communities))]
    # Nodes of one community share one colour, and different communities differ (up to eight).
    fills = tab.page.evaluate("""() => Array.from(document.querySelectorAll(
        "#explore circle.explorer-node")).map((c) => c.getAttribute("fill"))""")
    by_community = {c: {f for f, k in zip(fills, communities) if k == c} for c in set(communities)}
    assert all(len(colours) == 1 for colours in by_community.values())
    assert len({next(iter(v)) for v in by_community.values()}) == len(by_community)
    assert tab.console == []


# ---------------------------------------------------------------------------------------------
# Search across the site

def test_the_header_search_finds_a_node_by_label_and_opens_its_row(site: Path, tab: _Tab) -> None:
    import pandas as pd
    table = pd.read_csv(site / "files/coworking/nodes.csv", dtype=str)
    label = table.loc[table["id"] == "s21", "label"].iloc[0]
    tab.open(site / "methods.html")
    search = tab.page.locator("#site-search-input")
    search.fill(label.split()[1].lower())  # the family name alone
    results = tab.page.locator("#site-search-results a")
    assert results.count() >= 2  # the node in both networks
    texts = [results.nth(i).inner_text() for i in range(results.count())]
    assert any(f"{label} (s21)" in t and "Co-working" in t for t in texts)
    target = next(i for i, t in enumerate(texts) if "Co-working" in t and label in t)
    results.nth(target).click()
    position = list(table["id"]).index("s21") + 1
    tab.page.wait_for_url(f"**/networks/coworking/nodes/node-{position}.html")
    assert tab.page.locator("main h1").inner_text() == f"{label} (s21)"
    assert "Co-working" in tab.page.locator("main .lede").inner_text()
    assert tab.console == []


def test_the_header_search_says_when_nothing_is_found_and_keys_move_through_results(
        site: Path, tab: _Tab) -> None:
    tab.open(site / "networks/advice/index.html")
    search = tab.page.locator("#site-search-input")
    search.fill("no such thing anywhere")
    assert "Nothing found" in tab.page.locator(".site-search-status").inner_text()
    search.fill("density")
    search.press("ArrowDown")
    focused = tab.page.evaluate("document.activeElement.getAttribute('href')")
    assert focused.endswith("#statistic-density")
    tab.page.keyboard.press("Enter")
    tab.page.wait_for_url("**#statistic-density")


@pytest.fixture(scope="module")
def large_site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The example's co-working network built as if it were above the explorable map's node
    limit (the limit lowered to 20): the map shows its communities."""
    from generator.draw import explorer as explorer_module

    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(explorer_module, "EXPLORER_MAX_NODES", 20)
        return build_example(tmp_path_factory.mktemp("large"))


def test_a_network_above_the_limit_is_explored_by_its_communities(large_site: Path, tab: _Tab
                                                                   ) -> None:
    import pandas as pd
    section = _explorer(tab, large_site, "coworking")
    nodes = pd.read_csv(large_site / "files/coworking/nodes.csv")
    edges = pd.read_csv(large_site / "files/coworking/edges.csv", dtype=str)
    communities = nodes["community"].nunique()
    assert section.is_visible() and "shows the" in section.locator(".notice").inner_text()
    assert tab.page.locator("#explore circle.explorer-node").count() == communities
    member = dict(zip(nodes["id"].astype(str), nodes["community"]))
    pairs = {tuple(sorted((member[s], member[t]))) for s, t in zip(edges["source"], edges["target"])
             if member[s] != member[t]}
    assert tab.page.locator("#explore line.explorer-tie").count() == len(pairs)
    _node_circle(tab, 0).hover(force=True)
    tab.page.wait_for_timeout(100)
    details = tab.page.locator("#explore .explorer-details").inner_text()
    assert "Community 1" in details
    assert f"Members\n{(nodes['community'] == 1).sum()}" in details
    assert tab.console == [] and tab.violations() == []


# Two fingers moving apart over the map, then one finger dragging it, as touch pointer events.
PINCH_AND_DRAG = """
() => {
  const svg = document.querySelector("#explore svg");
  const box = svg.getBoundingClientRect();
  const cx = box.left + box.width / 2, cy = box.top + box.height / 2;
  const send = (type, id, x, y) => svg.dispatchEvent(new PointerEvent(type, {
    pointerId: id, pointerType: "touch", clientX: x, clientY: y, bubbles: true, isPrimary: id === 1}));
  send("pointerdown", 1, cx - 20, cy);
  send("pointerdown", 2, cx + 20, cy);
  for (let step = 1; step <= 10; step++) {
    send("pointermove", 1, cx - 20 - 4 * step, cy);
    send("pointermove", 2, cx + 20 + 4 * step, cy);
  }
  send("pointerup", 1, cx - 60, cy);
  send("pointerup", 2, cx + 60, cy);
}
"""
DRAG = """
() => {
  const svg = document.querySelector("#explore svg");
  const box = svg.getBoundingClientRect();
  const cx = box.left + box.width / 2, cy = box.top + box.height / 2;
  const send = (type, x, y) => svg.dispatchEvent(new PointerEvent(type, {
    pointerId: 7, pointerType: "touch", clientX: x, clientY: y, bubbles: true, isPrimary: true}));
  send("pointerdown", cx, cy);
  for (let step = 1; step <= 5; step++) send("pointermove", cx + 10 * step, cy + 4 * step);
  send("pointerup", cx + 50, cy + 20);
}
"""


def test_the_map_zooms_with_two_fingers_and_moves_with_one(site: Path, browser) -> None:
    context = browser.new_context(viewport={"width": 390, "height": 844}, has_touch=True,
                                  is_mobile=True)
    page = context.new_page()
    try:
        page.goto((site / "networks/advice/index.html").as_uri())
        page.locator("#explore").scroll_into_view_if_needed()
        assert page.locator("#explore").get_attribute("data-scale") == "1.000"
        page.evaluate(PINCH_AND_DRAG)
        page.wait_for_timeout(150)  # the view is redrawn on the next animation frame
        scale = float(page.locator("#explore").get_attribute("data-scale"))
        assert scale > 2.0  # the fingers ended 120 px apart from 40: about three times closer
        view = page.locator("#explore g.explorer-view")
        before = view.get_attribute("transform")
        page.evaluate(DRAG)
        page.wait_for_timeout(100)
        assert view.get_attribute("transform") != before
        assert page.locator("#explore").get_attribute("data-scale") == f"{scale:.3f}"
    finally:
        context.close()
