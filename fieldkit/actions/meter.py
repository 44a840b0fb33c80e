"""Meter references, readings and rechecks recorded onto a job's link.

The changes the meter workspace and ``fieldkit loss`` / ``fieldkit reference`` make to a job.
Two levels:

- plain functions on a :class:`~fieldkit.jobs.models.Link` (:func:`add_reference`,
  :func:`put_result`, :func:`clear_result`, :func:`recheck_reference`), and
- typed changes (:class:`PutReading`, :class:`ClearReading`, :class:`SetLimit`,
  :class:`Recheck`) that the meter's save queue holds and :func:`apply_changes` saves in one
  ``JobStore.update`` (reload, apply, save under the job's lock, retried on a concurrent change),
  so two running copies never lose each other's entries.

History, not overwrite: typing a reading again for a fibre, wavelength and direction appends a
new result and marks the earlier one superseded (it stays in the file and the exports); clearing
a reading supersedes it with nothing.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field, replace
from datetime import datetime
from typing import Any

from fieldkit.actions.jobs import find_link
from fieldkit.calc import reference as ref
from fieldkit.jobs.models import (
    FLAG_NEGATIVE_LOSS,
    FLAG_REFERENCE_IN_DOUBT,
    Job,
    Link,
    LossResult,
    ReferenceRecord,
    now,
)
from fieldkit.jobs.store import JobStore

__all__ = ["find_link"]


def current_reference(
    link: Link,
    wavelength_nm: float,
    at: datetime | None = None,
) -> ReferenceRecord | None:
    """The initial reference in use at ``wavelength_nm``: the latest one set at or before ``at``."""
    candidates = [
        r
        for r in link.references
        if r.kind == "initial"
        and abs(r.wavelength_nm - wavelength_nm) <= 0.5
        and (at is None or r.at <= at)
    ]
    return max(candidates, key=lambda r: r.at) if candidates else None


def add_reference(
    link: Link,
    *,
    wavelength_nm: float,
    level_dbm: float,
    method: ref.Method,
    source_id: str = "",
    meter_id: str = "",
    cords: list[str] | None = None,
    launch_condition: str | None = None,
    by: str = "",
    at: datetime | None = None,
) -> ReferenceRecord:
    """Append a new initial reference to ``link`` and return it."""
    record = ReferenceRecord(
        wavelength_nm=wavelength_nm,
        level_dbm=level_dbm,
        method=method.value,
        source_id=source_id,
        meter_id=meter_id,
        cords=list(cords or []),
        launch_condition=(launch_condition or None),
        by=by,
        at=at or now(),
        kind="initial",
    )
    link.references.append(record)
    return record


def reuse_or_add_reference(
    link: Link, *, wavelength_nm: float, level_dbm: float, method: ref.Method, **fields: Any
) -> ReferenceRecord:
    """The latest initial reference at ``wavelength_nm`` with this level and method that is not
    in doubt; else a new one.

    Matching on the level (not just the latest at the wavelength) keeps the two directions of a
    bidirectional test, each with its own reference, from replacing each other.
    """
    matching = [
        r
        for r in link.references
        if r.kind == "initial"
        and abs(r.wavelength_nm - wavelength_nm) <= 0.5
        and abs(r.level_dbm - level_dbm) < 1e-9
        and r.method == method.value
        and r.in_doubt_since is None
    ]
    if matching:
        return max(matching, key=lambda r: r.at)
    return add_reference(
        link, wavelength_nm=wavelength_nm, level_dbm=level_dbm, method=method, **fields
    )


def put_result(
    link: Link,
    *,
    fibre: int,
    wavelength_nm: float,
    direction: str,
    reading_dbm: float,
    reference: ReferenceRecord,
    limit_db: float | None,
    by: str = "",
    at: datetime | None = None,
) -> LossResult:
    """Record the result of one fibre, wavelength and direction against ``reference``.

    Loss = reference − reading; a negative loss is flagged and never passes; a result taken
    against a reference already put in doubt is flagged too. An earlier current result of the
    same cell is marked superseded by this one and stays in the link's results.
    """
    loss_db = ref.insertion_loss_db(reference.level_dbm, reading_dbm)
    verdict = ref.judge(loss_db, limit_db)
    stamp = at or now()
    flags: list[str] = []
    if ref.NEGATIVE_LOSS in verdict.flags:
        flags.append(FLAG_NEGATIVE_LOSS)
    if reference.in_doubt_since is not None and stamp >= reference.in_doubt_since:
        flags.append(FLAG_REFERENCE_IN_DOUBT)
    result = LossResult(
        fibre=fibre,
        wavelength_nm=wavelength_nm,
        direction=direction,  # type: ignore[arg-type]
        reading_dbm=reading_dbm,
        loss_db=loss_db,
        reference_id=reference.id,
        method=reference.method,
        limit_db=limit_db,
        passed=verdict.passed,
        flags=flags,
        by=by,
        at=stamp,
    )
    for old in cell_results(link, fibre=fibre, wavelength_nm=wavelength_nm, direction=direction):
        if old.current:
            old.superseded_at = stamp
            old.superseded_by = result.id
    link.results.append(result)
    return result


def cell_results(
    link: Link, *, fibre: int, wavelength_nm: float, direction: str
) -> list[LossResult]:
    """Every result of one fibre, wavelength and direction, oldest first (its history)."""
    return sorted(
        (
            r
            for r in link.results
            if r.fibre == fibre
            and r.direction == direction
            and abs(r.wavelength_nm - wavelength_nm) <= 0.5
        ),
        key=lambda r: r.at,
    )


def fibre_history(link: Link, fibre: int) -> list[LossResult]:
    """Every result of one fibre at every wavelength and direction, oldest first."""
    return sorted((r for r in link.results if r.fibre == fibre), key=lambda r: r.at)


def clear_result(
    link: Link,
    *,
    fibre: int,
    wavelength_nm: float,
    direction: str,
    by: str = "",
    at: datetime | None = None,
) -> bool:
    """Clear the current result of one cell (the user removed the reading): it is marked
    superseded with no successor and stays in the file. True if there was one."""
    stamp = at or now()
    found = False
    for old in cell_results(link, fibre=fibre, wavelength_nm=wavelength_nm, direction=direction):
        if old.current:
            old.superseded_at = stamp
            old.superseded_note = f"cleared by {by}" if by else "cleared"
            found = True
    return found


@dataclass(frozen=True, slots=True)
class RecheckOutcome:
    """What a recheck found and did."""

    recheck: ReferenceRecord
    initial: ReferenceRecord
    drift: ref.Drift
    in_doubt_ids: list[str]


def last_good_check(
    link: Link, initial: ReferenceRecord, until: datetime | None = None
) -> datetime:
    """When ``initial`` was last known good (up to ``until``): its own time, or its latest
    recheck within tolerance.

    A recheck record does not name its reference; it belongs to the initial one with the same
    wavelength, source, meter and method set before it.
    """
    good_checks = [
        r.at
        for r in link.references
        if r.kind == "recheck"
        and abs(r.wavelength_nm - initial.wavelength_nm) <= 0.5
        and (r.source_id, r.meter_id, r.method)
        == (initial.source_id, initial.meter_id, initial.method)
        and initial.at <= r.at
        and (until is None or r.at <= until)
        and r.in_doubt_since is None
    ]
    return max([initial.at, *good_checks])


def recheck_reference(
    link: Link,
    *,
    wavelength_nm: float,
    level_dbm: float,
    tolerance_db: float | None = None,
    by: str = "",
    at: datetime | None = None,
    reference_id: str | None = None,
) -> RecheckOutcome:
    """Record an end-of-session recheck of a reference: ``reference_id``, or else the latest
    initial reference at ``wavelength_nm``.

    The drift is recheck − initial. Beyond the tolerance (default: the common-practice figure
    of :data:`fieldkit.calc.reference.DRIFT_TOLERANCE_DB`), the initial reference is marked
    ``in_doubt_since`` the last good check (the initial reference or the last recheck within
    tolerance), and every result taken against it since then is flagged "reference-in-doubt".

    Raises
    ------
    KeyError
        When the link has no reference at that wavelength.
    """
    stamp = at or now()
    initial = (
        link.reference(reference_id)
        if reference_id
        else current_reference(link, wavelength_nm, stamp)
    )
    if initial is None or initial.kind != "initial":
        what = f"reference {reference_id}" if reference_id else f"reference at {wavelength_nm:g} nm"
        raise KeyError(f"link {link.label!r} has no {what} to recheck")
    wavelength_nm = initial.wavelength_nm
    tolerance = (
        ref.default_drift_tolerance_db(wavelength_nm) if tolerance_db is None else tolerance_db
    )
    drift = ref.reference_drift(initial.level_dbm, level_dbm, tolerance)
    last_good_at = last_good_check(link, initial, stamp)
    recheck = ReferenceRecord(
        source_id=initial.source_id,
        meter_id=initial.meter_id,
        wavelength_nm=initial.wavelength_nm,
        level_dbm=level_dbm,
        method=initial.method,
        cords=list(initial.cords),
        launch_condition=initial.launch_condition,
        by=by,
        at=stamp,
        kind="recheck",
        drift_db=drift.drift_db,
        in_doubt_since=None if drift.within else last_good_at,
    )
    link.references.append(recheck)
    doubted: list[str] = []
    if not drift.within:
        if initial.in_doubt_since is None or initial.in_doubt_since > last_good_at:
            initial.in_doubt_since = last_good_at
        doubted = ref.results_in_doubt(
            [r for r in link.results if r.current], [initial.id], last_good_at
        )
        for result in link.results:
            if result.id in doubted and FLAG_REFERENCE_IN_DOUBT not in result.flags:
                result.flags.append(FLAG_REFERENCE_IN_DOUBT)
    return RecheckOutcome(recheck, initial, drift, doubted)


def budget_limit_db(
    link: Link, wavelength_nm: float, method: ref.Method
) -> tuple[float, str] | None:
    """The limit for a ``method`` result from the budget saved on ``link``, with a description.

    The saved budget counts every mated pair including the two end connections; the method
    keeps :attr:`~fieldkit.calc.reference.Method.end_connections` of them. The loss of one end
    connection comes from the budget's description (``connector_loss_db``, as the budget
    command writes it), or from its connectors line divided by the number of connectors. None
    without a budget at that wavelength or without a connector loss to work from.

    Raises
    ------
    InputError
        When the budget counts fewer end connections than the method includes.
    """
    if link.budget is None:
        return None
    row = link.budget.at_wavelength(wavelength_nm)
    if row is None:
        return None
    description = link.budget.description
    per_connection_db = end_connection_loss_db(
        description, [(item.name, item.loss_db) for item in row.items]
    )
    if per_connection_db is None:
        return None
    count = _connector_count(description)
    in_budget = 2 if count is None else min(2, count)
    limit_db = ref.method_limit_db(row.loss_db, per_connection_db, method, in_budget)
    return limit_db, (
        f"budget {row.loss_db:.2f} dB, {method.end_connections} of 2 end "
        f"connections at {per_connection_db:.2f} dB ({method.value})"
    )


def _connector_count(description: dict[str, object]) -> int | None:
    for key in ("connector_count", "connectors"):
        value = description.get(key)
        if isinstance(value, int) and not isinstance(value, bool):
            return value
        if isinstance(value, dict):
            inner = value.get("count")
            if isinstance(inner, int) and not isinstance(inner, bool):
                return inner
    return None


def end_connection_loss_db(
    description: dict[str, object], items: list[tuple[str, float]]
) -> float | None:
    """The loss of one mated pair in a budget: from its description or its connectors line."""
    value = description.get("connector_loss_db")
    if isinstance(value, int | float) and not isinstance(value, bool):
        return float(value)
    count = _connector_count(description)
    if count is not None and count > 0:
        for name, loss_db in items:
            if "connector" in name.lower():
                return loss_db / count
    return None


# -- typed changes: what the meter's save queue holds ------------------------------------------
@dataclass(frozen=True, slots=True)
class ReferenceDetails:
    """Who set a reference and with what (stored on every new reference record)."""

    source_id: str = ""
    meter_id: str = ""
    cords: tuple[str, ...] = ()
    launch_condition: str | None = None
    by: str = ""
    #: When the reference was set (a new reference record is stamped so); None: now.
    set_at: datetime | None = None


@dataclass(frozen=True, slots=True)
class PutReading:
    """A reading typed for one cell against the reference level in use for its column."""

    fibre: int
    wavelength_nm: float
    direction: str
    reading_dbm: float
    reference_dbm: float
    method: ref.Method
    limit_db: float | None
    at: datetime
    details: ReferenceDetails = ReferenceDetails()


@dataclass(frozen=True, slots=True)
class ClearReading:
    """A reading removed from one cell."""

    fibre: int
    wavelength_nm: float
    direction: str
    by: str = ""
    at: datetime | None = None


@dataclass(frozen=True, slots=True)
class SetLimit:
    """A new limit at a wavelength: current results taken with ``method`` are judged again."""

    wavelength_nm: float
    limit_db: float | None
    method: ref.Method


@dataclass(frozen=True, slots=True)
class Recheck:
    """An end-of-session recheck of the reference set at ``reference_dbm`` for a column."""

    wavelength_nm: float
    direction: str
    reference_dbm: float
    method: ref.Method
    level_dbm: float
    tolerance_db: float
    at: datetime
    by: str = ""


MeterChange = PutReading | ClearReading | SetLimit | Recheck


@dataclass
class Applied:
    """What :func:`apply_changes` did: reference ids per (wavelength, direction, level), the
    rechecks as (column words, drift, results put in doubt), the results now in the link."""

    reference_ids: dict[tuple[float, str, float], str] = field(default_factory=dict)
    rechecks: list[tuple[str, ref.Drift, int]] = field(default_factory=list)
    result_ids: list[str] = field(default_factory=list)
    saved: int = 0


def apply_to_link(link: Link, changes: Sequence[MeterChange], outcome: Applied) -> None:
    """Apply typed meter changes to a link in order (inside a store update)."""
    for change in changes:
        if isinstance(change, PutReading):
            d = change.details
            record = reuse_or_add_reference(
                link,
                wavelength_nm=change.wavelength_nm,
                level_dbm=change.reference_dbm,
                method=change.method,
                source_id=d.source_id,
                meter_id=d.meter_id,
                cords=list(d.cords),
                launch_condition=d.launch_condition,
                by=d.by,
                at=d.set_at,
            )
            outcome.reference_ids[
                (change.wavelength_nm, change.direction, change.reference_dbm)
            ] = record.id
            result = put_result(
                link,
                fibre=change.fibre,
                wavelength_nm=change.wavelength_nm,
                direction=change.direction,
                reading_dbm=change.reading_dbm,
                reference=record,
                limit_db=change.limit_db,
                by=d.by,
                at=change.at,
            )
            outcome.result_ids.append(result.id)
        elif isinstance(change, ClearReading):
            clear_result(
                link,
                fibre=change.fibre,
                wavelength_nm=change.wavelength_nm,
                direction=change.direction,
                by=change.by,
                at=change.at,
            )
        elif isinstance(change, SetLimit):
            # A stored result keeps the limit of its own method: only current results taken
            # with the method in use get the new limit.
            for result in link.results:
                if (
                    result.current
                    and abs(result.wavelength_nm - change.wavelength_nm) <= 0.5
                    and result.method == change.method.value
                ):
                    result.limit_db = change.limit_db
                    result.passed = ref.judge(result.loss_db, change.limit_db).passed
        else:
            matching = [
                r
                for r in link.references
                if r.kind == "initial"
                and abs(r.wavelength_nm - change.wavelength_nm) <= 0.5
                and abs(r.level_dbm - change.reference_dbm) < 1e-9
                and r.method == change.method.value
            ]
            if not matching:
                continue
            initial = max(matching, key=lambda r: r.at)
            found = recheck_reference(
                link,
                wavelength_nm=change.wavelength_nm,
                level_dbm=change.level_dbm,
                tolerance_db=change.tolerance_db,
                by=change.by,
                at=change.at,
                reference_id=initial.id,
            )
            outcome.rechecks.append(
                (
                    f"{change.wavelength_nm:g} {change.direction}",
                    found.drift,
                    len(found.in_doubt_ids),
                )
            )
    outcome.saved = len(link.results)


def apply_changes(
    store: JobStore, job_id: str, link_id: str, changes: Sequence[MeterChange]
) -> Applied:
    """Save typed meter changes onto a job's link in one store update."""
    outcome = Applied()

    def change(job: Job) -> None:
        outcome.reference_ids.clear()
        outcome.rechecks.clear()
        outcome.result_ids.clear()
        apply_to_link(job.link(link_id), changes, outcome)

    store.update(job_id, change)
    return outcome


