"""Budgets and located faults saved onto a job's link, from the CLI and the workspaces alike.

History, not overwrite: a new budget moves the one in force to ``link.earlier_budgets``; faults
are appended. The record carries ``by`` (the operator) and when it was made; the CLI and the
workspaces build it with the same function (``fieldkit.jobs.budget_records.budget_record``,
:func:`fieldkit.actions.saves.fault_record`), so the same work writes the same record.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from fieldkit.actions.errors import ActionError
from fieldkit.actions.jobs import find_link
from fieldkit.jobs.models import BudgetRecord, FaultRecord, Job, Link
from fieldkit.jobs.store import JobStore

if TYPE_CHECKING:
    from fieldkit.calc.locate import LocateInput, Location, SlackLoop


@dataclass(frozen=True)
class Saved:
    """Where a record was saved."""

    job_id: str
    job_name: str
    link_id: str
    link_label: str
    record_id: str = ""


def _save_onto(
    store: JobStore, job_id: str, link: str, create: bool, put: Callable[[Link], str]
) -> Saved:
    out: list[Saved] = []

    def change(job: Job) -> None:
        target = find_link(job, link, create=create)
        record_id = put(target)
        out[:] = [Saved(job.id, job.name, target.id, target.label, record_id)]

    try:
        store.update(job_id, change)
    except KeyError as exc:
        raise ActionError(str(exc.args[0]) if exc.args else "no such link") from None
    return out[0]


def save_budget(
    store: JobStore,
    job_id: str,
    link: str,
    record: BudgetRecord,
    *,
    create: bool = False,
    length_m: float | None = None,
    fibre_type: str = "",
) -> Saved:
    """Make ``record`` the budget of the link (id or label; added by label with ``create``).

    The budget in force before is kept in ``earlier_budgets``. The link's length and fibre type
    are filled from the budget where the link has none.
    """

    def put(target: Link) -> str:
        if target.budget is not None:
            target.earlier_budgets.append(target.budget)
        target.budget = record
        if target.length_m is None and length_m is not None:
            target.length_m = length_m
        if not target.fibre_type and fibre_type:
            target.fibre_type = fibre_type
        return ""

    return _save_onto(store, job_id, link, create, put)


def save_fault(
    store: JobStore, job_id: str, link: str, record: FaultRecord, *, create: bool = False
) -> Saved:
    """Append a located fault to the link (id or label; added by label with ``create``)."""

    def put(target: Link) -> str:
        target.faults.append(record)
        return record.id

    return _save_onto(store, job_id, link, create, put)


# -- the fault record, one builder for both faces ----------------------------------------------
#: The typed fields of a fault record, by their one name.
TYPED_FIELDS = (
    "distance",
    "time",
    "ior_set",
    "ior",
    "fibre",
    "wavelength",
    "helix",
    "cable",
    "marking_start",
    "marking_unit",
    "marking_direction",
    "from_b",
    "total",
    "offset",
    "scale",
    "sampling",
)
#: Other spellings the faces use for those fields (CLI options, workspace field ids).
_ALIASES = {
    "ior-set": "ior_set",
    "fiber": "fibre",
    "marking": "marking_start",
    "marking-unit": "marking_unit",
    "marking-direction": "marking_direction",
    "from-b": "from_b",
}


def typed_fields(typed: Mapping[str, Any]) -> dict[str, Any]:
    """The typed fields under their one name, empty ones and unknown ones (a row editor's
    unsaved draft, the display unit) left out, in :data:`TYPED_FIELDS` order."""
    named: dict[str, Any] = {}
    for key, value in typed.items():
        name = _ALIASES.get(key, key)
        if name in TYPED_FIELDS and value not in (None, "", []):
            named[name] = value.strip() if isinstance(value, str) else value
    return {name: named[name] for name in TYPED_FIELDS if name in named}


def slack_row(slack: SlackLoop) -> dict[str, Any]:
    """A slack loop as plain data: in a fault record's inputs, and in ``locate --json`` where
    the position lies in one."""
    return {
        "route_position_m": slack.route_position_m,
        "cable_length_m": slack.cable_length_m,
        "label": slack.label,
    }


def fault_inputs(inp: LocateInput, typed: dict[str, Any]) -> dict[str, Any]:
    """What was given, as plain JSON, for the job record: the text typed and the numbers used.

    ``typed`` holds the fields as typed, under the names of :data:`TYPED_FIELDS` whichever face
    typed them (the CLI's ``--ior-set`` and the workspace's "ior-set" field are both
    ``ior_set``); landmark and slack rows are recorded by their numbers, not as typed.
    """
    return {
        "typed": typed_fields(typed),
        "otdr_distance_m": inp.otdr_distance_m,
        "round_trip_time_s": inp.round_trip_time_s,
        "index_set": inp.index_set,
        "group_index": inp.group_index,
        "helix_percent": inp.helix_percent,
        "slack": [slack_row(s) for s in inp.slack],
        "landmarks": [
            {
                "name": m.name,
                "otdr_distance_m": m.otdr_distance_m,
                "route_distance_m": m.route_distance_m,
            }
            for m in inp.landmarks
        ],
        "marking": None
        if inp.marking is None
        else {
            "start": inp.marking.start,
            "unit": inp.marking.unit,
            "direction": inp.marking.direction,
        },
        "two_ended": None
        if inp.two_ended is None
        else {
            "from_b_otdr_m": inp.two_ended.from_b_otdr_m,
            "total_otdr_m": inp.two_ended.total_otdr_m,
        },
        "errors": {
            "offset_m": inp.errors.offset_m,
            "scale_error_percent": inp.errors.scale_error_percent,
            "sample_spacing_m": inp.errors.sample_spacing_m,
            "group_index_uncertainty": inp.errors.group_index_uncertainty,
            "helix_uncertainty_percent": inp.errors.helix_uncertainty_percent,
            "landmark_route_uncertainty_m": inp.errors.landmark_route_uncertainty_m,
        },
    }


def fault_record(
    location: Location, inputs: dict[str, Any], *, by: str = "", notes: str = ""
) -> FaultRecord:
    """The job record of a located fault (the reading from A, or the combined estimate when a
    consistent two-ended check was made)."""
    from fieldkit.calc.locate import describe_offset

    p = location.position
    two = location.two_ended
    extra: list[str] = []
    if two is not None:
        if two.consistent:
            p = two.combined
            extra.append("Combined estimate from both ends.")
        else:
            extra.append("Two-ended check failed; the reading from A is recorded.")
    extra += [f"Warning: {w}" for w in location.warnings]
    where = None
    if (
        p.nearest_landmark is not None
        and p.offset_from_landmark_m is not None
        and p.basis != "model"
    ):  # with no landmark, "past start" only repeats the route
        where = describe_offset(p.offset_from_landmark_m, p.nearest_landmark)
    text = "\n".join(part for part in [notes.strip(), *extra, where and f"Look {where}."] if part)
    return FaultRecord(
        by=by,
        inputs=inputs,
        fibre_distance_m=p.fibre_distance_m,
        sheath_distance_m=p.sheath_distance_m,
        route_distance_m=p.route_distance_m,
        low_m=p.low_m,
        high_m=p.high_m,
        nearest_landmark=p.nearest_landmark,
        offset_from_landmark_m=p.offset_from_landmark_m,
        marking=p.marking.describe() if p.marking is not None else None,
        notes=text,
    )
