"""Changes to a link's splice log: closures, cables, trays, limits, plans and splices.

Every function here changes one job through ``store.update(job_id, change)``, which reloads the
file, applies the change and saves under the job's lock (retrying on a concurrent save), so the
splice workspace, ``fieldkit splice`` and the OTDR trace tools never lose each other's entries.
A refused change raises :class:`SpliceError` (an ``InputError``: one line naming the problem,
exit 2 in the CLI) before anything is written.

``by`` is the operator who did the work; it is stamped on every record.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any, Literal, Required, TypedDict, Unpack

from fieldkit.calc import splicing
from fieldkit.calc.units import InputError
from fieldkit.inputs import plan_text, splice_plan
from fieldkit.jobs.models import Job, Link
from fieldkit.jobs.splices import (
    Closure,
    Judgement,
    PlanRow,
    Splice,
    SpliceCable,
    SpliceLimit,
    Tray,
    current_limit,
    judge_in,
)
from fieldkit.presets import PresetLibrary, load_presets


class SpliceError(InputError):
    """A splice-log change that was refused; nothing was written."""


class AlreadySpliced(SpliceError):
    """The fibre already has a splice; a re-splice must be asked for."""

    def __init__(self, message: str, splice: Splice) -> None:
        super().__init__(message)
        self.splice = splice


def _store_update(store: Any, job_id: str, change: Any) -> Job:
    job: Job = store.update(job_id, change)
    return job


def find_link(job: Job, link: str, *, create: bool = False) -> Link:
    """The link whose id or label is ``link``; a new one with ``create``."""
    for item in job.links:
        if item.id == link:
            return item
    found = job.link_by_label(link)
    if found is not None:
        return found
    if create and link.strip():
        return job.add_link(link)
    labels = ", ".join(repr(item.label) for item in job.links) or "none"
    raise SpliceError(f"job {job.name!r} has no link {link!r} (its links: {labels})")


def find_closure(link: Link, closure: str) -> Closure:
    """The closure of ``link`` whose id or name (case ignored) is ``closure``."""
    wanted = closure.strip().casefold()
    for item in link.closures:
        if item.id == closure or item.name.strip().casefold() == wanted:
            return item
    names = ", ".join(repr(c.name) for c in link.closures) or "none"
    raise SpliceError(f"link {link.label!r} has no closure {closure!r} (its closures: {names})")


def _clean(text: str, what: str) -> str:
    text = text.strip()
    if any(ord(ch) < 32 or ord(ch) == 127 for ch in text):
        raise SpliceError(f"{what}: holds a control character; type plain text on one line")
    return text


# -- closures, cables, trays, limits -----------------------------------------------------------
def add_closure(
    store: Any,
    job_id: str,
    link: str,
    name: str,
    *,
    route_distance_m: float | None = None,
    landmark: str = "",
    notes: str = "",
    by: str = "",
    create_link: bool = True,
) -> Closure:
    """Add a closure to a link (a new link by that label with ``create_link``)."""
    name = _clean(name, "closure")
    if not name:
        raise SpliceError("closure: a closure needs a name")
    if route_distance_m is not None and not route_distance_m >= 0:
        raise SpliceError("route distance: must be 0 m or more")
    made: list[Closure] = []

    def change(job: Job) -> None:
        made.clear()
        target = find_link(job, link, create=create_link)
        if any(c.name.strip().casefold() == name.casefold() for c in target.closures):
            raise SpliceError(f"closure: link {target.label!r} already has a closure {name!r}")
        closure = Closure(
            name=name,
            route_distance_m=route_distance_m,
            landmark=_clean(landmark, "landmark"),
            notes=notes.strip(),
            by=by,
        )
        target.closures.append(closure)
        made.append(closure)

    _store_update(store, job_id, change)
    return made[0]


def latest_fault_position(link: Link) -> tuple[float, str] | None:
    """The route position and a landmark line of the link's latest located fault, if any: a
    repair closure goes there."""
    if not link.faults:
        return None
    fault = max(link.faults, key=lambda f: f.at)
    where = f"at the fault located {fault.at:%Y-%m-%d}"
    if fault.nearest_landmark:
        offset = fault.offset_from_landmark_m
        where += f", {fault.nearest_landmark}" + (f" + {offset:.0f} m" if offset else "")
    return fault.route_distance_m, where


def add_closure_at_fault(store: Any, job_id: str, link: str, name: str, *, by: str = "") -> Closure:
    """Add a (repair) closure at the route position of the link's latest located fault."""
    job = store.load(job_id)
    found = latest_fault_position(find_link(job, link))
    if found is None:
        raise SpliceError(f"link {link!r} has no located fault to put a closure at")
    route_m, where = found
    return add_closure(
        store, job_id, link, name, route_distance_m=route_m, landmark=where, by=by,
        create_link=False,
    )  # fmt: skip


