"""What the customer report of a job says, page by page.

1. The summary page: the letterhead (contractor and crew from the settings), the job's
   customer, site and test dates, the job's verdict, a table of links with their verdicts, the
   open items, the test equipment with its calibration dates, the legend, the short safety
   lines and the signature block.
2. One page per link: a running header, the link's verdict, a chart of loss per fibre against
   the limit per wavelength, the current results (references as R1, R2 ...), the budget and its
   checks in sentences and tables, the splices and faults in short, the equipment used and a
   signature block.
3. The appendix: traceability (ids of the job, links and references, superseded results, the
   budget breakdown, the splice log, the located faults, the notes) and the sources (standards,
   presets and "(from memory)" remarks), so the body stays free of them.

Verdicts come from the one counting rule (:mod:`fieldkit.jobs.counting`): a link's verdict is
the worst count of its fibres (fail, reference problem, in doubt, no limit, pass); a job's the
worst of its links', with "not tested" for a link without results ranked above "no limit".
"""

from __future__ import annotations

from datetime import date

from fieldkit import safety
from fieldkit.jobs.counting import (
    PRECEDENCE,
    Count,
    Tally,
    current_results,
    link_tallies,
    open_items,
    result_count,
)
from fieldkit.jobs.models import (
    FLAG_REFERENCE_IN_DOUBT,
    Job,
    Link,
    LossResult,
)
from fieldkit.jobs.reports import (
    fmt_db,
    fmt_m,
    fmt_nm,
    margin_db,
    result_in_doubt,
)
from fieldkit.jobs.splices import (
    closure_summary,
    current_limit,
)
from fieldkit.reports.appendix import appendix_sections
from fieldkit.reports.checks import application_text, transceiver_text
from fieldkit.reports.common import (
    ReferenceLabels,
    ReportContext,
    arrows,
    fmt_local,
    job_times,
    local_day,
    test_dates,
    zone_words,
)
from fieldkit.reports.document import (
    Chart,
    ChartPoint,
    Document,
    Facts,
    Legend,
    Paragraph,
    Section,
    Signature,
    Table,
    Verdict,
)
from fieldkit.reports.parts import (
    FLAG_WORDS,
    JOB_ORDER,
    MAX_OPEN_ITEMS,
    NOT_TESTED,
    SIGN_STATEMENT,
    VERDICT_MEANING,
    VERDICT_WORD,
    Used,
    count_word,
    flag_words,
    job_verdict,
    link_verdict,
    running_header,
    tally_reasons,
    verdict_word,
)
from fieldkit.reports.traces_page import trace_section
from fieldkit.settings import EQUIPMENT_WORDS, Equipment

__all__ = ["JOB_ORDER", "build_document", "job_verdict", "link_verdict", "verdict_word"]


# -- the summary page ---------------------------------------------------------------------------
def _equipment_table(
    kit: tuple[Equipment, ...], named: dict[str, str], first_test: date | None, used: Used
) -> Table:
    """The test equipment: the settings' list, plus ids the references name that it lacks."""
    table = Table(
        ["Equipment", "Id", "Description", "Calibrated", "Due", "Remark"],
        nowrap={3, 4},
        caption="Test equipment",
    )
    listed = {e.id.casefold() for e in kit}
    for e in kit:
        remark = ""
        if e.due is not None and first_test is not None and e.due < first_test:
            remark = "calibration was due before the tests"
            used.calibration_late = True
        table.add(
            [
                EQUIPMENT_WORDS[e.kind],
                e.id,
                e.description,
                e.calibrated.isoformat(),
                e.due.isoformat() if e.due else "",
                remark,
            ],
            "doubt" if remark else "",
        )
    for ident, kind in named.items():
        if ident.casefold() not in listed:
            used.unlisted_equipment = True
            table.add(
                [kind, ident, "", "", "", "named by a reference; calibration not on record"],
                "doubt",
            )
    return table


def _named_equipment(links: list[Link]) -> dict[str, str]:
    """The meter and source ids the links' references name, in order."""
    named: dict[str, str] = {}
    for link in links:
        for ref in link.references:
            if ref.meter_id.strip():
                named.setdefault(ref.meter_id.strip(), "power meter")
            if ref.source_id.strip():
                named.setdefault(ref.source_id.strip(), "light source")
    return named


