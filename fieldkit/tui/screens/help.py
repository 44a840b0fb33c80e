"""Help: the keys of each workspace and the safety cautions."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Markdown

from fieldkit import safety
from fieldkit.tui.workspaces import WORKSPACES


def help_markdown() -> str:
    keys = "\n".join(f"| {ws.key.upper()} | {ws.title} | {ws.help} |" for ws in WORKSPACES)
    cautions = "\n".join(f"- {line}" for line in safety.ALL)
    return f"""\
# Safety first

{cautions}

# Keys

| key | opens | for |
|---|---|---|
{keys}
| F1 | Help | this page |
| Ctrl+P | Commands | search every command and workspace |
| Ctrl+T | Sunlight | high-contrast theme on or off (the choice is remembered) |
| Tab / Shift+Tab | | next / previous field |
| Ctrl+Q | | quit |

Results update as you type. A field with a problem says why beside it; nothing you typed is
thrown away. Numbers accept a decimal point, or a decimal comma where it cannot be a thousands
separator (`-7,5 dBm`).
"""


class HelpScreen(ModalScreen[None]):
    BINDINGS = [
        Binding("escape", "dismiss", "Close"),
        Binding("f1", "dismiss", "Close", show=False),
        Binding("q", "dismiss", "Close", show=False),
    ]

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-body"):
            yield Markdown(help_markdown())
            yield Button("Close (Esc)", id="help-close", variant="primary")

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss()
