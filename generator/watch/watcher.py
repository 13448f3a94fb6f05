"""Changes in a study folder, as watchdog reports them, gathered into one rebuild per burst.

Editors save through temporary files and renames, so one save is several events; and a build
writes its own files (the site, the cache, the lock) into the study folder. ``watched_change``
keeps only the changes that can alter the site, and ``Debouncer`` turns a burst of them into one
batch once the folder has been quiet for a moment.
"""

from __future__ import annotations

import contextlib
import os
import stat
import threading
import time
from collections.abc import Callable
from pathlib import Path, PurePath

from watchdog.events import (
    DirCreatedEvent,
    DirDeletedEvent,
    DirMovedEvent,
    FileClosedEvent,
    FileCreatedEvent,
    FileDeletedEvent,
    FileModifiedEvent,
    FileMovedEvent,
    FileSystemEvent,
    FileSystemEventHandler,
)
from watchdog.observers import Observer
from watchdog.observers.api import BaseObserver, ObservedWatch
from watchdog.observers.polling import PollingObserver

__all__ = ["LONGEST_SECONDS", "QUIET_SECONDS", "Debouncer", "StudyWatcher", "watched_change"]

QUIET_SECONDS = 0.3  # a batch is ready once no change came for this long
LONGEST_SECONDS = 3.0  # ... or this long after its first change, so a steady writer still rebuilds
# Opening and reading a file changes nothing, and every build reads every input: listening to
# those events would rebuild for ever.
WATCHED_EVENTS: list[type[FileSystemEvent]] = [
    FileCreatedEvent, FileModifiedEvent, FileClosedEvent, FileDeletedEvent, FileMovedEvent,
    DirCreatedEvent, DirDeletedEvent, DirMovedEvent,
]
BUNDLES = "bundles"  # where partner bundles are packed, at the top of the study folder


def watched_change(root: Path, output: Path, path: str) -> str | None:
    """The changed ``path`` relative to the study folder ``root`` (posix, "." for the folder
    itself), or None when the change cannot alter the site.

    Ignored: anything outside the study folder; the site folder ``output``; ``bundles/``; and any
    path with a part that starts with a dot, which covers what builds leave in the study folder
    (``.netfolio-cache/``, ``.netfolio-lock``, ``.<output>.building-*``, ``.<output>.previous``),
    version-control folders and editors' hidden temporary files. Editors' backup copies
    (``name~``) and autosaves (``#name#``) are ignored too. Paths are compared as written: the
    file may be gone already."""
    changed = PurePath(path)
    if not changed.is_relative_to(root):
        return None
    if output.is_relative_to(root) and changed.is_relative_to(output):
        return None
    parts = changed.relative_to(root).parts
    if not parts:
        return "."
    if parts[0] == BUNDLES or any(part.startswith(".") for part in parts):
        return None
    name = parts[-1]
    if name.endswith("~") or (name.startswith("#") and name.endswith("#")):
        return None
    return "/".join(parts)


class Debouncer:
    """Collects changed paths from any thread; hands them out as one sorted batch once
    ``quiet`` seconds pass with no new change, or ``longest`` seconds after the first."""

    def __init__(self, *, quiet: float = QUIET_SECONDS, longest: float = LONGEST_SECONDS,
                 clock: Callable[[], float] = time.monotonic) -> None:
        self.quiet = quiet
        self.longest = longest
        self._clock = clock
        self._changes: set[str] = set()
        self._first = 0.0
        self._last = 0.0
        self._condition = threading.Condition()

    def add(self, path: str) -> None:
        """Note one change (called from the observer's thread)."""
        with self._condition:
            now = self._clock()
            if not self._changes:
                self._first = now
            self._changes.add(path)
            self._last = now
            self._condition.notify_all()

    def take_ready(self) -> list[str] | None:
        """The batch, if one is ready now; else None."""
        with self._condition:
            return self._take(self._clock())

    def wait(self, timeout: float) -> list[str] | None:
        """Block until a batch is ready (and return it) or ``timeout`` seconds pass (None)."""
        deadline = self._clock() + timeout
        with self._condition:
            while True:
                now = self._clock()
                batch = self._take(now)
                if batch is not None or now >= deadline:
                    return batch
                wake = deadline
                if self._changes:
                    wake = min(wake, self._last + self.quiet, self._first + self.longest)
                self._condition.wait(max(wake - now, 0.001))

    def _take(self, now: float) -> list[str] | None:
        if not self._changes:
            return None
        if now - self._last < self.quiet and now - self._first < self.longest:
            return None
        batch = sorted(self._changes)
        self._changes.clear()
        return batch


class _Forward(FileSystemEventHandler):
    """Passes each event of the observer's thread on to its ``StudyWatcher``."""

    def __init__(self, watcher: StudyWatcher) -> None:
        self._watcher = watcher

    def on_any_event(self, event: FileSystemEvent) -> None:
        self._watcher.saw(event)