def _equipment_line(link: Link, kit: tuple[Equipment, ...]) -> str:
    """``Power meter PM-07 (calibrated 2026-01-10), light source LS-3 (...)`` for a link."""
    by_id = {e.id.casefold(): e for e in kit}
    named = _named_equipment([link])
    shown: list[str] = []
    for ident, kind in named.items():
        e = by_id.get(ident.casefold())
        when = f"calibrated {e.calibrated.isoformat()}" if e else "calibration not on record"
        first = min((r.at for r in link.results), default=None)
        if e and e.due is not None and first is not None and e.due < first.date():
            when += f", calibration was due {e.due.isoformat()}"
        shown.append(f"{kind} {ident} ({when})")
    if not named:
        shown = [
            f"{EQUIPMENT_WORDS[e.kind]} {e.id} (calibrated {e.calibrated.isoformat()})" for e in kit
        ]
    if not shown:
        return "Test equipment: none recorded (add it with 'fieldkit settings equipment-add')."
    return "Test equipment: " + ", ".join(shown) + "."


def _testers(links: list[Link]) -> str:
    names: dict[str, None] = {}
    for link in links:
        for r in link.results:
            if r.by.strip():
                names.setdefault(r.by.strip(), None)
    return ", ".join(names)


def _summary_section(job: Job, ctx: ReportContext, used: Used) -> Section:
    sec = Section("Summary", level=2, css_class="summary")
    crew = ", ".join(c for c in job.crew if c.strip())
    facts = [
        ("Customer", job.customer),
        ("Site", job.site),
        ("Job", job.name),
        ("Contractor", ctx.contractor),
        ("Crew", " — ".join(p for p in (ctx.crew, crew) if p)),
        ("Tested", test_dates(job, ctx) or "no results yet"),
        ("Job status", "done" if job.status == "done" else "open (work continues)"),
        ("Times", zone_words(job_times(job), ctx)),
    ]
    sec.blocks.append(Facts([(k, v) for k, v in facts if v]))
    count, tally, untested = job_verdict(job)
    reasons = tally_reasons(tally)
    if untested:
        reasons.append(f"{untested} {'link has' if untested == 1 else 'links have'} no results")
    sec.blocks.append(Verdict("Job verdict", verdict_word(count), count, reasons))
    if count is None:
        used.not_tested = True

    # One row per link with its verdict ("all" wavelengths), then one per wavelength with its
    # own verdict: a wavelength row is never taken for the link's total, nor the link's
    # verdict for one wavelength's.
    table = Table(
        [
            "Link",
            "λ nm",
            "Verdict",
            "Fibres",
            "Pass",
            "Fail",
            "Ref. problem",
            "In doubt",
            "No limit",
        ],
        numeric={3, 4, 5, 6, 7, 8},
        nowrap={0},
        caption="Links",
    )
    for link in job.links:
        v, t = link_verdict(link)
        if v is None:
            used.not_tested = True
        else:
            used.counts.add(v)
        rows = sorted(link_tallies(link).items())
        if not rows:
            table.add([link.label, "", NOT_TESTED, "0", "", "", "", "", ""], "doubt")
            continue
        table.add([link.label, "all", verdict_word(v), *_tally_cells(t)], _mark(t))
        for nm, row in rows:
            used.counts.update(c for c, n in _tally_counts(row) if n)
            table.add(
                [link.label, fmt_nm(nm), verdict_word(_tally_verdict(row)), *_tally_cells(row)],
                _mark(row),
            )
    if table.rows:
        sec.blocks.append(table)
    items = [arrows(item) for item in open_items(job)]
    items = [f"{link.label}: no results yet" for link in job.links if not link.results] + items
    if items:
        # a summary page, not a list of 144 fibres: the link pages name every one
        shown = items[:MAX_OPEN_ITEMS]
        more = len(items) - len(shown)
        text = "Open items: " + "; ".join(shown)
        if more:
            text += f"; and {more} more (each link's page names its fibres)"
        sec.blocks.append(Paragraph(text + "."))
    elif job.links:
        sec.blocks.append(Paragraph("Open items: none."))
    return sec


def _tally_counts(row: Tally) -> tuple[tuple[Count, int], ...]:
    return (
        (Count.PASS, row.passed),
        (Count.FAIL, row.failed),
        (Count.REFERENCE_PROBLEM, row.reference_problems),
        (Count.IN_DOUBT, row.in_doubt),
        (Count.NO_LIMIT, row.no_limit),
    )


def _tally_verdict(row: Tally) -> Count | None:
    """The worst count present in ``row`` (the order of the link's verdict), None if empty."""
    present = {c for c, n in _tally_counts(row) if n}
    return next((c for c in PRECEDENCE if c in present), None)


