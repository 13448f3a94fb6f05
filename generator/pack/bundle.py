"""The bundle as a file: a deterministic zip of the site with README.txt, manifest.json and
SHA256SUMS at its root.

The same files give the same zip bytes: entries sorted by path, every timestamp the same
(``SOURCE_DATE_EPOCH`` when set, else 1980-01-01, the earliest a zip can hold), every file
mode 0644, relative paths only. The zip's comment marks it as netfolio's, so a later pack may
replace it and never a file netfolio did not write.
"""

from __future__ import annotations

import hashlib
import re
import unicodedata
import zipfile
from collections.abc import Mapping
from pathlib import Path

from ..publish import manifest_json
from ..publish.archive import ZipTime, safe_member, zip_bytes, zip_time

__all__ = ["BUNDLE_COMMENT", "MANIFEST", "README", "SUMS", "bundle_files", "is_netfolio_bundle",
           "sha256sums", "title_slug", "write_zip", "zip_time"]

BUNDLE_COMMENT = b"netfolio partner bundle"
README = "README.txt"
MANIFEST = "manifest.json"
SUMS = "SHA256SUMS"


def title_slug(title: str) -> str:
    """A file name from the study title: ``Clinic collaborative: advice`` ->
    ``clinic-collaborative-advice`` (accents dropped, anything else but a-z and 0-9 a dash)."""
    plain = unicodedata.normalize("NFKD", title).encode("ascii", "ignore").decode("ascii")
    slug = re.sub(r"[^a-z0-9]+", "-", plain.lower()).strip("-")
    return slug[:80].rstrip("-") or "study"


def sha256sums(files: Mapping[str, bytes]) -> bytes:
    """Lines ``sha256sum -c`` reads: the hex digest, two spaces, the path (sorted by path). A
    path holding a backslash or a line break is escaped as GNU sha256sum writes it."""
    lines = []
    for path, data in sorted(files.items()):
        digest = hashlib.sha256(data).hexdigest()
        if "\\" in path or "\n" in path:
            escaped = path.replace("\\", "\\\\").replace("\n", "\\n")
            lines.append(f"\\{digest}  {escaped}\n")
        else:
            lines.append(f"{digest}  {path}\n")
    return "".join(lines).encode("utf-8")


def bundle_files(site: Mapping[str, bytes], readme: str) -> dict[str, bytes]:
    """The site's files plus README.txt, manifest.json (every file but itself and the sums)
    and SHA256SUMS (every file but itself)."""
    files = dict(site)
    files[README] = readme.encode("utf-8")
    files[MANIFEST] = manifest_json(files)
    files[SUMS] = sha256sums(files)
    return dict(sorted(files.items()))


def write_zip(target: Path, files: Mapping[str, bytes], *, date_time: ZipTime) -> None:
    """Write ``files`` (relative posix path -> bytes) to ``target`` as a deterministic zip."""
    for path in files:
        if not safe_member(path):
            raise ValueError(f"refusing to pack {path!r}: not a plain relative path")
    target.write_bytes(zip_bytes(files, date_time=date_time, comment=BUNDLE_COMMENT))


def is_netfolio_bundle(path: Path) -> bool:
    """Whether ``path`` is a zip that netfolio wrote (its comment says so)."""
    try:
        with zipfile.ZipFile(path) as archive:
            return archive.comment.startswith(BUNDLE_COMMENT)
    except (OSError, zipfile.BadZipFile):
        return False
