"""netfolio watch: the path rule and the debouncer on their own, then the command in a subprocess
on small invented studies: rebuilds on change, reports a broken file while the last good site
stays up, refuses everything outside the site, and stops cleanly."""

from __future__ import annotations

import http.client
import json
import os
import re
import shutil
import signal
import socket
import subprocess
import sys
import threading
import time
from collections.abc import Callable, Iterator
from http import HTTPStatus
from pathlib import Path
from typing import Any

import pytest
from conftest import edge_study

from generator.cli import main
from generator.errors import ConfigError, DataError, Finding, LockError
from generator.watch.server import DEFAULT_HOST, exposure_warning, inject_preview, locate, start_server
from generator.watch.state import PreviewState, describe_failure
from generator.watch.watcher import Debouncer, StudyWatcher, watched_change

CSP = ('<meta http-equiv="Content-Security-Policy" content="default-src \'none\'; script-src '
       '\'self\'; style-src \'self\'; img-src \'self\'; base-uri \'none\'; form-action \'none\'">')
PAGE = f"<!DOCTYPE html>\n<html>\n<head>\n{CSP}\n<title>t</title>\n</head>\n<body>x</body></html>\n"
SCRIPT_TAG = '<script src="/.netfolio/preview.js"></script>'
STYLE_TAG = '<link rel="stylesheet" href="/.netfolio/preview.css">'
EDGES = "source,target,w\na,b,2\nb,c,1\nc,a,3\n"
BROKEN_EDGES = "source,target,w\na,b,2\nb,c,x\nc,a,3\n"


def _wait(predicate: Callable[[], Any], *, timeout: float = 20.0, what: str = "") -> Any:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        value = predicate()
        if value:
            return value
        time.sleep(0.05)
    raise AssertionError(f"gave up waiting {timeout} s for {what or predicate}")


# ---------------------------------------------------------------------------------------------
# The path rule


@pytest.fixture()
def site(tmp_path: Path) -> Path:
    """A folder shaped like a built site, beside a study file and a cache it must never serve."""
    (tmp_path / "study.toml").write_text("[study]\ntitle = 'secret'\n", encoding="utf-8")
    (tmp_path / ".netfolio-cache").mkdir()
    folder = tmp_path / "output"
    (folder / "notes").mkdir(parents=True)
    (folder / "index.html").write_text(PAGE, encoding="utf-8")
    (folder / "notes" / "intro.html").write_text(PAGE, encoding="utf-8")
    (folder / ".netfolio-site").write_text("marker\n", encoding="utf-8")
    return folder


@pytest.mark.parametrize("request_path", [
    "/../study.toml", "/%2e%2e/study.toml", "/%2E%2E/study.toml", "/..%2fstudy.toml",
    "/notes/..%2f..%2fstudy.toml", "/notes%2f..%2f..%2fstudy.toml", "/..\\study.toml",
    "/%5c..%5cstudy.toml", "/notes/../../study.toml", "/.netfolio-site", "/.netfolio-cache/",
    "/%2enetfolio-site", "/notes/./intro.html", "/index.html%00.txt", "/%ff.html", "relative.html",
])
def test_a_path_that_leaves_the_site_or_names_a_dot_file_is_refused(site: Path,
                                                                   request_path: str) -> None:
    assert locate(site, request_path).status == HTTPStatus.FORBIDDEN


def test_a_symlink_leading_out_of_the_site_is_refused(site: Path) -> None:
    (site / "notes" / "secret.html").symlink_to(site.parent / "study.toml")
    (site / "data").symlink_to(site.parent, target_is_directory=True)
    (site / "marker.html").symlink_to(site / ".netfolio-site")  # inside, but a dot-file
    assert locate(site, "/notes/secret.html").status == HTTPStatus.FORBIDDEN
    assert locate(site, "/data/study.toml").status == HTTPStatus.FORBIDDEN
    assert locate(site, "/marker.html").status == HTTPStatus.FORBIDDEN


def test_a_folder_whose_index_leads_out_of_the_site_is_refused(site: Path) -> None:
    (site / "away").mkdir()
    (site / "away" / "index.html").symlink_to(site.parent / "study.toml")
    assert locate(site, "/away/").status == HTTPStatus.FORBIDDEN


