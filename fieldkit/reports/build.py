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
    fibre_outcomes,
    link_tallies,
    open_items,
    result_count,
)
from fieldkit.jobs.models import (
    FLAG_NEGATIVE_LOSS,
    FLAG_REFERENCE_IN_DOUBT,
    Job,
    Link,
    LossResult,
    TraceRecord,
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
    current_limit,
    fibre_words,
    tray_map,
    verdict_words,
)
from fieldkit.reports.checks import application_text, transceiver_text
from fieldkit.reports.common import (
    ReferenceLabels,
    ReportContext,
    fmt_local,
    job_times,
    local_day,
    test_dates,
    zone_words,
)
from fieldkit.reports.document import (
    Block,
    Chart,
    ChartPoint,
    Document,
    Drawing,
    Facts,
    Legend,
    Paragraph,
    Section,
    Signature,
    Table,
    Verdict,
)
from fieldkit.settings import EQUIPMENT_WORDS, Equipment

#: Verdict words, worst first (the job's order: a link not tested ranks above "no limit").
VERDICT_WORD = {
    Count.FAIL: "FAIL",
    Count.REFERENCE_PROBLEM: "REFERENCE PROBLEM",
    Count.IN_DOUBT: "IN DOUBT",
    Count.NO_LIMIT: "NO LIMIT",
    Count.PASS: "PASS",
}
NOT_TESTED = "NOT TESTED"
#: Open items listed on the summary page; the rest are counted.
MAX_OPEN_ITEMS = 12

#: What each verdict means, for the legend.
VERDICT_MEANING = {
    Count.PASS: "the loss is within its limit, against a trusted reference",
    Count.FAIL: "the loss is over its limit: repair and retest",
    Count.REFERENCE_PROBLEM: "a negative loss (more light than at the reference): the "
    "reference was wrong; clean, re-reference and retest",
    Count.IN_DOUBT: "taken against a reference whose re-check drifted beyond the tolerance: "
    "retest against a fresh reference",
    Count.NO_LIMIT: "no limit to judge against (no budget or limit was set)",
}
#: Flags a result may carry, in words, and what each means.
FLAG_WORDS = {
    FLAG_NEGATIVE_LOSS: ("negative loss", "the reading was above the reference level"),
    FLAG_REFERENCE_IN_DOUBT: (
        "reference in doubt",
        "the reference's re-check drifted beyond the tolerance before this reading",
    ),
}

SIGN_STATEMENT = (
    "The customer accepts the links as tested and reported above, subject to the open items "
    "listed on the summary page."
)


def _flag_words(flag: str) -> str:
    return FLAG_WORDS.get(flag, (flag.replace("-", " "), ""))[0]


class _Used:
    """What the report shows, so the legend lists every mark and flag used and only those."""

    def __init__(self) -> None:
        self.counts: set[Count] = set()
        self.flags: set[str] = set()
        self.superseded = False
        self.not_tested = False
        self.no_margin = False
        self.calibration_late = False
        self.unlisted_equipment = False
        self.traces = False
        self.sources: dict[str, list[str]] = {}

    def source(self, text: str, where: str) -> None:
        text = text.strip()
        if text:
            places = self.sources.setdefault(text, [])
            if where not in places:
                places.append(where)


def link_verdict(link: Link) -> tuple[Count | None, Tally]:
    """The worst count of the link's fibres (None: no results), and its tally."""
    tally = Tally()
    for row in link_tallies(link).values():
        tally.merge(row)
    present = {o.count for o in fibre_outcomes(link)}
    for count in PRECEDENCE:
        if count in present:
            return count, tally
    return None, tally


#: The job's order of verdicts: None (a link not tested) between "in doubt" and "no limit".
JOB_ORDER: tuple[Count | None, ...] = (
    Count.FAIL,
    Count.REFERENCE_PROBLEM,
    Count.IN_DOUBT,
    None,
    Count.NO_LIMIT,
    Count.PASS,
)


