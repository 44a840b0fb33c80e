"""The Traces workspace: open an OTDR trace, both directions of a fibre, or a folder; read the
event table beside the drawn trace; send an event to the fault workspace.

Layout and wiring only: the state is :class:`fieldkit.traces.session.TraceSession`, the
numbers come from :mod:`fieldkit.traces`, the same as ``fieldkit trace``.
"""

from __future__ import annotations

from dataclasses import replace

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen, Screen
from textual.widgets import (
    Button,
    DataTable,
    Input,
    Label,
    OptionList,
    ProgressBar,
    Static,
)
from textual.widgets.option_list import Option

from fieldkit import safety
from fieldkit.text.escape import terminal
from fieldkit.traces.folder import FolderResult
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.session import TraceSession
from fieldkit.tui import keys
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.trace_plot import Mark, TracePlot
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar


class TracesScreen(Screen[None]):
    """OTDR traces: events, both directions averaged, the trace drawn."""

    CSS_PATH = "traces.tcss"
    AUTO_FOCUS = "#traces-a"
    # Keys follow the project's key table: Ctrl+O open, Ctrl+S save onto a job's link (here:
    # into a closure's splice log), Ctrl+G go to the result (here: the break, in Fault),
    # Ctrl+Y cycle what the list shows, Esc close (back to the folder's fibres).
    BINDINGS = keys.bindings("traces")

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "back":
            return self.session.folder is not None and self.session.a is not None
        return True

    def __init__(self) -> None:
        super().__init__()
        self.session = TraceSession()
        self.selected: int | None = None  # event number selected in the table / plot
        self.job_link: tuple[str, str] | None = None  # chosen for the splice log: landmarks too

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Horizontal(id="traces-files"):
            yield Label("A→B", classes="traces-label")
            yield Input(
                placeholder="trace file or folder",
                id="traces-a",
                compact=True,
                tooltip="A trace from end A (.sor or text), or a folder of traces",
            )
            yield Label("B→A", classes="traces-label")
            yield Input(
                placeholder="other end (optional)",
                id="traces-b",
                compact=True,
                tooltip="The same fibre traced from end B",
            )
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
        self.query_one("#traces-progress").display = False
        self._say("Type a trace file (and the other end's) or a folder, then Enter.")
        self._fit_caution()

    def on_resize(self) -> None:
        self._fit_caution()
        self._fill_table()

    def _fit_caution(self) -> None:
        narrow = self.size.width < 72
        caution = self.query_one("#traces-caution", Static)
        caution.update(safety.OTDR_LIVE_FIBRE_SHORT if narrow else safety.OTDR_LIVE_FIBRE_MEDIUM)
        caution.tooltip = f"{safety.OTDR_LIVE_FIBRE} {safety.DEFER}"

    @property
    def wide(self) -> bool:
        return self.size.width >= 72

    def _say(self, text: str, problem: bool = False) -> None:
        status = self.query_one("#traces-status", Static)
        status.update(terminal(text))
        status.set_class(problem, "-problem")

    # -- opening ---------------------------------------------------------------------------
    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        self.action_open()

    @on(Button.Pressed, "#traces-open")
    def _open_pressed(self) -> None:
        self.action_open()

    def action_open(self) -> None:
        from pathlib import Path

        path_a = self.query_one("#traces-a", Input).value
        path_b = self.query_one("#traces-b", Input).value
        self._shipped_limits()
        if path_a.strip() and Path(path_a.strip()).expanduser().is_dir():
            self._open_folder(path_a)
            return
        try:
            summary = self.session.open(path_a, path_b)
        except TraceFileError as exc:
            self._say(str(exc), problem=True)  # the typed paths stay as typed
            return
        self.session.folder = None
        self.selected = None
        self._say(summary)
        self._show()
        self.query_one("#traces-note", Static).update(terminal(self.session.limits_summary()))
        self.query_one("#traces-table", DataTable).focus()

    def _shipped_limits(self) -> None:
        """Before the first open, the shipped presets (and the user's own) give the limits."""
        from fieldkit.actions.traces import trace_limits
        from fieldkit.presets import load_presets

        if self.session.settings.limits.origin == "defaults":
            try:
                library = load_presets(fieldkit_app(self).config_dir)
                self.session.settings = replace(self.session.settings, limits=trace_limits(library))
            except Exception:  # noqa: BLE001 - presets replaced by the user's: keep built-ins
                return

    def _open_folder(self, path: str) -> None:
        bar = self.query_one("#traces-progress", ProgressBar)
        bar.display = True
        bar.update(total=None, progress=0)
        self._say("Analysing the folder...")
        self._analyse_folder(path)

    @work(thread=True, exclusive=True, group="traces-folder", exit_on_error=False)
    def _analyse_folder(self, path: str) -> None:
        bar = self.query_one("#traces-progress", ProgressBar)

        def progress(done: int, total: int, name: str) -> None:
            self.app.call_from_thread(bar.update, total=total, progress=done)

        try:
            result = self.session.open_folder(path, progress)
        except TraceFileError as exc:
            self.app.call_from_thread(self._folder_failed, str(exc))
            return
        self.app.call_from_thread(self._folder_done, result)

    def _folder_failed(self, message: str) -> None:
        self.query_one("#traces-progress").display = False
        self._say(message, problem=True)

    def _folder_done(self, result: FolderResult) -> None:
        self.query_one("#traces-progress").display = False
        self.session.a = self.session.b = self.session.paired = None
        self.query_one("#traces-plot", TracePlot).clear()
        fails = sum(1 for r in result.rows if r.verdict == "fail")
        self._say(f"{_folder_counts(result)}, {fails} failed; Enter on a fibre opens it")
        self._fill_table()
        self.query_one("#traces-table", DataTable).focus()

    # -- showing ---------------------------------------------------------------------------
    def _show(self) -> None:
        plot = self.query_one("#traces-plot", TracePlot)
        curve = self.session.curve()
        if curve is None:
            plot.clear()
        else:
            marks = [Mark(m.number, m.distance_m, m.kind, m.failed) for m in self.session.marks()]
            plot.show_trace(curve[0], curve[1], marks)
        self._fill_table()

    def _fill_table(self) -> None:
        table = self.query_one("#traces-table", DataTable)
        table.clear(columns=True)
        s = self.session
        if s.folder is not None and s.a is None:
            table.border_title = "Fibres (Enter opens one)"
            cols: tuple[str, ...] = ("fibre", "nm", "dirs", "ev", "worst dB", "total", "verdict")
            if not self.wide:
                cols = ("fibre", "nm", "worst dB", "verdict")
            table.add_columns(*cols)
            for k, row in enumerate(s.folder.rows):
                worst = row.worst()
                wl = f"{row.wavelength_nm:g}" if row.wavelength_nm else "?"
                worst_db = f"{worst[1]:.3f}" if worst else "-"
                total = f"{row.total_loss_db:.2f}" if row.total_loss_db is not None else "-"
                cells: tuple[str, ...] = (row.fibre, wl, worst_db)
                if self.wide:
                    cells = (row.fibre, wl, row.directions, str(row.event_count), worst_db, total)
                table.add_row(*(terminal(c) for c in cells), row.verdict, key=f"fibre-{k}")
            return
        table.border_title = s.table_title()
        if s.current is None:
            return
        table.add_columns(*s.columns(self.wide))
        for event_cells in s.rows(self.wide):
            table.add_row(*(terminal(c) for c in event_cells), key=f"event-{event_cells[0]}")
        if self.selected is not None:
            self._highlight(self.selected)

    def _highlight(self, number: int) -> None:
        table = self.query_one("#traces-table", DataTable)
        try:
            row = table.get_row_index(f"event-{number}")
        except Exception:  # the row is not in this table (the instrument's has other numbers)
            return
        table.move_cursor(row=row)

    @on(DataTable.RowHighlighted, "#traces-table")
    def _row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        key = event.row_key.value or ""
        if key.startswith("event-"):
            number = int(key.removeprefix("event-"))
            if number != self.selected:
                self.selected = number
                self.query_one("#traces-plot", TracePlot).select_event(number)
            self.query_one("#traces-note", Static).update(terminal(self.session.event_note(number)))

    @on(DataTable.RowSelected, "#traces-table")
    def _row_selected(self, event: DataTable.RowSelected) -> None:
        key = event.row_key.value or ""
        if key.startswith("fibre-") and self.session.folder is not None:
            row = self.session.folder.rows[int(key.removeprefix("fibre-"))]
            try:
                self._say(self.session.open_row(row))
            except TraceFileError as exc:
                self._say(str(exc), problem=True)
                return
            self.selected = None
            self._show()
            self.refresh_bindings()

    @on(TracePlot.CursorMoved)
    def _cursor_moved(self, event: TracePlot.CursorMoved) -> None:
        if event.mark is not None:
            self.selected = event.mark.number
            self._highlight(event.mark.number)

    # -- actions ---------------------------------------------------------------------------
    # -- the splice log --------------------------------------------------------------------
    def _fibres_to_fill(self, fibre: int | None) -> list:
        from fieldkit.actions.traces import FibreTraces

        s = self.session
        if s.a is None and s.folder is not None:
            out = []
            for row in s.folder.rows:
                if not row.fibre.isdigit():
                    continue
                if row.paired is not None:
                    out.append(FibreTraces(int(row.fibre), paired=row.paired))
                elif row.a_to_b or row.b_to_a:
                    direction = "A->B" if row.a_to_b else "B->A"
                    one = row.a_to_b or row.b_to_a
                    out.append(FibreTraces(int(row.fibre), one_way=one, direction=direction))
            return out
        if fibre is None:
            return []
        if s.paired is not None:
            return [FibreTraces(fibre, paired=s.paired)]
        return [FibreTraces(fibre, one_way=s.a)]

    def action_fill_splices(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        s = self.session
        if s.a is None and s.folder is None:
            self._say(
                f"Open traces first, then {keys.display('save')} fills a closure's splice log.",
                True,
            )
            return
        self.app.push_screen(JobLinkPicker(), self._link_chosen)

    def _link_chosen(self, choice: tuple[str, str] | None) -> None:
        from fieldkit.actions.splices import find_link
        from fieldkit.traces.folder import fibre_label

        if choice is None:
            return
        self.job_link = choice
        store = fieldkit_app(self).store
        try:
            link = find_link(store.load(choice[0]), choice[1])
        except Exception as exc:  # noqa: BLE001 - a store or lookup problem, shown as one line
            self._say(str(exc), True)
            return
        self._judge_by_link(choice)
        closures = [(c.name, c.route_distance_m) for c in link.closures]
        if not closures:
            self._say(f"link {link.label}: no closures yet; add them in the splice log", True)
            return
        s = self.session
        fibre = None
        ask = s.a is not None
        if s.a is not None:
            label = fibre_label(s.a.trace, s.a.trace.source)
            fibre = int(label) if label.isdigit() else None
        self.app.push_screen(
            ClosurePicker(closures, fibre, ask), lambda c: self._closure_chosen(choice, c)
        )

    def _closure_chosen(
        self, where: tuple[str, str], choice: tuple[str, int | None] | None
    ) -> None:
        from fieldkit.actions.traces import fill_splice_log
        from fieldkit.calc.units import InputError

        if choice is None:
            return
        closure, fibre = choice
        fibres = self._fibres_to_fill(fibre)
        store = fieldkit_app(self).store
        by = _operator(self)
        try:
            trial = fill_splice_log(store, *where, closure, fibres, dry_run=True, by=by)
        except InputError as exc:
            self._say(str(exc), True)
            return
        if trial.would_overwrite:
            first, old = trial.would_overwrite[0]
            more = len(trial.would_overwrite) - 1
            question = (
                f"Fibre {first.fibre} {first.direction.replace('->', '→')} already holds "
                f"{old:.3f} dB; the trace says {first.loss_db:.3f} dB"
                + (f" (and {more} more)" if more else "")
                + ". Replace them?"
            )
            self.app.push_screen(
                OverwriteDialog(question),
                lambda yes: self._write(where, closure, fibres, by, bool(yes)),
            )
            return
        self._write(where, closure, fibres, by, False)

    def _write(
        self, where: tuple[str, str], closure: str, fibres: list, by: str, overwrite: bool
    ) -> None:
        from fieldkit.actions.traces import fill_splice_log
        from fieldkit.calc.units import InputError

        store = fieldkit_app(self).store
        try:
            trial = fill_splice_log(store, *where, closure, fibres, dry_run=True, by=by)
            if trial.would_overwrite and not overwrite:
                self._say("Nothing written: the recorded losses stay.")
                return
            done = fill_splice_log(store, *where, closure, fibres, overwrite=overwrite, by=by)
        except InputError as exc:
            self._say(str(exc), True)
            return
        missing = f", {len(done.unmatched)} fibres without an event there" if done.unmatched else ""
        self._say(
            f"Splice log of {closure}: {len(done.fill.written)} one-way losses written "
            f"({len(done.matched)} fibres{missing})"
        )

    def _judge_by_link(self, choice: tuple[str, str]) -> None:
        """The chosen link's presets judge the open traces from now on; say which limits."""
        from fieldkit.actions.traces import link_limits
        from fieldkit.presets import load_presets

        app = fieldkit_app(self)
        try:
            limits = link_limits(app.store, load_presets(app.config_dir), *choice)
        except Exception as exc:  # noqa: BLE001 - a store or preset problem, shown as one line
            self._say(str(exc), True)
            return
        self.session.set_limits(limits)
        self._show()
        self.query_one("#traces-note", Static).update(terminal(self.session.limits_summary()))

    def action_back(self) -> None:
        s = self.session
        if s.folder is None:
            return
        s.a = s.b = s.paired = None
        self.selected = None
        self.query_one("#traces-plot", TracePlot).clear()
        self._say(f"{_folder_counts(s.folder)}; Enter on a fibre opens it")
        self._fill_table()
        self.refresh_bindings()

    def action_cycle_view(self) -> None:
        """A→B, B→A (when both are open), then the instrument's own events of each."""
        s = self.session
        if s.current is None:
            return
        views = [("AB", False)]
        if s.b is not None:
            views.append(("BA", False))
        for direction, result in (("AB", s.a), ("BA", s.b)):
            if result is not None and result.trace.instrument_events:
                views.append((direction, True))
        k = (
            views.index((s.shown, s.instrument_table))
            if (s.shown, s.instrument_table) in views
            else 0
        )
        s.shown, s.instrument_table = views[(k + 1) % len(views)]
        self.selected = None
        which = "B→A" if s.shown == "BA" else "A→B"
        self._say(
            f"{which}: " + ("the instrument's own events" if s.instrument_table else "our events")
        )
        self._show()

    async def action_send_fault(self) -> None:
        try:
            hand = self.session.fault_handoff(
                self.selected if not self.session.instrument_table else None
            )
        except TraceFileError as exc:
            self._say(str(exc), problem=True)
            return
        await self.app.switch_mode("fault")
        fault = self.app.screen
        prefill = getattr(fault, "prefill", None)
        if prefill is None:
            return
        prefill(
            hand.distance_m,
            ior_set=hand.group_index,
            landmarks=list(hand.landmarks),
            note=hand.note,
        )


def _folder_counts(result: FolderResult) -> str:
    files = f"{result.files} file{'s' if result.files != 1 else ''}"
    rows = len(result.rows)
    return f"{files}, {rows} fibre{'s' if rows != 1 else ''}"


class ClosurePicker(ModalScreen[tuple[str, int | None] | None]):
    """Pick the closure whose splice log the traces fill (and the fibre, for one pair)."""

    DEFAULT_CSS = """
    ClosurePicker { align: center middle; }
    ClosurePicker > Vertical {
        width: 90%; max-width: 70; height: auto; max-height: 100%;
        border: round $accent; background: $surface; padding: 0 1;
    }
    ClosurePicker OptionList { height: auto; max-height: 10; }
    ClosurePicker Horizontal { height: 1; }
    ClosurePicker Label { width: 8; color: $text-muted; }
    ClosurePicker Input { width: 10; }
    ClosurePicker #cp-error { color: $error; }
    """
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(
        self, closures: list[tuple[str, float | None]], fibre: int | None, ask_fibre: bool
    ):
        super().__init__()
        self.closures = closures
        self.fibre = fibre
        self.ask_fibre = ask_fibre

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Fill which closure's splice log?"
            options = []
            for name, route in self.closures:
                where = f"route {route:.0f} m" if route is not None else "no route position"
                options.append(Option(terminal(f"{name}  ({where})"), disabled=route is None))
            yield OptionList(*options, id="cp-closures")
            if self.ask_fibre:
                with Horizontal():
                    yield Label("Fibre")
                    yield Input(
                        value=str(self.fibre or ""),
                        restrict=r"[0-9]*",
                        compact=True,
                        id="cp-fibre",
                        tooltip="The fibre number these traces hold",
                    )
            yield Static("", id="cp-error", markup=False)
            yield Static("Enter on a closure fills it; Esc cancels.", classes="field-note")

    def action_cancel(self) -> None:
        self.dismiss(None)

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        name = self.closures[event.option_index][0]
        fibre: int | None = None
        if self.ask_fibre:
            text = self.query_one("#cp-fibre", Input).value.strip()
            if not text or int(text) < 1:
                self.query_one("#cp-error", Static).update("Type the fibre number first.")
                return
            fibre = int(text)
        self.dismiss((name, fibre))


class OverwriteDialog(ModalScreen[bool]):
    """Ask before replacing splice losses already recorded."""

    DEFAULT_CSS = """
    OverwriteDialog { align: center middle; }
    OverwriteDialog > Vertical {
        width: 90%; max-width: 70; height: auto;
        border: round $warning; background: $surface; padding: 0 1;
    }
    OverwriteDialog Horizontal { height: auto; }
    OverwriteDialog Button { margin-right: 2; }
    """
    BINDINGS = [Binding("escape", "no", "Keep")]

    def __init__(self, question: str) -> None:
        super().__init__()
        self.question = question

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Replace recorded losses?"
            yield Static(self.question, markup=False)
            with Horizontal():
                yield Button("Replace", id="ow-yes", variant="warning", compact=True)
                yield Button("Keep (write nothing)", id="ow-no", compact=True)

    def action_no(self) -> None:
        self.dismiss(False)

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id == "ow-yes")


def _operator(node: Screen[None]) -> str:
    """Who did the work: the app's operator once it has one, else $FIELDKIT_OPERATOR."""
    import os

    name = getattr(node.app, "operator", None)
    return str(name) if name else os.environ.get("FIELDKIT_OPERATOR", "")
