"""The job store: one JSON file per job, crash-safe saves, no lost edits, quarantine.

Layout of the jobs folder::

    <id>.json        a job (ids are generated hex, never user text)
    <id>.json.bak    the version before the last save
    .index/          summaries for fast listing; a cache, rebuilt entry by entry when stale
    .locks/<id>.lock lock files (``flock``) held around read-check-write
    quarantine/      files that did not parse or validate, each with a ``.reason.txt``

Saves go through :func:`fieldkit.fsutil.atomic_write_bytes` (temp file, fsync, rename, fsync the
folder), so a crash leaves the old or the new file. Every save checks the job's ``revision``
against the file under an exclusive lock: :meth:`JobStore.save` refuses a stale copy with
:class:`ConflictError`; :meth:`JobStore.update` reloads, applies a change and saves under the
lock, which is how two running copies append results and notes without losing any.
"""

from __future__ import annotations

import contextlib
import gc
import json
import os
import re
import time
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass, field
from datetime import UTC, date, datetime
from pathlib import Path
from typing import Any

from pydantic import ValidationError

from fieldkit.fsutil import atomic_write_bytes
from fieldkit.jobs.migrations import MigrationError, migrate
from fieldkit.jobs.models import JOB_ID_RE, SCHEMA_VERSION, Job, now

#: Largest job file the store reads or imports. A job with 1,000 results is about 0.5 MB.
MAX_FILE_BYTES = 20 * 1024 * 1024
#: How long a save waits for another program holding the job's lock.
LOCK_TIMEOUT_S = 10.0
INDEX_DIR = ".index"
INDEX_NAME = "summaries.json"
#: How long the jobs folder must have been unchanged before a scan trusts its mtime alone.
SETTLE_NS = 2_000_000_000
INDEX_VERSION = 3
QUARANTINE = "quarantine"

_HEAD_RE = re.compile(
    rb'^\s*\{\s*"schema_version"\s*:\s*(\d+)\s*,\s*"id"\s*:\s*"([0-9a-f]+)"\s*,'
    rb'\s*"revision"\s*:\s*(\d+)'
)
_PREFIX_RE = re.compile(r"^[0-9a-f]{1,32}$")


class StoreError(Exception):
    """A job could not be read or written; the message names the job and the problem."""


class ConflictError(StoreError):
    """Another program saved the job since this copy was loaded; nothing was written."""


class ReadOnlyError(StoreError):
    """The job was written by a newer fieldkit and may only be read."""


class LockTimeoutError(StoreError):
    """Another program kept the job locked for too long."""


def explain(exc: ValidationError) -> str:
    """One line naming the first invalid field of a pydantic error, in plain words."""
    errors = exc.errors()
    first = errors[0]
    where = ".".join(str(part) for part in first.get("loc", ())) or "the file"
    more = f" (and {len(errors) - 1} more problems)" if len(errors) > 1 else ""
    return f"{where}: {first.get('msg', 'invalid')}{more}"


def _iso(moment: datetime) -> str:
    """A time as fixed-width UTC ISO text, so that sorting the text sorts the times."""
    return moment.astimezone(UTC).isoformat(timespec="microseconds")


