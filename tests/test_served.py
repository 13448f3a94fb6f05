"""The example site as an internal web server serves it: Debian's nginx on 127.0.0.1, with the
site under the sub-path /studies/clinics/. Every link and source on every page resolves (files
and #fragments both), the pages of every kind open in Chromium with no console error, their
navigation links lead to pages that load, and the node table's filter keeps exactly the rows that
match.

CI installs nginx and Chromium (.ci/run); elsewhere, without them, the module is skipped.
"""

from __future__ import annotations

import os
import shutil
import socket
import subprocess
import time
import urllib.error
import urllib.request
from collections.abc import Iterator
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import urljoin, urlsplit

import pytest
from browsing import build_example, chromium_session, require_chromium

pytestmark = pytest.mark.browser

require_chromium()
NGINX = shutil.which("nginx") or ("/usr/sbin/nginx" if Path("/usr/sbin/nginx").exists() else None)
if NGINX is None and os.environ.get("CI"):
    raise RuntimeError("CI needs nginx for the served-site tests (apt-get install nginx)")
if NGINX is None:
    pytest.skip("needs nginx (apt-get install nginx)", allow_module_level=True)
sync_api = pytest.importorskip("playwright.sync_api")

PREFIX = "/studies/clinics/"
PAGE_KINDS = ["index.html", "networks/advice/index.html", "networks/coworking/index.html",
              "networks/advice/nodes.html", "networks/advice/nodes/node-10.html",
              "methods.html", "checks.html", "downloads.html", "notes/methods.html",
              "networks/advice/communities.html", "compare/advice.html",
              "networks/training/index.html", "compare/advice-and-coworking.html"]
CONFIG = """
worker_processes 1;
{user}
daemon off;
pid {work}/nginx.pid;
error_log {work}/error.log;
events {{ worker_connections 64; }}
http {{
    include {mime};
    default_type application/octet-stream;
    access_log off;
    client_body_temp_path {work}/body;
    proxy_temp_path {work}/proxy;
    fastcgi_temp_path {work}/fastcgi;
    uwsgi_temp_path {work}/uwsgi;
    scgi_temp_path {work}/scgi;
    server {{
        listen 127.0.0.1:{port};
        location {prefix} {{ alias {site}/; }}
    }}
}}
"""


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return int(probe.getsockname()[1])


@pytest.fixture(scope="module")
def site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return build_example(tmp_path_factory.mktemp("served"))


