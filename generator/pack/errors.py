"""Errors of packing a partner bundle; each exits 1 as the other input errors do."""

from __future__ import annotations

from ..errors import NetfolioError

__all__ = ["LeakError", "PackError"]


class PackError(NetfolioError):
    """A bundle cannot be packed as asked: the key file, the sharing terms or ``[sharing] drop``
    is wrong. Nothing was written."""

    exit_code = 1


class LeakError(PackError):
    """The finished bundle still holds an original id, label or removed value; it was deleted.

    ``leaks`` names each file and the kind of value found in it, never the value itself."""

    def __init__(self, message: str, *, leaks: list[tuple[str, str]]):
        super().__init__(message)
        self.leaks = leaks
