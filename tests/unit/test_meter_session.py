"""The meter session as a plain model (no Textual): set-up, readings, marks, rechecks, the
summary's wording and the save queue.

Losses are worked by hand from the definition of insertion loss by the power-meter method
(loss = reference level − reading, both in dBm; TIA-526-14 / IEC 61280-4-1, from memory).
"""

from __future__ import annotations

from datetime import timedelta

import pytest

from fieldkit import safety
from fieldkit.actions.meter import (
    Applied,
    ClearReading,
    PutReading,
    ReferenceDetails,
    SetLimit,
    add_reference,
    put_result,
    recheck_reference,
)
from fieldkit.calc import reference as ref
from fieldkit.calc.units import InputError
from fieldkit.inputs import meter_wavelengths
from fieldkit.jobs.models import Job, Link, now
from fieldkit.text.layout import NBSP
from fieldkit.text.numbers import minus
from fieldkit.tui.meter_session import (
    GridColumn,
    MeterSession,
    SaveQueue,
    cell_mark,
    meter_tallies,
)

DETAILS = ReferenceDetails(by="Tester")


def _session(fibres: int = 24, wavelengths: str = "1310 1550") -> MeterSession:
    s = MeterSession()
    s.set_fibres(str(fibres))
    s.set_wavelengths(wavelengths)
    return s


def _type_column(s: MeterSession, column_index: int, losses: list[float], ref_dbm: float) -> None:
    s.column_index = column_index
    s.set_reference(f"{ref_dbm}")
    for fibre, loss in enumerate(losses, start=1):
        s.fibre = fibre
        entered = s.enter(f"{ref_dbm - loss:.2f}", DETAILS)
        assert entered.cell == (fibre, *s.active_column.measured)


def test_summary_of_two_wavelengths_fits_a_phone_terminal() -> None:
    # Was a Pilot test typing 48 readings key by key: the wording is the model's.
    s = _session()
    _type_column(s, 0, [f / 10 for f in range(1, 25)], -7.0)  # 0.10 .. 2.40 dB
    _type_column(s, 1, [f / 10 for f in range(1, 24)] + [-0.2], -7.0)  # fibre 24 negative
    lines = [line.replace(NBSP, " ") for line in s.summary_lines(width=42, open_key="Ctrl+O")]
    assert all(len(line) <= 42 for line in lines), lines
    # No limit typed: every fibre is tested, none passes or fails, all 24 are "no limit" (the
    # parts add up, review A1); the negative one at 1550 nm is a reference problem ("bad
    # reference": still a word where columns are scarce, review C33), never a pass.
    assert lines[1] == "1310 (no limit) 24/24: 24 no limit"
    assert lines[2] == "  worst: fibre 24 2.40 dB"  # a second would not fit 42
    # Too long for one line of 42: the counts go on their own line, "(no limit)" kept.
    assert lines[3:5] == ["1550 nm (no limit): 24/24", "  1 reference problem, 23 no limit"]
    # Review A11: the negative reading (fibre 24) is not among the worst.
    assert lines[5] == "  worst: fibre 23 2.30 dB"
    assert lines[6] == "References:"
    assert lines[0] == "Ctrl+O: choose a job to save into"  # first: never scrolled off
    assert lines[7].endswith("−7.00 dBm, set 0 min ago")  # the one minus (U+2212)


def test_summary_counts_against_a_typed_limit() -> None:
    s = _session(fibres=4, wavelengths="1310")
    s.set_limit("1.5")
    _type_column(s, 0, [0.4, 1.6, -0.1, 1.5], -7.2)
    # 0.4 and 1.5 are within 1.5 dB (at the limit passes); 1.6 fails; -0.1 is a bad reference.
    # Every count listed, so they add up to 4; units on the limit and the losses (review A11).
    lines = [line.replace(NBSP, " ") for line in s.summary_lines(width=0, open_key="Ctrl+O")]
    assert lines[1] == (
        "1310 nm limit 1.50 dB: 4/4, 2 pass, 1 fail, 1 reference problem, 0 in doubt, 0 no limit"
    )
    assert lines[2] == "  worst: fibre 2 1.60 dB, fibre 4 1.50 dB, fibre 1 0.40 dB"
    narrow = [line.replace(NBSP, " ") for line in s.summary_lines(width=42, open_key="Ctrl+O")]
    # 42 columns: the counts go on a line of their own, the zero counts left out.
    assert narrow[1:4] == [
        "1310 nm limit 1.50 dB: 4/4",
        "  2 pass, 1 fail, 1 reference problem",
        "  worst: fibre 2 1.60 dB, fibre 4 1.50 dB",
    ]


