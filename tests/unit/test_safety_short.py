"""Every short caution is a whole sentence that fits the line it is shown in (review: cut or
garbled cautions, "never look in … more", "never into a live fibre" with no verb).

The widths are the content widths the cautions get in the workspaces (measured with Pilot):
a full-width caution has 78 columns at 80x24 and 42 at 44x22 (one column of padding each
side); the fault locator's caution sits in the right column, 37 columns at 80x24 and 40 at
44x22. The folded line also carries " … more" (tui/widgets/caution.py).
"""

from __future__ import annotations

import textwrap

import pytest

from fieldkit import safety
from fieldkit.tui.widgets.caution import Caution, folded_line

FOLDED = {  # name: (wordings longest first, the widths it is shown at)
    "budget": ((safety.INVISIBLE_LIGHT_SHORT, safety.INVISIBLE_LIGHT_NARROW), (78, 42)),
    "fault digging": ((safety.DIGGING_SHORT, safety.DIGGING_NARROW), (78, 42)),
    "fault locator": ((safety.FAULT_LOCATOR_SHORT, safety.FAULT_LOCATOR_NARROW), (37, 40)),
}


def _sentence(text: str) -> bool:
    """Whole: ends with a full stop, no cut mark, and not a list of words (it has a verb
    near "never": "never look", as in the full cautions)."""
    return text.endswith(".") and "…" not in text and text[0].isupper()


@pytest.mark.parametrize("name", list(FOLDED))
def test_a_folded_caution_is_a_whole_sentence_on_one_line(name: str) -> None:
    shorts, widths = FOLDED[name]
    for width in widths:
        line = folded_line(shorts, width)
        assert len(line + " … more") <= width, (name, width, line)
        assert _sentence(line.removeprefix("⚠ ")), (name, width, line)


def test_every_short_form_is_a_sentence_and_says_never_look_into() -> None:
    for text in (
        safety.INVISIBLE_LIGHT_SHORT,
        safety.INVISIBLE_LIGHT_NARROW,
        safety.FAULT_LOCATOR_SHORT,
        safety.FAULT_LOCATOR_NARROW,
        safety.OTDR_LIVE_FIBRE_SHORT,
        safety.OTDR_LIVE_FIBRE_MEDIUM,
        safety.SPLICING_SHORT,
    ):
        assert _sentence(text), text
        assert "never look into" in text.lower(), text  # the verb the short forms had lost
    assert _sentence(safety.DIGGING_SHORT) and _sentence(safety.DIGGING_NARROW)


def test_the_meter_line_fits_a_phone_terminal() -> None:
    # The meter and the recheck dialog show "⚠ " + INVISIBLE_LIGHT_SHORT as one line of 42.
    assert len(f"⚠ {safety.INVISIBLE_LIGHT_SHORT}") <= 42


@pytest.mark.parametrize("width", [42, 78])
def test_the_otdr_short_caution_fits_two_lines(width: int) -> None:
    # The traces caution has two lines: the short form must fit them at 44 columns.
    assert len(textwrap.wrap(safety.OTDR_LIVE_FIBRE_SHORT, width)) <= 2


def test_the_splice_caution_fits_a_line_at_80_columns() -> None:
    assert len(safety.SPLICING_SHORT) <= 80  # the splice workspace's line has no padding


def test_none_fits_shows_the_last_whole_never_cut() -> None:
    line = folded_line(("A much longer caution sentence.", "Short one."), 10)
    assert line == "⚠ Short one."  # wraps rather than losing its end


def test_the_full_caution_defers_to_local_codes() -> None:
    assert Caution(safety.INVISIBLE_LIGHT, "x.").full.endswith(safety.DEFER)
    assert Caution(f"{safety.DIGGING}\n{safety.DEFER}", "x.").full.count(safety.DEFER) == 1
