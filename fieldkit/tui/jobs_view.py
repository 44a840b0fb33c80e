"""What the Jobs workspace prints: a job's list row, its head, counts, failures, links and notes.

Rich text built from a job record, no Textual: the screen (``fieldkit.tui.screens.jobs``) puts
these into its Statics. Every piece of user text goes through ``terminal`` and plain ``Text``, so
a "[" in a job name is never read as markup and control characters show as escapes.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text

from fieldkit.jobs.counting import Count
from fieldkit.jobs.reports import (
    failures,
    fmt_db,
    fmt_m,
    fmt_nm,
    fmt_time,
    job_summary,
    result_in_doubt,
    verdict,
)
from fieldkit.jobs.splices import closure_summary
from fieldkit.jobs.trace_summary import link_traces
from fieldkit.text.escape import terminal
from fieldkit.text.layout import fit, together
from fieldkit.text.numbers import arrow

# The list's rows and the job's head (no records needed: the first frame shows them from the
# index), here too.
from fieldkit.tui.jobs_rows import head as head
from fieldkit.tui.jobs_rows import no_job_head as no_job_head
from fieldkit.tui.jobs_rows import plain as plain
from fieldkit.tui.jobs_rows import prompt as prompt
from fieldkit.tui.wrapped import Wrapped

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job, Link


#: How a count is coloured where it is not zero (the words say it without colour too).
COUNT_STYLES: dict[Count, str] = {
    Count.PASS: "green",
    Count.FAIL: "bold red",
    Count.REFERENCE_PROBLEM: "bold yellow",
    Count.IN_DOUBT: "yellow",
    Count.NO_LIMIT: "",
}


def summary_table(job: Job) -> RenderableType | Wrapped:
    """Per link and wavelength, in lines that wrap at 44 columns instead of a wide table."""
    rows = job_summary(job)
    if not rows:
        return plain("No results yet.", "dim")
    # The heading bold, not the counts under it (a Text's base style covers all of it).
    text = Text()
    text.append("Fibres per link and wavelength", style="bold")
    for r in rows:
        # Every count by the one rule (fieldkit.jobs.counting): the parts add up to the tested.
        text.append(f"\n{terminal(r.link_label)} {fmt_nm(r.wavelength_nm)} nm: ")
        text.append(f"{r.tested} tested")
        for count, words in r.tally.parts():
            text.append(", ")
            text.append(together(words), COUNT_STYLES[count] if r.tally.of(count) else "")
    return Wrapped(text)


def failures_text(job: Job) -> RenderableType:
    failed = failures(job)
    if not failed:
        return plain("No failures.", "green") if job.results() else ""
    text = Text("Failures", style="bold red")
    for link, r in failed:
        limit = f" (limit {fmt_db(r.limit_db)} dB)" if r.limit_db is not None else ""
        text.append(
            f"\n✗ {terminal(link.label)} fibre {r.fibre} {fmt_nm(r.wavelength_nm)} nm "
            f"{arrow(r.direction)}: {fmt_db(r.loss_db)} dB{limit}",
            style="red",
        )
    return text


def links_text(job: Job) -> RenderableType:
    parts: list[RenderableType] = []
    for link in job.links:
        head = Text(f"\nLink {terminal(link.label)}", style="bold")
        details = [
            d
            for d in (
                f"{link.end_a} → {link.end_b}" if link.end_a or link.end_b else "",
                link.fibre_type,
                f"{fmt_m(link.length_m)} m" if link.length_m is not None else "",
                f"{link.fibre_count} fibres" if link.fibre_count else "",
            )
            if d
        ]
        if details:
            head.append("\n" + terminal(" · ".join(details)), style="dim")
        parts.append(head)
        if link.budget is not None:
            b = link.budget
            line = "; ".join(
                f"{fmt_nm(w.wavelength_nm)} nm {fmt_db(w.loss_db)} dB" for w in b.wavelengths
            )
            parts.append(plain(f"Budget (max): {line}; margin {fmt_db(b.margin_db)} dB"))
        for f in link.faults:
            parts.append(
                plain(
                    f"Fault: route {fmt_m(f.route_distance_m)} m (search from "
                    f"{fmt_m(f.low_m)} to {fmt_m(f.high_m)} m)"
                    + (f", near {f.nearest_landmark}" if f.nearest_landmark else ""),
                    "bold magenta",
                )
            )
        for closure in link.closures:
            parts.append(plain("Closure " + closure_summary(closure, link.splice_limits)))
        traces = traces_text(link)
        if traces is not None:
            parts.append(traces)
        if link.results:
            table = Table(box=None, padding=(0, 1), show_edge=False, expand=False)
            for name in ("Fib", "nm", "Dir", "Loss dB", "Limit", "Result"):
                table.add_column(name, justify="left" if name in ("Dir", "Result") else "right")
            ordered = sorted(link.results, key=lambda r: (r.wavelength_nm, r.fibre, r.at))
            for r in ordered:
                doubt = result_in_doubt(link, r)
                flag = " ?" if doubt else ""
                if "negative-loss" in r.flags:
                    flag += " neg"
                style = "bold red" if r.passed is False else "yellow" if doubt else ""
                table.add_row(
                    str(r.fibre),
                    fmt_nm(r.wavelength_nm),
                    r.direction,
                    fmt_db(r.loss_db),
                    fmt_db(r.limit_db),
                    verdict(r) + flag,
                    style=style,
                )
            parts.append(table)
        elif not link.faults and traces is None:
            parts.append(plain("no results yet", "dim"))
    if not parts:
        return plain(
            "\nNo links yet: the budget, meter and fault workspaces add them when "
            "they save onto this job.",
            "dim",
        )
    return Group(*parts)


#: The job detail's width inside its panel at 80 and at 44 columns (a 44-column panel, its
#: padding and scroll bar).
DETAIL_WIDTH = 40


def traces_text(link: Link, width: int = DETAIL_WIDTH) -> Text | None:
    """The link's kept OTDR traces per wavelength (:mod:`fieldkit.jobs.trace_summary`, the
    lines ``fieldkit jobs show`` prints), wrapped to ``width`` without parting a number from
    its unit; a failing count in red."""
    rows = link_traces(link)
    if not rows:
        return None
    text = Text()
    for row in rows:
        for i, line in enumerate(row.lines()):
            if text:
                text.append("\n")
            failing = row.over_limits and ("over its limit" in line or "FAIL" in line)
            text.append(fit(line, width), style="bold" if i == 0 else "bold red" if failing else "")
    return text


def notes_text(job: Job) -> RenderableType | Wrapped:
    text = Text()
    text.append("\nNotes", style="bold")  # the heading only: the notes themselves plain
    if not job.notes:
        text.append("\nnone yet", style="dim")
    for note in job.notes:
        # The time and who wrote it as one run of text: split in two, the space between
        # them started the second and was lost where the picture is drawn from runs.
        by = f" {terminal(note.by)}" if note.by else ""
        text.append(f"\n{together(fmt_time(note.at))}{by}", style="dim")
        body = terminal(note.text, multiline=True).replace("\n", "\n  ")
        text.append(f"\n  {body}")
    return Wrapped(text, hang=0)  # a wrapped note line keeps the note's indent
