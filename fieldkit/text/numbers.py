"""The one minus-sign and direction policy of everything fieldkit prints for people.

- Negative numbers take the typographic minus U+2212 (``−0.30 dB``); names such as
  ``10GBASE-LR`` or ``JC-3`` keep their hyphen. ``--json`` output keeps plain floats.
- A direction is written with an arrow, ``A→B`` / ``B→A``; records and ``--json`` keep the
  ASCII form ``A->B`` they are stored in.
"""

from __future__ import annotations

import re

MINUS = "\u2212"

_NEGATIVE = re.compile(r"(?<![\w.])-(?=\d)")


def minus(text: str) -> str:
    """``text`` with each negative number's hyphen made the typographic minus."""
    return _NEGATIVE.sub(MINUS, text)


def arrow(direction: str) -> str:
    """``A->B`` as people read it: ``A→B`` (``A<->B``, a pair: ``A↔B``)."""
    return direction.replace("<->", "↔").replace("->", "→")
