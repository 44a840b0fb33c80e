"""Crash-safe file writing, and reading that opens regular files only, for every folder
fieldkit reads: the jobs, the index, the user presets, the settings, link and import files.

A FIFO named like a job would block a plain ``open()`` forever; a symlink to ``/dev/zero``
reports a size of 0 and reads without end; a folder named like a file raises on read. So
:func:`read_regular` looks at the entry before opening it, opens without blocking (and, in the
folders fieldkit owns, without following a symlink), checks the type again on the open file,
and reads at most the cap, whatever the size claims.
"""

from __future__ import annotations

import contextlib
import errno
import functools
import os
import stat
import sys
import tempfile
import time
from pathlib import Path

#: One MiB, the unit of every file size fieldkit states (1,048,576 bytes, IEC 80000-13).
MIB = 1024 * 1024


def mib(size_bytes: int) -> str:
    """A size in MiB as people read it: ``20 MiB``, ``20.9 MiB`` (``16 KiB`` below 1 MiB)."""
    if size_bytes < MIB:
        return f"{size_bytes / 1024:.0f} KiB"
    value = size_bytes / MIB
    return f"{value:.0f} MiB" if value == int(value) else f"{value:.1f} MiB"


class NotRegularFileError(OSError):
    """The entry is a folder, a FIFO, a device, a socket or (where not followed) a symlink."""


class FileTooLargeError(OSError):
    """The file holds more bytes than the reader's cap."""


def kind_of(mode: int) -> str:
    """What a file-system entry is, in words: "a folder", "a FIFO (named pipe)", ..."""
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISLNK(mode):
        return "a symbolic link"
    return "not a regular file"


_NOFOLLOW = getattr(os, "O_NOFOLLOW", 0)
_READ_FLAGS = (
    os.O_RDONLY
    | getattr(os, "O_NONBLOCK", 0)
    | getattr(os, "O_BINARY", 0)
    | getattr(os, "O_CLOEXEC", 0)
    | getattr(os, "O_NOCTTY", 0)
)


def read_regular(path: Path, max_bytes: int, *, follow_symlinks: bool = True) -> bytes:
    """The bytes of ``path`` if it is a regular file of at most ``max_bytes``.

    Raises
    ------
    NotRegularFileError
        For a folder, FIFO, device or socket (and a symlink when ``follow_symlinks`` is off);
        such an entry is never opened for reading, so nothing blocks.
    FileTooLargeError
        When the file holds more than ``max_bytes`` (counted while reading, not trusted from
        the size the file system reports).
    OSError
        When it cannot be read (missing, no permission).
    """
    before = os.stat(path, follow_symlinks=follow_symlinks)
    if not stat.S_ISREG(before.st_mode):
        raise NotRegularFileError(
            errno.EINVAL, f"{kind_of(before.st_mode)}, not a regular file", str(path)
        )
    if before.st_size > max_bytes:
        raise _too_large(path, before.st_size, max_bytes)
    try:
        fd = os.open(path, _READ_FLAGS | (0 if follow_symlinks else _NOFOLLOW))
    except OSError as exc:
        if exc.errno == errno.ELOOP and not follow_symlinks:
            raise NotRegularFileError(
                errno.ELOOP, "a symbolic link, not a regular file", str(path)
            ) from None
        raise
    try:
        after = os.fstat(fd)
        # swapped between the look and the open: judge what was opened
        if not stat.S_ISREG(after.st_mode):
            raise NotRegularFileError(
                errno.EINVAL, f"{kind_of(after.st_mode)}, not a regular file", str(path)
            )
        chunks: list[bytes] = []
        total = 0
        while True:
            chunk = os.read(fd, min(1 << 20, max_bytes + 1 - total))
            if not chunk:
                break
            chunks.append(chunk)
            total += len(chunk)
            if total > max_bytes:
                raise _too_large(path, max(total, after.st_size), max_bytes)
        return b"".join(chunks)
    finally:
        os.close(fd)


def read_regular_head(path: Path, count: int, *, follow_symlinks: bool = False) -> bytes:
    """The first ``count`` bytes of a regular file (never blocks on a FIFO); see above."""
    before = os.stat(path, follow_symlinks=follow_symlinks)
    if not stat.S_ISREG(before.st_mode):
        raise NotRegularFileError(
            errno.EINVAL, f"{kind_of(before.st_mode)}, not a regular file", str(path)
        )
    fd = os.open(path, _READ_FLAGS | (0 if follow_symlinks else _NOFOLLOW))
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            raise NotRegularFileError(errno.EINVAL, "not a regular file", str(path))
        return os.read(fd, count)
    finally:
        os.close(fd)


def _too_large(path: Path, size: int, max_bytes: int) -> FileTooLargeError:
    return FileTooLargeError(
        errno.EFBIG, f"the file is {mib(size)}, larger than the {mib(max_bytes)} limit", str(path)
    )


def atomic_write_bytes(path: Path, data: bytes, *, keep_backup: bool = False) -> None:
    """Write ``data`` to ``path`` so that a crash leaves either the old or the new file.

    Temp file in the same folder, flush, fsync, ``os.replace``, then fsync the folder. With
    ``keep_backup`` the previous version is kept as ``<name>.bak`` (itself replaced atomically).
    """
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp_name = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    tmp = Path(tmp_name)
    try:
        # mkstemp creates the file 0600; give it the mode a plain open() would (umask applied).
        os.chmod(tmp, 0o666 & ~_umask())
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        backup = path.with_name(path.name + ".bak")
        if keep_backup and path.exists() and not _same_file(path, backup):
            # A hard link keeps the old version under the backup name without copying; if the
            # file system has no links, fall back to a copy written atomically.
            link_tmp = path.with_name(f".{path.name}.bak.tmp")
            with contextlib.suppress(FileNotFoundError):
                link_tmp.unlink()
            try:
                os.link(path, link_tmp)
            except OSError:
                link_tmp.write_bytes(path.read_bytes())
            _replace(link_tmp, backup)
        _replace(tmp, path)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            tmp.unlink()
        raise
    fsync_dir(path.parent)


def _same_file(a: Path, b: Path) -> bool:
    # After a save killed between its two renames the backup and the file are one inode: the
    # backup already holds this version, and renaming a link onto its twin does nothing (POSIX
    # rename of two links to one file), which would leave the link's temp name behind.
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def _replace(source: Path, target: Path) -> None:
    """``os.replace``; on Windows, retried briefly while another program (a virus scanner, an
    indexer, a second fieldkit reading the file) holds the target open."""
    for attempt in range(20 if sys.platform == "win32" else 1):
        try:
            os.replace(source, target)
            return
        except PermissionError:
            if sys.platform != "win32" or attempt == 19:
                raise
            time.sleep(0.05)


@functools.cache
def _umask() -> int:
    # Reading the umask means setting it; do it once, not on every save.
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def fsync_dir(folder: Path) -> None:
    """fsync a folder so a rename in it survives a power cut (no-op where unsupported)."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
