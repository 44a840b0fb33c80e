"""One trace analysed: fieldkit's event table beside the instrument's, with verdicts.

:class:`TraceEvent` is the event other parts of fieldkit read (the fault hand-off, the splice
log, reports). Kinds: ``splice`` (non-reflective loss: a fusion splice, a bend), ``reflective``
(connector, mechanical splice, crack), ``gainer`` (a non-reflective step up: see
:mod:`fieldkit.traces.pairing`), ``end`` (end of fibre).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any

from fieldkit.calc import otdr
from fieldkit.traces.model import Trace, TraceFileError
from fieldkit.traces.verdicts import Limits, event_verdict, orl_verdict, section_verdict

#: Group index assumed when neither the file nor the user gives one, said in the results: the
#: G.652.D (and OS2) value at 1550 nm of the preset library, presets/fibres.toml (typical, from
#: memory), so a traces hand-off and the Fault workspace's preset agree (the traces layer
#: reads no presets: tests/unit/test_group_index_one_value.py checks the two are equal).
DEFAULT_GROUP_INDEX = 1.4677


@dataclass(frozen=True, slots=True)
class Settings:
    """How to analyse: thresholds, loss method, and what to assume where the file is silent."""

    thresholds: otdr.Thresholds = field(default_factory=otdr.Thresholds)
    loss_method: otdr.LossMethod = "two-line"
    backscatter_db: float | None = None  # overrides the file's and the typical value
    group_index: float | None = None  # used when the file has none
    pulse_width_ns: float | None = None  # used when the file has none
    limits: Limits = field(default_factory=Limits)


@dataclass(frozen=True, slots=True)
class TraceEvent:
    """One event of fieldkit's own analysis (distance from the trace's start)."""

    number: int
    distance_m: float
    kind: str  # splice | reflective | gainer | end
    loss_db: float | None  # by ``loss_method``; None at the end
    loss_method: str  # "two-line" or "five-point"
    loss_two_line_db: float | None
    loss_five_point_db: float | None
    reflectance_db: float | None  # None where not reflective
    cumulative_loss_db: float
    dead_zone_m: float
    saturated: bool
    verdict: str  # pass | fail | no limit | in doubt
    verdict_reason: str


@dataclass(frozen=True, slots=True)
class SectionResult:
    number: int
    from_m: float
    to_m: float
    attenuation_db_per_km: float
    loss_db: float
    verdict: str
    verdict_reason: str


@dataclass(frozen=True)
class TraceResult:
    """A trace and everything found in it."""

    trace: Trace
    analysis: otdr.Analysis
    events: tuple[TraceEvent, ...]
    sections: tuple[SectionResult, ...]
    settings: Settings
    backscatter_db: float
    backscatter_source: str  # "file", "typed" or "typical"
    group_index: float
    resolution_m: float  # one pulse in the distance scale
    notes: tuple[str, ...]

    def loss_at(self, distance_m: float) -> float | None:
        """Two-line loss at a distance where no event was found (see calc.otdr.loss_at)."""
        return otdr.loss_at(
            self.trace.level_db,
            self.analysis,
            distance_m,
            resolution_m=self.resolution_m,
            start_m=self.trace.start_m,
        )

    @property
    def length_m(self) -> float | None:
        return self.analysis.length_m

    @property
    def limits(self) -> Limits:
        """The limits the verdicts used, at this trace's wavelength."""
        return self.settings.limits.for_wavelength(self.trace.wavelength_nm)

    @property
    def orl_verdict(self) -> tuple[str, str]:
        """The whole trace's optical return loss against the limits' minimum."""
        return orl_verdict(self.analysis.orl_db, self.limits)

    @property
    def end_event(self) -> TraceEvent | None:
        return self.events[-1] if self.events and self.events[-1].kind == "end" else None

    def to_json(self) -> dict[str, Any]:
        t, a = self.trace, self.analysis
        th = a.thresholds
        return {
            "file": t.source,
            "format": t.file_format,
            "wavelength_nm": t.wavelength_nm,
            "pulse_width_ns": t.pulse_width_ns or self.settings.pulse_width_ns,
            "group_index": self.group_index,
            "sample_spacing_m": t.spacing_m,
            "points": t.points,
            "fibre_id": t.fibre_id,
            "cable_id": t.cable_id,
            "origin": t.origin,
            "destination": t.destination,
            "length_m": a.length_m,
            "total_loss_db": a.total_loss_db,
            "orl_db": a.orl_db,
            "orl_verdict": self.orl_verdict[0],
            "noise_floor_db": a.noise_floor_db,
            "front_dead_zone_m": a.front_dead_zone_m,
            "backscatter_db": self.backscatter_db,
            "backscatter_source": self.backscatter_source,
            "loss_method": self.settings.loss_method,
            "thresholds": {
                "splice_loss_db": th.splice_loss_db,
                "reflectance_db": th.reflectance_db,
                "end_of_fibre_db": th.end_of_fibre_db,
                "dead_zone_db": th.dead_zone_db,
            },
            "events": [
                {
                    "number": e.number,
                    "distance_m": e.distance_m,
                    "kind": e.kind,
                    "loss_db": e.loss_db,
                    "loss_method": e.loss_method,
                    "loss_two_line_db": e.loss_two_line_db,
                    "loss_five_point_db": e.loss_five_point_db,
                    "reflectance_db": e.reflectance_db,
                    "cumulative_loss_db": e.cumulative_loss_db,
                    "dead_zone_m": e.dead_zone_m,
                    "saturated": e.saturated,
                    "verdict": e.verdict,
                    "verdict_reason": e.verdict_reason,
                }
                for e in self.events
            ],
            "sections": [
                {
                    "number": s.number,
                    "from_m": s.from_m,
                    "to_m": s.to_m,
                    "attenuation_db_per_km": s.attenuation_db_per_km,
                    "loss_db": s.loss_db,
                    "verdict": s.verdict,
                }
                for s in self.sections
            ],
            "instrument_events": [
                {
                    "number": e.number,
                    "distance_m": e.distance_m,
                    "kind": e.kind,
                    "loss_db": e.loss_db,
                    "reflectance_db": e.reflectance_db,
                    "code": e.code,
                }
                for e in t.instrument_events
            ],
            "limits": self.limits.to_json(),
            "notes": list(self.notes),
        }


