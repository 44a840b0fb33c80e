"""What the Jobs workspace's buttons and keys do to a job: done or open again (asking about
open items), start or edit a job, add or edit a link, delete into the trash, export, the
end-of-day view.

:class:`JobActionsScreen` is the base of :class:`~fieldkit.tui.screens.jobs.JobsScreen`, which
keeps the list, the find field and the detail. The questions and what an answer means are plain
functions in :mod:`fieldkit.tui.jobs_dialogs`; the changes themselves are
:mod:`fieldkit.actions.jobs` (the CLI's too).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

from textual import on
from textual.widgets import Button

from fieldkit.actions.errors import ActionError
from fieldkit.jobs.errors import StoreError
from fieldkit.tui import jobs_dialogs as dialogs
from fieldkit.tui.jobs_model import JobsModel
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.job_detail import JobDetail
from fieldkit.tui.workspaces import WorkspaceScreen

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job
    from fieldkit.jobs.store import JobStore

__all__ = ["JobActionsScreen"]


class JobActionsScreen(WorkspaceScreen):
    """The job-changing actions. The job shown, the listing and the refresh are
    JobsScreen's (declared here for the type checker only: this class is never used alone)."""

    model: JobsModel
    detail: JobDetail

    @property
    def store(self) -> JobStore:
        return fieldkit_app(self).store

    if TYPE_CHECKING:  # given by JobsScreen, which keeps the list and the detail

        @property
        def _job(self) -> Job | None: ...

        def reload(self, rescan: bool = False) -> None: ...

        def _open(self, job_id: str) -> None: ...

        def _refilter(self) -> None: ...

    def _act(self, change: Callable[[], Job | None], said: Callable[[Job], str]) -> None:
        """Run a change through the actions layer: a refusal is told, never raised; a saved
        job is shown and its row updated."""
        try:
            saved = change()
        except (StoreError, ActionError) as exc:
            self.notify(str(exc), severity="error")
            return
        if saved is not None:
            self._changed(saved)
            self.notify(said(saved))

    @on(Button.Pressed, "#job-done")
    def action_toggle_done(self) -> None:
        from fieldkit.actions.jobs import OpenItemsError, mark_done, reopen

        job = self._job
        if job is None:
            self.notify("No job shown: pick one on the list.", severity="warning")
            return
        by = fieldkit_app(self).operator

        def change() -> Job | None:
            if job.status == "done":
                return reopen(self.store, job.id, by=by)
            try:
                return mark_done(self.store, job.id, by=by)
            except OpenItemsError as exc:
                self._ask(
                    dialogs.open_items_question(job.name, exc.items),
                    lambda answer: self._done_anyway(job.id, answer),
                )
                return None

        self._act(change, lambda saved: dialogs.status_told(saved.name, saved.status))

    def _done_anyway(self, job_id: str, answer: dialogs.Answer) -> None:
        from fieldkit.actions.jobs import mark_done

        reason = dialogs.answered(answer, "done")
        if reason is not None:
            by = fieldkit_app(self).operator
            self._act(
                lambda: mark_done(self.store, job_id, by=by, reason=reason, confirm=True),
                lambda saved: dialogs.status_told(saved.name, "done"),
            )

    def _ask(self, question: dialogs.Question, then: Callable[[dialogs.Answer], None]) -> None:
        from fieldkit.tui.widgets.dialogs import AskDialog  # when first asked, not at start

        self.app.push_screen(
            AskDialog(question.title, question.lines, question.answers, reason=question.reason),
            then,
        )

    def _changed(self, job: Job) -> None:
        self.model.replace(job)
        self.detail.show(job)
        self._refilter()

    # -- start, edit, link, delete ---------------------------------------------------------
    @on(Button.Pressed, "#job-new")
    def action_new_job(self) -> None:
        from fieldkit.tui.widgets.job_forms import JobForm

        self.app.push_screen(JobForm(), self._job_saved)

    @on(Button.Pressed, "#job-edit")
    def action_edit_job(self) -> None:
        from fieldkit.tui.widgets.job_forms import JobForm

        if self._job is None or self._job.read_only:
            return
        self.app.push_screen(JobForm(self._job), self._job_saved)

    def _job_saved(self, job_id: str | None) -> None:
        if job_id is None:
            return
        self.reload()
        self._open(job_id)
        self._refilter()

    @on(Button.Pressed, "#job-link")
    def action_link(self) -> None:
        job = self._job
        if job is None or job.read_only:
            return
        question = dialogs.link_question(job.name, job.links)
        if question is None:
            self._link_chosen(("new", ""))
        else:
            self._ask(question, self._link_chosen)

    def _link_chosen(self, answer: dialogs.Answer) -> None:
        job = self._job
        if job is None:
            return
        wanted, link = dialogs.picked_link(answer, job.links)
        if wanted:
            from fieldkit.tui.widgets.job_forms import LinkForm

            self.app.push_screen(LinkForm(job, link), self._link_saved)

    def _link_saved(self, link_id: str | None) -> None:
        if link_id is not None and self._job is not None:
            self._open(self._job.id)
            if self._job is not None:
                self._changed(self._job)

    @on(Button.Pressed, "#job-delete")
    def action_delete_job(self) -> None:
        job = self._job
        if job is not None:
            job_id = job.id
            self._ask(
                dialogs.delete_question(job.name, job_id, self.store.trash_dir),
                lambda answer: self._delete(job_id, answer),
            )

    def _delete(self, job_id: str, answer: dialogs.Answer) -> None:
        from fieldkit.actions.jobs import delete_job

        if dialogs.answered(answer, "delete") is None:
            return
        try:
            delete_job(self.store, job_id, by=fieldkit_app(self).operator)
        except (StoreError, ActionError) as exc:
            self.notify(str(exc), severity="error")
            return
        self.model.job = None
        self.notify(dialogs.deleted(job_id))
        self.reload()

    @on(Button.Pressed, "#job-export")
    def action_export(self) -> None:
        if self._job is None:
            self.notify("Pick a job first.", severity="warning")
            return
        from fieldkit.tui.widgets.export_dialog import ExportDialog

        self.app.push_screen(ExportDialog(self._job, self.store))

    @on(Button.Pressed, "#job-today")
    def action_end_of_day(self) -> None:
        from fieldkit.tui.screens.jobs_today import EndOfDayScreen

        self.app.push_screen(EndOfDayScreen(), self._picked_from_day)

    def _picked_from_day(self, job_id: str | None) -> None:
        if job_id:
            self._open(job_id)
            self._refilter()
