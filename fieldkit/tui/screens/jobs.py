"""The jobs workspace: find a job, read its links, results and notes, add a note, finish it,
export it; Ctrl+G opens the end-of-day view.

Keys come from the key table (fieldkit.tui.keys) and work while a field has focus: Ctrl+F find,
Ctrl+L note, Ctrl+D done or open, Ctrl+W export, Ctrl+G end of day.

Every change goes through :mod:`fieldkit.actions` (which saves with ``JobStore.update``: reload,
apply, save under the job's lock), so a note typed here and a result saved by another program at
the same moment are both kept, and the CLI writes the same records for the same work.
"""

from __future__ import annotations

from pathlib import Path

from rich.console import Group, RenderableType
from rich.table import Table
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen, Screen
from textual.widgets import Button, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.actions.errors import ActionError
from fieldkit.jobs.models import Job, now
from fieldkit.jobs.reports import (
    EXPORT_FORMATS,
    failures,
    fmt_db,
    fmt_m,
    fmt_nm,
    fmt_time,
    job_summary,
    result_in_doubt,
    verdict,
)
from fieldkit.jobs.search import JobFinder
from fieldkit.jobs.splices import closure_summary
from fieldkit.jobs.store import JobStore, JobSummary, StoreError, local_date
from fieldkit.jobs.today import counted
from fieldkit.text.escape import terminal
from fieldkit.tui import keys
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.dialogs import AskDialog
from fieldkit.tui.widgets.job_forms import JobForm, LinkForm
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

#: How many matching jobs the list shows at once; typing in the filter narrows the rest.
PAGE = 200

_STATUS_CYCLE = {None: "open", "open": "done", "done": None}


def _t(text: str, style: str = "") -> Text:
    """User text as plain text: a "[" in a job name must not be read as markup."""
    return Text(terminal(text, multiline=True), style=style)


