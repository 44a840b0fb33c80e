"""The fault workspace: an OTDR distance or round-trip time to a place on the route.

Layout and wiring only: the form's reading into the calculation and the lines shown live in
:mod:`fieldkit.tui.fault_model` (tested without a terminal), which uses the CLI's own rules and
line builders (:mod:`fieldkit.text.locate`). Inputs on one side (the reading; fibre and cable;
landmarks and slack loops as editable lists; sheath markings; the two-ended check; the
uncertainty terms), the result on the other (route position with its range, nearest landmark,
marking to look for, a route diagram in text, and the digging cautions).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import Button, Input, Label, Select, Static

from fieldkit import safety
from fieldkit.calc.locate import OUTPUT_UNITS
from fieldkit.calc.units import InputError
from fieldkit.tui import keys
from fieldkit.tui.fault_model import (
    FIELDS,
    LANDMARK_COLUMNS,
    LANDMARKS_EMPTY,
    NEW_CLEARS,
    NOT_GIVEN,
    SLACK_COLUMNS,
    SLACK_EMPTY,
    TYPED,
    FaultForm,
)
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.caution import Caution
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.number_field import NumberField
from fieldkit.tui.widgets.point_list import PointList
from fieldkit.tui.widgets.quantity_field import QuantityField
from fieldkit.tui.widgets.result_lines import ResultLines
from fieldkit.tui.widgets.route_diagram import RouteDiagram
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar
from fieldkit.tui.workspaces import WorkspaceScreen

if TYPE_CHECKING:
    from fieldkit.traces.session import FaultHandoff

__all__ = ["FaultScreen", "PointList"]


def _fields(*keys: str) -> ComposeResult:
    """The widgets of typed fields of :data:`FIELDS` (ids ``fault-<key>``)."""
    for key in keys:
        spec = FIELDS[key]
        common: dict[str, Any] = {
            "field_id": f"fault-{key}",
            "placeholder": spec.hint,
            "value": spec.start,
            "tooltip": spec.tip,
        }
        if spec.kind == "number":
            yield NumberField(spec.label, **common)
        else:
            yield QuantityField(
                spec.label,
                expect=spec.expect,
                default_unit=spec.default_unit,
                check=spec.check,
                **common,
            )


def _select(label: str, options: list[tuple[str, Any]], value: Any, **kw: Any) -> ComposeResult:
    with Horizontal(classes="fault-row"):
        yield Label(label, classes="fault-label")
        yield Select(options, value=value, compact=True, allow_blank=False, **kw)


class FaultScreen(WorkspaceScreen):
    """Where is the fault? Type the reading; landmarks and slack refine it."""

    CSS_PATH = "fault.tcss"
    AUTO_FOCUS = "#fault-distance"
    BINDINGS = keys.bindings("fault")

    def __init__(self) -> None:
        super().__init__()
        self.form = FaultForm()
        self._shown: tuple[list[dict[str, Any]], list[dict[str, Any]]] = ([], [])
        self._computed: tuple[Any, ...] | None = None  # what the result shown was computed from
        self._fields: list[tuple[str, Input | Select[Any]]] | None = None

    # -- layout -----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        self.form.config_dir = fieldkit_app(self).config_dir
        fibres, fibre_name = self.form.fibre_choices()
        yield WorkspaceBar()
        yield ResultLines(id="fault-summary")
        # Under the result's title line, outside the scrolling body: never pushed off the
        # screen by the result or the route. One line where rows are scarce, never gone.
        yield Caution(
            f"{safety.DIGGING}\n{safety.DEFER}",
            (safety.DIGGING_SHORT, safety.DIGGING_NARROW),
            id="fault-cautions",
        )
        with VerticalScroll(id="fault-body"), Vertical(classes="two-col"):
            with Vertical(classes="col", id="fault-inputs"):
                with Vertical(classes="panel", id="fault-reading") as panel:
                    panel.border_title = "OTDR distance from the start"
                    yield from _fields("distance", "time", "ior-set")
                with Vertical(classes="panel", id="fault-fibre-panel") as panel:
                    panel.border_title = "Fibre and cable"
                    tip = "Fibre type: fills the group index"
                    yield from _select("Fibre", fibres, fibre_name, id="fault-fibre", tooltip=tip)
                    yield from _select(
                        "Wavelength",
                        [("—", 0.0)],
                        0.0,
                        id="fault-wavelength",
                        tooltip="OTDR wavelength",
                    )
                    yield from _fields("ior")
                    # No helix until one is chosen or typed, as on the command line: the range
                    # then runs from the fibre distance down to the shortest plausible cable.
                    tip = "Cable construction: fills a typical helix"
                    cables = self.form.cable_choices()
                    yield from _select("Cable", cables, NOT_GIVEN, id="fault-cable", tooltip=tip)
                    yield from _fields("helix")
                    yield Static("", id="fault-cable-note", classes="field-note")
                for list_id, title, columns, empty in (
                    ("fault-landmarks", "Landmarks", LANDMARK_COLUMNS, LANDMARKS_EMPTY),
                    ("fault-slack", "Slack loops and coils", SLACK_COLUMNS, SLACK_EMPTY),
                ):
                    with Vertical(classes="panel", id=f"{list_id}-panel") as panel:
                        panel.border_title = title
                        yield PointList(columns, list_id=list_id, empty=empty)
                with Vertical(classes="panel", id="fault-marking-panel") as panel:
                    panel.border_title = "Sheath markings"
                    yield from _fields("marking")
                    with Horizontal(classes="fault-row"):
                        yield Label("Marked", classes="fault-label")
                        for select_id, options, value in (
                            ("fault-marking-unit", [("metres", "m"), ("feet", "ft")], "m"),
                            (
                                "fault-marking-direction",
                                [("count up", "up"), ("count down", "down")],
                                "up",
                            ),
                        ):
                            yield Select(
                                options, value=value, allow_blank=False, compact=True, id=select_id
                            )
                with Vertical(classes="panel", id="fault-two-panel") as panel:
                    panel.border_title = "Two-ended check"
                    yield from _fields("from-b", "total")
                with Vertical(classes="panel", id="fault-errors-panel") as panel:
                    panel.border_title = "Uncertainty (± typical)"
                    yield from _fields(
                        "offset", "scale", "sampling", "ior-u", "helix-u", "landmark-u"
                    )
            with Vertical(classes="col", id="fault-outputs"):
                with Vertical(classes="panel", id="fault-result-panel") as panel:
                    panel.border_title = "Where to search"
                    units = [(u, u) for u in OUTPUT_UNITS]
                    yield from _select("Show in", units, "m", id="fault-unit")
                    yield ResultLines(id="fault-result", classes="result")
                with Vertical(classes="panel", id="fault-route-panel") as panel:
                    panel.border_title = "Route"
                    yield RouteDiagram(id="fault-diagram")
                yield ResultLines(id="fault-warnings", classes="result")
                # The visual fault locator is used with this workspace (to find the break the
                # OTDR points to): its caution after the result, one line where rows are scarce.
                yield Caution(
                    safety.FAULT_LOCATOR,
                    (safety.FAULT_LOCATOR_SHORT, safety.FAULT_LOCATOR_NARROW),
                    id="fault-locator-caution",
                )
                with Vertical(classes="panel", id="fault-save-panel") as panel:
                    panel.border_title = "Job"
                    yield Button(
                        f"Save onto a job's link ({keys.display('save')})",
                        id="fault-save",
                        compact=True,
                        variant="primary",
                    )
                    yield ResultLines(id="fault-saved", classes="field-note")
        yield KeyFooter()

    def on_mount(self) -> None:
        self._fibre_chosen()
        self._cable_chosen()
        if warning := self.form.preset_warning():
            self.notify(warning, severity="warning")
        self.recompute()

    #: Below this many rows the caution folds to one line, so the result and the route show.
    SCARCE_ROWS = 40

    def on_resize(self) -> None:
        for caution in self.query(Caution):
            caution.fit(self.size.height < self.SCARCE_ROWS)
        # The result lines wrap to their panel: draw them again once the layout has settled.
        self.call_after_refresh(lambda: self._show(*self._shown))

    # -- presets ----------------------------------------------------------------------------
    def _fibre_chosen(self) -> None:
        name = str(self.query_one("#fault-fibre", Select).value)
        select = self.query_one("#fault-wavelength", Select)
        choice = self.form.wavelength_choice(name, select.value)
        if choice is None:
            if name == TYPED:
                select.set_options([("—", 0.0)])
                select.value = 0.0
                select.disabled = True
            return
        select.disabled = False
        select.set_options(choice[0])
        select.value = choice[1]
        self._wavelength_chosen()

    def _wavelength_chosen(self) -> None:
        fibre = str(self.query_one("#fault-fibre", Select).value)
        wavelength = self.query_one("#fault-wavelength", Select).value
        if isinstance(wavelength, float):
            index = self.form.group_index_text(fibre, wavelength)
            if index is not None:
                self.query_one("#fault-ior", Input).value = index

    def _cable_chosen(self) -> None:
        helix, helix_u, note_text, tooltip = self.form.cable_fill(
            str(self.query_one("#fault-cable", Select).value)
        )
        if helix is not None:
            self.query_one("#fault-helix", Input).value = helix
        if helix_u is not None:
            self.query_one("#fault-helix-u", Input).value = helix_u
        note = self.query_one("#fault-cable-note", Static)
        note.update(note_text)
        if tooltip is not None:
            note.tooltip = tooltip

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
    @on(PointList.Changed)
    def _input_changed(self) -> None:
        self.recompute()

    def _typed(self) -> dict[str, Any]:
        """Every field and choice as typed, by key (the id without ``fault-``)."""
        if self._fields is None:  # the same widgets all along: found once, not on every key
            found = (*self.query(Input), *self.query(Select))
            self._fields = [(w.id[6:], w) for w in found if w.id and w.id.startswith("fault-")]
        typed: dict[str, Any] = {}
        for key, widget in self._fields:
            value = widget.value  # a choice is never blank text; a field is left out when blank
            if value is not Select.NULL and (not isinstance(value, str) or value.strip()):
                typed[key] = value
        return typed

    def _rows(self) -> tuple[list[dict[str, Any]], list[dict[str, Any]], str | None]:
        try:
            landmarks = self.query_one("#fault-landmarks", PointList).values()
            slack = self.query_one("#fault-slack", PointList).values()
        except InputError as exc:
            return [], [], str(exc)
        return landmarks, slack, None

    @property
    def unsaved_edits(self) -> bool:
        """True when a located fault was changed since it was last saved (or the start)."""
        return self.form.unsaved_edits

    def recompute(self) -> None:
        landmarks, slack, row_problem = self._rows()
        typed = self._typed()
        asked = (typed, landmarks, slack, row_problem)
        if asked == self._computed:  # a field set in code, then its Changed message
            return
        self._computed = asked
        built = self.form.update(typed, landmarks, slack)
        if row_problem is not None:
            self.form.location, self.form.problem = None, row_problem
        if self.form.changed:
            # A "saved" line says nothing about what was typed since.
            self.query_one("#fault-saved", ResultLines).show_lines("")
        for key, message in built.errors.items():
            widget = self.query_one(f"#fault-{key}-field")
            if isinstance(widget, QuantityField):
                widget.show_error(message)
        self._show(landmarks, slack)

    # -- showing ----------------------------------------------------------------------------
    @property
    def unit(self) -> str:
        value = self.query_one("#fault-unit", Select).value
        return str(value) if value in OUTPUT_UNITS else "m"

    def _show(self, landmarks: list[dict[str, Any]], slack: list[dict[str, Any]]) -> None:
        shown = self.form.shown(self.unit, landmarks, slack)
        self._shown = (landmarks, slack)
        self.query_one("#fault-result", ResultLines).show_fitted(shown.result)
        warnings = self.query_one("#fault-warnings", ResultLines)
        warnings.show_fitted("\n".join(shown.warnings))
        warnings.display = bool(shown.warnings)
        summary = self.query_one("#fault-summary", ResultLines)
        summary.show_lines(shown.summary)
        summary.set_class(shown.problem, "-problem")
        self.query_one("#fault-diagram", RouteDiagram).show(shown.points, shown.fault, self.unit)
        # Nothing typed yet: no route (and no scale) to draw.
        self.query_one("#fault-route-panel").display = bool(shown.points or shown.fault)

    # -- actions ----------------------------------------------------------------------------
    def prefill(self, hand: FaultHandoff) -> None:
        """Fill the reading from an OTDR event the Traces workspace hands off: the distance,
        the index the trace was taken with, and its landmarks (name, OTDR distance m, route
        distance m), merged into the list (:meth:`FaultForm.merge_handoff`: typed rows stay).
        Everything else the user typed stays.
        """
        self.query_one("#fault-distance", Input).value = f"{hand.distance_m:.1f} m"
        self.query_one("#fault-time", Input).value = ""
        self.query_one("#fault-ior-set", Input).value = f"{hand.group_index:.4f}"
        landmarks = self.query_one("#fault-landmarks", PointList)
        rows, said = self.form.merge_handoff(landmarks.rows, hand.landmarks)
        if rows != landmarks.rows:
            landmarks.set_rows(rows)
        if hand.note or said:
            self.notify(" ".join(t for t in (hand.note, said) if t), timeout=6)
        self.recompute()

    def _point_list(self) -> PointList:
        """The landmark or slack list holding the focus (the landmarks if neither does)."""
        focused = self.focused
        for point_list in self.query(PointList):
            if focused is not None and point_list in focused.ancestors_with_self:
                return point_list
        return self.query_one("#fault-landmarks", PointList)

    def action_add_point(self) -> None:
        point_list = self._point_list()
        if point_list.commit():
            point_list.focus_first()

    def action_remove_point(self) -> None:
        self._point_list().action_remove()

    def action_new_fault(self) -> None:
        """Empty the reading, landmark, slack, marking and two-ended fields; the fibre, cable and
        error settings stay. Typed values are cleared only on a second Ctrl+N."""
        typed = [self.query_one(f"#fault-{key}", Input) for key in NEW_CLEARS]
        lists = list(self.query(PointList))
        anything = any(i.value.strip() for i in typed) or any(p.rows for p in lists)
        note = self.query_one("#fault-saved", Static)
        if not self.form.may_clear(anything):
            asked = f"{keys.hint('new')} again empties the reading and the rows."
            note.update(asked)
            self.notify(asked)
            return
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

        if self.form.location is None:
            self.notify(self.form.problem or "Nothing located yet to save.", severity="warning")
            return
        self.app.push_screen(JobLinkPicker(), self._save_to)

    def _save_to(self, choice: tuple[str, str] | None) -> None:
        if choice is None:
            return
        app = fieldkit_app(self)
        notice = self.form.save(app.store, *choice, by=app.operator, unit=self.unit)
        self.query_one("#fault-saved", Static).update(notice.text)
        self.notify(notice.text, severity=notice.severity)
