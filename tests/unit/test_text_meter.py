"""The meter's lines (fieldkit.text.meter) at unit speed: the summary of a session's readings,
the save line, a cell's mark. Insertion loss = reference level - measured level (IEC 61280-4-2);
a negative loss is a bad reference, not a good fibre (DESIGN.md section 4, common practice)."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

from fieldkit.calc import reference as ref
from fieldkit.jobs.counting import Tally, cell_count, fibre_count
from fieldkit.text.layout import NBSP
from fieldkit.text.meter import ReferenceShown, cell_mark, save_line, summary_lines

AT = datetime(2026, 12, 2, 15, 0, tzinfo=UTC)
# fibres 1-4 at 1310 nm, one direction, limit 1.50 dB (a 1.5 dB channel limit: common practice)
READINGS = [(1, 1310.0, "A->B", 0.42), (2, 1310.0, "A->B", 1.81), (3, 1310.0, "A->B", -0.20)]
LIMITS: dict[float, float | None] = {1310.0: 1.5, 1550.0: None}


def _tallies() -> dict[float, Tally]:
    tally = Tally()
    for _f, _w, _d, loss in READINGS:
        tally.add(fibre_count([cell_count(loss, 1.5)]))
    return {1310.0: tally, 1550.0: Tally()}


def _summary(width: int) -> list[str]:
    return summary_lines(
        width=width,
        save="Saving into L1: saved 14:59:10",
        wavelengths=[1310.0, 1550.0],
        fibres=4,
        directions=["A->B"],
        readings=READINGS,
        limits_db=LIMITS,
        tallies=_tallies(),
        references=[ReferenceShown(1310.0, "A->B", -7.2, AT - timedelta(minutes=42), True)],
        at=AT,
    )


def test_the_summary_counts_every_tested_fibre_and_names_the_worst() -> None:
    lines = [line.replace(NBSP, " ") for line in _summary(0)]
    assert lines[0] == "Saving into L1: saved 14:59:10"  # first: is it safe in the job
    head = lines[1]
    assert head.startswith("1310 nm limit 1.50 dB: 3/4, ")
    # 3 tested = 1 pass + 1 fail + 1 reference problem (the one counting rule)
    assert "1 pass" in head and "1 fail" in head and "1 reference problem" in head
    # the negative loss is never among the worst: it is a bad reference
    assert lines[2] == "  worst: fibre 2 1.81 dB, fibre 1 0.42 dB"
    assert lines[3] == "1550 nm (no limit): no readings"
    assert lines[4:] == ["References:", "  1310 −7.20 dBm, set 42 min ago DRIFTED"]


def test_narrow_summaries_drop_zero_counts_then_move_them_to_their_own_line() -> None:
    wide = _summary(0)[1]
    at_42 = _summary(42)[1].replace(NBSP, " ")
    assert "0 in doubt" in wide.replace(NBSP, " ") and "0 in doubt" not in at_42
    assert len(at_42) <= 42  # a phone terminal's 42 columns
    at_30 = [line.replace(NBSP, " ") for line in _summary(30)]
    assert at_30[1] == "1310 nm limit 1.50 dB: 3/4"
    # the counts on their own line still add up to the 3 tested; only their commas may wrap
    assert at_30[2] == "  1 pass, 1 fail, 1 reference problem"
    assert all(len(piece) <= 30 for piece in at_30[2].split(", "))
    assert len(at_30[3]) <= 30 and at_30[3].startswith("  worst: fibre 2 1.81 dB")


def test_the_save_line_says_whether_readings_are_safe() -> None:
    def line(label: str | None, pending: int = 0, error: str | None = None) -> str:
        return save_line(label, pending=pending, error=error, saved_at=None, open_key="^O")

    assert line(None) == "^O: choose a job to save into"
    assert line("L1") == "Saving into L1"
    assert line("L1", 2) == "Saving into L1: 2 waiting"
    assert line("L1", 2, "disk full") == "NOT SAVED (2 waiting): disk full"


def test_a_failing_cell_in_doubt_keeps_its_fail_mark() -> None:
    assert cell_mark(3.5, ref.Status.FAIL, in_doubt=True) == ("  3.50✗?", "bold red")
    assert cell_mark(0.3, ref.Status.PASS, in_doubt=True) == ("  0.30 ?", "yellow")


def test_the_reference_note_counts_the_methods_end_connections() -> None:
    """IEC 61280-4-1 / -4-2: a one-cord reference includes both end connections in the loss,
    two-cord one, three-cord none (TIA-526-14 Methods B, A, C)."""
    from fieldkit import safety
    from fieldkit.text.meter import reference_note, set_reference_note

    one = reference_note(
        ref.Method.ONE_CORD, narrow=False, budget_limit_db=2.1, drifted=False, warnings=[]
    )
    first, last = one.split("\n")
    assert first == f"⚠ {safety.INVISIBLE_LIGHT_SHORT}"  # the light caution stays, first
    assert "2 of 2 end connections counted" in last and "limit 2.10 dB from the budget" in last
    three = reference_note(
        ref.Method.THREE_CORD, narrow=True, budget_limit_db=2.1, drifted=True, warnings=["w"]
    ).split("\n")
    assert three[1].startswith("This reference drifted") and three[2] == "⚠ w"
    assert "0 of 2 end connections counted" in three[3]
    assert three[4] == "limit 2.10 dB: budget less 2 connections"
    typed = reference_note(
        ref.Method.TWO_CORD, narrow=False, budget_limit_db=None, drifted=False, warnings=[]
    )
    assert typed.endswith("1 of 2 end connections counted")  # a typed limit: no budget words
    assert set_reference_note("1310 A→B", narrow=True).startswith("Set Ref 1310 A→B")
    assert all(len(x) <= 42 for x in set_reference_note("1310 A→B", narrow=True).split("\n"))


def test_a_drift_beyond_its_tolerance_says_retest_in_42_columns() -> None:
    from fieldkit.text.meter import recheck_words

    # 0.30 dB drift against a ±0.10 dB tolerance (a common-practice figure)
    words = recheck_words("1310 A→B", ref.Drift(0.3, 0.1, False), short=True)
    assert words == "1310 A→B: drift +0.30 > ±0.10 dB: retest" and len(words) <= 42
    assert "within" in recheck_words("1310 A→B", ref.Drift(0.05, 0.1, True))


def test_more_under_reference_details_only_while_they_are_folded() -> None:
    # Review F1 #5: the note pointed under the details while they were open.
    from fieldkit.text.meter import set_reference_note

    assert "(more under Reference details)" in set_reference_note("1310 A→B", narrow=False)
    shown = set_reference_note("1310 A→B", narrow=False, details_open=True)
    assert "Reference details" not in shown and shown.startswith("Set the reference")
