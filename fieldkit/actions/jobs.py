"""Jobs and their links: create, edit, note, done / reopen, delete to the trash, restore, import.

Every function takes the :class:`~fieldkit.jobs.store.JobStore`, the job's full id (the CLI
resolves a prefix first) and ``by``, the operator (see :mod:`fieldkit.actions.operator`), and
applies one change through ``store.update`` (reload, change, save under the job's lock), so two
running copies never lose each other's edits. Bad input raises
:class:`~fieldkit.actions.errors.ActionError` and nothing is written.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from fieldkit.actions.errors import ActionError, check_text
from fieldkit.jobs.counting import open_items
from fieldkit.jobs.models import Job, Link, Note, new_job_id
from fieldkit.jobs.store import JobStore, StoreError
from fieldkit.text.words import counted

#: How many leading characters of a job id people type; no two jobs share them.
SHORT_ID = 8


@dataclass
class Created:
    """A new job and what the user should hear about it (a duplicate name)."""

    job: Job
    warnings: list[str] = field(default_factory=list)


def _update(store: JobStore, job_id: str, change: Callable[[Job], None]) -> Job:
    try:
        return store.update(job_id, change)
    except KeyError as exc:
        raise ActionError(str(exc.args[0]) if exc.args else "no such link") from None


def duplicate_name_warning(store: JobStore, name: str, *, except_id: str = "") -> str | None:
    """A warning when another job already has this name (case and spaces ignored)."""
    wanted = " ".join(name.split()).casefold()
    same = [
        s
        for s in store.list()
        if s.id != except_id and " ".join(s.name.split()).casefold() == wanted
    ]
    if not same:
        return None
    ids = ", ".join(s.id[:SHORT_ID] for s in same[:3])
    return f"another job is already named {name.strip()!r} ({ids}); both are kept"


def _fresh_job_id(store: JobStore) -> str:
    taken = {s.id[:SHORT_ID] for s in store.list()}
    taken |= {job.id[:SHORT_ID] for job in store.trashed()}
    for _ in range(100):
        job_id = new_job_id()
        if job_id[:SHORT_ID] not in taken:
            return job_id
    raise ActionError("could not make a job id distinct from the others")  # pragma: no cover


def create_job(
    store: JobStore,
    name: str,
    *,
    site: str = "",
    customer: str = "",
    crew: Sequence[str] = (),
    by: str = "",
) -> Created:
    """A new open job, saved at once; its id differs from every other in its first 8 digits."""
    name = check_text(name, "name")
    if not name:
        raise ActionError("name: a job needs a name")
    site = check_text(site, "site")
    customer = check_text(customer, "customer")
    members = [check_text(c, "crew") for c in crew]
    by = check_text(by, "by")
    warnings = [w for w in [duplicate_name_warning(store, name)] if w]
    job = Job(
        id=_fresh_job_id(store),
        name=name,
        site=site,
        customer=customer,
        crew=[c for c in members if c],
        created_by=by,
    )
    job.add_event("job created", by=by)
    return Created(store.save(job), warnings)


def edit_job(
    store: JobStore,
    job_id: str,
    *,
    name: str | None = None,
    site: str | None = None,
    customer: str | None = None,
    crew: Sequence[str] | None = None,
    by: str = "",
) -> Created:
    """Change a job's name (rename), site, customer or crew; fields left None stay as they are."""
    by = check_text(by, "by")
    changes: dict[str, Any] = {}
    if name is not None:
        changes["name"] = check_text(name, "name")
        if not changes["name"]:
            raise ActionError("name: a job needs a name")
    if site is not None:
        changes["site"] = check_text(site, "site")
    if customer is not None:
        changes["customer"] = check_text(customer, "customer")
    if crew is not None:
        changes["crew"] = [c for c in (check_text(m, "crew") for m in crew) if c]
    warnings = []
    if "name" in changes:
        warning = duplicate_name_warning(store, changes["name"], except_id=job_id)
        if warning:
            warnings.append(warning)

    def change(job: Job) -> None:
        said = []
        for key, value in changes.items():
            old = getattr(job, key)
            if old != value:
                setattr(job, key, value)
                if key == "name":
                    said.append(f"renamed from {old!r} to {value!r}")
                else:
                    said.append(f"{key} set to {', '.join(value) if key == 'crew' else value!r}")
        if said:
            job.add_event("; ".join(said), by=by)

    return Created(_update(store, job_id, change), warnings)


def add_note(store: JobStore, job_id: str, text: str, *, by: str = "") -> tuple[Job, Note]:
    """Append a note, stamped with ``by`` and now."""
    text = check_text(text, "note", multiline=True, limit=20_000)
    if not text:
        raise ActionError("note: the note is empty")
    by = check_text(by, "by")
    added: list[Note] = []

    def change(job: Job) -> None:
        added[:] = [job.add_note(text, by=by)]

    job = _update(store, job_id, change)
    return job, added[0]