def test_invisible_light_caution_stays_once_a_reference_is_set() -> None:
    # Review A3: readings mean live cords all session; the caution is not only for the prompt.
    for narrow in (True, False):
        s = _session(fibres=2, wavelengths="1310")
        assert safety.INVISIBLE_LIGHT_SHORT in s.reference_note(narrow=narrow)[0]
        s.set_reference("-7.2")
        s.enter("-7.5", DETAILS)
        note = s.reference_note(narrow=narrow)[0].splitlines()
        assert note[0] == f"⚠ {safety.INVISIBLE_LIGHT_SHORT}"  # first: never the row cut off
        assert all(len(line) <= 42 for line in note) or not narrow


def test_a_reading_needs_a_reference_and_keeps_nothing_half_done() -> None:
    s = _session(fibres=2, wavelengths="1310")
    assert s.reading_acceptable("")  # Enter on an empty field moves on
    assert not s.reading_acceptable("-8.0")  # no reference yet: the text stays in the field
    entered = s.enter("-8.0", DETAILS)
    assert entered.error and "Set the reference" in entered.message and not s.cells
    s.set_reference("-7.2")
    assert not s.reading_acceptable("5 km")
    assert s.enter("5 km", DETAILS).error
    # ITU-R V.574 (from memory): 50 µW = 10·log10(0.05 mW) = -13.0103 dBm.
    entered = s.enter("50 uW", DETAILS)
    assert entered.cell == (1, 1310.0, "A->B")
    assert s.cells[entered.cell].loss_db == pytest.approx(-7.2 + 13.0103, abs=1e-4)
    assert isinstance(entered.change, PutReading)
    assert entered.change.reference_dbm == -7.2 and entered.change.details.by == "Tester"
    # The reference's set time goes with the reading, so a new reference record is stamped
    # when the reference was set, not when the reading was saved.
    assert entered.change.details.set_at == s.refs[(1310.0, "A->B")].set_at


def test_a_reference_the_field_cannot_read_is_not_used() -> None:
    s = _session(fibres=2, wavelengths="1310")
    s.set_reference("-7.2")
    with pytest.raises(InputError):
        s.set_reference("-7.2 dbx")
    assert s.current_reference is None
    assert s.set_reference("")  # emptied: still none
    assert s.current_reference is None


def test_set_up_fields_refuse_nonsense_naming_the_field() -> None:
    with pytest.raises(InputError, match="twice"):
        meter_wavelengths("1310 1310")
    with pytest.raises(InputError, match="fibre bands"):
        meter_wavelengths("1.31")  # a slipped unit: 1.31 nm
    with pytest.raises(InputError, match="at most 4"):
        meter_wavelengths("850 1300 1310 1490 1550")
    assert meter_wavelengths("1310/1550") == [1310.0, 1550.0]
    s = MeterSession()
    with pytest.raises(InputError, match="fibres"):
        s.set_fibres("6913")  # more than the largest cables made (6,912; common practice)
    with pytest.raises(InputError, match="1 \\(A->B only\\) or 2"):
        s.set_directions("3")
    with pytest.raises(InputError, match="three-cord"):
        s.set_method("four-cord")


