"""OTDR results into a job: traces kept on a link, splice losses into a closure's splice log,
closures as landmarks, and the verdict limits a link's presets give.

A trace or a pair is kept as a :class:`~fieldkit.jobs.models.TraceRecord` (built by
:func:`trace_record` / :func:`pair_record`, saved by :func:`save_traces`): the event table
with its verdicts and the limits used, the sections, the ORL and a drawing's worth of points.
History, not overwrite: saving the same fibre, wavelength and direction again marks the
earlier record superseded; it stays.

The splice log is written only through :func:`fieldkit.actions.splices.record_otdr_losses`
(one change through the job store, under its lock). A splice that already holds a different
loss is never overwritten without ``overwrite``: call with ``dry_run=True`` first, show
``would_overwrite``, ask, then call again.

Which event is the closure: one rule for the Traces table, the hand-off to Fault and this
log, :mod:`fieldkit.traces.closures` (the event located as a fault would be, within its
uncertainty, allowing for the cable stored at a closure).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from typing import Any

from fieldkit.actions.errors import check_text
from fieldkit.actions.splices import OtdrFill, OtdrLoss, find_closure, find_link, record_otdr_losses
from fieldkit.calc.units import InputError
from fieldkit.jobs.models import (
    MAX_TRACE_POINTS,
    Job,
    Link,
    TraceCurve,
    TraceEventRow,
    TraceRecord,
    TraceSectionRow,
    encode_points,
)
from fieldkit.jobs.splices import current_limit
from fieldkit.jobs.store import JobStore
from fieldkit.presets import PresetLibrary
from fieldkit.text.numbers import arrow
from fieldkit.traces.analysis import TraceResult
from fieldkit.traces.closures import Closure as Landmark
from fieldkit.traces.closures import event_at, reading_uncertainty_m
from fieldkit.traces.folder import FibreTraces as FibreTraces
from fieldkit.traces.folder import folder_fibres as folder_fibres
from fieldkit.traces.lines import limits_lines
from fieldkit.traces.pairing import PairResult
from fieldkit.traces.session import names_link
from fieldkit.traces.svg import plot_points
from fieldkit.traces.verdicts import Limits


class TraceJobError(InputError):
    """A trace that cannot go into the job as asked: one line naming the problem."""


@dataclass
class SpliceFill:
    """What was (or, in a dry run, would be) written, and what could not be matched."""

    fill: OtdrFill
    matched: list[tuple[int, float]] = field(default_factory=list)  # (fibre, event distance)
    unmatched: list[int] = field(default_factory=list)  # fibres with no event at the closure

    @property
    def would_overwrite(self) -> list[tuple[OtdrLoss, float]]:
        return self.fill.would_overwrite

    def summary(self, closure: str) -> str:
        """One line: how many losses went into the closure, for how many fibres."""
        missing = f", {len(self.unmatched)} fibres without an event there" if self.unmatched else ""
        return (
            f"Splice log of {closure}: {len(self.fill.written)} one-way losses written "
            f"({len(self.matched)} fibres{missing})"
        )


def losses_at(ft: FibreTraces, route_m: float) -> tuple[list[OtdrLoss], float | None]:
    """The one-way losses of the event at the closure on this fibre, and its distance."""
    if ft.paired is not None:
        p = ft.paired
        cands = [e for e in p.events if e.kind != "end"]
        index = p.a_to_b.group_index
        e = event_at(route_m, cands, [e.distance_m for e in cands], index, p.tolerance_m)
        if e is None:
            return [], None
        wl = p.a_to_b.trace.wavelength_nm
        out = []
        if e.loss_ab_db is not None:
            out.append(OtdrLoss(ft.fibre, "A->B", round(e.loss_ab_db, 3), wl))
        if e.loss_ba_db is not None:
            out.append(OtdrLoss(ft.fibre, "B->A", round(e.loss_ba_db, 3), wl))
        return out, e.distance_m
    r = ft.one_way
    if r is None:
        return [], None
    # a B->A trace measures from end B: its event at x sits (length - x) from end A
    from_b = ft.direction == "B->A" and r.length_m is not None
    near = [ev for ev in r.events if ev.kind != "end"]
    from_a = [(r.length_m or 0.0) - ev.distance_m if from_b else ev.distance_m for ev in near]
    found = event_at(route_m, near, from_a, r.group_index, reading_uncertainty_m(r))
    if found is None or found.loss_db is None:
        return [], None
    wl = r.trace.wavelength_nm
    loss = round(found.loss_db, 3)
    one = (
        OtdrLoss(ft.fibre, "B->A", loss, wl)
        if ft.direction == "B->A"
        else OtdrLoss(ft.fibre, "A->B", loss, wl)
    )
    return [one], found.distance_m


def closure_route_m(store: Any, job_id: str, link: str, closure: str) -> tuple[str, float]:
    """The closure's name and route position; refused when it has none."""
    job = store.load(job_id)
    item = find_closure(find_link(job, link), closure)
    if item.route_distance_m is None:
        raise TraceJobError(
            f"closure {item.name!r} has no route position: set it first "
            "(fieldkit splice closure ... --route-distance), so its OTDR event can be found"
        )
    return item.name, item.route_distance_m