def edit_closure(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    *,
    route_distance_m: float | None = None,
    landmark: str | None = None,
    notes: str | None = None,
) -> Closure:
    """Change a closure's route distance, landmark or notes (what is None stays)."""
    made: list[Closure] = []

    def change(job: Job) -> None:
        made.clear()
        item = find_closure(find_link(job, link), closure)
        if route_distance_m is not None:
            item.route_distance_m = route_distance_m
        if landmark is not None:
            item.landmark = _clean(landmark, "landmark")
        if notes is not None:
            item.notes = notes.strip()
        made.append(item)

    _store_update(store, job_id, change)
    return made[0]


def make_cable(
    name: str,
    *,
    fibre_count: int | None,
    per_tube: int | None = 12,
    colour_sequence: str = "TIA-598",
    fibre_type: str = "",
    library: PresetLibrary | None = None,
    by: str = "",
) -> SpliceCable:
    """A cable record with its colour code and mode-field diameters taken from the presets.

    Raises :class:`SpliceError` for an unknown colour sequence or fibre type.
    """
    lib = library or load_presets()
    name = _clean(name, "cable")
    if not name:
        raise SpliceError("cable: a cable needs a name (e.g. C1 or 'to cabinet 4')")
    try:
        sequence = lib.find("colour_sequences", colour_sequence)
    except InputError as exc:
        raise SpliceError(f"colour sequence: {exc}") from None
    mfd: dict[int, float | None] = {1310: None, 1550: None}
    type_name = fibre_type.strip()
    if type_name:
        try:
            preset = lib.find("fibres", type_name)
        except InputError as exc:
            raise SpliceError(f"fibre type: {exc}") from None
        type_name = preset.name
        for nm in (1310, 1550):
            try:
                mfd[nm] = preset.mode_field_diameter_um(nm)
            except InputError:  # multimode, or no value at that wavelength
                mfd[nm] = None
    if fibre_count is not None and per_tube is not None and per_tube > fibre_count:
        per_tube = fibre_count
    return SpliceCable(
        name=name,
        fibre_count=fibre_count,
        per_tube=per_tube,
        colour_sequence=sequence.name,
        colours=list(sequence.colours),
        tracer_colour=sequence.tracer_colour,
        tracer_on_tracer=sequence.tracer_on_tracer,
        fibre_type=type_name,
        mfd_1310_um=mfd[1310],
        mfd_1550_um=mfd[1550],
        by=by,
    )


class CableOptions(TypedDict, total=False):
    """The keywords of :func:`make_cable` (its defaults apply), which :func:`add_cable` passes
    on."""

    fibre_count: Required[int | None]
    per_tube: int | None
    colour_sequence: str
    fibre_type: str
    library: PresetLibrary | None
    by: str


def add_cable(
    store: Any, job_id: str, link: str, closure: str, name: str, **options: Unpack[CableOptions]
) -> SpliceCable:
    """Add a cable entering a closure (a cable of that name already there is refused); the
    cable is :func:`make_cable` of ``name`` and ``options``."""
    cable = make_cable(name, **options)

    def change(job: Job) -> None:
        item = find_closure(find_link(job, link), closure)
        if item.cable(cable.name) is not None:
            raise SpliceError(f"cable: closure {item.name!r} already has a cable {cable.name!r}")
        item.cables.append(cable.model_copy())

    _store_update(store, job_id, change)
    return cable


