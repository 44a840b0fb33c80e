"""Customer reports of a job: CSV, Markdown, self-contained HTML, and the JSON hand-off.

The Markdown and HTML reports are rendered from one :class:`Report` (sections of paragraphs and
tables), so both say the same thing: a summary per link and wavelength, failures first, the
results, references, budgets, splices, located faults, notes, and the safety lines.

Counting rule: :mod:`fieldkit.jobs.counting` (one rule for every face). A retest supersedes:
for each link, fibre, wavelength and direction the current result counts in the summary; every
result, superseded ones too (marked so), is still listed in the tables and the CSV.

Times in reports are UTC, written ``2026-03-14 09:30 UTC``, so a report reads the same on any
laptop.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Iterable
from dataclasses import dataclass, field
from datetime import UTC, datetime
from typing import Any

from fieldkit import safety
from fieldkit.jobs.counting import (
    Count,
    Tally,
    current_results,
    link_tallies,
    result_count,
)
from fieldkit.jobs.models import (
    FLAG_NEGATIVE_LOSS,
    SCHEMA_VERSION,
    Job,
    Link,
    LossResult,
    result_in_doubt,
)
from fieldkit.jobs.splices import (
    Closure,
    Judgement,
    Splice,
    SpliceCable,
    closure_summary,
    current_limit,
    fibre_words,
    judge_in,
    tray_map,
    verdict_words,
)
from fieldkit.text import escape

HANDOFF_FORMAT = "fieldkit-jobs-handoff"
HANDOFF_VERSION = 1


# -- numbers and times --------------------------------------------------------------------
def fmt_time(moment: datetime | None) -> str:
    if moment is None:
        return ""
    return moment.astimezone(UTC).strftime("%Y-%m-%d %H:%M UTC")


def fmt_db(value: float | None) -> str:
    """A level or loss to 0.01 dB (the resolution of a field power meter), or ''."""
    if value is None:
        return ""
    text = f"{value:.2f}"
    return "0.00" if text == "-0.00" else text


def fmt_nm(value: float) -> str:
    return f"{value:.0f}" if float(value).is_integer() else f"{value:g}"


def fmt_m(value: float | None) -> str:
    if value is None:
        return ""
    return f"{value:.1f}"


def margin_db(result: LossResult) -> float | None:
    """Limit minus loss; none for a result without a limit or with a negative loss (a bad
    reference says nothing about the fibre's margin)."""
    if result.limit_db is None or FLAG_NEGATIVE_LOSS in result.flags:
        return None
    return result.limit_db - result.loss_db


def verdict(result: LossResult) -> str:
    """What a result says: pass, FAIL, reference problem or no limit; ", superseded" when a
    retest (or clearing) replaced it."""
    # A negative loss is a reference problem, never a good fibre (and never "no limit").
    if FLAG_NEGATIVE_LOSS in result.flags:
        word = "reference problem"
    elif result.passed is None:
        word = "no limit"
    else:
        word = "pass" if result.passed else "FAIL"
    return word if result.current else f"{word}, superseded"


# -- what the reports count -----------------------------------------------------------------
def latest_results(link: Link) -> list[LossResult]:
    """The current result of each fibre, wavelength and direction (a retest supersedes)."""
    return current_results(link)


@dataclass(frozen=True, slots=True)
class WavelengthSummary:
    """The fibres of a link at one wavelength, counted by :mod:`fieldkit.jobs.counting`."""

    link_id: str
    link_label: str
    wavelength_nm: float
    tally: Tally

    @property
    def tested(self) -> int:
        return self.tally.tested

    @property
    def passed(self) -> int:
        return self.tally.passed

    @property
    def failed(self) -> int:
        return self.tally.failed

    @property
    def reference_problems(self) -> int:
        return self.tally.reference_problems

    @property
    def no_limit(self) -> int:
        return self.tally.no_limit

    @property
    def in_doubt(self) -> int:
        return self.tally.in_doubt

    def as_dict(self) -> dict[str, Any]:
        return {
            "link_id": self.link_id,
            "link": self.link_label,
            "wavelength_nm": self.wavelength_nm,
            **self.tally.as_dict(),
        }


def link_summary(link: Link) -> list[WavelengthSummary]:
    """Fibres tested and their counts (pass, fail, reference problem, no limit, in doubt), per
    wavelength."""
    return [
        WavelengthSummary(link.id, link.label, wavelength_nm, tally)
        for wavelength_nm, tally in sorted(link_tallies(link).items())
    ]


def job_summary(job: Job) -> list[WavelengthSummary]:
    return [row for link in job.links for row in link_summary(link)]


def _with(job: Job, count: Count) -> list[tuple[Link, LossResult]]:
    return [
        (link, r)
        for link in job.links
        for r in current_results(link)
        if result_count(link, r) is count
    ]


def failures(job: Job) -> list[tuple[Link, LossResult]]:
    """Current results that fail their limit (against a reference not in doubt), link by link."""
    return _with(job, Count.FAIL)


def reference_problems(job: Job) -> list[tuple[Link, LossResult]]:
    """Current results with a negative loss: the reference was wrong."""
    return _with(job, Count.REFERENCE_PROBLEM)


def in_doubt(job: Job) -> list[tuple[Link, LossResult]]:
    """Current results taken against a reference that is in doubt."""
    return _with(job, Count.IN_DOUBT)


def safety_lines(job: Job) -> list[str]:
    """The cautions that belong in this job's report."""
    lines = [safety.INVISIBLE_LIGHT]
    if any(link.closures for link in job.links):
        lines.extend(line for line in safety.SPLICING if line not in lines)
    if any(link.faults for link in job.links):
        lines.append(safety.DIGGING)
    lines.append(safety.DEFER)
    return lines


# -- the report as data ----------------------------------------------------------------------
@dataclass
class Table:
    headers: list[str]
    rows: list[list[str]]
    #: Per row: "fail", "doubt" or "" (the HTML marks those rows; the text says it too).
    marks: list[str] = field(default_factory=list)
    numeric: set[int] = field(default_factory=set)
    #: Columns kept on one line (directions such as "A->B").
    nowrap: set[int] = field(default_factory=set)


@dataclass
class Section:
    title: str
    level: int = 2
    paragraphs: list[str] = field(default_factory=list)
    tables: list[Table] = field(default_factory=list)


@dataclass
class Report:
    title: str
    facts: list[tuple[str, str]]
    sections: list[Section]


def _result_rows(link: Link, results: Iterable[LossResult]) -> Table:
    table = Table(
        [
            "Fibre",
            "λ nm",
            "Dir",
            "Reading dBm",
            "Loss dB",
            "Limit dB",
            "Margin dB",
            "Result",
            "Flags",
            "Method",
            "Ref",
            "By",
            "When",
        ],
        [],
        numeric={0, 1, 3, 4, 5, 6},
        nowrap={2},
    )
    for r in results:
        margin = margin_db(r)
        doubt = result_in_doubt(link, r)
        flags = list(r.flags)
        if doubt and "reference-in-doubt" not in flags:
            flags.append("reference-in-doubt")
        table.rows.append(
            [
                str(r.fibre),
                fmt_nm(r.wavelength_nm),
                r.direction,
                fmt_db(r.reading_dbm),
                fmt_db(r.loss_db),
                fmt_db(r.limit_db),
                fmt_db(margin),
                verdict(r),
                ", ".join(flags),
                r.method,
                r.reference_id or "",
                r.by,
                fmt_time(r.at),
            ]
        )
        table.marks.append(
            "" if not r.current else "fail" if r.passed is False else "doubt" if doubt else ""
        )
    return table


def build_report(job: Job) -> Report:
    """The content of the Markdown and HTML reports of a job."""
    facts = [
        ("Job", job.name),
        ("Job id", job.id),
        ("Customer", job.customer),
        ("Site", job.site),
        ("Crew", ", ".join(job.crew)),
        ("Status", job.status),
        ("Created", fmt_time(job.created_at)),
        ("Updated", fmt_time(job.updated_at)),
    ]
    sections: list[Section] = []

    summary = Table(
        [
            "Link",
            "λ nm",
            "Fibres tested",
            "Passed",
            "Failed",
            "Reference problem",
            "No limit",
            "In doubt",
        ],
        [],
        numeric={1, 2, 3, 4, 5, 6, 7},
    )
    for row in job_summary(job):
        summary.rows.append(
            [
                row.link_label,
                fmt_nm(row.wavelength_nm),
                str(row.tested),
                str(row.passed),
                str(row.failed),
                str(row.reference_problems),
                str(row.no_limit),
                str(row.in_doubt),
            ]
        )
        summary.marks.append(
            "fail" if row.failed else "doubt" if row.in_doubt or row.reference_problems else ""
        )
    sec = Section("Summary", tables=[summary] if summary.rows else [])
    total = sum(len(link.results) for link in job.links)
    superseded = sum(not r.current for link in job.links for r in link.results)
    sec.paragraphs.append(
        f"{len(job.links)} links, {total} results recorded"
        + (f" ({superseded} superseded by a retest)" if superseded else "")
        + ". Counts are per fibre, from the current result in each direction (a retest "
        "supersedes an earlier result); a fibre counts once, under the worst of: failed, "
        "reference problem, in doubt, no limit, passed."
    )
    sections.append(sec)

    failed = failures(job)
    sec = Section("Failures")
    if failed:
        table = Table(
            ["Link", "Fibre", "λ nm", "Direction", "Loss dB", "Limit dB", "Margin dB", "Flags"],
            [],
            numeric={1, 2, 4, 5, 6},
            nowrap={3},
        )
        for link, r in failed:
            margin = margin_db(r)
            table.rows.append(
                [
                    link.label,
                    str(r.fibre),
                    fmt_nm(r.wavelength_nm),
                    r.direction,
                    fmt_db(r.loss_db),
                    fmt_db(r.limit_db),
                    fmt_db(margin),
                    ", ".join(r.flags),
                ]
            )
            table.marks.append("fail")
        sec.tables.append(table)
    else:
        sec.paragraphs.append("No result fails its limit.")
    sections.append(sec)

    problems = reference_problems(job)
    if problems:
        sec = Section("Reference problems")
        sec.paragraphs.append(
            f"{len(problems)} {'result reads' if len(problems) == 1 else 'results read'} a "
            "negative loss: the reference was wrong. Clean and inspect the cords, set the "
            "reference again and retest."
        )
        table = Table(
            ["Link", "Fibre", "λ nm", "Direction", "Loss dB", "Reference"],
            [],
            numeric={1, 2, 4},
            nowrap={3},
        )
        for link, r in problems:
            table.rows.append(
                [
                    link.label,
                    str(r.fibre),
                    fmt_nm(r.wavelength_nm),
                    r.direction,
                    fmt_db(r.loss_db),
                    r.reference_id or "",
                ]
            )
            table.marks.append("doubt")
        sec.tables.append(table)
        sections.append(sec)

    doubt = in_doubt(job)
    if doubt:
        sec = Section("Results against a reference in doubt")
        sec.paragraphs.append(
            f"{len(doubt)} results were taken against a reference whose re-check drifted "
            "beyond the tolerance: retest them against a fresh reference."
        )
        table = Table(
            ["Link", "Fibre", "λ nm", "Direction", "Loss dB", "Reference"],
            [],
            numeric={1, 2, 4},
            nowrap={3},
        )
        for link, r in doubt:
            table.rows.append(
                [
                    link.label,
                    str(r.fibre),
                    fmt_nm(r.wavelength_nm),
                    r.direction,
                    fmt_db(r.loss_db),
                    r.reference_id or "",
                ]
            )
            table.marks.append("doubt")
        sec.tables.append(table)
        sections.append(sec)

    for link in job.links:
        sections.extend(_link_sections(link))

    sec = Section("Notes")
    if job.notes:
        table = Table(["When", "By", "Note"], [])
        for note in job.notes:
            table.rows.append([fmt_time(note.at), note.by, note.text])
        sec.tables.append(table)
    else:
        sec.paragraphs.append("No notes.")
    sections.append(sec)

    sections.append(Section("Safety and disclaimer", paragraphs=safety_lines(job)))
    return Report(f"Job report: {job.name}", facts, sections)


def _link_sections(link: Link) -> list[Section]:
    out = [Section(f"Link {link.label}", paragraphs=[_link_line(link)])]
    if link.budget is not None:
        b = link.budget
        sec = Section(f"{link.label}: loss budget", level=3)
        sec.paragraphs.append(
            f"Computed {fmt_time(b.computed_at)}"
            + (f" by {b.by}" if b.by else "")
            + f"; design margin {fmt_db(b.margin_db)} dB."
        )
        table = Table(
            ["λ nm", "Maximum loss dB", "Typical loss dB", "With margin dB"],
            [],
            numeric={0, 1, 2, 3},
        )
        items = Table(["λ nm", "Item", "Loss dB", "Source"], [], numeric={0, 2})
        for row in b.wavelengths:
            table.rows.append(
                [
                    fmt_nm(row.wavelength_nm),
                    fmt_db(row.loss_db),
                    fmt_db(row.typical_loss_db),
                    fmt_db(row.loss_db + b.margin_db),
                ]
            )
            for item in row.items:
                items.rows.append(
                    [fmt_nm(row.wavelength_nm), item.name, fmt_db(item.loss_db), item.source]
                )
        sec.tables.append(table)
        if items.rows:
            sec.tables.append(items)
        for what, data in (("Application", b.application), ("Transceiver", b.transceiver)):
            if data:
                sec.paragraphs.append(f"{what}: " + _check_text(data))
        out.append(sec)
    if link.results:
        sec = Section(f"{link.label}: results", level=3)
        ordered = sorted(link.results, key=lambda r: (r.wavelength_nm, r.fibre, r.direction, r.at))
        sec.tables.append(_result_rows(link, ordered))
        out.append(sec)
    if link.references:
        sec = Section(f"{link.label}: references", level=3)
        table = Table(
            [
                "Ref",
                "Kind",
                "λ nm",
                "Level dBm",
                "Method",
                "Drift dB",
                "Cords",
                "Launch",
                "Source",
                "Meter",
                "By",
                "When",
                "In doubt since",
            ],
            [],
            numeric={2, 3, 5},
        )
        for ref in link.references:
            table.rows.append(
                [
                    ref.id,
                    ref.kind,
                    fmt_nm(ref.wavelength_nm),
                    fmt_db(ref.level_dbm),
                    ref.method,
                    fmt_db(ref.drift_db),
                    ", ".join(ref.cords),
                    ref.launch_condition or "",
                    ref.source_id,
                    ref.meter_id,
                    ref.by,
                    fmt_time(ref.at),
                    fmt_time(ref.in_doubt_since),
                ]
            )
            table.marks.append("doubt" if ref.in_doubt_since else "")
        sec.tables.append(table)
        out.append(sec)
    out.extend(_closure_sections(link))
    if link.faults:
        sec = Section(f"{link.label}: located faults", level=3)
        table = Table(
            [
                "Fibre distance m",
                "Sheath distance m",
                "Route distance m",
                "Search from m",
                "Search to m",
                "Nearest landmark",
                "Offset m",
                "Marking",
                "By",
                "When",
                "Notes",
            ],
            [],
            numeric={0, 1, 2, 3, 4, 6},
        )
        for f in link.faults:
            table.rows.append(
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
                    fmt_time(f.at),
                    f.notes,
                ]
            )
        sec.tables.append(table)
        out.append(sec)
    return out


