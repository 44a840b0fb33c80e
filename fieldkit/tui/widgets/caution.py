"""A safety caution that folds to one line where rows are scarce, and never disappears.

Folded it reads ``⚠ Before digging: have buried services located and marked … more`` (or a
shorter wording given for narrow screens, the longest that fits); Enter, Space or a click
unfolds the full wording (and folds it again). The full wording is also its tooltip, and
always ends by deferring to local codes and licensed practice (``safety.DEFER``).
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.text import Text
from textual.binding import Binding
from textual.reactive import reactive
from textual.widgets import Static

from fieldkit import safety

__all__ = ["Caution", "folded_line"]

_MORE = " … more"
_LESS = " less"


def folded_line(shorts: Sequence[str], width: int) -> str:
    """The folded caution for ``width`` columns, without its "… more": the first of ``shorts``
    (longest first) that fits one line with "… more" after it, else the last one whole (it
    wraps: a caution is never cut mid-sentence)."""
    room = max(4, width - len(_MORE))
    lines = [f"⚠ {short}" for short in shorts]
    return next((line for line in lines if len(line) <= room), lines[-1])


class Caution(Static, can_focus=True):
    """``full`` shown unfolded (with ``safety.DEFER`` after it); folded, the first of ``short``
    (one wording or several, longest first) that fits one line, the last whole if none does."""

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

    def __init__(
        self,
        full: str,
        short: str | Sequence[str],
        *,
        id: str | None = None,  # noqa: A002
    ) -> None:
        super().__init__("", id=id, classes="caution", markup=False)
        self.full = full if safety.DEFER in full else f"{full}\n{safety.DEFER}"
        self.shorts = (short,) if isinstance(short, str) else tuple(short)
        self.short = self.shorts[0]
        self.tooltip = self.full
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
        line = folded_line(self.shorts, self.content_size.width or 40)
        self.update(Text(line) + Text(_MORE, style="underline"))