def fill_splice_log(
    store: Any,
    job_id: str,
    link: str,
    closure: str,
    fibres: Sequence[FibreTraces],
    *,
    overwrite: bool = False,
    dry_run: bool = False,
    by: str = "",
) -> SpliceFill:
    """Write each fibre's one-way losses at the closure into its splice log (module doc)."""
    if not fibres:
        raise TraceJobError("no traces to take splice losses from")
    _name, route_m = closure_route_m(store, job_id, link, closure)
    losses: list[OtdrLoss] = []
    matched: list[tuple[int, float]] = []
    unmatched: list[int] = []
    for ft in fibres:
        found, distance = losses_at(ft, route_m)
        if distance is None or not found:
            unmatched.append(ft.fibre)
            continue
        losses.extend(found)
        matched.append((ft.fibre, distance))
    if not losses:
        raise TraceJobError(
            f"no event near the closure's route position {route_m:.0f} m on any of "
            f"{len(fibres)} fibre(s): check the closure's position and the traces"
        )
    fill = record_otdr_losses(
        store, job_id, link, closure, losses, overwrite=overwrite, dry_run=dry_run, by=by
    )
    return SpliceFill(fill, matched, unmatched)


def links_named(store: Any, names: list[str]) -> list[tuple[str, str]]:
    """The (job id, link id) of every open, writable job's link labelled with one of
    ``names`` (:func:`~fieldkit.traces.session.names_link`): where the open traces most likely
    belong. The index's link labels pick the jobs, so only those are read."""
    found: list[tuple[str, str]] = []
    for summary in store.list():
        if summary.status != "open" or summary.read_only:
            continue
        if not any(names_link(label, names) for label in summary.link_labels):
            continue
        job = store.load(summary.id)
        found += [(job.id, ln.id) for ln in job.links if names_link(ln.label, names)]
    return found


def load_link(store: Any, job_id: str, link: str) -> tuple[Job, Link]:
    """The job and its link (by label or id) as the store holds them now.

    Raises
    ------
    StoreError, InputError
        The job cannot be read, or has no such link.
    """
    job = store.load(job_id)
    return job, find_link(job, link)


def closures_of(store: Any, where: tuple[str, str] | None) -> list[tuple[str, float | None]]:
    """(name, route position m) of each closure of link ``where`` (job id, link); none when
    ``where`` is None or the link cannot be read (the caller goes on without landmarks)."""
    if where is None:
        return []
    try:
        _job, link = load_link(store, *where)
    except Exception:  # noqa: BLE001 - a store or lookup problem: no closures to offer
        return []
    return [(c.name, c.route_distance_m) for c in link.closures]


def closure_landmarks(store: Any, job_id: str, link: str) -> list[Landmark]:
    """The link's closures with a route position, as landmarks for a fault hand-off."""
    _job, target = load_link(store, job_id, link)
    return [
        Landmark(c.name, c.route_distance_m)
        for c in target.closures
        if c.route_distance_m is not None
    ]