def test_enter_walks_down_then_to_the_first_empty_fibre_of_the_next_column() -> None:
    s = _session(fibres=3)
    s.set_reference("-7.0")
    s.fibre = 3
    s.enter("-7.5", DETAILS)
    moved = s.next_empty()
    assert (s.fibre, s.active_column) == (1, GridColumn(1310.0, "A->B"))
    assert "first empty one: fibre 1 1310 A→B" in (moved.message or "")
    for fibre in (1, 2):
        s.fibre = fibre
        s.enter("-7.5", DETAILS)
    s.fibre = 3
    moved = s.next_empty()
    assert moved.column_changed and s.active_column == GridColumn(1550.0, "A->B")
    s.set_reference("-7.0")
    for fibre in (1, 2, 3):
        s.fibre = fibre
        s.enter("-7.5", DETAILS)
    moved = s.next_empty()  # every cell filled: the cursor stays (a number now is a retest)
    assert s.fibre == 3 and "Every fibre has a reading" in (moved.message or "")


def test_both_directions_show_an_average_judged_by_the_worse_direction() -> None:
    s = _session(fibres=2, wavelengths="1310")
    s.set_directions("2")
    s.set_limit("3.85")
    _type_column(s, 0, [1.20, 4.10], -7.20)
    _type_column(s, 1, [1.30, 3.50], -6.90)
    average = GridColumn(1310.0, None)
    # (1.20 + 1.30) / 2 = 1.25 dB; (4.10 + 3.50) / 2 = 3.80 dB, failing: A->B is over 3.85.
    assert s.cell_text(1, average) == ("  1.25  ", "green")
    assert s.cell_text(2, average) == ("  3.80✗ ", "bold red")


def test_in_doubt_keeps_the_verdict_mark_beside_it() -> None:
    assert cell_mark(3.5, ref.Status.FAIL, in_doubt=True) == ("  3.50✗?", "bold red")
    assert cell_mark(-0.2, ref.Status.REFERENCE_PROBLEM, in_doubt=True)[0] == " −0.20!?"
    assert cell_mark(1.1, ref.Status.PASS, in_doubt=True) == ("  1.10 ?", "yellow")
    assert cell_mark(1.1, ref.Status.PASS, in_doubt=False) == ("  1.10  ", "green")


def test_a_drifted_recheck_marks_the_readings_since_the_last_good_check() -> None:
    s = _session(fibres=4, wavelengths="1550")
    s.set_limit("2.0")
    _type_column(s, 0, [1.0, 3.0], -7.0)
    column = s.active_column
    # Single-mode drift tolerance 0.10 dB (common practice): -7.05 is within.
    good = s.apply_recheck(column, -7.05, 0.10, by="Tester")
    assert good.drift.within and not good.doubted
    later = s.refs[column.measured].last_good_at
    s.fibre = 3
    s.enter("-8.0", DETAILS)
    s.cells[(3, 1550.0, "A->B")].at = later + timedelta(seconds=1)
    for key in ((1, 1550.0, "A->B"), (2, 1550.0, "A->B")):
        s.cells[key].at = later - timedelta(seconds=1)  # before the good recheck
    # -7.25 − (-7.00) = -0.25 dB: beyond ±0.10 dB.
    bad = s.apply_recheck(column, -7.25, 0.10, by="Tester")
    assert not bad.drift.within
    assert bad.doubted == [(3, 1550.0, "A->B")]  # only what came after the last good check
    assert s.refs[column.measured].in_doubt
    assert bad.change.level_dbm == -7.25 and bad.change.reference_dbm == -7.0
    # Fibre 2 failed (3.0 > 2.0) before the good check: its mark stays a plain fail.
    assert s.cell_text(2, column) == ("  3.00✗ ", "bold red")
    assert s.cell_text(3, column) == ("  1.00 ?", "yellow")