class JobsScreen(Screen[None]):
    """List and filter jobs; the chosen job's details beside (wide) or below (narrow)."""

    CSS_PATH = "jobs.tcss"
    AUTO_FOCUS = "#jobs-filter"
    BINDINGS = keys.bindings("jobs")

    def __init__(self) -> None:
        super().__init__()
        self._summaries: list[JobSummary] = []
        self._finder: JobFinder | None = None
        self._status: str | None = None
        self._today_only = False
        self._job: Job | None = None
        self._quarantined = 0

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Horizontal(id="jobs-body"):
            with Vertical(id="jobs-side"):
                yield Input(
                    placeholder="find: name, site, crew, date",
                    tooltip="Words from the name, customer, site, crew or a link; a day "
                    f"as YYYY-MM-DD ({keys.display('find')})",
                    id="jobs-filter",
                    type="text",
                    compact=True,
                )
                with Horizontal(id="jobs-filters"):
                    yield Button(
                        "All jobs",
                        id="jobs-status",
                        compact=True,
                        tooltip=keys.tip("jobs", "filter"),
                    )
                    yield Button(
                        "Any day",
                        id="jobs-day",
                        compact=True,
                        tooltip="Only today's jobs, or every day",
                    )
                yield Static("", id="jobs-count", classes="field-note")
                yield OptionList(id="jobs-list", markup=False)
            with VerticalScroll(id="job-detail"):
                yield Static("Pick a job on the list.", id="job-head")
                # At hand without scrolling: on a phone terminal the footer has no room for them.
                with Horizontal(id="job-actions"):
                    yield Button(
                        f"Done {keys.hint('done')}",
                        id="job-done",
                        compact=True,
                        tooltip=keys.tip("jobs", "done"),
                    )
                    yield Button(
                        f"Export {keys.hint('export')}",
                        id="job-export",
                        compact=True,
                        tooltip=keys.tip("jobs", "export"),
                    )
                    yield Button(
                        f"End of day {keys.hint('result')}",
                        id="job-today",
                        compact=True,
                        tooltip=keys.tip("jobs", "result"),
                    )
                with Horizontal(id="job-manage"):
                    yield Button(
                        f"New {keys.hint('new')}",
                        id="job-new",
                        compact=True,
                        tooltip=keys.tip("jobs", "new"),
                    )
                    yield Button(
                        f"Edit {keys.hint('edit')}",
                        id="job-edit",
                        compact=True,
                        tooltip=keys.tip("jobs", "edit"),
                    )
                    yield Button(
                        f"Link {keys.hint('add')}",
                        id="job-link",
                        compact=True,
                        tooltip=keys.tip("jobs", "add"),
                    )
                    yield Button(
                        f"Delete {keys.hint('remove')}",
                        id="job-delete",
                        compact=True,
                        tooltip=keys.tip("jobs", "remove"),
                    )
                yield Static("", id="job-summary")
                yield Static("", id="job-failures")
                yield Static("", id="job-links")
                yield Static("", id="job-notes")
                with Horizontal(id="job-note-row"):
                    yield Input(
                        placeholder=f"a note, Enter saves ({keys.hint('note')})",
                        id="job-note",
                        type="text",
                        compact=True,
                    )
                    yield Button("Add note", id="job-note-add", compact=True)
                yield Static("", id="job-note-error", classes="field-error", markup=False)
        yield KeyFooter()

    def on_mount(self) -> None:
        self.reload()

    def on_screen_resume(self) -> None:
        # Another workspace (or program) may have saved onto a job meanwhile.
        self.reload()

    # -- data ------------------------------------------------------------------------------
    @property
    def store(self) -> JobStore:
        return fieldkit_app(self).store

    def reload(self, rescan: bool = False) -> None:
        try:
            self._summaries = self.store.list(rescan=rescan)
        except (StoreError, OSError) as exc:
            self._summaries = []
            self.notify(
                terminal(f"The jobs could not be listed: {exc}"), severity="error", markup=False
            )
        try:
            self._quarantined = len(self.store.quarantined())
        except OSError:
            self._quarantined = 0
        for problem in self.store.problems:
            self.notify(terminal(problem), severity="warning", timeout=10, markup=False)
        self.store.problems.clear()
        self._refilter()
        if self._job is not None:
            self._open(self._job.id)

    def _matching(self) -> list[JobSummary]:
        if self._finder is None or self._finder.summaries is not self._summaries:
            self._finder = JobFinder(self._summaries)  # answers as the filter is typed
        text = self.query_one("#jobs-filter", Input).value
        day = local_date(now()) if self._today_only else None
        return self._finder.find(text, self._status, day)

    def _refilter(self) -> None:
        matches = self._matching()
        options = self.query_one("#jobs-list", OptionList)
        keep = self._job.id if self._job else None
        options.clear_options()
        shown = matches[:PAGE]
        options.add_options([Option(_prompt(s), id=s.id) for s in shown])
        more = f", first {PAGE} shown: type to narrow" if len(matches) > PAGE else ""
        held = (
            f", {self._quarantined} set aside (fieldkit jobs quarantine)"
            if (self._quarantined)
            else ""
        )
        self.query_one("#jobs-count", Static).update(
            f"{len(matches)} of {len(self._summaries)} jobs{more}{held}"
        )
        ids = [s.id for s in shown]
        if keep in ids:
            options.highlighted = ids.index(keep)
        elif ids:
            # The details always show a job of the visible list, so keys act on what is seen.
            options.highlighted = 0
            self._open(ids[0])
        else:
            self._clear_detail()
        self.query_one("#jobs-status", Button).label = {
            None: "All jobs",
            "open": "Open jobs",
            "done": "Done jobs",
        }[self._status]
        self.query_one("#jobs-day", Button).label = "Today" if self._today_only else "Any day"

    def _clear_detail(self) -> None:
        """No job in the list: the details say so and the job's keys do nothing."""
        self._job = None
        if not self._summaries:
            where = self.store.jobs_dir
            head = (
                f"No jobs yet. {keys.display('new')} (or New) starts one: its name, customer, "
                f"site and crew; then its links. Jobs are kept in {where}."
            )
        else:
            head = "No job matches; clear the find field (Ctrl+F) to see them all."
        self.query_one("#job-head", Static).update(_t(head))
        for name in ("summary", "failures", "links", "notes"):
            self.query_one(f"#job-{name}", Static).update("")
        for wid in ("#job-note", "#job-note-add", "#job-done", "#job-export"):
            self.query_one(wid).disabled = True
        for wid in ("#job-edit", "#job-link", "#job-delete"):
            self.query_one(wid).disabled = True

    def _open(self, job_id: str) -> None:
        try:
            job = self.store.load(job_id)
        except StoreError as exc:
            self._job = None
            self.query_one("#job-head", Static).update(_t(str(exc), "bold red"))
            for name in ("summary", "failures", "links", "notes"):
                self.query_one(f"#job-{name}", Static).update("")
            return
        self._job = job
        self._show(job)

    def _show(self, job: Job) -> None:
        self.query_one("#job-head", Static).update(_head(job))
        self.query_one("#job-summary", Static).update(_summary_table(job))
        self.query_one("#job-failures", Static).update(_failures(job))
        self.query_one("#job-links", Static).update(_links(job))
        self.query_one("#job-notes", Static).update(_notes(job))
        self.query_one("#job-done", Button).label = (
            f"Reopen {keys.hint('done')}" if job.status == "done" else f"Done {keys.hint('done')}"
        )
        read_only = bool(job.read_only)
        for wid in ("#job-note", "#job-note-add", "#job-done", "#job-edit", "#job-link"):
            self.query_one(wid).disabled = read_only
        for wid in ("#job-export", "#job-delete"):
            self.query_one(wid).disabled = False

    # -- events ------------------------------------------------------------------------------
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
        if event.option_id and (self._job is None or self._job.id != event.option_id):
            self._open(event.option_id)

    @on(OptionList.OptionSelected, "#jobs-list")
    def _selected(self, event: OptionList.OptionSelected) -> None:
        if event.option_id:
            if self._job is None or self._job.id != event.option_id:
                self._open(event.option_id)
            self.query_one("#job-detail").focus()

    @on(Input.Submitted, "#job-note")
    @on(Button.Pressed, "#job-note-add")
    def _add_note(self) -> None:
        field = self.query_one("#job-note", Input)
        error = self.query_one("#job-note-error", Static)
        text = field.value.strip()
        if self._job is None:
            error.update("Pick a job first.")
            return
        if not text:
            error.update("Type the note first.")
            return

        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.jobs import add_note

        try:
            job, _note = add_note(self.store, self._job.id, text, by=fieldkit_app(self).operator)
        except (StoreError, ActionError) as exc:
            error.update(_t(f"Not saved: {exc}"))  # the typed text stays in the field
            return
        error.update("")
        field.value = ""
        self._job = job
        self._show(job)
        self._update_summary(job)

    def _update_summary(self, job: Job) -> None:
        fresh = JobSummary.of(job)
        self._summaries = [fresh if s.id == job.id else s for s in self._summaries]
        self._summaries.sort(key=lambda s: (s.updated_iso, s.id), reverse=True)
        self._refilter()

    @on(Button.Pressed, "#jobs-status")
    def action_cycle_status(self) -> None:
        self._status = _STATUS_CYCLE[self._status]
        self._refilter()

    @on(Button.Pressed, "#jobs-day")
    def action_toggle_today(self) -> None:
        self._today_only = not self._today_only
        self._refilter()

    @on(Button.Pressed, "#job-done")
    def action_toggle_done(self) -> None:
        from fieldkit.actions.jobs import OpenItemsError, mark_done, reopen

        job = self._job
        if job is None:
            self.notify("No job shown: pick one on the list.", severity="warning")
            return
        by = fieldkit_app(self).operator
        try:
            if job.status == "done":
                saved = reopen(self.store, job.id, by=by)
            else:
                saved = mark_done(self.store, job.id, by=by)
        except OpenItemsError as exc:
            self.app.push_screen(
                AskDialog(
                    f"{job.name} has {len(exc.items)} open item(s)",
                    exc.items,
                    [("done", "Mark done anyway")],
                    reason="why (noted in the job's log)",
                ),
                lambda answer: self._done_anyway(job.id, answer),
            )
            return
        except (StoreError, ActionError) as exc:
            self.notify(str(exc), severity="error")
            return
        self._changed(saved)
        self.notify(f"{saved.name}: {saved.status}")

    def _done_anyway(self, job_id: str, answer: tuple[str, str] | None) -> None:
        from fieldkit.actions.jobs import mark_done

        if answer is None or answer[0] != "done":
            return
        try:
            saved = mark_done(
                self.store, job_id, by=fieldkit_app(self).operator, reason=answer[1], confirm=True
            )
        except (StoreError, ActionError) as exc:
            self.notify(str(exc), severity="error")
            return
        self._changed(saved)
        self.notify(f"{saved.name}: done")

    def _changed(self, job: Job) -> None:
        self._job = job
        self._show(job)
        self._update_summary(job)

    # -- start, edit, link, delete ---------------------------------------------------------
    @on(Button.Pressed, "#job-new")
    def action_new_job(self) -> None:
        self.app.push_screen(JobForm(), self._job_saved)

    @on(Button.Pressed, "#job-edit")
    def action_edit_job(self) -> None:
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
        if not job.links:
            self.app.push_screen(LinkForm(job), self._link_saved)
            return
        answers = [("new", "New link")] + [(f"edit-{link.id}", link.label) for link in job.links]
        self.app.push_screen(
            AskDialog("Add a link, or edit one", [f"Links of {job.name}:"], answers),
            self._link_chosen,
        )

    def _link_chosen(self, answer: tuple[str, str] | None) -> None:
        job = self._job
        if answer is None or job is None:
            return
        choice = answer[0]
        if choice == "new":
            self.app.push_screen(LinkForm(job), self._link_saved)
            return
        link_id = choice.removeprefix("edit-")
        link = next((item for item in job.links if item.id == link_id), None)
        if link is not None:
            self.app.push_screen(LinkForm(job, link), self._link_saved)

    def _link_saved(self, link_id: str | None) -> None:
        if link_id is not None and self._job is not None:
            self._open(self._job.id)
            if self._job is not None:
                self._update_summary(self._job)

    @on(Button.Pressed, "#job-delete")
    def action_delete_job(self) -> None:
        job = self._job
        if job is None:
            return
        self.app.push_screen(
            AskDialog(
                f"Delete {job.name}?",
                [
                    f"It moves to the trash folder ({self.store.trash_dir}); nothing is "
                    f"destroyed. 'fieldkit jobs restore {job.id[:8]}' brings it back."
                ],
                [("delete", "Move to the trash")],
            ),
            lambda answer: self._delete(job.id, answer),
        )

    def _delete(self, job_id: str, answer: tuple[str, str] | None) -> None:
        from fieldkit.actions.jobs import delete_job

        if answer is None or answer[0] != "delete":
            return
        try:
            delete_job(self.store, job_id, by=fieldkit_app(self).operator)
        except (StoreError, ActionError) as exc:
            self.notify(str(exc), severity="error")
            return
        self._job = None
        self.notify(f"Moved to the trash; 'fieldkit jobs restore {job_id[:8]}' brings it back.")
        self.reload()

    @on(Button.Pressed, "#job-export")
    def action_export(self) -> None:
        if self._job is None:
            self.notify("Pick a job first.", severity="warning")
            return
        self.app.push_screen(ExportDialog(self._job, self.store))

    @on(Button.Pressed, "#job-today")
    def action_end_of_day(self) -> None:
        from fieldkit.tui.screens.jobs_today import EndOfDayScreen

        self.app.push_screen(EndOfDayScreen(), self._picked_from_day)

    def _picked_from_day(self, job_id: str | None) -> None:
        if job_id:
            self._open(job_id)
            self._refilter()

    def action_focus_filter(self) -> None:
        self.query_one("#jobs-filter", Input).focus()

    def action_focus_list(self) -> None:
        self.query_one("#jobs-list", OptionList).focus()

    def action_focus_note(self) -> None:
        self.query_one("#job-note", Input).focus()

    def action_reload(self) -> None:
        self.reload(rescan=True)


