"""The job store: one JSON file per job, crash-safe saves, no lost edits, quarantine.

Layout of the jobs folder::

    <id>.json        a job (ids are generated hex, never user text)
    <id>.json.bak    the version before the last save
    .index/          summaries for fast listing; a cache, rebuilt entry by entry when stale
    .locks/<id>.lock lock files held around read-check-write (``.locks/index.lock``: the index)
    quarantine/      files that did not parse or validate, each with a ``.reason.txt``

The store is split by role: :mod:`fieldkit.jobs.jobfile` reads and checks one job file (the size
and shape policy), :mod:`fieldkit.jobs.index` keeps the summaries, :mod:`fieldkit.jobs.search`
filters them, :mod:`fieldkit.jobs.locking` holds the locks; this module puts them together.
Every name other code used from here is still importable from here.

Saves go through :func:`fieldkit.fsutil.atomic_write_bytes` (temp file, fsync, rename, fsync the
folder), so a crash leaves the old or the new file; temp files a killed program left behind are
removed by the next program that holds the job's (or the index's) lock. Every save checks the
job's ``revision`` against the file under an exclusive lock: :meth:`JobStore.save` refuses a
stale copy with :class:`ConflictError`; :meth:`JobStore.update` reloads, applies a change and
saves under the lock, which is how two running copies append results and notes without losing
any. Every save is checked against the size policy before it is acknowledged.

Reading opens regular files only: a FIFO, a device, a folder or a symlink named like a job is
reported and skipped (never opened, so nothing hangs); an unreadable file is reported and the
others still list; a broken file is moved to quarantine, and when that is impossible (a read-only
folder) the problem is reported and the rest still list.
"""

from __future__ import annotations

import contextlib
import errno
import gc
import os
import re
import stat
import time
from collections.abc import Callable, Iterator, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any, NamedTuple

from fieldkit.fsutil import (
    FileTooLargeError,
    NotRegularFileError,
    atomic_write_bytes,
    read_regular,
    read_regular_head,
)
from fieldkit.jobs.errors import ConflictError, LockTimeoutError, ReadOnlyError, StoreError
from fieldkit.jobs.ids import JOB_ID_RE, SCHEMA_VERSION, now
from fieldkit.jobs.index import (
    INDEX_DIR,
    INDEX_NAME,
    INDEX_VERSION,
    IndexEntries,
    JobSummary,
    entry_ok,
    read_index,
    row_ok,
    write_index,
)
from fieldkit.jobs.locking import LOCK_TIMEOUT_S, LOCKS_DIR, locked, locked_if_free
from fieldkit.jobs.search import filter_summaries, local_date

if TYPE_CHECKING:
    # What the names below are (imported on first use, see __getattr__).
    from fieldkit.jobs.base import MAX_FILE_BYTES as MAX_FILE_BYTES
    from fieldkit.jobs.jobfile import NewerSchemaError as NewerSchemaError
    from fieldkit.jobs.jobfile import check_before_save as check_before_save
    from fieldkit.jobs.jobfile import explain as explain
    from fieldkit.jobs.jobfile import job_from_dict as job_from_dict
    from fieldkit.jobs.jobfile import parse_job as parse_job
    from fieldkit.jobs.models import Job

#: Names other code imports from here that need the records (pydantic): imported on first use,
#: so that listing the jobs from the index (the Jobs workspace's first frame) needs neither.
_LAZY = {
    "NewerSchemaError": "fieldkit.jobs.jobfile",
    "check_before_save": "fieldkit.jobs.jobfile",
    "explain": "fieldkit.jobs.jobfile",
    "job_from_dict": "fieldkit.jobs.jobfile",
    "parse_job": "fieldkit.jobs.jobfile",
    "MAX_FILE_BYTES": "fieldkit.jobs.base",
}


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    import importlib

    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def _file_limit() -> int:
    """The largest job file read (``MAX_FILE_BYTES``, as this module names it)."""
    limit: int = globals().get("MAX_FILE_BYTES") or __getattr__("MAX_FILE_BYTES")
    return limit


#: How long the jobs folder must have been unchanged before a scan trusts its mtime alone.
SETTLE_NS = 2_000_000_000
QUARANTINE = "quarantine"
#: Deleted jobs wait here (file and backup) until restored; nothing is destroyed at once.
TRASH = "trash"