def test_the_screen_marks_the_same_readings_as_the_job() -> None:
    # The session and fieldkit.actions.meter.recheck_reference put the same results in doubt,
    # also for a reference loaded from a job with a good recheck in its history (the screen's
    # old copy of the rule counted only the reference's own time as its last good check).
    job = Job(name="Campus")
    link = job.add_link("B1 to B2", fibre_count=3)
    start = now() - timedelta(hours=2)
    reference = add_reference(
        link, wavelength_nm=1310, level_dbm=-7.0, method=ref.Method.ONE_CORD, at=start
    )
    for fibre, minutes in ((1, 10), (2, 70)):
        put_result(
            link,
            fibre=fibre,
            wavelength_nm=1310,
            direction="A->B",
            reading_dbm=-8.0,
            reference=reference,
            limit_db=2.0,
            at=start + timedelta(minutes=minutes),
        )
    recheck_reference(
        link, wavelength_nm=1310, level_dbm=-7.02, tolerance_db=0.1, at=start + timedelta(hours=1)
    )
    s = MeterSession()
    s.attach("job", link, DETAILS)
    s.set_wavelengths("1310")
    column = GridColumn(1310.0, "A->B")
    done = s.apply_recheck(column, -7.3, 0.1, by="Tester")
    stored = recheck_reference(link, wavelength_nm=1310, level_dbm=-7.3, tolerance_db=0.1)
    in_doubt = {r.fibre for r in link.results if r.id in stored.in_doubt_ids}
    assert in_doubt == {2}
    assert {fibre for fibre, _w, _d in done.doubted} == in_doubt


def test_a_negative_loss_stands_until_it_is_dealt_with() -> None:
    s = _session(fibres=4, wavelengths="1310")
    s.set_reference("-7.2")
    entered = s.enter("-7.05", DETAILS)  # -7.20 − (-7.05) = -0.15 dB
    assert entered.error and "negative" in entered.message
    assert "fibre 1 1310 A→B: −0.15 dB, negative" in (s.problem_words() or "")
    # Beside its own verdict it is not said twice; in 42 columns it fits one line.
    assert s.problem_words(besides=entered.message) is None
    assert len(s.problem_words(short=True) or "") <= 42
    s.next_empty()
    s.enter("-8.0", DETAILS)  # the next reading does not take the word away
    assert s.problem_words() is not None
    s.fibre = 1
    s.enter("-8.1", DETAILS)  # retested: dealt with
    assert s.problem_words() is None
    s.fibre = 3
    s.enter("-7.0", DETAILS)
    assert s.clear_cell(by="Tester") is not None  # removed: dealt with
    assert s.problem_words() is None
    s.enter("-7.0", DETAILS)
    s.set_reference("-6.9")  # a new reference, as the advice says: dealt with
    assert s.problem_words() is None


def test_clearing_and_limits_become_typed_changes() -> None:
    s = _session(fibres=2, wavelengths="1310")
    s.set_reference("-7.0")
    s.enter("-8.0", DETAILS)
    change = s.clear_cell(by="Tester")
    assert isinstance(change, ClearReading) and change.fibre == 1 and change.by == "Tester"
    assert s.clear_cell(by="Tester") is None  # nothing left to remove
    assert s.set_limit("1.5") == 1310.0
    assert s.set_limit("1.5") is None  # shown again: no change
    assert s.limit_changes(1310.0) == [SetLimit(1310.0, 1.5, ref.Method.ONE_CORD)]


def test_save_queue_one_saver_and_nothing_lost_on_failure() -> None:
    q = SaveQueue()
    first = ClearReading(1, 1310.0, "A->B")
    second = ClearReading(2, 1310.0, "A->B")
    assert q.put(first)  # start a saver
    assert not q.put(second)  # one is running: it takes this with its next batch
    assert not q.claim()
    batch = q.take()
    assert batch == [first, second] and q.unsaved == 2
    q.failed("disk full")
    assert q.unsaved == 2 and q.error == "disk full" and not q.busy  # kept
    assert q.put(None)  # the next entry starts a saver again
    batch = q.take()
    q.done(batch, now())
    assert q.unsaved == 0 and q.error is None and q.take() == [] and not q.busy


