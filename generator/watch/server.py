"""The preview server: the last good site over HTTP, each page with the preview script added.

Files on disk stay as ``build`` wrote them; only HTML responses change. The server serves files
inside the site folder and nothing else (``locate``), answers only GET and HEAD, and opens each
file holding ``SWAP_LOCK``, so a request during a rebuild gets the old site or the new one.
"""

from __future__ import annotations

import errno
import ipaddress
import mimetypes
import os
import re
import shutil
import socket
import sys
from dataclasses import dataclass
from functools import cache
from http import HTTPStatus
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from importlib import resources
from pathlib import Path
from typing import Any, BinaryIO
from urllib.parse import unquote

from ..errors import NetfolioError
from ..publish.site import SWAP_LOCK
from .state import BuildState, PreviewState

__all__ = ["DEFAULT_HOST", "DEFAULT_PORT", "Located", "PreviewServer", "ServeError",
           "exposure_warning", "inject_preview", "locate", "start_server"]

DEFAULT_HOST = "127.0.0.1"
DEFAULT_PORT = 8150
ROUTE = "/.netfolio/"  # the preview's own addresses; no file of a site can be there
SCRIPT_TAG = b'<script src="/.netfolio/preview.js"></script>'
STYLE_TAG = b'<link rel="stylesheet" href="/.netfolio/preview.css">'
_ASSETS = {"preview.js": "text/javascript; charset=utf-8", "preview.css": "text/css; charset=utf-8"}
# Every answer is fresh (a rebuild replaces any file at any moment) and read as the type it says.
_HEADERS = {"Cache-Control": "no-store", "X-Content-Type-Options": "nosniff",
            "Referrer-Policy": "no-referrer"}


class ServeError(NetfolioError):
    """The preview cannot listen where it was asked to (the port is taken, the host unknown)."""

    exit_code = 1


# ---------------------------------------------------------------------------------------------
# Which file a request names


@dataclass(frozen=True)
class Located:
    """What a request path names: a file of the site (``path``), a folder to redirect to with
    its trailing slash (``location``), or a refusal (``status``)."""

    status: HTTPStatus
    path: Path | None = None
    location: str | None = None


def locate(site: Path | None, target: str) -> Located:
    """The file of the site folder ``site`` that the request target names.

    Refused (403): a target that is not an absolute path; a part that starts with a dot (so no
    ``..``, no ``.netfolio-site`` marker, no hidden file), holds a backslash, or decodes to a
    slash, backslash or NUL (``%2f``, ``%5c``, ``%00``) or to bytes that are not UTF-8; and any
    file that, symlinks resolved, lies outside the site or under a dot-named part of it. A
    folder gives its ``index.html`` (asked for without its trailing slash, a redirect to the same
    path with it, never to another host). No site folder yet: 503, after the refusals."""
    path, _, query = target.partition("#")[0].partition("?")
    names = _names(path)
    if names is None:
        return Located(HTTPStatus.FORBIDDEN)
    if site is None or not site.is_dir():
        return Located(HTTPStatus.SERVICE_UNAVAILABLE)
    top = site.resolve()
    found = _inside(top, top.joinpath(*names))
    if found is not None and found.is_dir():
        if not path.endswith("/"):
            # One leading slash only: "//notes/" would send the browser to a host "notes".
            return Located(HTTPStatus.MOVED_PERMANENTLY,
                           location="/" + path.lstrip("/") + "/" + (f"?{query}" if query else ""))
        found = _inside(top, found / "index.html")
    if found is None:
        return Located(HTTPStatus.FORBIDDEN)
    if not found.is_file():
        return Located(HTTPStatus.NOT_FOUND)
    return Located(HTTPStatus.OK, path=found)


def _names(path: str) -> list[str] | None:
    """The decoded parts of a request path, or None if any of them is refused."""
    if not path.startswith("/"):
        return None
    names = []
    for raw in path.split("/"):
        if not raw:
            continue
        try:
            name = unquote(raw, errors="strict")
        except UnicodeDecodeError:
            return None
        if "\\" in raw or name.startswith(".") or any(c in name for c in "/\\\x00"):
            return None
        names.append(name)
    return names


def _inside(top: Path, candidate: Path) -> Path | None:
    """``candidate`` with symlinks resolved, if that is inside ``top`` and not under a dot-named
    part of it; else None."""
    try:
        resolved = candidate.resolve()
    except (OSError, RuntimeError):  # a symlink loop
        return None
    if not resolved.is_relative_to(top):
        return None
    if any(part.startswith(".") for part in resolved.relative_to(top).parts):
        return None
    return resolved


# ---------------------------------------------------------------------------------------------
# What the server adds to a page