def _prompt(s: JobSummary) -> str:
    mark = "✓" if s.status == "done" else "•"
    failed = f", {s.failed_count} failed" if s.failed_count else ""
    site = f"{terminal(s.site)} · " if s.site else ""
    return f"{mark} {terminal(s.name)}\n  {site}{counted(s.result_count, 'result')}{failed}"


def _head(job: Job) -> RenderableType:
    text = Text()
    text.append(terminal(job.name), style="bold")
    text.append(f"  [{job.status}]", style="green" if job.status == "done" else "yellow")
    for label, value in (
        ("Customer", job.customer),
        ("Site", job.site),
        ("Crew", ", ".join(job.crew)),
    ):
        if value:
            text.append(f"\n{label}: ", style="dim")
            text.append(terminal(value))
    text.append(f"\nId {job.id} · updated {fmt_time(job.updated_at)}", style="dim")
    if job.read_only:
        text.append(f"\n{job.read_only}", style="bold yellow")
    return text


def _summary_table(job: Job) -> RenderableType:
    """Per link and wavelength, in lines that wrap at 44 columns instead of a wide table."""
    rows = job_summary(job)
    if not rows:
        return _t("No results yet.", "dim")
    text = Text("Fibres per link and wavelength", style="bold")
    for r in rows:
        text.append(f"\n{terminal(r.link_label)} {fmt_nm(r.wavelength_nm)} nm: ")
        text.append(f"{r.tested} tested, {r.passed} pass")
        text.append(f", {r.failed} fail", style="bold red" if r.failed else "")
        if r.no_limit:
            text.append(f", {r.no_limit} no limit")
        if r.in_doubt:
            text.append(f", {r.in_doubt} in doubt", style="yellow")
    return text


