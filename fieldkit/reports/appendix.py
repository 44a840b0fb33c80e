"""The appendix of a report: what makes every number traceable (ids, references with their
labels, every result with who and when, superseded results and traces, the budget breakdown,
the splice log, faults, notes) and the sources the body leaves out."""

from __future__ import annotations

from fieldkit.jobs.counting import (
    Count,
    current_results,
    result_count,
)
from fieldkit.jobs.models import (
    FLAG_REFERENCE_IN_DOUBT,
    Job,
    Link,
)
from fieldkit.jobs.reports import (
    closure_rows,
    fmt_db,
    fmt_m,
    fmt_nm,
    margin_db,
    result_in_doubt,
    verdict,
)
from fieldkit.jobs.splices import (
    closure_summary,
    fibre_words,
    tray_map,
    verdict_words,
)
from fieldkit.reports.common import (
    ReferenceLabels,
    ReportContext,
    arrows,
    fmt_local,
)
from fieldkit.reports.document import (
    Facts,
    Paragraph,
    Section,
    Table,
)
from fieldkit.reports.parts import VERDICT_WORD, Used, flag_words, running_header


def _results_table(link: Link, labels: ReferenceLabels, ctx: ReportContext, used: Used) -> Table:
    table = Table(
        [
            "Fibre",
            "λ nm",
            "Dir",
            "Loss dB",
            "Limit dB",
            "Margin dB",
            "Result",
            "Flags",
            "Ref",
            "By",
            "When",
        ],
        numeric={0, 1, 3, 4, 5},
        nowrap={2, 10},
        caption=f"{link.label}: every current result, with who and when",
    )
    for r in current_results(link):
        count = result_count(link, r)
        used.counts.add(count)
        flags = list(r.flags)
        if result_in_doubt(link, r) and FLAG_REFERENCE_IN_DOUBT not in flags:
            flags.append(FLAG_REFERENCE_IN_DOUBT)
        used.flags.update(flags)
        table.add(
            [
                str(r.fibre),
                fmt_nm(r.wavelength_nm),
                arrows(r.direction),
                fmt_db(r.loss_db),
                fmt_db(r.limit_db),
                fmt_db(margin_db(r)),
                VERDICT_WORD[count].lower() if count is not Count.FAIL else "FAIL",
                ", ".join(flag_words(f) for f in flags),
                labels(r.reference_id),
                r.by,
                fmt_local(r.at, ctx),
            ],
            "fail"
            if count is Count.FAIL
            else "doubt"
            if count in (Count.IN_DOUBT, Count.REFERENCE_PROBLEM)
            else "",
        )
    return table


