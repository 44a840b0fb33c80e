"""What every report format shares: the context (letterhead, equipment, time zone), local
times with their zone, and the short reference labels R1, R2 ...

Times: a report is read by the crew and the customer where the work was done, so it shows the
machine's local time with its zone (``2026-03-14 09:15 CET``); the CSV and the hand-off keep
UTC for machines. Tests pin the zone with ``TZ`` or :attr:`ReportContext.tz`.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from datetime import date, datetime, timedelta, tzinfo

from fieldkit.jobs.models import Job
from fieldkit.settings import Equipment, ReportSettings


@dataclass(frozen=True)
class ReportContext:
    """What a report takes from outside the job: the settings and the time zone."""

    contractor: str = ""
    crew: str = ""
    equipment: tuple[Equipment, ...] = ()
    csv_style: str = "comma"
    #: None: the machine's local zone (``TZ`` when set).
    tz: tzinfo | None = None

    @classmethod
    def from_settings(cls, s: ReportSettings, tz: tzinfo | None = None) -> ReportContext:
        return cls(s.contractor, s.crew, s.equipment, s.csv_style, tz)


def local(moment: datetime, ctx: ReportContext) -> datetime:
    return moment.astimezone(ctx.tz) if ctx.tz is not None else moment.astimezone()


def zone_name(moment: datetime) -> str:
    """``CET``, or ``UTC+05:30`` where the zone has no letters for its name."""
    name = moment.tzname() or ""
    if name and name[0] not in "+-" and not name[0].isdigit():
        return name
    offset = moment.utcoffset() or timedelta(0)
    minutes = int(offset.total_seconds() // 60)
    sign = "+" if minutes >= 0 else "-"
    return f"UTC{sign}{abs(minutes) // 60:02d}:{abs(minutes) % 60:02d}"


def fmt_local(moment: datetime | None, ctx: ReportContext) -> str:
    """``2026-03-14 09:15 CET`` in the report's zone; '' for None."""
    if moment is None:
        return ""
    shown = local(moment, ctx)
    return f"{shown:%Y-%m-%d %H:%M} {zone_name(shown)}"


def local_day(moment: datetime, ctx: ReportContext) -> date:
    return local(moment, ctx).date()


def zone_words(job_times: list[datetime], ctx: ReportContext) -> str:
    """``local time, CET (UTC+01:00)`` for the zone(s) the job's times fall in;
    ``UTC (the machine's time zone)`` where that is UTC."""
    seen: dict[str, str] = {}
    for moment in job_times:
        shown = local(moment, ctx)
        offset = shown.utcoffset() or timedelta(0)
        minutes = int(offset.total_seconds() // 60)
        sign = "+" if minutes >= 0 else "-"
        seen.setdefault(
            zone_name(shown), f"UTC{sign}{abs(minutes) // 60:02d}:{abs(minutes) % 60:02d}"
        )
    if not seen:
        now = local(datetime.now().astimezone(), ctx)
        seen[zone_name(now)] = ""
    parts = [
        f"{name} ({off})" if off and off != name and name != "UTC" else name
        for name, off in seen.items()
    ]
    if parts == ["UTC"]:  # "local time, UTC" read as two zones
        return "UTC (the machine's time zone)"
    return "local time, " + " and ".join(parts)


def job_times(job: Job) -> list[datetime]:
    """Every time a report of ``job`` shows (for the zone line and the date range)."""
    out = [job.created_at, job.updated_at]
    for link in job.links:
        out += [r.at for r in link.results] + [r.at for r in link.references]
        if link.budget is not None:
            out.append(link.budget.computed_at)
        for closure in link.closures:
            out += [s.at for s in closure.splices]
        out += [f.at for f in link.faults]
    out += [n.at for n in job.notes]
    return out


def test_dates(job: Job, ctx: ReportContext) -> str:
    """The local date (or first–last dates) of the job's results; '' before any result."""
    days = sorted({local_day(r.at, ctx) for link in job.links for r in link.results})
    if not days:
        return ""
    if days[0] == days[-1]:
        return days[0].isoformat()
    return f"{days[0].isoformat()} to {days[-1].isoformat()}"


class ReferenceLabels:
    """R1, R2 ... for a job's references, in the order they were set (then link order)."""

    def __init__(self, job: Job) -> None:
        refs = [(ref.at, n, ref.id) for n, link in enumerate(job.links) for ref in link.references]
        refs.sort()
        self._labels = {ident: f"R{i}" for i, (_, _, ident) in enumerate(refs, 1)}

    def __call__(self, reference_id: str | None) -> str:
        if not reference_id:
            return ""
        # A result naming a reference the job does not hold keeps a short form of the id.
        return self._labels.get(reference_id, f"? ({reference_id[:8]})")

    def items(self) -> list[tuple[str, str]]:
        return [(label, ident) for ident, label in self._labels.items()]


def arrows(text: str) -> str:
    """Directions as the report writes them: the one arrow policy of
    :func:`fieldkit.text.numbers.arrow` (``A->B`` -> ``A→B``, ``A<->B`` -> ``A↔B``). The CSV
    and the hand-off keep the stored ``A->B`` (plain text for spreadsheets and scripts)."""
    from fieldkit.text.numbers import arrow

    return arrow(text)


_NEGATIVE = re.compile(r"-(?=\d+(?:\.\d+)?(?: ?(?:dBm|dB|nm|m|km|ps/nm|ps|%))?$)")


def minus(cell: str) -> str:
    """A table cell that is a negative number (``-0.66``, ``-7.00 dBm``) with the typographic
    minus (U+2212), the README's policy for results people read; other text (``JC-3``, a
    note) as it is. The CSV keeps ASCII for spreadsheets."""
    from fieldkit.text.numbers import MINUS  # the one minus policy (text/numbers.py)

    return _NEGATIVE.sub(MINUS, cell, count=1) if cell.startswith("-") else cell
