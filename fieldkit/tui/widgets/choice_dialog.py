"""Pick one of a few choices: arrows and Enter, a digit, or a click; Escape cancels.

The list always opens at the choice the caller names (a fixed default), never at the one picked
last time, so the same keys always give the same choice.
"""

from __future__ import annotations

from collections.abc import Sequence

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.events import Key
from textual.screen import ModalScreen
from textual.widgets import Label, OptionList, Static
from textual.widgets.option_list import Option

__all__ = ["ChoiceDialog"]


class ChoiceDialog(ModalScreen[str | None]):
    """Dismisses with the value of the choice taken, or None when cancelled.

    ``choices`` are (label, value) pairs, shown numbered from 1; up to nine take a digit.
    """

    DEFAULT_CSS = """
    ChoiceDialog {
        align: center middle;
    }
    ChoiceDialog > Vertical {
        width: 40;
        max-width: 100%;
        height: auto;
        max-height: 100%;
        border: round $accent;
        background: $surface;
        padding: 0 1;
    }
    ChoiceDialog OptionList {
        height: auto;
        max-height: 12;
        border: none;
        padding: 0;
    }
    ChoiceDialog .choice-note {
        color: $text-muted;
    }
    """
    BINDINGS = [Binding("escape", "cancel", "Cancel", id="dialog.cancel")]

    def __init__(
        self,
        title: str,
        choices: Sequence[tuple[str, str]],
        *,
        start: str | None = None,
        note: str = "",
    ) -> None:
        super().__init__()
        self._title = title
        self._choices = list(choices)
        self._start = start
        self._note = note

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Label(self._title, id="choice-title", markup=False)
            yield OptionList(
                *[
                    Option(f"{i}  {label}" if i <= 9 else f"   {label}", id=f"choice-{i}")
                    for i, (label, _) in enumerate(self._choices, start=1)
                ],
                id="choice-list",
                # No frame: Textual's focused frame drew an empty row above the first choice.
                compact=True,
            )
            if self._note:
                yield Static(self._note, classes="choice-note", markup=False)

    def on_mount(self) -> None:
        options = self.query_one(OptionList)
        values = [value for _, value in self._choices]
        options.highlighted = values.index(self._start) if self._start in values else 0
        options.focus()

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(self._choices[event.option_index][1])

    def on_key(self, event: Key) -> None:
        if event.character and event.character in "123456789":
            index = int(event.character) - 1
            if index < len(self._choices):
                event.stop()
                self.dismiss(self._choices[index][1])

    def action_cancel(self) -> None:
        self.dismiss(None)
