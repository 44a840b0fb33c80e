"""Help: the safety cautions and the key table (fieldkit.tui.keys), our own mapping explained."""

from __future__ import annotations

from typing import ClassVar

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.scrollbar import ScrollBarRender
from textual.widgets import Button, Markdown

from fieldkit import safety
from fieldkit.tui import keys
from fieldkit.tui.widgets.key_footer import KeyFooter


def help_markdown() -> str:
    cautions = "\n".join(f"- {line}" for line in safety.ALL)
    return f"""\
# Safety first

{cautions}

# Keys

{keys.help_markdown()}
Results update as you type. A field with a problem says why beside it; nothing you typed is
thrown away. Numbers accept a decimal point, or a decimal comma where it cannot be a thousands
separator (`-7,5 dBm`).
"""


class WholeCellScrollBar(ScrollBarRender):
    """A scrollbar whose thumb is whole cells: Textual draws a thumb's ends with partial-block
    glyphs (▁ … ▇), which a terminal shows as stray blocks down the page's right edge."""

    VERTICAL_BARS: ClassVar[list[str]] = [" "]


class HelpScreen(ModalScreen[None]):
    # On a phone terminal the page takes the whole screen and drops the Markdown indents, so
    # a line holds about 40 characters instead of 26.
    CSS = """
    HelpScreen.-narrow #help-body {
        width: 100%;
        height: 100%;
        padding: 0;
    }
    HelpScreen.-narrow #help-body Markdown {
        padding: 0 1 0 0;
    }
    HelpScreen #help-body {
        scrollbar-size-vertical: 1;
        scrollbar-background: $panel;
    }
    HelpScreen #help-body MarkdownH1 {
        margin: 1 0 1 0;
    }
    """
    BINDINGS = [
        Binding("escape", "dismiss", "Close"),
        Binding("f1", "dismiss", "Close", show=False),
        Binding("q", "dismiss", "Close", show=False),
    ]

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-body"):
            yield Markdown(help_markdown())
            yield Button(f"Close ({keys.display('close')})", id="help-close", variant="primary")
        # Its own footer: Esc closes, not the keys of the workspace underneath.
        yield KeyFooter()

    def on_mount(self) -> None:
        # Textual documents a per-widget renderer (textual/scrollbar.py, ScrollBar.renderer:
        # "my_widget.horizontal_scrollbar.renderer = MyScrollBarRender"); typed as a ClassVar.
        bar = self.query_one("#help-body", VerticalScroll).vertical_scrollbar
        bar.renderer = WholeCellScrollBar  # type: ignore[misc]

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss()