def test_files_of_the_site_are_found_and_folders_give_their_index(site: Path) -> None:
    assert locate(site, "/notes/intro.html").path == (site / "notes" / "intro.html").resolve()
    assert locate(site, "/").path == (site / "index.html").resolve()
    assert locate(site, "/notes/intro.html?x=1#top").path == (site / "notes" / "intro.html").resolve()
    moved = locate(site, "/notes?tab=2")
    assert (moved.status, moved.location) == (HTTPStatus.MOVED_PERMANENTLY, "/notes/?tab=2")
    assert locate(site, "/notes/").status == HTTPStatus.NOT_FOUND  # a folder without an index
    assert locate(site, "/missing.html").status == HTTPStatus.NOT_FOUND
    assert locate(site, "/%69ndex.html").path == (site / "index.html").resolve()


@pytest.mark.parametrize(("request_path", "location"), [
    ("//notes", "/notes/"), ("///notes?x=1", "/notes/?x=1"), ("/notes//", None)])
def test_a_folder_redirect_never_leads_to_another_host(site: Path, request_path: str,
                                                       location: str | None) -> None:
    found = locate(site, request_path)
    assert found.location == location
    if location is not None:  # a browser reads "//name/" as the address of a host "name"
        assert found.status == HTTPStatus.MOVED_PERMANENTLY and not location.startswith("//")


def test_without_a_site_folder_every_page_is_unavailable_but_refusals_still_apply(
        tmp_path: Path) -> None:
    assert locate(None, "/index.html").status == HTTPStatus.SERVICE_UNAVAILABLE
    assert locate(tmp_path / "never-built", "/").status == HTTPStatus.SERVICE_UNAVAILABLE
    assert locate(None, "/../study.toml").status == HTTPStatus.FORBIDDEN


# ---------------------------------------------------------------------------------------------
# What the server adds to a page


def test_the_preview_script_and_style_go_before_the_head_end_and_the_policy_allows_polling() -> None:
    served = inject_preview(PAGE.encode("utf-8"), build=4).decode("utf-8")
    head = served[: served.index("</head>")]
    assert SCRIPT_TAG in head and STYLE_TAG in head
    assert '<meta name="netfolio-preview-build" content="4">' in head
    policy = re.search(r'http-equiv="Content-Security-Policy" content="([^"]*)"', served).group(1)
    assert policy == ("default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; "
                      "base-uri 'none'; form-action 'none'; connect-src 'self'")
    assert served.replace(head, "") == PAGE[PAGE.index("</head>"):]  # the rest is untouched


def test_the_preview_script_puts_a_failed_builds_message_in_as_text_only() -> None:
    # The message quotes file names and values from the study: never markup.
    script = (Path(__file__).resolve().parents[1] / "generator" / "watch" / "preview.js"
              ).read_text(encoding="utf-8")
    assert "textContent = text" in script
    assert not [word for word in ("innerHTML", "outerHTML", "insertAdjacentHTML",
                                  "document.write", "eval(") if word in script]


def test_a_page_without_a_head_is_served_as_it_is() -> None:
    assert inject_preview(b"<p>no head</p>", build=1) == b"<p>no head</p>"


def test_only_a_loopback_address_goes_without_a_warning() -> None:
    assert exposure_warning("127.0.0.1") is None
    assert exposure_warning("localhost") is None
    assert exposure_warning("::1") is None
    warning = exposure_warning("0.0.0.0")
    assert warning is not None and "personal data" in warning and "0.0.0.0" in warning


# ---------------------------------------------------------------------------------------------
# What the state says about a failed build


def test_the_preview_listens_on_the_loopback_address_only_by_default() -> None:
    server = start_server(DEFAULT_HOST, 0, PreviewState(None))
    try:
        assert server.socket.getsockname()[0] == "127.0.0.1" == DEFAULT_HOST
        assert server.allowed_hosts == {f"{name}:{server.port}"
                                        for name in ("127.0.0.1", "localhost", "[::1]")}
    finally:
        server.server_close()


