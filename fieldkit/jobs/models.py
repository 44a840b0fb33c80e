"""The records of a per-job log: jobs, links, and what the workspaces store onto a link.

One rule for every number: a bare float with its unit in the field name (``length_m``,
``loss_db``, ``level_dbm``, ``wavelength_nm``). What the user typed is parsed by
``fieldkit.calc.units`` before it gets here, so a file never holds "1.2 km" in one place and
1200 in another.

Every model forbids unknown fields and refuses NaN and infinity. Times are timezone-aware
(stored in UTC). Records carry who (``by``) and when (``at``); results name the reference
they were taken against, so a report can trace every number.

Files are migrated from older schema versions by ``fieldkit.jobs.migrations`` on the parsed
dict before validation; nothing here rewrites input (no ``mode="before"`` validators).
"""

from __future__ import annotations

import re
from typing import Any, Literal

from pydantic import AwareDatetime, Field, PrivateAttr, field_validator

# The size and shape policy lives in fieldkit.jobs.base beside the base record that applies it;
# named here too, where the records are.
from fieldkit.jobs.base import MAX_FILE_BYTES as MAX_FILE_BYTES
from fieldkit.jobs.base import MAX_NESTING_DEPTH as MAX_NESTING_DEPTH
from fieldkit.jobs.base import MAX_NOTE_TEXT as MAX_NOTE_TEXT
from fieldkit.jobs.base import MAX_RECORDS_PER_JOB as MAX_RECORDS_PER_JOB
from fieldkit.jobs.base import MAX_SHORT_TEXT as MAX_SHORT_TEXT
from fieldkit.jobs.base import RECORD_ID_RE, Record, _check_finite, _Id, new_job_id, now
from fieldkit.jobs.base import new_id as new_id  # re-exported: older code imports it here
from fieldkit.jobs.splices import Closure, SpliceLimit

#: The version of the job-file layout this fieldkit writes. Older files are migrated on load;
#: newer ones open read-only.
SCHEMA_VERSION = 4

#: Job ids: generated, lower-case hex, time-sortable (see :func:`new_id`). Anything else in a
#: file name or an imported file is refused, so no id can name a path. Match it with
#: ``fullmatch``: ``$`` alone also matches before a trailing newline.
JOB_ID_RE = re.compile(r"^[0-9a-f]{12,32}$")


Method = Literal["one-cord", "two-cord", "three-cord"]
Direction = Literal["A->B", "B->A"]

#: Flags a loss result may carry (others may be added by the meter workspace).
FLAG_NEGATIVE_LOSS = "negative-loss"
FLAG_REFERENCE_IN_DOUBT = "reference-in-doubt"


class Note(Record):
    """One entry of a job's notes log."""

    id: str = _Id
    at: AwareDatetime = Field(default_factory=now)
    by: str = Field(default="", max_length=200)
    text: str = Field(min_length=1, max_length=20_000)


class ReferenceRecord(Record):
    """A power-meter reference: the level the meter read through the reference cords.

    ``kind="recheck"`` records the end-of-session re-check; ``drift_db`` is its difference from
    the reference it re-checks, and ``in_doubt_since`` is set on a reference whose re-check
    drifted beyond the tolerance (results taken since then are flagged "reference-in-doubt").
    """

    id: str = _Id
    source_id: str = Field(default="", max_length=200)
    meter_id: str = Field(default="", max_length=200)
    wavelength_nm: float = Field(gt=0)
    level_dbm: float
    method: Method
    cords: list[str] = Field(default_factory=list)
    launch_condition: str | None = None
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)
    kind: Literal["initial", "recheck"] = "initial"
    drift_db: float | None = None
    in_doubt_since: AwareDatetime | None = None