def add_trays(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    numbers: Sequence[int],
    capacity: int,
    *,
    by: str = "",
) -> list[Tray]:
    """Add trays of ``capacity`` splices; a number already there is refused."""
    if not numbers:
        raise SpliceError("tray: give at least one tray number")
    trays = [Tray(number=n, capacity=capacity, by=by) for n in numbers]

    def change(job: Job) -> None:
        item = find_closure(find_link(job, link), closure)
        for tray in trays:
            if item.tray_of(tray.number) is not None:
                raise SpliceError(f"tray: closure {item.name!r} already has tray {tray.number}")
        item.trays.extend(t.model_copy() for t in trays)

    _store_update(store, job_id, change)
    return trays


def limit_from_preset(
    method: Literal["fusion", "mechanical"],
    preset: str | None = None,
    library: PresetLibrary | None = None,
    by: str = "",
) -> SpliceLimit:
    """A splice limit from a splice preset (default: the preset named after the method,
    shipped as TIA-568.3-D 0.3 dB, from memory; a user preset of that name replaces it)."""
    lib = library or load_presets()
    try:
        found = lib.find("splices", preset or method)
    except InputError as exc:
        raise SpliceError(f"splice limit: {exc}") from None
    if found.method != method:
        raise SpliceError(
            f"splice limit: preset {found.name!r} is for {found.method} splices, not {method}"
        )
    return SpliceLimit(
        method=method, preset=found.name, loss_max_db=found.loss_max_db, source=found.source, by=by
    )


def set_splice_limit(store: Any, job_id: str, link: str, limit: SpliceLimit) -> SpliceLimit:
    """Append a splice limit to the link; the newest per method judges its splices."""

    def change(job: Job) -> None:
        find_link(job, link, create=True).splice_limits.append(limit.model_copy())

    _store_update(store, job_id, change)
    return limit


# -- splices -----------------------------------------------------------------------------------
@dataclass(frozen=True)
class Recorded:
    """A recorded splice, its judgement, the closure after the change, and warnings about it
    (out of plan, tray full, cables added)."""

    splice: Splice
    judgement: Judgement
    closure: Closure
    notices: list[str] = field(default_factory=list)
    #: The link's splice limits after the change (a default one may have been added).
    limits: list[SpliceLimit] = field(default_factory=list)


def _default_cables(link: Link, closure: Closure, by: str) -> str | None:
    if closure.cables:
        return None
    count = link.fibre_count
    for name in ("A", "B"):
        closure.cables.append(SpliceCable(name=name, fibre_count=count, by=by))
    known = f"{count} fibres each" if count else "fibre count not known"
    return f"closure {closure.name}: cables A and B added ({known}, 12 a tube, TIA-598)"


def plan_notice(closure: Closure, splice: Splice) -> str | None:
    """What the closure's plan says about a splice that does not follow it, or None."""
    rows = closure.plan_ranges()
    if not rows:
        return None
    target = splicing.plan_target(rows, splice.cable_a, splice.fibre_a)
    if target is None:
        return f"out of plan: the plan does not mention {splice.cable_a} fibre {splice.fibre_a}"
    cable_b, fibre_b = target
    if cable_b is None:
        return f"out of plan: the plan parks {splice.cable_a} fibre {splice.fibre_a} (not spliced)"
    if cable_b.casefold() != splice.cable_b.casefold() or fibre_b != splice.fibre_b:
        return (
            f"out of plan: the plan joins {splice.cable_a} fibre {splice.fibre_a} to "
            f"{cable_b} fibre {fibre_b}, not {splice.cable_b} fibre {splice.fibre_b}"
        )
    return None


