"""What the Jobs workspace asks and says around a change: the questions its dialogs put, how an
answer is read, and the lines told after. Plain text, no Textual: the screen
(``fieldkit.tui.screens.jobs``) shows these in its dialogs and notifications. Tested at unit
speed (tests/unit/test_jobs_dialogs.py).
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, NamedTuple

from fieldkit.text.words import counted

if TYPE_CHECKING:
    from fieldkit.jobs.models import Link

#: An answer of an AskDialog: (its id, the reason typed), None when dismissed.
Answer = tuple[str, str] | None


class Question(NamedTuple):
    """What an AskDialog shows: a title, lines, the answers offered (id, words) and, when it
    asks for one, what the reason field says."""

    title: str
    lines: list[str]
    answers: list[tuple[str, str]]
    reason: str | None = None


def restore_hint(job_id: str) -> str:
    """The command that brings a deleted job back."""
    return f"'fieldkit jobs restore {job_id[:8]}' brings it back."


def delete_question(name: str, job_id: str, trash_dir: Path) -> Question:
    return Question(
        f"Delete {name}?",
        [
            f"It moves to the trash folder ({trash_dir}); nothing is destroyed. "
            + restore_hint(job_id)
        ],
        [("delete", "Move to the trash")],
    )


def deleted(job_id: str) -> str:
    return f"Moved to the trash; {restore_hint(job_id)}"


def open_items_question(name: str, items: Sequence[str]) -> Question:
    """Asked when a job with open items is marked done: done anyway, with a reason."""
    return Question(
        f"{name} has {counted(len(items), 'open item')}",
        list(items),
        [("done", "Mark done anyway")],
        reason="why (noted in the job's log)",
    )


def status_told(name: str, status: str) -> str:
    """Told once a job is marked done or reopened."""
    return f"{name}: {status}"


def link_question(name: str, links: Sequence[Link]) -> Question | None:
    """Add a link or edit one; None when the job has none (a new one is started at once)."""
    if not links:
        return None
    return Question(
        "Add a link, or edit one",
        [f"Links of {name}:"],
        [("new", "New link")] + [(f"edit-{link.id}", link.label) for link in links],
    )


def picked_link(answer: Answer, links: Sequence[Link]) -> tuple[bool, Link | None]:
    """What the link question's ``answer`` opens: (True, None) for a new link, (True, link)
    to edit that one, (False, None) for nothing (dismissed, or a link gone meanwhile)."""
    if answer is None:
        return False, None
    if answer[0] == "new":
        return True, None
    link_id = answer[0].removeprefix("edit-")
    link = next((item for item in links if item.id == link_id), None)
    return link is not None, link


def answered(answer: Answer, wanted: str) -> str | None:
    """The reason typed when ``answer`` is ``wanted`` ("" when none was typed), else None."""
    if answer is None or answer[0] != wanted:
        return None
    return answer[1]


def note_problem(text: str, job_shown: bool) -> str | None:
    """Why a note cannot be saved yet, or None when it can."""
    if not job_shown:
        return "Pick a job first."
    if not text.strip():
        return "Type the note first."
    return None


def goes_to_find(character: str | None, printable: bool) -> bool:
    """A key typed on the job list that goes on in the find field: a printable character
    other than a space (Space and Enter open the job on the list)."""
    return printable and character not in (None, " ")
