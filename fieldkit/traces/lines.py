"""Text lines for traces: the CLI prints them and the Traces workspace shows the same ones.

Width-aware: at 60 columns or more an event is one row of a table; narrower, the columns that
matter most (number, distance, kind, loss) stay and the rest go to a second line.
"""

from __future__ import annotations

from fieldkit import safety
from fieldkit.text.layout import wrap
from fieldkit.text.numbers import minus
from fieldkit.traces.analysis import TraceEvent, TraceResult
from fieldkit.traces.folder import FolderResult
from fieldkit.traces.model import InstrumentEvent
from fieldkit.traces.pairing import PairedEvent, PairResult
from fieldkit.traces.verdicts import Limits

# Negative numbers shown to people take the typographic minus: the one policy of
# fieldkit/text/numbers.py (README, "The command line"); --json and the CSV keep plain ASCII.


#: ``text`` with each minus sign before a digit written as U+2212 (``-48.0`` -> ``−48.0``),
#: hyphens in words and ranges left alone: the one rule of :func:`fieldkit.text.numbers.minus`.
signed = minus


#: What a table calls each event kind (``kind`` in --json stays the key): a non-reflective loss
#: is a splice or a bend, a trace alone cannot tell which.
KIND_LABELS = {
    "splice": "splice/bend",
    "reflective": "reflect",
    "gainer": "gainer",
    "end": "end",
}


def fmt(value: float | None, digits: int = 2, unit: str = "") -> str:
    """A number for a table: ``-`` for none, fixed digits, the unit after a space."""
    if value is None:
        return "-"
    text = f"{value:.{digits}f}"
    if text.startswith("-") and float(text) == 0.0:
        text = text[1:]
    return signed(f"{text} {unit}".rstrip())


def distance(value_m: float) -> str:
    """A distance as the trade reads it: metres to 0.1 m."""
    return f"{value_m:.1f} m"


def event_cells(e: TraceEvent) -> tuple[str, ...]:
    """An analysed event as table cells: number, distance, kind, loss, reflectance, cumulative
    loss, verdict (the HTML page's table and the workspace's wide one)."""
    losses = (fmt(e.loss_db, 2), fmt(e.reflectance_db, 1), fmt(e.cumulative_loss_db, 2))
    return (str(e.number), distance(e.distance_m), KIND_LABELS[e.kind], *losses, e.verdict)


def paired_cells(e: PairedEvent) -> tuple[str, ...]:
    """A paired event as table cells: number, distance from A, kind, loss A→B, B→A, average,
    verdict."""
    losses = (fmt(e.loss_ab_db, 2), fmt(e.loss_ba_db, 2), fmt(e.average_db, 2))
    return (str(e.number), distance(e.distance_m), KIND_LABELS[e.kind], *losses, e.verdict)


def instrument_cells(e: InstrumentEvent) -> tuple[str, ...]:
    """An event as the instrument recorded it, as table cells: number, distance, kind, loss,
    reflectance, the instrument's code."""
    losses = (fmt(e.loss_db, 2), fmt(e.reflectance_db, 1))
    return (str(e.number), distance(e.distance_m), e.kind, *losses, e.code)


def summary_lines(r: TraceResult) -> list[str]:
    t, a = r.trace, r.analysis
    wl = f"{t.wavelength_nm:g} nm" if t.wavelength_nm else "wavelength ?"
    pulse = t.pulse_width_ns or r.settings.pulse_width_ns
    head = f"{t.source}: {wl}, pulse {fmt(pulse, 0, 'ns') if pulse else '?'}, "
    head += f"index {r.group_index:.4f}, spacing {t.spacing_m:.3g} m, {t.points} points"
    length = distance(a.length_m) if a.length_m is not None else "no end found"
    lines = [head]
    lines.append(
        f"length {length}, total loss {fmt(a.total_loss_db, 2, 'dB')}, ORL {fmt(a.orl_db, 1, 'dB')}"
        f", noise floor {fmt(a.noise_floor_db, 1, 'dB')}"
    )
    lines.append(
        f"loss by the {r.settings.loss_method} method; backscatter {r.backscatter_db:g} dB "
        f"for 1 ns ({r.backscatter_source})"
    )
    lines.extend(f"note: {n}" for n in r.notes)
    return lines


