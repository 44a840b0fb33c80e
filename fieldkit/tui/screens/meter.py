"""The meter workspace: a reference by method, a whole cable's readings, pass/fail at once.

Typing goes into one entry field; the grid (a DataTable) shows the losses. Type a reading,
Enter, and the cursor moves on to the next fibre; Up/Down move between fibres, Ctrl+←/→ between
columns, and a click on a cell goes there. A plain number is a level in dBm; a unit (µW, nW,
mW, dBW) may follow it. Results are saved into the chosen job's link as they are entered (a
background save worker). Layout and wiring only: the state is :class:`MeterSession`'s.
"""

from __future__ import annotations

from typing import Any

from textual import events, on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.screen import Screen
from textual.widget import Widget
from textual.widgets import Collapsible, DataTable, Input, Static

from fieldkit.actions.meter import Applied, ReferenceDetails
from fieldkit.calc import reference as ref
from fieldkit.calc.units import InputError
from fieldkit.tui import keys
from fieldkit.tui.meter_saver import MeterSaver
from fieldkit.tui.meter_session import GridColumn, MeterSession, PendingView
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.meter_fields import KEYS_HINT, KEYS_HINT_NARROW, entry_line, setup_fields
from fieldkit.tui.widgets.meter_view import EntryView, SetupView, SummaryView
from fieldkit.tui.widgets.readings_grid import EntryInput, ReadingsGrid
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

__all__ = ["KEYS_HINT", "KEYS_HINT_NARROW", "MeterScreen"]