def test_a_data_error_is_described_by_its_first_finding_and_the_count(tmp_path: Path) -> None:
    first = Finding("error", "data/edges.csv", "weight is not a number", line=3, column="w", value="x")
    second = Finding("error", "data/nodes.csv", "duplicate id", line=7, column="id", value="a")
    error = describe_failure(DataError([first, second]), tmp_path)
    assert error == {"file": "data/edges.csv", "line": 3, "column": "w", "value": "x",
                     "message": "weight is not a number", "count": 2,
                     "text": "data/edges.csv, line 3, column 'w': weight is not a number (value: 'x')"}


def test_a_config_error_names_study_toml_and_the_dotted_key(tmp_path: Path) -> None:
    exc = ConfigError("must be 'strength' or 'distance'", key="network[1].weight_means",
                      path=tmp_path / "study.toml")
    error = describe_failure(exc, tmp_path)
    assert (error["file"], error["line"], error["column"]) == ("study.toml", None, None)
    assert error["message"] == "[network[1].weight_means] must be 'strength' or 'distance'"
    assert error["text"] == "study.toml: [network[1].weight_means] must be 'strength' or 'distance'"


def test_another_error_is_described_by_its_message_alone(tmp_path: Path) -> None:
    error = describe_failure(LockError("another build holds the lock", path=tmp_path / "x"), tmp_path)
    assert (error["file"], error["message"], error["count"]) == (None, "another build holds the lock", 1)


# ---------------------------------------------------------------------------------------------
# Which changes rebuild, and how bursts of them are gathered


@pytest.mark.parametrize(("relative", "rebuilds"), [
    ("study.toml", True), ("data/edges.csv", True), ("notes/intro.md", True),
    ("notes", True), ("bundles-2024/x.csv", True),
    ("output/index.html", False), ("output", False), (".netfolio-cache/a.json", False),
    (".netfolio-lock", False), (".output.building-abc123/index.html", False),
    (".output.previous/index.html", False), ("bundles/partner.zip", False),
    ("notes/.intro.md.swp", False), ("notes/intro.md~", False), ("notes/#intro.md#", False),
    (".git/index", False), ("notes/.#intro.md", False),
])
def test_a_change_rebuilds_unless_it_is_the_site_a_build_leftover_or_an_editor_temp_file(
        tmp_path: Path, relative: str, rebuilds: bool) -> None:
    found = watched_change(tmp_path, tmp_path / "output", str(tmp_path / relative))
    assert found == (relative if rebuilds else None)


def test_a_change_outside_the_study_or_in_a_site_elsewhere_does_not_rebuild(tmp_path: Path) -> None:
    study, site = tmp_path / "study", tmp_path / "site"
    assert watched_change(study, site, str(site / "index.html")) is None
    assert watched_change(study, site, str(tmp_path / "other.csv")) is None
    assert watched_change(study, site, str(study / "output" / "x.csv")) == "output/x.csv"
    assert watched_change(study, site, str(study)) == "."  # the study folder itself went


class _Clock:
    def __init__(self) -> None:
        self.now = 100.0

    def __call__(self) -> float:
        return self.now


def test_a_burst_of_changes_becomes_one_batch_once_the_quiet_time_has_passed() -> None:
    clock = _Clock()
    debouncer = Debouncer(quiet=0.3, longest=5.0, clock=clock)
    for path, step in (("notes/a.md", 0.0), ("notes/.a.md.tmp", 0.1), ("notes/a.md", 0.1),
                       ("data/e.csv", 0.2)):
        clock.now += step
        debouncer.add(path)
        assert debouncer.take_ready() is None
    clock.now += 0.29
    assert debouncer.take_ready() is None
    clock.now += 0.02
    assert debouncer.take_ready() == ["data/e.csv", "notes/.a.md.tmp", "notes/a.md"]
    assert debouncer.take_ready() is None  # taken once


def test_changes_that_never_pause_still_rebuild_after_the_longest_wait() -> None:
    clock = _Clock()
    debouncer = Debouncer(quiet=0.3, longest=2.0, clock=clock)
    batches = []
    for _ in range(20):  # a change every 0.25 s (exact in binary), never 0.3 s of quiet
        debouncer.add("data/e.csv")
        clock.now += 0.25
        batch = debouncer.take_ready()
        if batch:
            batches.append(clock.now)
    assert batches == [102.0, 104.0]