def event_lines(r: TraceResult, width: int = 80) -> list[str]:
    """fieldkit's event table of one trace."""
    if width >= 60:
        lines = [
            f"{'#':>2} {'distance':>10} {'kind':<11} {'loss dB':>7} {'refl dB':>7} "
            f"{'cum dB':>6}  verdict"
        ]
        for e in r.events:
            lines.append(
                f"{e.number:>2} {distance(e.distance_m):>10} {KIND_LABELS[e.kind]:<11} "
                f"{fmt(e.loss_db, 2):>7} {fmt(e.reflectance_db, 1):>7} "
                f"{fmt(e.cumulative_loss_db, 2):>6}  {e.verdict}"
            )
        return lines
    lines = [f"{'#':>2} {'distance':>10} {'kind':<11} {'loss':>6}"]
    for e in r.events:
        lines.append(
            f"{e.number:>2} {distance(e.distance_m):>10} {KIND_LABELS[e.kind]:<11} "
            f"{fmt(e.loss_db, 2):>6}"
        )
        extra = f"   refl {fmt(e.reflectance_db, 1)} cum {fmt(e.cumulative_loss_db, 2)} {e.verdict}"
        lines.append(extra[:width])
    return lines


def section_lines(r: TraceResult) -> list[str]:
    return [
        f"section {s.number}: {distance(s.from_m)} to {distance(s.to_m)}, "
        f"{s.attenuation_db_per_km:.3f} dB/km, {s.loss_db:.2f} dB, {s.verdict}"
        for s in r.sections
    ]


def instrument_lines(r: TraceResult) -> list[str]:
    """The instrument's own event table, labelled as such (never mixed with ours)."""
    ev = r.trace.instrument_events
    if not ev:
        return []
    lines = ["instrument's own events (as recorded in the file):"]
    for e in ev:
        lines.append(
            f"  {e.number:>2} {distance(e.distance_m):>10} {e.kind:<10} loss {fmt(e.loss_db, 2)} "
            f"refl {fmt(e.reflectance_db, 1)} code {e.code}"
        )
    return lines


def trace_lines(r: TraceResult, width: int = 80) -> list[str]:
    return [
        *summary_lines(r),
        "",
        *event_lines(r, width),
        "",
        *section_lines(r),
        *orl_lines(r),
        "",
        *limits_lines(r.limits),
        *([""] + instrument_lines(r) if r.trace.instrument_events else []),
    ]


def orl_lines(r: TraceResult) -> list[str]:
    """The ORL verdict, where a minimum was given."""
    verdict, reason = r.orl_verdict
    if r.limits.orl_min_db is None:
        return []
    return [f"ORL: {verdict} ({reason})"]


def pair_lines(p: PairResult, width: int = 80) -> list[str]:
    lines = [
        f"A→B {p.a_to_b.trace.source}, B→A {p.b_to_a.trace.source}",
        f"length {distance(p.length_m)} (A→B {distance(p.length_ab_m)}, B→A "
        f"{distance(p.length_ba_m)}), total loss {fmt(p.total_loss_db, 2, 'dB')} averaged, "
        f"match within {p.tolerance_m:g} m",
        "",
    ]
    if width >= 60:
        lines.append(
            f"{'#':>2} {'from A':>10} {'kind':<11} {'A→B':>7} {'B→A':>7} {'avg dB':>7}  verdict"
        )
        for e in p.events:
            lines.append(
                f"{e.number:>2} {distance(e.distance_m):>10} {KIND_LABELS[e.kind]:<11} "
                f"{fmt(e.loss_ab_db, 2):>7} {fmt(e.loss_ba_db, 2):>7} {fmt(e.average_db, 2):>7}  "
                f"{e.verdict}"
            )
            if e.note:
                lines.append(f"   {e.note}")
    else:
        lines.append(f"{'#':>2} {'from A':>10} {'kind':<11} {'avg dB':>7}")
        for e in p.events:
            lines.append(
                f"{e.number:>2} {distance(e.distance_m):>10} {KIND_LABELS[e.kind]:<11} "
                f"{fmt(e.average_db, 2):>7}"
            )
            lines.append(
                f"   A→B {fmt(e.loss_ab_db, 2)} B→A {fmt(e.loss_ba_db, 2)} {e.verdict}"[:width]
            )
    lines.extend(f"note: {n}" for n in p.notes)
    lines.extend(["", *limits_lines(p.limits)])
    return lines


