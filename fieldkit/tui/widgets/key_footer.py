"""The footer of every workspace: its keys from the key table, Quit first, in the table's order.

Textual orders footer keys by the focused widget's own bindings first, so a Ctrl key that a text
field also binds (Ctrl+A, Ctrl+X) would jump ahead of Quit. This footer keeps the order of the
screen's BINDINGS (``fieldkit.tui.keys.bindings`` starts them with Quit), and where the terminal
is too narrow for all of them it leaves out the last ones rather than cutting any: the table's
order is the order of importance, Quit and the palette key always show, and Help (F1) lists all.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.events import Resize
from textual.widget import Widget
from textual.widgets import Footer
from textual.widgets._footer import FooterKey

#: Cells a compact key takes beyond its key and word: the space between them and the gap after.
_GAPS = 2
#: Cells the palette key takes at the right (its border, key, space and word).
_PALETTE_CELLS = 12


class KeyFooter(Footer):
    """A compact footer whose keys follow the screen's key table order and never get cut."""

    def __init__(self, **kwargs: object) -> None:
        kwargs.setdefault("compact", True)
        super().__init__(**kwargs)  # type: ignore[arg-type]
        self._fitted_for = 0

    def compose(self) -> ComposeResult:
        widgets: list[Widget] = list(super().compose())
        if not all(isinstance(w, FooterKey) for w in widgets):
            yield from widgets  # grouped keys: leave Textual's layout alone
            return
        keys = [w for w in widgets if isinstance(w, FooterKey)]
        order = [b.key for b in type(self.screen).BINDINGS if isinstance(b, Binding)]

        def rank(widget: FooterKey) -> int:
            return order.index(widget.key) if widget.key in order else len(order)

        palette = [k for k in keys if k.has_class("-command-palette")]
        for key in palette:
            # Textual names it "palette": capitalised like every other key's word ("Quit").
            key.description = key.description[:1].upper() + key.description[1:]
        shown = sorted((k for k in keys if not k.has_class("-command-palette")), key=rank)
        width = self.app.size.width
        self._fitted_for = width
        room = width - (_PALETTE_CELLS if palette else 0)
        kept: list[FooterKey] = []
        for key in shown:
            cells = len(key.key_display) + len(key.description) + _GAPS
            if kept and cells > room:  # the first (Quit) always shows
                continue
            room -= cells
            kept.append(key)
        yield from kept
        yield from palette

    def on_resize(self, event: Resize) -> None:
        if self._fitted_for and self.app.size.width != self._fitted_for:
            self.refresh(recompose=True)
