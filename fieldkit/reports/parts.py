"""The words every part of a report shares: verdict words and what they mean, flag words,
the counting of a link's and a job's verdict, and what a report has used (for the legend and
the sources in the appendix)."""

from __future__ import annotations

from fieldkit.jobs.counting import (
    PRECEDENCE,
    Count,
    Tally,
    fibre_outcomes,
    link_tallies,
)
from fieldkit.jobs.models import (
    FLAG_NEGATIVE_LOSS,
    FLAG_REFERENCE_IN_DOUBT,
    Job,
    Link,
)
from fieldkit.reports.common import (
    ReportContext,
)

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


def flag_words(flag: str) -> str:
    return FLAG_WORDS.get(flag, (flag.replace("-", " "), ""))[0]


class Used:
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


def tally_reasons(tally: Tally) -> list[str]:
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


def running_header(job: Job, ctx: ReportContext) -> str:
    parts = [ctx.contractor, job.name, job.customer, job.site]
    return " · ".join(p for p in parts if p)


def count_word(count: Count) -> str:
    return "FAIL" if count is Count.FAIL else VERDICT_WORD[count].lower()