class OpenItemsError(ActionError):
    """A job with open items was to be marked done without confirmation."""

    def __init__(self, items: list[str]) -> None:
        self.items = items
        shown = "; ".join(items[:3]) + (f"; and {len(items) - 3} more" if len(items) > 3 else "")
        super().__init__(f"{counted(len(items), 'open item')}: {shown}")


def mark_done(
    store: JobStore, job_id: str, *, by: str = "", reason: str = "", confirm: bool = False
) -> Job:
    """Mark a job done. With failures, reference problems or results in doubt, refuses with
    :class:`OpenItemsError` (listing them) unless ``confirm``; ``reason`` is noted either way."""
    by = check_text(by, "by")
    reason = check_text(reason, "reason", multiline=True, limit=20_000)
    job = store.load(job_id)
    items = open_items(job)
    if items and not confirm:
        raise OpenItemsError(items)

    def change(job: Job) -> None:
        still = open_items(job)
        what = "marked done"
        if still:
            what += f" with {counted(len(still), 'open item')}: " + "; ".join(still)
        job.status = "done"
        job.add_event(what, by=by)
        if reason:
            job.add_note(f"Marked done: {reason}", by=by)

    return _update(store, job_id, change)


def reopen(store: JobStore, job_id: str, *, by: str = "", reason: str = "") -> Job:
    """Mark a done job open again."""
    by = check_text(by, "by")
    reason = check_text(reason, "reason", multiline=True, limit=20_000)

    def change(job: Job) -> None:
        job.status = "open"
        job.add_event("reopened", by=by)
        if reason:
            job.add_note(f"Reopened: {reason}", by=by)

    return _update(store, job_id, change)


# -- links ---------------------------------------------------------------------------------
@dataclass(frozen=True)
class LinkFields:
    """What a user gives for a link. ``None`` in an edit leaves that field as it is."""

    label: str | None = None
    end_a: str | None = None
    end_b: str | None = None
    fibre_type: str | None = None
    fibre_count: int | None = None
    cable_id: str | None = None
    length_m: float | None = None

    def checked(self) -> dict[str, Any]:
        out: dict[str, Any] = {}
        for name in ("label", "end_a", "end_b", "fibre_type", "cable_id"):
            value = getattr(self, name)
            if value is not None:
                out[name] = check_text(value, name.replace("_", " "))
        if "label" in out and not out["label"]:
            raise ActionError("label: a link needs a label")
        if self.fibre_count is not None:
            if isinstance(self.fibre_count, bool) or not 1 <= self.fibre_count <= MAX_FIBRES:
                raise ActionError(
                    f"fibre count: {self.fibre_count} is not a fibre count (1 to {MAX_FIBRES})"
                )
            out["fibre_count"] = self.fibre_count
        if self.length_m is not None:
            if not math.isfinite(self.length_m) or self.length_m < 0:
                raise ActionError(f"length: {self.length_m} m is not a length")
            out["length_m"] = float(self.length_m)
        return out


#: The largest cables made hold 6912 fibres (common practice); more is a typing mistake.
MAX_FIBRES = 6912


def parse_link_text(
    *,
    label: str = "",
    end_a: str = "",
    end_b: str = "",
    fibre_type: str = "",
    fibre_count: str = "",
    cable_id: str = "",
    length: str = "",
) -> LinkFields:
    """Link fields as typed in the workspace or on the command line (``1.2 km``, ``3900 ft``,
    a bare number is metres; an empty count or length means none)."""
    from fieldkit.calc.units import InputError, Kind, parse, parse_number

    count: int | None = None
    if fibre_count.strip():
        try:
            number = parse_number(fibre_count, "fibre count")
        except InputError as exc:
            raise ActionError(str(exc)) from None
        if number != int(number) or not 1 <= number <= MAX_FIBRES:
            raise ActionError(
                f"fibre count: {fibre_count.strip()} is not a fibre count (1 to {MAX_FIBRES})"
            )
        count = int(number)
    length_m: float | None = None
    if length.strip():
        try:
            value = parse(length, Kind.LENGTH, default_unit="m", what="length")
        except InputError as exc:
            raise ActionError(str(exc)) from None
        length_m = float(value.to("m"))
        if length_m < 0:
            raise ActionError(f"length: {length.strip()} is negative")
    return LinkFields(label, end_a, end_b, fibre_type, count, cable_id, length_m)