# -- splice log: one closure record per closure (fieldkit.jobs.splices) -------------------------
_SPLICE_HEADERS = [
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
]


def closure_rows(link: Link, closure: Closure) -> list[tuple[Splice, Judgement, bool]]:
    """Every splice of a closure with its judgement and whether a re-splice superseded it:
    failures first, then the rest in fibre order, superseded splices last."""
    current = closure.current_splices()
    rows = [(s, judge_in(closure, s, link.splice_limits), False) for s in current]
    rows.sort(key=lambda row: (row[1].verdict != "fail", row[0].cable_a.casefold(), row[0].fibre_a))
    old = sorted(closure.superseded(), key=lambda s: (s.fibre_a, s.at))
    rows += [(s, judge_in(closure, s, link.splice_limits), True) for s in old]
    return rows


def _closure_sections(link: Link) -> list[Section]:
    out = []
    for closure in link.closures:
        sec = Section(f"{link.label}: closure {closure.name}", level=3)
        where = []
        if closure.route_distance_m is not None:
            where.append(f"route {fmt_m(closure.route_distance_m)} m")
        if closure.landmark:
            where.append(closure.landmark)
        sec.paragraphs.append(closure_summary(closure, link.splice_limits) + ".")
        if where:
            sec.paragraphs.append("Where: " + "; ".join(where) + ".")
        for cable in closure.cables:
            sec.paragraphs.append(_cable_line(cable))
        for method in ("fusion", "mechanical"):
            limit = current_limit(link.splice_limits, method)
            if limit is not None and any(s.method == method for s in closure.splices):
                sec.paragraphs.append(
                    f"{method.capitalize()} splices judged on the bidirectional OTDR average "
                    f"(ITU-T G.650.3 App. I) against {fmt_db(limit.loss_max_db)} dB"
                    + (f" ({limit.preset}: {limit.source})" if limit.preset else "")
                    + "."
                )
        if closure.plan_source:
            sec.paragraphs.append(f"Splice plan: {closure.plan_source}.")
        trays = tray_map(closure)
        if trays:
            sec.paragraphs.append("Tray map: " + "; ".join(trays) + ".")
        sec.paragraphs.append("Colours read tube/fibre (TIA-598 words; the number comes first).")
        if closure.notes:
            sec.paragraphs.append(f"Notes: {closure.notes}")
        table = Table(list(_SPLICE_HEADERS), [], numeric={4, 5, 6, 7}, nowrap={2})
        rows = closure_rows(link, closure)
        for mismatch in dict.fromkeys(j.mismatch for _, j, _ in rows if j.mismatch):
            sec.paragraphs.append(f"Fibre types differ: {mismatch}.")
        for sp, j, old in rows:
            table.rows.append(_splice_cells(closure, sp, j, old))
            table.marks.append("fail" if j.verdict == "fail" and not old else "")
        if table.rows:
            sec.tables.append(table)
        out.append(sec)
    return out