def record_splice(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    *,
    fibre_a: int,
    fibre_b: int | None = None,
    cable_a: str | None = None,
    cable_b: str | None = None,
    tray: int | None = None,
    slot: int | None = None,
    method: Literal["fusion", "mechanical"] = "fusion",
    estimate_db: float | None = None,
    loss_ab_db: float | None = None,
    loss_ba_db: float | None = None,
    wavelength_nm: float | None = None,
    notes: str = "",
    resplice: bool = False,
    create: bool = False,
    library: PresetLibrary | None = None,
    by: str = "",
) -> Recorded:
    """Record one splice (or, with ``resplice``, a re-splice that supersedes the fibre's last).

    Defaults: cable A and B are the closure's first two cables (cables "A" and "B" are added to
    a closure that has none); ``fibre_b`` follows the closure's plan, else the same number;
    tray and slot are the next free ones when the closure has trays. The link's limit for the
    method is copied from the preset of that name when the link has none yet.

    With ``create`` a missing link or closure is added. Raises :class:`SpliceError` for a fibre
    past a cable's count, a full or unknown tray, or :class:`AlreadySpliced` for a fibre already
    spliced without ``resplice``.
    """
    default_limit = None
    out: list[Recorded] = []

    def change(job: Job) -> None:
        nonlocal default_limit
        out.clear()
        target = find_link(job, link, create=create)
        notices: list[str] = []
        try:
            item = find_closure(target, closure)
        except SpliceError:
            if not create:
                raise
            name = _clean(closure, "closure")
            if not name:
                raise SpliceError("closure: a closure needs a name") from None
            item = Closure(name=name, by=by)
            target.closures.append(item)
            notices.append(f"closure {name} added to link {target.label}")
        added = _default_cables(target, item, by)
        if added:
            notices.append(added)
        a = item.cable(cable_a) if cable_a else item.cables[0]
        if a is None:
            raise SpliceError(f"cable: closure {item.name!r} has no cable {cable_a!r}")
        if cable_b:
            b = item.cable(cable_b)
            if b is None:
                raise SpliceError(f"cable: closure {item.name!r} has no cable {cable_b!r}")
        else:
            b = item.cables[1] if len(item.cables) > 1 else item.cables[0]
        number_b = fibre_b
        if number_b is None:
            mapped = splicing.plan_target(item.plan_ranges(), a.name, fibre_a)
            number_b = mapped[1] if mapped and mapped[0] is not None else fibre_a
            if mapped and mapped[0] is not None and cable_b is None:
                planned = item.cable(mapped[0])
                if planned is not None:
                    b = planned
        for cable, number, side in ((a, fibre_a, "fibre"), (b, number_b, "to-fibre")):
            if cable.fibre_count is not None and number > cable.fibre_count:
                raise SpliceError(
                    f"{side}: {number} is past cable {cable.name}'s {cable.fibre_count} fibres"
                )
        previous = item.current_for(a.name, fibre_a) or item.current_for(b.name, number_b)
        if previous is not None and not resplice:
            raise AlreadySpliced(
                f"fibre {fibre_a}: already spliced ({previous.cable_a} {previous.fibre_a} to "
                f"{previous.cable_b} {previous.fibre_b}); record a re-splice to replace it",
                previous,
            )
        if resplice and previous is None:
            raise SpliceError(f"fibre {fibre_a}: has no splice to re-splice yet")
        place_tray, place_slot = tray, slot
        if previous is not None and place_tray is None and place_slot is None:
            place_tray, place_slot = previous.tray, previous.slot
        elif item.trays and place_slot is None:
            if place_tray is not None and item.tray_of(place_tray) is None:
                raise SpliceError(f"tray: closure {item.name!r} has no tray {place_tray}")
            free = item.next_place(place_tray)
            if free is None:
                where = f"tray {place_tray} is" if place_tray is not None else "every tray is"
                raise SpliceError(f"tray: {where} full; add a tray first")
            place_tray, place_slot = free
        elif place_tray is not None and item.trays and item.tray_of(place_tray) is None:
            raise SpliceError(f"tray: closure {item.name!r} has no tray {place_tray}")
        if place_tray is not None and place_slot is not None:
            tray_record = item.tray_of(place_tray)
            if tray_record is not None and place_slot > tray_record.capacity:
                raise SpliceError(
                    f"slot: {place_slot} is past tray {place_tray}'s {tray_record.capacity} slots"
                )
        if current_limit(target.splice_limits, method) is None:
            default_limit = default_limit or limit_from_preset(method, library=library, by=by)
            target.splice_limits.append(default_limit.model_copy())
        splice = Splice(
            cable_a=a.name,
            fibre_a=fibre_a,
            cable_b=b.name,
            fibre_b=number_b,
            tray=place_tray,
            slot=place_slot,
            method=method,
            estimate_db=estimate_db,
            loss_ab_db=loss_ab_db,
            loss_ba_db=loss_ba_db,
            wavelength_nm=wavelength_nm,
            replaces=previous.id if previous is not None else None,
            notes=notes.strip(),
            by=by,
        )
        item.splices.append(splice)
        off_plan = plan_notice(item, splice)
        if off_plan:
            notices.append(off_plan)
        judgement = judge_in(item, splice, target.splice_limits)
        # The job object was loaded for this change and is not shared: no copy is needed.
        out.append(Recorded(splice, judgement, item, notices, list(target.splice_limits)))

    _store_update(store, job_id, change)
    return out[0]


