"""Importing a hand-off file (or a single job file) from another laptop.

Everything in the file is read and validated before anything is written: a file that is too
big, is not JSON, holds an id that is not a generated id (a path trick), or has a field of the
wrong type is refused with a message and the store is left as it was.

Merging is by id, so importing the same file twice changes nothing: a job not in the store is
added; for a job already there, notes, links and each link's references, results, splices,
faults and traces are added when their id is new. The same id with different content is a
conflict: the local record is kept and the conflict reported, never overwritten.
"""

from __future__ import annotations

import hashlib
import json
import typing
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pydantic import BaseModel

from fieldkit.fsutil import FileTooLargeError, NotRegularFileError, mib, read_regular
from fieldkit.jobs.jobfile import check_before_save, loads_strict
from fieldkit.jobs.migrations import MigrationError, migrate
from fieldkit.jobs.models import (
    JOB_ID_RE,
    MAX_FILE_BYTES,
    Job,
    Link,
    LossResult,
    TraceRecord,
    settle_history,
)
from fieldkit.jobs.reports import HANDOFF_FORMAT
from fieldkit.jobs.store import (
    ConflictError,
    JobStore,
    NewerSchemaError,
    StoreError,
    job_from_dict,
)

#: Called as ``progress(done, total)`` while jobs are read and while they are merged.
Progress = Callable[[int, int], None]


@dataclass
class ImportReport:
    """What an import did."""

    added_jobs: list[str] = field(default_factory=list)
    merged_jobs: list[str] = field(default_factory=list)
    unchanged_jobs: list[str] = field(default_factory=list)
    added_records: int = 0
    conflicts: list[str] = field(default_factory=list)

    def as_dict(self) -> dict[str, Any]:
        return {
            "added_jobs": self.added_jobs,
            "merged_jobs": self.merged_jobs,
            "unchanged_jobs": self.unchanged_jobs,
            "added_records": self.added_records,
            "conflicts": self.conflicts,
        }


def read_handoff(path: Path, progress: Progress | None = None) -> list[Job]:
    """The jobs in a hand-off file or a single job file, all validated; StoreError if not.

    The same rules as a job file in the store: a regular file only, at most the size limit,
    no repeated keys, strict types, and each job within the size policy (as the store would
    write it). Records without an id get one made from their content (see
    :func:`assign_content_ids`), so importing the same file again merges instead of adding
    copies.
    """
    try:
        raw = read_regular(path, MAX_FILE_BYTES)
    except FileTooLargeError:
        raise StoreError(
            f"{path.name} is larger than the {mib(MAX_FILE_BYTES)} import limit; nothing imported"
        ) from None
    except NotRegularFileError as exc:
        raise StoreError(f"{path} is {exc.strerror}; nothing imported") from None
    except OSError as exc:
        raise StoreError(f"cannot read {path}: {exc.strerror or exc}") from None
    try:
        data = loads_strict(raw)
    except StoreError as exc:
        raise StoreError(
            f"{path.name}: {str(exc).removeprefix('the file ')}; nothing imported"
        ) from None
    if isinstance(data, dict) and data.get("format") == HANDOFF_FORMAT:
        items = data.get("jobs")
        if not isinstance(items, list):
            raise StoreError(f"{path.name}: the hand-off has no list of jobs; nothing imported")
    elif isinstance(data, dict) and "schema_version" in data and "links" in data:
        items = [data]
    else:
        raise StoreError(
            f"{path.name} is neither a fieldkit hand-off nor a job file; nothing imported"
        )
    jobs: list[Job] = []
    seen: set[str] = set()
    for number, item in enumerate(items, start=1):
        if not isinstance(item, dict):
            raise StoreError(f"{path.name}: job {number} is not an object; nothing imported")
        job_id = item.get("id")
        if not isinstance(job_id, str) or not JOB_ID_RE.fullmatch(job_id):
            raise StoreError(
                f"{path.name}: job {number} has an id that is not a fieldkit job "
                f"id ({str(job_id)[:40]!r}); nothing imported"
            )
        try:
            job = job_from_dict(assign_content_ids(migrate(item)))
            check_before_save(job, job.model_dump_json(indent=1).encode())
        except NewerSchemaError as exc:
            raise StoreError(f"{path.name}: {exc}; nothing imported") from None
        except MigrationError as exc:
            raise StoreError(
                f"{path.name}: job {number} ({job_id}): {exc}; nothing imported"
            ) from None
        except StoreError as exc:
            raise StoreError(
                f"{path.name}: job {number} ({job_id}): {exc}; nothing imported"
            ) from None
        if job.read_only:
            raise StoreError(f"{path.name}: {job.read_only}; nothing imported")
        if job.id in seen:
            raise StoreError(f"{path.name}: job {job.id} appears twice; nothing imported")
        twice = _repeated_record_id(job)
        if twice:
            raise StoreError(f"{path.name}: job {job.id} holds {twice} twice; nothing imported")
        seen.add(job.id)
        jobs.append(job)
        if progress is not None:
            progress(number, len(items))
    return jobs


