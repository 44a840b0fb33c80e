"""The one counting rule's words (fieldkit.jobs.counting): every count listed, in one order,
the nouns agreeing with their numbers, so what a view says adds up to the fibres tested.

The five counts and their order are the project's rule (fieldkit/jobs/counting.py docstring,
review item A1); the plurals are English grammar ("1 reference problem", "2 reference
problems"; "pass", "fail", "in doubt" and "no limit" do not change, review item C39)."""

from __future__ import annotations

import re

from fieldkit.jobs.counting import Count, Tally, count_words, totals_tally


def _sum(words: str) -> int:
    return sum(int(n) for n in re.findall(r"(?:^|, )(\d+) ", words))


def test_every_count_is_listed_and_they_add_up() -> None:
    tally = Tally(passed=70, failed=2, reference_problems=1, in_doubt=5, no_limit=3)
    words = tally.words()
    assert words == "70 pass, 2 fail, 1 reference problem, 5 in doubt, 3 no limit"
    assert _sum(words) == tally.tested == 81


def test_zero_counts_are_said_too_unless_left_out() -> None:
    tally = Tally(passed=0, no_limit=2, reference_problems=1)
    assert tally.words() == "0 pass, 0 fail, 1 reference problem, 0 in doubt, 2 no limit"
    # Where columns are scarce the zeros go, and what is left still adds up.
    assert tally.words(zeros=False, short=True) == "1 bad reference, 2 no limit"
    assert _sum(tally.words(zeros=False)) == tally.tested == 3


def test_plurals_agree() -> None:
    assert count_words(Count.REFERENCE_PROBLEM, 1) == "1 reference problem"
    assert count_words(Count.REFERENCE_PROBLEM, 2) == "2 reference problems"
    assert count_words(Count.REFERENCE_PROBLEM, 2, short=True) == "2 bad references"
    assert count_words(Count.FAIL, 2) == "2 fail"
    assert count_words(Count.IN_DOUBT, 5) == "5 in doubt"


def test_short_words_are_still_words() -> None:
    # Review C33: "bad ref" / "ref?" are not words; the short form says "bad reference".
    short = Tally(reference_problems=1).words(short=True)
    assert "bad reference" in short and "ref?" not in short and "bad ref," not in short


def test_day_totals_read_back_as_a_tally() -> None:
    totals = {"passed": 4, "failed": 1, "reference_problems": 1, "in_doubt": 0, "jobs": 9}
    assert totals_tally(totals).tested == 6


def test_open_items_refusal_agrees_with_its_number() -> None:
    # Review C39: "1 open item(s)" -> "1 open item", "2 open items".
    from fieldkit.actions.jobs import OpenItemsError

    assert str(OpenItemsError(["Trunk: no results yet"])).startswith("1 open item: Trunk")
    assert str(OpenItemsError(["a", "b"])).startswith("2 open items: a; b")
