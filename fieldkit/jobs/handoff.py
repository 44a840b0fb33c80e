"""Importing a hand-off file (or a single job file) from another laptop.

Everything in the file is read and validated before anything is written: a file that is too
big, is not JSON, holds an id that is not a generated id (a path trick), or has a field of the
wrong type is refused with a message and the store is left as it was.

Merging is by id, so importing the same file twice changes nothing: a job not in the store is
added; for a job already there, notes, links and each link's references, results, splices and
faults are added when their id is new. The same id with different content is a conflict: the
local record is kept and the conflict reported, never overwritten.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from pydantic import BaseModel

from fieldkit.jobs.models import JOB_ID_RE, Job, Link
from fieldkit.jobs.reports import HANDOFF_FORMAT
from fieldkit.jobs.store import (
    MAX_FILE_BYTES,
    ConflictError,
    JobStore,
    NewerSchemaError,
    StoreError,
    job_from_dict,
)


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


def read_handoff(path: Path) -> list[Job]:
    """The jobs in a hand-off file or a single job file, all validated; StoreError if not."""
    try:
        size = path.stat().st_size
    except OSError as exc:
        raise StoreError(f"cannot read {path}: {exc.strerror or exc}") from None
    if size > MAX_FILE_BYTES:
        raise StoreError(
            f"{path.name} is {size / 1e6:.1f} MB, larger than the "
            f"{MAX_FILE_BYTES // (1024 * 1024)} MB import limit; nothing imported"
        )
    try:
        with open(path, "rb") as handle:
            raw = handle.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise StoreError(f"cannot read {path}: {exc.strerror or exc}") from None
    if len(raw) > MAX_FILE_BYTES:
        raise StoreError(f"{path.name} is larger than the import limit; nothing imported")
    try:
        data = json.loads(raw)
    except UnicodeDecodeError:
        raise StoreError(f"{path.name} is not UTF-8 text; nothing imported") from None
    except ValueError as exc:
        raise StoreError(f"{path.name} is not valid JSON ({exc}); nothing imported") from None
    except RecursionError:
        raise StoreError(
            f"{path.name} is not valid JSON (nested too deeply); nothing imported"
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
        if not isinstance(job_id, str) or not JOB_ID_RE.match(job_id):
            raise StoreError(
                f"{path.name}: job {number} has an id that is not a fieldkit job "
                f"id ({str(job_id)[:40]!r}); nothing imported"
            )
        try:
            job = job_from_dict(item)
        except NewerSchemaError as exc:
            raise StoreError(f"{path.name}: {exc}; nothing imported") from None
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
    return jobs


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
    return added, conflicts


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
            conflicts.append(f"{where} {item.id} differs; kept this laptop's")
    return added, conflicts


def import_jobs(store: JobStore, jobs: list[Job]) -> ImportReport:
    """Merge validated jobs into the store (see the module docstring)."""
    report = ImportReport()
    for incoming in jobs:
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
    return report