# -- verdict limits from presets and a link ----------------------------------------------------
#: The presets the limits come from when neither the link nor the user names one: the shipped
#: splice and connector grades the budget uses by default, G.652.D, and the IEC 61753-1 return
#: loss grade of each polish (UPC: grade 2, -45 dB; APC: grade 1, -60 dB; from memory).
DEFAULT_FIBRE = "G.652.D"
DEFAULT_SPLICE = "fusion"
DEFAULT_CONNECTOR = "TIA-568.3-D"
REFLECTANCE_BY_POLISH = {
    "UPC": "IEC 61753-1 return loss grade 2",
    "APC": "IEC 61753-1 return loss grade 1",
}


def _description(link: Link | None) -> dict[str, Any]:
    if link is None or link.budget is None:
        return {}
    return dict(link.budget.description)


def _fibre_names(link: Link | None) -> tuple[list[str], str]:
    """The link's fibre type(s) and where they were read: its fibre type, else its budget's
    segments."""
    if link is None:
        return [], ""
    if link.fibre_type.strip():
        return [link.fibre_type.strip()], "the link's fibre type"
    names = []
    for seg in _description(link).get("segments") or []:
        if isinstance(seg, dict) and isinstance(seg.get("fibre"), str):
            if seg["fibre"] not in names:
                names.append(seg["fibre"])
    return names, "the link's budget"


def _grade(table: Any) -> str | None:
    if isinstance(table, dict) and isinstance(table.get("grade"), str):
        return str(table["grade"])
    return None


def trace_limits(
    library: PresetLibrary,
    link: Link | None = None,
    *,
    origin: str = "",
    fibre_type: str | None = None,
    polish: str | None = None,
    reflectance: str | None = None,
    splice_max_db: float | None = None,
    connector_max_db: float | None = None,
) -> Limits:
    """The limits a trace's events and sections are judged against, each with its source.

    In order, the first that gives a value wins: what the user typed (the keyword arguments),
    the link (its splice limit, its fibre type, its budget's fibre, connector and splice grades
    and its application, whose first word names a reflectance preset: ``10GBASE-LR`` takes
    "10GBASE-LR channel", ``GPON Class B+`` takes "GPON ODN"), then the defaults above. A
    fibre type that is no preset is said, not guessed: the default fibre judges, and its
    source says why.

    Raises
    ------
    InputError
        A typed preset name (``fibre_type``, ``reflectance``) that does not exist.
    """
    desc = _description(link)
    default_origin = "the link's presets" if link is not None else "the shipped presets"
    lim = Limits(origin=origin or default_origin)
    notes: dict[str, str] = {}

    # fibre: attenuation maximum per wavelength (the highest of a mixed link's fibres, so a
    # section of the weaker fibre is not failed against the stronger one's maximum)
    names, where = ([fibre_type], "typed") if fibre_type else _fibre_names(link)
    fibres = []
    for name in names:
        try:
            fibres.append(library.find("fibres", name))
        except InputError:
            if fibre_type:
                raise
            notes["fibre"] = f"{where} {name!r} is no fibre preset"
    if not fibres:
        fibres = [library.find("fibres", DEFAULT_FIBRE)]
        where = "default" + (f"; {notes['fibre']}" if "fibre" in notes else "")
    table: dict[float, float] = {}
    for f in fibres:
        for nm, value in f.attenuation_max.items():
            if float(nm) in f.estimated_nm:
                continue  # no standard gives a maximum there: not judged against an estimate
            table[float(nm)] = max(table.get(float(nm), value), value)
    label = " / ".join(f.name for f in fibres)
    lim = replace(
        lim,
        attenuation_max_db_per_km=table,
        attenuation_source=f"{label} preset ({where})",
    )

    # splices: the link's own limit, else its budget's splice grade, else the default preset
    if splice_max_db is not None:
        lim = replace(lim, splice_max_db=splice_max_db, splice_source="typed")
    else:
        own = current_limit(link.splice_limits, "fusion") if link is not None else None
        grades = [g for t in (desc.get("splices") or []) if (g := _grade(t)) is not None]
        if own is not None:
            what = f"{own.preset} preset" if own.preset else "typed"
            lim = replace(
                lim,
                splice_max_db=own.loss_max_db,
                splice_source=f"{what} (the link's fusion splice limit)",
            )
        else:
            grade_s, why = (
                (grades[0], "the link's budget") if grades else (DEFAULT_SPLICE, "default")
            )
            found = library.find("splices", grade_s)
            lim = replace(
                lim, splice_max_db=found.loss_max_db, splice_source=f"{found.name} preset ({why})"
            )

    # connectors: the budget's grade, or the loss it was given, else the default grade
    if connector_max_db is not None:
        lim = replace(lim, connector_max_db=connector_max_db, connector_source="typed")
    else:
        grade = _grade(desc.get("connectors"))
        loss = desc.get("connector_loss_db")
        if grade is None and isinstance(loss, int | float) and not isinstance(loss, bool):
            lim = replace(
                lim,
                connector_max_db=float(loss),
                connector_source="the link's budget (a loss per mated pair, no grade)",
            )
        else:
            name, why = (grade, "the link's budget") if grade else (DEFAULT_CONNECTOR, "default")
            found_c = library.find("connectors", name)
            lim = replace(
                lim,
                connector_max_db=found_c.loss_max_db,
                connector_source=f"{found_c.name} preset ({why})",
            )

    # reflectance: a typed preset, else the link's application's, else the polish's grade
    chosen_polish = polish or "UPC"
    lim = replace(lim, polish="APC" if chosen_polish == "APC" else "UPC")
    preset = None
    why = "typed"
    if reflectance:
        preset = library.find("reflectance", reflectance)
    else:
        app = desc.get("application")
        if isinstance(app, str) and app.split():
            first = app.split()[0].casefold()
            for candidate in library.reflectance.values():
                if candidate.name.split()[0].casefold() == first:
                    preset, why = candidate, f"the link's application {app}"
                    break
        if preset is None:
            try:
                preset = library.find("reflectance", REFLECTANCE_BY_POLISH[lim.polish])
                why = f"{lim.polish} connectors" + (", default" if polish is None else "")
            except InputError:
                preset = None  # the user's presets replaced the kind: keep the built-in figure
    if preset is not None:
        lim = replace(
            lim,
            reflectance_max_db=preset.reflectance_max_db,
            reflectance_source=f"{preset.name} preset ({why})",
            orl_min_db=preset.orl_min_db,
            orl_source=f"{preset.name} preset" if preset.orl_min_db is not None else "",
        )
    return lim


