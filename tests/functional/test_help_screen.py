"""The help page reads in full on a phone terminal (44x22) and at 80x24."""

from __future__ import annotations

import io
from pathlib import Path

import pytest
from rich.console import Console
from textual.containers import VerticalScroll

from fieldkit.tui import keys
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.help import HelpScreen, help_markdown

SIZES = [(80, 24), (44, 22)]


def test_keys_are_a_list_not_a_table() -> None:
    # A Markdown table cuts its key column to "Ctrl…" at 44 columns; a list wraps instead.
    text = help_markdown()
    assert "|" not in text
    for _, key, _what in keys.GENERAL:
        assert f"- **{keys.display(key)}**:" in text
    assert "- **F2 Convert**:" in text and "- **F6 Jobs**:" in text


def test_help_lists_the_key_table_with_each_workspace_use() -> None:
    # The same source as the footers: each key a workspace uses is listed under it, and the
    # common meaning of each used key once (our mapping, explained).
    text = help_markdown()
    assert "Function keys go to a place" in text
    assert "- **^Q Quit**:" in text and "- **^S Save**: save onto a job's link" in text
    assert "^ is the Ctrl key" in text
    budget = text.split("## Budget (F3)")[1].split("## ")[0]
    assert "- **^A**: choose the kind of item to add" in budget
    assert "- **^R**" not in budget  # Ctrl+R is recheck/reload; the budget has none
    meter = text.split("## Meter (F4)")[1].split("## ")[0]
    assert "- **^R**: recheck" in meter


@pytest.mark.parametrize("size", SIZES)
async def test_paging_through_help_shows_every_key_whole_and_no_stray_blocks(
    tmp_path: Path, size
) -> None:
    """One page-down at a time to the end (the keyboard way): every key name is whole on
    some page, and on every page the scrollbar thumb is whole cells. Review C35: the thumb's
    ends were drawn with partial-block glyphs (Textual's ScrollBarRender.VERTICAL_BARS), stray
    blocks down Help's right edge at 80x24; it is one column wide now, its colour, no glyphs."""
    partial_blocks = "▁▂▃▄▅▆▇"
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        body = app.screen.query_one("#help-body", VerticalScroll)
        if size[0] < 72:
            assert body.region.width == size[0]  # the whole width on a phone terminal
        assert body.show_vertical_scrollbar and body.scrollbar_size_vertical == 1
        bar = body.vertical_scrollbar
        console = Console(width=1, height=bar.size.height, file=io.StringIO(), color_system=None)
        shots = []
        while True:
            shots.append(app.export_screenshot())
            options = console.options.update_dimensions(1, bar.size.height)
            drawn = "".join(seg.text for seg in console.render(bar.render(), options))
            assert drawn.strip() == "", body.scroll_y  # the thumb is its colour, no glyphs
            assert not any(g in drawn for g in partial_blocks), body.scroll_y
            before = body.scroll_y
            await pilot.press("pagedown")
            await pilot.pause()
            if body.scroll_y == before:
                break
        assert len(shots) > 1 and body.scroll_y > 0
        seen = "".join(shots)
        for key in ("^P", "^T", "^Q", "^S", "^X", "^R"):
            assert key in seen, key
        assert "Ctrl…" not in seen and "^…" not in seen
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, HelpScreen)


def test_help_says_which_workspaces_use_each_key() -> None:
    # Review A6: Help said every Ctrl key means the same everywhere while Meter saved on
    # Ctrl+O and Traces used Ctrl+A for the splice log. Now each key names where it is used.
    text = help_markdown()
    save = keys.display("save")
    assert (
        f"- **{save} Save**: save onto a job's link; used in "
        "Budget, Meter, Fault, Splices and Traces" in text
    )
    add = next(
        line for line in text.splitlines() if line.startswith(f"- **{keys.display('add')} Add**")
    )
    assert "Traces" not in add
    # What a text field gives up, read against Textual's own Input bindings (home,ctrl+a ...).
    from textual.widgets import Input

    field_keys = {k for b in Input.BINDINGS for k in b.key.split(",")}  # type: ignore[union-attr]
    assert {"home", "ctrl+a", "end", "ctrl+e", "delete", "ctrl+d"} <= field_keys
    assert "a text field there takes Home, End and Delete instead" in text