class MeterScreen(Screen[None]):
    """Reference panel, readings grid and summary."""

    CSS_PATH = "meter.tcss"
    AUTO_FOCUS = "#reading"
    BINDINGS = keys.bindings("meter")

    class Saved(Message):
        """From the save worker: what a batch did in the job, or why it was not saved."""

        def __init__(self, outcome: Applied | str) -> None:
            super().__init__()
            self.outcome = outcome

    def __init__(self) -> None:
        super().__init__()
        self.session = MeterSession()
        self.saver = MeterSaver(
            self.session, lambda: fieldkit_app(self).store, self.run_worker, self._report
        )
        self.setup = SetupView(self, self.session)
        self.entry = EntryView(self, self.session)
        self.summary = SummaryView(self, self.session, lambda: self.narrow)
        self._hint_shown = False
        self._view = PendingView()
        self._grid: ReadingsGrid | None = None

    # -- layout ----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Vertical(id="meter-body"):
            yield from setup_fields()
            # At 44 columns, while typing readings: the set-up in one line (rows go to the grid);
            # Alt+R/W/F or a click open it again.
            yield Static("", id="setup-line")
            yield Static("", id="reference-note", classes="field-note")
            yield from entry_line(self.session.reading_acceptable, self._reading_typed)
            with Horizontal(id="meter-main"):
                yield ReadingsGrid(id="readings")
                yield Static("", id="meter-summary")
        yield KeyFooter()

    def on_mount(self) -> None:
        self._grid = self.query_one(ReadingsGrid)
        self._rebuild_grid()
        self._sync_column_fields()
        self._show_entry_where()
        self._show_summary()
        self._show_hint()
        self.set_interval(30.0, self._show_summary)
        # Focus opens where the technician types first: the reference, until one is set.
        self.set_focus(self.query_one(f"#{self.session.work_field}"))

    def action_focus_field(self, field_id: str) -> None:
        """Alt+R / Alt+W / Alt+F: to a set-up field from wherever you type."""
        self.set_class(False, "-typing")
        self.call_after_refresh(self.query_one(f"#{field_id}").focus)

    def focus_next(self, selector: Any = "*") -> Widget | None:
        """Tab: from Limit to the readings (:meth:`MeterSession.tab_from`)."""
        return self.setup.tab_from(self.focused) or super().focus_next(selector)

    def on_descendant_focus(self, event: object) -> None:
        focused = self.focused
        typing = focused is not None and focused.id in ("reading", "readings")
        if typing != self.has_class("-typing"):
            self.set_class(typing, "-typing")
            self._show_setup_line()
            self._keep_cursor_in_view()

    @on(Input.Submitted)
    def _setup_submitted(self, event: Input.Submitted) -> None:
        # Enter in a set-up field: back to typing readings (or to Ref, while it is empty).
        if event.input.id != "reading":
            self.query_one(f"#{self.session.work_field}").focus()

    @on(Collapsible.Toggled)  # "more under Reference details" only while they are folded
    def _details_toggled(self) -> None:
        self._show_reference_note()

    def on_click(self, event: events.Click) -> None:
        if event.widget is not None and event.widget.id == "setup-line":
            self.action_focus_field("reference")

    def _show_setup_line(self) -> None:
        if self.has_class("-typing") and self.narrow:
            self.setup.line(42)

    def _keep_cursor_in_view(self) -> None:
        """After the rows above the grid changed (a message of two lines, the set-up folded):
        the cursor's fibre stays in sight."""
        self.grid.scroll_to_cursor()

    @property
    def narrow(self) -> bool:
        return self.has_class("-narrow") or self.size.width < 72

    def on_resize(self) -> None:
        if self._hint_shown:
            self._show_hint()
        self.setup.placeholder(self.narrow)
        self._show_entry_where()

    def _show_hint(self) -> None:
        """The keys, in the entry line's message (until a reading or an error takes it)."""
        self._say(KEYS_HINT_NARROW if self.narrow else KEYS_HINT)
        self._hint_shown = True

    @property
    def grid(self) -> ReadingsGrid:
        return self.query_one(ReadingsGrid) if self._grid is None else self._grid

    # -- the grid ----------------------------------------------------------------------------
    def _rebuild_grid(self) -> None:
        self.session.clamp()
        self.grid.draw(self.session)

    def _point(self) -> None:
        self.grid.point_at(self.session.fibre, self.session.active_column)
        self._show_entry_where()

    # -- typing in the set-up fields -------------------------------------------------------
    @on(Input.Changed)
    def _input_changed(self, event: Input.Changed) -> None:
        if event.value != event.input.value:
            return  # stale: the field changed again since (its own event follows)
        field_id = event.input.id or ""
        if field_id == "reading":
            self._reading_typed(event.value)
            return
        done = self.session.change_field(field_id, event.value)
        if done is None:
            return
        if done.error is not None:
            self.setup.error(field_id, done.error)
        if done.meaning is not None:
            self.setup.meaning(done.meaning)
        if done.redraw:
            self._rebuild_grid()
        if done.grid:
            self._sync_column_fields()
            self._show_entry_where()
        if done.limits is not None:
            self.setup.placeholder(self.narrow)
            for change in done.limits:
                self.saver.queue(change)
        if done.redraw or done.note:
            self._show_reference_note()
            self._show_summary()
            self._say(None)  # a new reference may have dealt with a negative loss

    def _sync_column_fields(self, force: bool = False) -> None:
        if self.setup.sync_column(narrow=self.narrow, force=force):
            self._keep_cursor_in_view()
        self._show_setup_line()

    def _show_reference_note(self) -> None:
        if self.setup.note(narrow=self.narrow):
            self._keep_cursor_in_view()
        self._show_setup_line()

    # -- entering readings --------------------------------------------------------------
    def _say(self, text: str | None, *, error: bool = False) -> None:
        self._view.say = None  # said since: a message waiting for the next view is old
        if text is not None:
            self._hint_shown = False
        if self.entry.say(text, error=error, narrow=self.narrow):
            self._keep_cursor_in_view()

    def _reading_typed(self, text: str) -> None:
        problem = self.session.typing_problem(text)
        self._say(self.entry.typed(problem), error=problem is not None)

    @on(EntryInput.Entered, "#reading")
    def _reading_entered(self, event: EntryInput.Entered) -> None:
        s = self.session
        if not event.value.strip():
            self.action_move(1)
            return
        entered = s.enter(event.value, self._details(), short=self.narrow)
        if entered.cell is None:
            self._say(entered.message, error=True)
            return
        if not event.accepted:
            # Refused when Enter was pressed but fine now (the reference was set since):
            # the text is still in the field; take it.
            event.entry.value = ""
        self.saver.queue(entered.change)
        moved = s.next_empty()
        if moved.column_changed:
            self._sync_column_fields()
        # The grid, the entry line and its message follow once the keys already queued are
        # handled: typed ahead, a burst of readings costs one cursor move and one message.
        if self._view.add(entered, moved):
            self.call_later(self._show_view)
        self.summary.soon()

    def _show_view(self) -> None:
        cells, say = self._view.take()
        for cell in cells:
            self.grid.draw_cell(self.session, *cell)
        self._point()
        if say is not None:
            self._say(say[0], error=say[1])

    def _details(self) -> ReferenceDetails:
        return self.setup.details(lambda: fieldkit_app(self).operator)

    def _show_entry_where(self) -> None:
        self.entry.where(self.narrow)

    def action_next_empty(self) -> None:
        moved = self.session.next_empty()
        if moved.column_changed:
            self._sync_column_fields()
        self._point()
        if moved.message:
            self._say(moved.message)

    def action_move(self, step: int) -> None:
        self.session.move(step)
        self._point()

    def action_column(self, step: int) -> None:
        self.session.column(step)
        self._point()
        self._sync_column_fields()

    def action_clear_cell(self) -> None:
        s = self.session
        change = s.clear_cell(by=self._details().by)
        if change is None:
            return
        self.grid.draw_cell(self.session, change.fibre, change.wavelength_nm, change.direction)
        self.saver.queue(change)
        self._say(s.cleared_words())
        self._show_entry_where()
        self._show_summary()

    @on(DataTable.CellHighlighted)
    def _cell_pointed(self, event: DataTable.CellHighlighted) -> None:
        # The grid has focus only when the user clicked it (or tabbed to it and moved): go to
        # that cell and back to typing. Moves made by the entry field itself are ignored.
        if self.grid.has_focus:
            self._go_to_cell(event.coordinate.row, event.coordinate.column)

    @on(DataTable.CellSelected)
    def _cell_clicked(self, event: DataTable.CellSelected) -> None:
        self._go_to_cell(event.coordinate.row, event.coordinate.column)

    def _go_to_cell(self, row: int, grid_column: int) -> None:
        column = self.grid.column_at(grid_column)
        if column is not None:
            if self.session.go_to(row + 1, column):  # row 0 is fibre 1
                self._sync_column_fields()
            self._point()
        self.query_one("#reading").focus()

    # -- summary ------------------------------------------------------------------------
    @property
    def summary_pending(self) -> bool:
        """True while a refresh of the summary waits (:class:`SummaryView`)."""
        return self.summary.pending

    def _show_summary(self) -> None:
        self.summary.show()

    # -- the job ------------------------------------------------------------------------
    def action_pick_job(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        self.app.push_screen(
            JobLinkPicker(title="Save readings onto a job's link"),
            lambda choice: None if choice is None else self.attach(*choice),
        )

    def attach(self, job_id: str, link_id: str) -> None:
        """Save into this job's link from now on; load what it already holds into the grid."""
        store = fieldkit_app(self).store
        try:
            changes, fields = self.session.attach_from(store, job_id, link_id, self._details())
        except InputError as exc:
            self.notify(f"The job could not be opened: {exc}", severity="error")
            return
        self.setup.fill(fields)
        for change in changes:
            self.saver.queue(change)
        self._rebuild_grid()
        self._sync_column_fields(force=True)
        self._show_entry_where()
        self._show_summary()
        self.saver.queue(None)

    @property
    def unsaved(self) -> int:
        """Entries not yet in the job file (0 when everything is saved or no job is chosen)."""
        return self.saver.unsaved

    def _report(self, outcome: Applied | str) -> None:
        self.post_message(self.Saved(outcome))  # from the save worker's thread

    async def saves_settled(self) -> None:
        """Wait for the save worker to finish what is queued; show the summary as it stands."""
        await self.saver.settled()
        self._show_summary()

    @on(Saved)
    def _saved(self, event: Saved) -> None:
        for text, severity in self.session.save_notices(event.outcome):
            self.notify(text, severity=severity, timeout=10)
        # NOT SAVED shows at once; a save that went through, with the next refresh
        (self.summary.show if isinstance(event.outcome, str) else self.summary.soon)()

    def flush_saves(self, timeout_s: float = 5.0) -> bool:
        """Save what is queued here and now (the workspace closes); True when all is saved."""
        return self.saver.flush(timeout_s)

    def on_unmount(self) -> None:
        self.flush_saves()

    # -- history ------------------------------------------------------------------------
    def action_history(self) -> None:
        """The fibre's history in the job: every result, the superseded ones marked."""
        from fieldkit.tui.widgets.dialogs import AskDialog

        if self.session.job_id is None:
            where = "the history is the one in the job"
            return self._say(f"{keys.display('save')}: choose a job first; {where}.")
        self.flush_saves()
        try:
            title, lines = self.session.history(fieldkit_app(self).store)
        except InputError as exc:
            self._say(f"The history could not be read: {exc}", error=True)
            return
        self.app.push_screen(AskDialog(title, lines, []))

    # -- recheck ------------------------------------------------------------------------
    def action_recheck(self) -> None:
        from fieldkit.tui.widgets.recheck_dialog import RecheckDialog

        try:
            column, level_dbm, tolerance_db = self.session.recheck_asked()
        except InputError as exc:
            self.notify(str(exc), severity="warning")
            return

        def done(result: tuple[float, float] | None) -> None:
            if result is not None:
                self.apply_recheck(column, *result)

        self.app.push_screen(RecheckDialog(column.heading, level_dbm, tolerance_db), done)

    def apply_recheck(self, column: GridColumn, level_dbm: float, tolerance_db: float) -> ref.Drift:
        """Compare a recheck with the column's reference; beyond tolerance, mark in doubt."""
        done = self.session.apply_recheck(column, level_dbm, tolerance_db, by=self._details().by)
        for cell in done.doubted:
            self.grid.draw_cell(self.session, *cell)
        self._say(done.words(column, short=self.narrow), error=not done.drift.within)
        self.saver.queue(done.change)
        self._show_reference_note()
        self._show_summary()
        return done.drift
