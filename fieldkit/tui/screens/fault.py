"""The fault workspace: an OTDR distance or round-trip time to a place on the route.

Inputs on one side (the reading; fibre and cable; landmarks and slack loops as editable lists;
sheath markings; the two-ended check; the uncertainty terms), the result on the other (route
position with its range, nearest landmark, marking to look for, a route diagram in text, and the
digging cautions). Everything updates as you type; the same calculation as ``fieldkit locate``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.screen import Screen
from textual.widgets import Button, Input, Label, OptionList, Select, Static
from textual.widgets.option_list import Option

from fieldkit import safety
from fieldkit.calc.locate import (
    DEFAULT_GROUP_INDEX_UNCERTAINTY,
    DEFAULT_OFFSET_M,
    DEFAULT_SAMPLE_SPACING_M,
    DEFAULT_SCALE_ERROR_PERCENT,
    OUTPUT_UNITS,
    TYPED_HELIX_UNCERTAINTY_PERCENT,
    UNKNOWN_HELIX_ESTIMATE_PERCENT,
    UNKNOWN_HELIX_MAX_PERCENT,
    ErrorTerms,
    Landmark,
    LocateInput,
    Location,
    Marking,
    SlackLoop,
    TwoEnded,
    format_distance,
    locate,
)
from fieldkit.calc.units import (
    InputError,
    Kind,
    format_number,
    normalise_text,
    parse,
    parse_number,
)
from fieldkit.inputs import otdr_distance_m
from fieldkit.text.locate import result_lines, summary_line
from fieldkit.tui import keys
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.quantity_field import QuantityField, field_name
from fieldkit.tui.widgets.route_diagram import FaultMark, RouteDiagram, RoutePoint
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

#: Characters a plain-number field lets through (a decimal comma is handled by the parser).
NUMBER_CHARS = r"[0-9 .,+\-\u2212%eE]*"
TYPED = "__typed__"
#: The cable choice that gives no helix: the calculation's own assumption, shown as such.
NOT_GIVEN = "__not_given__"


class NumberField(Vertical):
    """Label, input and an error line for a bare number (an index, a percentage, a marking)."""

    DEFAULT_CSS = """
    NumberField { height: auto; }
    NumberField > Horizontal { height: auto; }
    NumberField Label.nf-label { width: 12; padding: 0 1 0 0; color: $text-muted; }
    NumberField Input { width: 1fr; }
    NumberField .field-error { padding-left: 12; color: $error; text-style: bold; }
    """

    def __init__(
        self,
        label: str,
        *,
        field_id: str,
        placeholder: str = "",
        value: str = "",
        tooltip: str | None = None,
    ) -> None:
        super().__init__(id=f"{field_id}-field")
        self._label = label
        self._input = Input(
            value=value,
            placeholder=placeholder,
            type="text",
            restrict=NUMBER_CHARS,
            compact=True,
            id=field_id,
            tooltip=tooltip,
        )
        self._error = Static("", classes="field-error", markup=False)

    def compose(self) -> ComposeResult:
        with Horizontal():
            yield Label(self._label, classes="nf-label")
            yield self._input
        yield self._error

    @property
    def input(self) -> Input:
        return self._input

    def value_or_none(self) -> float | None:
        """The number typed, None when empty or wrong (the reason shown beside the field)."""
        text = normalise_text(self._input.value)
        if text.endswith("%"):
            text = text[:-1]
        if not text.strip():
            self.show_error("")
            return None
        try:
            number = parse_number(text, field_name(self._label))
        except InputError as exc:
            self.show_error(str(exc))
            return None
        self.show_error("")
        return number

    def show_error(self, message: str) -> None:
        self._error.update(message)
        self._error.display = bool(message)


@dataclass(frozen=True)
class Column:
    key: str
    label: str
    kind: str  # "text" or "length"
    placeholder: str


class PointList(Vertical):
    """An editable list (landmarks or slack loops): pick a row to edit it, Enter to add or
    update, Delete (or the button) to remove, and a New button to start a fresh row."""

    DEFAULT_CSS = """
    PointList { height: auto; }
    PointList OptionList { height: auto; max-height: 6; border: none; padding: 0; }
    /* no border on focus either: rows must not move under the mouse as the list takes focus */
    PointList OptionList:focus { border: none; background-tint: $foreground 5%; }
    PointList > Horizontal { height: auto; }
    PointList Label.pl-label { width: 12; padding: 0 1 0 0; color: $text-muted; }
    PointList Input { width: 1fr; }
    PointList .pl-buttons { height: auto; margin-top: 0; }
    PointList .pl-buttons Button { min-width: 8; margin-right: 1; }
    PointList .field-error { color: $error; text-style: bold; height: auto; }
    PointList .pl-empty { color: $text-muted; }
    """

    BINDINGS = [Binding(keys.key_of("delete").key, "remove", "Remove row", show=False)]

    class Changed(Message):
        def __init__(self, point_list: PointList) -> None:
            super().__init__()
            self.point_list = point_list

        @property
        def control(self) -> PointList:
            return self.point_list

    def __init__(self, columns: tuple[Column, ...], *, list_id: str, empty: str) -> None:
        super().__init__(id=list_id)
        self.columns = columns
        self.rows: list[dict[str, str]] = []
        self._editing: int | None = None
        self._empty = empty

    def compose(self) -> ComposeResult:
        yield Static(self._empty, classes="pl-empty")
        yield OptionList(id=f"{self.id}-rows")
        for column in self.columns:
            with Horizontal():
                yield Label(column.label, classes="pl-label")
                yield Input(
                    placeholder=column.placeholder,
                    type="text",
                    compact=True,
                    id=f"{self.id}-{column.key}",
                )
        yield Static("", classes="field-error", markup=False)
        with Horizontal(classes="pl-buttons"):
            yield Button("Add", id=f"{self.id}-add", compact=True, variant="primary")
            yield Button("Remove", id=f"{self.id}-remove", compact=True)
            # Empties the row editor only; Ctrl+N (new) starts the whole fault again.
            yield Button("Clear", id=f"{self.id}-new", compact=True)

    def on_mount(self) -> None:
        self._refresh()
        self._say("")

    # -- values ----------------------------------------------------------------------------
    def parse_row(self, row: dict[str, str]) -> dict[str, Any]:
        """The row's values: text as typed, lengths in metres. Raises InputError."""
        out: dict[str, Any] = {}
        for column in self.columns:
            text = row.get(column.key, "")
            if column.kind == "length":
                out[column.key] = parse(
                    text, Kind.LENGTH, default_unit="m", what=field_name(column.label)
                ).to("m")
            else:
                out[column.key] = text.strip()
        return out

    def values(self) -> list[dict[str, Any]]:
        return [self.parse_row(row) for row in self.rows]

    def set_rows(self, rows: list[dict[str, str]]) -> None:
        self.rows = [dict(r) for r in rows]
        self._editing = None
        self._refresh()
        self.post_message(self.Changed(self))

    # -- editing ---------------------------------------------------------------------------
    def _editor(self) -> dict[str, str]:
        return {c.key: self.query_one(f"#{self.id}-{c.key}", Input).value for c in self.columns}

    def _say(self, text: str) -> None:
        error = self.query_one(".field-error", Static)
        error.update(text)
        error.display = bool(text)

    def commit(self) -> bool:
        """Add the editor's row (or update the row being edited). False if it does not parse."""
        row = self._editor()
        try:
            self.parse_row(row)
        except InputError as exc:
            self._say(str(exc))
            return False
        first = self.columns[0]
        if first.kind == "text" and not row[first.key].strip():
            self._say(f"{field_name(first.label)}: type one")
            return False
        if self._editing is not None and self._editing < len(self.rows):
            self.rows[self._editing] = row
        else:
            self.rows.append(row)
        self._clear_editor()
        self._refresh()
        self.post_message(self.Changed(self))
        return True

    def _clear_editor(self) -> None:
        self._editing = None
        for column in self.columns:
            self.query_one(f"#{self.id}-{column.key}", Input).value = ""
        self._say("")
        self.query_one(f"#{self.id}-add", Button).label = "Add"

    def _load(self, index: int) -> None:
        self._editing = index
        for column in self.columns:
            self.query_one(f"#{self.id}-{column.key}", Input).value = self.rows[index].get(
                column.key, ""
            )
        self.query_one(f"#{self.id}-add", Button).label = "Update"
        self._say("")

    def action_remove(self) -> None:
        options = self.query_one(OptionList)
        index = self._editing if self._editing is not None else options.highlighted
        if index is None or not 0 <= index < len(self.rows):
            self._say("Pick a row to remove")
            return
        del self.rows[index]
        self._clear_editor()
        self._refresh()
        self.post_message(self.Changed(self))

    def _refresh(self) -> None:
        options = self.query_one(OptionList)
        options.clear_options()
        for i, row in enumerate(self.rows):
            text = " · ".join(row.get(c.key, "").strip() or "–" for c in self.columns)
            options.add_option(Option(f"{i + 1}. {text}", id=f"row-{i}"))
        options.display = bool(self.rows)
        self.query_one(".pl-empty", Static).display = not self.rows

    @on(OptionList.OptionSelected)
    def _selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self._load(event.option_index)
        self.query_one(f"#{self.id}-{self.columns[0].key}", Input).focus()

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.commit()

    @on(Input.Changed)
    def _typing(self, event: Input.Changed) -> None:
        event.stop()  # the editor row is not part of the result until added

    @on(Button.Pressed)
    def _button(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == f"{self.id}-add":
            self.commit()
        elif event.button.id == f"{self.id}-remove":
            self.action_remove()
        else:
            self._clear_editor()


LANDMARK_COLUMNS = (
    Column("name", "Name", "text", "closure 7"),
    Column("otdr", "OTDR dist", "length", "3.400 km (same set-up)"),
    Column("route", "Route dist", "length", "3330 m"),
)
SLACK_COLUMNS = (
    Column("position", "Route pos", "length", "1200 m"),
    Column("length", "Cable len", "length", "20 m"),
    Column("label", "Label", "text", "coil at HH 4 (optional)"),
)


_NEW_CLEARS = (
    "fault-distance",
    "fault-time",
    "fault-ior-set",
    "fault-marking",
    "fault-from-b",
    "fault-total",
)


class FaultScreen(Screen[None]):
    """Where is the fault? Type the reading; landmarks and slack refine it."""

    CSS_PATH = "fault.tcss"
    AUTO_FOCUS = "#fault-distance"
    BINDINGS = keys.bindings("fault")

    def __init__(self) -> None:
        super().__init__()
        self.location: Location | None = None
        self.inputs: dict[str, Any] = {}
        self.problem: str | None = None
        self._clear_asked = False

    # -- layout -----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        library = self._library()
        fibres = [f for f in library.fibres.values() if f.group_indices]
        fibre_name = next(
            (f.name for f in fibres if f.name == "G.652.D"), fibres[0].name if fibres else TYPED
        )
        cables = list(library.cables.values())
        # No helix until one is chosen or typed, as on the command line: the range then runs
        # from the fibre distance down to the shortest plausible cable (calc.locate).
        cable_name = NOT_GIVEN
        yield WorkspaceBar()
        yield Static("", id="fault-summary")
        with VerticalScroll(id="fault-body"), Vertical(classes="two-col"):
            with Vertical(classes="col", id="fault-inputs"):
                with Vertical(classes="panel", id="fault-reading") as panel:
                    panel.border_title = "Reading from the start"
                    yield QuantityField(
                        "OTDR dist",
                        expect=Kind.LENGTH,
                        field_id="fault-distance",
                        check=otdr_distance_m,
                        placeholder="3.412 km",
                        tooltip="The event's distance as the OTDR shows it",
                    )
                    yield QuantityField(
                        "or time",
                        expect=Kind.TIME,
                        field_id="fault-time",
                        placeholder="34.1 µs round trip",
                        tooltip="The round-trip time instead of a distance",
                    )
                    yield NumberField(
                        "Index set",
                        field_id="fault-ior-set",
                        placeholder="as set on the OTDR",
                        tooltip="The group index the OTDR was set to; empty if it "
                        "was set to the fibre's",
                    )
                with Vertical(classes="panel", id="fault-fibre-panel") as panel:
                    panel.border_title = "Fibre and cable"
                    with Horizontal(classes="fault-row"):
                        yield Label("Fibre", classes="fault-label")
                        yield Select(
                            [("index typed", TYPED)] + [(f.name, f.name) for f in fibres],
                            value=fibre_name,
                            id="fault-fibre",
                            compact=True,
                            allow_blank=False,
                            tooltip="Fibre type: fills the group index",
                        )
                    with Horizontal(classes="fault-row"):
                        yield Label("Wavelength", classes="fault-label")
                        yield Select(
                            [("—", 0.0)],
                            value=0.0,
                            id="fault-wavelength",
                            compact=True,
                            allow_blank=False,
                            tooltip="OTDR wavelength",
                        )
                    yield NumberField(
                        "Group index",
                        field_id="fault-ior",
                        placeholder="1.4677",
                        tooltip="The fibre's group index (filled from the preset; "
                        "type the cable's own if you have it)",
                    )
                    with Horizontal(classes="fault-row"):
                        yield Label("Cable", classes="fault-label")
                        yield Select(
                            [("helix not given", NOT_GIVEN), ("helix typed", TYPED)]
                            + [(c.name, c.name) for c in cables],
                            value=cable_name,
                            id="fault-cable",
                            compact=True,
                            allow_blank=False,
                            tooltip="Cable construction: fills a typical helix",
                        )
                    yield NumberField(
                        "Helix %",
                        field_id="fault-helix",
                        placeholder="1.5",
                        tooltip="Helix / excess fibre length: how much longer the "
                        "fibre is than the sheath",
                    )
                    yield Static("", id="fault-cable-note", classes="field-note")
                with Vertical(classes="panel", id="fault-landmarks-panel") as panel:
                    panel.border_title = "Landmarks"
                    yield PointList(
                        LANDMARK_COLUMNS,
                        list_id="fault-landmarks",
                        empty="None yet: closures, handholes, building entries "
                        "with OTDR and route distance. Enter adds; pick a row to "
                        "edit; Delete removes.",
                    )
                with Vertical(classes="panel", id="fault-slack-panel") as panel:
                    panel.border_title = "Slack loops and coils"
                    yield PointList(
                        SLACK_COLUMNS,
                        list_id="fault-slack",
                        empty="None yet: each loop's route position and cable length. Enter adds.",
                    )
                with Vertical(classes="panel", id="fault-marking-panel") as panel:
                    panel.border_title = "Sheath markings"
                    yield NumberField(
                        "At start", field_id="fault-marking", placeholder="12345 (optional)"
                    )
                    with Horizontal(classes="fault-row"):
                        yield Label("Marked", classes="fault-label")
                        yield Select(
                            [("metres", "m"), ("feet", "ft")],
                            value="m",
                            allow_blank=False,
                            compact=True,
                            id="fault-marking-unit",
                        )
                        yield Select(
                            [("count up", "up"), ("count down", "down")],
                            value="up",
                            allow_blank=False,
                            compact=True,
                            id="fault-marking-direction",
                        )
                with Vertical(classes="panel", id="fault-two-panel") as panel:
                    panel.border_title = "Two-ended check"
                    yield QuantityField(
                        "From end B",
                        expect=Kind.LENGTH,
                        default_unit="m",
                        field_id="fault-from-b",
                        placeholder="same set-up",
                    )
                    yield QuantityField(
                        "Total",
                        expect=Kind.LENGTH,
                        default_unit="m",
                        field_id="fault-total",
                        placeholder="end to end",
                    )
                with Vertical(classes="panel", id="fault-errors-panel") as panel:
                    panel.border_title = "Uncertainty (± typical)"
                    yield QuantityField(
                        "Offset",
                        expect=Kind.LENGTH,
                        default_unit="m",
                        field_id="fault-offset",
                        value=f"{DEFAULT_OFFSET_M:g} m",
                        placeholder="1 m",
                    )
                    yield NumberField(
                        "Scale %", field_id="fault-scale", value=f"{DEFAULT_SCALE_ERROR_PERCENT:g}"
                    )
                    yield QuantityField(
                        "Sampling",
                        expect=Kind.LENGTH,
                        default_unit="m",
                        field_id="fault-sampling",
                        value=f"{DEFAULT_SAMPLE_SPACING_M:g} m",
                        placeholder="1 m",
                    )
                    yield NumberField(
                        "Index ±",
                        field_id="fault-ior-u",
                        value=f"{DEFAULT_GROUP_INDEX_UNCERTAINTY:g}",
                    )
                    yield NumberField(
                        "Helix ± %",
                        field_id="fault-helix-u",
                        value=format_number(TYPED_HELIX_UNCERTAINTY_PERCENT),
                    )
                    yield QuantityField(
                        "Landmark ±",
                        expect=Kind.LENGTH,
                        default_unit="m",
                        field_id="fault-landmark-u",
                        value="0 m",
                        placeholder="route records",
                    )
            with Vertical(classes="col", id="fault-outputs"):
                with Vertical(classes="panel", id="fault-result-panel") as panel:
                    panel.border_title = "Where to look"
                    with Horizontal(classes="fault-row"):
                        yield Label("Show in", classes="fault-label")
                        yield Select(
                            [(u, u) for u in OUTPUT_UNITS],
                            value="m",
                            allow_blank=False,
                            compact=True,
                            id="fault-unit",
                        )
                    yield Static("", id="fault-result", classes="result")
                    yield Static("", id="fault-warnings", classes="result")
                    yield Static(
                        f"{safety.DIGGING}\n{safety.DEFER}", id="fault-cautions", classes="caution"
                    )
                with Vertical(classes="panel", id="fault-route-panel") as panel:
                    panel.border_title = "Route"
                    yield RouteDiagram(id="fault-diagram")
                with Vertical(classes="panel", id="fault-save-panel") as panel:
                    panel.border_title = "Job"
                    yield Button(
                        f"Save onto a job's link ({keys.display('save')})",
                        id="fault-save",
                        compact=True,
                        variant="primary",
                    )
                    yield Static("", id="fault-saved", classes="field-note")
        yield KeyFooter()

    def on_mount(self) -> None:
        for field in self.query(QuantityField):
            field.show_error("")
        for number in self.query(NumberField):
            number.show_error("")
        self._load_presets()
        self.recompute()

    # -- presets ----------------------------------------------------------------------------
    def _library(self) -> Any:
        from fieldkit.presets import load_presets

        return load_presets(self.app.config_dir)  # type: ignore[attr-defined]

    def _load_presets(self) -> None:
        library = self._library()
        self._fibre_chosen()
        self._cable_chosen()
        if library.problems:
            self.notify("Preset problems: " + "; ".join(library.problems[:3]), severity="warning")

    def _fibre_chosen(self) -> None:
        name = self.query_one("#fault-fibre", Select).value
        wavelengths = self.query_one("#fault-wavelength", Select)
        if name == TYPED or name is Select.NULL:
            wavelengths.set_options([("—", 0.0)])
            wavelengths.value = 0.0
            wavelengths.disabled = True
            return
        fibre = self._library().fibres.get(str(name))
        if fibre is None:
            return
        keys = sorted(fibre.group_indices)
        wavelengths.disabled = False
        current = wavelengths.value
        wavelengths.set_options([(f"{w:g} nm", w) for w in keys])
        wavelengths.value = current if current in keys else 1550.0 if 1550.0 in keys else keys[-1]
        self._wavelength_chosen()

    def _wavelength_chosen(self) -> None:
        name = self.query_one("#fault-fibre", Select).value
        wavelength = self.query_one("#fault-wavelength", Select).value
        fibre = self._library().fibres.get(str(name))
        if fibre is None or not isinstance(wavelength, float) or wavelength <= 0:
            return
        try:
            index = fibre.group_index(wavelength)
        except InputError:
            return
        self.query_one("#fault-ior", Input).value = f"{index:.4f}"

    def _cable_chosen(self) -> None:
        name = self.query_one("#fault-cable", Select).value
        note = self.query_one("#fault-cable-note", Static)
        cable = self._library().cables.get(str(name))
        if name == NOT_GIVEN:
            self.query_one("#fault-helix", Input).value = ""
            note.update(
                f"Helix not given: estimate {format_number(UNKNOWN_HELIX_ESTIMATE_PERCENT)} %, "
                f"range 0–{format_number(UNKNOWN_HELIX_MAX_PERCENT)} % (fibre distance down to "
                "the shortest plausible cable)."
            )
            return
        if cable is None:
            note.update("Typed helix; give its ± under Uncertainty.")
            return
        self.query_one("#fault-helix", Input).value = f"{cable.helix_percent:g}"
        self.query_one("#fault-helix-u", Input).value = f"{cable.helix_uncertainty_percent:g}"
        note.update("Typical for this construction; the cable's data sheet is better.")
        note.tooltip = cable.source

    @on(Select.Changed)
    def _select_changed(self, event: Select.Changed) -> None:
        target = event.select.id
        if target == "fault-fibre":
            self._fibre_chosen()
        elif target == "fault-wavelength":
            self._wavelength_chosen()
        elif target == "fault-cable":
            self._cable_chosen()
        self.recompute()

    # -- recomputing ------------------------------------------------------------------------
    @on(Input.Changed)
    def _input_changed(self, event: Input.Changed) -> None:
        self.recompute()

    @on(PointList.Changed)
    def _list_changed(self, event: PointList.Changed) -> None:
        self.recompute()

    def _q(self, field_id: str) -> float | None:
        value = self.query_one(f"#{field_id}-field", QuantityField).value_or_none()
        if value is None:
            return None
        return value.to("s") if value.kind is Kind.TIME else value.to("m")

    def _n(self, field_id: str) -> float | None:
        return self.query_one(f"#{field_id}-field", NumberField).value_or_none()

    def _typed(self) -> dict[str, Any]:
        typed: dict[str, Any] = {}
        for widget in self.query(Input):
            if widget.id and widget.id.startswith("fault-") and widget.value.strip():
                typed[widget.id.removeprefix("fault-")] = widget.value
        for select in self.query(Select):
            if select.id and select.value is not Select.NULL:
                typed[select.id.removeprefix("fault-")] = select.value
        return typed

    def build_input(self) -> LocateInput | None:
        """The calculation's input from the fields; None (with the reason shown) if not usable."""
        distance = self._q("fault-distance")
        time = self._q("fault-time")
        errors_before = self._field_errors()
        if distance is None and time is None:
            self.problem = errors_before or "Type the OTDR distance (or the round-trip time)."
            return None
        if distance is not None and time is not None:
            self.problem = "Give the OTDR distance or the round-trip time, not both."
            return None
        try:
            landmarks = tuple(
                Landmark(v["name"], v["otdr"], v["route"])
                for v in self.query_one("#fault-landmarks", PointList).values()
            )
            slack = tuple(
                SlackLoop(v["position"], v["length"], v["label"])
                for v in self.query_one("#fault-slack", PointList).values()
            )
        except InputError as exc:
            self.problem = str(exc)
            return None
        marking_start = self._n("fault-marking")
        marking = None
        if marking_start is not None:
            marking = Marking(
                marking_start,
                str(self.query_one("#fault-marking-unit", Select).value),  # type: ignore[arg-type]
                str(self.query_one("#fault-marking-direction", Select).value),  # type: ignore[arg-type]
            )
        from_b, total = self._q("fault-from-b"), self._q("fault-total")
        two = TwoEnded(from_b, total) if from_b is not None and total is not None else None
        defaults = ErrorTerms()

        def given(value: float | None, default: float) -> float:
            return default if value is None else value

        helix = self._n("fault-helix")
        errors = ErrorTerms(
            offset_m=given(self._q("fault-offset"), defaults.offset_m),
            scale_error_percent=given(self._n("fault-scale"), defaults.scale_error_percent),
            sample_spacing_m=given(self._q("fault-sampling"), defaults.sample_spacing_m),
            group_index_uncertainty=given(self._n("fault-ior-u"), defaults.group_index_uncertainty),
            helix_uncertainty_percent=(
                given(self._n("fault-helix-u"), TYPED_HELIX_UNCERTAINTY_PERCENT)
                if helix is not None
                else 0.0
            ),
            landmark_route_uncertainty_m=given(self._q("fault-landmark-u"), 0.0),
        )
        field_problem = self._field_errors()
        if field_problem:
            self.problem = field_problem
            return None
        if (from_b is None) != (total is None):
            self.problem = "The two-ended check needs both the distance from B and the total."
        return LocateInput(
            otdr_distance_m=distance,
            round_trip_time_s=time,
            index_set=self._n("fault-ior-set"),
            group_index=self._n("fault-ior"),
            helix_percent=helix,
            slack=slack,
            landmarks=landmarks,
            marking=marking,
            two_ended=two,
            errors=errors,
        )

    def _field_errors(self) -> str | None:
        for error in self.query(".field-error"):
            if not isinstance(error, Static) or not error.display:
                continue
            if isinstance(error.parent, PointList):
                continue  # the list editor's own problem does not stop the result
            text = str(error.render())
            if text.strip():
                return "Fix the field marked in red: " + text
        return None

    def _fingerprint(self) -> str:
        import json

        return json.dumps(self._typed(), sort_keys=True, default=str)

    @property
    def unsaved_edits(self) -> bool:
        """True when a located fault was changed since it was last saved (or the start)."""
        clean = getattr(self, "_clean_print", None)
        return self.location is not None and clean != self._fingerprint()

    def recompute(self) -> None:
        from fieldkit.actions.saves import fault_inputs

        if getattr(self, "_clean_print", None) is None:
            self._clean_print = self._fingerprint()
        elif self._clean_print != self._fingerprint():
            # A "saved" line says nothing about what was typed since.
            self.query_one("#fault-saved", Static).update("")
        self.problem = None
        inp = self.build_input()
        self.location = None
        if inp is not None:
            try:
                self.location = locate(inp)
                self.inputs = fault_inputs(inp, self._typed())
            except InputError as exc:
                self.problem = str(exc)
        self._show()

    # -- showing ----------------------------------------------------------------------------
    @property
    def unit(self) -> str:
        value = self.query_one("#fault-unit", Select).value
        return str(value) if value in OUTPUT_UNITS else "m"

    def _show(self) -> None:
        result = self.query_one("#fault-result", Static)
        warnings = self.query_one("#fault-warnings", Static)
        summary = self.query_one("#fault-summary", Static)
        diagram = self.query_one("#fault-diagram", RouteDiagram)
        points = self._route_points()
        if self.location is None:
            result.update(self.problem or "")
            warnings.update("")
            warnings.display = False
            summary.update(self.problem or "")
            summary.set_class(True, "-problem")
            diagram.show(points, None, self.unit)
            return
        unit = self.unit
        p = self.location.position
        lines = result_lines(self.location, unit)
        if self.problem:
            lines.append(self.problem)
        result.update("\n".join(lines))
        warnings.update("\n".join(f"⚠ {w}" for w in self.location.warnings))
        warnings.display = bool(self.location.warnings)
        summary.update(summary_line(self.location, unit))
        summary.set_class(False, "-problem")
        diagram.show(points, FaultMark(p.route_distance_m, p.low_m, p.high_m), unit)

    def _route_points(self) -> list[RoutePoint]:
        points: list[RoutePoint] = []
        try:
            for v in self.query_one("#fault-landmarks", PointList).values():
                points.append(RoutePoint("landmark", v["name"], v["route"]))
            for v in self.query_one("#fault-slack", PointList).values():
                label = v["label"] or f"{format_distance(v['length'], self.unit)}"
                points.append(RoutePoint("slack", label, v["position"]))
        except InputError:
            pass
        return points

    # -- actions ----------------------------------------------------------------------------
    def prefill(
        self,
        distance_m: float,
        *,
        ior_set: float | None = None,
        landmarks: list[tuple[str, float, float]] | None = None,
        note: str = "",
    ) -> None:
        """Fill the reading from another workspace (an OTDR event from the Traces workspace).

        ``landmarks`` are (name, OTDR distance m, route distance m); they replace the list
        only when given. Everything else the user typed stays.
        """
        self.query_one("#fault-distance", Input).value = f"{distance_m:.1f} m"
        self.query_one("#fault-time", Input).value = ""
        if ior_set is not None:
            self.query_one("#fault-ior-set", Input).value = f"{ior_set:.4f}"
        if landmarks:
            self.query_one("#fault-landmarks", PointList).set_rows(
                [
                    {"name": name, "otdr": f"{otdr:.1f} m", "route": f"{route:.1f} m"}
                    for name, otdr, route in landmarks
                ]
            )
        if note:
            self.notify(note, timeout=6)
        self.recompute()

    def _point_list(self) -> PointList:
        """The landmark or slack list holding the focus (the landmarks if neither does)."""
        focused = self.focused
        for point_list in self.query(PointList):
            if focused is not None and point_list in focused.ancestors_with_self:
                return point_list
        return self.query_one("#fault-landmarks", PointList)

    def action_add_point(self) -> None:
        self._point_list().commit()

    def action_remove_point(self) -> None:
        self._point_list().action_remove()

    def action_new_fault(self) -> None:
        """Empty the reading, landmark, slack, marking and two-ended fields; the fibre, cable and
        error settings stay. Typed values are cleared only on a second Ctrl+N."""
        typed = [self.query_one(f"#{f}", Input) for f in _NEW_CLEARS]
        lists = list(self.query(PointList))
        anything = any(i.value.strip() for i in typed) or any(p.rows for p in lists)
        note = self.query_one("#fault-saved", Static)
        if anything and not self._clear_asked:
            self._clear_asked = True
            note.update(f"{keys.hint('new')} again empties the reading and the rows.")
            self.notify(f"{keys.hint('new')} again empties the reading and the rows.")
            return
        self._clear_asked = False
        for field in typed:
            field.value = ""
        for point_list in lists:
            point_list.set_rows([])
        note.update("")
        self.query_one("#fault-distance", Input).focus()

    def action_focus_result(self) -> None:
        panel = self.query_one("#fault-result-panel")
        self.query_one("#fault-body", VerticalScroll).scroll_to_widget(panel, top=True)

    @on(Button.Pressed, "#fault-save")
    def _save_pressed(self) -> None:
        self.action_save()

    def action_save(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        if self.location is None:
            self.notify(self.problem or "Nothing located yet to save.", severity="warning")
            return
        location, inputs = self.location, dict(self.inputs)
        self.app.push_screen(
            JobLinkPicker(), lambda choice: self._save_to(choice, location, inputs)
        )

    def _save_to(
        self, choice: tuple[str, str] | None, location: Location, inputs: dict[str, Any]
    ) -> None:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.saves import fault_record, save_fault
        from fieldkit.jobs.store import StoreError

        if choice is None:
            return
        job_id, link_id = choice
        record = fault_record(location, inputs, by=self.app.operator)  # type: ignore[attr-defined]
        try:
            saved = save_fault(self.app.store, job_id, link_id, record)  # type: ignore[attr-defined]
        except (StoreError, ActionError) as exc:
            self.notify(f"Not saved: {exc}", severity="error")
            self.query_one("#fault-saved", Static).update(f"Not saved: {exc}")
            return
        text = (
            f"Saved onto {saved.job_name} / {saved.link_label}: "
            f"{format_distance(record.route_distance_m, self.unit)} on the route."
        )
        self._clean_print = self._fingerprint()
        self.query_one("#fault-saved", Static).update(text)
        self.notify(text)
