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

import math
import re
from collections.abc import Sequence
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

# The schema version and the job id pattern live in fieldkit.jobs.ids (no pydantic there, so
# the job list shows before the records are imported); bump SCHEMA_VERSION there.
from fieldkit.jobs.ids import JOB_ID_RE as JOB_ID_RE
from fieldkit.jobs.ids import SCHEMA_VERSION as SCHEMA_VERSION
from fieldkit.jobs.splices import Closure, SpliceLimit

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


CheckKind = Literal["dispersion", "dispersion spread", "modal bandwidth", "cut-off"]
#: A check's verdict: the counting rule's words, and ``warning`` for a single-mode fibre used
#: below its cut-off (it counts as a failed check, as ``LinkChecks.passed`` has it).
CheckVerdict = Literal["pass", "fail", "no limit", "warning"]


class BudgetCheck(Record):
    """One check beyond loss of a saved budget (schema 5), from :mod:`fieldkit.calc.checks`.

    ``value`` and ``limit`` share ``unit``: the accumulated dispersion against a receiver's
    tolerance (ps/nm), the pulse spread against a quarter bit (ps), the link's length against
    its modal-bandwidth reach (m), a wavelength against the fibre's cable cut-off (nm).
    """

    kind: CheckKind
    wavelength_nm: float = Field(gt=0)
    value: float | None = None
    unit: str = Field(default="", max_length=20)
    limit: float | None = None
    verdict: CheckVerdict = "no limit"
    #: One plain sentence: what was found, as the budget's text says it.
    detail: str = Field(default="", max_length=MAX_SHORT_TEXT * 5)
    #: The formula or preset the figure comes from.
    source: str = Field(default="", max_length=MAX_SHORT_TEXT)


class BudgetRecord(Record):
    """A loss budget computed for a link, with the link description as it was given.

    ``checks`` (schema 5): the checks beyond loss computed with it (dispersion, modal
    bandwidth, cut-off); empty for a budget saved before schema 5 or with none that apply.
    """

    computed_at: AwareDatetime = Field(default_factory=now)
    by: str = ""
    description: dict[str, Any] = Field(default_factory=dict)
    wavelengths: list[BudgetWavelength] = Field(default_factory=list)
    margin_db: float = 0.0
    application: dict[str, Any] | None = None
    transceiver: dict[str, Any] | None = None
    checks: list[BudgetCheck] = Field(default_factory=list)

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
    fibre_distance_m: float
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


# -- OTDR traces kept on a link (schema 5) -------------------------------------------------------
#: A trace's direction: one way from end A or from end B, or both averaged ("A<->B").
TraceDirection = Literal["A->B", "B->A", "A<->B"]
EventKind = Literal["splice", "reflective", "gainer", "end"]
Verdict = Literal["pass", "fail", "no limit", "in doubt"]
#: Points kept per direction for drawing: the lowest and highest level of each of 300 columns
#: (a 760-pixel drawing has about 700, so a reflection's peak still shows as a spike). Fewer
#: than the 1,000 first planned: at 600, 144 fibres at two wavelengths, both directions
#: averaged, take about 6 MB of the 20 MiB a job file may hold (19-21 kB a fibre), so a
#: full retest kept as history still fits (measured in tests/unit/test_trace_records.py).
MAX_TRACE_POINTS = 600
#: A file name, never a path: no folder separators.
_FILE_NAME = r"^[^/\\\x00]{1,200}$"
#: The kept points as one text: ``distance,level`` pairs (m with up to 3 decimals, dB with up
#: to 3) separated by single spaces. One string, not a JSON list, because a job file is
#: written indented and a list of 1,200 numbers would take four times the room.
_POINTS = r"^(?:-?[0-9]{1,7}(?:\.[0-9]{1,3})?,-?[0-9]{1,3}(?:\.[0-9]{1,3})?(?: |$))*$"


def encode_points(points: Sequence[tuple[float, float]]) -> str:
    """Points as the text :class:`TraceCurve` keeps: distance to 0.1 m, level to 0.01 dB
    (finer than a drawing shows, far coarser than the trace: for drawing, never for measuring
    again)."""

    def num(value: float, digits: int) -> str:
        text = f"{value:.{digits}f}".rstrip("0").rstrip(".")
        return "0" if text in ("-0", "") else text

    return " ".join(
        f"{num(d, 1)},{num(v, 2)}"
        for d, v in points
        if math.isfinite(d) and math.isfinite(v)  # a dropout is left out of a drawing
    )


def decode_points(text: str) -> list[tuple[float, float]]:
    """The (distance m, level dB) pairs of :func:`encode_points` text."""
    out = []
    for item in text.split():
        d, v = item.split(",")
        out.append((float(d), float(v)))
    return out


