"""The end-of-day summary: today's jobs, result counts, failures, doubts and open items."""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date
from typing import Any

from fieldkit.jobs.counting import Tally, link_tallies, open_items
from fieldkit.jobs.models import Job
from fieldkit.jobs.reports import failures, fmt_db, fmt_m, fmt_nm
from fieldkit.jobs.store import JobStore, filter_summaries, local_date
from fieldkit.text.numbers import arrow
from fieldkit.text.words import counted as counted  # here too: older code imports it here


@dataclass
class JobDay:
    """One job's part of the day."""

    id: str
    name: str
    site: str
    status: str
    results_today: int
    tested: int
    passed: int
    failed: int
    reference_problems: int
    no_limit: int
    in_doubt: int
    failures: list[str] = field(default_factory=list)
    open_items: list[str] = field(default_factory=list)

    def as_dict(self) -> dict[str, Any]:
        return {
            "id": self.id,
            "name": self.name,
            "site": self.site,
            "status": self.status,
            "results_today": self.results_today,
            "tested": self.tested,
            "passed": self.passed,
            "failed": self.failed,
            "reference_problems": self.reference_problems,
            "no_limit": self.no_limit,
            "in_doubt": self.in_doubt,
            "failures": self.failures,
            "open_items": self.open_items,
        }


@dataclass
class DaySummary:
    day: date
    jobs: list[JobDay]

    def totals(self) -> dict[str, int]:
        keys = (
            "results_today",
            "tested",
            "passed",
            "failed",
            "reference_problems",
            "no_limit",
            "in_doubt",
        )
        out = {k: sum(getattr(j, k) for j in self.jobs) for k in keys}
        out["jobs"] = len(self.jobs)
        out["open_jobs"] = sum(j.status == "open" for j in self.jobs)
        out["open_items"] = sum(len(j.open_items) for j in self.jobs)
        return out

    def as_dict(self) -> dict[str, Any]:
        return {
            "date": self.day.isoformat(),
            "totals": self.totals(),
            "jobs": [j.as_dict() for j in self.jobs],
        }


def job_day(job: Job, day: date) -> JobDay:
    """Counts per fibre and wavelength by the one counting rule (:mod:`fieldkit.jobs.counting`)."""
    tally = Tally()
    for link in job.links:
        for row in link_tallies(link).values():
            tally.merge(row)
    failed = failures(job)
    entry = JobDay(
        id=job.id,
        name=job.name,
        site=job.site,
        status=job.status,
        results_today=sum(local_date(r.at) == day for _, r in job.results()),
        tested=tally.tested,
        passed=tally.passed,
        failed=tally.failed,
        reference_problems=tally.reference_problems,
        no_limit=tally.no_limit,
        in_doubt=tally.in_doubt,
    )
    for link, r in failed:
        limit = f" > {fmt_db(r.limit_db)} dB" if r.limit_db is not None else ""
        entry.failures.append(
            f"{link.label} fibre {r.fibre} {fmt_nm(r.wavelength_nm)} nm "
            f"{arrow(r.direction)}: {fmt_db(r.loss_db)} dB{limit}"
        )
    for link in job.links:
        if not link.results:
            entry.open_items.append(f"{link.label}: no results yet")
    entry.open_items += open_items(job)
    for link in job.links:
        for fault in link.faults:
            entry.open_items.append(
                f"{link.label}: fault located at {fmt_m(fault.route_distance_m)} m along the "
                f"route (search from {fmt_m(fault.low_m)} to {fmt_m(fault.high_m)} m)"
            )
    if job.status == "open":
        entry.open_items.append("job still open")
    return entry


def day_summary(store: JobStore, day: date) -> DaySummary:
    """The jobs created or updated on ``day`` (local date), with their counts and open items."""
    ids = [s.id for s in filter_summaries(store.list(), on_date=day)]
    jobs = [job_day(job, day) for job in store.load_all(ids)]
    return DaySummary(day, jobs)
