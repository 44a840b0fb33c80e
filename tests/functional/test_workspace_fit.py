"""Labels, hints and footer keys read in full at 80x24 and 44x22 (a technician cannot scroll
a hint or a footer sideways)."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Footer, Input
from textual.widgets._footer import FooterKey

from fieldkit.tui.app import make_app

SIZES = [(80, 24), (44, 22)]


def _app(tmp_path: Path, mode: str):
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)


@pytest.mark.parametrize("size", SIZES)
async def test_fault_footer_keys_fit(tmp_path: Path, size) -> None:
    app = _app(tmp_path, "fault")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        footer = app.screen.query_one(Footer)
        keys = [k for k in footer.query(FooterKey) if not k.has_class("-command-palette")]
        palette = footer.query_one(".-command-palette", FooterKey)
        descriptions = [k.description for k in keys]
        assert "Save" in descriptions and "Sunlight" in descriptions
        for key in keys:  # each key ends before the palette key starts: nothing cut off
            assert key.region.right <= palette.region.x, key.description


@pytest.mark.parametrize("size", SIZES)
async def test_jobs_find_hint_fits(tmp_path: Path, size) -> None:
    app = _app(tmp_path, "jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        find = app.screen.query_one("#jobs-filter", Input)
        assert find.placeholder.startswith("find:") and "date" in find.placeholder
        assert len(find.placeholder) <= find.content_region.width - 1  # the cursor cell
        assert "YYYY-MM-DD" in str(find.tooltip)
