"""The CSV export: one row per result (superseded ones too, marked), then the splice log.

Two styles (the ``csv_style`` setting, or ``--csv-style``):

- ``comma``: RFC 4180, ``,`` between cells and a decimal point;
- ``semicolon``: ``;`` between cells and a decimal comma (``-0,12``), which spreadsheets in
  locales that write a decimal comma read as numbers.

Formula neutralising (OWASP "CSV injection"): every text cell passes
:func:`fieldkit.text.escape.csv_cell`, which prefixes a cell starting with ``= + - @``, a tab
or a carriage return with ``'``. Numbers are written by the program as :class:`Num` cells and
never pass through it, so a negative loss stays a number (``-0.12``, or ``-0,12`` in the
semicolon style), while a job named ``-2+3`` or ``=HYPERLINK(...)`` stays text.

Times are UTC (``at_utc``) for machines, and local with the zone (``at_local``) for people.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Iterable
from datetime import UTC, datetime

from fieldkit.jobs.models import FLAG_REFERENCE_IN_DOUBT, Job, result_in_doubt
from fieldkit.jobs.reports import closure_rows, fmt_db, fmt_m, fmt_nm, margin_db, verdict
from fieldkit.jobs.splices import fibre_words, tray_map
from fieldkit.reports.common import ReferenceLabels, ReportContext, fmt_local
from fieldkit.text import escape

STYLES = ("comma", "semicolon")


class Num(str):
    """A number the program formatted (``-0.12``): kept a number in every style."""

    __slots__ = ()


def num(text: str) -> Num | str:
    """``text`` as a number cell, '' staying empty."""
    return Num(text) if text else ""


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
    "reference",
    "at_local",
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


def _utc(moment: datetime | None) -> str:
    return moment.astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%SZ") if moment else ""


class _Writer:
    def __init__(self, style: str) -> None:
        if style not in STYLES:
            raise ValueError(f"csv style {style!r} is not one of {', '.join(STYLES)}")
        self.style = style
        self.buffer = io.StringIO()
        self.writer = csv.writer(
            self.buffer, delimiter=";" if style == "semicolon" else ",", lineterminator="\r\n"
        )

    def cell(self, value: object) -> str:
        if isinstance(value, Num):
            return str.replace(value, ".", ",") if self.style == "semicolon" else str(value)
        if isinstance(value, int) and not isinstance(value, bool):
            return str(value)
        return escape.csv_cell(value)

    def row(self, cells: Iterable[object]) -> None:
        self.writer.writerow([self.cell(c) for c in cells])


def _results(job: Job, ctx: ReportContext, w: _Writer) -> None:
    labels = ReferenceLabels(job)
    for link in job.links:
        for r in link.results:
            ref = link.reference(r.reference_id)
            flags = list(r.flags)
            if result_in_doubt(link, r) and FLAG_REFERENCE_IN_DOUBT not in flags:
                flags.append(FLAG_REFERENCE_IN_DOUBT)
            w.row(
                [
                    job.name,
                    job.id,
                    link.label,
                    r.fibre,
                    num(fmt_nm(r.wavelength_nm)),
                    r.direction,
                    num(fmt_db(r.reading_dbm)),
                    num(fmt_db(r.loss_db)),
                    num(fmt_db(r.limit_db)),
                    num(fmt_db(margin_db(r))),
                    verdict(r).lower(),
                    ";".join(flags),
                    r.reference_id or "",
                    num(fmt_db(ref.level_dbm if ref else None)),
                    r.method,
                    r.by,
                    _utc(r.at),
                    _utc(r.superseded_at),
                    r.superseded_by or (r.superseded_note if r.superseded_at else ""),
                    labels(r.reference_id),
                    fmt_local(r.at, ctx),
                ]
            )


def _closures(jobs: list[Job], w: _Writer) -> None:
    """After the results, a blank line and the splice log: a ``closure`` row per closure
    (with its tray map) followed by its ``splice`` rows, failures first."""
    if not any(link.closures for job in jobs for link in job.links):
        return
    w.row([])
    w.row(CLOSURE_CSV_HEADERS)
    for job in jobs:
        for link in job.links:
            for closure in link.closures:
                blank = [""] * (len(CLOSURE_CSV_HEADERS) - 6)
                w.row(
                    [
                        "closure",
                        job.id,
                        link.label,
                        closure.name,
                        num(fmt_m(closure.route_distance_m)),
                        "; ".join(tray_map(closure)),
                        *blank,
                    ]
                )
                for sp, j, old in closure_rows(link, closure):
                    a, b = closure.cable(sp.cable_a), closure.cable(sp.cable_b)
                    w.row(
                        [
                            "splice",
                            job.id,
                            link.label,
                            closure.name,
                            "",
                            "",
                            sp.cable_a,
                            sp.fibre_a,
                            fibre_words(a, sp.fibre_a, short=True).partition(" ")[2],
                            sp.cable_b,
                            sp.fibre_b,
                            fibre_words(b, sp.fibre_b, short=True).partition(" ")[2],
                            sp.tray or "",
                            sp.slot or "",
                            sp.method,
                            num(fmt_db(sp.estimate_db)),
                            num(fmt_db(sp.loss_ab_db)),
                            num(fmt_db(sp.loss_ba_db)),
                            num(fmt_db(j.average_db)),
                            num(fmt_db(j.limit.loss_max_db if j.limit else None)),
                            "superseded" if old else j.verdict,
                            "; ".join(j.warnings_without_mismatch()) if not old else "",
                            sp.by,
                            _utc(sp.at),
                        ]
                    )


def to_csv_many(
    jobs: Iterable[Job], ctx: ReportContext | None = None, style: str | None = None
) -> str:
    """One CSV of every result of ``jobs`` (a day or a date range), then their splice logs."""
    ctx = ctx or ReportContext()
    w = _Writer(style or ctx.csv_style)
    listed = list(jobs)
    w.row(CSV_HEADERS)
    for job in listed:
        _results(job, ctx, w)
    _closures(listed, w)
    return w.buffer.getvalue()


def to_csv(job: Job, ctx: ReportContext | None = None, style: str | None = None) -> str:
    """One row per result; opens cleanly in a spreadsheet (CRLF line ends)."""
    return to_csv_many([job], ctx, style)
