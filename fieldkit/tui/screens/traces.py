"""The Traces workspace: open an OTDR trace, both directions of a fibre, or a folder; read the
event table beside the drawn trace; send an event to the fault workspace.

Layout and wiring only: the state is :class:`fieldkit.traces.session.TraceSession`, the
numbers come from :mod:`fieldkit.traces`, the same as ``fieldkit trace``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual import on, work
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.screen import Screen
from textual.widgets import Button, DataTable, Input, Label, ProgressBar, Static

from fieldkit import safety
from fieldkit.calc.units import InputError
from fieldkit.text.escape import terminal
from fieldkit.text.numbers import arrow
from fieldkit.traces.lines import otdr_caution
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.session import TraceSession, is_folder, row_number, start_hint
from fieldkit.tui import keys
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.path_field import PathField
from fieldkit.tui.widgets.trace_dialogs import (
    ClosurePicker,
    OverwriteDialog,
    SaveTracesDialog,
    save_what_dialog,
)
from fieldkit.tui.widgets.trace_plot import TracePlot
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job, Link
    from fieldkit.traces.folder import FibreTraces

__all__ = ["ClosurePicker", "OverwriteDialog", "SaveTracesDialog", "TracesScreen"]

_TIP_A = "A trace from end A (.sor or text), or a folder of traces"


class TracesScreen(Screen[None]):
    """OTDR traces: events, both directions averaged, the trace drawn."""

    CSS_PATH = "traces.tcss"
    AUTO_FOCUS = "#traces-a"
    # Keys follow the project's key table: Ctrl+O open, Ctrl+S save onto a job's link (the
    # traces, or their losses into a closure's splice log; then the link), Ctrl+G go to the
    # result (here: the break, in Fault), Ctrl+Y cycle what the list shows, Esc close (back to
    # the folder's fibres).
    BINDINGS = keys.bindings("traces")

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        return self.session.can_go_back if action == "back" else True

    def __init__(self) -> None:
        super().__init__()
        self.session = TraceSession()

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Horizontal(id="traces-files"):
            for label, field_id, hint, tip in (
                ("A→B", "traces-a", "trace file or folder", _TIP_A),
                ("B→A", "traces-b", "other end (optional)", "The same fibre traced from end B"),
            ):
                yield Label(label, classes="traces-label")
                yield PathField(placeholder=hint, id=field_id, compact=True, tooltip=tip)
            yield Button("Open", id="traces-open", compact=True, variant="primary")
        yield Static("", id="traces-status", markup=False)
        yield ProgressBar(id="traces-progress", show_eta=False)
        yield TracePlot(id="traces-plot")
        table: DataTable[str] = DataTable(id="traces-table", cursor_type="row", zebra_stripes=True)
        yield table
        yield Static("", id="traces-note", markup=False)
        yield Static(safety.OTDR_LIVE_FIBRE, id="traces-caution", markup=False)
        yield KeyFooter()

    def on_mount(self) -> None:
        self._say(start_hint(fieldkit_app(self).data_dir))
        self._fit_caution()

    def on_resize(self) -> None:
        self._fit_caution()
        self._fill_table()

    def _fit_caution(self) -> None:
        """The medium caution where it fits whole in its two lines, else the short one."""
        caution = self.query_one("#traces-caution", Static)
        caution.update(otdr_caution(self.size.width - 2, self.wide))  # 2: the padding
        caution.tooltip = f"{safety.OTDR_LIVE_FIBRE} {safety.DEFER}"

    @property
    def wide(self) -> bool:
        return self.size.width >= 72

    def _note(self, text: str) -> None:
        """The lines under the table (:meth:`TraceSession.note_lines`)."""
        lines = self.session.note_lines(text, self.wide)
        self.query_one("#traces-note", Static).update("\n".join(terminal(t) for t in lines))

    def _say(self, text: str, problem: bool = False) -> None:
        status = self.query_one("#traces-status", Static)
        status.update(terminal(text))
        status.set_class(problem, "-problem")

    # -- opening ---------------------------------------------------------------------------
    @on(Input.Submitted)
    @on(Button.Pressed, "#traces-open")
    def _open_asked(self) -> None:
        self.action_open()

    def action_open(self) -> None:
        path_a = self.query_one("#traces-a", Input).value
        path_b = self.query_one("#traces-b", Input).value
        for field in self.query(PathField):
            field.show_end()
        if self.session.judged_by_defaults:
            self._judge_by()  # before the first open: the shipped and the user's presets
        if is_folder(path_a):
            self._open_folder(path_a)
            return
        try:
            summary = self.session.open(path_a, path_b)
        except TraceFileError as exc:
            self._say(str(exc), problem=True)  # the typed paths stay as typed
            return
        self._shown(summary)
        self._note(self.session.limits_summary())
        self.query_one("#traces-table", DataTable).focus()

    def _judge_by(self, job: Job | None = None, link: Link | None = None) -> bool:
        """Judge what is open, and what opens next, by the job's link's presets (without a
        link: the shipped and the user's presets); False, said for a link, when they cannot
        be read."""
        from fieldkit.actions.traces import presets_limits

        try:
            limits = presets_limits(fieldkit_app(self).config_dir, job, link)
        except Exception as exc:  # noqa: BLE001 - a preset problem, shown as one line
            if link is not None:
                self._say(str(exc), True)
            return False  # with no link: the built-in figures judge
        self.session.set_limits(limits)
        return True

    def _open_folder(self, path: str) -> None:
        self._progress(None)
        self._say("Analysing the folder...")
        self._analyse_folder(path)

    def _progress(self, total: int | None, shown: bool = True) -> None:
        """The progress bar from 0 of ``total`` (None: not known yet), shown or not."""
        bar = self.query_one("#traces-progress", ProgressBar)
        bar.display = shown
        bar.update(total=total, progress=0)

    @work(thread=True, exclusive=True, group="traces-folder", exit_on_error=False)
    def _analyse_folder(self, path: str) -> None:
        bar = self.query_one("#traces-progress", ProgressBar)

        def progress(done: int, total: int, name: str) -> None:
            self.app.call_from_thread(bar.update, total=total, progress=done)

        problem = None
        try:
            self.session.open_folder(path, progress)
        except TraceFileError as exc:
            problem = str(exc)
        self.app.call_from_thread(self._folder_done, problem)

    def _folder_done(self, problem: str | None) -> None:
        self.query_one("#traces-progress").display = False
        if problem is not None:
            self._say(problem, problem=True)
            return
        self._shown(self.session.folder_status())
        self._note("")
        self.query_one("#traces-table", DataTable).focus()

    # -- showing ---------------------------------------------------------------------------
    def _shown(self, said: str) -> None:
        """Say ``said`` and show what the session now holds."""
        self._say(said)
        self._show()
        self.refresh_bindings()

    def _show(self) -> None:
        plot = self.query_one("#traces-plot", TracePlot)
        curve = self.session.curve()
        if curve is None:
            plot.clear()
        else:
            plot.show_trace(curve[0], curve[1], self.session.marks())
        self._fill_table()

    def _fill_table(self) -> None:
        table = self.query_one("#traces-table", DataTable)
        table.clear(columns=True)
        view = self.session.table(self.wide)
        table.border_title = view.title
        table.add_columns(*view.columns)
        for key, cells in view.rows:
            table.add_row(*(terminal(c) for c in cells), key=key)
        if self.session.selected is not None and not self.session.whole_folder:
            self._highlight(self.session.selected)

    def _highlight(self, number: int) -> None:
        table = self.query_one("#traces-table", DataTable)
        try:
            row = table.get_row_index(f"event-{number}")
        except Exception:  # the row is not in this table (the instrument's has other numbers)
            return
        table.move_cursor(row=row)

    @on(DataTable.RowHighlighted, "#traces-table")
    def _row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        number = row_number(event.row_key.value or "", "event")
        if number is not None:
            if self.session.select(number):
                self.query_one("#traces-plot", TracePlot).select_event(number)
            self._note(self.session.event_note(number))

    @on(DataTable.RowSelected, "#traces-table")
    def _row_selected(self, event: DataTable.RowSelected) -> None:
        index = row_number(event.row_key.value or "", "fibre")
        if index is not None:
            try:
                self._shown(self.session.open_fibre(index))
            except TraceFileError as exc:
                self._say(str(exc), problem=True)

    @on(TracePlot.CursorMoved)
    def _cursor_moved(self, event: TracePlot.CursorMoved) -> None:
        if event.mark is not None:
            self.session.select(event.mark.number)
            self._highlight(event.mark.number)

    # -- onto a job's link: the traces themselves, and the splice log ------------------------
    async def _choose_link(self, title: str) -> tuple[tuple[str, str], Job, Link] | None:
        """Ask for the job's link (the last one's job first), remember it and judge the open
        traces by its presets from now on; None (said) when nothing is open or it is not read."""
        from fieldkit.actions.traces import load_link

        if not self.session.anything_open:
            self._say("Open traces first.", True)
            return None
        job_id, link_id = self._likely_link() or (None, None)
        choice = await self.app.push_screen_wait(
            JobLinkPicker(job_id=job_id, link_id=link_id, pick_first=False, title=title)
        )
        if choice is None:
            return None
        self.session.last_link = choice
        try:
            job, link = load_link(fieldkit_app(self).store, *choice)
        except Exception as exc:  # noqa: BLE001 - a store or lookup problem, shown as one line
            self._say(str(exc), True)
            return None
        if not self._judge_by(job, link):
            return None
        self.session.use_closures((c.name, c.route_distance_m) for c in link.closures)
        self._show()
        self._note(self.session.limits_summary())
        return choice, job, link

    def _likely_link(self) -> tuple[str, str] | None:
        """The job's link to offer first (:meth:`TraceSession.offered_link`), if any."""
        from fieldkit.actions.traces import links_named

        try:
            found = links_named(fieldkit_app(self).store, self.session.names())
        except Exception:  # noqa: BLE001 - an unreadable store: the picker says so itself
            found = []
        return self.session.offered_link(found)

    def action_save_what(self) -> None:
        """Ctrl+S: onto a job's link go the traces (1) or their losses, into a splice log (2)."""

        def chosen(what: str | None) -> None:
            if what == "traces":
                self.action_save_traces()
            elif what == "splices":
                self.action_fill_splices()

        self.app.push_screen(save_what_dialog(), chosen)

    @work(exclusive=True, group="traces-job", exit_on_error=False)
    async def action_save_traces(self) -> None:
        """Pick the link, read what is kept there (and give the fibre of one pair or trace),
        save; what is open stays open whatever the answer."""
        chosen = await self._choose_link("Keep these traces on which job's link?")
        if chosen is None:
            return
        where, job, link = chosen
        s = self.session
        try:
            lines = s.save_lines({t.key for t in link.traces if t.current})
        except (InputError, TraceFileError) as exc:
            self._say(str(exc), True)
            return
        dialog = SaveTracesDialog(
            f"onto job {job.name}, link {link.label}", lines, s.fibre_number(), not s.whole_folder
        )
        number = await self.app.push_screen_wait(dialog)
        if number is None:
            self._say("Nothing saved; the traces stay open.")
            return
        fibres = s.fibres(number or None)
        self._progress(len(fibres), shown=len(fibres) > 1)
        self._say(f"Saving {len(fibres)} fibre(s)...")
        self._save_worker(where, fibres, fieldkit_app(self).operator)

    @work(thread=True, exclusive=True, group="traces-save", exit_on_error=False)
    def _save_worker(self, where: tuple[str, str], fibres: list[FibreTraces], by: str) -> None:
        from fieldkit.actions.traces import save_fibres

        bar = self.query_one("#traces-progress", ProgressBar)

        def progress(done: int, total: int) -> None:
            self.app.call_from_thread(bar.update, progress=done)

        try:
            saved = save_fibres(fieldkit_app(self).store, *where, fibres, by=by, progress=progress)
            text, problem = saved.status(), False
        except Exception as exc:  # noqa: BLE001 - a store or input problem, shown as one line
            text, problem = f"Not saved: {arrow(str(exc))}", True
        self.app.call_from_thread(self._saved, text, problem)

    def _saved(self, text: str, problem: bool) -> None:
        self.query_one("#traces-progress").display = False
        self._say(text, problem)
        self.notify(terminal(text), severity="error" if problem else "information")

    @work(exclusive=True, group="traces-job", exit_on_error=False)
    async def action_fill_splices(self) -> None:
        """Pick the link and the closure; a dry run first, so losses already recorded are
        replaced only when the user says so."""
        from fieldkit.actions.traces import fill_splice_log

        chosen = await self._choose_link("Fill a closure's splice log on which job's link?")
        if chosen is None:
            return
        where, _job, link = chosen
        closures = [(c.name, c.route_distance_m) for c in link.closures]
        if not closures:
            self._say(f"link {link.label}: no closures yet; add them in the splice log", True)
            return
        s = self.session
        picked = await self.app.push_screen_wait(
            ClosurePicker(closures, s.fibre_number(), not s.whole_folder)
        )
        if picked is None:
            return
        closure, fibre = picked
        store, by = fieldkit_app(self).store, fieldkit_app(self).operator
        try:
            fibres = s.fibres(fibre)
            trial = fill_splice_log(store, *where, closure, fibres, dry_run=True, by=by)
            overwrite = bool(trial.would_overwrite)
            if overwrite:
                asked = OverwriteDialog.for_losses(trial.would_overwrite)
                if not await self.app.push_screen_wait(asked):
                    self._say("Nothing written: the recorded losses stay.")
                    return
            done = fill_splice_log(store, *where, closure, fibres, overwrite=overwrite, by=by)
        except (InputError, TraceFileError) as exc:
            self._say(str(exc), True)
            return
        self._say(done.summary(closure))

    def action_back(self) -> None:
        if self.session.close_fibre():
            self._shown(self.session.folder_status())

    def action_cycle_view(self) -> None:
        """A→B, B→A (when both are open), then the instrument's own events of each."""
        said = self.session.cycle_view()
        if said is not None:
            self._shown(said)

    async def action_send_fault(self) -> None:
        """Ctrl+G: the selected event (else the end, the break) into the Fault workspace,
        the link's closures that match events as its landmarks."""
        from fieldkit.actions.traces import closures_of

        if self.session.last_link is None and not self.session.closures:
            # no link chosen yet: the one the traces name gives the landmarks
            self.session.use_closures(closures_of(fieldkit_app(self).store, self._likely_link()))
        try:
            hand = self.session.handoff()
        except TraceFileError as exc:
            self._say(str(exc), problem=True)
            return
        await self.app.switch_mode("fault")
        prefill = getattr(self.app.screen, "prefill", None)
        if prefill is not None:
            prefill(hand)