def test_a_save_gives_the_session_the_jobs_reference_ids() -> None:
    s = _session(fibres=2, wavelengths="1310")
    s.set_reference("-7.0")
    s.enter("-8.0", DETAILS)
    drift = ref.reference_drift(-7.0, -7.3, 0.1)
    warnings = s.saved(
        Applied(reference_ids={(1310.0, "A->B", -7.0): "R1"}, rechecks=[("1310 A->B", drift, 1)])
    )
    assert s.refs[(1310.0, "A->B")].reference_id == "R1"
    assert warnings == [minus(f"1310 A->B: {drift.message} (1 result marked in doubt)")]


def test_a_number_on_its_way_is_no_error_but_a_wrong_unit_is() -> None:
    s = MeterSession()
    for partial in ("-", "-8", "-8.", "-8,2", "+", "−7"):
        assert s.typing_problem(partial) is None, partial
    assert "length" in (s.typing_problem("5 km") or "")  # a length, not a power
    assert s.typing_problem("50 uW") is None


# -- what the screen asks the session (moved down from the screen) ---------------------------
def test_typed_ahead_readings_are_drawn_once_with_the_last_message() -> None:
    """A burst of readings costs one view: every cell taken is drawn, the newest message is
    said, and where the cursor went speaks over the reading's own error."""
    from fieldkit.tui.meter_session import Entered, Moved, PendingView

    view = PendingView()
    assert view.add(Entered("fibre 1: 1.00 dB", cell=(1, 1310.0, "A->B")), Moved())
    assert not view.add(Entered("negative loss", True, (2, 1310.0, "A->B")), Moved())
    cells, say = view.take()
    assert cells == [(1, 1310.0, "A->B"), (2, 1310.0, "A->B")] and say == ("negative loss", True)
    assert view.take() == ([], None) and not view.pending
    assert view.add(Entered("bad", True, (3, 1310.0, "A->B")), Moved("column 1550 next"))
    assert view.take()[1] == ("column 1550 next", False)


def test_typing_goes_to_the_reference_until_the_column_has_one() -> None:
    s = _session(fibres=2, wavelengths="1310")
    assert s.work_field == "reference"
    s.set_reference("-7.0")
    assert s.work_field == "reading"


def test_a_recheck_asks_about_the_active_columns_reference() -> None:
    s = _session(fibres=2, wavelengths="1310")
    with pytest.raises(InputError, match="No reference set for 1310"):
        s.recheck_asked()
    s.set_reference("-7.0")
    column, level_dbm, tolerance_db = s.recheck_asked()
    assert column.wavelength_nm == 1310.0 and level_dbm == -7.0
    assert tolerance_db == ref.default_drift_tolerance_db(1310.0)  # the one common-practice figure


def test_removing_a_reading_says_which() -> None:
    s = _session(fibres=2, wavelengths="1310")
    s.set_reference("-7.0")
    s.enter("-8.0", DETAILS)
    s.fibre = 1
    assert s.clear_cell(by="Tester") is not None
    assert s.cleared_words() == f"fibre 1 {s.active_column.heading}: reading removed"


def test_a_failed_save_says_the_readings_stay_and_a_drift_warns() -> None:
    s = _session(fibres=2, wavelengths="1310")
    [(text, severity)] = s.save_notices("disk full")
    assert severity == "error" and text.endswith(": disk full") and "kept here" in text
    drift = ref.reference_drift(-7.0, -7.3, 0.1)  # 0.3 dB beyond a 0.1 dB tolerance
    notices = s.save_notices(Applied(rechecks=[("1310 A->B", drift, 2)]))
    text = "1310 A->B: reference drift −0.30 dB is beyond ±0.10 dB"  # -7.3 − (-7.0)
    assert notices[0][0].startswith(text) and notices[0][0].endswith("(2 results marked in doubt)")
    assert notices[0][1] == "warning"


def test_the_history_needs_a_job_and_names_the_fibre_and_link(tmp_path) -> None:
    from fieldkit.jobs.store import JobStore

    store = JobStore(tmp_path)
    job = Job(name="Station Road")
    link = job.add_link("L1")
    s = _session(fibres=2, wavelengths="1310")
    with pytest.raises(InputError, match="no job chosen"):
        s.history(store)
    with pytest.raises(InputError):
        s.read_link(store, "0000000000000000", "nope")  # no such job: the store's words
    store.save(job)
    s.attach(job.id, store.load(job.id).link(link.id), DETAILS)
    title, lines = s.history(store)
    assert title == "Fibre 1 on L1" and lines == [
        "No reading of this fibre is saved in the job yet."
    ]


