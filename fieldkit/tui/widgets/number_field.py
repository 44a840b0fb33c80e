"""A labelled input for a bare number (an index, a percentage, a marking), its problem beside it."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Input, Label, Static

from fieldkit.calc.units import InputError
from fieldkit.tui.form_fields import plain_number

#: Characters a plain-number field lets through (a decimal comma is handled by the parser).
NUMBER_CHARS = r"[0-9 .,+\-\u2212%eE]*"


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

    @property
    def label(self) -> str:
        return self._label

    def value_or_none(self) -> float | None:
        """The number typed, None when empty or wrong (the reason shown beside the field)."""
        try:
            number = plain_number(self._input.value, self._label)
        except InputError as exc:
            self.show_error(str(exc))
            return None
        self.show_error("")
        return number

    def show_error(self, message: str) -> None:
        self._error.update(message)
        self._error.display = bool(message)
