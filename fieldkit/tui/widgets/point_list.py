"""An editable list of rows (the fault workspace's landmarks and slack loops): pick a row to
edit it, Enter to add or update, Delete (or the button) to remove, Clear for a fresh row.

The editor's fields show examples as hints ("e.g. closure 7"), never anything that reads as an
entered row; after Enter adds a row the first field takes the focus for the next one.
"""

from __future__ import annotations

from typing import Any

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import Button, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.calc.units import InputError
from fieldkit.tui import keys
from fieldkit.tui.form_fields import Column, field_name, parse_row

__all__ = ["Column", "PointList"]


class PointList(Vertical):
    """An editable list (landmarks or slack loops): pick a row to edit it, Enter to add or
    update, Delete (or the button) to remove, and a New button to start a fresh row."""

    DEFAULT_CSS = """
    PointList { height: auto; }
    PointList OptionList { height: auto; max-height: 6; border: none; padding: 0; }
    /* no border on focus either: rows must not move under the mouse as the list takes focus */
    PointList OptionList:focus { border: none; background-tint: $foreground 5%; }
    PointList > Horizontal { height: auto; }
    PointList Label.pl-label { width: 15; padding: 0 1 0 0; color: $text-muted; }
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
                    placeholder=f"e.g. {column.example}",
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
        return parse_row(self.columns, row)

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
        self.focus_first()

    def focus_first(self) -> None:
        """Focus the row editor's first field (where the next row's name is typed)."""
        self.query_one(f"#{self.id}-{self.columns[0].key}", Input).focus()

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        if self.commit():
            # The next row starts at its first field, so its name does not land in the last.
            self.focus_first()

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
