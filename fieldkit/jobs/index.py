"""The index: one summary per job, kept in ``.index/summaries.json`` so that listing does not
parse every job file. It is a cache: a row that does not fit is dropped and its job parsed
again, a file that does not parse is rebuilt, and a failed write only makes the next listing
slower.

Each entry is ``id -> [inode, mtime_ns, size, row]``; a row is the :class:`JobSummary` fields in
order. Rows are checked field by field before use (a row of the right length but the wrong
types used to crash every listing).

No pydantic here, nor the records: the Jobs workspace lists the jobs from this index before the
records are imported (they are a tenth of the start-up); only :meth:`JobSummary.of` needs a
:class:`~fieldkit.jobs.models.Job`, which its caller has already imported.
"""

from __future__ import annotations

import contextlib
import json
import re
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldkit.fsutil import MIB, atomic_write_bytes, read_regular
from fieldkit.jobs.ids import JOB_ID_RE, SCHEMA_VERSION

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job

INDEX_DIR = ".index"
INDEX_NAME = "summaries.json"
INDEX_VERSION = 3
#: About 300 bytes a job: room for a million jobs, and a bound on what a hostile index costs.
MAX_INDEX_BYTES = 512 * MIB


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
            # One join of the row's strings (checked str by row_ok or JobSummary.of): the
            # first filter keystroke makes one of these per job.
            self._search = "\n".join(
                [self.id, self.name, self.customer, self.site, *self.crew, *self.link_labels]
            ).casefold()
        return self._search

    @property
    def created_at(self) -> datetime:
        return datetime.fromisoformat(self.created_iso)

    @property
    def updated_at(self) -> datetime:
        return datetime.fromisoformat(self.updated_iso)

    @classmethod
    def of(cls, job: Job) -> JobSummary:
        from fieldkit.jobs.counting import Count, current_results, result_count

        # Current results only: a retest supersedes (see fieldkit.jobs.counting).
        current = [(link, r) for link in job.links for r in current_results(link)]
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
            result_count=len(current),
            failed_count=sum(result_count(link, r) is Count.FAIL for link, r in current),
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
    def from_json(cls, row: Any) -> JobSummary:
        """A summary from an index row; ValueError when the row does not fit (see row_ok)."""
        if not row_ok(row):
            raise ValueError("index row does not fit the summary")
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


# What _iso writes, twice (created and updated): 2026-03-14T07:00:00.000000+00:00
_TWO_ISO_RE = re.compile(r"(?:\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{6}\+00:00){2}")
_STATUSES = frozenset(("open", "done"))


def _all_text(items: list[Any]) -> bool:
    for item in items:
        if type(item) is not str:
            return False
    return True


def row_ok(row: Any) -> bool:
    """True when an index row has the summary's fields with their types.

    Written for speed (about 1 µs a row, unrolled, one regular expression for both times):
    the fast listing checks every row of a 100,000-job index before it trusts it.
    """
    if type(row) is not list or len(row) != 15:
        return False
    job_id, name, customer, site, crew, status, created, updated = row[:8]
    revision, links, results, failed, notes, read_only, labels = row[8:]
    return (
        type(job_id) is str
        and type(name) is str
        and type(customer) is str
        and type(site) is str
        and type(created) is str
        and type(updated) is str
        and type(revision) is int
        and type(links) is int
        and type(results) is int
        and type(failed) is int
        and type(notes) is int
        and revision >= 0
        and links >= 0
        and results >= 0
        and failed >= 0
        and notes >= 0
        and type(status) is str
        and status in _STATUSES
        and (read_only is None or type(read_only) is str)
        and type(crew) is list
        and type(labels) is list
        and _all_text(crew)
        and _all_text(labels)
        and JOB_ID_RE.fullmatch(job_id) is not None
        and _TWO_ISO_RE.fullmatch(created + updated) is not None
    )


def entry_ok(job_id: str, entry: Any) -> bool:
    """True when an index entry is [inode, mtime_ns, size, row] with a fitting row for job_id."""
    return (
        type(entry) is list
        and len(entry) == 4
        and all(type(n) is int for n in entry[:3])
        and row_ok(entry[3])
        and entry[3][0] == job_id
    )


IndexEntries = dict[str, list[Any]]


def read_index(path: Path) -> tuple[IndexEntries, int | None, bool]:
    """The entries of the index file, the folder mtime it was settled at, and whether its
    entries are newest first; ``({}, None, False)`` for a missing, unreadable, damaged or
    outdated index (rows are checked by the caller)."""
    try:
        data = json.loads(read_regular(path, MAX_INDEX_BYTES, follow_symlinks=False))
    except (OSError, ValueError, RecursionError):
        return {}, None, False
    if (
        not isinstance(data, dict)
        or data.get("index_version") != INDEX_VERSION
        or data.get("schema_version") != SCHEMA_VERSION
        or not isinstance(data.get("entries"), dict)
    ):
        return {}, None, False
    entries: IndexEntries = data["entries"]
    settled = data.get("settled_folder_mtime_ns")
    return entries, settled if type(settled) is int else None, data.get("order") == NEWEST_FIRST


#: The ``order`` of an index whose entries are in the jobs list's order (newest update first,
#: then id): a listing from it needs no sort.
NEWEST_FIRST = "updated desc, id desc"


def write_index(
    path: Path, entries: IndexEntries, settled: int | None, newest_first: bool = False
) -> None:
    """Write the index atomically; a failure is ignored (the index is a cache)."""
    data = json.dumps(
        {
            "index_version": INDEX_VERSION,
            "schema_version": SCHEMA_VERSION,
            "settled_folder_mtime_ns": settled,
            "order": NEWEST_FIRST if newest_first else None,
            "entries": entries,
        },
        ensure_ascii=False,
        separators=(",", ":"),
    )
    with contextlib.suppress(OSError):
        path.parent.mkdir(exist_ok=True)
        atomic_write_bytes(path, data.encode())