# -- the appendix -------------------------------------------------------------------------------
def appendix_sections(
    job: Job, ctx: ReportContext, labels: ReferenceLabels, used: Used
) -> list[Section]:
    sec = Section(
        "Appendix A: traceability",
        page_break=True,
        running_header=running_header(job, ctx),
        css_class="appendix",
    )
    ids = [("Job id", job.id)] + [(f"Link {link.label}", link.id) for link in job.links]
    sec.blocks.append(Facts(ids))
    refs = Table(
        [
            "Ref",
            "Link",
            "Kind",
            "λ nm",
            "Level dBm",
            "Method",
            "Drift dB",
            "Cords",
            "Source",
            "Meter",
            "By",
            "When",
            "In doubt since",
            "Id",
        ],
        numeric={3, 4, 6},
        # the link's label and the id whole; the times break between date and time, so the
        # table keeps to the page
        nowrap={1, 13},
        caption="References",
    )
    for link in job.links:
        for ref in link.references:
            refs.add(
                [
                    labels(ref.id),
                    link.label,
                    ref.kind,
                    fmt_nm(ref.wavelength_nm),
                    fmt_db(ref.level_dbm),
                    ref.method,
                    fmt_db(ref.drift_db),
                    ", ".join(ref.cords),
                    ref.source_id,
                    ref.meter_id,
                    ref.by,
                    fmt_local(ref.at, ctx),
                    fmt_local(ref.in_doubt_since, ctx),
                    ref.id,
                ],
                "doubt" if ref.in_doubt_since else "",
            )
    refs.rows.sort(key=lambda row: int(row[0][1:]) if row[0][1:].isdigit() else 0)
    if refs.rows:
        refs.marks = ["doubt" if row[12] else "" for row in refs.rows]
        sec.blocks.append(refs)
    for link in job.links:
        if link.results:
            sec.blocks.append(_results_table(link, labels, ctx, used))
    old = Table(
        [
            "Link",
            "Fibre",
            "λ nm",
            "Dir",
            "Loss dB",
            "Limit dB",
            "Result",
            "Ref",
            "By",
            "When",
            "Superseded",
        ],
        numeric={1, 2, 4, 5},
        nowrap={3, 9, 10},
        caption="Superseded results (a retest or a clearing replaced them; they do not count)",
    )
    for link in job.links:
        for r in sorted(link.results, key=lambda r: (r.wavelength_nm, r.fibre, r.direction, r.at)):
            if r.current:
                continue
            why = "retested" if r.superseded_by else "cleared"
            if r.superseded_note:
                why += f" ({r.superseded_note})"
            old.add(
                [
                    link.label,
                    str(r.fibre),
                    fmt_nm(r.wavelength_nm),
                    arrows(r.direction),
                    fmt_db(r.loss_db),
                    fmt_db(r.limit_db),
                    verdict(r),
                    labels(r.reference_id),
                    r.by,
                    fmt_local(r.at, ctx),
                    f"{fmt_local(r.superseded_at, ctx)}, {why}",
                ],
                "old",
            )
    if old.rows:
        sec.blocks.append(old)
    for link in job.links:
        b = link.budget
        if b is not None:
            items = Table(
                ["λ nm", "Item", "Loss dB"],
                numeric={0, 2},
                caption=f"{link.label}: budget breakdown",
            )
            for row in b.wavelengths:
                for item in row.items:
                    items.add([fmt_nm(row.wavelength_nm), item.name, fmt_db(item.loss_db)])
                typical = (
                    f" (typical {fmt_db(row.typical_loss_db)} dB)"
                    if row.typical_loss_db is not None
                    else ""
                )
                items.add(
                    [fmt_nm(row.wavelength_nm), "Maximum loss" + typical, fmt_db(row.loss_db)]
                )
            sec.blocks.append(items)
            if link.earlier_budgets:
                sec.para(
                    f"{link.label}: {len(link.earlier_budgets)} earlier budget(s) replaced "
                    "by this one.",
                    "small",
                )
        sec.blocks.extend(_closure_blocks(link, ctx))
        if link.faults:
            faults = Table(
                [
                    "Fibre m",
                    "Sheath m",
                    "Route m",
                    "Search from m",
                    "Search to m",
                    "Landmark",
                    "Offset m",
                    "Marking",
                    "By",
                    "When",
                    "Notes",
                ],
                numeric={0, 1, 2, 3, 4, 6},
                nowrap={9},
                caption=f"{link.label}: located faults",
            )
            for f in link.faults:
                faults.add(
                    [
                        fmt_m(f.fibre_distance_m),
                        fmt_m(f.sheath_distance_m),
                        fmt_m(f.route_distance_m),
                        fmt_m(f.low_m),
                        fmt_m(f.high_m),
                        f.nearest_landmark or "",
                        fmt_m(f.offset_from_landmark_m),
                        f.marking or "",
                        f.by,
                        fmt_local(f.at, ctx),
                        f.notes,
                    ]
                )
            sec.blocks.append(faults)
    old_traces = Table(
        ["Link", "Fibre", "λ nm", "Direction", "Measured", "By", "Superseded", "Files", "Id"],
        numeric={1, 2},
        nowrap={3, 4, 6},
        caption="Superseded OTDR traces (a later save of the same fibre replaced them)",
    )
    for link in job.links:
        for t in link.traces:
            if not t.current:
                old_traces.add(
                    [
                        link.label,
                        str(t.fibre),
                        fmt_nm(t.wavelength_nm) if t.wavelength_nm is not None else "",
                        arrows(t.direction),
                        fmt_local(t.at, ctx),
                        t.by,
                        fmt_local(t.superseded_at, ctx),
                        ", ".join(t.sources),
                        t.id,
                    ],
                    "old",
                )
    if old_traces.rows:
        sec.blocks.append(old_traces)
    if job.notes:
        notes = Table(["When", "By", "Note"], nowrap={0}, caption="Notes")
        for note in job.notes:
            notes.add([fmt_local(note.at, ctx), note.by, note.text])
        sec.blocks.append(notes)
    sec.para(
        f"Job created {fmt_local(job.created_at, ctx)}"
        + (f" by {job.created_by}" if job.created_by else "")
        + f"; last saved {fmt_local(job.updated_at, ctx)} (revision {job.revision}).",
        "small",
    )

    src = Section("Appendix B: sources", level=2, css_class="appendix")
    used.source(
        "IEC 61280-4-1 / IEC 61280-4-2: loss = reference level − reading, by the reference "
        "method named with each reference",
        "results",
    )
    table = Table(
        ["Source", "Used for"], caption="Sources of the limits and figures", css_class="sources"
    )
    for text, places in used.sources.items():
        table.add([text, "; ".join(places)])
    src.blocks.append(table)
    src.para(
        'A source marked "(from memory)" was recalled, not read from the standard: check it '
        "against the published text before relying on it.",
        "small",
    )
    return [sec, src]


