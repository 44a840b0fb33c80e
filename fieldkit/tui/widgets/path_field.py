"""A file or folder field whose long path shows its end, the cut start marked."""

from __future__ import annotations

from rich.segment import Segment
from textual.strip import Strip
from textual.widgets import Input

__all__ = ["PathField"]


class PathField(Input):
    """A file or folder field: a long path shows its end (the folder and file that matter),
    and, not being typed in, its cut start is marked "…" so it never reads as a whole path."""

    def show_end(self) -> None:
        """The cursor at the end, and the path scrolled to show it."""
        self.cursor_position = len(self.value)
        self.call_after_refresh(self.scroll_to, x=self.max_scroll_x, animate=False, force=True)

    def render_line(self, y: int) -> Strip:
        strip = super().render_line(y)
        if self.scroll_offset.x > 0 and self.value and not self.has_focus:
            segments = list(strip.crop(0, 1))
            style = segments[0].style if segments else None
            strip = Strip([Segment("…", style), *strip.crop(1, strip.cell_length)])
        return strip