def _cable_line(cable: SpliceCable) -> str:
    count = f"{cable.fibre_count} fibres" if cable.fibre_count else "fibre count not recorded"
    tube = f", {cable.per_tube} a tube" if cable.per_tube else ""
    kind = f", {cable.fibre_type}" if cable.fibre_type else ""
    return f"Cable {cable.name}: {count}{tube}{kind}, colour code {cable.colour_sequence}."


def _splice_cells(closure: Closure, sp: Splice, j: Judgement, old: bool) -> list[str]:
    result = "superseded (re-spliced)" if old else verdict_words(j)
    notes = "; ".join(j.warnings_without_mismatch()) if not old else ""
    if sp.notes:
        notes = f"{sp.notes}; {notes}" if notes else sp.notes
    place = "/".join(str(n) if n is not None else "-" for n in (sp.tray, sp.slot))
    return [
        f"{sp.cable_a} " + fibre_words(closure.cable(sp.cable_a), sp.fibre_a, short=True),
        f"{sp.cable_b} " + fibre_words(closure.cable(sp.cable_b), sp.fibre_b, short=True),
        place if (sp.tray or sp.slot) else "",
        sp.method,
        fmt_db(sp.estimate_db),
        fmt_db(sp.loss_ab_db),
        fmt_db(sp.loss_ba_db),
        fmt_db(j.average_db),
        result,
        notes,
        sp.by,
        fmt_time(sp.at),
    ]


