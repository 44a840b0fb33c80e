"""The meter workspace: a reference by method, a whole cable's readings, pass/fail at once.

Typing goes into one entry field; the grid (a DataTable) shows the losses. Type a reading,
Enter, and the cursor moves on to the next fibre; Up/Down move between fibres, Ctrl+←/→ between
columns, and a click on a cell goes there. A plain number is a level in dBm; a unit (µW, nW,
mW, dBW) may follow it. Results are saved into the chosen job's link as they are entered (a
background save after each Enter; entries made while a save runs go with the next one).
"""

from __future__ import annotations

import threading
from dataclasses import dataclass
from datetime import datetime
from typing import Any

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.containers import Grid, Horizontal, Vertical
from textual.screen import Screen
from textual.timer import Timer
from textual.widgets import Collapsible, DataTable, Input, Label, Static

from fieldkit import safety
from fieldkit.actions.meter import (
    Applied,
    ClearReading,
    MeterChange,
    PutReading,
    Recheck,
    ReferenceDetails,
    SetLimit,
    apply_changes,
)
from fieldkit.calc import reference as ref
from fieldkit.calc.units import InputError, Kind, parse, parse_number
from fieldkit.jobs.counting import Count, Tally, cell_count, fibre_count
from fieldkit.tui import keys
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS
from fieldkit.tui.widgets.readings_grid import EntryInput, GridColumn, ReadingsGrid
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

_COLUMNS = f"{keys.display('column_previous')}/{keys.display('column_next')[5:]}"
KEYS_HINT = (
    f"Enter: next fibre · ↑↓ PgUp PgDn: fibres · {_COLUMNS}: columns · "
    f"{keys.hint('remove')}: remove · click a cell"
)
#: The same keys in one line of a phone terminal, where rows go to the grid.
KEYS_HINT_NARROW = f"Enter/↑↓ fibre · {_COLUMNS} col · {keys.hint('remove')} remove"
DIRECTION_WORDS = {"1": "A→B", "2": "both"}
MAX_FIBRES = 6912  # the largest ribbon cables made; anything above is a typing mistake


def _now() -> datetime:
    from fieldkit.jobs.models import now

    return now()


def counted(count: int, one: str) -> str:
    from fieldkit.jobs.today import counted

    return counted(count, one)


@dataclass(slots=True)
class Cell:
    """One reading as entered, with the reference it was taken against."""

    reading_dbm: float
    reference_dbm: float
    at: datetime
    in_doubt: bool = False

    @property
    def loss_db(self) -> float:
        return ref.insertion_loss_db(self.reference_dbm, self.reading_dbm)


@dataclass(slots=True)
class ColumnReference:
    """The reference in use for one column (wavelength and direction)."""

    level_dbm: float
    set_at: datetime
    last_good_at: datetime
    reference_id: str | None = None  # once saved into the job
    in_doubt: bool = False


def meter_tallies(
    cells: dict[tuple[int, float, str], Cell],
    limits_db: dict[float, float | None],
    fibres: int,
    directions: list[str],
) -> dict[float, Tally]:
    """The fibres of each wavelength counted by the one rule (:mod:`fieldkit.jobs.counting`)."""
    per_fibre: dict[tuple[float, int], list[Count]] = {}
    for (fibre, w, d), cell in cells.items():
        if fibre > fibres or w not in limits_db or d not in directions:
            continue
        count = cell_count(cell.loss_db, limits_db[w], in_doubt=cell.in_doubt)
        per_fibre.setdefault((w, fibre), []).append(count)
    out = {w: Tally() for w in limits_db}
    for (w, _fibre), counts in per_fibre.items():
        out[w].add(fibre_count(counts))
    return out


def _fit(width: int, *choices: str) -> str:
    """The first of ``choices`` no wider than ``width`` (0: no limit); else the last."""
    return next((c for c in choices if not width or len(c) <= width), choices[-1])


