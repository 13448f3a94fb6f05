"""One build of a study at a time: a lock file in the study folder that names its holder.

A build creates ``<study>/.netfolio-lock`` with ``O_CREAT | O_EXCL``, so exactly one process
can make it, and writes its process id, host name and start time into it. It removes the file
when it ends, however it ends, and only if the file is still the one it wrote. A second build
polls for ``WAIT_SECONDS`` and then stops with a ``LockError`` that names the holder.

A lock is taken over without asking only when it is provably stale: it names this host and a
process id that no longer exists, or it names no owner at all and is older than
``UNREADABLE_GRACE_SECONDS`` (a build stopped between creating the file and writing it, or a
crash before the text reached the disk). A lock from another host is never judged from here, as
its process id means nothing on this machine; the message says how to remove it.

Taking over is safe between two builds that find the same stale lock at once: each first moves
the file aside under a name of its own and checks it moved the stale file it judged, putting
back anything else. (Three builds racing over one stale lock within microseconds could still
both proceed; the cost is the swap race this lock exists to prevent, not lost data.)
"""

from __future__ import annotations

import datetime as dt
import json
import os
import secrets
import socket
import stat
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

from ..errors import LockError

__all__ = ["LOCK_NAME", "LockOwner", "hold_study_lock"]

LOCK_NAME = ".netfolio-lock"
WAIT_SECONDS = 5.0  # how long a second build waits for the first before giving up
POLL_SECONDS = 0.1
UNREADABLE_GRACE_SECONDS = 10.0  # a holder writes its name within microseconds of creating