CLOSURE_CSV_HEADERS = [
    "record",
    "job_id",
    "link",
    "closure",
    "route_distance_m",
    "tray_map",
    "cable_a",
    "fibre_a",
    "fibre_a_colours",
    "cable_b",
    "fibre_b",
    "fibre_b_colours",
    "tray",
    "slot",
    "method",
    "estimate_db",
    "loss_ab_db",
    "loss_ba_db",
    "average_db",
    "limit_db",
    "result",
    "warnings",
    "by",
    "at_utc",
]


def _closure_csv(job: Job, writer: Any) -> None:
    """After the results, a blank line and the splice log: a ``closure`` row per closure
    (with its tray map) followed by its ``splice`` rows, failures first."""
    if not any(link.closures for link in job.links):
        return
    writer.writerow([])
    writer.writerow(CLOSURE_CSV_HEADERS)
    for link in job.links:
        for closure in link.closures:
            blank = [""] * (len(CLOSURE_CSV_HEADERS) - 6)
            _row(
                writer,
                [
                    "closure",
                    job.id,
                    _text_cell(link.label),
                    _text_cell(closure.name),
                    fmt_m(closure.route_distance_m),
                    _text_cell("; ".join(tray_map(closure))),
                    *blank,
                ],
            )
            for sp, j, old in closure_rows(link, closure):
                a, b = closure.cable(sp.cable_a), closure.cable(sp.cable_b)
                _row(
                    writer,
                    [
                        "splice",
                        job.id,
                        _text_cell(link.label),
                        _text_cell(closure.name),
                        "",
                        "",
                        _text_cell(sp.cable_a),
                        sp.fibre_a,
                        fibre_words(a, sp.fibre_a, short=True).partition(" ")[2],
                        _text_cell(sp.cable_b),
                        sp.fibre_b,
                        fibre_words(b, sp.fibre_b, short=True).partition(" ")[2],
                        sp.tray or "",
                        sp.slot or "",
                        sp.method,
                        fmt_db(sp.estimate_db),
                        fmt_db(sp.loss_ab_db),
                        fmt_db(sp.loss_ba_db),
                        fmt_db(j.average_db),
                        fmt_db(j.limit.loss_max_db if j.limit else None),
                        "superseded" if old else j.verdict,
                        _text_cell("; ".join(j.warnings_without_mismatch()) if not old else ""),
                        _text_cell(sp.by),
                        sp.at.astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%SZ"),
                    ],
                )