# -- plans -------------------------------------------------------------------------------------
def parse_plan_for(closure: Closure, text: str, what: str = "plan") -> list[PlanRow]:
    """A typed or preset plan read against a closure's cables (first two are A and B)."""
    if len(closure.cables) < 1:
        raise SpliceError(f"{what}: closure {closure.name!r} has no cables yet; add them first")
    a = closure.cables[0]
    b = closure.cables[1] if len(closure.cables) > 1 else a
    rows = splice_plan(text, a.name, b.name, a.fibre_count, what)
    return check_plan(closure, rows, what)


def check_plan(closure: Closure, rows: list[splicing.PlanRange], what: str) -> list[PlanRow]:
    out = []
    for row in rows:
        for name, first, last in (
            (row.cable_a, row.first_a, row.last_a),
            (row.cable_b, row.first_b, row.last_b),
        ):
            if name is None or first is None or last is None:
                continue
            cable = closure.cable(name)
            if cable is None:
                raise SpliceError(f"{what}: closure {closure.name!r} has no cable {name!r}")
            if cable.fibre_count is not None and last > cable.fibre_count:
                raise SpliceError(
                    f"{what}: fibre {last} is past cable {cable.name}'s {cable.fibre_count} fibres"
                )
        found_a = closure.cable(row.cable_a)
        found_b = closure.cable(row.cable_b) if row.cable_b else None
        out.append(
            PlanRow(
                cable_a=found_a.name if found_a else row.cable_a,
                first_a=row.first_a,
                last_a=row.last_a,
                cable_b=found_b.name if found_b else None,
                first_b=row.first_b if found_b else None,
            )
        )
    clashes = splicing.plan_overlaps([r.as_range() for r in out])
    if clashes:
        i, j = clashes[0]
        raise SpliceError(f"{what}: rows {i + 1} and {j + 1} use the same fibre")
    return out


def set_plan(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    text: str,
    *,
    source: str = "typed",
    library: PresetLibrary | None = None,
) -> Closure:
    """Set a closure's splice plan from typed text or a splice-plan preset's name."""
    lib = library or load_presets()
    plan_source = source
    body = text
    if text.strip() and text.strip().casefold() in {n.casefold() for n in lib.splice_plans}:
        preset = lib.find("splice_plans", text.strip())
        body, plan_source = preset.plan, f"preset {preset.name}"
    made: list[Closure] = []

    def change(job: Job) -> None:
        made.clear()
        item = find_closure(find_link(job, link), closure)
        rows = parse_plan_for(item, body)
        item.plan = rows
        a = item.cables[0].name
        b = item.cables[1].name if len(item.cables) > 1 else a
        shown = plan_text([r.as_range() for r in rows], a, b)
        item.plan_source = shown if plan_source == "typed" else f"{plan_source}: {shown}"
        made.append(item)

    _store_update(store, job_id, change)
    return made[0]


