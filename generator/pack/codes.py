"""The study's secret key and the codes that stand for node ids in partner bundles.

A code is the HMAC-SHA-256 of the node id under the study's key, shortened to a readable
``n-3f9a2c7d``. The same key gives the same codes in every bundle (partners can match rows
between bundles of one study); without the key a code cannot be traced back to its id, and a
new key gives every node a new code.
"""

from __future__ import annotations

import hashlib
import hmac
import os
import re
import secrets
from collections.abc import Iterable
from dataclasses import dataclass
from pathlib import Path

from .errors import PackError

__all__ = ["CODE_PREFIX", "KEY_FILE", "StudyKey", "node_codes", "read_study_key", "save_study_key"]

KEY_FILE = ".netfolio-key"
KEY_BYTES = 32
CODE_PREFIX = "n-"
CODE_DIGITS = 8  # hex digits of the digest in a code; more only when two codes would collide
_KEY_TEXT = re.compile(f"[0-9a-fA-F]{{{2 * KEY_BYTES}}}")


@dataclass(frozen=True)
class StudyKey:
    """The study's secret. ``new``: made by this pack and not yet saved (it is saved only once a
    bundle is written); ``shared``: the saved file can be read by other users of the computer."""

    secret: bytes
    path: Path
    new: bool = False
    shared: bool = False


def read_study_key(root: Path) -> StudyKey:
    """The key in ``root``/.netfolio-key, or a new random one when there is no such file."""
    path = root / KEY_FILE
    restore = (f"restore {KEY_FILE} from your backup, or delete it to make a new key (every node "
               "then gets a new code, unlike those in earlier bundles)")
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        if path.is_symlink():
            raise PackError(f"{path} is a link to a file that does not exist; {restore}") from None
        return StudyKey(secrets.token_bytes(KEY_BYTES), path, new=True)
    except IsADirectoryError:
        raise PackError(f"{path} is a folder, not netfolio's key file; move it away") from None
    except OSError as exc:
        raise PackError(f"the key file {path} cannot be read ({exc.strerror or exc}); fix its "
                        "permissions so you can read it") from None
    text = data.decode("ascii", errors="replace").strip()
    if not _KEY_TEXT.fullmatch(text):
        raise PackError(f"the key file {path} is malformed: it must hold {2 * KEY_BYTES} "
                        f"hexadecimal digits ({KEY_BYTES} bytes) and nothing else; {restore}")
    return StudyKey(bytes.fromhex(text), path, shared=bool(path.stat().st_mode & 0o077))


def save_study_key(key: StudyKey) -> None:
    """Write a new key readable by its owner only (0600); an existing file is never replaced."""
    descriptor = os.open(key.path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
    try:
        with os.fdopen(descriptor, "w", encoding="ascii") as handle:
            handle.write(key.secret.hex() + "\n")
        os.chmod(key.path, 0o600)  # whatever the umask allowed
    except BaseException:
        key.path.unlink(missing_ok=True)  # a key cut short (a full disk) would read as malformed
        raise


def node_codes(ids: Iterable[str], secret: bytes) -> dict[str, str]:
    """A code for every id: ``n-`` and the first 8 hex digits of its HMAC-SHA-256 under
    ``secret``. Should two ids share a code, or a code equal an id, every code grows by two
    digits until none does."""
    unique = sorted(set(ids))
    digests = {node: hmac.new(secret, node.encode("utf-8"), hashlib.sha256).hexdigest()
               for node in unique}
    originals = set(unique)
    for digits in range(CODE_DIGITS, 2 * hashlib.sha256().digest_size + 1, 2):
        codes = {node: CODE_PREFIX + digest[:digits] for node, digest in digests.items()}
        made = set(codes.values())
        if len(made) == len(codes) and not made & originals:
            return codes
    # Full digests of different ids differ unless SHA-256 itself collides.
    raise PackError("could not make a distinct code for every node id")