@dataclass(frozen=True)
class LockOwner:
    """Who holds a lock: process id, host name, UTC start time (ISO 8601) and a random token
    that tells this holding apart from a later one by a process that got the same id."""

    pid: int
    host: str
    since: str
    token: str = ""

    @classmethod
    def this_process(cls) -> LockOwner:
        now = dt.datetime.now(dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
        return cls(pid=os.getpid(), host=socket.gethostname(), since=now,
                   token=secrets.token_hex(8))

    def to_bytes(self) -> bytes:
        fields = {"pid": self.pid, "host": self.host, "since": self.since, "token": self.token}
        return (json.dumps(fields) + "\n").encode("utf-8")

    @classmethod
    def from_bytes(cls, data: bytes) -> LockOwner | None:
        """The owner a lock file names, or None when it names none (empty, cut short, garbled)."""
        try:
            fields = json.loads(data.decode("utf-8"))
        except (UnicodeDecodeError, ValueError):
            return None
        if not isinstance(fields, dict):
            return None
        pid, host = fields.get("pid"), fields.get("host")
        # A pid of 0 or below would make os.kill probe a whole process group.
        if not isinstance(pid, int) or isinstance(pid, bool) or not 0 < pid < 2**31:
            return None
        if not isinstance(host, str) or not host:
            return None
        since, token = fields.get("since", ""), fields.get("token", "")
        return cls(pid=pid, host=host, since=since if isinstance(since, str) else "",
                   token=token if isinstance(token, str) else "")

    def since_text(self) -> str:
        """The start time as "2024-03-01 09:30:00 UTC", or as written if it does not parse."""
        try:
            when = dt.datetime.fromisoformat(self.since.replace("Z", "+00:00"))
        except ValueError:
            return self.since or "an unknown time"
        if when.tzinfo is not None:
            when = when.astimezone(dt.timezone.utc)
        return when.strftime("%Y-%m-%d %H:%M:%S UTC")


@contextmanager
def hold_study_lock(folder: Path, *,
                    on_wait: Callable[[LockOwner], None] | None = None) -> Iterator[LockOwner]:
    """Hold ``folder``/.netfolio-lock for the duration of the ``with`` block.

    Waits up to ``WAIT_SECONDS`` for another holder, calling ``on_wait`` once with that holder
    when the wait begins, then raises ``LockError``. Yields the owner this process wrote.
    """
    path = Path(folder) / LOCK_NAME
    me = LockOwner.this_process()
    written = me.to_bytes()
    _acquire(path, written, on_wait)
    try:
        yield me
    finally:
        _release(path, written)


def _acquire(path: Path, written: bytes, on_wait: Callable[[LockOwner], None] | None) -> None:
    """Create the lock holding ``written``, taking over a stale one and polling a live one until
    ``WAIT_SECONDS`` have passed."""
    wait = WAIT_SECONDS  # read at call time, so tests can shorten it
    deadline = time.monotonic() + wait
    told = False
    while True:
        if _create(path, written):
            return
        held = _read(path)
        if held is None:  # released between our two steps: try again at once
            continue
        owner = LockOwner.from_bytes(held)
        if _is_stale(owner, path):
            _take_over(path, held)
            continue
        if time.monotonic() >= deadline:
            raise _held_error(path, owner, wait)
        if not told and on_wait is not None and owner is not None:
            on_wait(owner)
            told = True
        time.sleep(POLL_SECONDS)


def _create(path: Path, written: bytes) -> bool:
    """Make the lock file holding ``written``; False if it exists already."""
    try:
        fd = os.open(path, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o644)
    except FileExistsError:
        return False
    except OSError as exc:
        raise LockError(f"cannot create the lock file {path} ({exc.strerror}); netfolio writes it "
                        "into the study folder to keep two builds of one study apart",
                        path=path) from None
    try:
        os.write(fd, written)
    finally:
        os.close(fd)
    return True


def _read(path: Path) -> bytes | None:
    """The lock file's bytes; None if it is gone. Anything but a plain file is refused."""
    try:
        info = os.lstat(path)
        if not stat.S_ISREG(info.st_mode):
            raise LockError(f"{path} is not a lock file netfolio made (it is not a plain file); "
                            "move it out of the study folder", path=path)
        return path.read_bytes()
    except FileNotFoundError:
        return None


def _is_stale(owner: LockOwner | None, path: Path) -> bool:
    """True only when the lock provably belongs to nobody (see the module notes)."""
    if owner is None:
        try:
            age = time.time() - os.lstat(path).st_mtime
        except FileNotFoundError:
            return False
        return age > UNREADABLE_GRACE_SECONDS
    if owner.host != socket.gethostname():
        return False
    if os.name == "nt":  # os.kill there ends the process instead of probing it
        return False
    try:
        os.kill(owner.pid, 0)
    except ProcessLookupError:
        return True
    except (PermissionError, OverflowError, OSError):
        return False  # it exists under another user, or we cannot tell: treat it as alive
    return False


def _take_over(path: Path, stale: bytes) -> None:
    """Remove the stale lock ``stale`` unless another build replaced it meanwhile."""
    aside = path.with_name(f"{path.name}.stale-{os.getpid()}-{secrets.token_hex(4)}")
    try:
        os.rename(path, aside)
    except FileNotFoundError:
        return  # another build took it over or its holder released it
    except OSError as exc:
        raise LockError(f"cannot remove the stale lock file {path} ({exc.strerror}); remove it "
                        "and build again", path=path) from None
    try:
        if aside.read_bytes() == stale:
            return
        # A fresh lock appeared between our read and our move: it is not ours, put it back.
        try:
            os.link(aside, path)
        except FileExistsError:
            pass
        except OSError:  # no hard links on this file system
            if not os.path.lexists(path):
                os.rename(aside, path)
    finally:
        try:
            aside.unlink()
        except FileNotFoundError:
            pass


def _release(path: Path, written: bytes) -> None:
    """Remove the lock only if it still holds what this process wrote."""
    try:
        if path.read_bytes() == written:
            path.unlink()
    except FileNotFoundError:
        pass


def _held_error(path: Path, owner: LockOwner | None, wait: float) -> LockError:
    """The error for a lock still held after the wait: who holds it, and what the user can do."""
    waited = f"waited {wait:g} s"
    if owner is None:
        return LockError(f"the lock file {path} names no owner (a build stopped as it began?); "
                         f"{waited}. If no build of this study is running, remove the lock file "
                         f"{path} and build again", path=path)
    since = owner.since_text()
    if owner.host == socket.gethostname():
        return LockError(
            f"another netfolio build of this study is running: process {owner.pid} on this "
            f"computer ({owner.host}), since {since}; {waited}. Build again when it has "
            f"finished. If process {owner.pid} is not a netfolio build (process ids are reused "
            f"after a restart), remove the lock file {path}", path=path, pid=owner.pid,
            host=owner.host, since=owner.since)
    return LockError(
        f"another netfolio build of this study holds its lock: process {owner.pid} on host "
        f"{owner.host}, since {since}; {waited}. netfolio cannot tell from here whether a build "
        f"on another computer is still running: if that build has ended, remove the lock file "
        f"{path} and build again", path=path, pid=owner.pid, host=owner.host,
        since=owner.since)
