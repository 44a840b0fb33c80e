"""The meter workspace: a reference by method, a whole cable's readings, pass/fail at once.

Typing goes into one entry field; the grid (a DataTable) shows the losses. Type a reading,
Enter, and the cursor moves on to the next fibre; Up/Down move between fibres, Ctrl+←/→ between
columns, and a click on a cell goes there. A plain number is a level in dBm; a unit (µW, nW,
mW, dBW) may follow it. Results are saved into the chosen job's link as they are entered (a
background save worker; entries made while a save runs go with the next one).

Layout and wiring only: the state, what each key does and the summary text live in
:class:`fieldkit.tui.meter_session.MeterSession`; every save goes through
:func:`fieldkit.actions.meter.apply_changes`.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from typing import TypeVar, cast

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.containers import Grid, Horizontal, Vertical
from textual.message import Message
from textual.screen import Screen
from textual.timer import Timer
from textual.widget import Widget
from textual.widgets import Collapsible, DataTable, Input, Label, Static
from textual.worker import Worker

from fieldkit import safety
from fieldkit.actions.meter import Applied, MeterChange, ReferenceDetails, apply_changes
from fieldkit.calc import reference as ref
from fieldkit.calc.units import InputError
from fieldkit.jobs.models import now
from fieldkit.tui import keys
from fieldkit.tui.meter_session import DIRECTION_WORDS, GridColumn, MeterSession
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS
from fieldkit.tui.widgets.readings_grid import EntryInput, ReadingsGrid
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

W = TypeVar("W", bound=Widget)
_COLUMNS = f"{keys.display('column_previous')}/{keys.display('column_next')[5:]}"
KEYS_HINT = (
    f"Enter: next fibre · ↑↓ PgUp PgDn: fibres · {_COLUMNS}: columns · "
    f"{keys.hint('remove')}: remove · click a cell"
)
#: The same keys in one line of a phone terminal, where rows go to the grid.
KEYS_HINT_NARROW = f"Enter/↑↓ fibre · {_COLUMNS} col · {keys.hint('remove')} remove"

#: The set-up fields: (label, id, value, tooltip, placeholder).
_SETUP = (
    ("Method", "method", "one-cord", "one-cord, two-cord or three-cord (TIA Method B, A or C)", ""),
    ("Wavelength", "wavelengths", "1310 1550", "Test wavelengths, e.g. 1310 1550 or 850 1300", ""),
    ("Fibres", "fibres", "12", "Number of fibres in the cable", ""),
    (
        "Directions",
        "directions",
        "1",
        "1: A->B only; 2: both directions (each its own reference)",
        "",
    ),
    ("Ref", "reference", "", "Reference level of this column: dBm, or µW, nW, mW", "dBm"),
    (
        "Limit",
        "limit",
        "",
        "Largest loss allowed at this wavelength, dB; empty: from the link's budget, counting "
        "the method's end connections",
        "",
    ),
)
_DETAILS = (
    ("Source", "source", "Light source identifier"),
    ("Meter", "meter", "Power meter identifier"),
    ("Cords", "cords", "Reference cords used, separated by commas"),
    ("Launch", "launch", "Launch condition (multimode), e.g. encircled flux"),
    (
        "Src out",
        "source-level",
        "What the source should deliver through a good cord, dBm (default -20 multimode, -7 "
        "single-mode; common practice)",
    ),
    ("By", "by", "Who takes the readings"),
)


@dataclass
class _ViewUpdate:
    """What the grid and the entry line still have to show after the readings just taken."""

    cells: set[tuple[int, float, str]] = field(default_factory=set)
    say: tuple[str, bool] | None = None
    pending: bool = False


class MeterScreen(Screen[None]):
    """Reference panel, readings grid and summary."""

    CSS_PATH = "meter.tcss"
    AUTO_FOCUS = "#reading"
    BINDINGS = keys.bindings("meter")
    SUMMARY_DELAY_S = 0.15
    SAVE_GATHER_S = 0.5
    SAVE_QUIET_S = 0.01

    class Saved(Message):
        """The save worker put a batch into the job."""

        def __init__(self, outcome: Applied) -> None:
            super().__init__()
            self.outcome = outcome

    class SaveFailed(Message):
        def __init__(self, error: str) -> None:
            super().__init__()
            self.error = error

    def __init__(self) -> None:
        super().__init__()
        self.session = MeterSession()
        self._synced_column: GridColumn | None = None
        self._summary_timer: Timer | None = None
        self._save_worker: Worker[None] | None = None
        self._hint_shown = False
        self._widgets: dict[str, Widget] = {}
        self._view = _ViewUpdate()

    # -- layout ----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Vertical(id="meter-body"):
            with Grid(id="meter-setup"):
                for label, field_id, value, tooltip, placeholder in _SETUP:
                    yield from self._field(label, field_id, value, tooltip, placeholder)
            with Collapsible(title="Reference details", id="meter-details", collapsed=True):
                with Grid(id="meter-details-grid"):
                    for label, field_id, tooltip in _DETAILS:
                        yield from self._field(label, field_id, "", tooltip)
                yield Static(safety.INVISIBLE_LIGHT, classes="caution", id="meter-caution")
            yield Static("", id="reference-note", classes="field-note")
            with Horizontal(id="meter-entry"):
                yield Label("", id="entry-where")
                yield EntryInput(
                    placeholder="reading, dBm",
                    type="text",
                    restrict=QUANTITY_CHARS,
                    compact=True,
                    id="reading",
                    check=self.session.reading_acceptable,
                    typed=self._reading_typed,
                    tooltip="Type the reading and press Enter; Up/Down move "
                    f"between fibres, {_COLUMNS} between columns",
                )
            yield Static("", id="entry-message", classes="field-note")
            with Horizontal(id="meter-main"):
                yield ReadingsGrid(id="readings")
                yield Static("", id="meter-summary")
        yield KeyFooter()

    def _field(
        self, label: str, field_id: str, value: str, tooltip: str, placeholder: str = ""
    ) -> ComposeResult:
        with Vertical(classes="meter-field", id=f"{field_id}-box"):
            with Horizontal():
                yield Label(label, classes="meter-label")
                yield Input(
                    value=value,
                    type="text",
                    restrict=QUANTITY_CHARS,
                    compact=True,
                    id=field_id,
                    tooltip=tooltip,
                    placeholder=placeholder,
                )
                if field_id == "directions":
                    # What the number means, beside it: "1 A→B", "2 both".
                    yield Label(
                        DIRECTION_WORDS["1"], classes="meter-meaning", id=f"{field_id}-meaning"
                    )
            yield Static("", classes="field-error", id=f"{field_id}-error")

    def on_mount(self) -> None:
        for error in self.query(".field-error"):
            error.display = False
        self._rebuild_grid()
        self._sync_column_fields()
        self._show_entry_where()
        self._show_summary()
        self._show_hint()
        self.set_interval(30.0, self._show_summary)

    @property
    def narrow(self) -> bool:
        return self.has_class("-narrow") or self.size.width < 72

    def on_resize(self) -> None:
        if self._hint_shown:
            self._show_hint()
        self._show_limit_placeholder()
        self._show_entry_where()

    def _show_hint(self) -> None:
        """The keys, in the entry line's message (until a reading or an error takes it)."""
        self._say(KEYS_HINT_NARROW if self.narrow else KEYS_HINT)
        self._hint_shown = True

    def _one(self, selector: str, kind: type[W] = Widget) -> W:  # type: ignore[assignment]
        """``query_one``, remembered: the screen's widgets stay mounted, and a query walks the
        whole screen (per keystroke it cost more than the grid's own work)."""
        found = self._widgets.get(selector)
        if found is None:
            found = self._widgets[selector] = self.query_one(selector)
        return cast(W, found)

    # -- the grid ----------------------------------------------------------------------------
    def _text(self, fibre: int, column: GridColumn) -> Text:
        shown = self.session.cell_text(fibre, column)
        return Text("") if shown is None else Text(shown[0], style=shown[1], justify="right")

    def _rebuild_grid(self) -> None:
        s = self.session
        s.clamp()
        grid = self._one("#readings", ReadingsGrid)
        cells: dict[tuple[int, str], Text] = {}
        for column in s.grid_columns():
            for fibre in range(1, s.fibres + 1):
                text = self._text(fibre, column)
                if text.plain:
                    cells[(fibre, column.key)] = text
        grid.set_layout(s.fibres, s.grid_columns(), cells)
        grid.point_at(s.fibre, s.active_column)

    def _refresh_cell(self, fibre: int, wavelength_nm: float, direction: str) -> None:
        grid = self._one("#readings", ReadingsGrid)
        for column in (GridColumn(wavelength_nm, direction), GridColumn(wavelength_nm, None)):
            grid.show(fibre, column, self._text(fibre, column))

    def _point(self) -> None:
        self._one("#readings", ReadingsGrid).point_at(
            self.session.fibre, self.session.active_column
        )
        self._show_entry_where()

    # -- typing in the set-up fields -------------------------------------------------------
    def _show_error(self, field_id: str, message: str) -> None:
        error = self._one(f"#{field_id}-error", Static)
        error.update(message)
        error.display = bool(message)

    @on(Input.Changed)
    def _input_changed(self, event: Input.Changed) -> None:
        if event.value != event.input.value:
            return  # stale: the field changed again since (its own event follows)
        field_id = event.input.id or ""
        handler = {
            "method": self._method_changed,
            "wavelengths": self._layout_changed,
            "fibres": self._layout_changed,
            "directions": self._layout_changed,
            "reference": self._reference_changed,
            "limit": self._limit_changed,
            "reading": self._reading_changed,
            "source-level": self._details_changed,
            "launch": self._details_changed,
        }.get(field_id)
        if handler is not None:
            handler(field_id, event.value)

    def _method_changed(self, field_id: str, text: str) -> None:
        try:
            self.session.set_method(text)
        except InputError as exc:
            self._show_error(field_id, str(exc))
            return
        self._show_error(field_id, "")
        self._after_limits_changed()

    def _layout_changed(self, field_id: str, text: str) -> None:
        setter = {
            "wavelengths": self.session.set_wavelengths,
            "fibres": self.session.set_fibres,
            "directions": self.session.set_directions,
        }[field_id]
        try:
            changed = setter(text)
        except InputError as exc:
            self._show_error(field_id, str(exc))
            if field_id == "directions":
                self._one("#directions-meaning", Label).update("?")
            return
        self._show_error(field_id, "")
        if field_id == "directions":
            self._one("#directions-meaning", Label).update(DIRECTION_WORDS[text.strip()])
        if changed:
            self._rebuild_grid()
            self._sync_column_fields()
            self._show_entry_where()
            self._show_summary()

    def _reference_changed(self, field_id: str, text: str) -> None:
        try:
            if not self.session.set_reference(text):
                return  # the field shown again for this column (Ctrl+←/→), nothing typed
            self._show_error(field_id, "")
        except InputError as exc:
            self._show_error(field_id, str(exc))
        self._show_reference_note()
        self._show_summary()

    def _details_changed(self, field_id: str, text: str) -> None:
        self._show_reference_note()

    def _limit_changed(self, field_id: str, text: str) -> None:
        try:
            wavelength_nm = self.session.set_limit(text)
        except InputError as exc:
            self._show_error(field_id, str(exc))
            return
        self._show_error(field_id, "")
        if wavelength_nm is not None:
            self._after_limits_changed(wavelength_nm)

    def _after_limits_changed(self, wavelength_nm: float | None = None) -> None:
        self._rebuild_grid()
        self._show_summary()
        self._show_limit_placeholder()
        self._show_reference_note()
        for change in self.session.limit_changes(wavelength_nm):
            self._queue(change)

    def _show_limit_placeholder(self) -> None:
        self._one("#limit", Input).placeholder = self.session.limit_placeholder(self.narrow)

    def _sync_column_fields(self, force: bool = False) -> None:
        """Show the active column's reference and its wavelength's limit in the fields.

        Only when the active column changed (or ``force``): the fields are never rewritten
        under text the user is typing for the same column.
        """
        s = self.session
        column = s.active_column
        if force or column != self._synced_column:
            self._synced_column = column
            # The Changed events these cause find the texts already stored: no-ops.
            self._one("#reference", Input).value = s.ref_text.get(column.measured, "")
            self._one("#limit", Input).value = s.limit_text.get(column.wavelength_nm, "")
            self._show_error("reference", "")
            self._show_error("limit", "")
        self._one("#reference-box Label", Label).update(s.reference_label())
        self._show_limit_placeholder()
        self._show_reference_note()

    def _show_reference_note(self) -> None:
        note, source_error = self.session.reference_note(
            narrow=self.narrow,
            source_text=self._one("#source-level", Input).value,
            launch=self._one("#launch", Input).value,
        )
        if source_error is not None:
            self._show_error("source-level", source_error)
        self._one("#reference-note", Static).update(note)

    # -- entering readings --------------------------------------------------------------
    def _say(self, text: str | None, *, error: bool = False) -> None:
        """The entry line's message (fixed height: no layout pass per reading)."""
        self._view.say = None  # said since: a message waiting for the next view is old
        message = self._one("#entry-message", Static)
        if text is not None:
            self._hint_shown = False
        if message.has_class("field-error") != error:
            message.set_class(error, "field-error")
        if text is not None:
            message.update(text, layout=False)

    def _reading_changed(self, field_id: str, text: str) -> None:
        self._reading_typed(text)

    def _reading_typed(self, text: str) -> None:
        problem = self.session.typing_problem(text)
        self._say(problem, error=problem is not None)

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
        self._queue(entered.change)
        moved = s.next_empty()
        if moved.column_changed:
            self._sync_column_fields()
        # The grid, the entry line and its message follow once the keys already queued are
        # handled: typed ahead, a burst of readings costs one cursor move and one message.
        self._view.cells.add(entered.cell)
        self._view.say = (moved.message or entered.message, entered.error and not moved.message)
        self._view_soon()
        self._summary_soon()

    def _view_soon(self) -> None:
        if not self._view.pending:
            self._view.pending = True
            self.call_later(self._show_view)

    def _show_view(self) -> None:
        view = self._view
        view.pending = False
        for cell in view.cells:
            self._refresh_cell(*cell)
        view.cells.clear()
        self._point()
        if view.say is not None:
            text, error = view.say
            self._say(text, error=error)

    def _details(self) -> ReferenceDetails:
        def text(field_id: str) -> str:
            return self._one(f"#{field_id}", Input).value.strip()

        return ReferenceDetails(
            source_id=text("source"),
            meter_id=text("meter"),
            cords=tuple(c.strip() for c in text("cords").split(",") if c.strip()),
            launch_condition=text("launch") or None,
            # The operator unless another name is typed for this session.
            by=text("by") or fieldkit_app(self).operator,
        )

    def _show_entry_where(self) -> None:
        where, placeholder = self.session.entry_where(self.narrow)
        self._one("#entry-where", Label).update(where, layout=False)
        self._one("#reading", Input).placeholder = placeholder

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
        self._refresh_cell(change.fibre, change.wavelength_nm, change.direction)
        self._queue(change)
        self._say(f"fibre {s.fibre} {s.active_column.heading}: reading removed")
        self._show_entry_where()
        self._show_summary()

    @on(DataTable.CellHighlighted)
    def _cell_pointed(self, event: DataTable.CellHighlighted) -> None:
        # The grid has focus only when the user clicked it (or tabbed to it and moved): go to
        # that cell and back to typing. Moves made by the entry field itself are ignored.
        if self._one("#readings", ReadingsGrid).has_focus:
            self._go_to_cell(event.coordinate.row, event.coordinate.column)

    @on(DataTable.CellSelected)
    def _cell_clicked(self, event: DataTable.CellSelected) -> None:
        self._go_to_cell(event.coordinate.row, event.coordinate.column)

    def _go_to_cell(self, row: int, grid_column: int) -> None:
        grid = self._one("#readings", ReadingsGrid)
        if 0 <= grid_column - 1 < len(grid.columns_shown):
            if self.session.go_to(row + 1, grid.columns_shown[grid_column - 1]):
                self._sync_column_fields()
            self._point()
        self._one("#reading", Input).focus()

    # -- summary ------------------------------------------------------------------------
    def _summary_soon(self) -> None:
        """Refresh the summary shortly: typing a reading a second never waits on it, and a
        burst of readings costs one refresh."""
        if self._summary_timer is None:
            self._summary_timer = self.set_timer(self.SUMMARY_DELAY_S, self._show_summary)

    @property
    def summary_pending(self) -> bool:
        return self._summary_timer is not None

    def _show_summary(self) -> None:
        if self._summary_timer is not None:
            self._summary_timer.stop()
            self._summary_timer = None
        # On a phone terminal the summary has five rows: each line fits the width (shorter
        # words, fewer worst fibres) rather than wrapping, so both wavelengths' worst show.
        lines = self.session.summary_lines(
            width=42 if self.narrow else 0, open_key=keys.display("open")
        )
        self._one("#meter-summary", Static).update("\n".join(lines), layout=False)

    # -- the job ------------------------------------------------------------------------
    def action_pick_job(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        self.app.push_screen(
            JobLinkPicker(title="Save readings onto a job's link"), self._job_picked
        )

    def _job_picked(self, choice: tuple[str, str] | None) -> None:
        if choice:
            self.attach(*choice)

    def attach(self, job_id: str, link_id: str) -> None:
        """Save into this job's link from now on; load what it already holds into the grid."""
        from fieldkit.jobs.store import StoreError

        try:
            link = fieldkit_app(self).store.load(job_id).link(link_id)
        except (StoreError, KeyError) as exc:
            self.notify(f"The job could not be opened: {exc}", severity="error")
            return
        changes, fields = self.session.attach(job_id, link, self._details())
        for field_id, value in fields.items():
            # The handler of the Changed event this causes finds the state already matching.
            self._one(f"#{field_id}", Input).value = value
        for change in changes:
            self._queue(change)
        self._rebuild_grid()
        self._sync_column_fields(force=True)
        self._show_entry_where()
        self._show_summary()
        self._queue(None)

    @property
    def unsaved(self) -> int:
        """Entries not yet in the job file (0 when everything is saved or no job is chosen)."""
        return self.session.saves.unsaved if self.session.job_id else 0

    def _queue(self, change: MeterChange | None) -> None:
        """Queue a change for the job (None: just save what is queued)."""
        if self.session.job_id is None:
            return
        if self.session.saves.put(change):
            self._save_worker = self.run_worker(
                self._drain, thread=True, group="meter-save", exit_on_error=False
            )

    def _save(self, batch: list[MeterChange]) -> Applied:
        s = self.session
        assert s.job_id is not None and s.link_id is not None
        return apply_changes(fieldkit_app(self).store, s.job_id, s.link_id, batch)

    def _drain(self) -> None:
        """Save everything queued, in as few job updates as possible (the save worker's
        thread); the screen hears of each batch by a message."""
        from fieldkit.jobs.store import StoreError

        saves = self.session.saves
        while batch := self._gathered():
            try:
                outcome = self._save(batch)
            except (StoreError, KeyError, ValueError, OSError) as exc:
                saves.failed(str(exc))
                self.post_message(self.SaveFailed(str(exc)))
                return
            saves.done(batch, now())
            self.post_message(self.Saved(outcome))

    def _gathered(self) -> list[MeterChange]:
        """The next batch, once typing pauses: a burst typed ahead goes in one job update
        rather than a reload and write per reading. A reading waits at most SAVE_GATHER_S
        while more keep coming (quitting saves at once)."""
        saves = self.session.saves
        deadline = time.monotonic() + self.SAVE_GATHER_S
        seen = -1
        while (count := saves.unsaved) != seen and time.monotonic() < deadline:
            seen = count
            time.sleep(self.SAVE_QUIET_S)
        return saves.take()

    async def saves_settled(self) -> None:
        """Wait for the save worker to finish what is queued, and show the summary as it
        stands (tests and benchmarks await this rather than polling)."""
        while (worker := self._save_worker) is not None and not worker.is_finished:
            await worker.wait()
        self._show_summary()

    @on(Saved)
    def _saved(self, event: Saved) -> None:
        for warning in self.session.saved(event.outcome):
            self.notify(warning, severity="warning", timeout=10)
        self._summary_soon()

    @on(SaveFailed)
    def _save_failed(self, event: SaveFailed) -> None:
        self.notify(
            f"Readings not saved (kept here; saving again with the next entry): {event.error}",
            severity="error",
            timeout=10,
        )
        self._show_summary()

    def flush_saves(self, timeout_s: float = 5.0) -> bool:
        """Wait for a running save, then save what is still queued, here and now.

        Called when the workspace closes (the app quits), so a reading typed just before is
        not left in memory. True when nothing is left unsaved.
        """
        from fieldkit.jobs.store import StoreError

        saves = self.session.saves
        if self.session.job_id is None:
            return True
        deadline = time.monotonic() + timeout_s
        while not saves.claim():  # the worker's thread ends its batch (it never waits on us)
            if time.monotonic() > deadline:
                return False
            time.sleep(0.01)
        while batch := saves.take():
            try:
                self._save(batch)
            except (StoreError, KeyError, ValueError, OSError) as exc:
                saves.failed(str(exc))
                return False
            saves.done(batch, now())
        return True

    def on_unmount(self) -> None:
        self.flush_saves()

    # -- history ------------------------------------------------------------------------
    def action_history(self) -> None:
        """The fibre's history in the job: every result, the superseded ones marked."""
        from fieldkit.actions.meter import fibre_history
        from fieldkit.jobs.reports import fmt_time, verdict
        from fieldkit.jobs.store import StoreError
        from fieldkit.tui.widgets.dialogs import AskDialog

        s = self.session
        if s.job_id is None or s.link_id is None:
            self._say("Ctrl+O: choose a job first; the history is the one saved in the job.")
            return
        self.flush_saves()
        try:
            link = fieldkit_app(self).store.load(s.job_id).link(s.link_id)
        except (StoreError, KeyError) as exc:
            self._say(f"The history could not be read: {exc}", error=True)
            return
        lines = [
            f"{fmt_time(r.at)} {r.wavelength_nm:g} nm {r.direction}: {r.loss_db:.2f} dB "
            f"{verdict(r)}" + (f" ({r.by})" if r.by else "")
            for r in fibre_history(link, s.fibre)
        ] or ["No reading of this fibre is saved in the job yet."]
        self.app.push_screen(AskDialog(f"Fibre {s.fibre} on {link.label}", lines, []))

    # -- recheck ------------------------------------------------------------------------
    def action_recheck(self) -> None:
        from fieldkit.tui.widgets.recheck_dialog import RecheckDialog

        column = self.session.active_column
        current = self.session.current_reference
        if current is None:
            self.notify(f"No reference set for {column.heading} to recheck.", severity="warning")
            return
        tolerance_db = ref.default_drift_tolerance_db(column.wavelength_nm)

        def done(result: tuple[float, float] | None) -> None:
            if result is not None:
                self.apply_recheck(column, *result)

        self.app.push_screen(RecheckDialog(column.heading, current.level_dbm, tolerance_db), done)

    def apply_recheck(self, column: GridColumn, level_dbm: float, tolerance_db: float) -> ref.Drift:
        """Compare a recheck with the column's reference; beyond tolerance, mark its results in
        doubt."""
        done = self.session.apply_recheck(column, level_dbm, tolerance_db, by=self._details().by)
        for fibre, w, d in done.doubted:
            self._refresh_cell(fibre, w, d)
        self._say(f"{column.heading}: {done.drift.message}", error=not done.drift.within)
        self._queue(done.change)
        self._show_reference_note()
        self._show_summary()
        return done.drift
