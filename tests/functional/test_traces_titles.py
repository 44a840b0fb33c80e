"""The Traces tables' titles read like the other workspaces' panel titles (review: dark blue
on the dark border, nearly unreadable) and say their method in words, not "(two-line)"."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import DataTable, Input

from fieldkit.traces.demo import demo_trace_files
from fieldkit.traces.session import LOSS_METHOD_WORDS
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.traces import TracesScreen


@pytest.mark.parametrize("size", [(80, 24), (44, 22)], ids=["80x24", "44x22"])
async def test_the_table_titles_are_readable_words(tmp_path: Path, size: tuple[int, int]) -> None:
    folder = tmp_path / "LIB-TH-01"
    folder.mkdir()
    for name, blob in demo_trace_files().items():
        (folder / name).write_bytes(blob)
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, TracesScreen)
        field = screen.query_one("#traces-a", Input)
        field.focus()
        field.value = str(folder)
        await pilot.press("enter")
        await pilot.pause()
        assert screen.session.folder is not None
        table = screen.query_one("#traces-table", DataTable)
        assert table.border_title == "Fibres (Enter opens one)"
        title_colour = table.styles.border_title_color
        await pilot.press("down", "enter")  # fibre 7, both directions
        await pilot.pause()
        assert table.border_title == "Events, both directions averaged"
        assert "two-line" not in str(table.border_title)
        await pilot.press("f3")  # Budget: its panels' title colour (app.tcss .panel)
        await pilot.pause()
        panel = app.screen.query_one("#settings-panel")
        assert title_colour == panel.styles.border_title_color


def test_every_loss_method_has_words() -> None:
    from typing import get_args

    from fieldkit.calc.otdr import LossMethod

    assert set(LOSS_METHOD_WORDS) == set(get_args(LossMethod))
