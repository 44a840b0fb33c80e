"""What the actions refuse, as one line that names the problem."""

from __future__ import annotations

import unicodedata


class ActionError(ValueError):
    """A change that was refused (bad input, no such link, a target that would lose data).

    The CLI prints it on one line and exits 2; a workspace shows it beside the field or in its
    status line. Nothing was written.
    """


#: The longest name, label or one-line field a record holds (the models' own limit).
MAX_FIELD = 200


def check_text(text: str, what: str, *, multiline: bool = False, limit: int = MAX_FIELD) -> str:
    """``text`` stripped, refusing what would corrupt a record or the terminal showing it.

    Refuses text that is not UTF-8 (lone surrogates), control characters (an escape sequence
    would recolour the terminal; a line break would split a one-line field) and text longer
    than ``limit``. Multiline text (a note) may hold line breaks and tabs.
    """
    for ch in text:
        if multiline and ch in "\n\t":
            continue
        category = unicodedata.category(ch)
        if category == "Cs":
            raise ActionError(f"{what}: holds bytes that are not UTF-8 text; retype it")
        if category == "Cc" or ch in "\u2028\u2029":
            where = "" if multiline else " on one line"
            raise ActionError(
                f"{what}: holds a control character (U+{ord(ch):04X}); type plain text{where}"
            )
    text = text.strip()
    if len(text) > limit:
        raise ActionError(f"{what}: {len(text)} characters is too long (at most {limit})")
    return text