def link_origin(job: Job, link: Link) -> str:
    """Where limits from a job's link come from, as their summary names it."""
    return f"link {link.label!r} of job {job.name!r}"


def link_limits(store: Any, library: PresetLibrary, job_id: str, link: str, **typed: Any) -> Limits:
    """:func:`trace_limits` of a job's link (by label or id), its origin naming both."""
    job, target = load_link(store, job_id, link)
    return trace_limits(library, target, origin=link_origin(job, target), **typed)


def presets_limits(config_dir: Any, job: Job | None = None, link: Link | None = None) -> Limits:
    """:func:`trace_limits` by the shipped and the user's presets (those in ``config_dir``)
    and, given, the job's link, its origin naming both."""
    from fieldkit.presets import load_presets

    origin = link_origin(job, link) if job is not None and link is not None else ""
    return trace_limits(load_presets(config_dir), link, origin=origin)


# -- traces kept on a link (schema 5) ----------------------------------------------------------
def _curve(result: TraceResult, direction: str) -> TraceCurve:
    t = result.trace
    points = plot_points(t.distance_m, t.level_db, result.length_m, MAX_TRACE_POINTS)
    return TraceCurve(
        direction="B->A" if direction == "B->A" else "A->B",
        source=t.source,
        points=encode_points(points),
        decimated_from=t.points,
    )


def _limit_of(kind: str, limits: Limits) -> float | None:
    if kind == "end":
        return None
    return limits.connector_max_db if kind == "reflective" else limits.splice_max_db


