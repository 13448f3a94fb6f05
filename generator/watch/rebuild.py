"""One rebuild of the watched study: run the build, record how it went, print one line."""

from __future__ import annotations

import time
import traceback
from pathlib import Path
from typing import TextIO

from ..build import Progress, Rebuilder
from ..errors import NetfolioError
from .state import BuildState, PreviewState, describe_failure

__all__ = ["describe_changes", "rebuild"]

SHOWN_CHANGES = 3  # a terminal line names at most this many changed paths


def describe_changes(changes: list[str]) -> str:
    """The changed paths for the terminal: the first few, then how many more."""
    names = ["the study folder" if change == "." else change for change in changes]
    shown = ", ".join(names[:SHOWN_CHANGES])
    rest = len(names) - SHOWN_CHANGES
    return f"{shown} and {rest} more" if rest > 0 else shown


def rebuild(rebuilder: Rebuilder, root: Path, changes: list[str] | None, state: PreviewState, *,
            quiet: bool, out: TextIO) -> BuildState:
    """Build the study in ``root`` again with ``rebuilder`` (which keeps the last build's
    results in memory; ``changes`` None: the first build) and record the outcome in ``state``;
    print what changed, whether it built (or its first error) and the time.

    Every failure is kept for the preview to show, a bug's too (its traceback goes to stderr):
    one bad save must not end the preview. Ctrl-C is not caught."""
    what = "first build" if changes is None else f"{describe_changes(changes)} changed"
    started = time.perf_counter()
    try:
        rebuilder.progress = Progress(quiet=quiet)  # so its first line times this build only
        result = rebuilder.build()
    except (NetfolioError, OSError) as exc:  # OSError: the study folder went while being read
        error = describe_failure(exc, root)
    except Exception as exc:
        traceback.print_exc()
        error = describe_failure(exc, root)
        error["text"] = error["message"] = (f"internal error in netfolio ({type(exc).__name__}: "
                                            f"{exc}); the traceback is in the terminal, please "
                                            "report it")
    else:
        done = state.succeeded(result.output)
        print(f"{what}: built in {time.perf_counter() - started:.2f} s", file=out, flush=True)
        return done
    done = state.failed(error)
    more = f" (and {error['count'] - 1} more)" if error["count"] > 1 else ""
    print(f"{what}: failed in {time.perf_counter() - started:.2f} s: "
          f"{' '.join(error['text'].split())}{more}", file=out, flush=True)
    return done
