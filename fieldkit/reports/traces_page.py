"""A link's stored OTDR traces (schema 5) on their own page: each drawn by
:func:`fieldkit.traces.svg.draw_trace` from its kept points, its figures in a sentence and its
event table under it; the limits it was judged against go to the sources."""

from __future__ import annotations

from fieldkit.jobs.models import (
    Job,
    Link,
    TraceRecord,
)
from fieldkit.jobs.reports import (
    fmt_db,
    fmt_m,
    fmt_nm,
)
from fieldkit.jobs.trace_summary import TRACE_VERDICT, over_limits
from fieldkit.reports.common import (
    ReportContext,
    arrows,
    fmt_local,
)
from fieldkit.reports.document import (
    Block,
    Drawing,
    Paragraph,
    Section,
    Table,
)
from fieldkit.reports.parts import Used, running_header
from fieldkit.traces.lines import KIND_LABELS


def _trace_caption(t: TraceRecord, ctx: ReportContext) -> str:
    nm = f" at {fmt_nm(t.wavelength_nm)} nm" if t.wavelength_nm is not None else ""
    way = "both directions averaged" if t.direction == "A<->B" else arrows(t.direction)
    return f"Fibre {t.fibre}{nm}, {way}"


def _trace_blocks(link: Link, t: TraceRecord, ctx: ReportContext, used: Used) -> list[Block]:
    """One stored trace: its drawing, a sentence of its figures and its event table."""
    from fieldkit.traces.svg import draw_trace

    out: list[Block] = []
    caption = _trace_caption(t, ctx)
    if t.curves:
        curve = t.curves[0]  # a pair: A->B, with the events' distances from A
        try:
            drawing = draw_trace(
                curve.pairs(),
                [(e.number, e.distance_m, e.kind) for e in t.events],
                length_m=t.length_m,
            )
        except (ValueError, IndexError):
            drawing = ""
        if drawing:
            out.append(Drawing(drawing, caption))
    facts = []
    if t.length_m is not None:
        facts.append(f"length {fmt_m(t.length_m)} m")
    if t.total_loss_db is not None:
        facts.append(f"end-to-end loss {fmt_db(t.total_loss_db)} dB")
    if t.orl_db is not None:
        facts.append(
            f"optical return loss {fmt_db(t.orl_db)} dB "
            f"({TRACE_VERDICT.get(t.orl_verdict, t.orl_verdict)})"
        )
    if t.pulse_width_ns is not None:
        facts.append(f"pulse {t.pulse_width_ns:g} ns")
    if t.group_index is not None:
        facts.append(f"group index {t.group_index:.4f}")
    facts.append(f"event loss by the {t.loss_method} method")
    who = f"; by {t.by}" if t.by else ""
    out.append(
        Paragraph(
            (caption if not out else "Measured")
            + f" {fmt_local(t.at, ctx)}{who}: "
            + "; ".join(facts)
            + "."
        )
    )
    pair = t.direction == "A<->B"
    headers = ["No.", "At m", "Kind"]
    headers += ["A→B", "B→A", "Average"] if pair else ["Loss"]
    headers += ["Reflect.", "Cumul.", "Limit", "Result", "Why"]
    n = len(headers)
    table = Table(
        headers,
        numeric={0, 1, *range(3, n - 2)},
        caption=f"{caption}: events (losses, reflectance and limits in dB)",
    )
    for e in t.events:
        losses = (
            [fmt_db(e.loss_ab_db), fmt_db(e.loss_ba_db), fmt_db(e.average_db)]
            if pair
            else [fmt_db(e.loss_db)]
        )
        why = "; ".join(x for x in (e.verdict_reason, e.note) if x)
        table.add(
            [
                str(e.number),
                fmt_m(e.distance_m),
                KIND_LABELS.get(e.kind, e.kind),
                *losses,
                fmt_db(e.reflectance_db),
                fmt_db(e.cumulative_db),
                fmt_db(e.limit_db),
                TRACE_VERDICT.get(e.verdict, e.verdict),
                why,
            ],
            "fail" if e.verdict == "fail" else "doubt" if e.verdict == "in doubt" else "",
        )
    if table.rows:
        out.append(table)
    # "limits at 1310 nm from defaults:" heads the lines under it; each line is one source
    head = "OTDR limits"
    for line in t.limits.splitlines():
        line = line.strip()
        if line.endswith(":"):
            head = "OTDR " + line.rstrip(":")
        elif line:
            used.source(line, f"{link.label}: {head}")
    return out


def trace_section(job: Job, link: Link, ctx: ReportContext, used: Used) -> Section | None:
    current = sorted(
        (t for t in link.traces if t.current),
        key=lambda t: (t.wavelength_nm or 0.0, t.fibre, t.direction),
    )
    if not current:
        return None
    sec = Section(
        f"Link {link.label}: OTDR traces",
        page_break=True,
        running_header=running_header(job, ctx),
        css_class="link traces",
    )
    fails = sum(over_limits(t) for t in current)
    sec.para(
        f"{len(current)} {'trace' if len(current) == 1 else 'traces'} kept on this link"
        + (f"; {fails} with an event over its limit" if fails else "; no event over its limit")
        + ". Distances from end A (a one-way B→A trace: from end B). Limits and their sources "
        "in Appendix B."
    )
    used.traces = True
    for t in current:
        sec.blocks.extend(_trace_blocks(link, t, ctx, used))
    return sec
