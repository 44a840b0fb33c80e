"""A labelled input for a bare number (an index, a percentage, a marking), its problem beside it."""

from __future__ import annotations

from fieldkit.tui.widgets.quantity_field import QuantityField

#: Characters a plain-number field lets through (a decimal comma is handled by the parser).
NUMBER_CHARS = r"[0-9 .,+\-\u2212%eE]*"


class NumberField(QuantityField):
    """Label, input and an error line for a bare number (an index, a percentage, a marking).

    Laid out as a :class:`QuantityField` is (the label drawn by the field itself, the error line
    mounted only when there is one): two widgets where a Label, a row and an error line made
    five, on a workspace with seven of them. Its text is read as a number by the form it is
    part of (``fieldkit.tui.fault_model.read_field``), which says what is wrong beside it.
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
        super().__init__(
            label,
            expect=None,
            placeholder=placeholder,
            value=value,
            field_id=field_id,
            tooltip=tooltip,
        )
        self.input.restrict = NUMBER_CHARS