@pytest.fixture(scope="module")
def server(site: Path, tmp_path_factory: pytest.TempPathFactory) -> Iterator[str]:
    """nginx serving ``site`` under PREFIX; yields the site's address."""
    work = tmp_path_factory.mktemp("nginx")
    port = _free_port()
    mime = "/etc/nginx/mime.types"
    assert Path(mime).exists(), "nginx's mime.types is missing"
    # As root, nginx's workers would switch to an unprivileged user that cannot read the
    # temporary folders; they keep root's rights here, on loopback only.
    user = "user root;" if os.geteuid() == 0 else ""
    (work / "nginx.conf").write_text(CONFIG.format(user=user, work=work, mime=mime, port=port,
                                                   prefix=PREFIX, site=site), encoding="utf-8")
    process = subprocess.Popen([NGINX, "-c", str(work / "nginx.conf"), "-p", str(work)],
                               stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    base = f"http://127.0.0.1:{port}{PREFIX}"
    try:
        for _ in range(100):
            try:
                with urllib.request.urlopen(base + "index.html", timeout=2) as response:
                    if response.status == 200:
                        break
            except (urllib.error.URLError, ConnectionError):
                if process.poll() is not None:
                    raise RuntimeError(f"nginx stopped: {process.stderr.read().decode()}"
                                       f"{(work / 'error.log').read_text()}") from None
                time.sleep(0.1)
        else:
            raise RuntimeError("nginx did not answer within 10 s")
        yield base
    finally:
        process.terminate()
        process.wait(timeout=10)


class _Links(HTMLParser):
    """Every address a page refers to (links, images, scripts, stylesheets) and every id it has."""

    def __init__(self) -> None:
        super().__init__()
        self.addresses: list[str] = []
        self.ids: set[str] = set()

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        values = dict(attrs)
        if values.get("id"):
            self.ids.add(str(values["id"]))
        for name in ("href", "src"):
            if values.get(name) and not (tag == "a" and name == "src"):
                self.addresses.append(str(values[name]))


def _get(address: str) -> tuple[int, bytes, str]:
    try:
        with urllib.request.urlopen(address, timeout=10) as response:
            return response.status, response.read(), response.headers.get_content_type()
    except urllib.error.HTTPError as error:
        return error.code, b"", ""


def test_every_page_is_reachable_and_every_address_on_it_resolves_under_the_sub_path(
        site: Path, server: str) -> None:
    pages = sorted(path.relative_to(site).as_posix() for path in site.rglob("*.html"))
    parsed: dict[str, _Links] = {}
    broken: list[str] = []
    for page in pages:
        status, body, kind = _get(server + page)
        assert status == 200 and kind == "text/html", (page, status, kind)
        links = _Links()
        links.feed(body.decode("utf-8"))
        parsed[server + page] = links
    reached = {server + "index.html"}
    checked: dict[str, int] = {}
    for page_address, links in parsed.items():
        for address in links.addresses:
            target = urljoin(page_address, address)
            parts = urlsplit(target)
            if parts.scheme in ("mailto", "tel") or (parts.scheme == "https" and parts.netloc):
                continue
            assert target.startswith(server), (page_address, address)  # nothing leaves the sub-path
            document = target.split("#")[0]
            if document not in checked:
                checked[document] = (200 if document in parsed else _get(document)[0])
            if checked[document] != 200:
                broken.append(f"{page_address}: {address} -> {checked[document]}")
                continue
            reached.add(document)
            fragment = parts.fragment
            if fragment and document in parsed and fragment not in parsed[document].ids:
                broken.append(f"{page_address}: {address} has no target #{fragment}")
    assert broken == []
    # Every page can be reached by following links from somewhere in the site.
    assert set(parsed) - reached == set()
    assert len(checked) > len(pages)  # figures, scripts, styles and downloads were checked too


def test_downloads_are_served_with_their_types(server: str) -> None:
    # The types a browser needs to use a file as a stylesheet, a script or an image. (nginx's
    # Debian table has no entry for CSV: downloads arrive as application/octet-stream and save.)
    types = {"static/site.css": "text/css", "static/explore.js": "application/javascript",
             "networks/advice/explore-data.js": "application/javascript",
             "search-index.js": "application/javascript", "files/datapackage.json": "application/json"}
    for path, expected in types.items():
        status, body, kind = _get(server + path)
        assert (status, kind) == (200, expected), path
        assert body


browser = pytest.fixture(scope="module")(chromium_session)


@pytest.mark.parametrize("path", PAGE_KINDS)
def test_a_served_page_and_the_pages_its_navigation_leads_to_open_without_errors(
        server: str, browser, path: str) -> None:
    page = browser.new_page()
    errors: list[str] = []
    page.on("console", lambda m: errors.append(f"{page.url}: {m.text}")
            if m.type in ("error", "warning") else None)
    page.on("pageerror", lambda e: errors.append(f"{page.url}: {e}"))
    failed: list[str] = []
    # A request the next navigation cuts short (the icon, say) is aborted, not failed.
    page.on("requestfailed", lambda request: failed.append(f"{request.url} {request.failure}")
            if "ERR_ABORTED" not in (request.failure or "") else None)
    page.on("response", lambda response: failed.append(response.url)
            if response.status >= 400 else None)
    try:
        page.goto(server + path)
        page.wait_for_load_state("load")
        assert page.locator("link[rel=stylesheet]").count() >= 1
        assert page.evaluate("getComputedStyle(document.body).fontFamily") != "Times New Roman"
        navigation = page.eval_on_selector_all(
            "header a[href], nav a[href]", "links => links.map(a => a.href)")
        assert navigation, f"{path} has no navigation links"
        for address in sorted({link.split("#")[0] for link in navigation}):
            if not address.startswith(server):
                continue
            page.goto(address)
            page.wait_for_load_state("load")
            assert page.title(), address
        assert failed == []
        assert errors == []
    finally:
        page.close()


def test_the_node_table_filter_keeps_exactly_the_matching_rows(server: str, browser) -> None:
    page = browser.new_page()
    try:
        page.goto(server + "networks/advice/nodes.html")
        rows = page.locator("#node-table tbody tr")
        total = rows.count()
        texts = [rows.nth(i).inner_text().casefold() for i in range(total)]
        field = page.locator('[data-table-tools="node-table"] input')
        # One clinic of the invented example, in another case than the table shows it.
        for query in ("larkmoor", "no such text anywhere"):
            field.fill(query)
            shown = [i for i in range(total) if rows.nth(i).is_visible()]
            expected = [i for i, text in enumerate(texts) if query in text]
            assert shown == expected, query
        assert 0 < len([text for text in texts if "larkmoor" in text]) < total
        field.fill("")
        assert all(rows.nth(i).is_visible() for i in range(total))
    finally:
        page.close()