def _id_lists(model: type[BaseModel]) -> dict[str, type[BaseModel]]:
    """The fields of ``model`` that are lists of records carrying an ``id``, with the record's
    model (read from the annotations, so lists added to the models later are covered)."""
    out: dict[str, type[BaseModel]] = {}
    for name, info in model.model_fields.items():
        annotation = info.annotation
        if typing.get_origin(annotation) is list:
            (item,) = typing.get_args(annotation)
            if isinstance(item, type) and issubclass(item, BaseModel) and "id" in item.model_fields:
                out[name] = item
    return out


def _content_id(record: dict[str, Any], parent: str, nth: int) -> str:
    """An id made from a record's content: the same record in the same place always gets the
    same id (a SHA-256 of its canonical JSON, its parent's id and its repeat number)."""
    canonical = json.dumps(
        {"parent": parent, "nth": nth, "record": record},
        sort_keys=True,
        ensure_ascii=False,
        separators=(",", ":"),
        allow_nan=True,
        default=str,
    )
    return "c" + hashlib.sha256(canonical.encode()).hexdigest()[:31]


def assign_content_ids(data: dict[str, Any]) -> dict[str, Any]:
    """A copy of a (migrated) job dict in which every record without an ``id`` has one made
    from its content. A link's id comes from its own fields, not from the records it holds, so
    the same link with more results in a later hand-off still merges. Anything that is not the
    expected shape is left for validation to refuse.
    """
    out = dict(data)
    parent = str(data.get("id"))
    for name, model in _id_lists(Job).items():
        if name in out:
            out[name] = _with_ids(out[name], model, parent)
    return out


def _with_ids(items: Any, model: type[BaseModel], parent: str) -> Any:
    if not isinstance(items, list):
        return items
    children = _id_lists(model)
    repeats: dict[str, int] = {}
    result = []
    for item in items:
        if not isinstance(item, dict):
            result.append(item)
            continue
        item = dict(item)
        if "id" not in item:
            own = {k: v for k, v in item.items() if k not in children}
            key = json.dumps(own, sort_keys=True, default=str, allow_nan=True)
            nth = repeats[key] = repeats.get(key, 0) + 1
            item["id"] = _content_id(own, parent, nth)
        for name, child in children.items():
            if name in item:
                item[name] = _with_ids(item[name], child, str(item["id"]))
        result.append(item)
    return result


def _repeated_record_id(job: Job) -> str | None:
    """The first record id that a job holds twice in one list, e.g. "note 1a23...", or None.

    Merging matches records by id, so a repeated id would make one of the two silently win.
    """
    groups: list[tuple[str, list[Any]]] = [("note", list(job.notes)), ("link", list(job.links))]
    for link in job.links:
        groups += [
            ("result", list(link.results)),
            ("reference", list(link.references)),
            ("closure", list(link.closures)),
            ("splice limit", list(link.splice_limits)),
            ("fault", list(link.faults)),
            ("trace", list(link.traces)),
        ]
        for closure in link.closures:
            groups += [
                ("cable", list(closure.cables)),
                ("tray", list(closure.trays)),
                ("splice", list(closure.splices)),
            ]
    for kind, records in groups:
        ids: set[str] = set()
        for record in records:
            if record.id in ids:
                return f"{kind} {record.id}"
            ids.add(record.id)
    return None


def _same(a: BaseModel | None, b: BaseModel | None) -> bool:
    if a is None or b is None:
        return a is b
    return a.model_dump() == b.model_dump()


def merge_job(local: Job, incoming: Job) -> tuple[int, list[str]]:
    """Add to ``local`` what ``incoming`` has and it lacks; returns (records added, conflicts)."""
    added = 0
    conflicts: list[str] = []
    where = f"job {local.id} ({local.name})"
    for name in ("name", "customer", "site", "status"):
        mine, theirs = getattr(local, name), getattr(incoming, name)
        if mine != theirs:
            if not mine and theirs:
                setattr(local, name, theirs)
                added += 1
            else:
                conflicts.append(f"{where}: {name} kept {mine!r}, the file has {theirs!r}")
    for person in incoming.crew:
        if person not in local.crew:
            local.crew.append(person)
            added += 1
    n, c = _merge_list(local.notes, incoming.notes, f"{where}: note")
    added += n
    conflicts += c
    links = {link.id: link for link in local.links}
    for link in incoming.links:
        if link.id not in links:
            local.links.append(link)
            added += (
                1
                + len(link.results)
                + len(link.references)
                + sum(1 + len(c.splices) for c in link.closures)
                + len(link.faults)
                + len(link.traces)
            )
            continue
        n, c = _merge_link(links[link.id], link, f"{where}, link {links[link.id].label}")
        added += n
        conflicts += c
    return added, conflicts


