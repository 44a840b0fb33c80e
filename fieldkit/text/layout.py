"""Fitting lines to a width: wrap under a line's own text, never part a number from its unit.

The workspaces show lines in panels of 34-40 columns; the CLI prints the same lines unwrapped.
"""

from __future__ import annotations

import re
import textwrap

__all__ = ["NBSP", "fit", "keep_units", "together", "wrap"]

#: A space between a number and its unit, or after "×": a line is never broken there.
_UNIT_GAP = re.compile(r"(?<=\d) (?=(?:dBm|dB|nm|km|m|ps|GBd|MHz|µm|%)(?![A-Za-z]))|(?<=×) ")
NBSP = "\u00a0"


def keep_units(text: str) -> str:
    """``text`` with a no-break space between each number and its unit (``0.30\u00a0dB``) and
    after ``×``, so a display that wraps never leaves a unit alone on the next line."""
    return _UNIT_GAP.sub(NBSP, text)


def wrap(line: str, width: int | None, indent: int) -> list[str]:
    """``line`` broken into lines of at most ``width`` (None: as it is), continuation lines
    indented by ``indent`` spaces, never between a number and its unit."""
    if width is None or len(line) <= width:
        return [line]
    parts = textwrap.wrap(
        keep_units(line),
        width=max(width, indent + 8),
        subsequent_indent=" " * indent,
        break_long_words=False,
        break_on_hyphens=False,
    )
    return [p.replace(NBSP, " ") for p in parts] or [line]


def fit(text: str, width: int | None) -> str:
    """Every line of ``text`` wrapped to ``width`` (continuations 2 past the line's own indent),
    with leading spaces as no-break spaces so a display keeps the indents: what a panel shows
    then has nothing left to wrap (a display's own wrap would part ``0.30`` from ``dB``)."""
    out: list[str] = []
    for line in text.split("\n"):
        indent = len(line) - len(line.lstrip(" "))
        for part in wrap(line, width, indent + 2):
            stripped = part.lstrip(" ")
            out.append(NBSP * (len(part) - len(stripped)) + stripped)
    return "\n".join(out)


def together(words: str) -> str:
    """``words`` that a wrap must not part: their spaces become no-break spaces."""
    return words.replace(" ", NBSP)