class StudyWatcher:
    """Watches the study folder ``root`` and calls ``on_change`` with each changed path that
    can alter the site (``watched_change``), from watchdog's thread.

    The study folder's own entries are watched, and each of its subfolders that can hold
    inputs recursively: the site, the cache, the half-written sites of builds and ``.git`` are
    not watched at all, so a build's own writes cost nothing. ``sync``, called now and then,
    matches the watches to the folder as it is: a new subfolder is watched, a gone one dropped,
    and a study folder deleted (its watch ends with it) or moved away (its watch follows the old
    folder) is watched again once a folder of that name is back. ``output`` is the site folder;
    set it when a build writes the site elsewhere."""

    def __init__(self, root: Path, output: Path, on_change: Callable[[str], None], *,
                 warn: Callable[[str], None]) -> None:
        self.root = root
        self.output = output
        self._on_change = on_change
        self._warn = warn
        self._handler = _Forward(self)
        self._observer = _new_observer()
        # folder -> (its watch, which folder it was when watched: device and inode)
        self._watches: dict[Path, tuple[ObservedWatch, tuple[int, int]]] = {}
        self._lost: set[Path] = set()  # watched folders reported deleted or moved away

    def start(self) -> None:
        self._observer.start()
        self.sync(report=False)

    def stop(self) -> None:
        self._observer.stop()
        self._observer.join(timeout=5)

    @property
    def watched(self) -> list[Path]:
        """The folders watched now, sorted."""
        return sorted(self._watches)

    def saw(self, event: FileSystemEvent) -> None:
        """One event from watchdog: pass on its paths that matter; note a watched folder that
        went."""
        paths = [os.fsdecode(event.src_path), os.fsdecode(event.dest_path)]
        if event.event_type in ("deleted", "moved") and Path(paths[0]) in self._watches:
            self._lost.add(Path(paths[0]))
        for path in paths:
            if path:
                relative = watched_change(self.root, self.output, path)
                if relative is not None:
                    self._on_change(relative)

    def sync(self, *, report: bool = True) -> None:
        """Watch the folders that should be watched now, and only those. With ``report``, a
        folder watched anew counts as a change (files may have come in before its watch did)."""
        wanted = self._wanted()
        for folder in [f for f in self._watches if f not in wanted]:
            self._drop(folder)
        for folder, (recursive, identity) in wanted.items():
            if folder in self._watches and self._watches[folder][1] == identity \
                    and folder not in self._lost:
                continue
            self._drop(folder)
            try:
                watch = self._observer.schedule(self._handler, str(folder), recursive=recursive,
                                                event_filter=WATCHED_EVENTS)
            except FileNotFoundError:
                continue  # gone again already; the next call looks again
            except OSError as exc:
                self._poll_instead(exc)
                return
            self._watches[folder] = (watch, identity)
            if report:
                self._on_change("." if folder == self.root else folder.relative_to(self.root).as_posix())

    def _wanted(self) -> dict[Path, tuple[bool, tuple[int, int]]]:
        """Folder -> (watch recursively?, its identity) for the study folder and each subfolder
        of it that can hold inputs."""
        root = _identity(self.root)
        if root is None:
            return {}
        wanted = {self.root: (False, root)}
        try:
            entries = list(os.scandir(self.root))
        except OSError:
            return {}
        for entry in entries:
            folder = Path(entry.path)
            identity = _identity(folder) if entry.is_dir(follow_symlinks=False) else None
            if identity is not None and watched_change(self.root, self.output, entry.path):
                wanted[folder] = (True, identity)
        return wanted

    def _drop(self, folder: Path) -> None:
        self._lost.discard(folder)
        if folder in self._watches:
            with contextlib.suppress(KeyError):  # watchdog dropped it already
                self._observer.unschedule(self._watches.pop(folder)[0])

    def _poll_instead(self, exc: OSError) -> None:
        """The system's limit of inotify watches or open files was reached: poll instead,
        which needs neither."""
        if isinstance(self._observer, PollingObserver):
            raise exc
        self._warn(f"cannot watch {self.root} for changes ({exc.strerror or exc}); checking it "
                   "every second instead")
        self._observer.stop()
        self._observer = PollingObserver()
        self._watches.clear()
        self._observer.start()
        self.sync()


def _new_observer() -> BaseObserver:
    try:
        return Observer()
    except OSError:  # no inotify instance left on this system
        return PollingObserver()


def _identity(folder: Path) -> tuple[int, int] | None:
    """Which folder is at this path now (device and inode), or None when there is none."""
    try:
        info = folder.stat()
    except OSError:
        return None
    return (info.st_dev, info.st_ino) if stat.S_ISDIR(info.st_mode) else None
