"""Exporting a job: the report text, and the one check of where it may be written.

``fieldkit jobs export`` and the Jobs workspace's export dialog both call :func:`export_job`.
A report must never land on a job: the target is refused when it is inside the data folder, or
resolves (after following symlinks, or through a hard link) onto a job file or its backup; a
symlink, a FIFO, a device or a folder at the target is refused; a folder that does not exist is
refused rather than created. ``-`` means standard output. A folder written with a trailing
``/`` (``-o ~/reports/``) gets a file named from the job's name and date
(:mod:`fieldkit.reports.names`), never from its id.

Day and range exports (:func:`export_range`) put every job worked on in those local dates in
one report or one CSV, through the same checks.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass, replace
from datetime import date
from pathlib import Path

from fieldkit.actions.errors import ActionError
from fieldkit.jobs.models import Job
from fieldkit.jobs.store import JobStore
from fieldkit.reports.common import ReportContext

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
            raise ActionError(
                f"file: {target} is a folder; give a file name, or end it with / to write "
                "into it under a name built from the job"
            )
        if not stat.S_ISREG(st.st_mode):
            raise ActionError(f"file: {target} is not a plain file (a pipe or a device)")
    if st is not None:
        for job_file in _protected_files(store):
            if (job_file.st_dev, job_file.st_ino) == (st.st_dev, st.st_ino):
                raise ActionError(f"file: {target} is a job file; write the report elsewhere")
    return resolved


def _context(config: Path | None, csv_style: str | None) -> ReportContext:
    from fieldkit.reports.spreadsheet import STYLES
    from fieldkit.settings import report_settings

    s = report_settings(config)
    if csv_style is not None and csv_style not in STYLES:
        raise ActionError(f"csv style: {csv_style!r} is not one of {', '.join(STYLES)}")
    ctx = ReportContext.from_settings(s)
    return replace(ctx, csv_style=csv_style) if csv_style else ctx


def _target(store: JobStore, output: str | os.PathLike[str], name: str) -> Path:
    """The file for ``output``: itself, or, for a folder written with a trailing ``/``, a free
    name in it built from the job (a folder without the ``/`` is refused, as before)."""
    from fieldkit.reports.names import free_name

    text = os.fspath(output)
    if text.endswith(("/", os.sep)) and text.strip("/" + os.sep).strip():
        folder = Path(text).expanduser()
        if not folder.is_dir():
            raise ActionError(f"file: the folder {folder} does not exist; make it first")
        return check_target(store, free_name(folder, name))
    return check_target(store, output)


def _write(target: Path | None, fmt: str, text: str) -> Exported:
    from fieldkit.fsutil import atomic_write_bytes

    if target is None:
        return Exported(text, None)
    data = ("\ufeff" + text if fmt == "csv" else text).encode("utf-8")
    atomic_write_bytes(target, data)
    return Exported(text, target)


def job_file_name(job: Job, fmt: str, ctx: ReportContext | None = None) -> str:
    """``backbone-repair_2026-03-14.html``: the job's name and the local date of its last
    result (else of its creation)."""
    from fieldkit.reports.common import local_day
    from fieldkit.reports.names import file_name

    ctx = ctx or ReportContext()
    times = [r.at for link in job.links for r in link.results] or [job.created_at]
    return file_name(job.name, local_day(max(times), ctx), fmt)


def range_file_name(start: date, end: date, fmt: str) -> str:
    """``jobs_2026-12-02.html`` for a day, ``jobs_2026-12-01_to_2026-12-05.html`` for a range."""
    from fieldkit.reports.names import file_name

    day = file_name("jobs", start, fmt)
    if start == end:
        return day
    stem, _, suffix = day.rpartition(".")
    return f"{stem}_to_{end.isoformat()}.{suffix}"


def export_job(
    store: JobStore,
    job_id: str,
    fmt: str,
    output: str | None = None,
    *,
    config: Path | None = None,
    csv_style: str | None = None,
) -> Exported:
    """The report of a job in ``fmt`` (csv, md, html or json), written to ``output``.

    ``output`` None or ``-`` writes nothing (the caller prints the text); a folder ending in
    ``/`` gets a file named from the job's name and date (``-2`` ... when taken). ``config``: the
    settings folder (contractor, crew, equipment, CSV style); ``csv_style`` overrides the
    setting. A CSV file starts with a byte-order mark so spreadsheets read its accents. The
    write is atomic.
    """
    from fieldkit.reports import export

    if fmt not in FORMATS:
        raise ActionError(f"format: {fmt!r} is not one of {', '.join(FORMATS)}")
    ctx = _context(config, csv_style)
    job = store.load(job_id)
    target = (
        None
        if output is None or output == "-"
        else _target(store, output, job_file_name(job, fmt, ctx))
    )
    return _write(target, fmt, export(job, fmt, ctx))


def jobs_between(store: JobStore, start: date, end: date) -> list[Job]:
    """The jobs worked on from ``start`` to ``end`` (local dates, both included): created,
    saved, or holding a result, reference, note, splice or fault dated in the range; oldest
    first."""
    from fieldkit.jobs.search import local_date
    from fieldkit.reports.common import job_times

    if end < start:
        raise ActionError(
            f"dates: the range ends ({end.isoformat()}) before it starts ({start.isoformat()})"
        )
    # The listing narrows first: a job created after the range or last saved before it holds
    # nothing dated in it.
    ids = [
        s.id
        for s in store.list()
        if local_date(s.created_at) <= end and local_date(s.updated_at) >= start
    ]
    jobs = [
        job
        for job in store.load_all(ids)
        if any(start <= local_date(t) <= end for t in job_times(job))
    ]
    return sorted(jobs, key=lambda j: (j.created_at, j.id))


def export_range(
    store: JobStore,
    start: date,
    end: date,
    fmt: str,
    output: str | None = None,
    *,
    config: Path | None = None,
    csv_style: str | None = None,
) -> tuple[Exported, list[Job]]:
    """Every job of a day (``start == end``) or a date range in one report or one CSV, written
    like :func:`export_job` (the same target checks; ``folder/`` gets ``jobs_<date>.<fmt>``)."""
    from fieldkit.reports import export_many

    if fmt not in FORMATS:
        raise ActionError(f"format: {fmt!r} is not one of {', '.join(FORMATS)}")
    ctx = _context(config, csv_style)
    jobs = jobs_between(store, start, end)
    target = (
        None
        if output is None or output == "-"
        else _target(store, output, range_file_name(start, end, fmt))
    )
    if start == end:
        title = f"Fibre test report: the jobs of {start.isoformat()}"
    else:
        title = f"Fibre test report: the jobs of {start.isoformat()} to {end.isoformat()}"
    return _write(target, fmt, export_many(jobs, fmt, title, ctx)), jobs