def _tally_cells(row: Tally) -> list[str]:
    return [str(row.tested), *(str(n) for _c, n in _tally_counts(row))]


def _mark(row: Tally) -> str:
    return "fail" if row.failed else "doubt" if row.in_doubt or row.reference_problems else ""


def _safety_lines(job: Job) -> list[str]:
    """Short cautions for a test report: what can hurt whoever works on these links next."""
    lines = [safety.INVISIBLE_LIGHT_REPORT]
    if any(link.closures for link in job.links):
        lines.append("Fibre offcuts are glass shards: safety glasses and a shard container.")
    if any(link.faults for link in job.links):
        lines.append(
            "Before digging at a located fault, follow the local utility-locate rules and "
            "confirm the position with a second measurement."
        )
    lines.append(safety.DEFER)
    return lines


# -- a link's page ----------------------------------------------------------------------------
def _charts(link: Link) -> list[Chart]:
    out = []
    by_nm: dict[float, list[ChartPoint]] = {}
    for r in current_results(link):
        by_nm.setdefault(round(r.wavelength_nm, 1), []).append(
            ChartPoint(r.fibre, r.direction, r.loss_db, r.limit_db, result_count(link, r))
        )
    for nm, points in sorted(by_nm.items()):
        out.append(Chart(link.label, nm, points, link.fibre_count))
    return out


def _results_matrix(link: Link, labels: ReferenceLabels, used: Used) -> Table:
    """The link's current results as one row per fibre and direction, the wavelengths side by
    side (loss, margin, result): a 12-fibre link at two wavelengths takes 12 rows, not 24.
    Who and when are in Appendix A."""
    results = current_results(link)
    wavelengths = sorted({round(r.wavelength_nm, 1) for r in results})
    limits: dict[float, set[float | None]] = {}
    for each in results:
        limits.setdefault(round(each.wavelength_nm, 1), set()).add(each.limit_db)
    headers = ["Fibre", "Dir"]
    numeric = {0}
    for nm in wavelengths:
        only = limits[nm]
        limit = next(iter(only)) if len(only) == 1 else None
        head = f"{fmt_nm(nm)} nm"
        at = len(headers)
        if limit is not None:
            headers += [f"{head} loss dB (limit {fmt_db(limit)})", "Margin dB", "Result"]
            numeric |= {at, at + 1}
        else:
            headers += [f"{head} loss dB", "Limit dB", "Margin dB", "Result"]
            numeric |= {at, at + 1, at + 2}
    headers.append("Ref")
    table = Table(headers, numeric=numeric, nowrap={1}, caption=f"{link.label}: results")
    rows: dict[tuple[int, str], dict[float, LossResult]] = {}
    for one in results:
        rows.setdefault((one.fibre, one.direction), {})[round(one.wavelength_nm, 1)] = one
    for (fibre, direction), by_nm in sorted(rows.items()):
        cells = [str(fibre), arrows(direction)]
        worst: list[Count] = []
        refs: list[str] = []
        for nm in wavelengths:
            r = by_nm.get(nm)
            uniform = len(limits[nm]) == 1 and next(iter(limits[nm])) is not None
            if r is None:
                cells += ["", "", "not tested"] if uniform else ["", "", "", "not tested"]
                continue
            count = result_count(link, r)
            used.counts.add(count)
            flags = list(r.flags)
            if result_in_doubt(link, r) and FLAG_REFERENCE_IN_DOUBT not in flags:
                flags.append(FLAG_REFERENCE_IN_DOUBT)
            used.flags.update(flags)
            # the verdict word already says a negative loss and a doubt; other flags follow it
            extra = [flag_words(f) for f in flags if f not in FLAG_WORDS]
            word = ", ".join([count_word(count), *extra])
            worst.append(count)
            label = labels(r.reference_id)
            if label and label not in refs:
                refs.append(label)
            if uniform:
                cells += [fmt_db(r.loss_db), fmt_db(margin_db(r)), word]
            else:
                cells += [fmt_db(r.loss_db), fmt_db(r.limit_db), fmt_db(margin_db(r)), word]
        cells.append(", ".join(refs))
        mark = ""
        if Count.FAIL in worst:
            mark = "fail"
        elif Count.IN_DOUBT in worst or Count.REFERENCE_PROBLEM in worst:
            mark = "doubt"
        table.add(cells, mark)
    return table


