"""Locks between running copies of fieldkit: one lock file per job, held around every
read-check-write, plus one for the index.

POSIX: ``flock`` on the lock file. Windows: ``msvcrt.locking`` of its first byte. Both are
advisory between fieldkit processes, released by the operating system when a process dies (a
killed save never leaves a job locked), and need no third-party package: ``filelock`` and
``portalocker`` wrap the same two calls. What Windows laptops need beyond the lock is a retry
when a virus scanner holds a file being replaced; that lives in :mod:`fieldkit.fsutil`.
"""

from __future__ import annotations

import contextlib
import os
import time
from collections.abc import Iterator
from pathlib import Path

from fieldkit.jobs.errors import LockTimeoutError

#: How long a save waits for another program holding the job's lock.
LOCK_TIMEOUT_S = 10.0
LOCKS_DIR = ".locks"


@contextlib.contextmanager
def locked(lock_file: Path, busy_message: str, timeout_s: float = LOCK_TIMEOUT_S) -> Iterator[None]:
    """Hold an exclusive lock on ``lock_file`` (created if needed) for the ``with`` block.

    Raises :class:`LockTimeoutError` with ``busy_message`` when another program holds it for
    longer than ``timeout_s``.
    """
    lock_file.parent.mkdir(parents=True, exist_ok=True)
    fd = os.open(lock_file, os.O_RDWR | os.O_CREAT, 0o644)
    try:
        deadline = time.monotonic() + timeout_s
        while not try_lock(fd):
            if time.monotonic() > deadline:
                raise LockTimeoutError(busy_message)
            time.sleep(0.005)
        try:
            yield
        finally:
            unlock(fd)
    finally:
        os.close(fd)


@contextlib.contextmanager
def locked_if_free(lock_file: Path) -> Iterator[bool]:
    """Try the lock once: yields True while holding it, False (without waiting) if it is busy
    or cannot be made (a read-only folder)."""
    try:
        lock_file.parent.mkdir(parents=True, exist_ok=True)
        fd = os.open(lock_file, os.O_RDWR | os.O_CREAT, 0o644)
    except OSError:
        yield False
        return
    try:
        if not try_lock(fd):
            yield False
            return
        try:
            yield True
        finally:
            unlock(fd)
    finally:
        os.close(fd)


try:
    import fcntl

    def try_lock(fd: int) -> bool:
        """Take the lock without waiting; False when another program holds it."""
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return False
        return True

    def unlock(fd: int) -> None:
        fcntl.flock(fd, fcntl.LOCK_UN)

except ImportError:  # Windows
    import msvcrt

    def try_lock(fd: int) -> bool:
        """Take the lock without waiting; False when another program holds it."""
        try:
            os.lseek(fd, 0, os.SEEK_SET)
            msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)  # type: ignore[attr-defined]
        except OSError:
            return False
        return True

    def unlock(fd: int) -> None:
        os.lseek(fd, 0, os.SEEK_SET)
        msvcrt.locking(fd, msvcrt.LK_UNLCK, 1)  # type: ignore[attr-defined]