def _closure_blocks(link: Link, ctx: ReportContext) -> list[Paragraph | Table]:
    out: list[Paragraph | Table] = []
    for closure in link.closures:
        where = []
        if closure.route_distance_m is not None:
            where.append(f"route {fmt_m(closure.route_distance_m)} m")
        if closure.landmark:
            where.append(closure.landmark)
        head = f"{link.label}, closure {closure.name}" + (f" ({'; '.join(where)})" if where else "")
        out.append(Paragraph(head + ": " + closure_summary(closure, link.splice_limits) + "."))
        for cable in closure.cables:
            count = (
                f"{cable.fibre_count} fibres" if cable.fibre_count else "fibre count not recorded"
            )
            tube = f", {cable.per_tube} a tube" if cable.per_tube else ""
            kind = f", {cable.fibre_type}" if cable.fibre_type else ""
            out.append(
                Paragraph(
                    f"Cable {cable.name}: {count}{tube}{kind}, colour code "
                    f"{cable.colour_sequence} (TIA-598 words).",
                    "small",
                )
            )
        trays = tray_map(closure)
        if trays:
            out.append(Paragraph("Tray map: " + "; ".join(trays) + ".", "small"))
        if closure.plan_source:
            out.append(Paragraph(f"Splice plan: {closure.plan_source}.", "small"))
        if closure.notes:
            out.append(Paragraph(f"Notes: {closure.notes}", "small"))
        table = Table(
            [
                "Fibre A",
                "Fibre B",
                "Tray/slot",
                "Method",
                "Estimate dB",
                "A→B dB",
                "B→A dB",
                "Average dB",
                "Result",
                "Notes",
                "By",
                "When",
            ],
            numeric={4, 5, 6, 7},
            nowrap={2, 11},
            caption=f"Closure {closure.name}: splice log (failures first)",
        )
        for sp, j, old in closure_rows(link, closure):
            notes = "; ".join(j.warnings_without_mismatch()) if not old else ""
            if sp.notes:
                notes = f"{sp.notes}; {notes}" if notes else sp.notes
            place = "/".join(str(n) if n is not None else "-" for n in (sp.tray, sp.slot))
            table.add(
                [
                    f"{sp.cable_a} "
                    + fibre_words(closure.cable(sp.cable_a), sp.fibre_a, short=True),
                    f"{sp.cable_b} "
                    + fibre_words(closure.cable(sp.cable_b), sp.fibre_b, short=True),
                    place if (sp.tray or sp.slot) else "",
                    sp.method,
                    fmt_db(sp.estimate_db),
                    fmt_db(sp.loss_ab_db),
                    fmt_db(sp.loss_ba_db),
                    fmt_db(j.average_db),
                    "superseded (re-spliced)" if old else verdict_words(j),
                    notes,
                    sp.by,
                    fmt_local(sp.at, ctx),
                ],
                "old" if old else "fail" if j.verdict == "fail" else "",
            )
        if table.rows:
            out.append(table)
    return out