def _row(writer: Any, cells: list[Any]) -> None:
    writer.writerow([escape.csv_cell(cell) for cell in cells])


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
    return ("; ".join(parts) or "no details recorded") + "."


def _plain(value: Any) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, dict | list):
        return json.dumps(value, ensure_ascii=False, sort_keys=True)
    return str(value)


# -- Markdown ---------------------------------------------------------------------------------
def _md_cell(text: str) -> str:
    return escape.markdown(text)


def to_markdown(job: Job) -> str:
    report = build_report(job)
    out = [f"# {_md_cell(report.title)}", ""]
    for key, value in report.facts:
        if value:
            out.append(f"- **{key}:** {_md_cell(value)}")
    out.append("")
    for sec in report.sections:
        out += [f"{'#' * sec.level} {_md_cell(sec.title)}", ""]
        for para in sec.paragraphs:
            out += [_md_cell(para), ""]
        for table in sec.tables:
            out.append("| " + " | ".join(table.headers) + " |")
            out.append(
                "| "
                + " | ".join(
                    "---:" if i in table.numeric else "---" for i in range(len(table.headers))
                )
                + " |"
            )
            for row in table.rows:
                out.append("| " + " | ".join(_md_cell(c) for c in row) + " |")
            out.append("")
    return "\n".join(out).rstrip() + "\n"


