"""The Jobs workspace's detail: the job's head, then its action buttons, what the job holds,
and the note field.

Made and mounted right after the screen's first frame (the list and the head of the job picked
are that frame): these 16 widgets were half of it. What the screen asks of them before (the job
shown, no job) is kept and done as they are made, so the picture they first show is already the
right one, and nothing above them moves when they come.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

from textual.containers import Horizontal
from textual.widget import Widget
from textual.widgets import Button, Input, Static

from fieldkit.tui import jobs_rows, keys
from fieldkit.tui.jobs_rows import ACTION_ROWS, DETAILS, JOB_BUTTONS, done_label
from fieldkit.tui.widgets.compact_input import compact_input

if TYPE_CHECKING:
    from pathlib import Path

    from rich.console import RenderableType

    from fieldkit.jobs.index import JobSummary
    from fieldkit.jobs.models import Job
    from fieldkit.tui.wrapped import Wrapped


class JobDetail:
    """The widgets under the job's head, by name; :meth:`build` makes them, in the order they
    are mounted. What is asked of them before (a job shown, no job) is done once they are
    made, so they come with the right picture."""

    def __init__(self) -> None:
        #: The job's head: in the first frame, made with the screen.
        self.head = Static("Pick a job on the list.", id="job-head")
        self._asked: list[Callable[[], None]] = []
        self.built = False

    def _when_built(self, change: Callable[[], None]) -> None:
        if self.built:
            change()
        else:
            self._asked.append(change)

    def build(self) -> list[Widget]:
        """Make the widgets (once), set as asked so far; returns them in mounting order."""
        if self.built:
            return self.widgets
        self.buttons: dict[str, Button] = {}
        rows: list[Widget] = []
        for row_id, row in ACTION_ROWS:
            buttons = [
                Button(
                    f"{word} {keys.hint(key)}",
                    id=button_id,
                    compact=True,
                    tooltip=keys.tip("jobs", key),
                )
                for button_id, word, key in row
            ]
            self.buttons.update((b.id or "", b) for b in buttons)
            rows.append(Horizontal(*buttons, id=row_id))
        self.texts = {name: Static("", id=f"job-{name}") for name in DETAILS}
        self.note: Input = compact_input(
            placeholder=f"a note, Enter saves ({keys.hint('note')})",
            id="job-note",
            type="text",
        )
        self.note_add = Button("Add note", id="job-note-add", compact=True)
        self.note_error = Static("", id="job-note-error", classes="field-error", markup=False)
        self.widgets: list[Widget] = [
            *rows,
            *self.texts.values(),
            Horizontal(self.note, self.note_add, id="job-note-row"),
            self.note_error,
        ]
        self.built = True
        asked, self._asked = self._asked, []
        for change in asked:
            change()
        return self.widgets

    def blank(self) -> None:
        """No details to show (yet)."""
        self._when_built(self._blank)

    def _blank(self) -> None:
        for text in self.texts.values():
            text.update("")

    def show(self, job: Job) -> None:
        """``job``: its head, counts, failures, links and notes."""
        from fieldkit.tui import jobs_view as view

        self.head.update(view.head(job))
        self._when_built(lambda: self._show(job))

    def show_summary(self, summary: JobSummary) -> None:
        """A job's head from its index summary, until the job is read."""
        self.head.update(jobs_rows.head(summary))
        self.blank()
        self.show_state(summary.status, summary.read_only)

    def failed(self, message: str) -> None:
        """The job could not be read: why, in place of its head."""
        self.head.update(jobs_rows.plain(message, "bold red"))
        self.blank()

    def _show(self, job: Job) -> None:
        from fieldkit.tui import jobs_view as view

        shown: dict[str, RenderableType | Wrapped] = {
            "summary": view.summary_table(job),
            "failures": view.failures_text(job),
            "links": view.links_text(job),
            "notes": view.notes_text(job),
        }
        for name, text in shown.items():
            self.texts[name].update(text)
        self._show_state(job.status, job.read_only)

    def show_state(self, status: str, read_only: str | None) -> None:
        """The Done/Reopen word and which buttons work for a job in ``status``."""
        self._when_built(lambda: self._show_state(status, read_only))

    def _show_state(self, status: str, read_only: str | None) -> None:
        done = self.buttons["job-done"]
        done.label = done_label(status)
        done.refresh(layout=True)  # "Reopen" is wider than "Done"
        for wid in JOB_BUTTONS:
            self._widget(wid).disabled = bool(read_only)
        for wid in ("job-export", "job-delete"):
            self.buttons[wid].disabled = False

    def no_job(self, any_jobs: bool, jobs_dir: Path) -> None:
        """No job in the list: the head says why, the details are blank and the job's
        buttons do nothing."""
        self.head.update(jobs_rows.no_job_head(any_jobs, jobs_dir))
        self._when_built(self._no_job)

    def _no_job(self) -> None:
        self._blank()
        for wid in (*JOB_BUTTONS, "job-export", "job-delete"):
            self._widget(wid).disabled = True

    def _widget(self, wid: str) -> Widget:
        if wid == "job-note":
            return self.note
        if wid == "job-note-add":
            return self.note_add
        return self.buttons[wid]


def filter_buttons(status_label: str, day_label: str) -> list[Button]:
    """The list's two filters, which status and which day (mounted after the first frame)."""
    return [
        Button(status_label, id="jobs-status", compact=True, tooltip=keys.tip("jobs", "filter")),
        Button(day_label, id="jobs-day", compact=True, tooltip=keys.tip("jobs", "today")),
    ]
