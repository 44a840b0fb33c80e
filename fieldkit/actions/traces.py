"""OTDR results into a job: splice losses into a closure's splice log, closures as landmarks.

The splice log is written only through :func:`fieldkit.actions.splices.record_otdr_losses`
(one change through the job store, under its lock). A splice that already holds a different
loss is never overwritten without ``overwrite``: call with ``dry_run=True`` first, show
``would_overwrite``, ask, then call again.

Which event is the closure: the event (not the end) nearest the closure's route position, within
a tolerance. Fibre runs longer than the route (helix, slack loops), so the tolerance is the
pairing tolerance plus 3 % of the route distance and 20 m (common practice for cable with a
1-2 % helix and a storage loop at the closure).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from fieldkit.actions.splices import OtdrFill, OtdrLoss, find_closure, find_link, record_otdr_losses
from fieldkit.calc.units import InputError
from fieldkit.traces.analysis import TraceResult
from fieldkit.traces.pairing import PairResult, default_tolerance_m
from fieldkit.traces.session import Closure as Landmark


class TraceJobError(InputError):
    """A trace that cannot go into the job as asked: one line naming the problem."""


@dataclass(frozen=True, slots=True)
class FibreTraces:
    """One fibre's traces: both directions paired, or one direction alone."""

    fibre: int
    paired: PairResult | None = None
    one_way: TraceResult | None = None
    direction: str = "A->B"  # of ``one_way``


@dataclass
class SpliceFill:
    """What was (or, in a dry run, would be) written, and what could not be matched."""

    fill: OtdrFill
    matched: list[tuple[int, float]] = field(default_factory=list)  # (fibre, event distance)
    unmatched: list[int] = field(default_factory=list)  # fibres with no event at the closure

    @property
    def would_overwrite(self) -> list[tuple[OtdrLoss, float]]:
        return self.fill.would_overwrite


def match_tolerance_m(route_m: float, base_m: float) -> float:
    """Tolerance between a closure's route position and its event's distance (module doc)."""
    return base_m + 0.03 * route_m + 20.0


def losses_at(ft: FibreTraces, route_m: float) -> tuple[list[OtdrLoss], float | None]:
    """The one-way losses of the event at the closure on this fibre, and its distance."""
    if ft.paired is not None:
        p = ft.paired
        tol = match_tolerance_m(route_m, p.tolerance_m)
        cands = [e for e in p.events if e.kind != "end" and abs(e.distance_m - route_m) <= tol]
        if not cands:
            return [], None
        e = min(cands, key=lambda e: abs(e.distance_m - route_m))
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
    tol = match_tolerance_m(route_m, default_tolerance_m(r, r))
    # a B->A trace measures from end B: the closure sits at (length - route) on it
    where = route_m
    if ft.direction == "B->A" and r.length_m is not None:
        where = r.length_m - route_m
    near = [ev for ev in r.events if ev.kind != "end" and abs(ev.distance_m - where) <= tol]
    if not near:
        return [], None
    found = min(near, key=lambda ev: abs(ev.distance_m - where))
    if found.loss_db is None:
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


def closure_landmarks(store: Any, job_id: str, link: str) -> list[Landmark]:
    """The link's closures with a route position, as landmarks for a fault hand-off."""
    job = store.load(job_id)
    target = find_link(job, link)
    return [
        Landmark(c.name, c.route_distance_m)
        for c in target.closures
        if c.route_distance_m is not None
    ]