def test_a_set_up_change_says_when_the_grid_is_drawn_again() -> None:
    s = _session(fibres=2, wavelengths="1310")
    fibres = s.change_field("fibres", "4")
    assert fibres is not None and fibres.grid and fibres.redraw
    s.set_reference("-7.0")
    s.enter("-8.0", DETAILS)
    limit = s.change_field("limit", "1.5")  # a stored result judged again: drawn again
    assert limit is not None and limit.limits and limit.redraw and not limit.grid


def test_a_stored_result_keeps_the_limit_it_was_judged_with_after_ctrl_s() -> None:
    # Review F1 #1: attaching to a job whose 1550 nm result was judged against 4.0 dB showed it
    # as "no limit" while the job file (and Jobs) had it failed. The loss is reference − reading
    # (IEC 61280-4-1): -7.5 − (-11.76) = 4.26 dB, over 4.0 dB: a fail.
    job = Job(name="North Reservoir")
    link = job.add_link("feed", fibre_count=5)
    reference = add_reference(link, wavelength_nm=1550, level_dbm=-7.5, method=ref.Method.ONE_CORD)
    stored = put_result(
        link,
        fibre=5,
        wavelength_nm=1550,
        direction="A->B",
        reading_dbm=-11.76,
        reference=reference,
        limit_db=4.0,
    )
    assert stored.passed is False  # the job's own verdict
    s = _session(fibres=5, wavelengths="1310 1550")
    s.set_limit("1.5")  # typed for 1310 only
    s.attach(job.id, link, DETAILS)
    assert s.limit_db(1550.0) == 4.0 and s.limit_text[1550.0] == "4"
    assert s.limit_db(1310.0) == 1.5  # the typed limit is not touched
    tally = meter_tallies(s.cells, {1550.0: s.limit_db(1550.0)}, s.fibres, s.directions)[1550.0]
    assert (tally.failed, tally.no_limit) == (1, 0)
    text, _style = s.cell_text(5, GridColumn(1550.0, "A->B")) or ("", "")
    assert text.strip() == "4.26✗"  # the fail mark (text/meter.py MARKS)


def _campus_with_one_result(limit_db: float | None) -> tuple[Job, Link]:
    """A job whose 2-fibre link holds a 1310 nm one-cord reference and fibre 1's A->B result."""
    job = Job(name="Campus")
    link = job.add_link("B1 to B2", fibre_count=2)
    reference = add_reference(link, wavelength_nm=1310, level_dbm=-7.0, method=ref.Method.ONE_CORD)
    put_result(
        link,
        fibre=1,
        wavelength_nm=1310,
        direction="A->B",
        reading_dbm=-8.0,
        reference=reference,
        limit_db=limit_db,
    )
    return job, link


def test_a_typed_limit_wins_over_the_stored_one() -> None:
    job, link = _campus_with_one_result(limit_db=0.5)
    s = _session(fibres=2, wavelengths="1310")
    s.set_limit("2.0")
    s.attach(job.id, link, DETAILS)
    assert s.limit_db(1310.0) == 2.0 and s.limit_text[1310.0] == "2.0"


def test_set_the_reference_first_is_stale_once_a_job_brings_the_reference() -> None:
    # Review F1 #5: "Set the reference for 1550 A→B first" stayed after Ctrl+S loaded it.
    job, link = _campus_with_one_result(limit_db=None)
    s = _session(fibres=2, wavelengths="1310")
    refused = s.enter("-8.2", DETAILS)
    assert refused.error and refused.message.startswith("Set the reference for 1310 A→B first")
    assert not s.reference_arrived()  # still none
    s.attach(job.id, link, DETAILS)
    assert s.reference_arrived() and not s.reference_arrived()  # once
