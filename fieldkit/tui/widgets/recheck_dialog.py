"""The end-of-session reference recheck: the level read now, the tolerance, and the drift."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Static

from fieldkit import safety
from fieldkit.calc import reference as ref
from fieldkit.calc.units import InputError
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS


class RecheckDialog(ModalScreen[tuple[float, float] | None]):
    """Dismisses with (recheck level in dBm, tolerance in dB), or None when cancelled."""

    DEFAULT_CSS = """
    RecheckDialog {
        align: center middle;
    }
    RecheckDialog > #rc-dialog {
        width: 90%;
        max-width: 64;
        height: auto;
        max-height: 100%;
        border: round $accent;
        background: $surface;
        padding: 0 1;
    }
    RecheckDialog Horizontal {
        height: auto;
    }
    RecheckDialog Label.rc-label {
        width: 12;
        color: $text-muted;
    }
    RecheckDialog Input {
        width: 1fr;
    }
    RecheckDialog #rc-out {
        height: auto;
        margin: 1 0 0 0;
    }
    RecheckDialog #rc-caution {
        height: auto;
        color: $warning;
    }
    RecheckDialog #rc-buttons {
        height: auto;
        align-horizontal: right;
    }
    """

    BINDINGS = [Binding("escape", "cancel", "Cancel", id="recheck.cancel")]

    def __init__(self, column: str, initial_dbm: float, tolerance_db: float) -> None:
        super().__init__()
        self._column = column
        self._initial_dbm = initial_dbm
        self._tolerance_db = tolerance_db

    def compose(self) -> ComposeResult:
        with Vertical(id="rc-dialog"):
            yield Label(
                f"Recheck the reference of {self._column} (set at {self._initial_dbm:.2f} dBm)"
            )
            # The reference cord goes back on the meter with the source on.
            yield Static(f"⚠ {safety.INVISIBLE_LIGHT_SHORT}", id="rc-caution")
            with Horizontal():
                yield Label("Level now", classes="rc-label")
                yield Input(
                    placeholder="dBm, or µW, nW",
                    type="text",
                    restrict=QUANTITY_CHARS,
                    compact=True,
                    id="rc-level",
                )
            with Horizontal():
                yield Label("Tolerance", classes="rc-label")
                yield Input(
                    value=f"{self._tolerance_db:g}",
                    type="text",
                    restrict=QUANTITY_CHARS,
                    compact=True,
                    id="rc-tolerance",
                    tooltip="Drift allowed, dB (common practice: 0.1 single-mode, 0.2 multimode)",
                )
            yield Static("", id="rc-out")
            with Horizontal(id="rc-buttons"):
                yield Button("Cancel", id="rc-cancel")
                yield Button("Record recheck", id="rc-ok", variant="primary")

    def on_mount(self) -> None:
        self.query_one("#rc-level", Input).focus()

    def _values(self) -> tuple[float, float, ref.Drift] | str:
        level_text = self.query_one("#rc-level", Input).value
        if not level_text.strip():
            return "Type the level the meter reads now through the reference cords."
        try:
            level_dbm = ref.level_dbm(level_text, "level now")
            tolerance_db = ref.loss_limit_db(
                self.query_one("#rc-tolerance", Input).value, "tolerance"
            )
            drift = ref.reference_drift(self._initial_dbm, level_dbm, tolerance_db)
        except InputError as exc:
            return str(exc)
        return level_dbm, tolerance_db, drift

    @on(Input.Changed)
    def _changed(self) -> None:
        values = self._values()
        out = self.query_one("#rc-out", Static)
        if isinstance(values, str):
            out.update(values)
            out.set_class(True, "field-error")
            return
        out.set_class(False, "field-error")
        out.update(values[2].message)

    @on(Input.Submitted)
    @on(Button.Pressed, "#rc-ok")
    def _ok(self) -> None:
        values = self._values()
        if isinstance(values, str):
            self._changed()
            return
        self.dismiss((values[0], values[1]))

    @on(Button.Pressed, "#rc-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)
