"""A dialog to choose where a result goes: an open job and one of its links.

Pushed by the workspaces for "save onto a job's link"::

    def picked(choice: tuple[str, str] | None) -> None:
        if choice:
            job_id, link_id = choice
            self.app.store.update(job_id, lambda job: job.link(link_id).results.append(...))

    self.app.push_screen(JobLinkPicker(), picked)

Open jobs are listed; Ctrl+Y (or the "Done jobs" button) lists the done ones too, after them
(a retest onto a finished job, or a budget saved on one). Dismisses with ``(job_id, link_id)``,
or None when cancelled. A new link (by label) or a new
job (by name) can be made from the dialog, through :mod:`fieldkit.actions.jobs`; a new job is
made only when its first link is chosen, so cancelling creates nothing.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual import events, on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.text.escape import terminal
from fieldkit.tui import keys
from fieldkit.tui.typed import fieldkit_app

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job
    from fieldkit.jobs.store import JobStore


class JobLinkPicker(ModalScreen[tuple[str, str] | None]):
    """Pick an open job, then a link of it (or type a new link label and press Enter)."""

    DEFAULT_CSS = """
    JobLinkPicker {
        align: center middle;
    }
    JobLinkPicker > #jlp-dialog {
        width: 90%;
        max-width: 76;
        height: auto;
        max-height: 100%;
        border: round $accent;
        background: $surface;
        padding: 0 1;
    }
    JobLinkPicker #jlp-title {
        text-style: bold;
        width: 1fr;
    }
    JobLinkPicker .jlp-heading {
        color: $text-muted;
        margin-top: 1;
    }
    JobLinkPicker #jlp-jobs-row {
        height: 1;
        margin-top: 1;
    }
    JobLinkPicker #jlp-jobs-row .jlp-heading {
        margin-top: 0;
        width: 1fr;
    }
    JobLinkPicker OptionList {
        height: auto;
        max-height: 6;
        background: $boost;
        text-wrap: nowrap;
        text-overflow: ellipsis;
    }
    JobLinkPicker Input {
        margin: 0;
    }
    JobLinkPicker #jlp-message {
        color: $warning;
        height: auto;
    }
    JobLinkPicker #jlp-buttons {
        height: 1;
        align-horizontal: right;
        margin: 1 0 0 0;
    }
    JobLinkPicker #jlp-buttons Button {
        margin-left: 1;
        min-width: 10;
    }
    """

    BINDINGS = keys.bindings("jobs_picker")

    def __init__(
        self,
        store: JobStore | None = None,
        *,
        job_id: str | None = None,
        link_id: str | None = None,
        pick_first: bool = True,
        title: str = "Save onto a job's link",
        confirm: str = "Save here",
    ) -> None:
        super().__init__()
        self._confirm = confirm  # the button's word: "Save here", or "Open" to open a record
        self._store = store
        self._initial_job = job_id
        self._initial_link = link_id
        # False: with no (listed) ``job_id`` nothing is picked, so Enter cannot save onto a
        # job the caller did not choose
        self._pick_first = pick_first
        self._title = title
        self._jobs: dict[str, Job] = {}
        self._job_id: str | None = None
        self._pending_job = ""  # a new job's name, made with its first link
        self.show_done = False  # done jobs listed too (after the open ones)

    @property
    def store(self) -> JobStore:
        if self._store is None:
            self._store = self.app.store  # type: ignore[attr-defined]
        return self._store

    def compose(self) -> ComposeResult:
        with Vertical(id="jlp-dialog"):
            yield Label(self._title, id="jlp-title")
            with Horizontal(id="jlp-jobs-row"):
                yield Label("Open jobs", classes="jlp-heading", id="jlp-jobs-heading")
                yield Button(
                    f"Done jobs {keys.hint('filter')}",
                    id="jlp-done",
                    compact=True,
                    tooltip=keys.tip("jobs_picker", "filter"),
                )
            yield OptionList(id="jlp-jobs", compact=True, markup=False)
            yield Input(placeholder="or a new job name, Enter", id="jlp-new-job", compact=True)
            yield Label("Link", classes="jlp-heading", id="jlp-links-heading")
            yield OptionList(id="jlp-links", compact=True, markup=False)
            yield Input(placeholder="or a new link label, Enter", id="jlp-new-link", compact=True)
            yield Static("", id="jlp-message")
            with Horizontal(id="jlp-buttons"):
                yield Button("Cancel", id="jlp-cancel", compact=True)
                yield Button(self._confirm, id="jlp-ok", variant="primary", compact=True)

    def on_mount(self) -> None:
        self._reload_jobs(select=self._initial_job, link=self._initial_link)

    # -- data --------------------------------------------------------------------------
    def _reload_jobs(self, select: str | None = None, link: str | None = None) -> None:
        from fieldkit.jobs.store import StoreError

        jobs_list = self.query_one("#jlp-jobs", OptionList)
        jobs_list.clear_options()
        self._jobs.clear()
        wanted = ("open", "done") if self.show_done else ("open",)
        try:
            listed = [s for s in self.store.list() if s.status in wanted and not s.read_only]
        except (StoreError, OSError) as exc:
            self._say(f"The jobs could not be listed: {exc}")
            listed = []
        # Open jobs first, each group newest first (the listing's order).
        summaries = sorted(listed, key=lambda s: s.status != "open")
        self.query_one("#jlp-jobs-heading", Label).update(
            "Open and done jobs" if self.show_done else "Open jobs"
        )
        self.query_one(
            "#jlp-done", Button
        ).label = f"{'Hide' if self.show_done else 'Show'} done {keys.hint('filter')}"
        for summary in summaries:
            where = f" · {summary.site}" if summary.site else ""
            mark = "✓ " if summary.status == "done" else ""
            done = " (done)" if summary.status == "done" else ""
            jobs_list.add_option(
                Option(terminal(f"{mark}{summary.name}{where}{done}"), id=summary.id)
            )
        if not summaries:
            none = "No job yet" if self.show_done else "No open job yet"
            self._say(f"{none}: type a job name and press Enter.")
            self.query_one("#jlp-new-job", Input).focus()
            self._show_links(None)
            return
        ids = [s.id for s in summaries]
        jobs_list.focus()
        if select not in ids and not self._pick_first:
            jobs_list.highlighted = None
            self._show_links(None)
            self._say("Pick the job (Enter), then its link.")
            return
        index = ids.index(select) if select in ids else 0
        jobs_list.highlighted = index
        self._show_links(ids[index], select=link)

    def _show_links(self, job_id: str | None, select: str | None = None) -> None:
        from fieldkit.jobs.store import StoreError

        self._job_id = job_id
        if job_id is not None:
            self._pending_job = ""
        links = self.query_one("#jlp-links", OptionList)
        links.clear_options()
        if job_id is None:
            return
        try:
            job = self.store.load(job_id)
        except StoreError as exc:
            self._say(str(exc))
            return
        self._jobs[job_id] = job
        for link in job.links:
            ends = f" ({link.end_a} – {link.end_b})" if link.end_a or link.end_b else ""
            links.add_option(Option(terminal(f"{link.label}{ends}"), id=link.id))
        done = " It is marked done; what you save is added to it." if job.status == "done" else ""
        if job.links:
            ids = [link.id for link in job.links]
            links.highlighted = ids.index(select) if select in ids else 0
            self._say(done.strip())
        else:
            self._say(f"This job has no link yet: type a label and press Enter.{done}")

    def _say(self, text: str) -> None:
        self.query_one("#jlp-message", Static).update(text)

    # -- events --------------------------------------------------------------------------
    @on(OptionList.OptionHighlighted, "#jlp-jobs")
    def _job_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        if event.option_id and event.option_id != self._job_id:
            self._show_links(event.option_id)

    @on(OptionList.OptionSelected, "#jlp-jobs")
    def _job_selected(self, event: OptionList.OptionSelected) -> None:
        if event.option_id != self._job_id:
            self._show_links(event.option_id)
        links = self.query_one("#jlp-links", OptionList)
        if links.option_count:
            links.focus()
        else:
            self.query_one("#jlp-new-link", Input).focus()

    @on(OptionList.OptionSelected, "#jlp-links")
    def _link_selected(self, event: OptionList.OptionSelected) -> None:
        if self._job_id and event.option_id:
            self.dismiss((self._job_id, event.option_id))

    @on(Input.Submitted, "#jlp-new-job")
    def _new_job(self, event: Input.Submitted) -> None:
        from fieldkit.actions.errors import ActionError, check_text

        try:
            name = check_text(event.value, "job name")
        except ActionError as exc:
            self._say(str(exc))
            return
        if not name:
            self._say("Type a name for the new job.")
            return
        # Made with its first link (Enter there, or Save here); Cancel leaves nothing behind.
        self._pending_job = name
        self._job_id = None
        self.query_one("#jlp-links", OptionList).clear_options()
        self._say(f"New job {name!r}: type its first link's label and press Enter.")
        self.query_one("#jlp-new-link", Input).focus()

    @on(Input.Submitted, "#jlp-new-link")
    def _new_link(self, event: Input.Submitted) -> None:
        choice = self._make_link(event.value)
        if choice:
            self.dismiss(choice)

    def _make_link(self, text: str) -> tuple[str, str] | None:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.jobs import LinkFields, add_link, create_job
        from fieldkit.jobs.store import StoreError

        label = text.strip()
        if self._job_id is None and not self._pending_job:
            self._say("Pick a job first (or type a new job name).")
            return None
        if not label:
            self._say("Type a label for the new link (e.g. the two ends).")
            return None
        by = fieldkit_app(self).operator
        try:
            if self._job_id is None:
                created = create_job(self.store, self._pending_job, by=by)
                for warning in created.warnings:
                    self.app.notify(warning, severity="warning")
                self._job_id = created.job.id
                self._pending_job = ""
                existing = None
            else:
                existing = self.store.load(self._job_id).link_by_label(label)
            if existing is not None:
                return (self._job_id, existing.id)
            _job, link = add_link(self.store, self._job_id, LinkFields(label=label), by=by)
        except (StoreError, ActionError) as exc:
            self._say(str(exc))
            return None
        return (self._job_id, link.id)

    def on_key(self, event: events.Key) -> None:
        """A character typed on a list goes on in the field under it (the new job's name, the
        new link's label), as on the Jobs list; Space and Enter still choose on the list."""
        if not event.is_printable or event.character in (None, " "):
            return
        fields = {"jlp-jobs": "#jlp-new-job", "jlp-links": "#jlp-new-link"}
        focused = self.focused
        if not isinstance(focused, OptionList) or focused.id not in fields:
            return
        event.stop()
        event.prevent_default()
        field = self.query_one(fields[focused.id], Input)
        # Focused by typing, the field must not select its text: the next key would replace
        # what was just typed.
        field.select_on_focus = False
        field.focus()
        field.insert_text_at_cursor(event.character or "")

    @on(Button.Pressed, "#jlp-ok")
    def _ok(self) -> None:
        new_label = self.query_one("#jlp-new-link", Input).value
        if new_label.strip():
            choice = self._make_link(new_label)
            if choice:
                self.dismiss(choice)
            return
        links = self.query_one("#jlp-links", OptionList)
        if self._job_id is None or links.highlighted is None:
            self._say("Pick a job and a link, or type a new link label.")
            return
        option = links.get_option_at_index(links.highlighted)
        if option.id:
            self.dismiss((self._job_id, option.id))

    @on(Button.Pressed, "#jlp-done")
    def action_toggle_done(self) -> None:
        """List the done jobs too, or open jobs only; the job picked stays picked if listed."""
        self.show_done = not self.show_done
        self._reload_jobs(select=self._job_id)

    @on(Button.Pressed, "#jlp-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)