def _sections(result: TraceResult, direction: str) -> list[TraceSectionRow]:
    limit = result.limits.attenuation_here_db_per_km
    return [
        TraceSectionRow(
            direction="B->A" if direction == "B->A" else "A->B",
            number=sec.number,
            from_m=sec.from_m,
            to_m=sec.to_m,
            attenuation_db_per_km=sec.attenuation_db_per_km,
            loss_db=sec.loss_db,
            verdict=sec.verdict,  # type: ignore[arg-type]
            limit_db_per_km=limit,
            verdict_reason=sec.verdict_reason,
        )
        for sec in result.sections
    ]


def _limits_text(limits: Limits, wavelength_nm: float | None) -> str:
    return "\n".join(limits_lines(limits, wavelength_nm))


def trace_record(
    result: TraceResult, *, fibre: int, direction: str = "A->B", by: str = ""
) -> TraceRecord:
    """The record a job keeps of one trace, one way (distances from that trace's start)."""
    t, lim = result.trace, result.limits
    events = [
        TraceEventRow(
            number=e.number,
            distance_m=e.distance_m,
            kind=e.kind,  # type: ignore[arg-type]
            loss_db=e.loss_db,
            reflectance_db=e.reflectance_db,
            cumulative_db=e.cumulative_loss_db,
            verdict=e.verdict,  # type: ignore[arg-type]
            limit_db=_limit_of(e.kind, lim),
            verdict_reason=e.verdict_reason,
            note="saturated: the peak is clipped" if e.saturated else "",
        )
        for e in result.events
    ]
    return TraceRecord(
        by=by,
        fibre=fibre,
        wavelength_nm=t.wavelength_nm,
        direction="B->A" if direction == "B->A" else "A->B",
        sources=[t.source],
        pulse_width_ns=t.pulse_width_ns or result.settings.pulse_width_ns,
        group_index=result.group_index,
        length_m=result.length_m,
        total_loss_db=result.analysis.total_loss_db,
        loss_method=result.settings.loss_method,
        events=events,
        sections=_sections(result, direction),
        orl_db=result.analysis.orl_db,
        orl_verdict=result.orl_verdict[0],  # type: ignore[arg-type]
        limits=_limits_text(lim, t.wavelength_nm),
        curves=[_curve(result, direction)],
        notes=list(result.notes),
    )


def pair_record(pair: PairResult, *, fibre: int, by: str = "") -> TraceRecord:
    """The record a job keeps of both directions averaged ("A<->B"): distances from end A;
    ``cumulative_db`` is the sum of the averaged losses up to and including the event."""
    a, b, lim = pair.a_to_b, pair.b_to_a, pair.limits
    events = []
    total = 0.0
    for e in pair.events:
        if e.average_db is not None:
            total += e.average_db
        reflectances = [r for r in (e.reflectance_ab_db, e.reflectance_ba_db) if r is not None]
        events.append(
            TraceEventRow(
                number=e.number,
                distance_m=e.distance_m,
                kind=e.kind,  # type: ignore[arg-type]
                loss_ab_db=e.loss_ab_db,
                loss_ba_db=e.loss_ba_db,
                average_db=e.average_db,
                reflectance_db=max(reflectances) if reflectances else None,
                cumulative_db=total,
                verdict=e.verdict,  # type: ignore[arg-type]
                limit_db=_limit_of(e.kind, lim),
                verdict_reason=e.verdict_reason,
                note=e.note,
            )
        )
    notes = list(pair.notes)
    orl = a.analysis.orl_db
    if orl is not None:
        notes.append("ORL as measured from end A")
    wavelength = a.trace.wavelength_nm or b.trace.wavelength_nm
    return TraceRecord(
        by=by,
        fibre=fibre,
        wavelength_nm=wavelength,
        direction="A<->B",
        sources=[a.trace.source, b.trace.source],
        pulse_width_ns=a.trace.pulse_width_ns or a.settings.pulse_width_ns,
        group_index=a.group_index,
        length_m=pair.length_m,
        total_loss_db=pair.total_loss_db,
        loss_method=a.settings.loss_method,
        events=events,
        sections=_sections(a, "A->B") + _sections(b, "B->A"),
        orl_db=orl,
        orl_verdict=a.orl_verdict[0],  # type: ignore[arg-type]
        limits=_limits_text(lim, wavelength),
        curves=[_curve(a, "A->B"), _curve(b, "B->A")],
        notes=notes,
    )


