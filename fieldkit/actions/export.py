"""Exporting a job: the report text, and the one check of where it may be written.

``fieldkit jobs export`` and the Jobs workspace's export dialog both call :func:`export_job`.
A report must never land on a job: the target is refused when it is inside the data folder, or
resolves (after following symlinks, or through a hard link) onto a job file or its backup; a
symlink, a FIFO, a device or a folder at the target is refused; a folder that does not exist is
refused rather than created. ``-`` means standard output.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass
from pathlib import Path

from fieldkit.actions.errors import ActionError
from fieldkit.jobs.store import JobStore

FORMATS = ("csv", "md", "html", "json")
#: The file name ending each format is usually given.
SUFFIX = {"csv": ".csv", "md": ".md", "html": ".html", "json": ".json"}


@dataclass(frozen=True)
class Exported:
    """An export: the text, and the file it was written to (None: for standard output)."""

    text: str
    path: Path | None


def _protected_files(store: JobStore) -> list[os.stat_result]:
    out = []
    for folder in (store.jobs_dir, store.jobs_dir / "trash"):
        try:
            entries = list(os.scandir(folder))
        except OSError:
            continue
        for entry in entries:
            if entry.name.endswith((".json", ".json.bak")):
                try:
                    out.append(entry.stat())
                except OSError:
                    continue
    return out


def check_target(store: JobStore, output: str | os.PathLike[str]) -> Path:
    """The file an export may be written to, or :class:`ActionError` saying why not."""
    text = os.fspath(output)
    if not text.strip():
        raise ActionError("file: give a file name (or - for standard output)")
    target = Path(text).expanduser()
    if not target.is_absolute():
        target = Path.cwd() / target
    parent = target.parent
    data_dir = store.jobs_dir.parent.resolve()
    resolved = parent.resolve() / target.name
    if resolved.is_relative_to(data_dir) or resolved.is_relative_to(store.jobs_dir.resolve()):
        raise ActionError(
            f"file: {target} is inside the data folder ({data_dir}); write the report elsewhere"
        )
    if not parent.is_dir():
        raise ActionError(f"file: the folder {parent} does not exist; make it first")
    try:
        st = os.lstat(target)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise ActionError(f"file: {target} cannot be used: {exc.strerror}") from None
    if st is not None:
        if stat.S_ISLNK(st.st_mode):
            raise ActionError(f"file: {target} is a symbolic link; give the file itself")
        if stat.S_ISDIR(st.st_mode):
            raise ActionError(f"file: {target} is a folder; give a file name")
        if not stat.S_ISREG(st.st_mode):
            raise ActionError(f"file: {target} is not a plain file (a pipe or a device)")
    if st is not None:
        for job_file in _protected_files(store):
            if (job_file.st_dev, job_file.st_ino) == (st.st_dev, st.st_ino):
                raise ActionError(f"file: {target} is a job file; write the report elsewhere")
    return resolved


def export_job(store: JobStore, job_id: str, fmt: str, output: str | None = None) -> Exported:
    """The report of a job in ``fmt`` (csv, md, html or json), written to ``output``.

    ``output`` None or ``-`` writes nothing (the caller prints the text). A CSV file starts
    with a byte-order mark so spreadsheets read its accents. The write is atomic.
    """
    from fieldkit.fsutil import atomic_write_bytes
    from fieldkit.jobs.reports import export

    if fmt not in FORMATS:
        raise ActionError(f"format: {fmt!r} is not one of {', '.join(FORMATS)}")
    target = None if output is None or output == "-" else check_target(store, output)
    text = export(store.load(job_id), fmt)
    if target is None:
        return Exported(text, None)
    data = ("\ufeff" + text if fmt == "csv" else text).encode("utf-8")
    atomic_write_bytes(target, data)
    return Exported(text, target)