class LossResult(Record):
    """One insertion-loss result: a fibre, a wavelength, a direction.

    ``loss_db`` = reference level − ``reading_dbm`` (IEC 61280-4-1 / -4-2). ``passed`` is None
    when there was no limit to compare against.

    History, not overwrite: a retest of the same fibre, wavelength and direction appends a new
    result and marks this one ``superseded_at`` with ``superseded_by`` naming the new result's
    id (None when the reading was cleared, not retested). A superseded result stays in the file
    and the exports; only the current one counts.
    """

    id: str = _Id
    fibre: int = Field(ge=1)
    wavelength_nm: float = Field(gt=0)
    direction: Direction = "A->B"
    reading_dbm: float | None = None
    loss_db: float
    reference_id: str | None = None
    method: Method = "one-cord"
    limit_db: float | None = None
    passed: bool | None = None
    flags: list[str] = Field(default_factory=list)
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)
    superseded_at: AwareDatetime | None = None
    superseded_by: str | None = Field(default=None, pattern=RECORD_ID_RE)
    #: Who cleared or retested it (the retest's own ``by`` says who took the new reading).
    superseded_note: str = Field(default="", max_length=200)

    @property
    def current(self) -> bool:
        """True while no retest or clearing has superseded this result."""
        return self.superseded_at is None


class BudgetItem(Record):
    """One line of a budget breakdown (fibre, connectors, splices, a splitter...)."""

    name: str
    loss_db: float
    source: str = ""


class BudgetWavelength(Record):
    """The budget at one wavelength: the maximum (acceptance) loss and its breakdown."""

    wavelength_nm: float = Field(gt=0)
    loss_db: float
    typical_loss_db: float | None = None
    items: list[BudgetItem] = Field(default_factory=list)


class BudgetRecord(Record):
    """A loss budget computed for a link, with the link description as it was given."""

    computed_at: AwareDatetime = Field(default_factory=now)
    by: str = ""
    description: dict[str, Any] = Field(default_factory=dict)
    wavelengths: list[BudgetWavelength] = Field(default_factory=list)
    margin_db: float = 0.0
    application: dict[str, Any] | None = None
    transceiver: dict[str, Any] | None = None

    @field_validator("description", "application", "transceiver")
    @classmethod
    def _finite(cls, value: dict[str, Any] | None) -> dict[str, Any] | None:
        _check_finite(value, "budget")
        return value

    def at_wavelength(self, wavelength_nm: float) -> BudgetWavelength | None:
        """The budget row for a wavelength (within 0.5 nm), if it was computed."""
        for row in self.wavelengths:
            if abs(row.wavelength_nm - wavelength_nm) <= 0.5:
                return row
        return None


class FaultRecord(Record):
    """A located fault: the distances along fibre, sheath and route, with a search range."""

    id: str = _Id
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)
    inputs: dict[str, Any] = Field(default_factory=dict)
    fiber_distance_m: float
    sheath_distance_m: float
    route_distance_m: float
    low_m: float
    high_m: float
    nearest_landmark: str | None = None
    offset_from_landmark_m: float | None = None
    marking: str | None = None
    notes: str = ""

    @field_validator("inputs")
    @classmethod
    def _finite(cls, value: dict[str, Any]) -> dict[str, Any]:
        _check_finite(value, "fault inputs")
        return value


class Link(Record):
    """A link of a job (a span, a trunk, a patch): its ends, its fibre, and its records."""

    id: str = _Id
    label: str = Field(min_length=1, max_length=200)
    end_a: str = Field(default="", max_length=200)
    end_b: str = Field(default="", max_length=200)
    fibre_type: str = Field(default="", max_length=200)
    length_m: float | None = Field(default=None, ge=0)
    fibre_count: int | None = Field(default=None, ge=1)
    cable_id: str = Field(default="", max_length=200)
    #: The budget in force; a new save moves the previous one to ``earlier_budgets``.
    budget: BudgetRecord | None = None
    earlier_budgets: list[BudgetRecord] = Field(default_factory=list)
    references: list[ReferenceRecord] = Field(default_factory=list)
    results: list[LossResult] = Field(default_factory=list)
    #: The splice log (schema 3): closures with their cables, trays, splices and plan.
    closures: list[Closure] = Field(default_factory=list)
    #: Splice loss limits by method; the newest per method counts.
    splice_limits: list[SpliceLimit] = Field(default_factory=list)
    faults: list[FaultRecord] = Field(default_factory=list)

    def reference(self, reference_id: str | None) -> ReferenceRecord | None:
        """The reference record of this link with that id, if any."""
        if reference_id is None:
            return None
        for ref in self.references:
            if ref.id == reference_id:
                return ref
        return None


