"""Bidirectional analysis: two traces of one fibre, A→B and B→A, averaged per event.

Method (ITU-T G.650.3 Appendix I, from memory): the B→A trace is turned into A's frame, x_A =
L_B - x_B, with L_B the length B→A measures to its end event, so both end events meet the other
trace's start. Events match when they lie within a tolerance of each other; a matched event's
loss is the mean of its two one-way losses.

Why one direction can show a gain: the displayed backscatter level depends on the fibre's
backscatter coefficient, which rises with a smaller mode-field diameter. Where a splice joins a
fibre of larger MFD to one of smaller MFD, the trace looking into the smaller fibre steps up by
half the coefficient change while the true loss pulls it down; seen from the other end the same
change adds to the loss. The change cancels in the mean, which is the splice's real loss.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from fieldkit.traces.analysis import TraceEvent, TraceResult
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.verdicts import Limits, event_verdict

#: Lengths measured from the two ends that differ by more than this share are flagged
#: (common practice: a few samples or 0.5 %, whichever is larger).
LENGTH_MISMATCH_SHARE = 0.005


@dataclass(frozen=True, slots=True)
class PairedEvent:
    number: int
    distance_m: float  # from end A
    kind: str
    loss_ab_db: float | None
    loss_ba_db: float | None
    average_db: float | None
    reflectance_ab_db: float | None
    reflectance_ba_db: float | None
    event_ab: int | None  # the event's number in the A→B table
    event_ba: int | None
    verdict: str
    verdict_reason: str
    note: str


@dataclass(frozen=True)
class PairResult:
    a_to_b: TraceResult
    b_to_a: TraceResult
    length_m: float
    length_ab_m: float
    length_ba_m: float
    tolerance_m: float
    events: tuple[PairedEvent, ...]
    notes: tuple[str, ...]
    #: The limits the verdicts used, at the pair's wavelength.
    limits: Limits = Limits()

    @property
    def total_loss_db(self) -> float | None:
        a, b = self.a_to_b.analysis.total_loss_db, self.b_to_a.analysis.total_loss_db
        if a is None or b is None:
            return None
        return (a + b) / 2.0

    def to_json(self) -> dict[str, Any]:
        return {
            "a_to_b": self.a_to_b.trace.source,
            "b_to_a": self.b_to_a.trace.source,
            "wavelength_nm": self.a_to_b.trace.wavelength_nm,
            "length_m": self.length_m,
            "length_ab_m": self.length_ab_m,
            "length_ba_m": self.length_ba_m,
            "tolerance_m": self.tolerance_m,
            "total_loss_ab_db": self.a_to_b.analysis.total_loss_db,
            "total_loss_ba_db": self.b_to_a.analysis.total_loss_db,
            "total_loss_db": self.total_loss_db,
            "loss_method": self.a_to_b.settings.loss_method,
            "events": [
                {
                    "number": e.number,
                    "distance_m": e.distance_m,
                    "kind": e.kind,
                    "loss_ab_db": e.loss_ab_db,
                    "loss_ba_db": e.loss_ba_db,
                    "average_db": e.average_db,
                    "reflectance_ab_db": e.reflectance_ab_db,
                    "reflectance_ba_db": e.reflectance_ba_db,
                    "event_ab": e.event_ab,
                    "event_ba": e.event_ba,
                    "verdict": e.verdict,
                    "verdict_reason": e.verdict_reason,
                    "note": e.note,
                }
                for e in self.events
            ],
            "limits": self.limits.to_json(),
            "notes": list(self.notes),
        }


def default_tolerance_m(a: TraceResult, b: TraceResult) -> float:
    """Matching tolerance: the larger of 5 m, four samples and one pulse length (common
    practice: events from the two ends rarely land further apart than one pulse)."""
    spacing = max(a.trace.spacing_m, b.trace.spacing_m)
    pulses = [(r.trace.pulse_width_ns or 0.0) * 0.299792458 / (2.0 * r.group_index) for r in (a, b)]
    return max(5.0, 4.0 * spacing, *pulses)


def pair(
    a_to_b: TraceResult,
    b_to_a: TraceResult,
    *,
    tolerance_m: float | None = None,
    limits: Limits | None = None,
) -> PairResult:
    """Average the two directions of one fibre event by event (method in the module doc).

    Raises
    ------
    TraceFileError
        When either trace has no end event (the two cannot be aligned) or the wavelengths
        differ.
    """
    for r in (a_to_b, b_to_a):
        if r.length_m is None:
            raise TraceFileError(
                f"{r.trace.source}: no end of fibre found, so the two directions cannot be aligned"
            )
    wa, wb = a_to_b.trace.wavelength_nm, b_to_a.trace.wavelength_nm
    if wa is not None and wb is not None and abs(wa - wb) > 5.0:
        raise TraceFileError(
            f"{a_to_b.trace.source} is at {wa:g} nm and {b_to_a.trace.source} at {wb:g} nm: "
            "pair traces of the same wavelength"
        )
    la = float(a_to_b.length_m or 0.0)
    lb = float(b_to_a.length_m or 0.0)
    tol = tolerance_m if tolerance_m is not None else default_tolerance_m(a_to_b, b_to_a)
    lim = (limits or a_to_b.settings.limits).for_wavelength(wa)
    notes: list[str] = []
    if abs(la - lb) > max(tol, LENGTH_MISMATCH_SHARE * max(la, lb)):
        notes.append(
            f"the two ends measure {la:.1f} m and {lb:.1f} m: check that both traces are of the "
            "same fibre and set to the same group index"
        )
    a_events = [e for e in a_to_b.events if e.kind != "end"]
    b_events = [e for e in b_to_a.events if e.kind != "end"]
    b_in_a = [(lb - e.distance_m, e) for e in b_events]
    used_b: set[int] = set()
    rows: list[tuple[float, TraceEvent | None, TraceEvent | None]] = []
    for a_ev in a_events:
        best: tuple[float, int] | None = None
        for k, (x, _eb) in enumerate(b_in_a):
            if k in used_b:
                continue
            gap = abs(x - a_ev.distance_m)
            if gap <= tol and (best is None or gap < best[0]):
                best = (gap, k)
        if best is not None:
            used_b.add(best[1])
            x, b_ev = b_in_a[best[1]]
            rows.append(((a_ev.distance_m + x) / 2.0, a_ev, b_ev))
        else:
            rows.append((a_ev.distance_m, a_ev, None))
    for k, (x, b_ev) in enumerate(b_in_a):
        if k not in used_b and x > tol:  # B's events at A's start sit in A's launch dead zone
            rows.append((x, None, b_ev))
    rows.sort(key=lambda r: r[0])

    events: list[PairedEvent] = []
    for number, (x, ea, eb) in enumerate(rows, start=1):
        loss_ab = ea.loss_db if ea else None
        loss_ba = eb.loss_db if eb else None
        note = ""
        # Below the threshold in one direction is still a step there: measure it at the place
        # the other direction found (a gainer often hides this way).
        if ea is not None and eb is None and ea.kind != "reflective":
            loss_ba = b_to_a.loss_at(lb - x)
            if loss_ba is not None:
                note = "B→A below its threshold here: measured at this place"
        elif eb is not None and ea is None and eb.kind != "reflective":
            loss_ab = a_to_b.loss_at(x)
            if loss_ab is not None:
                note = "A→B below its threshold here: measured at this place"
        reflective = bool((ea and ea.kind == "reflective") or (eb and eb.kind == "reflective"))
        average = (loss_ab + loss_ba) / 2.0 if loss_ab is not None and loss_ba is not None else None
        if average is None:
            seen = "A→B" if ea else "B→A"
            note = f"seen from one end only ({seen}): no average"
        elif (loss_ab is not None and loss_ab < 0) or (loss_ba is not None and loss_ba < 0):
            gainer_side = "A→B" if (loss_ab or 0) < 0 else "B→A"
            note = (
                (note + "; " if note else "")
                + f"gainer {gainer_side}: the backscatter coefficient changes at this splice "
                f"(fibres of different mode-field diameter); the average {average:.3f} dB is "
                "the splice loss"
            )
        if average is not None:
            kind = "reflective" if reflective else ("gainer" if average < 0 else "splice")
            verdict, reason = event_verdict(
                kind,
                average,
                _worst_reflectance(ea, eb),
                lim,
                bidirectional=True,
            )
        else:
            kind = (
                "reflective"
                if reflective
                else ("gainer" if (loss_ab or loss_ba or 0) < 0 else "splice")
            )
            one = ea or eb
            assert one is not None
            verdict, reason = one.verdict, one.verdict_reason + " (one direction)"
            if kind == "gainer":
                verdict, reason = "in doubt", "gainer seen from one end only"
        events.append(
            PairedEvent(
                number=number,
                distance_m=x,
                kind=kind,
                loss_ab_db=loss_ab,
                loss_ba_db=loss_ba,
                average_db=average,
                reflectance_ab_db=ea.reflectance_db if ea else None,
                reflectance_ba_db=eb.reflectance_db if eb else None,
                event_ab=ea.number if ea else None,
                event_ba=eb.number if eb else None,
                verdict=verdict,
                verdict_reason=reason,
                note=note,
            )
        )
    end_verdict = "no limit"
    events.append(
        PairedEvent(
            number=len(events) + 1,
            distance_m=la,
            kind="end",
            loss_ab_db=None,
            loss_ba_db=None,
            average_db=None,
            reflectance_ab_db=a_to_b.end_event.reflectance_db if a_to_b.end_event else None,
            reflectance_ba_db=b_to_a.end_event.reflectance_db if b_to_a.end_event else None,
            event_ab=a_to_b.end_event.number if a_to_b.end_event else None,
            event_ba=b_to_a.end_event.number if b_to_a.end_event else None,
            verdict=end_verdict,
            verdict_reason="end of fibre (end B)",
            note="",
        )
    )
    return PairResult(
        a_to_b=a_to_b,
        b_to_a=b_to_a,
        length_m=(la + lb) / 2.0,
        length_ab_m=la,
        length_ba_m=lb,
        tolerance_m=tol,
        events=tuple(events),
        notes=tuple(notes),
        limits=lim,
    )


def _worst_reflectance(ea: TraceEvent | None, eb: TraceEvent | None) -> float | None:
    values = [e.reflectance_db for e in (ea, eb) if e is not None and e.reflectance_db is not None]
    return max(values) if values else None
