"""The jobs workspace: find a job, read its links, results and notes, add a note, finish it,
export it; Ctrl+G opens the end-of-day view.

Keys come from the key table (fieldkit.tui.keys) and work while a field has focus: Ctrl+F find,
Ctrl+L note, Ctrl+D done or open, Ctrl+W export, Ctrl+G end of day.

The first frame needs no job record (pydantic and the records are a tenth of the start-up): the
list comes from the index's summaries, and the job picked shows its head from its summary; the
job itself is read right after that frame (or at once when a key needs it before then). The
detail under the head (its buttons, what the job holds, the note field:
:class:`~fieldkit.tui.widgets.job_detail.JobDetail`) is mounted right after that frame too.

What the job buttons and keys do to a job (done, new, edit, link, delete, export, end of day)
and the questions they ask are in its base class, :mod:`.jobs_actions`. Every change goes
through :mod:`fieldkit.actions` (which saves with ``JobStore.update``: reload,
apply, save under the job's lock), so a note typed here and a result saved by another program at
the same moment are both kept, and the CLI writes the same records for the same work.
"""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.events import Key
from textual.widgets import Button, Input, OptionList, Static
from textual.widgets.option_list import Option
from textual.worker import Worker, WorkerState

from fieldkit.actions.errors import ActionError
from fieldkit.jobs.errors import StoreError
from fieldkit.jobs.ids import now
from fieldkit.jobs.search import local_date
from fieldkit.tui import jobs_dialogs as dialogs
from fieldkit.tui import jobs_rows, keys
from fieldkit.tui.jobs_model import JobsModel
from fieldkit.tui.screens.jobs_actions import JobActionsScreen
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.compact_input import compact_input
from fieldkit.tui.widgets.job_detail import JobDetail, filter_buttons
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job

__all__ = ["JobsScreen"]


def _import_records() -> None:
    """What reading and showing a job imports (run on a thread after the first frame)."""
    import fieldkit.jobs.jobfile  # noqa: F401  (pydantic, the models, the migrations)
    import fieldkit.tui.jobs_view  # noqa: F401  (the details' text)