def test_waiting_returns_the_batch_a_other_thread_made_and_nothing_when_nothing_changed() -> None:
    debouncer = Debouncer(quiet=0.05, longest=1.0)
    assert debouncer.wait(0.1) is None
    adder = threading.Timer(0.05, debouncer.add, args=("notes/a.md",))
    started = time.monotonic()
    adder.start()
    assert debouncer.wait(2.0) == ["notes/a.md"]
    assert 0.09 < time.monotonic() - started < 1.0
    adder.join()


def test_the_watcher_watches_the_inputs_not_the_site_and_follows_new_and_recreated_folders(
        tmp_path: Path) -> None:
    root = tmp_path / "study"
    for folder in ("data", "output/networks", ".netfolio-cache", ".git/objects"):
        (root / folder).mkdir(parents=True)
    seen: list[str] = []
    watcher = StudyWatcher(root, root / "output", seen.append, warn=seen.append)
    watcher.start()
    try:
        assert watcher.watched == [root, root / "data"]
        (root / "output" / "networks" / "x.html").write_text("x", encoding="utf-8")
        (root / ".git" / "objects" / "y").write_text("y", encoding="utf-8")
        (root / "data" / "edges.csv").write_text("source,target\n", encoding="utf-8")
        _wait(lambda: "data/edges.csv" in seen, what="the change in data/")
        (root / "raw").mkdir()
        _wait(lambda: "raw" in seen, what="the new folder")
        watcher.sync()
        assert watcher.watched == [root, root / "data", root / "raw"]
        (root / "raw" / "a.csv").write_text("1", encoding="utf-8")
        _wait(lambda: "raw/a.csv" in seen, what="a change in the new folder")
        shutil.rmtree(root)
        _wait(lambda: "." in seen, what="the study folder to go")
        watcher.sync()
        assert watcher.watched == []
        (root / "notes").mkdir(parents=True)
        seen.clear()
        watcher.sync()
        assert watcher.watched == [root, root / "notes"] and sorted(seen) == [".", "notes"]
        (root / "notes" / "a.md").write_text("# A\n", encoding="utf-8")
        _wait(lambda: "notes/a.md" in seen, what="a change in the study made again")
        assert not [path for path in seen if path.startswith(("output", ".git"))]
    finally:
        watcher.stop()


# ---------------------------------------------------------------------------------------------
# The command in a subprocess


def _make_study(root: Path, *, edges: str = EDGES, note: str = "# Intro\n\nFirst words.\n") -> Path:
    edge_study(root, edges, weight="w")
    (root / "notes").mkdir(exist_ok=True)
    (root / "notes" / "intro.md").write_text(note, encoding="utf-8")
    return root


def _ctrl_c_as_in_a_terminal() -> None:
    # A shell that runs the tests in the background starts them with Ctrl-C ignored, and a child
    # inherits that; the watch gets the default a terminal gives.
    signal.signal(signal.SIGINT, signal.SIG_DFL)


class _Watch:
    """``netfolio watch`` running on a study, with its output lines gathered as they come."""

    def __init__(self, study: Path, *extra: str) -> None:
        self.study = study
        env = dict(os.environ, PYTHONUNBUFFERED="1", PYTHONFAULTHANDLER="1")
        self.process = subprocess.Popen(
            [sys.executable, "-m", "generator", "watch", str(study), "--port", "0", *extra],
            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
            preexec_fn=_ctrl_c_as_in_a_terminal)
        self.stdout: list[str] = []
        self.stderr: list[str] = []
        for stream, lines in ((self.process.stdout, self.stdout), (self.process.stderr, self.stderr)):
            threading.Thread(target=self._gather, args=(stream, lines), daemon=True).start()
        line = _wait(lambda: next((x for x in self.stdout if x.startswith("serving ")), None),
                     what="the address")
        match = re.fullmatch(r"serving http://127\.0\.0\.1:(\d+)/", line.strip())
        assert match, line
        self.port = int(match.group(1))

    @staticmethod
    def _gather(stream: Any, lines: list[str]) -> None:
        for line in stream:
            lines.append(line.rstrip("\n"))

    def get(self, path: str, *, method: str = "GET",
            headers: dict[str, str] | None = None) -> tuple[int, dict[str, str], bytes]:
        connection = http.client.HTTPConnection("127.0.0.1", self.port, timeout=10)
        try:
            connection.request(method, path, headers=headers or {})
            response = connection.getresponse()
            return response.status, dict(response.getheaders()), response.read()
        finally:
            connection.close()

    def state(self) -> dict[str, Any]:
        status, _, body = self.get("/.netfolio/state")
        assert status == 200
        return json.loads(body)

    def settled(self) -> dict[str, Any]:
        """The state once a build has finished and no other followed for a moment."""
        def quiet() -> dict[str, Any] | None:
            first = self.state()
            time.sleep(0.5)
            return first if first["build"] > 0 and self.state() == first else None
        return _wait(quiet, what="the builds to settle")

    def interrupt(self) -> int | None:
        """Send Ctrl-C; the exit code, or None if it did not stop within 20 s."""
        self.process.send_signal(signal.SIGINT)
        try:
            return self.process.wait(timeout=20)
        except subprocess.TimeoutExpired:
            self.process.send_signal(signal.SIGABRT)  # faulthandler prints where it hung
            self.process.wait(timeout=10)
            time.sleep(0.2)
            return None

    def close(self) -> None:
        if self.process.poll() is None:
            self.process.kill()
            self.process.wait()


