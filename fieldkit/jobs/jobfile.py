"""One job file: reading it safely, parsing it strictly, and the size and shape policy.

Every job that is read (a job file, a backup, an imported hand-off) and every job that is
written goes through the rules here:

- only a regular file is read, at most :data:`~fieldkit.jobs.models.MAX_FILE_BYTES`
  (:func:`fieldkit.fsutil.read_regular`);
- the JSON must not repeat a key (the last value would silently win) nor nest deeper than the
  policy allows;
- values are validated strictly: no ``"7"`` for 7, no ``"yes"`` for true, no ``0`` for a date;
- a file's id must be the id its name promises, whatever its schema version;
- at most :data:`~fieldkit.jobs.models.MAX_RECORDS_PER_JOB` records, text lengths as the models
  say (``str_max_length`` and each field's own limit).

The store checks a job against :func:`check_before_save` before it acknowledges a save, so
nothing it acknowledged can be refused when read back.
"""

from __future__ import annotations

import json
from datetime import datetime
from typing import Any

from pydantic import ValidationError

from fieldkit.fsutil import mib
from fieldkit.jobs.errors import StoreError
from fieldkit.jobs.index import JobSummary, _iso
from fieldkit.jobs.migrations import MigrationError, migrate
from fieldkit.jobs.models import MAX_FILE_BYTES, MAX_RECORDS_PER_JOB, SCHEMA_VERSION, Job, now


class NewerSchemaError(StoreError):
    """A file from a newer fieldkit that this version cannot even read; it stays untouched."""

    def __init__(self, message: str, summary: JobSummary) -> None:
        super().__init__(message)
        self.summary = summary


class _DuplicateKey(ValueError):
    pass


def _no_duplicate_keys(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    out = dict(pairs)
    if len(out) != len(pairs):
        seen: set[str] = set()
        for key, _ in pairs:
            if key in seen:
                raise _DuplicateKey(key)
            seen.add(key)
    return out


def loads_strict(raw: bytes | str) -> Any:
    """JSON text as Python values, refusing a repeated key in any object.

    Raises
    ------
    StoreError
        For text that is not UTF-8, not JSON, nested beyond the parser's limit, or repeats a key.
    """
    try:
        return json.loads(raw, object_pairs_hook=_no_duplicate_keys)
    except UnicodeDecodeError:
        raise StoreError("the file is not UTF-8 text") from None
    except _DuplicateKey as exc:
        raise StoreError(
            f"the file holds the key {str(exc)[:60]!r} twice in one object; which one is meant "
            "cannot be told"
        ) from None
    except ValueError as exc:
        raise StoreError(f"the file is not valid JSON ({exc})") from None
    except RecursionError:
        raise StoreError("the file is not valid JSON (nested too deeply)") from None


def explain(exc: ValidationError) -> str:
    """One line naming the first invalid field of a pydantic error, in plain words."""
    errors = exc.errors()
    first = errors[0]
    where = ".".join(str(part) for part in first.get("loc", ())) or "the file"
    more = f" (and {len(errors) - 1} more problems)" if len(errors) > 1 else ""
    return f"{where}: {first.get('msg', 'invalid')}{more}"


def parse_job(raw: bytes, *, expected_id: str | None = None) -> Job:
    """Parse, migrate and validate one job from its file bytes.

    Raises :class:`StoreError` with the reason for anything that is not a valid job, and
    :class:`NewerSchemaError` for a newer layout whose fields this version does not know.
    """
    data = loads_strict(raw)
    if not isinstance(data, dict):
        raise StoreError("the file does not hold a job (not a JSON object)")
    if expected_id is not None and data.get("id") != expected_id:
        # checked before anything else, for every schema version: the listing must never show
        # an id (a path, another job's id, escape codes) that the file name did not promise
        raise StoreError(f"the file holds job id {str(data.get('id'))[:40]!r}, not {expected_id!r}")
    return job_from_dict(data, raw=raw)


def job_from_dict(data: dict[str, Any], *, raw: bytes | None = None) -> Job:
    """Migrate and validate a parsed job (strictly, as JSON); see :func:`parse_job`.

    ``raw``, the bytes ``data`` was parsed from, saves serialising it again when no migration
    changes it.
    """
    try:
        migrated = migrate(data)
    except MigrationError as exc:
        raise StoreError(str(exc)) from None
    except (TypeError, AttributeError, KeyError) as exc:
        raise StoreError(f"the file does not fit its schema version ({exc})") from None
    version = migrated["schema_version"]
    try:
        if raw is None or migrated is not data:
            raw = json.dumps(migrated, ensure_ascii=False, allow_nan=False).encode()
        job = Job.model_validate_json(raw, strict=True)
    except ValidationError as exc:
        if any("recursion limit" in str(e.get("msg", "")) for e in exc.errors()):
            raise StoreError("the file is not a valid job (nested too deeply)") from None
        if version > SCHEMA_VERSION:
            raise NewerSchemaError(
                f"job {str(migrated.get('id'))[:40]} was written by a newer fieldkit (schema "
                f"{version}; this one reads {SCHEMA_VERSION}); update fieldkit to open it",
                _lenient_summary(migrated, version),
            ) from None
        raise StoreError(f"the file is not a valid job: {explain(exc)}") from None
    except (ValueError, RecursionError) as exc:  # json.dumps: NaN, or nesting past its limit
        raise StoreError(f"the file is not a valid job ({exc})") from None
    if version > SCHEMA_VERSION:
        job._read_only = (
            f"job {job.id} ({job.name}) was written by a newer fieldkit (schema "
            f"{version}); it is shown read-only: update fieldkit to change it"
        )
    count = record_count(job)
    if count > MAX_RECORDS_PER_JOB:
        job._read_only = (
            f"job {job.id} ({job.name}) holds {count:,} records, more than the "
            f"{MAX_RECORDS_PER_JOB:,} a job may hold; it is shown read-only: export it and "
            "split the work into several jobs"
        )
    return job


def record_count(job: Job) -> int:
    """Notes, links and every record in every list of every link, counted together."""
    count = len(job.notes) + len(job.links)
    for link in job.links:
        for _name, value in link:
            if isinstance(value, list):
                count += len(value)
    return count


def check_before_save(job: Job, data: bytes) -> None:
    """Refuse, before anything is written, a job the size policy would refuse on reading.

    Raises
    ------
    StoreError
        Naming the limit: too many records, or a file larger than the read limit.
    """
    count = record_count(job)
    if count > MAX_RECORDS_PER_JOB:
        raise StoreError(
            f"it would hold {count:,} records, more than the {MAX_RECORDS_PER_JOB:,} a job may "
            "hold; start another job for the rest of the work"
        )
    if len(data) > MAX_FILE_BYTES:
        raise StoreError(
            f"the job file would be {mib(len(data))}, larger than the {mib(MAX_FILE_BYTES)} a "
            "job file may be; start another job for the rest of the work"
        )


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
        name=text("name")[:200] or "(newer file)",
        customer=text("customer")[:200],
        site=text("site")[:200],
        crew=[],
        status=text("status") if text("status") in ("open", "done") else "open",
        created_iso=_iso(moment("created_at")),
        updated_iso=_iso(moment("updated_at")),
        revision=revision if type(revision := data.get("revision")) is int else 0,
        link_count=0,
        result_count=0,
        failed_count=0,
        note_count=0,
        read_only=f"written by a newer fieldkit (schema {version}); update fieldkit to open it",
    )