class TraceEventRow(Record):
    """One row of a saved event table; distances from end A (from the trace's own start for a
    one-way B->A record). One-way records fill ``loss_db``; pairs fill ``loss_ab_db``,
    ``loss_ba_db`` and ``average_db`` (ITU-T G.650.3 bidirectional average)."""

    number: int = Field(ge=1)
    distance_m: float
    kind: EventKind
    loss_db: float | None = None
    loss_ab_db: float | None = None
    loss_ba_db: float | None = None
    average_db: float | None = None
    reflectance_db: float | None = None
    cumulative_db: float | None = None
    verdict: Verdict = "no limit"
    #: The loss maximum the event was judged against (a splice's or a connector's) and why.
    limit_db: float | None = None
    verdict_reason: str = Field(default="", max_length=MAX_SHORT_TEXT * 2)
    note: str = Field(default="", max_length=MAX_SHORT_TEXT * 2)


class TraceSectionRow(Record):
    """A section between events: its fitted attenuation (least squares, G.650.3)."""

    direction: Direction = "A->B"
    number: int = Field(ge=1)
    from_m: float
    to_m: float
    attenuation_db_per_km: float
    loss_db: float
    verdict: Verdict = "no limit"
    limit_db_per_km: float | None = None
    verdict_reason: str = Field(default="", max_length=MAX_SHORT_TEXT * 2)


class TraceCurve(Record):
    """One direction's trace, decimated for drawing: at most :data:`MAX_TRACE_POINTS`
    (distance m, level dB) pairs in distance order, distance from that direction's own start,
    kept as :func:`encode_points` text; :meth:`pairs` gives them back."""

    direction: Direction
    source: str = Field(pattern=_FILE_NAME)
    points: str = Field(default="", pattern=_POINTS, max_length=MAX_TRACE_POINTS * 20)
    #: How many points the trace had before decimation.
    decimated_from: int = Field(default=0, ge=0)

    @field_validator("points")
    @classmethod
    def _at_most(cls, value: str) -> str:
        if value.count(" ") + 1 > MAX_TRACE_POINTS:
            raise ValueError(f"a trace curve keeps at most {MAX_TRACE_POINTS} points")
        return value

    def pairs(self) -> list[tuple[float, float]]:
        """The kept points as (distance m, level dB) pairs, for drawing
        (:func:`fieldkit.traces.svg.draw_trace`)."""
        return decode_points(self.points)


class TraceRecord(Record):
    """An OTDR trace (one way) or a pair (both ways averaged) analysed and kept on a link.

    What a customer report and a re-check need: the event table with verdicts and the limits
    used, the sections, the ORL, and the curves to draw; source files by name only.

    History, not overwrite: a new save of the same fibre, wavelength and direction marks this
    one ``superseded_at`` / ``superseded_by``; it stays in the file and the exports.
    """

    id: str = _Id
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)
    fibre: int = Field(ge=1)
    wavelength_nm: float | None = Field(default=None, gt=0)
    direction: TraceDirection = "A->B"
    sources: list[str] = Field(default_factory=list, max_length=2)
    pulse_width_ns: float | None = Field(default=None, gt=0)
    group_index: float | None = Field(default=None, gt=1)
    length_m: float | None = Field(default=None, ge=0)
    total_loss_db: float | None = None
    loss_method: Literal["two-line", "five-point"] = "two-line"
    events: list[TraceEventRow] = Field(default_factory=list)
    sections: list[TraceSectionRow] = Field(default_factory=list)
    orl_db: float | None = None
    orl_verdict: Verdict = "no limit"
    #: The limits summary as the analysis printed it (what was judged against, with sources).
    limits: str = Field(default="", max_length=MAX_NOTE_TEXT)
    curves: list[TraceCurve] = Field(default_factory=list, max_length=2)
    notes: list[str] = Field(default_factory=list)
    superseded_at: AwareDatetime | None = None
    superseded_by: str | None = Field(default=None, pattern=RECORD_ID_RE)

    @field_validator("sources")
    @classmethod
    def _names_only(cls, value: list[str]) -> list[str]:
        for name in value:
            if not re.fullmatch(_FILE_NAME, name):
                raise ValueError(f"a trace source must be a file name, not a path: {name!r}")
        return value

    @property
    def current(self) -> bool:
        """True while no later save of the same fibre, wavelength and direction supersedes it."""
        return self.superseded_at is None

    @property
    def key(self) -> tuple[int, float | None, str]:
        """What a retest must match to supersede it: fibre, wavelength (0.1 nm), direction."""
        wl = None if self.wavelength_nm is None else round(self.wavelength_nm, 1)
        return (self.fibre, wl, self.direction)


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
    #: OTDR traces analysed and saved (schema 5); history kept, see :class:`TraceRecord`.
    traces: list[TraceRecord] = Field(default_factory=list)

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
    return marked + settle_traces(link)


def settle_traces(link: Link) -> int:
    """:func:`settle_history` for a link's traces: of two or more current traces of one fibre,
    wavelength and direction, the latest stays current. Returns how many were marked."""
    latest: dict[tuple[int, float | None, str], TraceRecord] = {}
    for trace in link.traces:
        if trace.current and (trace.key not in latest or trace.at >= latest[trace.key].at):
            latest[trace.key] = trace
    marked = 0
    for trace in link.traces:
        newest = latest.get(trace.key)
        if trace.current and newest is not None and newest is not trace:
            trace.superseded_at = newest.at
            trace.superseded_by = newest.id
            marked += 1
    return marked