class JobEvent(Record):
    """One entry of a job's own history: created, edited, done, reopened, restored..."""

    at: AwareDatetime = Field(default_factory=now)
    by: str = Field(default="", max_length=200)
    what: str = Field(min_length=1, max_length=2000)


class Job(Record):
    """A job: who it is for, where, who worked on it, its notes and its links.

    ``revision`` counts saves; the store refuses a save whose revision is not the one on disk
    (another program saved in between), so no edit is overwritten silently.
    """

    # schema_version, id and revision come first in the file: the store reads them from the
    # head of a file without parsing the rest.
    schema_version: int = SCHEMA_VERSION
    id: str = Field(default_factory=new_job_id, pattern=JOB_ID_RE.pattern)
    revision: int = Field(default=0, ge=0)
    name: str = Field(min_length=1, max_length=200)
    customer: str = Field(default="", max_length=200)
    site: str = Field(default="", max_length=200)
    crew: list[str] = Field(default_factory=list)
    created_at: AwareDatetime = Field(default_factory=now)
    updated_at: AwareDatetime = Field(default_factory=now)
    status: Literal["open", "done"] = "open"
    created_by: str = Field(default="", max_length=200)
    notes: list[Note] = Field(default_factory=list)
    links: list[Link] = Field(default_factory=list)
    events: list[JobEvent] = Field(default_factory=list)

    #: Set by the store on a job read from a newer schema version: it may be read, not saved.
    _read_only: str | None = PrivateAttr(default=None)

    @property
    def read_only(self) -> str | None:
        """Why this job may not be saved (a newer file layout), or None."""
        return self._read_only

    def link(self, link_id: str) -> Link:
        """The link with this id; KeyError naming it when the job has none."""
        for item in self.links:
            if item.id == link_id:
                return item
        raise KeyError(f"job {self.name!r} has no link with id {link_id}")

    def link_by_label(self, label: str) -> Link | None:
        """The link with this label (case and surrounding spaces ignored), if any."""
        wanted = label.strip().casefold()
        for item in self.links:
            if item.label.strip().casefold() == wanted:
                return item
        return None

    def add_link(self, label: str, **fields: Any) -> Link:
        """Append a new link and return it."""
        item = Link(label=label.strip(), **fields)
        self.links.append(item)
        return item

    def add_note(self, text: str, by: str = "") -> Note:
        """Append a note stamped now and return it."""
        note = Note(text=text, by=by)
        self.notes.append(note)
        return note

    def add_event(self, what: str, by: str = "") -> JobEvent:
        """Append an entry to the job's own history and return it."""
        event = JobEvent(what=what, by=by)
        self.events.append(event)
        return event

    def results(self) -> list[tuple[Link, LossResult]]:
        """Every loss result of the job with its link, in link order (superseded ones too)."""
        return [(item, result) for item in self.links for result in item.results]


def result_in_doubt(link: Link, result: LossResult) -> bool:
    """True when the result is flagged, or its reference was put in doubt before it was taken."""
    if FLAG_REFERENCE_IN_DOUBT in result.flags:
        return True
    ref = link.reference(result.reference_id)
    return bool(ref and ref.in_doubt_since is not None and result.at >= ref.in_doubt_since)


def settle_history(link: Link) -> int:
    """Of two or more current results of one fibre, wavelength and direction (a hand-off merge
    of two laptops' retests), keep the latest current and mark the others superseded by it.
    Returns how many were marked."""
    latest: dict[tuple[int, float, str], LossResult] = {}
    for result in link.results:
        if result.current:
            key = (result.fibre, round(result.wavelength_nm, 1), result.direction)
            if key not in latest or result.at >= latest[key].at:
                latest[key] = result
    marked = 0
    for result in link.results:
        key = (result.fibre, round(result.wavelength_nm, 1), result.direction)
        newest = latest.get(key)
        if result.current and newest is not None and newest is not result:
            result.superseded_at = newest.at
            result.superseded_by = newest.id
            marked += 1
    return marked