def folder_lines(result: FolderResult, width: int = 80) -> list[str]:
    """One row per fibre and wavelength: directions, events, worst event, total, verdict."""
    lines = [f"{result.files} files, {len(result.rows)} fibres/wavelengths"]
    if width >= 60:
        lines.append(
            f"{'fibre':<6} {'nm':>5} {'dirs':<7} {'ev':>3} {'worst at':>10} {'dB':>6} "
            f"{'total':>6}  verdict"
        )
    for row in result.rows:
        worst = row.worst()
        wl = f"{row.wavelength_nm:g}" if row.wavelength_nm else "?"
        at = distance(worst[0]) if worst else "-"
        if width >= 60:
            lines.append(
                f"{row.fibre[:6]:<6} {wl:>5} {row.directions:<7} {row.event_count:>3} {at:>10} "
                f"{fmt(worst[1] if worst else None, 2):>6} {fmt(row.total_loss_db, 2):>6}  "
                f"{row.verdict}"
            )
        else:
            lines.append(f"{row.fibre[:6]:<6} {wl:>5} {row.directions:<7} {row.verdict}")
            lines.append(f"   worst {at} {fmt(worst[1] if worst else None, 2)} dB"[:width])
        for problem in row.problems:
            lines.append(f"   {problem}"[: max(width, 20)])
    for _name, problem in result.unread:
        lines.append(f"unread: {problem}")
    seen: set[float | None] = set()
    for row in result.rows:
        one = row.a_to_b or row.b_to_a
        if one is None or row.wavelength_nm in seen:
            continue
        seen.add(row.wavelength_nm)
        lines.extend(["", *limits_lines(one.limits, row.wavelength_nm)])
    return lines


def limits_lines(limits: Limits, wavelength_nm: float | None = None) -> list[str]:
    """Which limits the verdicts used and where each came from (one line per limit)."""
    at = f" at {wavelength_nm:g} nm" if wavelength_nm else ""

    def value(v: float | None, unit: str, digits: int = 2) -> str:
        return "none" if v is None else signed(f"{v:.{digits}f} {unit}")

    return [
        f"limits{at} from {origin_words(limits.origin)}:",
        f"  splice max {value(limits.splice_max_db, 'dB')} (any non-reflective loss: a splice "
        f"or a bend): {limits.splice_source}",
        f"  connector max {value(limits.connector_max_db, 'dB')}: {limits.connector_source}",
        f"  reflectance max {value(limits.reflectance_limit_db, 'dB', 1)}: "
        f"{limits.reflectance_source}",
        f"  attenuation max {value(limits.attenuation_here_db_per_km, 'dB/km')}: "
        f"{limits.attenuation_source}",
        *(
            [f"  ORL min {value(limits.orl_min_db, 'dB', 1)}: {limits.orl_source}"]
            if limits.orl_min_db is not None
            else []
        ),
    ]


def origin_words(origin: str) -> str:
    """Where a limit set came from, in words: the shipped defaults said as such."""
    return "the shipped defaults" if not by_link(origin) else origin


def by_link(origin: str) -> bool:
    """True when the limits came from a job's link (not the shipped defaults)."""
    return origin not in ("defaults", "the shipped presets")


def fibre_of(limits: Limits) -> str:
    """The fibre the attenuation maximum is of (``G.652.D``), from its source."""
    return limits.attenuation_source.split(" preset")[0].split(" cabled")[0].removeprefix("ITU-T ")


def limits_summary(limits: Limits) -> str:
    """The limits in one short line, for a status line:
    ``limits (link 'L1' of job 'Mill'): splice 0.30 dB, connector 0.75 dB, ...``; the shipped
    defaults are said to be those, with the fibre whose attenuation they take."""

    def value(v: float | None, digits: int = 2) -> str:
        return "-" if v is None else signed(f"{v:.{digits}f}")

    origin = limits.origin if by_link(limits.origin) else f"shipped defaults, {fibre_of(limits)}"
    return (
        f"limits ({origin}): splice {value(limits.splice_max_db)} dB, connector "
        f"{value(limits.connector_max_db)} dB, reflectance "
        f"{value(limits.reflectance_limit_db, 1)} dB, "
        f"{value(limits.attenuation_here_db_per_km)} dB/km"
        + (f", ORL {value(limits.orl_min_db, 1)} dB" if limits.orl_min_db is not None else "")
    )


def defaults_notice(limits: Limits, wide: bool = True) -> str:
    """Said under the table while no job's link judges: the limits are the shipped defaults,
    and choosing a link (Ctrl+S) judges by its presets; "" when a link's presets judge."""
    if by_link(limits.origin):
        return ""
    if wide:
        return f"Shipped default limits ({fibre_of(limits)}); ^S: judge by a job link's presets"
    return f"Shipped {fibre_of(limits)} limits; ^S picks a link."


def otdr_caution(width: int, wide: bool = True) -> str:
    """The OTDR caution for a two-line space ``width`` columns wide: the medium wording where a
    wide screen fits it whole in two lines, else the short one (the full one is the tooltip)."""
    fits = wide and len(wrap(safety.OTDR_LIVE_FIBRE_MEDIUM, width, 0)) <= 2
    return safety.OTDR_LIVE_FIBRE_MEDIUM if fits else safety.OTDR_LIVE_FIBRE_SHORT