@pytest.fixture(scope="module")
def live(tmp_path_factory: pytest.TempPathFactory) -> Iterator[_Watch]:
    watch = _Watch(_make_study(tmp_path_factory.mktemp("live") / "study"))
    try:
        assert watch.settled()["ok"]
        yield watch
    finally:
        watch.close()


def _good(watch: _Watch) -> dict[str, Any]:
    """Puts the study back as it started and waits for it to build."""
    state = watch.settled()
    if not state["ok"] or not (watch.study / "notes" / "intro.md").is_file():
        _make_study(watch.study)
        state = _wait(lambda: (s := watch.state())["ok"] and s, what="a good build")
    return state


def test_served_pages_carry_the_preview_script_and_the_files_on_disk_do_not(live: _Watch) -> None:
    _good(live)
    status, headers, body = live.get("/notes/intro.html")
    page = body.decode("utf-8")
    assert status == 200 and headers["Content-Type"] == "text/html; charset=utf-8"
    assert (headers["Cache-Control"], headers["X-Content-Type-Options"],
            headers["Referrer-Policy"]) == ("no-store", "nosniff", "no-referrer")
    assert SCRIPT_TAG in page and STYLE_TAG in page and "connect-src 'self'" in page
    on_disk = (live.study / "output" / "notes" / "intro.html").read_text(encoding="utf-8")
    assert "First words" in on_disk and "/.netfolio/" not in on_disk
    assert "connect-src" not in on_disk
    status, headers, script = live.get("/.netfolio/preview.js")
    assert status == 200 and headers["Content-Type"].startswith("text/javascript")
    assert b"/.netfolio/state" in script
    assert live.get("/.netfolio/preview.css")[0] == 200
    assert live.get("/.netfolio/other")[0] == 404


def test_editing_a_note_shows_on_the_served_page(live: _Watch) -> None:
    before = _good(live)["build"]
    (live.study / "notes" / "intro.md").write_text("# Intro\n\nSecond words.\n", encoding="utf-8")
    _wait(lambda: b"Second words" in live.get("/notes/intro.html")[2], what="the edited note")
    # The new site is in place a moment before the build has finished and is counted.
    _wait(lambda: live.state()["build"] == before + 1, what="the build to be counted")
    assert live.state() == {"build": before + 1, "ok": True, "error": None}
    _wait(lambda: any(line.startswith("notes/intro.md changed: built in ") for line in live.stdout),
          what="the rebuild line")


def test_a_page_asked_for_while_the_site_is_swapped_is_always_served(live: _Watch) -> None:
    _good(live)
    statuses: list[int] = []
    stop = threading.Event()

    def ask() -> None:
        while not stop.is_set():
            statuses.append(live.get("/notes/intro.html")[0])

    asker = threading.Thread(target=ask)
    asker.start()
    try:
        for words in ("Swap one", "Swap two", "Swap three"):
            (live.study / "notes" / "intro.md").write_text(f"# Intro\n\n{words}.\n", encoding="utf-8")
            _wait(lambda w=words: w.encode() in live.get("/notes/intro.html")[2], what=words)
    finally:
        stop.set()
        asker.join()
    assert len(statuses) > 10 and set(statuses) == {200}


