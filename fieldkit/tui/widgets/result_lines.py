"""A read-only block of lines (a result or a field's problem) that is drawn again only when what
it shows changed, and lays the screen out again only when its height changed.

Textual lays out the whole screen when any widget asks for it, and ``Static.update`` asks every
time: a keystroke that changed five result panels by a digit each made five requests and a
layout of every widget of the workspace, for heights that stayed the same. Here the new text's
height at the widget's width is measured first (as Textual will measure it) and the layout is
asked for only when it differs.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, cast

from rich.text import Text
from textual.visual import VisualType, visualize
from textual.widgets import Static

if TYPE_CHECKING:
    from textual.css.styles import RulesMap  # noqa: F401

__all__ = ["ResultLines"]


class ResultLines(Static):
    """A Static shown with :meth:`show_lines`: nothing done when the text is the same, and no
    layout when the text takes as many lines as before."""

    def __init__(
        self,
        content: str | Text = "",
        *,
        id: str | None = None,  # noqa: A002 - Textual's name
        classes: str | None = None,
    ) -> None:
        super().__init__(content, id=id, classes=classes, markup=False)
        self._shown: object = content

    def update(self, content: VisualType = "", *, layout: bool = True) -> None:
        """As ``Static.update`` (a layout every time); what is shown is remembered."""
        self._shown = content
        super().update(content, layout=layout)

    def show_lines(self, content: str | Text) -> None:
        before = self._shown
        if type(before) is type(content) and before == content:
            return
        self.update(content, layout=self._height_changes(content))

    def show_fitted(self, text: str) -> None:
        """Show ``text`` wrapped here to the widget's width: a Static's own wrap would part a
        number from its unit ("0.30 / dB")."""
        from fieldkit.text.layout import fit  # not on Convert's way to its first frame

        self.show_lines(Text(fit(text, self.content_size.width or None)))

    def _height_changes(self, content: str | Text) -> bool:
        if not self.display:
            return False  # takes no room; showing it again lays the screen out
        width = self.content_size.width
        if not width or not self.is_mounted:
            return True
        rules = cast("RulesMap", self.styles)  # what Textual measures a Static's height with
        height = self.visual.get_height(rules, width)
        return visualize(self, content, markup=False).get_height(rules, width) != height