def _budget_blocks(link: Link, ctx: ReportContext, used: Used) -> list[Paragraph | Table]:
    b = link.budget
    if b is None:
        return []
    rows = ", ".join(
        f"{fmt_db(w.loss_db)} dB at {fmt_nm(w.wavelength_nm)} nm" for w in b.wavelengths
    )
    by = f" by {b.by}" if b.by else ""
    when = fmt_local(b.computed_at, ctx)
    text = f"Loss budget (computed {when}{by}): maximum loss {rows or 'not computed'}"
    text += f"; design margin {fmt_db(b.margin_db)} dB." if b.margin_db else "."
    out: list[Paragraph | Table] = [Paragraph(text)]
    for row in b.wavelengths:
        for item in row.items:
            used.source(item.source, f"{link.label}: budget, {item.name}")
    if b.application:
        check = application_text(b.application)
        out += check.blocks
        used.source(check.source, f"{link.label}: application check")
        if b.application.get("verdict") == "no-margin":
            used.no_margin = True
    if b.transceiver:
        check = transceiver_text(b.transceiver)
        out += check.blocks
        used.source(check.source, f"{link.label}: transceiver check")
    if b.checks:
        out.append(_checks_table(link, used))
    return out


#: What each check beyond loss compares, for the table's first column.
CHECK_WORDS = {
    "dispersion": "Chromatic dispersion against the receiver's tolerance",
    "dispersion spread": "Pulse spread from dispersion against a quarter bit",
    "modal bandwidth": "Length against the modal-bandwidth reach",
    "cut-off": "Wavelength against the fibre's cable cut-off",
}


def _figure(value: float | None, unit: str) -> str:
    if value is None:
        return ""
    return f"{value:.4g} {unit}".strip()


def _checks_table(link: Link, used: Used) -> Table:
    """The budget's checks beyond loss (schema 5): one row per check and wavelength."""
    b = link.budget
    table = Table(
        ["Check", "λ nm", "Value", "Limit", "Result", "What it says"],
        numeric={1, 2, 3},
        caption=f"{link.label}: checks beyond loss",
    )
    for c in b.checks if b is not None else []:
        word = "FAIL" if c.verdict == "fail" else c.verdict
        table.add(
            [
                CHECK_WORDS.get(c.kind, c.kind),
                fmt_nm(c.wavelength_nm),
                _figure(c.value, c.unit),
                _figure(c.limit, c.unit),
                word,
                c.detail,
            ],
            "fail" if c.verdict == "fail" else "doubt" if c.verdict == "warning" else "",
        )
        used.source(c.source, f"{link.label}: {c.kind} check")
    return table


def _link_section(
    job: Job, link: Link, ctx: ReportContext, labels: ReferenceLabels, used: Used
) -> Section:
    sec = Section(
        f"Link {link.label}",
        page_break=True,
        running_header=running_header(job, ctx),
        css_class="link",
    )
    sec.blocks.append(Paragraph(_link_line(link)))
    count, tally = link_verdict(link)
    if count is None:
        used.not_tested = True
    sec.blocks.append(
        Verdict(f"Link {link.label}", verdict_word(count), count, tally_reasons(tally))
    )
    charts = _charts(link)
    sec.blocks.extend(charts)
    if link.results:
        sec.blocks.append(_results_matrix(link, labels, used))
        if any(not r.current for r in link.results):
            used.superseded = True
            n = sum(not r.current for r in link.results)
            sec.para(
                f"{n} earlier {'result was' if n == 1 else 'results were'} superseded by a retest "
                "(listed in the appendix).",
                "small",
            )
    else:
        sec.para("No results recorded on this link yet.")
    sec.blocks.extend(_budget_blocks(link, ctx, used))
    for closure in link.closures:
        sec.para(
            "Splices: "
            + closure_summary(closure, link.splice_limits)
            + " (splice log in the appendix)."
        )
        for method in ("fusion", "mechanical"):
            limit = current_limit(link.splice_limits, method)
            if limit is not None:
                used.source(
                    (f"{limit.preset}: " if limit.preset else "") + limit.source,
                    f"{link.label}: {method} splice limit",
                )
    if link.closures:
        used.source(
            "ITU-T G.650.3 App. I: a splice is judged on the average of its two OTDR directions",
            f"{link.label}: splices",
        )
    for f in link.faults:
        where = f" near {f.nearest_landmark}" if f.nearest_landmark else ""
        sec.para(
            f"Fault located {fmt_m(f.route_distance_m)} m along the route{where} (search "
            f"{fmt_m(f.low_m)}–{fmt_m(f.high_m)} m; {fmt_m(f.fibre_distance_m)} m along the fibre)"
            + (f", marked: {f.marking}" if f.marking else "")
            + "."
        )
    sec.blocks.append(Paragraph(_equipment_line(link, ctx.equipment), "small"))
    days = sorted({local_day(r.at, ctx).isoformat() for r in link.results})
    sec.blocks.append(Signature(_testers([link]), ", ".join(days), SIGN_STATEMENT))
    return sec


