"""Where a bundle goes, and the checks that keep it from overwriting what netfolio did not
write."""

from __future__ import annotations

from pathlib import Path

from ..cache import CACHE_DIR
from ..config import StudyConfig
from ..errors import OutputError
from .bundle import is_netfolio_bundle, title_slug

__all__ = ["BUNDLES_DIR", "bundle_target"]

BUNDLES_DIR = "bundles"  # in the study folder, the default home of bundles


def bundle_target(study: StudyConfig, out: Path | None) -> Path:
    """The bundle's path: ``out``, or ``<study>/bundles/<title-slug>.zip``. Refused (an
    OutputError) when it is not a .zip, when the default path leads out of the study (a link),
    lies inside the site folder or the cache (both replaced by netfolio), is a folder, or is a
    file netfolio did not write."""
    given = out if out is not None else study.root / BUNDLES_DIR / f"{title_slug(study.title)}.zip"
    target = given.resolve()
    name = f"--out {out}" if out is not None else f"the bundle path {target}"
    if out is None and not target.is_relative_to(study.root):
        # bundles/ (or the zip in it) is a link: without --out nothing is written outside
        raise OutputError(f"{study.root / BUNDLES_DIR} leads out of the study folder (a link to "
                          f"{target.parent}); netfolio writes nothing outside the study unless "
                          "you say where with --out")
    if target.suffix.lower() != ".zip":
        raise OutputError(f"{name} must name a .zip file")
    for folder, what in ((study.output, "the output folder"), (study.root / CACHE_DIR, "the cache")):
        if target.is_relative_to(folder.resolve()):
            raise OutputError(f"{name} lies inside {what} {folder}, which netfolio replaces; "
                              "choose a path outside it")
    if target.is_dir():
        raise OutputError(f"{name} is a folder; give the path of a .zip file")
    if (target.exists() or target.is_symlink()) and not is_netfolio_bundle(target):
        raise OutputError(f"{name} exists and is not a bundle netfolio wrote; netfolio never "
                          "overwrites it: choose another --out or move the file away")
    return target
