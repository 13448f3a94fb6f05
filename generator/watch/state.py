"""What the preview knows about the builds so far: how many finished, whether the last one
succeeded, the error of a failed one, and which site folder to serve."""

from __future__ import annotations

import json
import threading
from dataclasses import dataclass, replace
from pathlib import Path
from typing import TypedDict

from ..config import STUDY_FILE
from ..errors import ConfigError, DataError, NetfolioError

__all__ = ["BuildError", "BuildState", "PreviewState", "describe_failure"]


class BuildError(TypedDict):
    """A failed build as the preview shows it: the first finding's place and message, the line
    ``check`` prints for it (``text``), and how many errors there were in all."""

    file: str | None
    line: int | None
    column: str | None
    value: str | None
    message: str
    text: str
    count: int


@dataclass(frozen=True)
class BuildState:
    """One moment of the preview: ``build`` counts finished builds, failed ones too."""

    build: int = 0
    ok: bool = True
    error: BuildError | None = None
    site: Path | None = None

    def as_json(self) -> bytes:
        """The state as ``/.netfolio/state`` serves it (the site folder stays private)."""
        return json.dumps({"build": self.build, "ok": self.ok, "error": self.error}).encode("utf-8")


class PreviewState:
    """The current ``BuildState``, replaced as a whole so that a reader in another thread always
    sees one consistent state."""

    def __init__(self, site: Path | None = None) -> None:
        self._lock = threading.Lock()
        self._state = BuildState(site=site)

    def snapshot(self) -> BuildState:
        with self._lock:
            return self._state

    def succeeded(self, site: Path) -> BuildState:
        """Record a build that wrote ``site``."""
        with self._lock:
            self._state = BuildState(build=self._state.build + 1, site=site)
            return self._state

    def failed(self, error: BuildError) -> BuildState:
        """Record a failed build; the last good site stays the one served."""
        with self._lock:
            self._state = replace(self._state, build=self._state.build + 1, ok=False, error=error)
            return self._state


def describe_failure(exc: BaseException, root: Path) -> BuildError:
    """The error of a failed build of the study in ``root``, as the preview shows it.

    A ``DataError`` is described by its first finding (``count`` says how many there were); a
    ``ConfigError`` names the study file and carries its dotted key in the message; anything
    else is its message alone."""
    if isinstance(exc, DataError) and exc.findings:
        first = exc.findings[0]
        return BuildError(file=first.file, line=first.line, column=first.column, value=first.value,
                          message=first.message, text=first.format(), count=len(exc.findings))
    if isinstance(exc, ConfigError):
        file = _relative(exc.path, root) if exc.path is not None else STUDY_FILE
        key = f"[{exc.key}] " if exc.key else ""
        message = f"{key}{exc.args[0]}"
        return BuildError(file=file, line=None, column=None, value=None, message=message,
                          text=f"{file}: {message}", count=1)
    message = exc.format_message() if isinstance(exc, NetfolioError) else str(exc)
    return BuildError(file=None, line=None, column=None, value=None, message=message,
                      text=message, count=1)


def _relative(path: Path, root: Path) -> str:
    try:
        return path.relative_to(root).as_posix()
    except ValueError:
        return path.name
