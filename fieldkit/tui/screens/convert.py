"""The convert workspace: a typed value in every related unit, levels and losses, the WDM grids.

The calculations (fieldkit.calc) and the lines (fieldkit.text.convert) are imported when a value
is first typed: none is needed for the first frame, where every field is empty.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.containers import Vertical, VerticalScroll
from textual.widget import Widget
from textual.widgets import Input, Static

from fieldkit.calc.units import InputError, Kind, Value, display_unit, format_number
from fieldkit.tui import keys
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.quantity_field import QuantityField
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar
from fieldkit.tui.workspaces import WorkspaceScreen


class ConvertScreen(WorkspaceScreen):
    """Type once, read every unit. Everything updates on each keystroke.

    The first frame holds the Value panel with its field focused; the other three panels are
    mounted right after it, into the same columns (nothing on screen moves). A quarter of the
    widgets paint the first frame, which is what start-up costs. Keys typed before they are
    there are kept: a move to the next field (Enter, Tab) waits for them, and what is typed
    after it goes to the field it moved to (see :meth:`WorkspaceScreen.hold_keys`).
    """

    CSS_PATH = "convert.tcss"
    AUTO_FOCUS = "#value"
    BINDINGS = keys.bindings("convert")
    workspace_complete = False  # until the panels after the first frame are mounted

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with VerticalScroll(id="convert-body", classes="two-col"):
            with Vertical(id="convert-left", classes="col"):
                yield _panel(
                    "value-panel",
                    "Value",
                    QuantityField(
                        "Value",
                        expect=None,
                        field_id="value",
                        placeholder="e.g. \u22127.5 dBm, 250 µW",
                        tooltip="A value with its unit: a level or power, a loss in dB, "
                        "an attenuation per length, a length, a wavelength or a frequency",
                    ),
                    Static("", id="value-out", classes="result"),
                )
            yield Vertical(id="convert-right", classes="col")
        yield KeyFooter()

    def _later_panels(self) -> tuple[list[Vertical], list[Vertical]]:
        """The panels mounted after the first frame: (under Value, the other column)."""
        loss = _panel(
            "loss-panel",
            "Level and loss",
            QuantityField(
                "Level",
                expect=Kind.POWER,
                default_unit="dBm",
                field_id="loss-level",
                placeholder="e.g. \u22123.2 dBm",
            ),
            QuantityField(
                "Loss",
                expect=Kind.RATIO,
                default_unit="dB",
                field_id="loss-db",
                placeholder="e.g. 4.5 dB",
            ),
            Static("", id="loss-out", classes="result"),
        )
        levels = _panel(
            "sum-panel",
            "Two levels",
            QuantityField(
                "Level A",
                expect=Kind.POWER,
                default_unit="dBm",
                field_id="sum-a",
                placeholder="e.g. \u22123 dBm",
            ),
            QuantityField(
                "Level B",
                expect=Kind.POWER,
                default_unit="dBm",
                field_id="sum-b",
                placeholder="e.g. \u22126 dBm",
            ),
            Static("", id="sum-out", classes="result"),
        )
        grid = _panel(
            "grid-panel",
            "Wavelength and grid",
            QuantityField(
                "λ or f",
                expect=(Kind.LENGTH, Kind.FREQUENCY),
                default_unit="nm",
                field_id="grid-in",
                placeholder="e.g. 1550.12 nm",
            ),
            Static("", id="grid-out", classes="result"),
        )
        return [loss], [levels, grid]

    def on_mount(self) -> None:
        self._guarded(self._show_value, "value")
        self.call_after_refresh(self._mount_rest)

    def _mount_rest(self) -> None:
        """After the first frame: the other panels, then what they show."""
        left, right = self._later_panels()
        self.run_worker(self._mount_panels(left, right), group="convert-panels")

    async def _mount_panels(self, left: list[Vertical], right: list[Vertical]) -> None:
        await self.query_one("#convert-left").mount_all(left)
        await self.query_one("#convert-right").mount_all(right)
        self._guarded(self._show_loss, "loss-db")
        self._guarded(self._show_sum, "sum-b")
        self._show_grid()
        self.whole_workspace_mounted()

    def on_input_changed(self, event: Input.Changed) -> None:
        target = event.input.id or ""
        if target == "value":
            self._guarded(self._show_value, "value")
        elif target.startswith("loss-"):
            self._guarded(self._show_loss, "loss-db")
        elif target.startswith("sum-"):
            self._guarded(self._show_sum, "sum-b")
        elif target == "grid-in":
            self._show_grid()

    def _guarded(self, show: Callable[[], None], field_id: str) -> None:
        """Run ``show``; a value that parses but cannot be converted (a level of 1e308 dBm has no
        power in mW that fits a number) is explained beside the field instead of crashing."""
        try:
            show()
        except InputError as exc:
            self._field(field_id).show_error(str(exc))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        # Enter moves on, as on a meter's keypad: no reach for Tab with gloves on.
        event.stop()
        self.focus_next()

    def _field(self, field_id: str) -> QuantityField:
        return self.query_one(f"#{field_id}-field", QuantityField)

    def _out(self, out_id: str, text: str) -> None:
        self.query_one(f"#{out_id}", Static).update(text)

    def _show_value(self) -> None:
        value = self._field("value").value_or_none()
        if value is None:
            self._out(
                "value-out", "Type a value and its unit: dBm, mW, µW, dB, dB/km, km, ft, nm or THz."
            )
            return
        from fieldkit.calc.conversions import related_values
        from fieldkit.text import convert as lines_of

        # The same lines as ``fieldkit convert`` prints (fieldkit.text.convert).
        self._out("value-out", "\n".join(lines_of.related_lines(value, related_values(value))))

    def _show_loss(self) -> None:
        level = self._field("loss-level").value_or_none()
        loss = self._field("loss-db").value_or_none()
        if level is None or loss is None:
            self._out("loss-out", "A level and a loss give the level after the loss.")
            return
        from fieldkit.calc import power
        from fieldkit.text.convert import rows_text as _rows

        level_dbm = level.to("dBm")
        loss_db = loss.to("dB")
        after = power.apply_loss(level_dbm, loss_db)
        rows = [
            ("after loss", f"{format_number(after)} dBm = {_linear(after)}"),
            # The typed level taken as received: what went in before the loss.
            ("before loss", f"{format_number(power.apply_gain(level_dbm, loss_db))} dBm"),
            (
                "passes",
                f"{format_number(power.loss_db_to_percent_transmitted(loss_db), 4)} % of the power",
            ),
        ]
        self._out("loss-out", _rows(rows))

    def _show_sum(self) -> None:
        a = self._field("sum-a").value_or_none()
        b = self._field("sum-b").value_or_none()
        if a is None or b is None:
            self._out("sum-out", "Two levels give their combined power and difference.")
            return
        from fieldkit.calc import power
        from fieldkit.text.convert import rows_text as _rows

        a_dbm, b_dbm = a.to("dBm"), b.to("dBm")
        total = power.sum_levels_dbm((a_dbm, b_dbm))
        rows = [
            ("A + B", f"{format_number(total)} dBm = {_linear(total)}"),
            ("A − B", f"{format_number(power.level_difference_db(a_dbm, b_dbm))} dB"),
        ]
        self._out("sum-out", _rows(rows))

    def _show_grid(self) -> None:
        field = self._field("grid-in")
        value = field.value_or_none()
        if value is None:
            self._out(
                "grid-out", "A wavelength or frequency gives the nearest ITU-T grid channels."
            )
            return
        from fieldkit.calc.conversions import grid_report
        from fieldkit.text import convert as lines_of

        try:
            report = grid_report(value)
        except InputError as exc:
            field.show_error(str(exc))
            self._out("grid-out", "")
            return
        rows = lines_of.grid_rows(report)
        self._out("grid-out", lines_of.rows_text(rows))


def _linear(level_dbm: float) -> str:
    value = Value(Kind.POWER, level_dbm, "dBm")
    mw = value.to("mW")
    unit = "mW" if mw >= 0.1 else "uW" if mw >= 1e-4 else "nW"
    return f"{format_number(value.to(unit), 4)} {display_unit(unit)}"


def _panel(panel_id: str, title: str, *children: Widget) -> Vertical:
    panel = Vertical(*children, id=panel_id, classes="panel")
    panel.border_title = title
    return panel
