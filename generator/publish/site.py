"""Write the site atomically: build beside the output folder, then swap it in with a rename.

Beside ``<output>`` a build makes ``.<output>.building-XXXXXXXX`` (the new site while it is
written) and, for the moment of the swap, ``.<output>.previous`` (the last site). A build that is
killed can leave either behind; ``recover_interrupted_site`` puts the last site back and removes
the rest. Callers hold the study's lock (``lock.py``), so no other build is using them.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import shutil
import sys
import tempfile
import threading
from pathlib import Path
from typing import Any

from ..errors import OutputError

__all__ = ["MARKER", "SWAP_LOCK", "check_output_folder", "manifest_json", "recover_interrupted_site",
           "write_site"]

MARKER = ".netfolio-site"
MARKER_TEXT = b"This folder was written by netfolio and is replaced on every build.\n"


def manifest_json(files: dict[str, bytes]) -> bytes:
    """Every file of the site with its size and SHA-256, sorted by path."""
    entries = [{"path": path, "size": len(data), "sha256": hashlib.sha256(data).hexdigest()}
               for path, data in sorted(files.items())]
    return (json.dumps({"files": entries}, indent=2) + "\n").encode("utf-8")


def check_output_folder(output: Path, inputs: list[Path]) -> None:
    """Refuse an output folder that holds an input file or that netfolio did not make."""
    for path in inputs:
        if path.resolve().is_relative_to(output):
            raise OutputError(f"the output folder {output} holds the input file {path}; choose "
                              "another [study] output")
    if output.exists():
        if not output.is_dir():
            raise OutputError(f"the output path {output} is a file, not a folder; netfolio will "
                              "not overwrite it")
        if any(output.iterdir()) and not (output / MARKER).is_file():
            raise OutputError(f"the output folder {output} exists, is not empty and was not made by "
                              f"netfolio (no {MARKER} file); netfolio never empties a folder it did "
                              "not make: choose another output or empty it yourself")


def write_site(output: Path, files: dict[str, bytes], *, inputs: list[Path]) -> int:
    """Write ``files`` (relative posix path -> bytes) plus the marker and manifest.json to
    ``output``, replacing the previous site only once the new one is complete. Returns the number
    of files written."""
    output = output.resolve()
    recover_interrupted_site(output)
    check_output_folder(output, inputs)
    previous = _previous_of(output)
    if output.exists() and os.path.lexists(previous) and not _made_by_netfolio(previous):
        raise OutputError(f"{previous} exists beside the output folder and was not made by "
                          "netfolio; netfolio needs that name for a moment while it swaps the "
                          "new site in: move it away")
    every = dict(files)
    every[MARKER] = MARKER_TEXT
    every["manifest.json"] = manifest_json(every)
    try:
        output.parent.mkdir(parents=True, exist_ok=True)
        staging = Path(tempfile.mkdtemp(prefix=_staging_prefix(output), dir=output.parent))
    except OSError as exc:
        raise _write_error(output, exc) from None
    try:
        for rel, data in every.items():
            target = staging / rel
            if not target.resolve().is_relative_to(staging.resolve()):
                raise OutputError(f"refusing to write {rel!r} outside the site folder")
            try:
                target.parent.mkdir(parents=True, exist_ok=True)
                target.write_bytes(data)
            except OSError as exc:
                raise _write_error(output, exc) from None
        os.chmod(staging, 0o755)
        with SWAP_LOCK:
            _swap_in(staging, output)
    except BaseException:
        try:
            _remove_tree(staging)
        except OSError:
            pass  # report the first failure, not this one; the next build removes the rest
        raise
    return len(every)


def _write_error(output: Path, exc: OSError) -> OutputError:
    """The error for a site that could not be written beside ``output`` (the disk is full, the
    folder is read-only): it names the folder and the reason, and says the last site stays."""
    reason = exc.strerror or str(exc)
    return OutputError(f"could not write the new site beside {output} ({reason}); nothing was "
                       "replaced: the last site is unchanged. Free some space or fix the "
                       f"folder's permissions in {output.parent} and build again")


# Held while the new site is swapped in. A preview server in the same process takes it while it
# opens a file, so a reader gets the old site or the new one, never the moment between renames.
SWAP_LOCK = threading.RLock()


def recover_interrupted_site(output: Path) -> None:
    """Undo what killed builds left beside ``output``; call it holding the study's lock.

    If ``output`` is missing and ``.<output>.previous`` is a site netfolio made, that is the last
    site, caught between the two renames of a swap: it is moved back. If both exist, the previous
    copy is a leftover and is removed. ``.<output>.building-*`` folders are half-written sites of
    killed builds and are removed. Nothing else is touched: only real folders (not links) with
    exactly those names, and a previous copy only when it holds netfolio's marker or is empty.
    """
    output = output.resolve()
    previous = _previous_of(output)
    if _is_folder(previous) and _made_by_netfolio(previous):
        if not os.path.lexists(output):
            previous.rename(output)
        else:
            _remove_tree(previous)
    for leftover in _staging_leftovers(output):
        _remove_tree(leftover)


def _swap_in(staging: Path, output: Path) -> None:
    """Rename ``staging`` to ``output``, moving the last site aside first and putting it back if
    the second rename fails, so ``output`` is never left missing."""
    previous = _previous_of(output)
    moved_aside = False
    if output.exists():
        _remove_tree(previous)  # a leftover netfolio made (checked above)
        try:
            output.rename(previous)
            moved_aside = True
        except FileNotFoundError:
            pass  # it is gone already; nothing to keep
        except OSError as exc:
            raise OutputError(f"could not move the last site {output} aside to replace it "
                              f"({exc.strerror}); it is unchanged") from None
    try:
        staging.rename(output)
    except BaseException as exc:
        if moved_aside:
            previous.rename(output)  # put the last good site back before reporting
        if isinstance(exc, OSError):
            raise OutputError(f"could not move the new site into place at {output} "
                              f"({exc.strerror}); the last site is unchanged") from None
        raise
    if moved_aside:
        try:
            _remove_tree(previous)
        except OSError:
            pass  # the new site is in place; the next build removes this copy


def _previous_of(output: Path) -> Path:
    return output.with_name(f".{output.name}.previous")


def _staging_prefix(output: Path) -> str:
    return f".{output.name}.building-"


# tempfile.mkdtemp adds letters, digits and underscores after the prefix; a name with anything
# else after it (a dot, a space, a dash) is not one of ours.
_STAGING_SUFFIX = re.compile(r"[A-Za-z0-9_]+")


def _staging_leftovers(output: Path) -> list[Path]:
    """Folders beside ``output`` that a build made to write a new site in."""
    prefix = _staging_prefix(output)
    try:
        with os.scandir(output.parent) as scan:
            entries = list(scan)
    except FileNotFoundError:
        return []
    return sorted(Path(entry.path) for entry in entries
                  if entry.name.startswith(prefix)
                  and _STAGING_SUFFIX.fullmatch(entry.name[len(prefix):])
                  and entry.is_dir(follow_symlinks=False))


def _is_folder(path: Path) -> bool:
    return path.is_dir() and not path.is_symlink()


def _made_by_netfolio(folder: Path) -> bool:
    """True for a folder holding netfolio's marker, or an empty one (an empty output folder is
    used as is, so its previous copy can be empty too)."""
    if not _is_folder(folder):
        return False
    return (folder / MARKER).is_file() or not any(folder.iterdir())


def _remove_tree(path: Path) -> None:
    """``shutil.rmtree`` that does not fail when ``path``, or anything in it, is already gone
    (another build may have removed it first); any other error is raised."""
    def ignore_missing(function: object, name: str, exc_info: Any) -> None:
        # onexc (3.12+) passes the exception, onerror passes sys.exc_info()
        error = exc_info if isinstance(exc_info, BaseException) else exc_info[1]
        if not isinstance(error, FileNotFoundError):
            raise error

    if sys.version_info >= (3, 12):
        shutil.rmtree(path, onexc=ignore_missing)
    else:
        shutil.rmtree(path, onerror=ignore_missing)