def add_link(store: JobStore, job_id: str, fields: LinkFields, *, by: str = "") -> tuple[Job, Link]:
    """Add a link; refuses a label the job already has."""
    by = check_text(by, "by")
    values = fields.checked()
    if not values.get("label"):
        raise ActionError("label: a link needs a label")
    added: list[Link] = []

    def change(job: Job) -> None:
        if job.link_by_label(values["label"]) is not None:
            raise ActionError(f"label: job {job.name!r} already has a link {values['label']!r}")
        link = job.add_link(**values)
        job.add_event(f"link {link.label!r} added", by=by)
        added[:] = [link]

    job = _update(store, job_id, change)
    return job, added[0]


def edit_link(
    store: JobStore, job_id: str, link_id: str, fields: LinkFields, *, by: str = ""
) -> tuple[Job, Link]:
    """Change a link's label, ends, fibre type, fibre count, cable id or length."""
    by = check_text(by, "by")
    values = fields.checked()
    edited: list[Link] = []

    def change(job: Job) -> None:
        link = job.link(link_id)
        if "label" in values:
            other = job.link_by_label(values["label"])
            if other is not None and other.id != link.id:
                raise ActionError(f"label: job {job.name!r} already has a link {values['label']!r}")
        said = []
        for key, value in values.items():
            if getattr(link, key) != value:
                said.append(f"{key.replace('_', ' ')} {getattr(link, key)!r} -> {value!r}")
                setattr(link, key, value)
        if "fibre_count" in values:
            beyond = [r.fibre for r in link.results if r.fibre > values["fibre_count"]]
            if beyond:
                raise ActionError(
                    f"fibre count: the link holds results for fibre {max(beyond)}; "
                    f"the count cannot be {values['fibre_count']}"
                )
        if said:
            job.add_event(f"link {link.label!r} edited: " + ", ".join(said), by=by)
        edited[:] = [link]

    job = _update(store, job_id, change)
    return job, edited[0]


def find_link(job: Job, link: str, *, create: bool = False) -> Link:
    """The link of ``job`` whose id or label is ``link``; a new one by that label with ``create``.

    Raises
    ------
    KeyError
        Naming the job and the links it has, when there is no such link and ``create`` is off.
    """
    for item in job.links:
        if item.id == link:
            return item
    found = job.link_by_label(link)
    if found is not None:
        return found
    if create:
        return job.add_link(link)
    labels = ", ".join(repr(item.label) for item in job.links) or "none"
    raise KeyError(f"job {job.name!r} has no link {link!r} (its links: {labels})")


# -- delete, restore, import -----------------------------------------------------------------
def delete_job(store: JobStore, job_id: str, *, by: str = "") -> Path:
    """Move a job to the trash folder (nothing is destroyed); :func:`restore_job` brings it back.

    The deletion is recorded in the job's own history first, so the trashed file says who
    deleted it and when.
    """
    by = check_text(by, "by")

    def change(job: Job) -> None:
        job.add_event("moved to the trash", by=by)

    _update(store, job_id, change)
    return store.move_to_trash(job_id)


def restore_job(store: JobStore, prefix: str, *, by: str = "") -> Job:
    """Bring a job back from the trash (``prefix``: its id or the start of it)."""
    by = check_text(by, "by")
    wanted = prefix.strip().lower()
    matches = sorted({job.id for job in store.trashed() if job.id.startswith(wanted)})
    if not wanted or not matches:
        raise ActionError(f"no job in the trash with an id starting {wanted!r}")
    if len(matches) > 1 and wanted not in matches:
        raise ActionError(f"{wanted!r} matches {len(matches)} jobs in the trash; type more of it")
    job_id = wanted if wanted in matches else matches[0]
    store.restore_from_trash(job_id)

    def change(job: Job) -> None:
        job.add_event("restored from the trash", by=by)

    return _update(store, job_id, change)


def import_file(
    store: JobStore,
    path: Path,
    checking: Any = None,
    importing: Callable[[], Any] | None = None,
) -> Any:
    """Merge a hand-off or job file into the store (same ids merge); returns the import report.

    ``checking`` reports progress while the file is read and checked; ``importing()`` gives the
    progress reporter for the merge (both optional: the CLI shows them on a terminal).
    """
    from fieldkit.jobs.handoff import import_jobs, read_handoff

    jobs = read_handoff(path, checking)
    return import_jobs(store, jobs, importing() if importing is not None else None)


__all__ = [
    "Created",
    "LinkFields",
    "OpenItemsError",
    "StoreError",
    "add_link",
    "add_note",
    "create_job",
    "delete_job",
    "edit_job",
    "edit_link",
    "find_link",
    "import_file",
    "mark_done",
    "parse_link_text",
    "reopen",
    "restore_job",
]