def _failures(job: Job) -> RenderableType:
    failed = failures(job)
    if not failed:
        return _t("No failures.", "green") if job.results() else ""
    text = Text("Failures", style="bold red")
    for link, r in failed:
        limit = f" (limit {fmt_db(r.limit_db)} dB)" if r.limit_db is not None else ""
        text.append(
            f"\n✗ {terminal(link.label)} fibre {r.fibre} {fmt_nm(r.wavelength_nm)} nm "
            f"{r.direction}: {fmt_db(r.loss_db)} dB{limit}",
            style="red",
        )
    return text


def _links(job: Job) -> RenderableType:
    parts: list[RenderableType] = []
    for link in job.links:
        head = Text(f"\nLink {terminal(link.label)}", style="bold")
        details = [
            d
            for d in (
                f"{link.end_a} → {link.end_b}" if link.end_a or link.end_b else "",
                link.fibre_type,
                f"{fmt_m(link.length_m)} m" if link.length_m is not None else "",
                f"{link.fibre_count} fibres" if link.fibre_count else "",
            )
            if d
        ]
        if details:
            head.append("\n" + terminal(" · ".join(details)), style="dim")
        parts.append(head)
        if link.budget is not None:
            b = link.budget
            line = "; ".join(
                f"{fmt_nm(w.wavelength_nm)} nm {fmt_db(w.loss_db)} dB" for w in b.wavelengths
            )
            parts.append(_t(f"Budget (max): {line}; margin {fmt_db(b.margin_db)} dB"))
        for f in link.faults:
            parts.append(
                _t(
                    f"Fault: route {fmt_m(f.route_distance_m)} m (search "
                    f"{fmt_m(f.low_m)}–{fmt_m(f.high_m)} m)"
                    + (f", near {f.nearest_landmark}" if f.nearest_landmark else ""),
                    "bold magenta",
                )
            )
        for closure in link.closures:
            parts.append(_t("Closure " + closure_summary(closure, link.splice_limits)))
        if link.results:
            table = Table(box=None, padding=(0, 1), show_edge=False, expand=False)
            for name in ("Fib", "nm", "Dir", "Loss dB", "Limit", "Result"):
                table.add_column(name, justify="left" if name in ("Dir", "Result") else "right")
            ordered = sorted(link.results, key=lambda r: (r.wavelength_nm, r.fibre, r.at))
            for r in ordered:
                doubt = result_in_doubt(link, r)
                flag = " ?" if doubt else ""
                if "negative-loss" in r.flags:
                    flag += " neg"
                style = "bold red" if r.passed is False else "yellow" if doubt else ""
                table.add_row(
                    str(r.fibre),
                    fmt_nm(r.wavelength_nm),
                    r.direction,
                    fmt_db(r.loss_db),
                    fmt_db(r.limit_db),
                    verdict(r) + flag,
                    style=style,
                )
            parts.append(table)
        elif not link.faults:
            parts.append(_t("no results yet", "dim"))
    if not parts:
        return _t(
            "\nNo links yet: the budget, meter and fault workspaces add them when "
            "they save onto this job.",
            "dim",
        )
    return Group(*parts)


