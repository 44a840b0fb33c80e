"""A labelled input for one typed quantity, with its problem shown beside it."""

from __future__ import annotations

from collections.abc import Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.widget import Widget
from textual.widgets import Input

from fieldkit.calc.units import InputError, Kind, Value, parse
from fieldkit.tui.widgets.compact_input import compact_input
from fieldkit.tui.widgets.result_lines import ResultLines

#: What a quantity field lets through: digits, signs, separators, letters for units, µ/μ, %, /.
QUANTITY_CHARS = r"[0-9A-Za-z .,+\-\u2212\u00b5\u03bc/%']*"

__all__ = ["QUANTITY_CHARS", "QuantityField", "field_name"]


def field_name(label: str) -> str:
    """:func:`fieldkit.tui.form_fields.field_name`, imported when a field is first read (the
    form rules are not needed for the first frame)."""
    from fieldkit.tui.form_fields import field_name as named

    return named(label)


class QuantityField(Widget):
    """Label, input and an error line. ``value()`` parses what is typed or raises InputError.

    Two widgets, not five: the field draws its label itself in the 12 columns left of the
    input (no Label widget, no row container), and the error line is mounted below only when
    there is a problem to show. A workspace of six fields starts with eighteen fewer widgets
    to mount and style than a row of label and input would take.
    """

    COMPONENT_CLASSES = {"quantity-field--label"}

    DEFAULT_CSS = """
    QuantityField {
        layout: vertical;
        height: auto;
    }
    QuantityField > .quantity-field--label {
        color: $text-muted;
    }
    QuantityField > Input {
        margin-left: 12;
    }
    QuantityField > .field-error {
        padding-left: 12;
        color: $error;
        text-style: bold;
    }
    """

    def __init__(
        self,
        label: str,
        *,
        expect: Kind | tuple[Kind, ...] | None,
        placeholder: str,
        default_unit: str | None = None,
        value: str = "",
        field_id: str,
        tooltip: str | None = None,
        check: Callable[[str, str], object] | None = None,
    ) -> None:
        super().__init__(id=f"{field_id}-field")
        # A field's own rule from fieldkit.inputs, run on the text before the unit parser
        # (e.g. an OTDR distance refuses a bare number); it raises InputError to refuse.
        self._check = check
        self._label = label
        self._expect = expect
        self._default_unit = default_unit
        self._input = compact_input(
            value=value,
            placeholder=placeholder,
            type="text",
            restrict=QUANTITY_CHARS,
            id=field_id,
            tooltip=tooltip,
        )
        self._error: ResultLines | None = None

    def compose(self) -> ComposeResult:
        yield self._input

    def render(self) -> Text:
        # The label, in the 12 columns left of the input (one kept blank before the input);
        # the labels of the workspaces are 11 characters at most.
        return Text(self._label[:11], style=self.get_component_rich_style("quantity-field--label"))

    @property
    def label(self) -> str:
        return self._label

    @property
    def input(self) -> Input:
        return self._input

    def value(self) -> Value:
        """The typed value; raises InputError (and shows it) when it cannot be used."""
        try:
            if self._check is not None:
                self._check(self._input.value, field_name(self._label))
            parsed = parse(
                self._input.value,
                self._expect,
                default_unit=self._default_unit,
                what=field_name(self._label),
            )
        except InputError as exc:
            self.show_error(str(exc))
            raise
        self.show_error("")
        return parsed

    def value_or_none(self) -> Value | None:
        """The typed value, or None when the field is empty or wrong (the reason is shown)."""
        if not self._input.value.strip():
            self.show_error("")
            return None
        try:
            return self.value()
        except InputError:
            return None

    def show_error(self, message: str) -> None:
        if self._error is None:
            if not message:
                return
            self._error = ResultLines(message, classes="field-error")
            self.mount(self._error)
        # The same problem worded for the next digit ("2 needs a unit", "20 needs a unit") is
        # drawn again without a layout of the whole screen.
        self._error.show_lines(message)
        self._error.display = bool(message)