_HEAD_END = re.compile(rb"</head\s*>", re.IGNORECASE)
_META = re.compile(rb"<meta\b[^>]*>", re.IGNORECASE)
_POLICY = re.compile(rb"""http-equiv\s*=\s*["']?content-security-policy""", re.IGNORECASE)
_CONTENT = re.compile(rb'(content\s*=\s*")([^"]*)(")', re.IGNORECASE)


def inject_preview(page: bytes, *, build: int) -> bytes:
    """``page`` with the preview's script and stylesheet before ``</head>``, the number of the
    build it was served at (the script reloads once a later build succeeds), and
    ``connect-src 'self'`` in its Content-Security-Policy so the script may ask for the state.
    A page without ``</head>`` is returned as it is."""
    end = _HEAD_END.search(page)
    if end is None:
        return page
    head = _META.sub(_allow_polling, page[: end.start()])
    added = b'<meta name="netfolio-preview-build" content="%d">\n%s\n%s\n' % (
        build, SCRIPT_TAG, STYLE_TAG)
    return head + added + page[end.start():]


def _allow_polling(meta: re.Match[bytes]) -> bytes:
    tag = meta.group(0)
    if not _POLICY.search(tag) or b"connect-src" in tag:
        return tag
    return _CONTENT.sub(lambda m: m.group(1) + m.group(2).rstrip(b"; ") + b"; connect-src 'self'"
                        + m.group(3), tag, count=1)


# A page of the preview's own, for an address the site does not have (404) and for the time
# before any site exists (503); the preview script shows a failed build's error over it.
_STATUS_PAGE = """<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'self'; \
style-src 'self'; base-uri 'none'; form-action 'none'">
<title>{heading} · netfolio preview</title>
</head>
<body class="netfolio-preview-status">
<h1>{heading}</h1>
<p>{text}</p>
</body>
</html>
"""
_STATUS_TEXT = {
    HTTPStatus.NOT_FOUND: ("Not in the site", "The last site that built has no page at this "
                           "address. This page reloads by itself after the next build that "
                           "succeeds."),
    HTTPStatus.SERVICE_UNAVAILABLE: ("No site yet", "The study has not built yet. This page "
                                     "reloads by itself once it has."),
}


def _status_page(status: HTTPStatus, build: int) -> bytes:
    heading, text = _STATUS_TEXT[status]
    return inject_preview(_STATUS_PAGE.format(heading=heading, text=text).encode("utf-8"),
                          build=build)


@cache
def _asset(name: str) -> bytes:
    return (resources.files(__package__) / name).read_bytes()


# ---------------------------------------------------------------------------------------------
# The server


def _content_type(path: Path) -> str:
    kind = mimetypes.guess_type(path.name)[0] or "application/octet-stream"
    return f"{kind}; charset=utf-8" if kind.startswith("text/") or kind == "application/json" else kind


