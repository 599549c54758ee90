"""Many readers or one writer per embedded store, across processes.

LadybugDB refuses a second writer, but it lets a read-only open proceed while another process writes, and such a
reader sees a half-written log: checksum failures, duplicated keys, bad offsets (measured: 20 of 40 read-only
opens failed during a bulk write). So every open also takes an advisory lock on a side file, `<store>.access`:
shared for reading, exclusive for writing. The writer records who it is there, so a refused reader can say which
job holds the store.
"""

from __future__ import annotations

import contextlib
import errno
import fcntl
import os
import sys
import threading
import time
from dataclasses import dataclass
from pathlib import Path

from pipeline.errors import StoreLocked

ACCESS_SUFFIX = ".access"
READER_GRACE = 30.0  # a writer waits this long for readers (a query, a page view) to finish, whatever its timeout


def access_file(store_path: str | Path) -> Path:
    return Path(str(store_path) + ACCESS_SUFFIX)


@dataclass
class _Held:
    fd: int
    readers: int = 0
    writers: int = 0


# flock belongs to an open file, so two opens in one process would block each other: one lock file per path per
# process, counted. (Within a process the engine's own rules apply, as they did before this lock existed.)
_held: dict[str, _Held] = {}
_guard = threading.Lock()


class AccessLock:
    """A held share of the store's access lock; `release()` gives it back (idempotent)."""

    def __init__(self, key: str, exclusive: bool):
        self._key, self.exclusive, self._released = key, exclusive, False

    def release(self) -> None:
        with _guard:
            if self._released:
                return
            self._released = True
            held = _held[self._key]
            if self.exclusive:
                held.writers -= 1
            else:
                held.readers -= 1
            if self.exclusive and held.writers == 0:
                with contextlib.suppress(OSError):
                    os.ftruncate(held.fd, 0)  # no writer now: a blocked process will see readers only
            if held.writers == 0 and held.readers == 0:
                os.close(held.fd)  # closing the file drops the lock
                del _held[self._key]
            elif held.writers == 0 and self.exclusive:
                fcntl.flock(held.fd, fcntl.LOCK_SH)  # readers in this process remain


def acquire(store_path: str | Path, *, exclusive: bool, timeout: float = 0.0) -> AccessLock | None:
    """Take the lock, waiting up to `timeout` seconds, else raise StoreLocked naming the holder.
    Returns None when a reader cannot create the lock file (a store on read-only media has no writer to fear)."""
    path = access_file(store_path)
    key = os.path.realpath(path)
    start = time.monotonic()
    delay = 0.05
    while True:
        with _guard:
            got = _try(key, path, exclusive)
        if got is not None:
            return got or None
        writer = _holder(path)
        # readers hold the store for one command; a nightly job should not fail because a page was being viewed
        limit = max(0.0, timeout) if writer or not exclusive else max(timeout, READER_GRACE)
        deadline = start + limit
        if time.monotonic() >= deadline:
            raise StoreLocked(_busy_message(store_path, writer, exclusive, time.monotonic() - start))
        time.sleep(min(delay, max(0.0, deadline - time.monotonic())))
        delay = min(delay * 2, 0.5)


def _try(key: str, path: Path, exclusive: bool) -> AccessLock | bool | None:
    """One attempt under the process guard: the lock, False (no lock possible, go on), or None (busy)."""
    held = _held.get(key)
    if held is None:
        try:
            fd = os.open(path, os.O_RDWR | os.O_CREAT, 0o644)
        except OSError:
            if exclusive:
                raise
            try:
                fd = os.open(path, os.O_RDONLY)
            except OSError:
                return False
        held = _held[key] = _Held(fd)
        fresh = True
    else:
        fresh = False
    want_exclusive = exclusive and held.writers == 0
    if want_exclusive or fresh:
        mode = fcntl.LOCK_EX if exclusive else fcntl.LOCK_SH
        try:
            fcntl.flock(held.fd, mode | fcntl.LOCK_NB)
        except OSError as exc:
            if exc.errno not in (errno.EWOULDBLOCK, errno.EAGAIN, errno.EACCES):
                raise
            if fresh:
                os.close(held.fd)
                del _held[key]
            elif held.readers:
                # a failed upgrade may have dropped the shared lock; take it back for this process's readers
                fcntl.flock(held.fd, fcntl.LOCK_SH)
            return None
    if exclusive:
        held.writers += 1
        if want_exclusive:
            _record_holder(held.fd)
    else:
        held.readers += 1
    return AccessLock(key, exclusive)


def _record_holder(fd: int) -> None:
    with contextlib.suppress(OSError):
        os.ftruncate(fd, 0)
        note = f"pid {os.getpid()} ({' '.join(Path(a).name if i == 0 else a for i, a in enumerate(sys.argv[:3]))})" \
               f" since {time.strftime('%Y-%m-%d %H:%M:%S')}\n"
        os.pwrite(fd, note.encode("utf-8", "replace"), 0)


def _holder(path: Path) -> str:
    with contextlib.suppress(OSError):
        return path.read_text(encoding="utf-8", errors="replace").strip()
    return ""


def _busy_message(store_path, writer: str, exclusive: bool, waited: float) -> str:
    if writer:
        who = f"held for writing by {writer}"
    else:
        who = "being read by another process" if exclusive else "held for writing by another process"
    after = f" (waited {waited:.0f} s)" if waited >= 1 else ""
    doing = "write to" if exclusive else "read"
    return (f"{store_path}: cannot {doing} the store now, it is {who}{after}; try again when that job "
            f"finishes, or set [store] lock_timeout to wait")
