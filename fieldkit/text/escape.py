"""One escaping function per place user text goes: a terminal, a CSV cell, Markdown, HTML.

Text that came from a file, an import or another program may hold control characters (an
escape sequence that retitles the window, clears the screen or rewrites the line above), a
spreadsheet formula, or Markdown/HTML markup (a link or a remote image in the customer's report).
Every listing, export and workspace list passes user text through the function for its target;
nothing else decides how user text is shown.

- :func:`terminal`: control characters shown visibly (``␛`` for ESC, ``␊`` for a line feed in
  a one-line field, ``<U+202E>`` for invisible direction overrides); printable text unchanged.
- :func:`csv_cell`: a cell that starts with ``= + - @``, a tab or a CR is prefixed with ``'`` so
  a spreadsheet keeps it as text (OWASP "CSV injection"); plain numbers stay numbers.
- :func:`markdown`: backslash-escapes the characters that make links, images, emphasis, code,
  headings and tables; ``<`` and ``&`` become entities so no raw HTML passes.
- :func:`html`: entities for ``& < > " '``; control characters shown visibly.
"""

from __future__ import annotations

import re

#: C0 controls and DEL → the Unicode "control pictures" (U+2400 block), which every terminal
#: font shows as a small glyph: ESC becomes ␛, a line feed ␊, a tab ␉.
_PICTURES = {code: chr(0x2400 + code) for code in range(0x20)} | {0x7F: "\u2421"}
#: C1 controls (a terminal may read U+009B as CSI) and the invisible characters that reorder
#: or hide text (bidirectional overrides and isolates, zero-width joiners, BOM, line and
#: paragraph separators) are written as <U+hex code>, e.g. <U+202E>.
_INVISIBLE = (
    [*range(0x80, 0xA0)]
    + [0x061C, 0x200B, 0x200C, 0x200D, 0x200E, 0x200F, 0x2028, 0x2029]
    + [*range(0x202A, 0x202F), *range(0x2060, 0x2065), *range(0x2066, 0x206A), 0xFEFF]
)
_CODES = {code: f"<U+{code:04X}>" for code in _INVISIBLE}
_ONE_LINE = str.maketrans({**_PICTURES, **_CODES})
_MULTI_LINE = str.maketrans({**{k: v for k, v in _PICTURES.items() if k != 0x0A}, **_CODES})


def terminal(text: object, *, multiline: bool = False) -> str:
    """``text`` safe to print on a terminal: every control character shown as a visible glyph.

    With ``multiline`` a line feed stays a line break (a note's paragraphs); a carriage return,
    which would let a later part overwrite the line, is always shown as ``␍``.
    """
    return str(text).translate(_MULTI_LINE if multiline else _ONE_LINE)


_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
# The patterns are compiled on first use (re keeps them): the Jobs workspace imports this module
# for its first frame, which needs none of them.
_PLAIN_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"


def csv_cell(value: object) -> str:
    """A CSV cell that a spreadsheet shows as written and never runs as a formula.

    Text starting with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return gets a leading
    ``'`` (spreadsheets hide it and keep the cell as text). A plain number such as ``-2.50``
    is left alone: it is data, not a formula. Control characters are shown visibly, except a
    line break inside the cell, which CSV quoting keeps.
    """
    if value is None:
        return ""
    if isinstance(value, bool):
        return str(value).lower()
    if isinstance(value, int | float):
        return str(value)
    text = str(value)
    if text.startswith(_FORMULA_START) and not re.fullmatch(_PLAIN_NUMBER, text):
        text = "'" + text
    return text.translate(_MULTI_LINE)


# Characters that make links, images, emphasis, code and table cells anywhere on a line; a
# backslash keeps each as the character itself (CommonMark 0.30, "Backslash escapes": any ASCII
# punctuation may be escaped). "(" and ")" are harmless once "[" and "]" are escaped.
_MD_INLINE = r"([\\`*_\[\]!|~])"
# At the start of a line these make a quote, a heading, a list item, a rule or an underline.
_MD_LINE_START = (
    r"^(?:\d{1,9}(?=[.)](?:\s|$))|(?=>)|(?=#{1,6}(?:\s|$))|(?=[-+](?:\s|$))|(?=[=-]+$))"
)


def markdown(text: object) -> str:
    """``text`` as inert Markdown on one line: no link, image, emphasis, heading or raw HTML.

    ``[Pay here](https://…)`` stays visible text and is not a link; ``![](…)`` loads nothing.
    ``<`` and ``&`` become HTML entities; ``|`` is escaped so a table cell does not split.
    Line breaks and runs of spaces become one space (a table cell holds one line). A bare web
    address may still be shown as a link by some viewers; its visible text is the address.
    """
    words = " ".join(terminal(text, multiline=True).split())
    words = words.replace("&", "&amp;").replace("<", "&lt;")
    words = re.sub(_MD_INLINE, r"\\\1", words)
    # "12." or "12)" would start a numbered list, "#", ">", "+", "=", "-" a block: escape the
    # character after the digits (a backslash before a digit is not an escape)
    match = re.match(_MD_LINE_START, words)
    if match:
        cut = match.end()
        words = f"{words[:cut]}\\{words[cut:]}"
    return words


_HTML_ENTITIES = (("&", "&amp;"), ("<", "&lt;"), (">", "&gt;"), ('"', "&quot;"), ("'", "&#x27;"))


def html(text: object) -> str:
    """``text`` as HTML character data or an attribute value: ``& < > " '`` as entities and
    control characters shown visibly (HTML forbids most of them)."""
    # What html.escape(..., quote=True) does, "&" first (tests/unit check it against the
    # standard library); the html package's entity table is not loaded for it.
    shown = terminal(text, multiline=True)
    for char, entity in _HTML_ENTITIES:
        shown = shown.replace(char, entity)
    return shown


_JSON_CODES = str.maketrans({code: f"\\u{code:04x}" for code in _INVISIBLE})


def json_text(text: str) -> str:
    """A JSON document with the C1 controls and invisible direction marks that ``json.dumps``
    leaves raw (it escapes only C0) written as ``\\u`` escapes: the same data, but safe to
    print on a terminal. Valid because these characters can only occur inside strings."""
    return text.translate(_JSON_CODES)


def markup(text: object, *, multiline: bool = False) -> str:
    """``text`` for a Textual/Rich widget that reads markup: visible controls, and ``[``
    escaped so a job named ``[bold]`` or ``[link=…]`` is shown as typed."""
    shown = terminal(text, multiline=multiline)
    return shown.replace("\\", "\\\\").replace("[", "\\[")