class _PreviewHandler(BaseHTTPRequestHandler):
    """One request: a file of the site, a page of the preview's own, or the build state."""

    server: PreviewServer
    server_version = "netfolio-preview"
    sys_version = ""

    def do_GET(self) -> None:
        self._answer(send_body=True)

    def do_HEAD(self) -> None:
        self._answer(send_body=False)

    def _refuse_method(self) -> None:
        self._send(HTTPStatus.METHOD_NOT_ALLOWED, b"only GET and HEAD\n", "text/plain; charset=utf-8",
                   send_body=True, headers={"Allow": "GET, HEAD"})

    do_POST = do_PUT = do_DELETE = do_PATCH = do_OPTIONS = _refuse_method

    def log_message(self, format: str, *args: Any) -> None:
        """Say nothing: the terminal shows builds, not the preview's polls every second."""

    def _answer(self, *, send_body: bool) -> None:
        if not self.server.host_allowed(self.headers.get("Host")):
            self._send(HTTPStatus.FORBIDDEN, b"unknown host\n", "text/plain; charset=utf-8",
                       send_body=send_body)
            return
        state = self.server.state.snapshot()
        path = self.path.partition("#")[0].partition("?")[0]
        if path.startswith(ROUTE):
            self._answer_route(path[len(ROUTE):], state, send_body=send_body)
            return
        handle: BinaryIO | None = None
        with SWAP_LOCK:  # the site is never half swapped while a file is found and opened
            located = locate(state.site, self.path)
            if located.path is not None:
                try:
                    handle = located.path.open("rb")
                except OSError:
                    located = Located(HTTPStatus.NOT_FOUND)
        if located.location is not None:
            self._send(located.status, b"", "text/plain; charset=utf-8", send_body=send_body,
                       headers={"Location": located.location})
        elif handle is None or located.path is None:
            self._refuse(located.status, state, send_body=send_body)
        else:
            with handle:
                self._send_file(handle, located.path, state, send_body=send_body)

    def _answer_route(self, name: str, state: BuildState, *, send_body: bool) -> None:
        if name == "state":
            self._send(HTTPStatus.OK, state.as_json(), "application/json", send_body=send_body)
        elif name in _ASSETS:
            self._send(HTTPStatus.OK, _asset(name), _ASSETS[name], send_body=send_body)
        else:
            self._send(HTTPStatus.NOT_FOUND, b"not found\n", "text/plain; charset=utf-8",
                       send_body=send_body)

    def _refuse(self, status: HTTPStatus, state: BuildState, *, send_body: bool) -> None:
        if status in _STATUS_TEXT:
            self._send(status, _status_page(status, state.build), "text/html; charset=utf-8",
                       send_body=send_body)
        else:
            self._send(status, b"refused\n", "text/plain; charset=utf-8", send_body=send_body)

    def _send_file(self, handle: BinaryIO, path: Path, state: BuildState, *,
                   send_body: bool) -> None:
        kind = _content_type(path)
        if kind.startswith("text/html"):
            self._send(HTTPStatus.OK, inject_preview(handle.read(), build=state.build), kind,
                       send_body=send_body)
            return
        # The size of the file opened, not of the name: a rebuild may have replaced that since.
        self._start(HTTPStatus.OK, kind, size=os.fstat(handle.fileno()).st_size)
        if send_body:
            shutil.copyfileobj(handle, self.wfile)

    def _send(self, status: HTTPStatus, body: bytes, kind: str, *, send_body: bool,
              headers: dict[str, str] | None = None) -> None:
        self._start(status, kind, size=len(body), headers=headers)
        if send_body:
            self.wfile.write(body)

    def _start(self, status: HTTPStatus, kind: str, *, size: int,
               headers: dict[str, str] | None = None) -> None:
        self.send_response(status)
        self.send_header("Content-Type", kind)
        self.send_header("Content-Length", str(size))
        for name, value in {**_HEADERS, **(headers or {})}.items():
            self.send_header(name, value)
        self.end_headers()


class PreviewServer(ThreadingHTTPServer):
    """A threading HTTP server that knows the preview's state and which Host names it answers."""

    daemon_threads = True

    def __init__(self, address: tuple[str, int], state: PreviewState) -> None:
        self.address_family = socket.AF_INET6 if ":" in address[0] else socket.AF_INET
        self.state = state
        super().__init__(address, _PreviewHandler)
        self.host = address[0]
        self.port = int(self.server_address[1])
        # Bound to this computer only, answer only to its own names: a page elsewhere whose
        # address was pointed at 127.0.0.1 (DNS rebinding) must not read the study through it.
        self.allowed_hosts: frozenset[str] | None = None
        if _is_loopback(self.host):
            self.allowed_hosts = frozenset(f"{name}:{self.port}"
                                           for name in ("127.0.0.1", "localhost", "[::1]"))

    @property
    def url(self) -> str:
        host = f"[{self.host}]" if ":" in self.host else self.host
        return f"http://{host}:{self.port}/"

    def host_allowed(self, host: str | None) -> bool:
        return host is None or self.allowed_hosts is None or host.lower() in self.allowed_hosts

    def handle_error(self, request: Any, client_address: Any) -> None:
        # A browser that goes away in the middle of an answer is not worth a traceback.
        if isinstance(sys.exc_info()[1], ConnectionError):
            return
        super().handle_error(request, client_address)


def start_server(host: str, port: int, state: PreviewState) -> PreviewServer:
    """Listen on ``host``:``port`` (0 picks a free port); a ``ServeError`` when that fails."""
    try:
        return PreviewServer((host, port), state)
    except OSError as exc:
        if exc.errno == errno.EADDRINUSE:
            raise ServeError(f"cannot serve the preview: {host}:{port} is in use (by another "
                             "netfolio watch?); choose another port with --port, or --port 0 "
                             "for any free one") from None
        raise ServeError(f"cannot serve the preview on {host}:{port}: {exc.strerror or exc}; "
                         "check --host and --port") from None


def exposure_warning(host: str) -> str | None:
    """The warning for a host other than this computer's own, or None for a loopback one."""
    if _is_loopback(host):
        return None
    return (f"serving on {host}: anyone who can reach this computer over the network can open "
            "the site, and with it the study's personal data; leave out --host to serve this "
            "computer only")


def _is_loopback(host: str) -> bool:
    if host == "localhost":
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False