class JobsScreen(JobActionsScreen):
    """List and filter jobs; the chosen job's details beside (wide) or below (narrow).

    Focus opens on the job list: arrows move it, Enter opens the job's details, and typing
    a letter there goes on in the find field (Down from the find field comes back)."""

    CSS_PATH = "jobs.tcss"
    AUTO_FOCUS = "#jobs-list"
    BINDINGS = keys.bindings("jobs")

    workspace_complete = False  # until the detail under the head is mounted

    def __init__(self) -> None:
        super().__init__()
        self.model = JobsModel()
        self.detail = JobDetail()

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Horizontal(id="jobs-body"):
            with Vertical(id="jobs-side"):
                yield compact_input(
                    placeholder="find: name, site, crew, date",
                    tooltip="Words from the name, customer, site, crew or a link; a day "
                    f"as YYYY-MM-DD ({keys.display('find')})",
                    id="jobs-filter",
                    type="text",
                    # A letter typed on the list lands here: it must not be selected and
                    # replaced by the next one (Ctrl+F selects the whole text instead).
                    select_on_focus=False,
                )
                yield Horizontal(id="jobs-filters")  # its buttons come after the first frame
                yield Static("", id="jobs-count", classes="field-note")
                yield OptionList(id="jobs-list", markup=False)
            with VerticalScroll(id="job-detail"):
                yield self.detail.head
        yield KeyFooter()

    def on_mount(self) -> None:
        self.reload()
        self.call_after_refresh(self._mount_detail)

    def _mount_detail(self) -> None:
        self.run_worker(self._mount_detail_now(), group="jobs-detail")

    async def _mount_detail_now(self) -> None:
        model = self.model
        await self.query_one("#jobs-filters").mount_all(
            filter_buttons(model.status_label, model.day_label)
        )
        await self.query_one("#job-detail").mount_all(self.detail.build())
        self.whole_workspace_mounted()
        # The job is read once the workspace is whole: the records' import on its thread
        # would otherwise compete with mounting the detail.
        self._after_first_frame()

    def on_screen_resume(self) -> None:
        # Another workspace (or program) may have saved onto a job meanwhile. The resumes that
        # come with the first showing follow the listing made at mount: three listings and
        # three loads of the job shown were a sixth of the start.
        if not self._before_first_frame:
            self.reload()

    # -- data ------------------------------------------------------------------------------
    @property
    def _job(self) -> Job | None:
        """The job shown; a job shown from its summary (before the first frame) is read now."""
        if self.model.job is None and self.model.pending_id is not None:
            self._load(self.model.pending_id)
        return self.model.job

    def reload(self, rescan: bool = False) -> None:
        model = self.model
        for message, severity in model.relist(self.store, rescan):
            timeout = 10 if severity == "warning" else None  # a skipped file: time to read
            self.notify(message, severity=severity, timeout=timeout, markup=False)
        self._refilter()
        if model.job is not None:
            self._open(model.job.id)

    def _refilter(self) -> None:
        model = self.model
        page = model.page(self.query_one("#jobs-filter", Input).value, local_date(now()))
        options = self.query_one("#jobs-list", OptionList)
        options.clear_options()
        options.add_options([Option(jobs_rows.prompt(s), id=s.id) for s in page.shown])
        self.query_one("#jobs-count", Static).update(page.count_line)
        if page.picked is not None:
            options.highlighted = page.picked
            # The details always show a job of the visible list, so keys act on what is seen.
            if page.picked_id != model.job_id:
                self._open(page.shown[page.picked].id)
        else:
            self._clear_detail()
        for button in self.query("#jobs-filters Button").results(Button):
            button.label = model.status_label if button.id == "jobs-status" else model.day_label

    def _clear_detail(self) -> None:
        """No job in the list: the details say so and the job's keys do nothing."""
        self.model.job = None
        self.model.pending_id = None
        self.detail.no_job(bool(self.model.summaries), self.store.jobs_dir)

    def _open(self, job_id: str) -> None:
        # Before the first frame, the job's head comes from its summary and the job is read
        # right after the frame: the list is on screen and takes keys without waiting for the
        # records to be imported.
        if self._before_first_frame and self._show_summary(job_id):
            return
        self._load(job_id)

    def _load(self, job_id: str) -> None:
        self.model.pending_id = None
        try:
            job = self.store.load(job_id)
        except StoreError as exc:
            self.model.job = None
            self.detail.failed(str(exc))
            return
        self.model.job = job
        self.detail.show(job)

    def _show_summary(self, job_id: str) -> bool:
        """Show the job's head from its summary until the job is read; False when it is not
        listed."""
        summary = next((s for s in self.model.summaries if s.id == job_id), None)
        if summary is None:
            return False
        if self.model.pending_id is None:
            self.call_after_refresh(self._after_first_frame)
        self.model.job = None
        self.model.pending_id = job_id
        self.detail.show_summary(summary)
        return True

    def _after_first_frame(self) -> None:
        # Called with the first frame's other after-refresh callbacks: go on once they have
        # run, so the frame and what follows it come first.
        self.call_later(self._import_records)

    def _import_records(self) -> None:
        """Read the job shown; the records are imported on a thread first (pydantic and the
        models take ~80 ms), so keys typed meanwhile (a find, a move in the list) are answered
        at once. A key that needs the job before then reads it where it is (see ``_job``)."""
        if not self.workspace_complete:
            return  # asked again once the detail is mounted
        if self.model.job is not None or self.model.pending_id is None:
            return
        if "fieldkit.jobs.models" in sys.modules:  # already imported: the rest is quick
            self._load_pending()
            return
        self.run_worker(
            _import_records,
            name="jobs-records",
            group="jobs-records",
            thread=True,
            exit_on_error=False,
        )

    @on(Worker.StateChanged)
    def _records_imported(self, event: Worker.StateChanged) -> None:
        # A failed import is raised again, and told, by the read itself.
        if event.worker.name == "jobs-records" and event.state in (
            WorkerState.SUCCESS,
            WorkerState.ERROR,
        ):
            self._load_pending()

    def _load_pending(self) -> None:
        if self.model.job is None and self.model.pending_id is not None:
            self._load(self.model.pending_id)

    # -- events ------------------------------------------------------------------------------
    def on_key(self, event: Key) -> None:
        """Typing on the list goes on in the find field; Down or Up in the find field moves
        the list (arrows move lists wherever focus is)."""
        focused = self.focused
        options = self.query_one("#jobs-list", OptionList)
        find = self.query_one("#jobs-filter", Input)
        if focused is options and dialogs.goes_to_find(event.character, event.is_printable):
            event.stop()
            event.prevent_default()
            find.focus()
            find.insert_text_at_cursor(event.character or "")
        elif focused is find and event.key in ("down", "up") and options.option_count:
            event.stop()
            event.prevent_default()
            options.focus()  # on the job shown: the next Down moves on from it

    @on(Input.Changed, "#jobs-filter")
    def _filter_changed(self) -> None:
        self._refilter()

    @on(Input.Submitted, "#jobs-filter")
    def _filter_submitted(self) -> None:
        options = self.query_one("#jobs-list", OptionList)
        if options.option_count:
            options.focus()
            if options.highlighted is None:
                options.highlighted = 0

    @on(OptionList.OptionHighlighted, "#jobs-list")
    def _highlighted(self, event: OptionList.OptionHighlighted) -> None:
        if event.option_id and self.model.job_id != event.option_id:
            self._open(event.option_id)

    @on(OptionList.OptionSelected, "#jobs-list")
    def _selected(self, event: OptionList.OptionSelected) -> None:
        if event.option_id:
            if self.model.job_id != event.option_id:
                self._open(event.option_id)
            self.query_one("#job-detail").focus()

    @on(Input.Submitted, "#job-note")
    @on(Button.Pressed, "#job-note-add")
    def _add_note(self) -> None:
        field, error = self.detail.note, self.detail.note_error
        job = self._job
        problem = dialogs.note_problem(field.value, job is not None)
        if problem is not None or job is None:
            error.update(problem or "")
            return
        from fieldkit.actions.jobs import add_note

        try:
            saved, _note = add_note(
                self.store, job.id, field.value.strip(), by=fieldkit_app(self).operator
            )
        except (StoreError, ActionError) as exc:
            error.update(jobs_rows.plain(f"Not saved: {exc}"))  # the typed text stays in the field
            return
        error.update("")
        field.value = ""
        self._changed(saved)

    @on(Button.Pressed, "#jobs-status")
    def action_cycle_status(self) -> None:
        self.model.cycle_status()
        self._refilter()

    @on(Button.Pressed, "#jobs-day")
    def action_toggle_today(self) -> None:
        self.model.toggle_today()
        self._refilter()

    def action_focus_filter(self) -> None:
        find = self.query_one("#jobs-filter", Input)
        find.focus()
        find.select_all()  # typing replaces the last search

    def action_focus_list(self) -> None:
        self.query_one("#jobs-list", OptionList).focus()

    def action_focus_note(self) -> None:
        self.when_whole(lambda: self.detail.note.focus())

    def action_reload(self) -> None:
        self.reload(rescan=True)