PLAN_CSV_HEADERS = ("cable_a", "first_a", "last_a", "cable_b", "first_b")


def plan_to_csv(closure: Closure) -> str:
    """The closure's plan as CSV (one row per range; ``cable_b`` empty for parked fibres)."""
    import csv
    import io

    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(PLAN_CSV_HEADERS)
    for row in closure.plan:
        writer.writerow(
            [row.cable_a, row.first_a, row.last_a, row.cable_b or "", row.first_b or ""]
        )
    return buffer.getvalue()


def plan_from_csv(closure: Closure, text: str) -> list[splicing.PlanRange]:
    """Plan rows from CSV with :data:`PLAN_CSV_HEADERS` (a header row is required)."""
    import csv
    import io

    reader = csv.reader(io.StringIO(text.lstrip("\ufeff")))
    rows = [r for r in reader if any(cell.strip() for cell in r)]
    if not rows or [c.strip().casefold() for c in rows[0]] != list(PLAN_CSV_HEADERS):
        raise SpliceError("plan CSV: the first row must be " + ",".join(PLAN_CSV_HEADERS))
    out = []
    for number, row in enumerate(rows[1:], start=2):
        if len(row) != len(PLAN_CSV_HEADERS):
            raise SpliceError(f"plan CSV row {number}: needs {len(PLAN_CSV_HEADERS)} cells")
        cable_a, first_a, last_a, cable_b, first_b = (c.strip() for c in row)
        try:
            fa, la = int(first_a), int(last_a)
            fb = int(first_b) if first_b else None
        except ValueError:
            raise SpliceError(f"plan CSV row {number}: fibres must be whole numbers") from None
        if fa < 1 or la < fa or (fb is not None and fb < 1) or not cable_a:
            raise SpliceError(f"plan CSV row {number}: not a fibre range")
        if bool(cable_b) != (fb is not None):
            raise SpliceError(f"plan CSV row {number}: cable_b and first_b go together")
        out.append(splicing.PlanRange(cable_a, fa, la, cable_b or None, fb))
    if not out:
        raise SpliceError("plan CSV: holds no rows")
    return out


def set_plan_rows(
    store: Any, job_id: str, link: str, closure: str, rows: list[splicing.PlanRange], source: str
) -> Closure:
    """Set a closure's plan from rows (read from a CSV file)."""
    made: list[Closure] = []

    def change(job: Job) -> None:
        made.clear()
        item = find_closure(find_link(job, link), closure)
        item.plan = check_plan(item, rows, "plan")
        item.plan_source = source
        made.append(item)

    _store_update(store, job_id, change)
    return made[0]


# -- OTDR losses from the trace tools -----------------------------------------------------------
@dataclass(frozen=True)
class OtdrLoss:
    """One measured splice loss from a trace: fibre (of cable A), direction, loss."""

    fibre: int
    direction: Literal["A->B", "B->A"]
    loss_db: float
    wavelength_nm: float | None = None


@dataclass
class OtdrFill:
    """What :func:`record_otdr_losses` did: values written, splices created, and the values it
    did not write because the splice already holds a different one (ask, then pass
    ``overwrite=True``)."""

    written: list[OtdrLoss] = field(default_factory=list)
    created: list[int] = field(default_factory=list)
    would_overwrite: list[tuple[OtdrLoss, float]] = field(default_factory=list)