def test_a_broken_csv_is_reported_while_the_last_good_site_is_served_until_it_is_fixed(
        live: _Watch) -> None:
    _good(live)
    note_before = live.get("/notes/intro.html")[2]
    (live.study / "data" / "edges.csv").write_text(BROKEN_EDGES, encoding="utf-8")
    state = _wait(lambda: (s := live.state())["ok"] is False and s, what="the failed build")
    error = state["error"]
    assert (error["file"], error["line"], error["column"]) == ("data/edges.csv", 3, "w")
    assert error["value"] == "x" and "number" in error["message"]
    status, _, page = live.get("/notes/intro.html")
    assert status == 200
    assert page.split(b"</head>")[1] == note_before.split(b"</head>")[1]
    _wait(lambda: any(line.startswith("data/edges.csv changed: failed in ")
                      and "data/edges.csv, line 3, column 'w'" in line for line in live.stdout),
          what="the failure line")
    (live.study / "data" / "edges.csv").write_text(EDGES, encoding="utf-8")
    recovered = _wait(lambda: (s := live.state())["ok"] and s, what="the recovery")
    assert recovered["build"] == state["build"] + 1 and recovered["error"] is None


def test_a_deleted_data_file_is_reported_and_the_last_good_site_stays(live: _Watch) -> None:
    _good(live)
    (live.study / "data" / "edges.csv").unlink()
    state = _wait(lambda: (s := live.state())["ok"] is False and s, what="the failed build")
    error = state["error"]
    assert error["file"] == "study.toml"
    assert "data/edges.csv" in error["message"] and "does not exist" in error["message"]
    assert live.get("/index.html")[0] == 200
    (live.study / "data" / "edges.csv").write_text(EDGES, encoding="utf-8")
    _wait(lambda: live.state()["ok"], what="the recovery")


@pytest.mark.parametrize("request_path", ["/../study.toml", "/%2e%2e/study.toml",
                                          "/..%2fstudy.toml", "/.netfolio-cache/",
                                          "/.netfolio-site", "/../data/edges.csv"])
def test_the_server_refuses_paths_outside_the_site(live: _Watch, request_path: str) -> None:
    status, _, body = live.get(request_path)
    assert status in (403, 404)
    assert b"secret" not in body and b"source,target" not in body and b"[study]" not in body


def test_the_server_refuses_a_symlink_that_leads_out_of_the_site(live: _Watch) -> None:
    _good(live)
    site = live.study / "output"
    (site / "leak.html").symlink_to(live.study / "study.toml")
    (site / "leak").symlink_to(live.study / "data", target_is_directory=True)
    assert live.get("/leak.html")[0] == 403
    assert live.get("/leak/edges.csv")[0] == 403


def test_the_server_answers_only_get_and_head_and_only_for_its_own_address(live: _Watch) -> None:
    status, headers, body = live.get("/index.html", method="HEAD")
    assert status == 200 and body == b"" and int(headers["Content-Length"]) > 0
    assert live.get("/index.html", method="POST")[0] == 405
    assert live.get("/index.html", method="DELETE")[0] == 405
    # A page elsewhere whose name was pointed at 127.0.0.1 must not read the study.
    assert live.get("/index.html", headers={"Host": "attacker.example:80"})[0] == 403
    assert live.get("/index.html", headers={"Host": f"localhost:{live.port}"})[0] == 200


def test_the_study_folder_deleted_and_made_again_is_watched_again(live: _Watch) -> None:
    _good(live)
    shutil.rmtree(live.study)
    gone = _wait(lambda: (s := live.state())["ok"] is False and s, what="the failed build")
    assert gone["error"]["file"] == "study.toml" and "no study.toml" in gone["error"]["message"]
    status, _, page = live.get("/index.html")
    assert status == 503 and SCRIPT_TAG.encode() in page
    time.sleep(0.5)
    _make_study(live.study, note="# Intro\n\nThird words.\n")
    _wait(lambda: b"Third words" in live.get("/notes/intro.html")[2], what="the study back")
    (live.study / "notes" / "intro.md").write_text("# Intro\n\nFourth words.\n", encoding="utf-8")
    _wait(lambda: b"Fourth words" in live.get("/notes/intro.html")[2], what="a later edit")


