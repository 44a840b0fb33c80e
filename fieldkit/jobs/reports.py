"""What every report of a job counts and how it writes numbers; the JSON hand-off.

The customer reports themselves (HTML, Markdown, CSV) are built by :mod:`fieldkit.reports`, a
layer above this one; what the jobs layer and the workspaces share stays here: the number
formats, the verdict of a result, the summaries by the one counting rule
(:mod:`fieldkit.jobs.counting`), the splice rows, and the hand-off file.

Times here are UTC, written ``2026-03-14 09:30 UTC`` (the CLI and the workspaces); the customer
reports show local time with its zone (:mod:`fieldkit.reports.common`).
"""

from __future__ import annotations

import json
from collections.abc import Iterable
from dataclasses import dataclass
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
from fieldkit.jobs.splices import Closure, Judgement, Splice, judge_in
from fieldkit.text import escape
from fieldkit.text.words import fmt_time as fmt_time  # here too: the reports' helpers

__all__ = ["result_in_doubt"]

HANDOFF_FORMAT = "fieldkit-jobs-handoff"
HANDOFF_VERSION = 1
EXPORT_FORMATS = ("csv", "md", "html", "json")


# -- numbers and times --------------------------------------------------------------------
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


def closure_rows(link: Link, closure: Closure) -> list[tuple[Splice, Judgement, bool]]:
    """Every splice of a closure with its judgement and whether a re-splice superseded it:
    failures first, then the rest in fibre order, superseded splices last."""
    current = closure.current_splices()
    rows = [(s, judge_in(closure, s, link.splice_limits), False) for s in current]
    rows.sort(key=lambda row: (row[1].verdict != "fail", row[0].cable_a.casefold(), row[0].fibre_a))
    old = sorted(closure.superseded(), key=lambda s: (s.fibre_a, s.at))
    rows += [(s, judge_in(closure, s, link.splice_limits), True) for s in old]
    return rows


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
