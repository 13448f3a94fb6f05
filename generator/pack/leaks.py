"""Search files for values a partner bundle must not hold: ids, labels, removed columns.

Pure functions: bytes and values in, findings out. A value matches case-insensitively (after
Unicode NFC and case folding), as written or escaped as HTML, XML or JSON would write it, and
only as a whole: "Ann" is found in "Ann, nurse" but not in "Annual", and "101" not inside the
number "0.1013". A file is read as UTF-8 text (undecodable bytes replaced); a PNG is read for
its text chunks only (tEXt, zTXt and iTXt), where image metadata lives.
"""

from __future__ import annotations

import base64
import binascii
import html
import io
import json
import re
import struct
import unicodedata
import zipfile
import zlib
from collections.abc import Iterable, Iterator, Mapping
from dataclasses import dataclass

__all__ = ["MIN_LENGTH", "Leak", "Secret", "SecretMatcher", "find_leaks", "png_text",
           "readable_text"]

MIN_LENGTH = 3  # shorter values (s1, 42) appear everywhere by chance; the scan skips them
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
_TOKEN = re.compile(r"[^\W_]+")  # a run of letters and digits


@dataclass(frozen=True)
class Secret:
    """One value a bundle must not hold, and what kind of value it is ("node id", ...)."""

    kind: str
    text: str


@dataclass(frozen=True, order=True)
class Leak:
    """A file of the bundle holds a value of this kind (the value itself is never kept)."""

    file: str
    kind: str


def _fold(text: str) -> str:
    return unicodedata.normalize("NFC", text).casefold()


def _written_forms(text: str) -> set[str]:
    """The value as each kind of file in a site may write it."""
    escaped = html.escape(text, quote=True)
    return {text, escaped, html.escape(text, quote=False), escaped.replace("&#x27;", "&apos;"),
            escaped.replace("&#x27;", "&#39;"), json.dumps(text)[1:-1],
            json.dumps(text, ensure_ascii=False)[1:-1]}


def _is_word(char: str) -> bool:
    return char.isalnum()


class SecretMatcher:
    """Finds which kinds of secret a text holds.

    Values are indexed by their first run of letters and digits, so a text is read once, token
    by token, however many values there are (a study of thousands of nodes has thousands)."""

    def __init__(self, secrets: Iterable[Secret], *, min_length: int = MIN_LENGTH,
                 exempt: Iterable[str] = ()):
        """``exempt``: values the bundle shows on purpose (a kept attribute value that happens to
        equal a label); they are not searched for."""
        shown = {_fold(text) for text in exempt}
        self._by_token: dict[str, list[tuple[int, str, str]]] = {}
        self._opaque: list[tuple[str, str]] = []  # values without a letter or digit
        values: set[str] = set()
        for secret in secrets:
            if len(secret.text) < min_length or _fold(secret.text) in shown:
                continue
            values.add(_fold(secret.text))
            for form in {_fold(f) for f in _written_forms(secret.text)}:
                first = _TOKEN.search(form)
                if first is None:
                    self._opaque.append((form, secret.kind))
                    continue
                entry = (first.start(), form, secret.kind)
                self._by_token.setdefault(first.group(), []).append(entry)
        self.count = len(values)  # distinct values searched for

    def kinds_in(self, text: str) -> set[str]:
        """The kinds of every secret ``text`` holds."""
        folded = _fold(text)
        found = {kind for form, kind in self._opaque if form in folded}
        for token in _TOKEN.finditer(folded):
            for lead, form, kind in self._by_token.get(token.group(), ()):
                start = token.start() - lead
                if kind not in found and start >= 0 and folded.startswith(form, start) and \
                        _whole(folded, start, start + len(form)):
                    found.add(kind)
        return found