def job_verdict(job: Job) -> tuple[Count | None, Tally, int]:
    """The worst of the links' verdicts, the job's tally, and how many links have no results.

    A job without links or results is "not tested" (None)."""
    tally = Tally()
    verdicts = []
    for link in job.links:
        v, t = link_verdict(link)
        verdicts.append(v)
        tally.merge(t)
    untested = sum(v is None for v in verdicts)
    if not verdicts:
        return None, tally, 0
    for count in JOB_ORDER:
        if count in verdicts:
            return count, tally, untested
    return None, tally, untested


def verdict_word(count: Count | None) -> str:
    return NOT_TESTED if count is None else VERDICT_WORD[count]


def _tally_reasons(tally: Tally) -> list[str]:
    """``1 fibre test fails``, ``5 in doubt`` ... (fibre tests: a fibre at a wavelength)."""

    def n(count: int, one: str, many: str) -> str:
        return f"{count} {one if count == 1 else many}"

    out = []
    if tally.tested:
        out.append(
            n(tally.tested, "fibre test counted", "fibre tests counted")
            + " (a fibre at a wavelength)"
        )
    if tally.failed:
        out.append(n(tally.failed, "fails its limit", "fail their limits"))
    if tally.reference_problems:
        out.append(n(tally.reference_problems, "reference problem", "reference problems"))
    if tally.in_doubt:
        out.append(n(tally.in_doubt, "in doubt", "in doubt"))
    if tally.no_limit:
        out.append(n(tally.no_limit, "without a limit", "without a limit"))
    if tally.passed:
        out.append(n(tally.passed, "passes", "pass"))
    return out


# -- the summary page ---------------------------------------------------------------------------
def _running_header(job: Job, ctx: ReportContext) -> str:
    parts = [ctx.contractor, job.name, job.customer, job.site]
    return " · ".join(p for p in parts if p)


