"""Crash-safe file writing shared by the job store and the settings file."""

from __future__ import annotations

import contextlib
import functools
import os
import tempfile
from pathlib import Path


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
        if keep_backup and path.exists():
            backup = path.with_name(path.name + ".bak")
            # A hard link keeps the old version under the backup name without copying; if the
            # file system has no links, fall back to a copy written atomically.
            link_tmp = path.with_name(f".{path.name}.bak.tmp")
            with contextlib.suppress(FileNotFoundError):
                link_tmp.unlink()
            try:
                os.link(path, link_tmp)
            except OSError:
                link_tmp.write_bytes(path.read_bytes())
            os.replace(link_tmp, backup)
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            tmp.unlink()
        raise
    fsync_dir(path.parent)


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