class MeterScreen(Screen[None]):
    """Reference panel, readings grid and summary."""

    CSS_PATH = "meter.tcss"
    AUTO_FOCUS = "#reading"
    BINDINGS = keys.bindings("meter")

    def __init__(self) -> None:
        super().__init__()
        self._method = ref.Method.ONE_CORD
        self._wavelengths: list[float] = [1310.0, 1550.0]
        self._directions: list[str] = ["A->B"]
        self._fibres = 12
        self._cells: dict[tuple[int, float, str], Cell] = {}
        self._refs: dict[tuple[float, str], ColumnReference] = {}
        self._ref_text: dict[tuple[float, str], str] = {}
        self._limit_text: dict[float, str] = {}
        self._typed_limits: dict[float, float] = {}
        self._budget_limits: dict[float, tuple[float, str]] = {}
        self._fibre = 1
        self._column_index = 0
        self._synced_column: GridColumn | None = None
        self._summary_timer: Timer | None = None
        self._job_id: str | None = None
        self._link_id: str | None = None
        self._link_label = ""
        self._link: Any = None
        self._pending: list[MeterChange] = []
        self._lock = threading.Lock()
        self._saving = False
        self._save_error: str | None = None
        self._saved_at: datetime | None = None
        self._hint_shown = False

    # -- layout ----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with Vertical(id="meter-body"):
            with Grid(id="meter-setup"):
                yield from self._field(
                    "Method",
                    "method",
                    "one-cord",
                    "one-cord, two-cord or three-cord (TIA Method B, A or C)",
                )
                yield from self._field(
                    "Wavelength",
                    "wavelengths",
                    "1310 1550",
                    "Test wavelengths, e.g. 1310 1550 or 850 1300",
                )
                yield from self._field("Fibres", "fibres", "12", "Number of fibres in the cable")
                yield from self._field(
                    "Directions",
                    "directions",
                    "1",
                    "1: A->B only; 2: both directions (each its own reference)",
                    meaning=DIRECTION_WORDS["1"],
                )
                yield from self._field(
                    "Ref",
                    "reference",
                    "",
                    "Reference level of this column: dBm, or µW, nW, mW",
                    placeholder="dBm",
                )
                yield from self._field(
                    "Limit",
                    "limit",
                    "",
                    "Largest loss allowed at this wavelength, dB; empty: "
                    "from the link's budget, counting the method's end "
                    "connections",
                )
            with Collapsible(title="Reference details", id="meter-details", collapsed=True):
                with Grid(id="meter-details-grid"):
                    yield from self._field("Source", "source", "", "Light source identifier")
                    yield from self._field("Meter", "meter", "", "Power meter identifier")
                    yield from self._field(
                        "Cords", "cords", "", "Reference cords used, separated by commas"
                    )
                    yield from self._field(
                        "Launch", "launch", "", "Launch condition (multimode), e.g. encircled flux"
                    )
                    yield from self._field(
                        "Src out",
                        "source-level",
                        "",
                        "What the source should deliver through a good cord, "
                        "dBm (default -20 multimode, -7 single-mode; common "
                        "practice)",
                    )
                    yield from self._field("By", "by", "", "Who takes the readings")
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
                    check=self._reading_acceptable,
                    tooltip="Type the reading and press Enter; Up/Down move "
                    f"between fibres, {_COLUMNS} between columns",
                )
            yield Static("", id="entry-message", classes="field-note")
            with Horizontal(id="meter-main"):
                yield ReadingsGrid(id="readings")
                yield Static("", id="meter-summary")
        yield KeyFooter()

    def _field(
        self,
        label: str,
        field_id: str,
        value: str,
        tooltip: str,
        *,
        meaning: str | None = None,
        placeholder: str = "",
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
                if meaning is not None:
                    # What the number means, beside it: "1 A→B", "2 both".
                    yield Label(meaning, classes="meter-meaning", id=f"{field_id}-meaning")
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

    # -- the columns ------------------------------------------------------------------------
    @property
    def measured_columns(self) -> list[GridColumn]:
        return [GridColumn(w, d) for w in self._wavelengths for d in self._directions]

    def _grid_columns(self) -> list[GridColumn]:
        out: list[GridColumn] = []
        for w in self._wavelengths:
            out += [GridColumn(w, d) for d in self._directions]
            if len(self._directions) == 2:
                out.append(GridColumn(w, None))
        return out

    @property
    def active_column(self) -> GridColumn:
        return self.measured_columns[self._column_index]

    def _rebuild_grid(self) -> None:
        grid = self.query_one(ReadingsGrid)
        cells: dict[tuple[int, str], Text] = {}
        for column in self._grid_columns():
            for fibre in range(1, self._fibres + 1):
                text = self._cell_text(fibre, column)
                if text.plain:
                    cells[(fibre, column.key)] = text
        grid.set_layout(self._fibres, self._grid_columns(), cells)
        self._column_index = min(self._column_index, len(self.measured_columns) - 1)
        self._fibre = min(self._fibre, self._fibres)
        grid.point_at(self._fibre, self.active_column)

    def _cell_text(self, fibre: int, column: GridColumn) -> Text:
        limit_db = self._limit_db(column.wavelength_nm)
        if column.direction is None:
            a = self._cells.get((fibre, column.wavelength_nm, "A->B"))
            b = self._cells.get((fibre, column.wavelength_nm, "B->A"))
            if a is None or b is None:
                return Text("")
            verdict = ref.judge_fibre({"A->B": a.loss_db, "B->A": b.loss_db}, limit_db)
            average_db = verdict.average_db if verdict.average_db is not None else 0.0
            return self._styled(average_db, verdict.status, a.in_doubt or b.in_doubt)
        cell = self._cells.get((fibre, column.wavelength_nm, column.direction))
        if cell is None:
            return Text("")
        verdict_one = ref.judge(cell.loss_db, limit_db)
        return self._styled(cell.loss_db, verdict_one.status, cell.in_doubt)

    @staticmethod
    def _styled(loss_db: float, status: ref.Status, in_doubt: bool) -> Text:
        # A mark beside the number as well as a colour, so the verdict reads without colour.
        mark, style = {
            ref.Status.PASS: (" ", "green"),
            ref.Status.FAIL: ("✗", "bold red"),
            ref.Status.REFERENCE_PROBLEM: ("!", "bold yellow"),
            ref.Status.NO_LIMIT: (" ", ""),
        }[status]
        if in_doubt:
            mark, style = "?", "yellow"
        return Text(f"{loss_db:6.2f}{mark}", style=style, justify="right")

    def _refresh_cell(self, fibre: int, wavelength_nm: float, direction: str) -> None:
        grid = self.query_one(ReadingsGrid)
        column = GridColumn(wavelength_nm, direction)
        grid.show(fibre, column, self._cell_text(fibre, column))
        if len(self._directions) == 2:
            average = GridColumn(wavelength_nm, None)
            grid.show(fibre, average, self._cell_text(fibre, average))

    # -- limits ---------------------------------------------------------------------------
    def _limit_db(self, wavelength_nm: float) -> float | None:
        if wavelength_nm in self._typed_limits:
            return self._typed_limits[wavelength_nm]
        budget = self._budget_limits.get(wavelength_nm)
        return budget[0] if budget else None

    def _recompute_budget_limits(self) -> None:
        self._budget_limits.clear()
        if self._link is None:
            return
        from fieldkit.actions import meter as meter_log

        for wavelength_nm in self._wavelengths:
            try:
                found = meter_log.budget_limit_db(self._link, wavelength_nm, self._method)
            except InputError:
                found = None
            if found is not None:
                self._budget_limits[wavelength_nm] = found

    # -- typing in the setup fields -------------------------------------------------------
    def _show_error(self, field_id: str, message: str) -> None:
        error = self.query_one(f"#{field_id}-error", Static)
        error.update(message)
        error.display = bool(message)

    @on(Input.Changed)
    def _input_changed(self, event: Input.Changed) -> None:
        if event.value != event.input.value:
            return  # stale: the field changed again since (its own event follows)
        handlers = {
            "method": self._method_changed,
            "wavelengths": self._wavelengths_changed,
            "fibres": self._fibres_changed,
            "directions": self._directions_changed,
            "reference": self._reference_changed,
            "limit": self._limit_changed,
            "reading": self._reading_changed,
            "source-level": self._reference_details_changed,
            "launch": self._reference_details_changed,
        }
        handler = handlers.get(event.input.id or "")
        if handler is not None:
            handler(event.value)

    def _method_changed(self, text: str) -> None:
        try:
            self._method = ref.parse_method(text)
        except InputError as exc:
            self._show_error("method", str(exc))
            return
        self._show_error("method", "")
        self._recompute_budget_limits()
        self._after_limits_changed()

    def _wavelengths_changed(self, text: str) -> None:
        try:
            wavelengths = self._parse_wavelengths(text)
        except InputError as exc:
            self._show_error("wavelengths", str(exc))
            return
        self._show_error("wavelengths", "")
        if wavelengths != self._wavelengths:
            active = self.active_column
            self._wavelengths = wavelengths
            columns = self.measured_columns
            self._column_index = columns.index(active) if active in columns else 0
            self._recompute_budget_limits()
            self._rebuild_grid()
            self._sync_column_fields()
            self._show_entry_where()
            self._show_summary()

    @staticmethod
    def _parse_wavelengths(text: str) -> list[float]:
        parts = text.replace(",", " ").replace("/", " ").split()
        if not parts:
            raise InputError("wavelengths: type at least one, e.g. 1310 1550")
        out: list[float] = []
        for part in parts:
            nm = parse(part, Kind.LENGTH, default_unit="nm", what="wavelength").to("nm")
            if not 600 <= nm <= 1700:
                raise InputError(
                    f"wavelength: {nm:g} nm is outside the fibre test bands (600-1700 nm)"
                )
            if any(abs(nm - w) <= 0.5 for w in out):
                raise InputError(f"wavelength: {nm:g} nm is listed twice")
            out.append(round(nm, 3))
        if len(out) > 4:
            raise InputError("wavelengths: at most four at a time")
        return out

    def _fibres_changed(self, text: str) -> None:
        try:
            number = parse_number(text, "fibres")
            if number != int(number) or not 1 <= number <= MAX_FIBRES:
                raise InputError(f"fibres: {text.strip()} is not a fibre count (1 to {MAX_FIBRES})")
        except InputError as exc:
            self._show_error("fibres", str(exc))
            return
        self._show_error("fibres", "")
        if int(number) != self._fibres:
            self._fibres = int(number)
            self._rebuild_grid()
            self._show_entry_where()
            self._show_summary()

    def _directions_changed(self, text: str) -> None:
        value = text.strip()
        if value not in ("1", "2"):
            self._show_error("directions", "directions: 1 (A->B only) or 2 (both directions)")
            self.query_one("#directions-meaning", Label).update("?")
            return
        self._show_error("directions", "")
        self.query_one("#directions-meaning", Label).update(DIRECTION_WORDS[value])
        directions = ["A->B"] if value == "1" else ["A->B", "B->A"]
        if directions != self._directions:
            active = self.active_column
            self._directions = directions
            columns = self.measured_columns
            self._column_index = columns.index(active) if active in columns else 0
            self._rebuild_grid()
            self._sync_column_fields()
            self._show_entry_where()
            self._show_summary()

    def _reference_changed(self, text: str) -> None:
        column = self.active_column
        key = (column.wavelength_nm, column.direction or "A->B")
        if text == self._ref_text.get(key, "") and (key in self._refs) == bool(text.strip()):
            return  # the field shown again for this column (Ctrl+←/→), nothing typed
        self._ref_text[key] = text
        if not text.strip():
            self._show_error("reference", "")
            self._refs.pop(key, None)
            self._show_reference_note()
            self._show_summary()
            return
        try:
            level = ref.level_dbm(text, "reference")
        except InputError as exc:
            # No reading is taken against a reference the field no longer shows.
            self._show_error("reference", str(exc))
            self._refs.pop(key, None)
            self._show_reference_note()
            self._show_summary()
            return
        self._show_error("reference", "")
        current = self._refs.get(key)
        if current is None or abs(current.level_dbm - level) > 1e-9:
            stamp = _now()
            self._refs[key] = ColumnReference(level, stamp, stamp)
        self._show_reference_note()
        self._show_summary()

    def _reference_details_changed(self, text: str) -> None:
        self._show_reference_note()

    def _limit_changed(self, text: str) -> None:
        wavelength_nm = self.active_column.wavelength_nm
        if text == self._limit_text.get(wavelength_nm, ""):
            return  # the field shown again for this wavelength (Ctrl+←/→), nothing typed
        self._limit_text[wavelength_nm] = text
        if not text.strip():
            self._show_error("limit", "")
            self._typed_limits.pop(wavelength_nm, None)
        else:
            try:
                self._typed_limits[wavelength_nm] = ref.loss_limit_db(text)
            except InputError as exc:
                self._show_error("limit", str(exc))
                return
            self._show_error("limit", "")
        self._after_limits_changed(wavelength_nm)

    def _after_limits_changed(self, wavelength_nm: float | None = None) -> None:
        self._rebuild_grid()
        self._show_summary()
        self._show_limit_placeholder()
        for w in [wavelength_nm] if wavelength_nm is not None else self._wavelengths:
            self._queue(SetLimit(w, self._limit_db(w), self._method))

    def _show_limit_placeholder(self) -> None:
        budget = self._budget_limits.get(self.active_column.wavelength_nm)
        # The note above says the limit is the budget's; 44 columns leave 10 for the field.
        self.query_one("#limit", Input).placeholder = (
            "dB"
            if not budget
            else f"{budget[0]:.2f} dB"
            if self.narrow
            else f"{budget[0]:.2f} budget"
        )

    def _sync_column_fields(self, force: bool = False) -> None:
        """Show the active column's reference and its wavelength's limit in the fields.

        Only when the active column changed (or ``force``): the fields are never rewritten
        under text the user is typing for the same column.
        """
        column = self.active_column
        if force or column != self._synced_column:
            self._synced_column = column
            # The Changed events these cause find the texts already stored: no-ops.
            key = (column.wavelength_nm, column.direction or "A->B")
            self.query_one("#reference", Input).value = self._ref_text.get(key, "")
            self.query_one("#limit", Input).value = self._limit_text.get(column.wavelength_nm, "")
            self._show_error("reference", "")
            self._show_error("limit", "")
        self.query_one("#reference-box Label", Label).update(
            f"Ref {column.wavelength_nm:g}"
            + ("" if len(self._directions) == 1 else " →" if column.direction == "A->B" else " ←")
        )
        self._show_limit_placeholder()
        self._show_reference_note()

    def _show_reference_note(self) -> None:
        column = self.active_column
        current = self._refs.get((column.wavelength_nm, column.direction or "A->B"))
        note = self.query_one("#reference-note", Static)
        if current is None:
            # Setting a reference means handling live cords: the caution goes with the prompt.
            note.update(
                f"Set the reference for {column.heading} (Ref), then type readings.\n"
                f"⚠ {safety.INVISIBLE_LIGHT_SHORT} (more under Reference details)"
                if not self.narrow
                else f"Set Ref {column.heading}, then type readings.\n"
                f"⚠ {safety.INVISIBLE_LIGHT_SHORT}"
            )
            return
        source_dbm = None
        source_text = self.query_one("#source-level", Input).value
        if source_text.strip():
            try:
                source_dbm = ref.level_dbm(source_text, "source output")
                self._show_error("source-level", "")
            except InputError as exc:
                self._show_error("source-level", str(exc))
        warnings = ref.reference_warnings(
            current.level_dbm,
            source_dbm=source_dbm,
            wavelength_nm=column.wavelength_nm,
            launch_condition=self.query_one("#launch", Input).value,
        )
        method = self._method
        budget = self._budget_limits.get(column.wavelength_nm)
        # The method's TIA letter is in the Method field's tooltip; a phone has one line here.
        name = method.value if self.narrow else method.label
        line = f"{name}: {method.end_connections} of 2 end connections counted"
        if budget and column.wavelength_nm not in self._typed_limits:
            left_out = 2 - method.end_connections
            # On a phone terminal the limit goes on its own line (each fits 42 columns).
            line += "\n" if self.narrow else "; "
            line += f"limit {budget[0]:.2f} dB"
            if left_out:
                # "end" on a phone: the line above says which connections.
                what = "connection" if self.narrow else "end connection"
                line += f": budget less {counted(left_out, what)}"
            else:
                line += " from the budget"
        # The note has two or three rows: a drifted reference and the warnings about this one
        # come first, so they are never the part cut off.
        lines = []
        if current.in_doubt:
            lines.append("This reference drifted at its recheck: set a new one and retest.")
        lines += [f"⚠ {w}" for w in warnings]
        lines.append(line)
        note.update("\n".join(lines))

    # -- entering readings --------------------------------------------------------------
    def _say(self, text: str | None, *, error: bool = False) -> None:
        """The entry line's message (fixed height: no layout pass per reading)."""
        message = self.query_one("#entry-message", Static)
        if text is not None:
            self._hint_shown = False
        if message.has_class("field-error") != error:
            message.set_class(error, "field-error")
        if text is not None:
            message.update(text, layout=False)

    def _reading_changed(self, text: str) -> None:
        if not text.strip():
            self._say(None)
            return
        try:
            ref.level_dbm(text, "reading")
        except InputError as exc:
            self._say(str(exc), error=True)
            return
        self._say(None)

    def _reading_acceptable(self, text: str) -> bool:
        """Whether Enter may take this text (a reading, with a reference set, or nothing)."""
        if not text.strip():
            return True
        column = self.active_column
        if (column.wavelength_nm, column.direction or "A->B") not in self._refs:
            return False
        try:
            ref.level_dbm(text, "reading")
        except InputError:
            return False
        return True

    @on(EntryInput.Entered, "#reading")
    def _reading_entered(self, event: EntryInput.Entered) -> None:
        text = event.value
        if not text.strip():
            self.action_move(1)
            return
        column = self.active_column
        direction = column.direction or "A->B"
        current = self._refs.get((column.wavelength_nm, direction))
        try:
            reading_dbm = ref.level_dbm(text, "reading")
        except InputError as exc:
            self._say(str(exc), error=True)
            return
        if current is None:
            self._say(
                f"Set the reference for {column.heading} first (the Ref field); "
                "the reading is kept here.",
                error=True,
            )
            return
        if not event.accepted:
            # Refused when Enter was pressed but fine now (the reference was set since):
            # the text is still in the field; take it.
            event.entry.value = ""
        stamp = _now()
        cell = Cell(reading_dbm, current.level_dbm, stamp, in_doubt=current.in_doubt)
        self._cells[(self._fibre, column.wavelength_nm, direction)] = cell
        self._refresh_cell(self._fibre, column.wavelength_nm, direction)
        verdict = ref.judge(cell.loss_db, self._limit_db(column.wavelength_nm))
        self._say(
            self._verdict_words(self._fibre, column, verdict, short=self.narrow),
            error=verdict.status is ref.Status.REFERENCE_PROBLEM,
        )
        self._queue(
            PutReading(
                self._fibre,
                column.wavelength_nm,
                direction,
                reading_dbm,
                current.level_dbm,
                self._method,
                self._limit_db(column.wavelength_nm),
                stamp,
                self._details(set_at=current.set_at),
            )
        )
        self.action_next_empty()
        self._summary_soon()

    @staticmethod
    def _verdict_words(
        fibre: int, column: GridColumn, verdict: ref.Verdict, *, short: bool = False
    ) -> str:
        """What the reading came to; ``short``: in one line of 42 columns (a phone terminal)."""
        head = f"fibre {fibre} {column.heading}: {verdict.loss_db:.2f} dB"
        if verdict.status is ref.Status.REFERENCE_PROBLEM:
            if short:
                return f"{head} negative: bad reference? Clean, re-reference."
            return f"{head} — negative: a reference problem, not a good fibre. Clean, re-reference."
        if verdict.margin_db is None:
            return f"{head} (no limit)"
        word = "pass" if verdict.status is ref.Status.PASS else "FAIL"
        if short:
            return f"{head} {word} {verdict.margin_db:+.2f}"
        return f"{head} {word}, margin {verdict.margin_db:+.2f} dB"

    def _details(self, set_at: datetime | None = None) -> ReferenceDetails:
        def text(field_id: str) -> str:
            return self.query_one(f"#{field_id}", Input).value.strip()

        return ReferenceDetails(
            source_id=text("source"),
            meter_id=text("meter"),
            cords=tuple(c.strip() for c in text("cords").split(",") if c.strip()),
            launch_condition=text("launch") or None,
            # The operator unless another name is typed for this session.
            by=text("by") or self.app.operator,  # type: ignore[attr-defined]
            set_at=set_at,
        )

    def _show_entry_where(self) -> None:
        column = self.active_column
        cell = self._cells.get((self._fibre, column.wavelength_nm, column.direction or "A->B"))
        self.query_one("#entry-where", Label).update(
            f"fibre {self._fibre} {column.heading}", layout=False
        )
        reading = self.query_one("#reading", Input)
        replace = "" if self.narrow else "; type to replace"  # 21 columns at 44
        reading.placeholder = f"now {cell.reading_dbm:.2f} dBm{replace}" if cell else "reading, dBm"

    def action_next_empty(self) -> None:
        """After a reading: the next fibre down; past the last fibre, the first empty fibre of
        this or a following column. When every cell is filled the cursor stays (it never wraps
        onto a filled fibre, where the next number would be a retest)."""
        if self._fibre < self._fibres:
            self.action_move(1)
            return
        columns = self.measured_columns
        for offset in range(len(columns)):
            index = (self._column_index + offset) % len(columns)
            column = columns[index]
            key_d = column.direction or "A->B"
            for fibre in range(1, self._fibres + 1):
                if (fibre, column.wavelength_nm, key_d) not in self._cells:
                    self._column_index = index
                    self._sync_column_fields()
                    self._fibre = fibre
                    self.query_one(ReadingsGrid).point_at(self._fibre, self.active_column)
                    self._show_entry_where()
                    self._say(
                        f"Last fibre done; on to the first empty one: fibre {fibre} "
                        f"{column.heading}."
                    )
                    return
        self._say(
            f"Every fibre has a reading. The cursor stays on fibre {self._fibre}; a number typed "
            "here is a retest (the earlier result is kept as superseded)."
        )
        self._show_entry_where()

    def action_move(self, step: int) -> None:
        fibre = min(max(self._fibre + step, 1), self._fibres)
        self._fibre = fibre
        self.query_one(ReadingsGrid).point_at(self._fibre, self.active_column)
        self._show_entry_where()

    def action_column(self, step: int) -> None:
        self._column_index = (self._column_index + step) % len(self.measured_columns)
        self.query_one(ReadingsGrid).point_at(self._fibre, self.active_column)
        self._sync_column_fields()
        self._show_entry_where()

    def action_clear_cell(self) -> None:
        column = self.active_column
        direction = column.direction or "A->B"
        if self._cells.pop((self._fibre, column.wavelength_nm, direction), None) is None:
            return
        self._refresh_cell(self._fibre, column.wavelength_nm, direction)
        self._queue(
            ClearReading(
                self._fibre, column.wavelength_nm, direction, by=self._details().by, at=_now()
            )
        )
        self._say(f"fibre {self._fibre} {column.heading}: reading removed")
        self._show_entry_where()
        self._show_summary()

    @on(DataTable.CellHighlighted)
    def _cell_pointed(self, event: DataTable.CellHighlighted) -> None:
        # The grid has focus only when the user clicked it (or tabbed to it and moved): go to
        # that cell and back to typing. Moves made by the entry field itself are ignored.
        if self.query_one(ReadingsGrid).has_focus:
            self._go_to_cell(event.coordinate.row, event.coordinate.column)

    @on(DataTable.CellSelected)
    def _cell_clicked(self, event: DataTable.CellSelected) -> None:
        self._go_to_cell(event.coordinate.row, event.coordinate.column)

    def _go_to_cell(self, row: int, grid_column: int) -> None:
        grid = self.query_one(ReadingsGrid)
        column_index = grid_column - 1
        if 0 <= column_index < len(grid.columns_shown):
            column = grid.columns_shown[column_index]
            if column.direction is not None and column in self.measured_columns:
                self._column_index = self.measured_columns.index(column)
                self._sync_column_fields()
            self._fibre = row + 1
            grid.point_at(self._fibre, self.active_column)
            self._show_entry_where()
        self.query_one("#reading", Input).focus()

    # -- summary ------------------------------------------------------------------------
    SUMMARY_DELAY_S = 0.15

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
        readings = [
            (fibre, w, d, cell.loss_db)
            for (fibre, w, d), cell in self._cells.items()
            if fibre <= self._fibres and w in self._wavelengths and d in self._directions
        ]
        limits = {w: self._limit_db(w) for w in self._wavelengths}
        lines: list[str] = []
        # On a phone terminal the summary has five rows: each line fits the width (shorter
        # words, fewer worst fibres) rather than wrapping, so both wavelengths' worst show.
        width = 42 if self.narrow else 0
        summaries = {s.wavelength_nm: s for s in ref.summarise(readings, limits, worst_count=3)}
        tallies = meter_tallies(self._cells, limits, self._fibres, self._directions)
        for w in self._wavelengths:
            s = summaries.get(w)
            limit = limits[w]
            limit_words = f"≤{limit:.2f}" if limit is not None else "(no limit)"
            if s is None:
                lines.append(f"{w:g} nm {limit_words}: no readings")
                continue
            counts = tallies[w].words(short=True)
            tally = f"{s.fibres}/{self._fibres}, {counts}"
            lines.append(
                _fit(
                    width,
                    f"{w:g} nm {limit_words}: {tally}",
                    f"{w:g} {limit_words}: {tally}",
                    f"{w:g} {limit_words} {s.fibres}/{self._fibres}: " + counts.replace(",", ""),
                    f"{w:g}: {tally}",
                )
            )
            worst = [f"{f} {loss:.2f}" for f, loss in s.worst]
            while len(worst) > 1 and width and len("  worst fibre " + ", ".join(worst)) > width:
                worst.pop()
            lines.append("  worst fibre " + ", ".join(worst))
        # Whether the readings are safe in a job matters more than the reference list.
        lines.append(self._save_words())
        now = _now()
        refs = []
        for (w, d), current in sorted(self._refs.items()):
            if w not in self._wavelengths or d not in self._directions:
                continue
            minutes = int((now - current.set_at).total_seconds() // 60)
            arrow = "" if len(self._directions) == 1 else (" →" if d == "A->B" else " ←")
            doubt = " DRIFTED" if current.in_doubt else ""
            refs.append(f"  {w:g}{arrow} {current.level_dbm:.2f} dBm, {minutes} min{doubt}")
        lines.append("References:" if refs else "References: none set")
        lines += refs
        self.query_one("#meter-summary", Static).update("\n".join(lines), layout=False)

    def _save_words(self) -> str:
        if self._job_id is None:
            return f"{keys.display('open')}: choose a job to save into"
        pending = len(self._pending)
        if self._save_error:
            return f"NOT SAVED ({pending} waiting): {self._save_error}"
        where = f"Saving into {self._link_label}"
        if pending:
            return f"{where}: {pending} waiting"
        if self._saved_at is None:
            return where  # nothing new typed yet
        return f"{where}: saved {self._saved_at.strftime('%H:%M:%S')}"

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
            job = self.app.store.load(job_id)  # type: ignore[attr-defined]
            link = job.link(link_id)
        except (StoreError, KeyError) as exc:
            self.notify(f"The job could not be opened: {exc}", severity="error")
            return
        self._job_id, self._link_id, self._link_label = job_id, link_id, link.label
        self._link = link
        typed_before = dict(self._cells)
        self._load_link(link)
        self._recompute_budget_limits()
        # Readings typed before a job was chosen go into it now (they win over the link's).
        for (fibre, w, d), cell in typed_before.items():
            column_ref = self._refs.get((w, d))
            set_at = (
                column_ref.set_at
                if column_ref is not None and abs(column_ref.level_dbm - cell.reference_dbm) < 1e-9
                else cell.at
            )
            self._queue(
                PutReading(
                    fibre,
                    w,
                    d,
                    cell.reading_dbm,
                    cell.reference_dbm,
                    self._method,
                    self._limit_db(w),
                    cell.at,
                    self._details(set_at=set_at),
                )
            )
        self._rebuild_grid()
        self._sync_column_fields(force=True)
        self._show_entry_where()
        self._show_summary()
        self._queue(None)

    def _load_link(self, link: Any) -> None:
        from fieldkit.jobs.models import result_in_doubt

        if link.fibre_count:
            self._fibres = max(self._fibres, link.fibre_count) if self._cells else link.fibre_count
        wavelengths = sorted({round(r.wavelength_nm, 3) for r in link.results})
        directions = sorted({r.direction for r in link.results})
        for r in sorted(link.results, key=lambda r: r.at, reverse=True):
            if not r.current:
                continue  # a retest or a clearing superseded it; its history stays in the job
            reference = link.reference(r.reference_id)
            if r.reading_dbm is None or reference is None:
                continue
            key = (r.fibre, round(r.wavelength_nm, 3), r.direction)
            if key not in self._cells:
                self._cells[key] = Cell(
                    r.reading_dbm, reference.level_dbm, r.at, in_doubt=result_in_doubt(link, r)
                )
        # The latest reference of each column is the one in use.
        for reference in sorted(link.references, key=lambda x: x.at, reverse=True):
            if reference.kind != "initial":
                continue
            used = [r.direction for r in link.results if r.reference_id == reference.id]
            direction = used[-1] if used else "A->B"
            column_key = (round(reference.wavelength_nm, 3), direction)
            if column_key not in self._refs:
                self._refs[column_key] = ColumnReference(
                    reference.level_dbm,
                    reference.at,
                    reference.at,
                    reference.id,
                    reference.in_doubt_since is not None,
                )
                self._ref_text[column_key] = f"{reference.level_dbm:g}"
        for w in wavelengths:
            if w not in self._wavelengths:
                self._wavelengths.append(w)
        if "B->A" in directions and len(self._directions) == 1:
            self._directions = ["A->B", "B->A"]
        self._set_field("wavelengths", " ".join(f"{w:g}" for w in self._wavelengths))
        self._set_field("fibres", str(self._fibres))
        self._set_field("directions", str(len(self._directions)))

    def _set_field(self, field_id: str, value: str) -> None:
        # The handler of the Changed event this causes finds the state already matching.
        self.query_one(f"#{field_id}", Input).value = value

    @property
    def unsaved(self) -> int:
        """Entries not yet in the job file (0 when everything is saved or no job is chosen)."""
        with self._lock:
            return len(self._pending) + (1 if self._saving else 0) if self._job_id else 0

    def _queue(self, change: MeterChange | None) -> None:
        """Queue a change for the job (None: just save what is queued)."""
        if self._job_id is None:
            return
        with self._lock:
            if change is not None:
                self._pending.append(change)
            start = not self._saving and bool(self._pending)
            if start:
                self._saving = True
        if start:
            self.run_worker(self._drain, thread=True, group="meter-save", exit_on_error=False)

    def _drain(self) -> None:
        """Save everything queued, in as few job updates as possible (runs in a thread)."""
        from fieldkit.jobs.store import StoreError

        while True:
            with self._lock:
                ops = list(self._pending)
                if not ops:
                    self._saving = False
                    return
            try:
                outcome = self._save(ops)
            except (StoreError, KeyError, ValueError, OSError) as exc:
                with self._lock:
                    self._saving = False
                self.app.call_from_thread(self._save_failed, str(exc))
                return
            with self._lock:
                del self._pending[: len(ops)]
            self.app.call_from_thread(self._save_done, outcome)

    def _save(self, ops: list[MeterChange]) -> Applied:
        assert self._job_id is not None and self._link_id is not None
        return apply_changes(self.app.store, self._job_id, self._link_id, ops)  # type: ignore[attr-defined]

    def _save_done(self, outcome: Applied) -> None:
        self._save_error = None
        self._saved_at = _now()
        for (w, d, level), reference_id in outcome.reference_ids.items():
            current = self._refs.get((w, d))
            if current is not None and abs(current.level_dbm - level) < 1e-9:
                current.reference_id = reference_id
        for column, drift, doubted in outcome.rechecks:
            if not drift.within:
                self.notify(
                    f"{column}: {drift.message} ({counted(doubted, 'result')} marked in doubt)",
                    severity="warning",
                    timeout=10,
                )
        self._show_summary()

    def flush_saves(self, timeout_s: float = 5.0) -> bool:
        """Wait for a running save, then save what is still queued, here and now.

        Called when the workspace closes (the app quits), so a reading typed just before is
        not left in memory. True when nothing is left unsaved.
        """
        import time

        from fieldkit.jobs.store import StoreError

        deadline = time.monotonic() + timeout_s
        while True:
            with self._lock:
                if not self._saving:
                    if not self._pending or self._job_id is None:
                        return True
                    self._saving = True
                    ops = list(self._pending)
                    break
            if time.monotonic() > deadline:
                return False
            time.sleep(0.01)
        try:
            self._save(ops)
        except (StoreError, KeyError, ValueError, OSError):
            return False
        finally:
            with self._lock:
                self._saving = False
        with self._lock:
            del self._pending[: len(ops)]
            return not self._pending

    def on_unmount(self) -> None:
        self.flush_saves()

    def _save_failed(self, message: str) -> None:
        self._save_error = message
        self.notify(
            f"Readings not saved (kept here; saving again with the next entry): {message}",
            severity="error",
            timeout=10,
        )
        self._show_summary()

    # -- history ------------------------------------------------------------------------
    def action_history(self) -> None:
        """The fibre's history in the job: every result, the superseded ones marked."""
        from fieldkit.actions.meter import fibre_history
        from fieldkit.jobs.reports import fmt_time, verdict
        from fieldkit.jobs.store import StoreError
        from fieldkit.tui.widgets.dialogs import AskDialog

        if self._job_id is None or self._link_id is None:
            self._say("Ctrl+O: choose a job first; the history is the one saved in the job.")
            return
        self.flush_saves()
        try:
            link = fieldkit_app(self).store.load(self._job_id).link(self._link_id)
        except (StoreError, KeyError) as exc:
            self._say(f"The history could not be read: {exc}", error=True)
            return
        lines = [
            f"{fmt_time(r.at)} {r.wavelength_nm:g} nm {r.direction}: {r.loss_db:.2f} dB "
            f"{verdict(r)}" + (f" ({r.by})" if r.by else "")
            for r in fibre_history(link, self._fibre)
        ] or ["No reading of this fibre is saved in the job yet."]
        self.app.push_screen(AskDialog(f"Fibre {self._fibre} on {link.label}", lines, []))

    # -- recheck ------------------------------------------------------------------------
    def action_recheck(self) -> None:
        from fieldkit.tui.widgets.recheck_dialog import RecheckDialog

        column = self.active_column
        current = self._refs.get((column.wavelength_nm, column.direction or "A->B"))
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
        direction = column.direction or "A->B"
        current = self._refs[(column.wavelength_nm, direction)]
        drift = ref.reference_drift(current.level_dbm, level_dbm, tolerance_db)
        stamp = _now()
        if drift.within:
            current.last_good_at = stamp
        else:
            current.in_doubt = True
            for (fibre, w, d), cell in self._cells.items():
                if (
                    w == column.wavelength_nm
                    and d == direction
                    and abs(cell.reference_dbm - current.level_dbm) < 1e-9
                    and cell.at >= current.last_good_at
                ):
                    cell.in_doubt = True
                    self._refresh_cell(fibre, w, d)
        self._say(f"{column.heading}: {drift.message}", error=not drift.within)
        self._queue(
            Recheck(
                column.wavelength_nm,
                direction,
                current.level_dbm,
                self._method,
                level_dbm,
                tolerance_db,
                stamp,
                by=self._details().by,
            )
        )
        self._show_reference_note()
        self._show_summary()
        return drift