def _whole(text: str, start: int, end: int) -> bool:
    """The match is not part of a longer word or number."""
    first, last = text[start], text[end - 1]
    if _is_word(first) and start > 0 and _is_word(text[start - 1]):
        return False
    if _is_word(last) and end < len(text) and _is_word(text[end]):
        return False
    # The decimals or the whole part of a longer number. Only "." counts as a decimal mark: a
    # comma is also what separates CSV values, and a missed value is worse than a false alarm.
    if first.isdigit() and start >= 2 and text[start - 1] == "." and text[start - 2].isdigit():
        return False
    if last.isdigit() and end + 1 < len(text) and text[end] == "." and text[end + 1].isdigit():
        return False
    return True


def png_text(data: bytes) -> str:
    """The keywords and text of every text chunk of a PNG, one per line."""
    parts: list[str] = []
    position = len(PNG_SIGNATURE)
    while position + 8 <= len(data):
        length, kind = struct.unpack(">I4s", data[position:position + 8])
        body = data[position + 8:position + 8 + length]
        position += 12 + length  # length, type, data, CRC
        if kind == b"tEXt":
            keyword, _, text = body.partition(b"\0")
            parts += [keyword.decode("latin-1"), text.decode("latin-1")]
        elif kind == b"zTXt":
            keyword, _, rest = body.partition(b"\0")
            parts += [keyword.decode("latin-1"), _inflate(rest[1:]).decode("latin-1")]
        elif kind == b"iTXt":
            keyword, _, rest = body.partition(b"\0")
            compressed, language_and_rest = rest[:1] == b"\1", rest[2:]
            language, _, rest = language_and_rest.partition(b"\0")
            translated, _, text = rest.partition(b"\0")
            text = _inflate(text) if compressed else text
            parts += [keyword.decode("latin-1"), language.decode("latin-1", errors="replace"),
                      translated.decode("utf-8", errors="replace"),
                      text.decode("utf-8", errors="replace")]
        elif kind == b"IEND":
            break
    return "\n".join(parts)


def _inflate(data: bytes) -> bytes:
    try:
        return zlib.decompress(data)
    except zlib.error:
        return data  # a damaged chunk is searched as it is


# A PNG embedded in an SVG or a page (matplotlib writes images and raster layers so): its
# base64 letters are pixels, not text, and by chance hold any short id between a "+" and a "/".
_EMBEDDED_PNG = re.compile(r"data:image/png;base64,\s*([A-Za-z0-9+/=\s]+)")


def _embedded_png_text(match: re.Match[str]) -> str:
    try:
        data = base64.b64decode("".join(match.group(1).split()), validate=True)
    except binascii.Error:
        return match.group(0)  # not what it says it is: searched as it is
    if not data.startswith(PNG_SIGNATURE):
        return match.group(0)
    return " " + png_text(data) + " "


def readable_text(path: str, data: bytes) -> str:
    """What of a file could carry a value: a PNG's text chunks, any other file's text with each
    embedded PNG replaced by its text chunks."""
    if data.startswith(PNG_SIGNATURE):
        return png_text(data)
    return _EMBEDDED_PNG.sub(_embedded_png_text, data.decode("utf-8", errors="replace"))


def _unpacked(files: Mapping[str, bytes]) -> Iterator[tuple[str, bytes]]:
    """Every file, and every file inside a zip among them (as ``outer.zip/inner``): deflated,
    a zip's members would hide their values from the scan."""
    for path, data in files.items():
        if path.endswith(".zip") and data.startswith(b"PK"):
            with zipfile.ZipFile(io.BytesIO(data)) as archive:
                inner = {f"{path}/{name}": archive.read(name) for name in archive.namelist()}
            yield from _unpacked(inner)
        else:
            yield path, data


def find_leaks(files: Mapping[str, bytes], matcher: SecretMatcher) -> list[Leak]:
    """Every (file, kind of value) the files hold, zips opened, sorted by file and kind."""
    leaks = {Leak(path, kind) for path, data in _unpacked(files)
             for kind in matcher.kinds_in(readable_text(path, data))}
    return sorted(leaks)
