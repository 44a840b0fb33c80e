"""Customer reports and exports of jobs: HTML (print CSS), Markdown, CSV and the JSON hand-off.

Above :mod:`fieldkit.jobs` in the layer contract (pyproject.toml): it reads jobs, the trace
drawing and the text escaping, and changes nothing. :mod:`fieldkit.actions.export` calls it
(with the settings and the target checks).

- :mod:`.build`: what a report says (summary page, one page per link), with :mod:`.appendix`
  (traceability and sources), :mod:`.traces_page` (a link's OTDR traces) and :mod:`.parts`
  (verdict and flag words, the verdict of a link and a job);
- :mod:`.document`: the blocks it is made of; :mod:`.html`, :mod:`.markdown`: how they look;
- :mod:`.chart`: loss per fibre against the limit as inline SVG;
- :mod:`.checks`: stored application and transceiver checks as sentences and tables;
- :mod:`.spreadsheet`: the CSV styles and formula neutralising;
- :mod:`.names`: export file names from the job name and date.
"""

from __future__ import annotations

from collections.abc import Sequence

from fieldkit.jobs.models import Job
from fieldkit.jobs.reports import EXPORT_FORMATS, to_handoff
from fieldkit.reports import html, markdown
from fieldkit.reports.build import JOB_ORDER, build_document, job_verdict, verdict_word
from fieldkit.reports.common import ReportContext
from fieldkit.reports.document import Document, Facts, Paragraph, Section, Table, Verdict
from fieldkit.reports.spreadsheet import to_csv, to_csv_many

__all__ = [
    "EXPORT_FORMATS",
    "ReportContext",
    "build_document",
    "export",
    "export_many",
    "to_csv",
    "to_html",
    "to_markdown",
]


def to_html(job: Job, ctx: ReportContext | None = None) -> str:
    """A self-contained HTML report (no external files, no scripts) that prints on A4/Letter."""
    return html.render(build_document(job, ctx))


def to_markdown(job: Job, ctx: ReportContext | None = None) -> str:
    return markdown.render(build_document(job, ctx))


def export(job: Job, fmt: str, ctx: ReportContext | None = None) -> str:
    """The job in one of the export formats: csv, md, html or json."""
    if fmt == "csv":
        return to_csv(job, ctx)
    if fmt == "md":
        return to_markdown(job, ctx)
    if fmt == "html":
        return to_html(job, ctx)
    if fmt == "json":
        return to_handoff([job])
    raise ValueError(f"unknown export format {fmt!r} (csv, md, html or json)")


def cover(jobs: Sequence[Job], title: str, ctx: ReportContext) -> Document:
    """The first page of a day or range report: each job with its verdict."""
    sec = Section("Jobs in this report", css_class="summary")
    sec.blocks.append(
        Facts([(k, v) for k, v in (("Contractor", ctx.contractor), ("Crew", ctx.crew)) if v])
    )
    worst = None
    table = Table(
        [
            "Job",
            "Customer",
            "Site",
            "Links",
            "Verdict",
            "Fibre tests",
            "Fail",
            "Ref. problem",
            "In doubt",
        ],
        numeric={3, 5, 6, 7, 8},
        caption="Jobs",
    )
    verdicts = []
    for job in jobs:
        count, tally, _ = job_verdict(job)
        verdicts.append(count)
        table.add(
            [
                job.name,
                job.customer,
                job.site,
                str(len(job.links)),
                verdict_word(count),
                str(tally.tested),
                str(tally.failed),
                str(tally.reference_problems),
                str(tally.in_doubt),
            ],
            "fail"
            if tally.failed
            else "doubt"
            if tally.in_doubt or tally.reference_problems
            else "",
        )
    for count in JOB_ORDER:
        if count in verdicts:
            worst = count
            break
    if jobs:
        sec.blocks.append(Verdict("Overall", verdict_word(worst), worst, [f"{len(jobs)} jobs"]))
        sec.blocks.append(table)
        sec.blocks.append(
            Paragraph(
                "Each job's report follows on its own pages, with its own signature block.", "small"
            )
        )
    else:
        sec.blocks.append(Paragraph("No job was worked on in these dates."))
    subtitle = "Fibre test report" + (f" — {ctx.crew}" if ctx.crew else "")
    return Document(title, ctx.contractor, subtitle, [sec])


def export_many(jobs: Sequence[Job], fmt: str, title: str, ctx: ReportContext | None = None) -> str:
    """Several jobs (a day, a date range) in one report or one CSV: a cover page with each
    job's verdict, then each job's own report."""
    ctx = ctx or ReportContext()
    if fmt == "csv":
        return to_csv_many(jobs, ctx)
    if fmt == "json":
        return to_handoff(jobs)
    first = cover(jobs, title, ctx)
    docs = [build_document(job, ctx) for job in jobs]
    if fmt == "html":
        body = html.body(first)
        for doc in docs:
            body += html.body(doc, first_page_break=True)
        return html.page(title, body)
    if fmt == "md":
        lines = markdown.body(first)
        for doc in docs:
            lines += ["", "---", "", *markdown.body(doc)]
        return "\n".join(lines).rstrip() + "\n"
    raise ValueError(f"unknown export format {fmt!r} (csv, md, html or json)")
