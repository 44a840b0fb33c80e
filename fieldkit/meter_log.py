"""Meter references and loss results recorded onto a job's link.

The changes the meter workspace and ``fieldkit loss`` / ``fieldkit reference`` make to a job,
as plain functions on the job's records, so both faces call the same code. They run inside
``JobStore.update(job_id, change)``, which reloads, applies and saves (retrying on a concurrent
change), so two running copies never lose each other's entries.

A loss result is kept per fibre, wavelength and direction: typing a reading again (a
correction) replaces the earlier one for that cell.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime

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
    link: Link, *, wavelength_nm: float, level_dbm: float, method: ref.Method, **fields: object
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
        link,
        wavelength_nm=wavelength_nm,
        level_dbm=level_dbm,
        method=method,
        **fields,  # type: ignore[arg-type]
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
    """Record (or correct) the result of one fibre, wavelength and direction against ``reference``.

    Loss = reference − reading; a negative loss is flagged and never passes; a result taken
    against a reference already put in doubt is flagged too.
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
    for index, old in enumerate(link.results):
        if (
            old.fibre == fibre
            and old.direction == direction
            and abs(old.wavelength_nm - wavelength_nm) <= 0.5
        ):
            link.results[index] = result.model_copy(update={"id": old.id})
            return link.results[index]
    link.results.append(result)
    return result


def remove_result(link: Link, *, fibre: int, wavelength_nm: float, direction: str) -> bool:
    """Remove the result of one cell (a reading cleared by the user); True if there was one."""
    before = len(link.results)
    link.results[:] = [
        r
        for r in link.results
        if not (
            r.fibre == fibre
            and r.direction == direction
            and abs(r.wavelength_nm - wavelength_nm) <= 0.5
        )
    ]
    return len(link.results) != before


@dataclass(frozen=True, slots=True)
class RecheckOutcome:
    """What a recheck found and did."""

    recheck: ReferenceRecord
    initial: ReferenceRecord
    drift: ref.Drift
    in_doubt_ids: list[str]


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
    # A recheck record does not name its reference; it belongs to the initial one with the same
    # wavelength, source, meter and method set before it.
    good_checks = [
        r.at
        for r in link.references
        if r.kind == "recheck"
        and abs(r.wavelength_nm - wavelength_nm) <= 0.5
        and (r.source_id, r.meter_id, r.method)
        == (initial.source_id, initial.meter_id, initial.method)
        and initial.at <= r.at <= stamp
        and r.in_doubt_since is None
    ]
    last_good_at = max([initial.at, *good_checks])
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
        doubted = ref.results_in_doubt(link.results, [initial.id], last_good_at)
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
