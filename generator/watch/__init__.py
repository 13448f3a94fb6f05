"""``netfolio watch``: build the study, serve a live preview of the site, rebuild on change.

The build runs in this process, one at a time, after each burst of changes; the preview server
answers from other threads meanwhile, with the last good site. See ``watcher`` (which changes
count), ``rebuild`` (one build and its terminal line) and ``server`` (what is served).
"""

from __future__ import annotations

import sys
import threading
import webbrowser
from pathlib import Path
from typing import TextIO

from ..build import Rebuilder, Workers
from ..config import DEFAULT_OUTPUT, STUDY_FILE, load_study
from ..errors import ConfigError
from ..publish.site import MARKER
from .rebuild import rebuild
from .server import DEFAULT_HOST, DEFAULT_PORT, ServeError, exposure_warning, start_server
from .state import PreviewState
from .watcher import Debouncer, StudyWatcher

__all__ = ["DEFAULT_HOST", "DEFAULT_PORT", "ServeError", "watch_study"]

SYNC_SECONDS = 0.5  # how often to look for new subfolders, or a deleted study folder back


def watch_study(project: Path | str, *, host: str = DEFAULT_HOST, port: int = DEFAULT_PORT,
                open_browser: bool = False, quiet: bool = False,
                out: TextIO | None = None, workers: Workers | None = None) -> int:
    """Serve the study's site on ``host``:``port`` and rebuild it on every change until Ctrl-C;
    returns 0 then.

    Raises ``ConfigError`` if ``project`` holds no study.toml, and ``ServeError`` if the port
    cannot be had; any failure of a build after that is shown in the preview instead.
    ``workers`` says where networks are analysed and drawn, as for a build."""
    out = out if out is not None else sys.stdout
    root = Path(project).resolve()
    output = _output_folder(root)
    site = output if (output / MARKER).is_file() else None  # an earlier build's site, until ours
    state = PreviewState(site)
    server = start_server(host, port, state)
    print(f"serving {server.url}", file=out, flush=True)
    warning = exposure_warning(host)
    if warning is not None:
        print(f"warning  {warning}", file=sys.stderr, flush=True)
    threading.Thread(target=server.serve_forever, kwargs={"poll_interval": 0.2}, daemon=True,
                     name="netfolio-preview").start()
    changes = Debouncer()
    watcher = StudyWatcher(root, output, changes.add, warn=lambda message: print(
        f"warning  {message}", file=sys.stderr, flush=True))
    rebuilder = Rebuilder(root, workers=workers)
    try:
        watcher.start()  # before the first build, so a save while it runs is not missed
        _follow(rebuild(rebuilder, root, None, state, quiet=quiet, out=out).site, watcher)
        if open_browser:
            webbrowser.open(server.url)
        while True:
            batch = changes.wait(SYNC_SECONDS)
            watcher.sync()
            if batch:
                _follow(rebuild(rebuilder, root, batch, state, quiet=quiet, out=out).site, watcher)
    except KeyboardInterrupt:
        print("stopped", file=out, flush=True)
    finally:
        watcher.stop()
        server.shutdown()
        server.server_close()
    return 0


def _output_folder(root: Path) -> Path:
    """The site folder study.toml names, or the default one while study.toml is broken (the
    first build then reports why). No study.toml at all: not a study folder, a ConfigError."""
    try:
        return load_study(root).output
    except ConfigError:
        if not (root / STUDY_FILE).is_file():
            raise
        return root / DEFAULT_OUTPUT


def _follow(site: Path | None, watcher: StudyWatcher) -> None:
    """Ignore the site folder where the last good build wrote it (study.toml may move it)."""
    if site is not None:
        watcher.output = site
