"""The help page reads in full on a phone terminal (44x22) and at 80x24."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.containers import VerticalScroll

from fieldkit.tui.app import make_app
from fieldkit.tui.screens.help import GENERAL_KEYS, HelpScreen, help_markdown

SIZES = [(80, 24), (44, 22)]


def test_keys_are_a_list_not_a_table() -> None:
    # A Markdown table cuts its key column to "Ctrl…" at 44 columns; a list wraps instead.
    text = help_markdown()
    assert "|" not in text
    for key, _ in GENERAL_KEYS:
        assert f"- **{key}**:" in text
    assert "- **F2 Convert**:" in text and "- **F6 Jobs**:" in text


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
        await pilot.press("end")  # the keyboard scrolls the page
        await pilot.pause()
        assert body.scroll_y > 0
        shot = app.export_screenshot()
        for key in ("Ctrl+P", "Ctrl+T", "Ctrl+Q"):
            assert key in shot, key
        assert "Ctrl…" not in shot
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, HelpScreen)