_HEAD_RE = re.compile(
    rb'^\s*\{\s*"schema_version"\s*:\s*(\d+)\s*,\s*"id"\s*:\s*"([0-9a-f]+)"\s*,'
    rb'\s*"revision"\s*:\s*(\d+)'
)
_PREFIX_RE = re.compile(r"^[0-9a-f]{1,32}$")
# Temp files of atomic_write_bytes: ".<name>.<random>.tmp", and the backup's ".<name>.bak.tmp".
_TMP_RE = re.compile(r"^\.([0-9a-f]{12,32})\.json\..+\.tmp$")
_DATA_DIR_HINT = "choose a usable folder with --data-dir or FIELDKIT_DATA_DIR"


class QuarantinedFile(NamedTuple):
    """A file moved out of the jobs folder, and why."""

    path: Path
    reason: str


class _Unreadable(StoreError):
    """A job entry that cannot be read (not a regular file, no permission): reported, skipped,
    never moved."""


class _Quarantined(StoreError):
    """A broken job file, moved aside (``restored``: its backup took its place) or left where
    it is when moving it failed."""

    def __init__(self, message: str, restored: bool = False) -> None:
        super().__init__(message)
        self.restored = restored


# Type aliases spelled outside the class, whose ``list`` method hides the builtin there.
_QuarantineList = list[QuarantinedFile]
_JobList = list["Job"]


def _newest_first(summary: JobSummary) -> tuple[str, str]:
    """The jobs list's order, reversed: by last update, then id."""
    return (summary.updated_iso, summary.id)


