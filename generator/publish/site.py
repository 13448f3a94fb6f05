"""Write the site atomically: build beside the output folder, then swap it in with a rename."""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import tempfile
from pathlib import Path

from ..errors import OutputError

__all__ = ["MARKER", "manifest_json", "write_site"]

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
    check_output_folder(output, inputs)
    output.parent.mkdir(parents=True, exist_ok=True)
    every = dict(files)
    every[MARKER] = MARKER_TEXT
    every["manifest.json"] = manifest_json(every)
    staging = Path(tempfile.mkdtemp(prefix=f".{output.name}.building-", dir=output.parent))
    try:
        for rel, data in every.items():
            target = staging / rel
            if not target.resolve().is_relative_to(staging.resolve()):
                raise OutputError(f"refusing to write {rel!r} outside the site folder")
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        os.chmod(staging, 0o755)
        old = None
        if output.exists():
            old = output.with_name(f".{output.name}.previous")
            if old.exists():
                shutil.rmtree(old)
            output.rename(old)
        staging.rename(output)
        if old is not None:
            shutil.rmtree(old, ignore_errors=True)
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return len(every)
