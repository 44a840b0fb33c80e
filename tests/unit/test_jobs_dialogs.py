"""What the Jobs workspace asks and says around a change (fieldkit.tui.jobs_dialogs), and the
words of its buttons (fieldkit.tui.jobs_rows). No Textual here."""

from __future__ import annotations

from pathlib import Path

from fieldkit.jobs.models import Link
from fieldkit.tui import jobs_dialogs as dialogs
from fieldkit.tui import jobs_rows, keys

JOB_ID = "de30000000000004"


def test_delete_asks_and_says_how_to_restore() -> None:
    question = dialogs.delete_question("Station Road", JOB_ID, Path("/data/trash"))
    assert question.title == "Delete Station Road?"
    assert question.answers == [("delete", "Move to the trash")] and question.reason is None
    (line,) = question.lines
    assert "/data/trash" in line and "nothing is destroyed" in line
    # the id's first 8 characters are what `fieldkit jobs restore` takes
    assert "'fieldkit jobs restore de300000' brings it back." in line
    assert dialogs.deleted(JOB_ID).endswith("'fieldkit jobs restore de300000' brings it back.")


def test_done_with_open_items_asks_why() -> None:
    question = dialogs.open_items_question("Feed repair", ["fibre 3 fails", "no reference"])
    assert question.title == "Feed repair has 2 open items"
    assert dialogs.open_items_question("X", ["one"]).title == "X has 1 open item"
    assert question.lines == ["fibre 3 fails", "no reference"]
    assert question.answers == [("done", "Mark done anyway")] and question.reason


def test_an_answer_is_taken_only_when_it_is_the_one_wanted() -> None:
    assert dialogs.answered(("done", "customer asked"), "done") == "customer asked"
    assert dialogs.answered(("done", ""), "done") == ""  # a reason is not required
    assert dialogs.answered(None, "done") is None  # dismissed: nothing happens
    assert dialogs.answered(("go", ""), "done") is None


def test_link_question_lists_the_links_and_the_answer_opens_one() -> None:
    links = [Link(id="l1" * 8, label="SR-SPUR"), Link(id="l2" * 8, label="SR-MAIN")]
    assert dialogs.link_question("job", []) is None  # no links: a new one at once
    question = dialogs.link_question("job", links)
    assert question is not None
    assert question.answers == [("new", "New link"), (f"edit-{'l1' * 8}", "SR-SPUR"),
                                (f"edit-{'l2' * 8}", "SR-MAIN")]  # fmt: skip
    assert dialogs.picked_link(("new", ""), links) == (True, None)
    assert dialogs.picked_link((f"edit-{'l2' * 8}", ""), links) == (True, links[1])
    assert dialogs.picked_link(("edit-gone", ""), links) == (False, None)  # removed meanwhile
    assert dialogs.picked_link(None, links) == (False, None)


def test_a_note_needs_a_job_and_words() -> None:
    assert dialogs.note_problem("cable pulled", job_shown=False) == "Pick a job first."
    assert dialogs.note_problem("   ", job_shown=True) == "Type the note first."
    assert dialogs.note_problem("cable pulled", job_shown=True) is None


def test_which_keys_on_the_list_go_on_in_the_find_field() -> None:
    assert dialogs.goes_to_find("r", printable=True)
    assert not dialogs.goes_to_find(" ", printable=True)  # Space acts on the list
    assert not dialogs.goes_to_find(None, printable=False)  # arrows, Enter


def test_done_button_says_reopen_for_a_done_job() -> None:
    assert jobs_rows.done_label("open") == f"Done {keys.hint('done')}"
    assert jobs_rows.done_label("done") == f"Reopen {keys.hint('done')}"
    ids = [button for _, row in jobs_rows.ACTION_ROWS for button, _, _ in row]
    assert set(jobs_rows.JOB_BUTTONS) - {"job-note", "job-note-add"} <= set(ids)
