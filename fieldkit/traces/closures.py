"""Which OTDR event is a closure: the one rule, for the Traces table, the hand-off to Fault and
the splice losses written into a closure's log.

An event (other than the end) is at a closure when the closure's route position lies inside
the event's route window (:func:`fieldkit.calc.locate.route_window`): the event located as a
fault would be, with its uncertainty (instrument terms, the event's own placing on the trace,
the unknown 0–3 % helix), widened back along the route by the cable a closure stores. Of
several candidates the one nearest the located estimate wins. Distances are from end A, the
start of the route: a trace from end B converts first (``length − x``).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import TypeVar

from fieldkit.calc.locate import RouteWindow, route_window
from fieldkit.traces.analysis import TraceResult
from fieldkit.traces.pairing import default_tolerance_m


@dataclass(frozen=True, slots=True)
class Closure:
    """A landmark with a known route position (a splice closure, a handhole)."""

    name: str
    route_m: float


E = TypeVar("E")


def reading_uncertainty_m(result: TraceResult) -> float:
    """How well one trace places an event (m): the pairing tolerance of the trace with
    itself (:func:`fieldkit.traces.pairing.default_tolerance_m`)."""
    return default_tolerance_m(result, result)


def window(distance_m: float, group_index: float, uncertainty_m: float) -> RouteWindow:
    """The route positions a closure at an event ``distance_m`` from end A may have."""
    return route_window(max(distance_m, 0.0), group_index, uncertainty_m)


def closure_at(
    distance_m: float, closures: Iterable[Closure], group_index: float, uncertainty_m: float
) -> Closure | None:
    """The closure the event at ``distance_m`` from end A is, if any (module doc)."""
    placed = list(closures)
    if not placed:
        return None
    w = window(distance_m, group_index, uncertainty_m)
    near = [c for c in placed if w.holds(c.route_m)]
    return min(near, key=lambda c: abs(c.route_m - w.estimate_m)) if near else None


def event_at(
    route_m: float,
    events: Sequence[E],
    distance_m: Sequence[float],
    group_index: float,
    uncertainty_m: float,
) -> E | None:
    """Of ``events`` (at ``distance_m`` from end A, in the same order; the end left out by
    the caller), the one that is the closure at ``route_m``, if any (module doc)."""
    near = []
    for event, d in zip(events, distance_m, strict=True):
        w = window(d, group_index, uncertainty_m)
        if w.holds(route_m):
            near.append((abs(route_m - w.estimate_m), event))
    return min(near, key=lambda item: item[0])[1] if near else None