def test_the_error_panel_appears_in_a_browser_and_goes_when_the_study_builds(live: _Watch) -> None:
    chromium = Path("/usr/bin/chromium")
    if not chromium.exists():
        pytest.skip("needs Chromium at /usr/bin/chromium")
    sync_api = pytest.importorskip("playwright.sync_api")
    _good(live)
    args = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
            "--disable-component-update", "--no-first-run", "--disable-sync"]
    with sync_api.sync_playwright() as playwright:
        browser = playwright.chromium.launch(executable_path=str(chromium), args=args)
        page = browser.new_page()
        problems: list[str] = []
        # The browser asks for a favicon the site does not have; that 404 is no problem.
        page.on("console", lambda m: problems.append(m.text) if m.type == "error"
                and not m.location.get("url", "").endswith("/favicon.ico") else None)
        page.goto(f"http://127.0.0.1:{live.port}/index.html")
        (live.study / "data" / "edges.csv").write_text(BROKEN_EDGES, encoding="utf-8")
        panel = page.locator(".netfolio-preview-panel")
        panel.wait_for(state="visible", timeout=20000)
        assert "data/edges.csv, line 3, column 'w'" in panel.inner_text()
        (live.study / "data" / "edges.csv").write_text(EDGES, encoding="utf-8")
        panel.wait_for(state="detached", timeout=20000)
        assert problems == []
        browser.close()


def test_a_first_build_that_fails_serves_a_waiting_page_until_the_study_is_fixed(
        tmp_path: Path) -> None:
    watch = _Watch(_make_study(tmp_path / "study", edges=BROKEN_EDGES), "--quiet")
    try:
        state = watch.settled()
        assert (state["build"], state["ok"], state["error"]["line"]) == (1, False, 3)
        status, _, page = watch.get("/")
        assert status == 503 and SCRIPT_TAG.encode() in page
        assert any(line.startswith("first build: failed in ") for line in watch.stdout)
        (tmp_path / "study" / "data" / "edges.csv").write_text(EDGES, encoding="utf-8")
        _wait(lambda: watch.state()["ok"], what="the first good build")
        assert b"First words" in watch.get("/notes/intro.html")[2]
        assert not [line for line in watch.stderr if line.startswith(("ingest", "analyse"))]
    finally:
        watch.close()


def test_ctrl_c_stops_watch_with_exit_0_and_leaves_no_lock(tmp_path: Path) -> None:
    watch = _Watch(_make_study(tmp_path / "study"))
    try:
        assert watch.settled()["ok"]
        assert watch.interrupt() == 0, "\n".join(watch.stdout + watch.stderr)
        assert not (tmp_path / "study" / ".netfolio-lock").exists()
        assert not [line for line in watch.stderr if "Traceback" in line]
    finally:
        watch.close()


def test_a_port_in_use_stops_watch_with_a_clear_message_and_exit_1(tmp_path: Path) -> None:
    study = _make_study(tmp_path / "study")
    with socket.socket() as taken:
        taken.bind(("127.0.0.1", 0))
        taken.listen()
        port = taken.getsockname()[1]
        done = subprocess.run([sys.executable, "-m", "generator", "watch", str(study), "--port",
                               str(port)], capture_output=True, text=True, timeout=60)
    assert done.returncode == 1
    assert f"127.0.0.1:{port} is in use" in done.stderr and "--port" in done.stderr
    assert "Traceback" not in done.stderr
    assert not (study / "output").exists()


@pytest.mark.parametrize("port", ["http", "-1", "65536"])
def test_a_port_that_is_not_a_number_from_0_to_65535_is_a_command_line_error(
        tmp_path: Path, port: str, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["watch", str(_make_study(tmp_path / "study")), "--port", port]) == 2
    assert f"'{port}' is not a port number (0 to 65535)" in capsys.readouterr().err


def test_a_folder_without_a_study_stops_watch_with_exit_1(tmp_path: Path) -> None:
    done = subprocess.run([sys.executable, "-m", "generator", "watch", str(tmp_path), "--port", "0"],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 1 and "no study.toml" in done.stderr and "Traceback" not in done.stderr