def analyse_trace(trace: Trace, settings: Settings | None = None) -> TraceResult:
    """Analyse ``trace`` (method: :mod:`fieldkit.calc.otdr`) and judge its events.

    Raises
    ------
    TraceFileError
        A trace too short or holding values that are not numbers.
    """
    s = settings or Settings()
    notes = list(trace.notes)
    n_g = trace.group_index or s.group_index
    if n_g is None:
        n_g = DEFAULT_GROUP_INDEX
        notes.append(f"group index not given: {n_g:g} assumed")
    pulse = trace.pulse_width_ns or s.pulse_width_ns
    if s.backscatter_db is not None:
        bsc, bsc_source = s.backscatter_db, "typed"
    elif trace.backscatter_db is not None:
        bsc, bsc_source = trace.backscatter_db, "file"
    else:
        bsc = otdr.backscatter_coefficient_db(trace.wavelength_nm or 1550.0)
        bsc_source = "typical"
        if trace.wavelength_nm is None:
            notes.append("wavelength not given: the 1550 nm backscatter coefficient assumed")
    if pulse:
        resolution = otdr.one_way_resolution_m(pulse, n_g)
    else:
        resolution = 2.0 * trace.spacing_m
        notes.append("pulse width not given: no reflectance; events placed for a short pulse")
    try:
        a = otdr.analyse(
            trace.level_db,
            trace.spacing_m,
            resolution_m=resolution,
            thresholds=s.thresholds,
            pulse_width_ns=pulse,
            backscatter_db=bsc,
            group_index=n_g,
            start_m=trace.start_m,
        )
    except ValueError as exc:
        raise TraceFileError(f"{trace.source}: {exc}") from None
    if not a.end_found:
        notes.append(
            f"no end of fibre found (no loss of {s.thresholds.end_of_fibre_db:g} dB or more): "
            "the fibre may be longer than the trace"
        )
    events, sections = _judged(trace, a, s)
    return TraceResult(
        trace=trace,
        analysis=a,
        events=events,
        sections=sections,
        settings=s,
        backscatter_db=bsc,
        backscatter_source=bsc_source,
        group_index=n_g,
        resolution_m=resolution,
        notes=tuple(notes),
    )


def _judged(
    trace: Trace, a: otdr.Analysis, s: Settings
) -> tuple[tuple[TraceEvent, ...], tuple[SectionResult, ...]]:
    """Events and sections of an analysis with their verdicts against ``s.limits``."""
    limits = s.limits.for_wavelength(trace.wavelength_nm)
    events = []
    for k, e in enumerate(a.events, start=1):
        loss = e.loss_db(s.loss_method)
        refl = (
            e.reflectance_db
            if e.reflectance_db is None or math.isfinite(e.reflectance_db)
            else None
        )
        verdict, reason = event_verdict(e.kind, loss, refl, limits, bidirectional=False)
        events.append(
            TraceEvent(
                number=k,
                distance_m=e.distance_m,
                kind=e.kind,
                loss_db=loss,
                loss_method=s.loss_method,
                loss_two_line_db=e.loss_two_line_db,
                loss_five_point_db=e.loss_five_point_db,
                reflectance_db=refl,
                cumulative_loss_db=e.cumulative_loss_db,
                dead_zone_m=e.dead_zone_m,
                saturated=e.saturated,
                verdict=verdict,
                verdict_reason=reason,
            )
        )
    sections = []
    for k, sec in enumerate(a.sections, start=1):
        verdict, reason = section_verdict(sec.attenuation_db_per_km, sec.length_m, limits)
        sections.append(
            SectionResult(
                k, sec.from_m, sec.to_m, sec.attenuation_db_per_km, sec.loss_db, verdict, reason
            )
        )
    return tuple(events), tuple(sections)


def rejudge(result: TraceResult, limits: Limits) -> TraceResult:
    """The same analysis judged against other limits (no signal work is repeated)."""
    settings = replace(result.settings, limits=limits)
    events, sections = _judged(result.trace, result.analysis, settings)
    return replace(result, settings=settings, events=events, sections=sections)