def record_otdr_losses(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    losses: Sequence[OtdrLoss],
    *,
    overwrite: bool = False,
    dry_run: bool = False,
    cable_a: str | None = None,
    by: str = "",
) -> OtdrFill:
    """Fill one-way OTDR splice losses into a closure's current splices.

    An empty direction is filled; a direction that already holds a different value (more than
    0.005 dB apart) is left alone and listed in ``would_overwrite`` unless ``overwrite``. A fibre
    without a splice gets one (cable A's fibre to the plan's or the same number). ``dry_run``
    writes nothing and reports what would happen, so a caller can ask first.
    """
    result = OtdrFill()

    def change(job: Job) -> None:
        result.written.clear()
        result.created.clear()
        result.would_overwrite.clear()
        target = find_link(job, link)
        item = find_closure(target, closure)
        if not item.cables:
            _default_cables(target, item, by)
        a = item.cable(cable_a) if cable_a else item.cables[0]
        if a is None:
            raise SpliceError(f"cable: closure {item.name!r} has no cable {cable_a!r}")
        for loss in losses:
            if a.fibre_count is not None and loss.fibre > a.fibre_count:
                raise SpliceError(
                    f"fibre: {loss.fibre} is past cable {a.name}'s {a.fibre_count} fibres"
                )
            splice = item.current_for(a.name, loss.fibre)
            if splice is None:
                mapped = splicing.plan_target(item.plan_ranges(), a.name, loss.fibre)
                b_name = (
                    mapped[0]
                    if mapped and mapped[0]
                    else (item.cables[1].name if len(item.cables) > 1 else a.name)
                )
                splice = Splice(
                    cable_a=a.name,
                    fibre_a=loss.fibre,
                    cable_b=b_name,
                    fibre_b=mapped[1] if mapped and mapped[0] else loss.fibre,
                    wavelength_nm=loss.wavelength_nm,
                    by=by,
                )
                item.splices.append(splice)
                result.created.append(loss.fibre)
            attr = "loss_ab_db" if loss.direction == "A->B" else "loss_ba_db"
            old = getattr(splice, attr)
            if old is not None and abs(old - loss.loss_db) > 0.005 and not overwrite:
                result.would_overwrite.append((loss, old))
                continue
            setattr(splice, attr, loss.loss_db)
            if splice.wavelength_nm is None and loss.wavelength_nm is not None:
                splice.wavelength_nm = loss.wavelength_nm
            result.written.append(loss)
        if current_limit(target.splice_limits, "fusion") is None and result.written:
            target.splice_limits.append(limit_from_preset("fusion", by=by))
        if dry_run:
            raise _DryRun

    try:
        _store_update(store, job_id, change)
    except _DryRun:
        pass
    return result


class _DryRun(Exception):
    """Raised inside a change to leave the file untouched after computing the outcome."""


@dataclass
class LossUpdate:
    """What :func:`update_losses` did: the splice after the change, and the values it did not
    write because different ones were recorded (``(field, recorded, typed)``)."""

    splice: Splice | None
    judgement: Judgement | None
    would_overwrite: list[tuple[str, float, float]] = field(default_factory=list)


def update_losses(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    splice_id: str,
    *,
    estimate_db: float | None = None,
    loss_ab_db: float | None = None,
    loss_ba_db: float | None = None,
    overwrite: bool = False,
) -> LossUpdate:
    """Fill a splice's estimate or one-way losses measured later (not a re-splice).

    Values given as None stay. A value that differs from one already recorded is written only
    with ``overwrite``; without it nothing at all is written and ``would_overwrite`` lists the
    differences, so the caller can ask first.
    """
    result = LossUpdate(None, None)
    typed = {"estimate_db": estimate_db, "loss_ab_db": loss_ab_db, "loss_ba_db": loss_ba_db}

    def change(job: Job) -> None:
        result.would_overwrite.clear()
        target = find_link(job, link)
        item = find_closure(target, closure)
        found = next((s for s in item.splices if s.id == splice_id), None)
        if found is None:
            raise SpliceError(f"closure {item.name!r} has no splice {splice_id}")
        for name, value in typed.items():
            old = getattr(found, name)
            if value is not None and old is not None and abs(old - value) > 0.005:
                result.would_overwrite.append((name, old, value))
        if result.would_overwrite and not overwrite:
            raise _DryRun
        result.would_overwrite.clear()  # written: nothing left unwritten
        for name, value in typed.items():
            if value is not None:
                setattr(found, name, value)
        result.splice = found.model_copy()
        result.judgement = judge_in(item, found, target.splice_limits)

    try:
        _store_update(store, job_id, change)
    except _DryRun:
        pass
    return result
