"""Errors netfolio reports to the user, each with its exit code."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

__all__ = ["ConfigError", "DataError", "Finding", "LockError", "NetfolioError", "OutputError",
           "UsageError"]


class NetfolioError(Exception):
    """Base of every error netfolio expects; the CLI prints it and exits with ``exit_code``."""

    exit_code = 3

    def format_message(self) -> str:
        return str(self)


class UsageError(NetfolioError):
    """The command line is wrong."""

    exit_code = 2


class ConfigError(NetfolioError):
    """study.toml is wrong; ``key`` is the dotted key, e.g. ``network[2].weight_means``."""

    exit_code = 1

    def __init__(self, message: str, *, key: str | None = None, path: Path | None = None,
                 line: int | None = None, locate: bool = False):
        super().__init__(message)
        self.key = key
        self.path = path
        self.line = line  # the line of study.toml holding the key, when known
        self.locate = locate  # the loader should find the key's line in study.toml

    def format_message(self) -> str:
        where = f"{self.path.name}: " if self.path else ""
        if self.path and self.line:
            where = f"{self.path.name}, line {self.line}: "
        key = f"[{self.key}] " if self.key else ""
        return f"{where}{key}{self.args[0]}"


@dataclass(frozen=True)
class Finding:
    """One thing the data checks found: a fix applied, a refusal, or an error that stops the build.

    ``line`` counts as a text editor does: the header is line 1 of a CSV file. A Parquet file
    has no lines: its findings count data rows from 1 instead, and ``unit`` is "row".
    """

    level: str  # "error" | "warning" | "fix" | "note"
    file: str
    message: str
    line: int | None = None
    column: str | None = None
    value: str | None = None
    count: int = 1
    unit: str = "line"  # what ``line`` counts: "line" (CSV) or "row" (Parquet)

    def format(self) -> str:
        where = self.file + (f", {self.unit} {self.line}" if self.line else "")
        where += f", column '{self.column}'" if self.column else ""
        value = f" (value: {self.value!r})" if self.value is not None else ""
        return f"{where}: {self.message}{value}"


class DataError(NetfolioError):
    """One or more data files are wrong; ``findings`` holds every error with file and line."""

    exit_code = 1

    def __init__(self, findings: list[Finding] | Finding):
        self.findings = [findings] if isinstance(findings, Finding) else list(findings)
        super().__init__(self.format_message())

    def format_message(self) -> str:
        return "\n".join(f.format() for f in self.findings)


class OutputError(NetfolioError):
    """The output folder is unsafe to write (it holds inputs, or netfolio did not make it)."""

    exit_code = 1


class LockError(NetfolioError):
    """Another build holds the study's lock, or the lock file cannot be made.

    ``path`` is the lock file; ``pid``, ``host`` and ``since`` name its holder when it names one.
    """

    exit_code = 1

    def __init__(self, message: str, *, path: Path, pid: int | None = None,
                 host: str | None = None, since: str | None = None):
        super().__init__(message)
        self.path = path
        self.pid = pid
        self.host = host
        self.since = since