def _link_line(link: Link) -> str:
    parts = []
    if link.end_a or link.end_b:
        parts.append(f"from {link.end_a or '?'} to {link.end_b or '?'}")
    if link.fibre_type:
        parts.append(f"fibre {link.fibre_type}")
    if link.length_m is not None:
        parts.append(f"length {fmt_m(link.length_m)} m")
    if link.fibre_count is not None:
        parts.append(f"{link.fibre_count} fibres")
    if link.cable_id:
        parts.append(f"cable {link.cable_id}")
    text = "; ".join(parts) or "no details recorded"
    return text[0].upper() + text[1:] + "."


def _legend(used: Used) -> Legend:
    entries: list[tuple[str, str]] = []
    for count in PRECEDENCE:
        entries.append(
            (
                VERDICT_WORD[count].lower() if count is not Count.FAIL else "FAIL",
                VERDICT_MEANING[count],
            )
        )
    if used.not_tested:
        entries.append((NOT_TESTED.lower(), "the link has no results yet"))
    for flag in sorted(used.flags):
        words, meaning = FLAG_WORDS.get(
            flag, (flag.replace("-", " "), "a flag recorded with the result")
        )
        entries.append((words, meaning))
    entries.append(
        (
            "R1, R2 …",
            "the references the results were measured against (details and ids in Appendix A)",
        )
    )
    entries.append(
        ("A→B, B→A", "direction of the measurement, from end A to end B of the link or back")
    )
    entries.append(("margin dB", "limit minus loss; negative when over the limit"))
    if used.superseded:
        entries.append(
            (
                "superseded",
                "an earlier result replaced by a retest; kept in Appendix A, not counted",
            )
        )
    if used.no_margin:
        entries.append(
            (
                "FITS, NO MARGIN",
                "within the application's limits, but not with the design margin on top",
            )
        )
    if used.calibration_late:
        entries.append(
            ("calibration was due", "the equipment's calibration was due before the first test")
        )
    if used.unlisted_equipment:
        entries.append(
            (
                "calibration not on record",
                "a reference names equipment the equipment list does not hold",
            )
        )
    if used.traces:
        entries.append(
            (
                "OTDR events",
                "splice (non-reflective), reflective (a connector or a break), gainer (a splice "
                "reading a gain one way: judge it on the average of both directions), end (the "
                "fibre's end); A↔B: both directions averaged",
            )
        )
    entries.append(
        (
            "chart",
            "dashed line: the limit; one marker per fibre and direction (A→B left, B→A "
            "right); marker shapes as above",
        )
    )
    return Legend(entries)


def build_document(job: Job, ctx: ReportContext | None = None) -> Document:
    """The customer report of ``job`` as a :class:`Document`."""
    ctx = ctx or ReportContext()
    used = Used()
    labels = ReferenceLabels(job)
    summary = _summary_section(job, ctx, used)
    links: list[Section] = []
    for link in job.links:
        links.append(_link_section(job, link, ctx, labels, used))
        traces = trace_section(job, link, ctx, used)
        if traces is not None:
            links.append(traces)
    appendix = appendix_sections(job, ctx, labels, used)
    first = min((r.at for link in job.links for r in link.results), default=None)
    summary.blocks.append(
        _equipment_table(
            ctx.equipment,
            _named_equipment(job.links),
            local_day(first, ctx) if first is not None else None,
            used,
        )
    )
    summary.blocks.append(_legend(used))
    for n, line in enumerate(_safety_lines(job)):
        summary.para(("Safety and disclaimer: " if n == 0 else "") + line, "small")
    summary.blocks.append(Signature(_testers(job.links), test_dates(job, ctx), SIGN_STATEMENT))
    subtitle = "Fibre test report" + (f" — {ctx.crew}" if ctx.crew else "")
    return Document(
        f"Fibre test report: {job.name}", ctx.contractor, subtitle, [summary, *links, *appendix]
    )