# -- the command line's saves ---------------------------------------------------------------
@dataclass
class RecordedReadings:
    """What :func:`record_readings` saved."""

    job_id: str
    link_id: str
    link_label: str
    fibre: int
    reference_ids: list[str]
    result_ids: list[str]
    warnings: list[str]


def record_readings(
    store: JobStore,
    job_id: str,
    link: str,
    *,
    fibre: int,
    wavelength_nm: float,
    method: ref.Method,
    references_dbm: dict[str, float],
    readings_dbm: dict[str, float | None],
    limit_db: float | None,
    details: ReferenceDetails = ReferenceDetails(),
    at: datetime | None = None,
) -> RecordedReadings:
    """Save the reading of each direction (with its reference, reused when it is the same) onto
    the link named ``link`` (its id or label; a new link by that label is added)."""
    from fieldkit.actions.errors import ActionError

    out: list[RecordedReadings] = []
    stamp = at or now()
    # A reference new with these readings is set when they are taken, not after.
    details = replace(details, set_at=details.set_at or stamp)

    def change(job: Job) -> None:
        target = find_link(job, link, create=True)
        if target.fibre_count is not None and fibre > target.fibre_count:
            raise ActionError(f"fibre: {fibre} is beyond the link's {target.fibre_count} fibres")
        changes = [
            PutReading(
                fibre,
                wavelength_nm,
                direction,
                reading,
                references_dbm[direction],
                method,
                limit_db,
                stamp,
                details,
            )
            for direction, reading in readings_dbm.items()
            if reading is not None
        ]
        applied = Applied()
        apply_to_link(target, changes, applied)
        reference_ids = list(dict.fromkeys(applied.reference_ids.values()))
        warnings = []
        for result_id in applied.result_ids:
            result = next(r for r in target.results if r.id == result_id)
            if FLAG_REFERENCE_IN_DOUBT in result.flags:
                warnings.append(
                    f"reference {result.reference_id} is in doubt (its recheck drifted); set a "
                    "new reference and retest"
                )
        out[:] = [
            RecordedReadings(
                job.id, target.id, target.label, fibre, reference_ids, applied.result_ids, warnings
            )
        ]

    try:
        store.update(job_id, change)
    except KeyError as exc:
        raise ActionError(str(exc.args[0]) if exc.args else "no such link") from None
    return out[0]