def _notes(job: Job) -> RenderableType:
    text = Text("\nNotes", style="bold")
    if not job.notes:
        text.append("\nnone yet", style="dim")
    for note in job.notes:
        text.append(f"\n{fmt_time(note.at)}", style="dim")
        if note.by:
            text.append(f" {terminal(note.by)}", style="dim")
        text.append(f"\n  {terminal(note.text, multiline=True)}")
    return text


class ExportDialog(ModalScreen[Path | None]):
    """Choose a format and a file; the report is written there."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="jobs_export.cancel")]

    def __init__(self, job: Job, store: JobStore) -> None:
        super().__init__()
        self._job = job
        self._store = store
        self._folder = default_export_folder()

    def compose(self) -> ComposeResult:
        with Vertical(id="export-dialog"):
            yield Label(Text(f"Export {terminal(self._job.name)}"), id="export-title")
            yield OptionList(
                *[Option(_FORMAT_NAMES[f], id=f) for f in EXPORT_FORMATS],
                id="export-format",
                markup=False,
            )
            yield Label("File", classes="field-note")
            yield Input(str(self._path("html")), id="export-path", type="text", compact=True)
            yield Static("", id="export-error", classes="field-error", markup=False)
            with Horizontal(id="export-buttons"):
                yield Button("Cancel", id="export-cancel", compact=True)
                yield Button("Write", id="export-write", variant="primary", compact=True)

    def on_mount(self) -> None:
        formats = self.query_one("#export-format", OptionList)
        formats.highlighted = EXPORT_FORMATS.index("html")
        formats.focus()

    def _path(self, fmt: str) -> Path:
        return self._folder / f"{self._job.id}.{fmt}"

    @on(OptionList.OptionHighlighted, "#export-format")
    def _format_changed(self, event: OptionList.OptionHighlighted) -> None:
        field = self.query_one("#export-path", Input)
        current = Path(field.value)
        if event.option_id and current.parent == self._folder:
            field.value = str(self._path(event.option_id))

    @on(OptionList.OptionSelected, "#export-format")
    @on(Input.Submitted, "#export-path")
    @on(Button.Pressed, "#export-write")
    def _write(self) -> None:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.export import export_job

        formats = self.query_one("#export-format", OptionList)
        fmt = EXPORT_FORMATS[formats.highlighted or 0]
        text = self.query_one("#export-path", Input).value.strip()
        error = self.query_one("#export-error", Static)
        if not text or text == "-":
            error.update("Type a file name.")
            return
        try:
            done = export_job(self._store, self._job.id, fmt, text)
        except (ActionError, StoreError) as exc:
            error.update(_t(f"Not written: {exc}"))
            return
        except OSError as exc:
            error.update(_t(f"Not written: {exc.strerror or exc}"))
            return
        self.app.notify(f"Wrote {done.path}")
        self.dismiss(done.path)

    @on(Button.Pressed, "#export-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)


def default_export_folder() -> Path:
    """Where reports go unless the user types another folder: Documents in the home folder
    when there is one, else the home folder (never the data folder: a report must not land
    beside the job files)."""
    home = Path.home()
    documents = home / "Documents"
    return documents if documents.is_dir() else home


_FORMAT_NAMES = {
    "csv": "CSV: one row per result (spreadsheet)",
    "md": "Markdown report",
    "html": "HTML report (prints on A4 / Letter)",
    "json": "JSON hand-off (jobs import on another laptop)",
}