def _equipment_table(
    kit: tuple[Equipment, ...], named: dict[str, str], first_test: date | None, used: _Used
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


def _summary_section(job: Job, ctx: ReportContext, used: _Used) -> Section:
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
    reasons = _tally_reasons(tally)
    if untested:
        reasons.append(f"{untested} {'link has' if untested == 1 else 'links have'} no results")
    sec.blocks.append(Verdict("Job verdict", verdict_word(count), count, reasons))
    if count is None:
        used.not_tested = True

    table = Table(
        [
            "Link",
            "Verdict",
            "λ nm",
            "Fibres",
            "Pass",
            "Fail",
            "Ref. problem",
            "In doubt",
            "No limit",
        ],
        numeric={2, 3, 4, 5, 6, 7, 8},
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
            table.add([link.label, NOT_TESTED, "", "0", "", "", "", "", ""], "doubt")
        for i, (nm, row) in enumerate(rows):
            used.counts.update(
                c
                for c, n in (
                    (Count.PASS, row.passed),
                    (Count.FAIL, row.failed),
                    (Count.REFERENCE_PROBLEM, row.reference_problems),
                    (Count.IN_DOUBT, row.in_doubt),
                    (Count.NO_LIMIT, row.no_limit),
                )
                if n
            )
            table.add(
                [
                    link.label if i == 0 else "",
                    verdict_word(v) if i == 0 else "",
                    fmt_nm(nm),
                    str(row.tested),
                    str(row.passed),
                    str(row.failed),
                    str(row.reference_problems),
                    str(row.in_doubt),
                    str(row.no_limit),
                ],
                "fail" if row.failed else "doubt" if row.in_doubt or row.reference_problems else "",
            )
    if table.rows:
        sec.blocks.append(table)
    items = open_items(job)
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


def _safety_lines(job: Job) -> list[str]:
    """Short cautions for a test report: what can hurt whoever works on these links next."""
    lines = [safety.INVISIBLE_LIGHT_SHORT + " or connector; check for light with a power meter."]
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


def _results_table(link: Link, labels: ReferenceLabels, ctx: ReportContext, used: _Used) -> Table:
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
                r.direction,
                fmt_db(r.loss_db),
                fmt_db(r.limit_db),
                fmt_db(margin_db(r)),
                VERDICT_WORD[count].lower() if count is not Count.FAIL else "FAIL",
                ", ".join(_flag_words(f) for f in flags),
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


def _count_word(count: Count) -> str:
    return "FAIL" if count is Count.FAIL else VERDICT_WORD[count].lower()


def _results_matrix(link: Link, labels: ReferenceLabels, used: _Used) -> Table:
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
        cells = [str(fibre), direction]
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
            extra = [_flag_words(f) for f in flags if f not in FLAG_WORDS]
            word = ", ".join([_count_word(count), *extra])
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


def _budget_blocks(link: Link, ctx: ReportContext, used: _Used) -> list[Paragraph | Table]:
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


def _checks_table(link: Link, used: _Used) -> Table:
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
    job: Job, link: Link, ctx: ReportContext, labels: ReferenceLabels, used: _Used
) -> Section:
    sec = Section(
        f"Link {link.label}",
        page_break=True,
        running_header=_running_header(job, ctx),
        css_class="link",
    )
    sec.blocks.append(Paragraph(_link_line(link)))
    count, tally = link_verdict(link)
    if count is None:
        used.not_tested = True
    sec.blocks.append(
        Verdict(f"Link {link.label}", verdict_word(count), count, _tally_reasons(tally))
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


TRACE_VERDICT = {"pass": "pass", "fail": "FAIL", "no limit": "no limit", "in doubt": "in doubt"}


def _trace_caption(t: TraceRecord, ctx: ReportContext) -> str:
    nm = f" at {fmt_nm(t.wavelength_nm)} nm" if t.wavelength_nm is not None else ""
    way = "both directions averaged" if t.direction == "A<->B" else t.direction
    return f"Fibre {t.fibre}{nm}, {way}"


def _trace_blocks(link: Link, t: TraceRecord, ctx: ReportContext, used: _Used) -> list[Block]:
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
                e.kind,
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


def _trace_section(job: Job, link: Link, ctx: ReportContext, used: _Used) -> Section | None:
    current = sorted(
        (t for t in link.traces if t.current),
        key=lambda t: (t.wavelength_nm or 0.0, t.fibre, t.direction),
    )
    if not current:
        return None
    sec = Section(
        f"Link {link.label}: OTDR traces",
        page_break=True,
        running_header=_running_header(job, ctx),
        css_class="link traces",
    )
    fails = sum(any(e.verdict == "fail" for e in t.events) for t in current)
    sec.para(
        f"{len(current)} {'trace' if len(current) == 1 else 'traces'} kept on this link"
        + (f"; {fails} with an event over its limit" if fails else "; no event over its limit")
        + ". Distances from end A (a one-way B->A trace: from end B). Limits and their sources "
        "in Appendix B."
    )
    used.traces = True
    for t in current:
        sec.blocks.extend(_trace_blocks(link, t, ctx, used))
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


# -- the appendix -------------------------------------------------------------------------------
def _appendix(job: Job, ctx: ReportContext, labels: ReferenceLabels, used: _Used) -> list[Section]:
    sec = Section(
        "Appendix A: traceability",
        page_break=True,
        running_header=_running_header(job, ctx),
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
        nowrap={11, 12},
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
                    r.direction,
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
                        t.direction,
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


def _legend(used: _Used) -> Legend:
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
        ("A->B, B->A", "direction of the measurement, from end A to end B of the link or back")
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
                "fibre's end); A<->B: both directions averaged",
            )
        )
    entries.append(
        (
            "chart",
            "dashed line: the limit; one marker per fibre and direction (A->B left, B->A "
            "right); marker shapes as above",
        )
    )
    return Legend(entries)


def build_document(job: Job, ctx: ReportContext | None = None) -> Document:
    """The customer report of ``job`` as a :class:`Document`."""
    ctx = ctx or ReportContext()
    used = _Used()
    labels = ReferenceLabels(job)
    summary = _summary_section(job, ctx, used)
    links: list[Section] = []
    for link in job.links:
        links.append(_link_section(job, link, ctx, labels, used))
        traces = _trace_section(job, link, ctx, used)
        if traces is not None:
            links.append(traces)
    appendix = _appendix(job, ctx, labels, used)
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