def _merge_link(mine: Link, theirs: Link, where: str) -> tuple[int, list[str]]:
    added = 0
    conflicts: list[str] = []
    for name in ("label", "end_a", "end_b", "fibre_type", "length_m", "fibre_count"):
        a, b = getattr(mine, name), getattr(theirs, name)
        if a != b:
            if a in ("", None) and b not in ("", None):
                setattr(mine, name, b)
                added += 1
            elif b not in ("", None):
                conflicts.append(f"{where}: {name} kept {a!r}, the file has {b!r}")
    if mine.budget is None and theirs.budget is not None:
        mine.budget = theirs.budget
        added += 1
    elif theirs.budget is not None and not _same(mine.budget, theirs.budget):
        conflicts.append(f"{where}: the loss budget differs; kept this laptop's")
    for attr, noun in (
        ("references", "reference"),
        ("results", "result"),
        ("splice_limits", "splice limit"),
        ("faults", "located fault"),
        ("traces", "trace"),
    ):
        n, c = _merge_list(getattr(mine, attr), getattr(theirs, attr), f"{where}: {noun}")
        added += n
        conflicts += c
    closures = {closure.id: closure for closure in mine.closures}
    for closure in theirs.closures:
        if closure.id not in closures:
            mine.closures.append(closure)
            added += 1 + len(closure.splices)
            continue
        here = closures[closure.id]
        inside = f"{where}, closure {here.name}"
        for attr, noun in (("cables", "cable"), ("trays", "tray"), ("splices", "splice")):
            n, c = _merge_list(getattr(here, attr), getattr(closure, attr), f"{inside}: {noun}")
            added += n
            conflicts += c
        if not here.plan and closure.plan:
            here.plan, here.plan_source = list(closure.plan), closure.plan_source
            added += 1
        elif closure.plan and [r.model_dump() for r in here.plan] != [
            r.model_dump() for r in closure.plan
        ]:
            conflicts.append(f"{inside}: the splice plan differs; kept this laptop's")
    settle_history(mine)
    return added, conflicts


_SUPERSEDED = ("superseded_at", "superseded_by", "superseded_note")


def _merge_list(mine: list[Any], theirs: list[Any], where: str) -> tuple[int, list[str]]:
    by_id = {item.id: item for item in mine}
    added = 0
    conflicts = []
    for item in theirs:
        have = by_id.get(item.id)
        if have is None:
            mine.append(item)
            by_id[item.id] = item
            added += 1
        elif not _same(have, item):
            if isinstance(have, LossResult | TraceRecord) and have.model_dump(
                exclude=set(_SUPERSEDED)
            ) == item.model_dump(exclude=set(_SUPERSEDED)):
                # The same result; the other laptop retested it. Superseded stays superseded.
                if have.current and not item.current:
                    for name in _SUPERSEDED:
                        if name in type(have).model_fields:
                            setattr(have, name, getattr(item, name))
                continue
            conflicts.append(f"{where} {item.id} differs; kept this laptop's")
    return added, conflicts


def import_jobs(store: JobStore, jobs: list[Job], progress: Progress | None = None) -> ImportReport:
    """Merge validated jobs into the store (see the module docstring); ``progress(done,
    total)`` is called after each job."""
    report = ImportReport()
    for done, incoming in enumerate(jobs, start=1):
        if progress is not None and done > 1:
            progress(done - 1, len(jobs))
        path = store.path_of(incoming.id)
        if not path.exists():
            fresh = incoming.model_copy(deep=True)
            fresh.revision = 0
            try:
                store.save(fresh)
            except ConflictError:
                pass  # created meanwhile by another program: merge below
            else:
                report.added_jobs.append(incoming.id)
                continue
        outcome: dict[str, Any] = {}

        def merge(local: Job, incoming: Job = incoming, outcome: dict[str, Any] = outcome) -> None:
            outcome["added"], outcome["conflicts"] = merge_job(
                local, incoming.model_copy(deep=True)
            )

        try:
            probe = store.load(incoming.id)
            added, conflicts = merge_job(probe, incoming.model_copy(deep=True))
            if added == 0:
                report.unchanged_jobs.append(incoming.id)
                report.conflicts += conflicts
                continue
            store.update(incoming.id, merge)
        except StoreError as exc:
            report.conflicts.append(f"job {incoming.id}: not merged: {exc}")
            continue
        report.merged_jobs.append(incoming.id)
        report.added_records += outcome["added"]
        report.conflicts += outcome["conflicts"]
    if progress is not None and jobs:
        progress(len(jobs), len(jobs))
    return report
