"""The Traces workspace's dialogs: which closure's splice log to fill, whether to replace
recorded losses, and what is kept on a job's link before it is saved."""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.text.escape import terminal

#: The highest fibre number the dialogs take (as ``fieldkit trace --fibre``).
MAX_FIBRE = 10_000


def fibre_field(value: int | None, tooltip: str) -> Horizontal:
    """The "Fibre" row of a dialog: digits only, filled with ``value`` when known."""
    return Horizontal(
        Label("Fibre"),
        Input(
            value=str(value or ""),
            restrict=r"[0-9]*",
            compact=True,
            classes="fibre-number",
            tooltip=tooltip,
        ),
    )


def typed_fibre(screen: ModalScreen[Any]) -> int | None:
    """The fibre number typed in the dialog's "Fibre" row; None (said under it) when it is
    empty or out of range."""
    text = screen.query_one(".fibre-number", Input).value.strip()
    if text and 1 <= int(text) <= MAX_FIBRE:
        return int(text)
    screen.query_one(".dialog-error", Static).update(f"Type the fibre number (1 to {MAX_FIBRE}).")
    return None


class ClosurePicker(ModalScreen[tuple[str, int | None] | None]):
    """Pick the closure whose splice log the traces fill (and the fibre, for one pair)."""

    DEFAULT_CSS = """
    ClosurePicker { align: center middle; }
    ClosurePicker > Vertical {
        width: 90%; max-width: 70; height: auto; max-height: 100%;
        border: round $accent; background: $surface; padding: 0 1;
    }
    ClosurePicker OptionList { height: auto; max-height: 10; }
    ClosurePicker Horizontal { height: 1; }
    ClosurePicker Label { width: 8; color: $text-muted; }
    ClosurePicker Input { width: 10; }
    ClosurePicker .dialog-error { color: $error; }
    """
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(
        self, closures: list[tuple[str, float | None]], fibre: int | None, ask_fibre: bool
    ):
        super().__init__()
        self.closures = closures
        self.fibre = fibre
        self.ask_fibre = ask_fibre

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Fill which closure's splice log?"
            options = []
            for name, route in self.closures:
                where = f"route {route:.0f} m" if route is not None else "no route position"
                options.append(Option(terminal(f"{name}  ({where})"), disabled=route is None))
            yield OptionList(*options, id="cp-closures")
            if self.ask_fibre:
                yield fibre_field(self.fibre, "The fibre number these traces hold")
            yield Static("", classes="dialog-error", markup=False)
            yield Static("Enter on a closure fills it; Esc cancels.", classes="field-note")

    def action_cancel(self) -> None:
        self.dismiss(None)

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        name = self.closures[event.option_index][0]
        fibre: int | None = None
        if self.ask_fibre:
            fibre = typed_fibre(self)
            if fibre is None:
                return
        self.dismiss((name, fibre))


class OverwriteDialog(ModalScreen[bool]):
    """Ask before replacing splice losses already recorded."""

    DEFAULT_CSS = """
    OverwriteDialog { align: center middle; }
    OverwriteDialog > Vertical {
        width: 90%; max-width: 70; height: auto;
        border: round $warning; background: $surface; padding: 0 1;
    }
    OverwriteDialog Horizontal { height: auto; }
    OverwriteDialog Button { margin-right: 2; }
    """
    BINDINGS = [Binding("escape", "no", "Keep")]

    def __init__(self, question: str) -> None:
        super().__init__()
        self.question = question

    @classmethod
    def for_losses(cls, would_overwrite: Sequence[tuple[Any, float]]) -> OverwriteDialog:
        """The question for losses already recorded: the first, and how many more."""
        first, old = would_overwrite[0]
        more = len(would_overwrite) - 1
        return cls(
            f"Fibre {first.fibre} {first.direction.replace('->', '→')} already holds "
            f"{old:.3f} dB; the trace says {first.loss_db:.3f} dB"
            + (f" (and {more} more)" if more else "")
            + ". Replace them?"
        )

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Replace recorded losses?"
            yield Static(self.question, markup=False)
            with Horizontal():
                yield Button("Replace", id="ow-yes", variant="warning", compact=True)
                yield Button("Keep (write nothing)", id="ow-no", compact=True)

    def action_no(self) -> None:
        self.dismiss(False)

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id == "ow-yes")


class SaveTracesDialog(ModalScreen[int | None]):
    """Say what is about to be kept on which link and save on Enter; for one fibre, ask its
    number (filled from the file when it gives one). Dismisses with the fibre number (0 for a
    folder, whose files give theirs), or None when cancelled: nothing is saved then."""

    DEFAULT_CSS = """
    SaveTracesDialog { align: center middle; }
    SaveTracesDialog > Vertical {
        width: 90%; max-width: 76; height: auto; max-height: 100%;
        border: round $accent; background: $surface; padding: 0 1;
    }
    SaveTracesDialog Horizontal { height: auto; }
    SaveTracesDialog Label { width: 8; color: $text-muted; }
    SaveTracesDialog Input { width: 10; }
    SaveTracesDialog Button { margin-right: 2; }
    SaveTracesDialog .dialog-error { color: $error; }
    """
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, where: str, lines: list[str], fibre: int | None, ask_fibre: bool) -> None:
        super().__init__()
        self.where = where
        self.lines = lines
        self.fibre = fibre
        self.ask_fibre = ask_fibre

    def compose(self) -> ComposeResult:
        with Vertical() as box:
            box.border_title = "Keep these traces on the link?"
            yield Static(terminal(self.where), markup=False, id="st-where")
            yield Static(
                "\n".join(terminal(line) for line in self.lines), markup=False, id="st-what"
            )
            if self.ask_fibre:
                yield fibre_field(self.fibre, "The fibre number these traces are kept as")
            yield Static("", classes="dialog-error", markup=False)
            with Horizontal():
                yield Button("Save", id="st-save", variant="primary", compact=True)
                yield Button("Cancel", id="st-cancel", compact=True)

    def on_mount(self) -> None:
        if self.ask_fibre:
            self.query_one(".fibre-number", Input).focus()
        else:
            self.query_one("#st-save", Button).focus()

    def action_cancel(self) -> None:
        self.dismiss(None)

    @on(Input.Submitted, ".fibre-number")
    def _submitted(self) -> None:
        self._save()

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        if event.button.id == "st-save":
            self._save()
        else:
            self.dismiss(None)

    def _save(self) -> None:
        if not self.ask_fibre:
            self.dismiss(0)
            return
        fibre = typed_fibre(self)
        if fibre is not None:
            self.dismiss(fibre)


def save_what_dialog() -> ModalScreen[str | None]:
    """What Ctrl+S saves onto a job's link: ``"traces"`` (the first choice) or ``"splices"``
    (their losses, into a closure's splice log); None (Esc) saves nothing."""
    from fieldkit.tui.widgets.choice_dialog import ChoiceDialog

    return ChoiceDialog(
        "Save onto a job's link",
        [("The traces", "traces"), ("Their losses, into a splice log", "splices")],
        start="traces",
        note="Arrows and Enter, or a digit; Esc saves nothing.",
    )
