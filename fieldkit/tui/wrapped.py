"""Text wrapped by fieldkit's own rule, at whatever width the widget has.

Rich breaks a line at any white space, the no-break space included, and starts a continuation
at column 1. :class:`Wrapped` breaks only at ordinary spaces, so what is joined by a no-break
space stays on one line ("2026-12-02 14:20", "5 in doubt", "0.30 dB"), and indents each
continuation two past its line's own indent (under the text after a "✗ " or "• ").
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.text import Text
from textual.content import Content
from textual.visual import Visual

from fieldkit.text.layout import NBSP, keep_units

if TYPE_CHECKING:
    from textual.css.styles import RulesMap
    from textual.strip import Strip
    from textual.style import Style
    from textual.visual import RenderOptions

__all__ = ["NBSP", "Wrapped"]


def _breaks(plain: str, width: int, start: int) -> list[tuple[int, int]]:
    """(start, end) of each piece of ``plain`` from ``start``; the first fits ``width``, the
    others ``width`` less the continuation indent (the caller passes the right width)."""
    pieces: list[tuple[int, int]] = []
    end = len(plain)
    while end - start > width:
        cut = plain.rfind(" ", start, start + width + 1)
        if cut <= start:  # one word longer than the line: it is folded by Rich
            cut = plain.find(" ", start + width)
            if cut == -1:
                break
        pieces.append((start, cut))
        start = cut
        while start < end and plain[start] == " ":
            start += 1
        return pieces + [(start, end)]  # the rest: wrapped again by the caller
    pieces.append((start, end))
    return pieces


class Wrapped(Visual):
    """``text`` (lines split at "\\n") wrapped at the widget's width by the rule above; a
    Static shows it (``static.update(Wrapped(text))``), ``str()`` gives its plain text."""

    def __init__(self, text: Text | str, *, hang: int = 2, units: bool = True) -> None:
        if isinstance(text, str):
            text = Text(text)
        if units:  # never part a number from its unit
            plain = text.plain
            kept = keep_units(plain)
            if kept != plain:
                text = text.copy()
                text.plain = kept  # same length: the styles stay where they were
        self.text = text
        self.hang = hang
        self._cache: tuple[int, Content] | None = None

    def __str__(self) -> str:
        return self.text.plain.replace(NBSP, " ")

    def lines(self, width: int) -> list[Text]:
        """The lines at ``width``: broken at ordinary spaces only, continuations indented."""
        out: list[Text] = []
        for line in self.text.split("\n", allow_blank=True):
            plain = line.plain
            indent = len(plain) - len(plain.lstrip(" "))
            lead = " " * (indent + self.hang)
            start, first = 0, True
            while True:
                room = width if first else max(width - len(lead), 8)
                pieces = _breaks(plain, room, start)
                a, b = pieces[0]
                piece = line[a:b]
                out.append(piece if first else Text(lead) + piece)
                first = False
                if len(pieces) == 1:
                    break
                start = pieces[1][0]
        return out

    def content(self, width: int) -> Content:
        if self._cache is None or self._cache[0] != width:
            joined = Text("\n").join(self.lines(max(width, 1)))
            # Broken where it may be, every line fits: the no-break spaces show as spaces.
            joined.plain = joined.plain.replace(NBSP, " ")
            self._cache = (width, Content.from_rich_text(joined))
        return self._cache[1]

    def render_strips(
        self, width: int, height: int | None, style: Style, options: RenderOptions
    ) -> list[Strip]:
        return self.content(width).render_strips(width, height, style, options)

    def get_optimal_width(self, rules: RulesMap, container_width: int) -> int:
        longest = max((len(line) for line in self.text.plain.split("\n")), default=0)
        return min(longest, container_width)

    def get_height(self, rules: RulesMap, width: int) -> int:
        return len(self.lines(max(width, 1)))