@dataclass(slots=True)
class JobSummary:
    """What the jobs list shows, kept in the index so listing does not parse every job.

    Times are kept as fixed-width UTC ISO text (``created_iso``, ``updated_iso``), which sorts
    like the times and costs nothing to load; ``created_at`` / ``updated_at`` parse them.
    The fields are in the order of an index row, so a row loads as ``JobSummary(*row)``.
    """

    id: str
    name: str
    customer: str
    site: str
    crew: list[str]
    status: str
    created_iso: str
    updated_iso: str
    revision: int
    link_count: int
    result_count: int
    failed_count: int
    note_count: int
    read_only: str | None = None
    link_labels: list[str] = field(default_factory=list)
    _search: str | None = field(default=None, init=False, repr=False, compare=False)

    @property
    def search_text(self) -> str:
        """Id, name, customer, site, crew and link labels, case-folded (made on first use)."""
        if self._search is None:
            self._search = _haystack(
                self.id, self.name, self.customer, self.site, self.crew, self.link_labels
            )
        return self._search

    @property
    def created_at(self) -> datetime:
        return datetime.fromisoformat(self.created_iso)

    @property
    def updated_at(self) -> datetime:
        return datetime.fromisoformat(self.updated_iso)

    @classmethod
    def of(cls, job: Job) -> JobSummary:
        results = [r for link in job.links for r in link.results]
        return cls(
            id=job.id,
            name=job.name,
            customer=job.customer,
            site=job.site,
            crew=list(job.crew),
            status=job.status,
            created_iso=_iso(job.created_at),
            updated_iso=_iso(job.updated_at),
            revision=job.revision,
            link_count=len(job.links),
            result_count=len(results),
            failed_count=sum(r.passed is False for r in results),
            note_count=len(job.notes),
            read_only=job.read_only,
            link_labels=[link.label for link in job.links],
        )

    def to_json(self) -> list[Any]:
        return [
            self.id,
            self.name,
            self.customer,
            self.site,
            list(self.crew),
            self.status,
            self.created_iso,
            self.updated_iso,
            self.revision,
            self.link_count,
            self.result_count,
            self.failed_count,
            self.note_count,
            self.read_only,
            self.link_labels,
        ]

    @classmethod
    def from_json(cls, row: list[Any]) -> JobSummary:
        if len(row) != 15:
            raise ValueError("index row of the wrong length")
        return cls(*row)

    def as_dict(self) -> dict[str, Any]:
        """The summary as JSON-ready values (for ``jobs list --json``)."""
        return {
            "id": self.id,
            "name": self.name,
            "customer": self.customer,
            "site": self.site,
            "crew": list(self.crew),
            "status": self.status,
            "created_at": self.created_iso,
            "updated_at": self.updated_iso,
            "revision": self.revision,
            "links": self.link_count,
            "results": self.result_count,
            "failed": self.failed_count,
            "notes": self.note_count,
            "read_only": self.read_only,
        }


def _haystack(*parts: Any) -> str:
    words: list[str] = []
    for part in parts:
        if isinstance(part, list | tuple):
            words.extend(str(p) for p in part)
        else:
            words.append(str(part))
    return "\n".join(words).casefold()


def filter_summaries(
    summaries: list[JobSummary],
    text: str = "",
    status: str | None = None,
    on_date: date | None = None,
) -> list[JobSummary]:
    """The summaries matching every given filter.

    ``text``: every word must appear in the id, name, customer, site, crew or a link label
    (case ignored); a word written YYYY-MM-DD is a date instead. ``status``: "open" or "done".
    ``on_date``: created or updated on that local date.
    """
    words = []
    for word in text.casefold().split():
        day = _as_date(word)
        if day is None:
            words.append(word)
        elif on_date is None:
            on_date = day
        elif on_date != day:
            return []
    out = summaries
    if status:
        out = [s for s in out if s.status == status]
    if on_date is not None:
        out = [
            s
            for s in out
            if local_date(s.created_at) == on_date or local_date(s.updated_at) == on_date
        ]
    for word in words:
        out = [s for s in out if word in s.search_text]
    return out


_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


def _as_date(word: str) -> date | None:
    if not _DATE_RE.match(word):
        return None
    try:
        return date.fromisoformat(word)
    except ValueError:
        return None


def local_date(moment: datetime) -> date:
    """The date of a stored (UTC) time in this computer's time zone."""
    return moment.astimezone().date()


@dataclass(frozen=True, slots=True)
class QuarantinedFile:
    """A file moved out of the jobs folder, and why."""

    path: Path
    reason: str


# Type aliases spelled outside the class, whose ``list`` method hides the builtin there.
_IndexEntries = dict[str, list[Any]]
_QuarantineList = list[QuarantinedFile]