def fibre_record(ft: FibreTraces, by: str = "") -> TraceRecord:
    """The record of one fibre's traces: the pair when both directions are there."""
    if ft.paired is not None:
        return pair_record(ft.paired, fibre=ft.fibre, by=by)
    if ft.one_way is None:
        raise TraceJobError(f"fibre {ft.fibre}: no trace to save")
    return trace_record(ft.one_way, fibre=ft.fibre, direction=ft.direction, by=by)


@dataclass(frozen=True)
class SavedTraces:
    """Where traces were saved, what was saved, and how many earlier ones they superseded."""

    job_id: str
    job_name: str
    link_id: str
    link_label: str
    records: tuple[TraceRecord, ...]
    superseded: int

    def summary(self) -> str:
        """One line: "saved 2 traces (fibre 1 A<->B 1550 nm, ...) onto job J, link L"."""
        shown = ", ".join(
            f"fibre {r.fibre} {r.direction}"
            + ("" if r.wavelength_nm is None else f" {r.wavelength_nm:g} nm")
            for r in self.records[:3]
        )
        more = f" and {len(self.records) - 3} more" if len(self.records) > 3 else ""
        earlier = f"; {self.superseded} earlier kept as superseded" if self.superseded else ""
        noun = "trace" if len(self.records) == 1 else "traces"
        return (
            f"saved {len(self.records)} {noun} ({shown}{more}) onto job {self.job_name}, "
            f"link {self.link_label}{earlier}"
        )

    def status(self) -> str:
        """:meth:`summary` as the Traces workspace says it: a sentence, directions as arrows
        (``Saved 1 trace (fibre 1 A↔B 1550 nm) onto ...``)."""
        text = arrow(self.summary())
        return text[:1].upper() + text[1:]


#: Called as ``progress(done, total)`` while records are put onto the link.
SaveProgress = Callable[[int, int], None]


def save_traces(
    store: JobStore,
    job_id: str,
    link: str,
    records: Sequence[TraceRecord],
    *,
    by: str = "",
    create: bool = False,
    progress: SaveProgress | None = None,
) -> SavedTraces:
    """Add ``records`` to the link (id or label; added by label with ``create``) in one save,
    stamped with ``by`` (the operator); each supersedes the current record of the same fibre,
    wavelength and direction, which stays in the file.

    Raises
    ------
    TraceJobError
        No records, or a ``by`` that is not plain text; no such link (nothing written).
    """
    if not records:
        raise TraceJobError("no traces to save")
    by = check_text(by, "by")
    stamped = [r.model_copy(update={"by": by}) if by else r for r in records]
    keys = [r.key for r in stamped]
    if len(set(keys)) != len(keys):
        repeated = next(k for k in keys if keys.count(k) > 1)
        raise TraceJobError(
            f"fibre {repeated[0]} {repeated[2]} is given twice at one wavelength: save one"
        )
    out: list[SavedTraces] = []

    def change(job: Job) -> None:
        target = find_link(job, link, create=create)
        current = {t.key: t for t in target.traces if t.current}
        superseded = 0
        for number, record in enumerate(stamped, start=1):
            old = current.get(record.key)
            if old is not None:
                old.superseded_at = record.at
                old.superseded_by = record.id
                superseded += 1
            target.traces.append(record)
            if progress is not None:
                progress(number, len(stamped))
        out[:] = [
            SavedTraces(job.id, job.name, target.id, target.label, tuple(stamped), superseded)
        ]

    store.update(job_id, change)
    return out[0]


def save_fibres(
    store: JobStore,
    job_id: str,
    link: str,
    fibres: Sequence[FibreTraces],
    *,
    by: str = "",
    progress: SaveProgress | None = None,
) -> SavedTraces:
    """:func:`fibre_record` of each fibre, then :func:`save_traces` of them all in one save;
    ``progress(done, total)`` after each record is built (the long part of a folder)."""
    records = []
    for done, ft in enumerate(fibres, start=1):
        records.append(fibre_record(ft, by=by))
        if progress is not None:
            progress(done, len(fibres))
    return save_traces(store, job_id, link, records, by=by)