# -- HTML -------------------------------------------------------------------------------------
_CSS = """
@page { margin: 14mm 12mm; }
html { font-family: sans-serif; font-size: 10pt; color: #111; background: #fff; }
body { margin: 0 auto; max-width: 60em; padding: 1em; }
h1 { font-size: 16pt; margin: 0 0 .4em; }
h2 { font-size: 13pt; margin: 1.2em 0 .4em; border-bottom: 1px solid #888; }
h3 { font-size: 11pt; margin: 1em 0 .3em; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: .1em 1em; }
dl.facts dt { font-weight: bold; } dl.facts dd { margin: 0; }
table { border-collapse: collapse; width: 100%; margin: .3em 0 .8em; font-size: 8.5pt; }
th, td { border: 1px solid #999; padding: .15em .3em; text-align: left;
         vertical-align: top; overflow-wrap: break-word; }
th { background: #eee; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.nowrap { white-space: nowrap; }
tr.fail td { background: #fde2e2; font-weight: bold; }
tr.doubt td { background: #fff3cd; font-style: italic; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
h2, h3 { break-after: avoid; page-break-after: avoid; }
.safety p { margin: .3em 0; }
@media print {
  body { max-width: none; padding: 0; }
  tr.fail td, tr.doubt td, th { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
"""


