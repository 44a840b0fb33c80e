"""A safety caution that folds to one line where rows are scarce, and never disappears.

Folded it reads ``⚠ Before digging: get a locate … more``; Enter, Space or a click unfolds the
full wording (and folds it again). The full wording is also its tooltip.
"""

from __future__ import annotations

from rich.text import Text
from textual.binding import Binding
from textual.reactive import reactive
from textual.widgets import Static

__all__ = ["Caution"]

_MORE = " … more"
_LESS = " less"


class Caution(Static, can_focus=True):
    """``full`` shown unfolded; ``short`` (one line, cut to the width if need be) folded."""

    DEFAULT_CSS = """
    Caution {
        height: auto;
    }
    Caution:focus {
        background-tint: $foreground 8%;
    }
    """
    BINDINGS = [Binding("enter,space", "fold", "More", show=False)]

    folded: reactive[bool] = reactive(True)

    def __init__(self, full: str, short: str, *, id: str | None = None) -> None:  # noqa: A002
        super().__init__("", id=id, classes="caution", markup=False)
        self.full = full
        self.short = short
        self.tooltip = full
        self._chosen = False  # the user folded or unfolded it: the layout no longer decides

    def fit(self, scarce: bool) -> None:
        """Fold where rows are scarce, unfold where there is room, unless the user chose."""
        if not self._chosen:
            self.folded = scarce

    def action_fold(self) -> None:
        self._chosen = True
        self.folded = not self.folded

    def on_click(self) -> None:
        self.action_fold()

    def watch_folded(self) -> None:
        self._draw()

    def on_mount(self) -> None:
        self._draw()

    def on_resize(self) -> None:
        self._draw()

    def _draw(self) -> None:
        if not self.folded:
            self.update(Text(f"⚠ {self.full}") + Text(_LESS, style="underline"))
            return
        width = self.content_size.width or 40
        line = f"⚠ {self.short}"
        room = max(4, width - len(_MORE))
        if len(line) > room:
            line = line[: room - 1] + "…"
        self.update(Text(line) + Text(_MORE, style="underline"))
