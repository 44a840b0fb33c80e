"""Hints are examples, never values, in every workspace (issue 14 item 6, review A4).

A hint that reads like a value ("-3.2 dBm" in an empty Level field) makes an empty screen look
filled in. Every visible hint starts with "e.g." or says what an empty field means, and every
hint is drawn dim and italic, so it cannot be taken for a typed value.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input

from fieldkit.tui.app import make_app

#: Hints that are not examples but say what the field takes or what empty means.
_WORDS_NOT_VALUES = ("find:", "reading, dBm", "other end", "trace file", "or a new")


@pytest.mark.parametrize("mode", ["convert", "splices", "traces", "meter", "budget", "fault"])
async def test_every_hint_is_an_example_drawn_dim_and_italic(tmp_path: Path, mode: str) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        hinted = [i for i in app.screen.query(Input) if i.placeholder]
        assert hinted, f"{mode} shows no hints"
        for field in hinted:
            hint = field.placeholder
            digits = any(ch.isdigit() for ch in hint)
            assert not digits or "e.g." in hint or hint.startswith(_WORDS_NOT_VALUES), (
                mode,
                field.id,
                hint,
            )
            style = field.get_component_rich_style("input--placeholder")
            assert style.italic and style.dim, (mode, field.id)