class JobStore:
    """The jobs of one data folder. Nothing is created until the first write."""

    def __init__(self, jobs_dir: Path) -> None:
        self.jobs_dir = Path(jobs_dir)
        #: Messages about files quarantined or skipped during this store's life (newest last).
        self.problems: list[str] = []
        # The last listing of a settled folder, with the folder's mtime and the index's stamp
        # it was made at (see list()).
        self._listed: tuple[tuple[int, tuple[int, int, int] | None], list[JobSummary]] | None
        self._listed = None

    # -- paths ---------------------------------------------------------------------------
    def path_of(self, job_id: str) -> Path:
        """The file of a job; refuses anything that is not a generated id."""
        if not isinstance(job_id, str) or not JOB_ID_RE.fullmatch(job_id):
            raise StoreError(f"{str(job_id)[:40]!r} is not a job id")
        return self.jobs_dir / f"{job_id}.json"

    @property
    def quarantine_dir(self) -> Path:
        return self.jobs_dir / QUARANTINE

    @property
    def index_path(self) -> Path:
        return self.jobs_dir / INDEX_DIR / INDEX_NAME

    def _folder_problem(self, exc: OSError, doing: str) -> StoreError:
        where = exc.filename or self.jobs_dir
        return StoreError(f"cannot {doing} {where}: {exc.strerror or exc}; {_DATA_DIR_HINT}")

    def _check_folder(self) -> bool:
        """False when there is no jobs folder yet; StoreError when it cannot be one."""
        try:
            mode = os.stat(self.jobs_dir).st_mode
        except FileNotFoundError:
            return False
        except OSError as exc:
            raise self._folder_problem(exc, "use the jobs folder") from None
        if not stat.S_ISDIR(mode):
            raise StoreError(f"the jobs folder {self.jobs_dir} is not a folder; {_DATA_DIR_HINT}")
        return True

    def _ids_on_disk(self) -> Iterator[os.DirEntry[str]]:
        try:
            entries = os.scandir(self.jobs_dir)
        except FileNotFoundError:
            return
        except OSError as exc:
            raise self._folder_problem(exc, "read the jobs folder") from None
        stale: list[tuple[str, str]] = []
        with entries:
            for entry in entries:
                name = entry.name
                if name.endswith(".json") and JOB_ID_RE.fullmatch(name[:-5]):
                    yield entry
                elif name.startswith(".") and name.endswith(".tmp"):
                    match = _TMP_RE.match(name)
                    if match:
                        stale.append((match.group(1), entry.path))
        for job_id, path in stale:
            self._remove_stale_temp(job_id, Path(path))

    def _remove_stale_temp(self, job_id: str, path: Path) -> None:
        """Remove a temp file a killed save left behind, if its job's lock is free (a save in
        progress holds it, so its temp file is never touched)."""
        with locked_if_free(self.jobs_dir / LOCKS_DIR / f"{job_id}.lock") as held:
            if held:
                with contextlib.suppress(OSError):
                    path.unlink()

    # -- locking -------------------------------------------------------------------------
    @contextlib.contextmanager
    def _locked(self, job_id: str) -> Iterator[None]:
        with contextlib.ExitStack() as stack:
            try:
                stack.enter_context(
                    locked(
                        self.jobs_dir / LOCKS_DIR / f"{job_id}.lock",
                        f"job {job_id} is being saved by another program; try again",
                        LOCK_TIMEOUT_S,
                    )
                )
            except OSError as exc:  # the folder cannot be made or written (read-only, no HOME)
                raise self._folder_problem(exc, "write in") from None
            yield

    # -- reading -------------------------------------------------------------------------
    def _read_job(self, path: Path) -> Job:
        """Read, parse, migrate and validate one job file; quarantine it when it is broken.

        Raises :class:`StoreError` (a subclass says what happened): the file is missing, is not
        a regular file or cannot be read (reported, left alone), or is broken (quarantined, or
        reported when it could not be moved).
        """
        from fieldkit.jobs.jobfile import NewerSchemaError, parse_job

        try:
            raw = read_regular(path, _file_limit(), follow_symlinks=False)
        except FileNotFoundError:
            raise StoreError(f"no job {path.stem} in {self.jobs_dir}") from None
        except FileTooLargeError as exc:
            raise self._quarantine(path, str(exc.strerror)) from None
        except NotRegularFileError as exc:
            message = f"{path.name} is {exc.strerror}; skipped (move it out of {self.jobs_dir})"
            self.problems.append(message)
            raise _Unreadable(message) from None
        except OSError as exc:
            message = f"{path.name} cannot be read ({exc.strerror or exc}); skipped"
            self.problems.append(message)
            raise _Unreadable(message) from None
        try:
            return parse_job(raw, expected_id=path.stem)
        except NewerSchemaError:
            raise
        except StoreError as exc:
            raise self._quarantine(path, str(exc)) from None

    def load(self, job_id: str) -> Job:
        """The job with this id (a full id; see :meth:`resolve` for prefixes).

        A file that does not parse or validate is moved to the quarantine folder and
        :class:`StoreError` says why. A job from a newer schema loads read-only.
        """
        return self._read_job(self.path_of(job_id))

    def resolve(self, prefix: str) -> str:
        """The one job id starting with ``prefix`` (case ignored); StoreError otherwise."""
        wanted = prefix.strip().lower()
        if not _PREFIX_RE.fullmatch(wanted):
            raise StoreError(
                f"{prefix[:40]!r} is not a job id (ids are hex digits; see 'jobs list')"
            )
        matches = sorted(e.name[:-5] for e in self._ids_on_disk() if e.name.startswith(wanted))
        if not matches:
            raise StoreError(f"no job with an id starting {wanted!r}")
        if wanted in matches:
            return wanted
        if len(matches) > 1:
            shown = ", ".join(matches[:5]) + (" ..." if len(matches) > 5 else "")
            raise StoreError(f"{wanted!r} matches {len(matches)} jobs ({shown}); type more of it")
        return matches[0]

    def list(self, *, rescan: bool = False) -> list[JobSummary]:
        """Summaries of every readable job, most recently updated first.

        Uses the index for files unchanged since it was written (same inode, size and mtime),
        parses the others, quarantines broken ones, and rewrites the index when it changed.
        When the jobs folder itself has not changed since a scan that found it settled, the
        index is used without looking at each file: every save renames a file into the folder,
        which changes the folder's mtime. ``rescan`` checks every file anyway (for files edited
        in place by hand). An index row that does not fit is dropped and its job read again.

        Raises :class:`StoreError` when the jobs folder exists but cannot be used (it is a
        file, or may not be read); a missing folder lists no jobs.
        """
        if not self._check_folder():
            return []
        # Made before the folder's mtime is taken: making it later would change that mtime.
        with contextlib.suppress(OSError):
            self.index_path.parent.mkdir(exist_ok=True)
            (self.jobs_dir / LOCKS_DIR).mkdir(exist_ok=True)
        try:
            folder_mtime_ns = os.stat(self.jobs_dir).st_mtime_ns
        except FileNotFoundError:
            return []
        scan_started_ns = time.time_ns()
        # Neither the folder nor its index changed since the last listing of the settled folder
        # (the Jobs workspace lists on every visit): that listing holds, without reading the
        # index again. The index's stamp is taken before it is read, so a rewrite meanwhile
        # shows as a change next time.
        index_stamp = self._index_stamp()
        if not rescan and self._listed is not None:
            if self._listed[0] == (folder_mtime_ns, index_stamp):
                return list(self._listed[1])
        self._listed = None
        # Loading the index makes ~100,000 small objects and no cycles: pausing the cyclic
        # garbage collector meanwhile keeps it from walking every live object several times.
        collecting = gc.isenabled()
        gc.disable()
        try:
            index, settled_mtime_ns, newest_first = read_index(self.index_path)
            if not rescan and settled_mtime_ns == folder_mtime_ns:
                rows = [entry[3] for entry in index.values() if type(entry) is list and entry]
                if len(rows) == len(index) and all(map(row_ok, rows)):
                    summaries = [JobSummary(*row) for row in rows]
                    if not newest_first:  # written by an older fieldkit
                        summaries.sort(key=_newest_first, reverse=True)
                    self._listed = ((folder_mtime_ns, index_stamp), summaries)
                    return list(summaries)
                settled_mtime_ns = None  # a damaged row: check every file below
        finally:
            if collecting:
                gc.enable()
        fresh: IndexEntries = {}
        summaries = []
        changed = False
        with locked_if_free(self.jobs_dir / LOCKS_DIR / "index.lock") as held:
            if held:
                self._remove_index_temps()
        for entry in self._ids_on_disk():
            job_id = entry.name[:-5]
            try:
                st = entry.stat(follow_symlinks=False)
            except FileNotFoundError:
                continue
            except OSError as exc:
                self.problems.append(f"{entry.name} cannot be read ({exc.strerror}); skipped")
                continue
            key = [st.st_ino, st.st_mtime_ns, st.st_size]
            cached = index.get(job_id)
            if cached is not None and entry_ok(job_id, cached) and cached[:3] == key:
                summaries.append(JobSummary(*cached[3]))
                fresh[job_id] = cached
                continue
            changed = True
            summary = self._summary_of(Path(entry.path))
            if summary is None:
                continue
            try:
                st = os.stat(entry.path, follow_symlinks=False)
            except OSError:
                continue
            summaries.append(summary)
            fresh[job_id] = [st.st_ino, st.st_mtime_ns, st.st_size, summary.to_json()]
        # The folder counts as settled when nothing was renamed into it for a while before
        # this scan began, so no change can hide inside one tick of the file-system clock.
        settled = None
        with contextlib.suppress(OSError):
            if (
                scan_started_ns - folder_mtime_ns > SETTLE_NS
                and os.stat(self.jobs_dir).st_mtime_ns == folder_mtime_ns
            ):
                settled = folder_mtime_ns
        summaries.sort(key=_newest_first, reverse=True)
        if changed or len(fresh) != len(index) or settled != settled_mtime_ns or not newest_first:
            # In the list's order, so that the next listing needs no sort.
            ordered = {s.id: fresh[s.id] for s in summaries if s.id in fresh}
            in_order = len(ordered) == len(fresh)
            self._write_index(ordered if in_order else fresh, settled, newest_first=in_order)
        if settled == folder_mtime_ns:
            self._listed = ((folder_mtime_ns, self._index_stamp()), summaries)
            return list(summaries)
        return summaries

    def _index_stamp(self) -> tuple[int, int, int] | None:
        try:
            st = os.stat(self.index_path)
        except OSError:
            return None
        return (st.st_ino, st.st_mtime_ns, st.st_size)

    def _summary_of(self, path: Path) -> JobSummary | None:
        """The summary of one job file, or None (the problem is in :attr:`problems`)."""
        from fieldkit.jobs.jobfile import NewerSchemaError

        try:
            return JobSummary.of(self._read_job(path))
        except NewerSchemaError as exc:
            return exc.summary
        except _Quarantined as exc:
            if not exc.restored:
                return None
        except StoreError:
            return None
        # Quarantined and its backup restored in its place: list that version.
        try:
            return JobSummary.of(self._read_job(path))
        except NewerSchemaError as exc:
            return exc.summary
        except StoreError:
            return None

    def _write_index(
        self, entries: IndexEntries, settled: int | None, *, newest_first: bool = False
    ) -> None:
        if not entries and not self.jobs_dir.exists():
            return
        # The index is a cache: a failed write costs a slower next listing, nothing else. It
        # lives in a sub-folder so that writing it does not change the jobs folder's mtime.
        # Under its lock, temp files of a listing killed while writing it are removed first.
        with locked_if_free(self.jobs_dir / LOCKS_DIR / "index.lock") as held:
            if not held:
                return  # another program is writing it; its version will do
            self._remove_index_temps()
            write_index(self.index_path, entries, settled, newest_first=newest_first)

    def _remove_index_temps(self) -> None:
        """Remove temp files of an index write that was killed (call holding the index lock)."""
        with contextlib.suppress(OSError):
            for stale in self.index_path.parent.glob(f".{INDEX_NAME}.*.tmp"):
                stale.unlink()

    # -- quarantine ------------------------------------------------------------------------
    def _quarantine(self, path: Path, reason: str) -> StoreError:
        """Move a broken file aside (never overwriting anything) and restore its backup.

        Returns the error to raise; a folder where the file cannot be moved (read-only) is
        reported in the message and :attr:`problems`, never raised from here.
        """
        message = f"{path.name}: {reason}"
        qdir = self.quarantine_dir
        try:
            qdir.mkdir(parents=True, exist_ok=True)
            stamp = now().strftime("%Y%m%dT%H%M%S")
            target = qdir / f"{path.name}.{stamp}"
            counter = 1
            while target.exists() or target.with_name(target.name + ".reason.txt").exists():
                counter += 1
                target = qdir / f"{path.name}.{stamp}.{counter}"
            os.rename(path, target)
        except FileNotFoundError as exc:
            if exc.filename and Path(exc.filename) == path:
                return StoreError(f"job file {path.name} vanished while reading it")
            return self._not_moved(message, exc)
        except OSError as exc:
            return self._not_moved(message, exc)
        restored = self._restore_backup(path)
        note = "; the previous version was restored from its backup" if restored else ""
        with contextlib.suppress(OSError):
            target.with_name(target.name + ".reason.txt").write_text(
                f"{reason}{note}\n", encoding="utf-8"
            )
        message = f"{message}; moved to {target}{note}"
        self.problems.append(message)
        return _Quarantined(message, restored)

    def _not_moved(self, message: str, exc: OSError) -> StoreError:
        message = (
            f"{message}; it could not be moved to quarantine ({exc.strerror or exc}), so it "
            "stays where it is and is skipped"
        )
        self.problems.append(message)
        return _Quarantined(message)

    def _restore_backup(self, path: Path) -> bool:
        from fieldkit.jobs.jobfile import parse_job

        backup = path.with_name(path.name + ".bak")
        try:
            raw = read_regular(backup, _file_limit(), follow_symlinks=False)
            parse_job(raw, expected_id=path.stem)
            atomic_write_bytes(path, raw)
        except (OSError, StoreError):
            return False
        return True

    def quarantined(self) -> _QuarantineList:
        """Files in the quarantine folder with the reason each was moved there."""
        try:
            names = sorted(os.listdir(self.quarantine_dir))
        except OSError:
            return []
        out = []
        for name in names:
            if name.endswith(".reason.txt"):
                continue
            path = self.quarantine_dir / name
            try:
                reason_file = path.with_name(name + ".reason.txt")
                reason = read_regular(reason_file, 64 * 1024).decode("utf-8", "replace").strip()
            except OSError:
                reason = "no reason recorded"
            out.append(QuarantinedFile(path, reason))
        return out

    # -- writing -----------------------------------------------------------------------------
    def _disk_revision(self, path: Path) -> int | None:
        try:
            head = read_regular_head(path, 512, follow_symlinks=False)
        except FileNotFoundError:
            return None
        except OSError as exc:
            raise StoreError(
                f"{path.name} is {exc.strerror or exc}; it cannot be saved over"
            ) from None
        match = _HEAD_RE.match(head)
        if match:
            return int(match.group(3))
        return self._read_job(path).revision

    def _write(self, job: Job, expected_revision: int) -> Job:
        """Under the job's lock: check the revision on disk, bump it, write atomically."""
        from pydantic import ValidationError

        from fieldkit.jobs.jobfile import check_before_save, explain
        from fieldkit.jobs.models import Job

        if job.read_only:
            raise ReadOnlyError(job.read_only)
        path = self.path_of(job.id)
        on_disk = self._disk_revision(path)
        if on_disk is None and expected_revision != 0:
            raise ConflictError(
                f"job {job.id} ({job.name}) is no longer in the store; "
                "it may have been moved to quarantine"
            )
        if on_disk is not None and on_disk != expected_revision:
            raise ConflictError(
                f"job {job.id} ({job.name}) was changed by another program (revision "
                f"{on_disk}, this copy has {expected_revision}); reload it and redo the change"
            )
        previous = (job.revision, job.updated_at, job.schema_version)
        job.revision = expected_revision + 1
        job.updated_at = now()
        job.schema_version = SCHEMA_VERSION
        try:
            data = job.model_dump_json(indent=1).encode()
            # Read back what is about to be written, with the rules of reading it later: a
            # value set without validation (a wrong type, NaN, a text over its limit) and a
            # job past the size policy are refused here, before the save is acknowledged.
            Job.model_validate_json(data, strict=True)
            check_before_save(job, data)
        except (ValueError, StoreError, RecursionError) as exc:
            job.revision, job.updated_at, job.schema_version = previous
            detail = explain(exc) if isinstance(exc, ValidationError) else str(exc)
            raise StoreError(f"job {job.id} ({job.name}) was not saved: {detail}") from None
        with contextlib.suppress(OSError):
            for stale in self.jobs_dir.glob(f".{job.id}.json.*.tmp"):
                # Left by a program killed mid-save; under the lock, no save is in progress.
                stale.unlink()
        try:
            atomic_write_bytes(path, data, keep_backup=True)
        except OSError as exc:
            job.revision, job.updated_at, job.schema_version = previous
            hint = f"; {_DATA_DIR_HINT}" if exc.errno in (errno.EACCES, errno.EROFS) else ""
            raise StoreError(
                f"job {job.id} ({job.name}) was not saved: {exc.strerror or exc}{hint}"
            ) from None
        return job

    def save(self, job: Job) -> Job:
        """Write ``job`` if nobody saved it since it was loaded; bumps its revision.

        Raises :class:`ConflictError` (nothing written) when the file's revision differs from
        ``job.revision``; a job with revision 0 is new and must not exist yet.
        """
        self.path_of(job.id)
        with self._locked(job.id):
            return self._write(job, job.revision)

    def update(self, job_id: str, change: Callable[[Job], None], *, attempts: int = 5) -> Job:
        """Reload the job, apply ``change`` to it and save, all under its lock.

        This is how every workspace and command appends a note, result, reference, budget or
        fault: two programs appending at once both keep their entries. ``change`` may run more
        than once (a retry after a concurrent change on a file system without working locks)
        and must not have other side effects; an exception from it leaves the file untouched.
        A record that ``change`` builds with a value the models refuse (a note over its length
        limit) becomes a :class:`StoreError` naming the field.
        """
        from pydantic import ValidationError

        from fieldkit.jobs.jobfile import explain

        path = self.path_of(job_id)
        for attempt in range(attempts):
            with self._locked(job_id):
                job = self._read_job(path)
                if job.read_only:
                    raise ReadOnlyError(job.read_only)
                revision = job.revision
                try:
                    change(job)
                except ValidationError as exc:
                    raise StoreError(
                        f"job {job.id} ({job.name}) was not changed: {explain(exc)}"
                    ) from None
                try:
                    return self._write(job, revision)
                except ConflictError:
                    if attempt == attempts - 1:
                        raise
        raise StoreError(f"job {job_id} could not be updated")  # pragma: no cover

    def create(
        self,
        name: str,
        *,
        site: str = "",
        customer: str = "",
        crew: Sequence[str] = (),
        by: str = "",
    ) -> Job:
        """A new open job, saved at once (revision 1)."""
        from pydantic import ValidationError

        from fieldkit.jobs.jobfile import explain
        from fieldkit.jobs.models import Job

        name = name.strip()
        if not name:
            raise StoreError("a job needs a name")
        try:
            job = Job(
                name=name,
                site=site.strip(),
                customer=customer.strip(),
                crew=[c.strip() for c in crew if c.strip()],
            )
            if by.strip():
                job.add_note(f"Job created by {by.strip()}", by=by.strip())
        except ValidationError as exc:
            raise StoreError(f"the job was not created: {explain(exc)}") from None
        return self.save(job)

    def delete(self, job_id: str) -> None:
        """Remove a job file and its backup (used by the demo to regenerate its own jobs)."""
        path = self.path_of(job_id)
        with self._locked(job_id):
            for item in (path, path.with_name(path.name + ".bak")):
                with contextlib.suppress(FileNotFoundError):
                    item.unlink()

    @property
    def trash_dir(self) -> Path:
        return self.jobs_dir / TRASH

    def move_to_trash(self, job_id: str) -> Path:
        """Move a job file and its backup into the trash folder; returns the file's new path.

        A job already in the trash under that id is kept beside it with a numbered name, so no
        deletion ever destroys an earlier one.
        """
        path = self.path_of(job_id)
        with self._locked(job_id):
            if not path.exists():
                raise StoreError(f"no job {job_id} in {self.jobs_dir}")
            self.trash_dir.mkdir(parents=True, exist_ok=True)
            target = self.trash_dir / path.name
            n = 1
            while target.exists():
                target = self.trash_dir / f"{job_id}.{n}.json"
                n += 1
            backup = path.with_name(path.name + ".bak")
            if backup.exists():
                os.replace(backup, target.with_name(target.name + ".bak"))
            os.replace(path, target)
            return target

    def trashed(self) -> _JobList:
        """The jobs in the trash folder (readable ones), most recently updated first."""
        from fieldkit.jobs.jobfile import parse_job

        out = []
        try:
            entries = sorted(self.trash_dir.glob("*.json"))
        except OSError:
            return []
        for entry in entries:
            try:
                out.append(parse_job(read_regular(entry, _file_limit(), follow_symlinks=False)))
            except (OSError, StoreError, ValueError):
                continue
        out.sort(key=lambda job: job.updated_at, reverse=True)
        return out

    def restore_from_trash(self, job_id: str) -> Path:
        """Move a trashed job (its latest deletion) back; refuses when the id is in use."""
        path = self.path_of(job_id)
        candidates = [self.trash_dir / path.name] + sorted(
            self.trash_dir.glob(f"{job_id}.*.json"),
            key=lambda p: int(p.name.split(".")[1]) if p.name.split(".")[1].isdigit() else 0,
        )
        found = [c for c in candidates if c.exists()]
        if not found:
            raise StoreError(f"no job {job_id} in the trash")
        source = found[-1]
        with self._locked(job_id):
            if path.exists():
                raise StoreError(f"job {job_id} is already in the jobs folder")
            backup = source.with_name(source.name + ".bak")
            if backup.exists():
                os.replace(backup, path.with_name(path.name + ".bak"))
            os.replace(source, path)
        return path

    def load_all(self, ids: Sequence[str] | None = None) -> Iterator[Job]:
        """Load the given jobs (default: every listed job), skipping unreadable ones."""
        for job_id in ids if ids is not None else [s.id for s in self.list()]:
            try:
                yield self.load(job_id)
            except StoreError as exc:
                self.problems.append(str(exc))


__all__ = [
    "INDEX_DIR",
    "INDEX_NAME",
    "INDEX_VERSION",
    "LOCK_TIMEOUT_S",
    "MAX_FILE_BYTES",
    "ConflictError",
    "JobStore",
    "JobSummary",
    "LockTimeoutError",
    "NewerSchemaError",
    "QuarantinedFile",
    "ReadOnlyError",
    "StoreError",
    "explain",
    "filter_summaries",
    "job_from_dict",
    "local_date",
    "parse_job",
]