@dataclass
class RecordedReference:
    """What :func:`record_reference` saved (and, for a recheck, what it found)."""

    job_id: str
    link_id: str
    link_label: str
    record: ReferenceRecord
    recheck: RecheckOutcome | None = None


def record_reference(
    store: JobStore,
    job_id: str,
    link: str,
    *,
    wavelength_nm: float,
    level_dbm: float,
    method: ref.Method,
    details: ReferenceDetails = ReferenceDetails(),
    recheck: bool = False,
    tolerance_db: float | None = None,
    of_reference: str | None = None,
    at: datetime | None = None,
) -> RecordedReference:
    """Set a new reference on a link (added by label when new), or with ``recheck`` record an
    end-of-session recheck of its reference (the link must exist)."""
    from fieldkit.actions.errors import ActionError

    out: list[RecordedReference] = []

    def change(job: Job) -> None:
        if recheck:
            target = find_link(job, link)
            outcome = recheck_reference(
                target,
                wavelength_nm=wavelength_nm,
                level_dbm=level_dbm,
                tolerance_db=tolerance_db,
                by=details.by,
                at=at,
                reference_id=of_reference,
            )
            out[:] = [RecordedReference(job.id, target.id, target.label, outcome.recheck, outcome)]
        else:
            target = find_link(job, link, create=True)
            record = add_reference(
                target,
                wavelength_nm=wavelength_nm,
                level_dbm=level_dbm,
                method=method,
                source_id=details.source_id,
                meter_id=details.meter_id,
                cords=list(details.cords),
                launch_condition=details.launch_condition,
                by=details.by,
                at=at,
            )
            out[:] = [RecordedReference(job.id, target.id, target.label, record)]

    try:
        store.update(job_id, change)
    except KeyError as exc:
        raise ActionError(str(exc.args[0]) if exc.args else "no such link") from None
    return out[0]
