"""Small dialogs every workspace shares: ask (save / discard / cancel, yes / no), a name.

A dialog only asks; the screen that opened it does the work with what it answers. Escape is
always "cancel" and cancelling changes nothing.
"""

from __future__ import annotations

from collections.abc import Sequence

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, Static

DIALOG_CSS = """
AskDialog, NameDialog {
    align: center middle;
}
AskDialog > Vertical, NameDialog > Vertical {
    width: 72;
    max-width: 100%;
    height: auto;
    max-height: 100%;
    border: round $accent;
    background: $surface;
    padding: 0 1;
}
AskDialog #ask-lines {
    height: auto;
    max-height: 12;
}
AskDialog .ask-buttons, NameDialog .ask-buttons {
    height: auto;
    margin-top: 1;
}
AskDialog .ask-buttons Button, NameDialog .ask-buttons Button {
    margin-right: 1;
}
"""


class AskDialog(ModalScreen[tuple[str, str] | None]):
    """A question with a few answers; dismisses with (answer id, reason typed) or None.

    ``lines`` are shown as text (never markup). With ``reason`` a one-line field lets the user
    say why (the screen notes it).
    """

    DEFAULT_CSS = DIALOG_CSS
    BINDINGS = [Binding("escape", "cancel", "Cancel", id="dialog.cancel")]

    def __init__(
        self,
        title: str,
        lines: Sequence[str],
        answers: Sequence[tuple[str, str]],
        *,
        reason: str | None = None,
    ) -> None:
        super().__init__()
        self._title = title
        self._lines = list(lines)
        self._answers = list(answers)
        self._reason = reason

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Label(self._title, id="ask-title", markup=False)
            with VerticalScroll(id="ask-lines"):
                yield Static("\n".join(self._lines), id="ask-text", markup=False)
            if self._reason is not None:
                yield Input(placeholder=self._reason, id="ask-reason", compact=True)
            with Horizontal(classes="ask-buttons"):
                for answer_id, label in self._answers:
                    yield Button(label, id=f"ask-{answer_id}", compact=True)
                yield Button("Cancel", id="ask-cancel", compact=True)

    def on_mount(self) -> None:
        if self._reason is not None:
            self.query_one("#ask-reason", Input).focus()
        elif self._answers:
            self.query_one(f"#ask-{self._answers[0][0]}", Button).focus()

    def _reason_text(self) -> str:
        if self._reason is None:
            return ""
        return self.query_one("#ask-reason", Input).value.strip()

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        button_id = event.button.id or ""
        if button_id == "ask-cancel":
            self.dismiss(None)
        elif button_id.startswith("ask-"):
            self.dismiss((button_id.removeprefix("ask-"), self._reason_text()))

    def action_cancel(self) -> None:
        self.dismiss(None)


class NameDialog(ModalScreen[str | None]):
    """Ask for one line of text (the operator's name); Enter keeps it, Escape cancels."""

    DEFAULT_CSS = DIALOG_CSS
    BINDINGS = [Binding("escape", "cancel", "Cancel", id="dialog.cancel")]

    def __init__(self, title: str, note: str, value: str = "", required: bool = False) -> None:
        super().__init__()
        self._title = title
        self._note = note
        self._value = value
        #: No Cancel: a name must be given (the first start, when no name is known).
        self._required = required

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Label(self._title, markup=False)
            yield Static(self._note, classes="field-note", markup=False)
            yield Input(self._value, placeholder="your name", id="name-value", compact=True)
            yield Static("", id="name-error", classes="field-error", markup=False)
            with Horizontal(classes="ask-buttons"):
                yield Button("Keep", id="name-keep", variant="primary", compact=True)
                if not self._required:
                    yield Button("Cancel", id="name-cancel", compact=True)

    def on_mount(self) -> None:
        self.query_one("#name-value", Input).focus()

    @on(Input.Submitted, "#name-value")
    @on(Button.Pressed, "#name-keep")
    def _keep(self) -> None:
        from fieldkit.actions.errors import ActionError, check_text

        value = self.query_one("#name-value", Input).value
        try:
            clean = check_text(value, "name")
        except ActionError as exc:
            self.query_one("#name-error", Static).update(str(exc))
            return
        if not clean:
            # A blank name would be stamped on every record saved: not kept.
            self.query_one("#name-error", Static).update(
                "A name is needed: it goes on everything you save."
            )
            return
        self.dismiss(clean)

    @on(Button.Pressed, "#name-cancel")
    def action_cancel(self) -> None:
        if self._required:
            self.query_one("#name-error", Static).update(
                "A name is needed: it goes on everything you save."
            )
            return
        self.dismiss(None)
