"""One escaping function per target: terminal, CSV cell, Markdown, HTML; and every export of a
job holding hostile text carries no live escape code, formula or markup.

Sources: ECMA-48 (C0 controls 0x00-0x1F, DEL 0x7F, C1 controls 0x80-0x9F, CSI = ESC [ or
0x9B); OWASP "CSV Injection" (cells starting with = + - @ tab CR run as formulas); CommonMark
0.30 (links "[text](url)", images "![alt](url)", raw HTML "<...>", backslash escapes of ASCII
punctuation). All from memory.
"""

from __future__ import annotations

import csv
import io
import re

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from fieldkit.jobs.models import Job, LossResult, ReferenceRecord
from fieldkit.reports import to_csv, to_html, to_markdown
from fieldkit.text.escape import csv_cell, html, markdown, markup, terminal

_CONTROLS = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")

# A window-title set, a screen clear, a cursor-up-and-erase, and a C1 CSI (xterm control
# sequences, from memory)
_TITLE = "\x1b]0;owned\x07"
_CLEAR = "\x1b[2J"
_UP = "\x1b[1A\x1b[2K"
_CSI = "\x9b31m"


@pytest.mark.parametrize("text", [_TITLE, _CLEAR, _UP, _CSI, "a\rb", "x\u202eevil", "\x00"])
def test_terminal_shows_control_characters_visibly(text: str) -> None:
    shown = terminal(text)
    assert not _CONTROLS.search(shown), repr(shown)
    assert shown  # nothing silently dropped


def test_terminal_keeps_printable_text_and_marks_what_it_replaced() -> None:
    assert terminal("Station Road spur − µW ✓") == "Station Road spur − µW ✓"
    assert terminal("a\x1bb") == "a\u241bb"  # U+241B SYMBOL FOR ESCAPE
    assert terminal("one\ntwo") == "one\u240atwo"  # one-line field: the break is shown
    assert terminal("one\ntwo", multiline=True) == "one\ntwo"
    assert terminal("over\rwrite", multiline=True) == "over\u240dwrite"


@given(st.text())
@example(_TITLE + _CLEAR + _UP + _CSI)
def test_no_control_character_survives_any_target(text: str) -> None:
    for out in (terminal(text), markdown(text), markup(text)):
        assert not _CONTROLS.search(out), repr(out)
    # HTML and a CSV cell keep a line break (HTML folds it; CSV quotes it), nothing else
    for out in (html(text), csv_cell(text)):
        assert not _CONTROLS.search(out.replace("\n", "")), repr(out)


@pytest.mark.parametrize(
    "text",
    ['=HYPERLINK("http://x","click")', "+1+1", "-2+3", "@SUM(A1:A2)", "\tx", "\rx", "-A1"],
)
def test_csv_cells_that_a_spreadsheet_would_run_are_kept_as_text(text: str) -> None:
    assert csv_cell(text).startswith("'")


@pytest.mark.parametrize("text", ["-2.50", "+3", "1e-3", "0.35", "Station Road", ""])
def test_csv_plain_numbers_and_words_are_unchanged(text: str) -> None:
    assert csv_cell(text) == text


@pytest.mark.parametrize(
    "text",
    [
        "[Pay here](https://pay.example/x)",
        "![](https://img.example/p.png?job=1)",
        "<img src=x onerror=alert(1)>",
        "<https://auto.example>",
        "[ref]: https://x.example",
    ],
)
def test_markdown_has_no_live_link_image_or_html(text: str) -> None:
    out = markdown(text)
    assert "<" not in out
    assert not re.search(r"(?<!\\)\[", out), out
    assert not re.search(r"(?<!\\)!(?!\\\[)", out.replace("\\!", "")), out


def test_html_escapes_markup_and_quotes() -> None:
    assert html('<b a="1">&\'') == "&lt;b a=&quot;1&quot;&gt;&amp;&#x27;"


@pytest.mark.parametrize(
    "text",
    ['<b a="1">&\'', "&amp; stays &amp;amp;", "a<<>>b", "'\"'\"", "Fibre 7 > 0.3 dB & <fail>", ""],
)
def test_html_is_the_standard_librarys_escape_of_the_shown_text(text: str) -> None:
    # Python's html.escape(s, quote=True) is the reference (fieldkit writes the same five
    # entities without loading the html package at start-up)
    import html as stdlib_html

    assert html(text) == stdlib_html.escape(terminal(text, multiline=True), quote=True)


def test_markup_escapes_rich_markup() -> None:
    from rich.text import Text

    shown = Text.from_markup(markup("[bold red]x[/] [link=https://e.example]y[/link]"))
    assert shown.plain == "[bold red]x[/] [link=https://e.example]y[/link]"


def _hostile_job() -> Job:
    job = Job(
        name="Spur" + _TITLE,
        customer="[Pay here](https://pay.example/x)",
        site="<script>alert(1)</script>" + _CLEAR,
    )
    job.add_note("![](https://img.example/p.png?job=1)" + _UP)
    link = job.add_link("=cmd|' /C calc'!A0", end_a="@SUM(1+1)", end_b="+1+1")
    ref = ReferenceRecord(id="-A1", wavelength_nm=1310, level_dbm=-7.2, method="one-cord")
    link.references.append(ref)
    link.results.append(
        LossResult(
            fibre=1,
            wavelength_nm=1310,
            loss_db=0.5,
            reference_id="-A1",
            flags=['=HYPERLINK("https://x.example","click")'],
            by="-2+3" + _CSI,
        )
    )
    return job


def test_csv_export_has_no_formula_cell_and_no_escape_code() -> None:
    text = to_csv(_hostile_job())
    assert not _CONTROLS.search(text.replace("\r\n", "")), "escape codes in the CSV"
    rows = list(csv.reader(io.StringIO(text)))
    for row in rows[1:]:
        for cell in row:
            formula = cell[:1] in ("=", "+", "-", "@", "\t", "\r")
            plain_number = re.fullmatch(r"[+-]?\d+(\.\d+)?", cell)
            assert not formula or plain_number, cell


def test_markdown_export_has_no_link_image_html_or_escape_code() -> None:
    text = to_markdown(_hostile_job())
    assert not _CONTROLS.search(text.replace("\n", ""))
    assert "](https://" not in text.replace("\\](https://", "")
    assert "<script" not in text and "<img" not in text
    assert "\\[Pay here\\]" in text
    assert "\\!\\[\\]" in text


def test_html_export_has_no_markup_from_user_text_and_no_escape_code() -> None:
    text = to_html(_hostile_job())
    assert not _CONTROLS.search(text.replace("\n", ""))
    assert "<script>" not in text
    assert "&lt;script&gt;" in text