class JobStore:
    """The jobs of one data folder. Nothing is created until the first write."""

    def __init__(self, jobs_dir: Path) -> None:
        self.jobs_dir = Path(jobs_dir)
        #: Messages about files quarantined or skipped during this store's life (newest last).
        self.problems: list[str] = []

    # -- paths ---------------------------------------------------------------------------
    def path_of(self, job_id: str) -> Path:
        """The file of a job; refuses anything that is not a generated id."""
        if not isinstance(job_id, str) or not JOB_ID_RE.match(job_id):
            raise StoreError(f"{job_id!r} is not a job id")
        return self.jobs_dir / f"{job_id}.json"

    @property
    def quarantine_dir(self) -> Path:
        return self.jobs_dir / QUARANTINE

    def _ids_on_disk(self) -> Iterator[os.DirEntry[str]]:
        try:
            entries = os.scandir(self.jobs_dir)
        except FileNotFoundError:
            return
        with entries:
            for entry in entries:
                name = entry.name
                if name.endswith(".json") and JOB_ID_RE.match(name[:-5]):
                    yield entry

    # -- locking -------------------------------------------------------------------------
    @contextlib.contextmanager
    def _locked(self, job_id: str) -> Iterator[None]:
        lock_dir = self.jobs_dir / ".locks"
        lock_dir.mkdir(parents=True, exist_ok=True)
        fd = os.open(lock_dir / f"{job_id}.lock", os.O_RDWR | os.O_CREAT, 0o644)
        try:
            deadline = time.monotonic() + LOCK_TIMEOUT_S
            while not _try_lock(fd):
                if time.monotonic() > deadline:
                    raise LockTimeoutError(
                        f"job {job_id} is being saved by another program; try again"
                    )
                time.sleep(0.005)
            try:
                yield
            finally:
                _unlock(fd)
        finally:
            os.close(fd)

    # -- reading -------------------------------------------------------------------------
    def _read_job(self, path: Path) -> Job:
        """Parse, migrate and validate one job file; quarantine it when it is broken."""
        try:
            size = path.stat().st_size
        except FileNotFoundError:
            raise StoreError(f"no job {path.stem} in {self.jobs_dir}") from None
        if size > MAX_FILE_BYTES:
            raise self._quarantine(
                path,
                f"the file is {size / 1e6:.1f} MB, larger than the "
                f"{MAX_FILE_BYTES // (1024 * 1024)} MB limit",
            )
        try:
            raw = path.read_bytes()
        except FileNotFoundError:
            raise StoreError(f"no job {path.stem} in {self.jobs_dir}") from None
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
        if not _PREFIX_RE.match(wanted):
            raise StoreError(f"{prefix!r} is not a job id (ids are hex digits; see 'jobs list')")
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
        in place by hand).
        """
        if not self.jobs_dir.is_dir():
            return []
        # Made before the folder's mtime is taken: making it later would change that mtime.
        with contextlib.suppress(OSError):
            self.index_path.parent.mkdir(exist_ok=True)
        try:
            folder_mtime_ns = os.stat(self.jobs_dir).st_mtime_ns
        except FileNotFoundError:
            return []
        scan_started_ns = time.time_ns()
        # Loading the index makes ~100,000 small objects and no cycles: pausing the cyclic
        # garbage collector meanwhile keeps it from walking every live object several times.
        collecting = gc.isenabled()
        gc.disable()
        try:
            index, settled_mtime_ns = self._read_index()
            if not rescan and settled_mtime_ns == folder_mtime_ns:
                try:
                    summaries = [JobSummary(*row[3]) for row in index.values()]
                except TypeError:
                    pass
                else:
                    summaries.sort(key=lambda s: (s.updated_iso, s.id), reverse=True)
                    return summaries
        finally:
            if collecting:
                gc.enable()
        fresh: dict[str, list[Any]] = {}
        summaries = []
        changed = False
        for entry in self._ids_on_disk():
            job_id = entry.name[:-5]
            try:
                st = entry.stat()
            except FileNotFoundError:
                continue
            key = [st.st_ino, st.st_mtime_ns, st.st_size]
            cached = index.get(job_id)
            if cached is not None and cached[:3] == key:
                try:
                    summary = JobSummary.from_json(cached[3])
                except (TypeError, ValueError, IndexError):
                    summary = None
                if summary is not None:
                    summaries.append(summary)
                    fresh[job_id] = cached
                    continue
            changed = True
            try:
                job = self._read_job(Path(entry.path))
            except NewerSchemaError as exc:
                summary = exc.summary
            except StoreError:
                # Quarantined; if its backup was restored in its place, list that version.
                try:
                    job = self._read_job(Path(entry.path))
                    st = os.stat(entry.path)
                except (StoreError, OSError):
                    continue
                key = [st.st_ino, st.st_mtime_ns, st.st_size]
                summary = JobSummary.of(job)
            else:
                summary = JobSummary.of(job)
            summaries.append(summary)
            fresh[job_id] = [*key, summary.to_json()]
        # The folder counts as settled when nothing was renamed into it for a while before
        # this scan began, so no change can hide inside one tick of the file-system clock.
        settled = None
        if (
            scan_started_ns - folder_mtime_ns > SETTLE_NS
            and os.stat(self.jobs_dir).st_mtime_ns == folder_mtime_ns
        ):
            settled = folder_mtime_ns
        if changed or len(fresh) != len(index) or settled != settled_mtime_ns:
            self._write_index(fresh, settled)
        summaries.sort(key=lambda s: (s.updated_iso, s.id), reverse=True)
        return summaries

    @property
    def index_path(self) -> Path:
        return self.jobs_dir / INDEX_DIR / INDEX_NAME

    def _read_index(self) -> tuple[_IndexEntries, int | None]:
        try:
            data = json.loads(self.index_path.read_bytes())
        except (OSError, ValueError):
            return {}, None
        if (
            not isinstance(data, dict)
            or data.get("index_version") != INDEX_VERSION
            or data.get("schema_version") != SCHEMA_VERSION
            or not isinstance(data.get("entries"), dict)
        ):
            return {}, None
        entries: _IndexEntries = data["entries"]
        settled = data.get("settled_folder_mtime_ns")
        return entries, settled if isinstance(settled, int) else None

    def _write_index(self, entries: _IndexEntries, settled: int | None) -> None:
        if not entries and not self.jobs_dir.exists():
            return
        data = json.dumps(
            {
                "index_version": INDEX_VERSION,
                "schema_version": SCHEMA_VERSION,
                "settled_folder_mtime_ns": settled,
                "entries": entries,
            },
            ensure_ascii=False,
            separators=(",", ":"),
        )
        # The index is a cache: a failed write costs a slower next listing, nothing else. It
        # lives in a sub-folder so that writing it does not change the jobs folder's mtime.
        with contextlib.suppress(OSError):
            self.index_path.parent.mkdir(exist_ok=True)
            atomic_write_bytes(self.index_path, data.encode())

    # -- quarantine ------------------------------------------------------------------------
    def _quarantine(self, path: Path, reason: str) -> StoreError:
        """Move a broken file aside (never overwriting anything) and restore its backup."""
        qdir = self.quarantine_dir
        qdir.mkdir(parents=True, exist_ok=True)
        stamp = now().strftime("%Y%m%dT%H%M%S")
        target = qdir / f"{path.name}.{stamp}"
        counter = 1
        while target.exists() or target.with_name(target.name + ".reason.txt").exists():
            counter += 1
            target = qdir / f"{path.name}.{stamp}.{counter}"
        message = f"{path.name}: {reason}"
        try:
            os.rename(path, target)
        except FileNotFoundError:
            return StoreError(f"job file {path.name} vanished while reading it")
        except OSError as exc:
            return StoreError(f"{message}; it could not be moved to quarantine ({exc})")
        restored = self._restore_backup(path)
        note = "; the previous version was restored from its backup" if restored else ""
        with contextlib.suppress(OSError):
            target.with_name(target.name + ".reason.txt").write_text(
                f"{reason}{note}\n", encoding="utf-8"
            )
        message = f"{message}; moved to {target}{note}"
        self.problems.append(message)
        return StoreError(message)

    def _restore_backup(self, path: Path) -> bool:
        backup = path.with_name(path.name + ".bak")
        try:
            raw = backup.read_bytes()
            if len(raw) > MAX_FILE_BYTES:
                return False
            parse_job(raw, expected_id=path.stem)
        except (OSError, StoreError):
            return False
        atomic_write_bytes(path, raw)
        return True

    def quarantined(self) -> _QuarantineList:
        """Files in the quarantine folder with the reason each was moved there."""
        try:
            names = sorted(os.listdir(self.quarantine_dir))
        except FileNotFoundError:
            return []
        out = []
        for name in names:
            if name.endswith(".reason.txt"):
                continue
            path = self.quarantine_dir / name
            try:
                reason = path.with_name(name + ".reason.txt").read_text(encoding="utf-8").strip()
            except OSError:
                reason = "no reason recorded"
            out.append(QuarantinedFile(path, reason))
        return out

    # -- writing -----------------------------------------------------------------------------
    def _disk_revision(self, path: Path) -> int | None:
        try:
            with open(path, "rb") as handle:
                head = handle.read(512)
        except FileNotFoundError:
            return None
        match = _HEAD_RE.match(head)
        if match:
            return int(match.group(3))
        return self._read_job(path).revision

    def _write(self, job: Job, expected_revision: int) -> Job:
        """Under the job's lock: check the revision on disk, bump it, write atomically."""
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
            # Read back what is about to be written: a value set without validation (a wrong
            # type, NaN) is refused here instead of landing in the file.
            parse_job(data, expected_id=job.id)
        except (ValueError, StoreError) as exc:
            job.revision, job.updated_at, job.schema_version = previous
            detail = explain(exc) if isinstance(exc, ValidationError) else str(exc)
            raise StoreError(f"job {job.id} ({job.name}) was not saved: {detail}") from None
        for stale in self.jobs_dir.glob(f".{job.id}.json.*.tmp"):
            # Left by a program killed mid-save; under the lock, no save is in progress.
            with contextlib.suppress(OSError):
                stale.unlink()
        try:
            atomic_write_bytes(path, data, keep_backup=True)
        except OSError as exc:
            job.revision, job.updated_at, job.schema_version = previous
            raise StoreError(f"job {job.id} ({job.name}) was not saved: {exc}") from None
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
        """
        path = self.path_of(job_id)
        for attempt in range(attempts):
            with self._locked(job_id):
                job = self._read_job(path)
                if job.read_only:
                    raise ReadOnlyError(job.read_only)
                revision = job.revision
                change(job)
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

    def load_all(self, ids: Sequence[str] | None = None) -> Iterator[Job]:
        """Load the given jobs (default: every listed job), skipping unreadable ones."""
        for job_id in ids if ids is not None else [s.id for s in self.list()]:
            try:
                yield self.load(job_id)
            except StoreError as exc:
                self.problems.append(str(exc))


class NewerSchemaError(StoreError):
    """A file from a newer fieldkit that this version cannot even read; it stays untouched."""

    def __init__(self, message: str, summary: JobSummary) -> None:
        super().__init__(message)
        self.summary = summary


def parse_job(raw: bytes, *, expected_id: str | None = None) -> Job:
    """Parse, migrate and validate one job from its file bytes.

    Raises :class:`StoreError` with the reason for anything that is not a valid job, and
    :class:`NewerSchemaError` for a newer layout whose fields this version does not know.
    """
    try:
        data = json.loads(raw)
    except UnicodeDecodeError:
        raise StoreError("the file is not UTF-8 text") from None
    except ValueError as exc:
        raise StoreError(f"the file is not valid JSON ({exc})") from None
    except RecursionError:
        raise StoreError("the file is not valid JSON (nested too deeply)") from None
    if not isinstance(data, dict):
        raise StoreError("the file does not hold a job (not a JSON object)")
    job = job_from_dict(data)
    if expected_id is not None and job.id != expected_id:
        raise StoreError(f"the file holds job id {job.id!r}, not {expected_id!r}")
    return job


def job_from_dict(data: dict[str, Any]) -> Job:
    """Migrate and validate a parsed job; see :func:`parse_job`."""
    try:
        data = migrate(data)
    except MigrationError as exc:
        raise StoreError(str(exc)) from None
    except (TypeError, AttributeError, KeyError) as exc:
        raise StoreError(f"the file does not fit its schema version ({exc})") from None
    version = data["schema_version"]
    try:
        job = Job.model_validate(data)
    except ValidationError as exc:
        if version > SCHEMA_VERSION:
            raise NewerSchemaError(
                f"job {data.get('id')!s} was written by a newer fieldkit (schema {version}; this "
                f"one reads {SCHEMA_VERSION}); update fieldkit to open it",
                _lenient_summary(data, version),
            ) from None
        raise StoreError(f"the file is not a valid job: {explain(exc)}") from None
    if version > SCHEMA_VERSION:
        job._read_only = (
            f"job {job.id} ({job.name}) was written by a newer fieldkit (schema "
            f"{version}); it is shown read-only: update fieldkit to change it"
        )
    return job


def _lenient_summary(data: dict[str, Any], version: int) -> JobSummary:
    def text(key: str) -> str:
        value = data.get(key)
        return value if isinstance(value, str) else ""

    def moment(key: str) -> datetime:
        try:
            parsed = datetime.fromisoformat(text(key))
        except ValueError:
            return now()
        return parsed if parsed.tzinfo else parsed.astimezone()

    job_id = text("id")
    return JobSummary(
        id=job_id,
        name=text("name") or "(newer file)",
        customer=text("customer"),
        site=text("site"),
        crew=[],
        status=text("status") or "open",
        created_iso=_iso(moment("created_at")),
        updated_iso=_iso(moment("updated_at")),
        revision=revision if isinstance(revision := data.get("revision"), int) else 0,
        link_count=0,
        result_count=0,
        failed_count=0,
        note_count=0,
        read_only=f"written by a newer fieldkit (schema {version}); update fieldkit to open it",
    )


try:
    import fcntl

    def _try_lock(fd: int) -> bool:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return False
        return True

    def _unlock(fd: int) -> None:
        fcntl.flock(fd, fcntl.LOCK_UN)

except ImportError:  # Windows
    import msvcrt

    def _try_lock(fd: int) -> bool:
        try:
            msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)  # type: ignore[attr-defined]
        except OSError:
            return False
        return True

    def _unlock(fd: int) -> None:
        os.lseek(fd, 0, os.SEEK_SET)
        msvcrt.locking(fd, msvcrt.LK_UNLCK, 1)  # type: ignore[attr-defined]


__all__ = [
    "ConflictError",
    "JobStore",
    "JobSummary",
    "LockTimeoutError",
    "NewerSchemaError",
    "QuarantinedFile",
    "ReadOnlyError",
    "StoreError",
    "filter_summaries",
    "local_date",
    "parse_job",
]