def to_html(job: Job) -> str:
    """A self-contained HTML report (no external files, no scripts) that prints on A4/Letter."""
    report = build_report(job)
    e = escape.html
    out = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{e(report.title)}</title>",
        f"<style>{_CSS}</style>",
        "</head>",
        "<body>",
        f"<h1>{e(report.title)}</h1>",
        '<dl class="facts">',
    ]
    for key, value in report.facts:
        if value:
            out.append(f"<dt>{e(key)}</dt><dd>{e(value)}</dd>")
    out.append("</dl>")
    for sec in report.sections:
        css = ' class="safety"' if sec.title.startswith("Safety") else ""
        out.append(f"<section{css}>")
        out.append(f"<h{sec.level}>{e(sec.title)}</h{sec.level}>")
        for para in sec.paragraphs:
            out.append(f"<p>{e(para)}</p>")
        for table in sec.tables:
            out.append("<table>")
            out.append(
                "<thead><tr>" + "".join(f"<th>{e(h)}</th>" for h in table.headers) + "</tr></thead>"
            )
            out.append("<tbody>")
            for i, row in enumerate(table.rows):
                mark = table.marks[i] if i < len(table.marks) else ""
                cls = f' class="{mark}"' if mark else ""
                cells = "".join(
                    f'<td class="num">{e(c)}</td>'
                    if j in table.numeric
                    else f'<td class="nowrap">{e(c)}</td>'
                    if j in table.nowrap
                    else f"<td>{e(c)}</td>"
                    for j, c in enumerate(row)
                )
                out.append(f"<tr{cls}>{cells}</tr>")
            out.append("</tbody></table>")
        out.append("</section>")
    out += ["</body>", "</html>"]
    return "\n".join(out) + "\n"


# -- CSV --------------------------------------------------------------------------------------
CSV_HEADERS = [
    "job",
    "job_id",
    "link",
    "fibre",
    "wavelength_nm",
    "direction",
    "reading_dbm",
    "loss_db",
    "limit_db",
    "margin_db",
    "result",
    "flags",
    "reference_id",
    "reference_level_dbm",
    "method",
    "by",
    "at_utc",
    "superseded_at_utc",
    "superseded_by",
]


def _text_cell(text: str) -> str:
    return escape.csv_cell(text)


def to_csv(job: Job) -> str:
    """One row per result; opens cleanly in a spreadsheet (RFC 4180, CRLF line ends)."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(CSV_HEADERS)
    for link in job.links:
        for r in link.results:
            ref = link.reference(r.reference_id)
            flags = list(r.flags)
            if result_in_doubt(link, r) and "reference-in-doubt" not in flags:
                flags.append("reference-in-doubt")
            margin = margin_db(r)
            row = [
                _text_cell(job.name),
                job.id,
                _text_cell(link.label),
                r.fibre,
                fmt_nm(r.wavelength_nm),
                r.direction,
                fmt_db(r.reading_dbm),
                fmt_db(r.loss_db),
                fmt_db(r.limit_db),
                fmt_db(margin),
                verdict(r).lower(),
                ";".join(flags),
                r.reference_id or "",
                fmt_db(ref.level_dbm if ref else None),
                r.method,
                _text_cell(r.by),
                r.at.astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%SZ"),
                r.superseded_at.astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%SZ")
                if r.superseded_at
                else "",
                r.superseded_by or (_text_cell(r.superseded_note) if r.superseded_at else ""),
            ]
            writer.writerow([escape.csv_cell(cell) for cell in row])
    _closure_csv(job, writer)
    return buffer.getvalue()


# -- JSON hand-off -----------------------------------------------------------------------------
def to_handoff(jobs: Iterable[Job]) -> str:
    """A JSON file that ``fieldkit jobs import`` on another laptop merges without duplicates."""
    data = {
        "format": HANDOFF_FORMAT,
        "handoff_version": HANDOFF_VERSION,
        "schema_version": SCHEMA_VERSION,
        "jobs": [job.model_dump(mode="json") for job in jobs],
    }
    return escape.json_text(json.dumps(data, ensure_ascii=False, indent=1, allow_nan=False)) + "\n"


def export(job: Job, fmt: str) -> str:
    """The job in one of the export formats: csv, md, html or json."""
    if fmt == "csv":
        return to_csv(job)
    if fmt == "md":
        return to_markdown(job)
    if fmt == "html":
        return to_html(job)
    if fmt == "json":
        return to_handoff([job])
    raise ValueError(f"unknown export format {fmt!r} (csv, md, html or json)")


EXPORT_FORMATS = ("csv", "md", "html", "json")


def _check_text(data: dict[str, Any]) -> str:
    """A stored application or transceiver check: its verdict in words, then every figure."""
    from fieldkit.text.budget import NO_MARGIN_TEXT, verdict_word

    verdict = data.get("verdict")
    head = ""
    if isinstance(verdict, str):
        head = f"{verdict_word(verdict)}" + (
            f" ({NO_MARGIN_TEXT})" if verdict == "no-margin" else ""
        )
        head += "; "
    return head + "; ".join(f"{k} {_plain(v)}" for k, v in data.items())
