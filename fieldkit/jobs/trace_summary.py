"""What a link's kept OTDR traces say, per wavelength: the fibres traced, the current and the
superseded traces, the worst event loss and reflectance, and the verdicts of the events.

One rule, shared by ``fieldkit jobs show``, the Jobs workspace's job detail and the customer
report (:mod:`fieldkit.reports.traces_page`); the same choices as the folder table of
:mod:`fieldkit.traces.folder`, which works on fresh analyses rather than kept records:

- only a **current** trace is a result; a superseded one (a later save of the same fibre,
  wavelength and direction replaced it) is history and is only counted
  (:attr:`fieldkit.jobs.models.TraceRecord.current`);
- an event's **loss** is the average of both directions on a pair (``A<->B``, ITU-T G.650.3)
  and the one-way loss otherwise; the **worst** event is the one with the highest loss, the
  worst reflectance the highest (least negative) one;
- the **verdict counts** are of the events other than the fibre's end (the end is never judged);
- a trace is **over its limits** when any of its events fails.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any

from fieldkit.jobs.models import Link, TraceEventRow, TraceRecord
from fieldkit.jobs.reports import fmt_db, fmt_m, fmt_nm

#: Event verdict words as every view prints them (a failure in capitals).
TRACE_VERDICT = {"pass": "pass", "fail": "FAIL", "no limit": "no limit", "in doubt": "in doubt"}
#: The order the verdict counts are listed in: worst first.
VERDICT_ORDER = ("fail", "in doubt", "pass", "no limit")


def event_loss_db(trace: TraceRecord, event: TraceEventRow) -> float | None:
    """The loss an event counts with: averaged on a pair, one way otherwise."""
    return event.average_db if trace.direction == "A<->B" else event.loss_db


def over_limits(trace: TraceRecord) -> bool:
    """True when an event of the trace fails its limit."""
    return any(e.verdict == "fail" for e in trace.events)


def event_verdicts(trace: TraceRecord) -> Counter[str]:
    """The trace's events by verdict, the end of the fibre left out."""
    return Counter(e.verdict for e in trace.events if e.kind != "end")


@dataclass(frozen=True, slots=True)
class WorstEvent:
    """The event with the worst value of a wavelength: where it is and on which fibre."""

    fibre: int
    direction: str
    number: int
    distance_m: float
    value_db: float

    def as_dict(self) -> dict[str, Any]:
        return {
            "fibre": self.fibre,
            "direction": self.direction,
            "event": self.number,
            "distance_m": self.distance_m,
            "value_db": self.value_db,
        }

    def words(self) -> str:
        """``fibre 4 at 2100.0 m`` (a one-way B->A trace's distance is from end B)."""
        way = " from B" if self.direction == "B->A" else ""
        return f"fibre {self.fibre} at {fmt_m(self.distance_m)} m{way}"


@dataclass
class WavelengthTraces:
    """A link's kept traces at one wavelength (None: the trace did not say)."""

    wavelength_nm: float | None
    #: The fibre numbers with a current trace, in order.
    fibres: list[int] = field(default_factory=list)
    current: int = 0
    superseded: int = 0
    #: Current traces by direction ("A->B", "B->A", "A<->B").
    directions: Counter[str] = field(default_factory=Counter)
    #: Current traces with an event over its limit.
    over_limits: int = 0
    #: Events of the current traces by verdict (ends left out).
    verdicts: Counter[str] = field(default_factory=Counter)
    worst_loss: WorstEvent | None = None
    worst_reflectance: WorstEvent | None = None

    @property
    def wavelength(self) -> str:
        if self.wavelength_nm is None:
            return "wavelength not given"
        return f"{fmt_nm(self.wavelength_nm)} nm"

    def verdict_words(self) -> str:
        """``2 FAIL, 30 pass`` (worst first), or ``no events``."""
        parts = [
            f"{self.verdicts[v]} {TRACE_VERDICT[v]}" for v in VERDICT_ORDER if self.verdicts.get(v)
        ]
        return ", ".join(parts) if parts else "no events"

    def lines(self) -> list[str]:
        """The summary as short lines (each under 44 columns but for long figures), shared by
        the CLI and the Jobs workspace."""
        fibres = len(self.fibres)
        head = f"OTDR {self.wavelength}: {fibres} {'fibre' if fibres == 1 else 'fibres'} traced"
        out = [head, f"  {self.current} current, {self.superseded} superseded"]
        if self.current:
            over = self.over_limits
            out.append(
                f"  {over} {'trace' if over == 1 else 'traces'} with an event over its limit"
                if over
                else "  no event over its limit"
            )
            out.append(f"  events: {self.verdict_words()}")
        if self.worst_loss is not None:
            out.append(
                f"  worst loss {fmt_db(self.worst_loss.value_db)} dB, {self.worst_loss.words()}"
            )
        if self.worst_reflectance is not None:
            w = self.worst_reflectance
            out.append(f"  worst reflectance {fmt_db(w.value_db)} dB, {w.words()}")
        return out

    def as_dict(self) -> dict[str, Any]:
        return {
            "wavelength_nm": self.wavelength_nm,
            "fibres_traced": len(self.fibres),
            "fibres": list(self.fibres),
            "current": self.current,
            "superseded": self.superseded,
            "directions": dict(sorted(self.directions.items())),
            "traces_over_limits": self.over_limits,
            "event_verdicts": {v: self.verdicts.get(v, 0) for v in VERDICT_ORDER},
            "worst_loss": self.worst_loss.as_dict() if self.worst_loss else None,
            "worst_reflectance": (
                self.worst_reflectance.as_dict() if self.worst_reflectance else None
            ),
        }


def _worse(old: WorstEvent | None, value: float) -> bool:
    return old is None or value > old.value_db


def _wavelength_key(trace: TraceRecord) -> float | None:
    return None if trace.wavelength_nm is None else round(trace.wavelength_nm, 1)


def wavelength_traces(traces: Iterable[TraceRecord]) -> list[WavelengthTraces]:
    """The traces summarised per wavelength (in wavelength order; not given last)."""
    rows: dict[float | None, WavelengthTraces] = {}
    fibres: dict[float | None, set[int]] = {}
    for t in traces:
        key = _wavelength_key(t)
        row = rows.setdefault(key, WavelengthTraces(wavelength_nm=t.wavelength_nm))
        if not t.current:
            row.superseded += 1
            continue
        row.current += 1
        fibres.setdefault(key, set()).add(t.fibre)
        row.directions[t.direction] += 1
        row.over_limits += over_limits(t)
        row.verdicts.update(event_verdicts(t))
        for e in t.events:
            loss = event_loss_db(t, e)
            if loss is not None and _worse(row.worst_loss, loss):
                row.worst_loss = WorstEvent(t.fibre, t.direction, e.number, e.distance_m, loss)
            r = e.reflectance_db
            if r is not None and _worse(row.worst_reflectance, r):
                row.worst_reflectance = WorstEvent(t.fibre, t.direction, e.number, e.distance_m, r)
    for key, row in rows.items():
        row.fibres = sorted(fibres.get(key, ()))
    return [rows[k] for k in sorted(rows, key=lambda k: (k is None, k or 0.0))]


def link_traces(link: Link) -> list[WavelengthTraces]:
    """:func:`wavelength_traces` of a link's kept traces (empty when it has none)."""
    return wavelength_traces(link.traces)
