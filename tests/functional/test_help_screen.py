"""The help page reads in full on a phone terminal (44x22) and at 80x24."""

from __future__ import annotations

from pathlib import Path

import pytest
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
    assert "- **Ctrl+Q Quit**:" in text and "- **Ctrl+S Save**: save onto a job's link" in text
    budget = text.split("## Budget (F3)")[1].split("## ")[0]
    assert "- **Ctrl+A**: choose the kind of item to add" in budget
    assert "- **Ctrl+R**" not in budget  # Ctrl+R is recheck/reload; the budget has none
    meter = text.split("## Meter (F4)")[1].split("## ")[0]
    assert "- **Ctrl+R**: recheck" in meter


@pytest.mark.parametrize("size", SIZES)
async def test_every_key_name_shows_whole(tmp_path: Path, size) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        body = app.screen.query_one("#help-body", VerticalScroll)
        if size[0] < 72:
            assert body.region.width == size[0]  # the whole width on a phone terminal
        shots = [app.export_screenshot()]
        while True:  # page through with the keyboard, to the end
            before = body.scroll_y
            await pilot.press("pagedown")
            await pilot.pause()
            if body.scroll_y == before:
                break
            shots.append(app.export_screenshot())
        assert len(shots) > 1 and body.scroll_y > 0
        seen = "".join(shots)
        for key in ("Ctrl+P", "Ctrl+T", "Ctrl+Q", "Ctrl+S", "Ctrl+X", "Ctrl+R"):
            assert key in seen, key
        assert "Ctrl…" not in seen
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, HelpScreen)
