"""The one counting rule: what a fibre's results say, and how they are counted and listed.

Used by the meter summary, ``fieldkit jobs show``, ``fieldkit jobs today``, the end-of-day view,
every export, and the open items a job lists before it is marked done.

Per result (one fibre, wavelength and direction; only the current result of a cell counts, a
retest supersedes):

1. a negative loss is a **reference problem** (more light than at the reference: never a good
   fibre, and no margin);
2. a result taken against a reference put in doubt by its recheck is **in doubt**;
3. otherwise it **passes** or **fails** its limit, or has **no limit**.

Per fibre at a wavelength, the worst of its directions, in this order: fail, reference problem,
in doubt, no limit, pass. A fail against a trusted reference stands whatever the other direction
read; a reference problem or a doubt means the fibre must be retested before it can pass.
Every fibre lands in exactly one count, so the counts add up to the fibres tested.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from enum import StrEnum

from fieldkit.jobs.models import FLAG_NEGATIVE_LOSS, Job, Link, LossResult, result_in_doubt
from fieldkit.text.numbers import arrow


class Count(StrEnum):
    """Where a result or a fibre is counted."""

    PASS = "pass"
    FAIL = "fail"
    REFERENCE_PROBLEM = "reference problem"
    NO_LIMIT = "no limit"
    IN_DOUBT = "in doubt"


#: Worst first: a fibre counts under the first of these any of its directions has.
PRECEDENCE: tuple[Count, ...] = (
    Count.FAIL,
    Count.REFERENCE_PROBLEM,
    Count.IN_DOUBT,
    Count.NO_LIMIT,
    Count.PASS,
)

#: What to do about a result that is not a pass (open items and the meter's words).
ADVICE: dict[Count, str] = {
    Count.FAIL: "failed, repair and retest",
    Count.REFERENCE_PROBLEM: "reference problem, clean and re-reference",
    Count.IN_DOUBT: "reference in doubt, retest",
}


def cell_count(loss_db: float, limit_db: float | None, *, in_doubt: bool = False) -> Count:
    """The count of one result from its loss, its limit and whether its reference is in doubt."""
    if loss_db < 0:
        return Count.REFERENCE_PROBLEM
    if in_doubt:
        return Count.IN_DOUBT
    if limit_db is None:
        return Count.NO_LIMIT
    return Count.PASS if loss_db <= limit_db else Count.FAIL


def result_count(link: Link, result: LossResult) -> Count:
    """The count of a stored result (its own flags and its reference's doubt)."""
    if FLAG_NEGATIVE_LOSS in result.flags or result.loss_db < 0:
        return Count.REFERENCE_PROBLEM
    if result_in_doubt(link, result):
        return Count.IN_DOUBT
    if result.passed is None:
        return Count.NO_LIMIT
    return Count.PASS if result.passed else Count.FAIL


def fibre_count(counts: Iterable[Count]) -> Count:
    """The count of a fibre at a wavelength from the counts of its directions."""
    present = set(counts)
    for count in PRECEDENCE:
        if count in present:
            return count
    raise ValueError("a fibre needs at least one result")


#: The order counts are listed in, everywhere (a count's words: :func:`count_words`).
ORDER: tuple[Count, ...] = (
    Count.PASS,
    Count.FAIL,
    Count.REFERENCE_PROBLEM,
    Count.IN_DOUBT,
    Count.NO_LIMIT,
)

#: Each count's noun, one and many; "pass", "fail", "in doubt" and "no limit" do not change.
_NOUNS: dict[Count, tuple[str, str]] = {
    Count.PASS: ("pass", "pass"),
    Count.FAIL: ("fail", "fail"),
    Count.REFERENCE_PROBLEM: ("reference problem", "reference problems"),
    Count.IN_DOUBT: ("in doubt", "in doubt"),
    Count.NO_LIMIT: ("no limit", "no limit"),
}
#: Where columns are scarce (the meter at 44 columns): still words, never "ref?".
_SHORT_NOUNS: dict[Count, tuple[str, str]] = {
    **_NOUNS,
    Count.REFERENCE_PROBLEM: ("bad reference", "bad references"),
}

_FIELDS: dict[Count, str] = {
    Count.PASS: "passed",
    Count.FAIL: "failed",
    Count.REFERENCE_PROBLEM: "reference_problems",
    Count.NO_LIMIT: "no_limit",
    Count.IN_DOUBT: "in_doubt",
}


def count_words(count: Count, n: int, *, short: bool = False) -> str:
    """``n`` fibres of a count, the noun agreeing: "1 reference problem", "2 reference problems",
    "5 in doubt"; ``short``: "1 bad reference"."""
    one, many = (_SHORT_NOUNS if short else _NOUNS)[count]
    return f"{n} {one if n == 1 else many}"


def totals_tally(totals: dict[str, int]) -> Tally:
    """A :class:`Tally` from counts stored by field name (a day's totals, a JSON row)."""
    return Tally(**{name: totals.get(name, 0) for name in _FIELDS.values()})


@dataclass
class Tally:
    """Fibres counted at one wavelength (or over several): each fibre in exactly one count."""

    passed: int = 0
    failed: int = 0
    reference_problems: int = 0
    no_limit: int = 0
    in_doubt: int = 0

    @property
    def tested(self) -> int:
        return self.passed + self.failed + self.reference_problems + self.no_limit + self.in_doubt

    def add(self, count: Count, n: int = 1) -> None:
        field = _FIELDS[count]
        setattr(self, field, getattr(self, field) + n)

    def merge(self, other: Tally) -> None:
        for name in ("passed", "failed", "reference_problems", "no_limit", "in_doubt"):
            setattr(self, name, getattr(self, name) + getattr(other, name))

    def of(self, count: Count) -> int:
        """How many fibres are counted under ``count``."""
        return int(getattr(self, _FIELDS[count]))

    def parts(self, *, short: bool = False, zeros: bool = True) -> list[tuple[Count, str]]:
        """Each count with its words, in :data:`ORDER` (``1 reference problem``, ``5 in doubt``):
        the parts add up to :attr:`tested`. ``zeros=False`` leaves out the zero counts (what is
        left still adds up); ``short``: "bad reference" where columns are scarce."""
        return [
            (count, count_words(count, self.of(count), short=short))
            for count in ORDER
            if zeros or self.of(count)
        ]

    def words(self, *, short: bool = False, zeros: bool = True, sep: str = ", ") -> str:
        """``3 pass, 1 fail, 1 reference problem, 0 in doubt, 2 no limit``: every count, so the
        parts add up to the fibres tested (see :meth:`parts`)."""
        return sep.join(words for _, words in self.parts(short=short, zeros=zeros))

    def as_dict(self) -> dict[str, int]:
        return {
            "fibres_tested": self.tested,
            "passed": self.passed,
            "failed": self.failed,
            "reference_problems": self.reference_problems,
            "no_limit": self.no_limit,
            "in_doubt": self.in_doubt,
        }


def current_results(link: Link) -> list[LossResult]:
    """The result that counts for each fibre, wavelength and direction.

    Superseded results are left out; of two current results for one cell (a hand-off merge from
    two laptops), the later one counts.
    """
    latest: dict[tuple[int, float, str], LossResult] = {}
    for result in link.results:
        if not result.current:
            continue
        key = (result.fibre, round(result.wavelength_nm, 1), result.direction)
        if key not in latest or result.at >= latest[key].at:
            latest[key] = result
    return sorted(latest.values(), key=lambda r: (r.wavelength_nm, r.fibre, r.direction))


@dataclass(frozen=True)
class FibreOutcome:
    """One fibre at one wavelength: its count and the current results behind it."""

    fibre: int
    wavelength_nm: float
    count: Count
    results: tuple[LossResult, ...]


def fibre_outcomes(link: Link) -> list[FibreOutcome]:
    """Every fibre tested on ``link``, per wavelength, with its count (wavelength, fibre order)."""
    grouped: dict[tuple[float, int], list[LossResult]] = {}
    for result in current_results(link):
        grouped.setdefault((round(result.wavelength_nm, 1), result.fibre), []).append(result)
    return [
        FibreOutcome(
            fibre,
            results[0].wavelength_nm,
            fibre_count(result_count(link, r) for r in results),
            tuple(results),
        )
        for (_, fibre), results in sorted(grouped.items())
    ]


def link_tallies(link: Link) -> dict[float, Tally]:
    """The tally of each wavelength of ``link`` (ascending wavelength)."""
    out: dict[float, Tally] = {}
    for outcome in fibre_outcomes(link):
        out.setdefault(outcome.wavelength_nm, Tally()).add(outcome.count)
    return out


def _nm(value: float) -> str:
    return f"{value:.0f}" if float(value).is_integer() else f"{value:g}"


def result_problems(link: Link) -> list[tuple[LossResult, Count]]:
    """Current results that are not a pass or 'no limit': failures, reference problems, doubts."""
    out = []
    for result in current_results(link):
        count = result_count(link, result)
        if count in ADVICE:
            out.append((result, count))
    return out


def open_items(job: Job) -> list[str]:
    """What is left to do on a job's results, one line each: failures, reference problems and
    results in doubt, as ``Trunk: fibre 6 at 1550 nm B->A: reference problem, clean and
    re-reference``."""
    items: list[str] = []
    for link in job.links:
        for result, count in result_problems(link):
            items.append(
                f"{link.label}: fibre {result.fibre} at {_nm(result.wavelength_nm)} nm "
                f"{arrow(result.direction)}: {ADVICE[count]}"
            )
    return items
