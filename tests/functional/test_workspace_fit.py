"""Labels, hints and footer keys read in full at 80x24 and 44x22 (a technician cannot scroll
a hint or a footer sideways)."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input

from fieldkit.tui.app import make_app

SIZES = [(80, 24), (44, 22)]


def _app(tmp_path: Path, mode: str):
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)


@pytest.mark.parametrize("size", SIZES)
async def test_jobs_find_hint_fits(tmp_path: Path, size) -> None:
    app = _app(tmp_path, "jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        find = app.screen.query_one("#jobs-filter", Input)
        assert find.placeholder.startswith("find:") and "date" in find.placeholder
        assert len(find.placeholder) <= find.content_region.width - 1  # the cursor cell
        assert "YYYY-MM-DD" in str(find.tooltip)


@pytest.mark.parametrize(
    ("mode", "field_id", "named"),
    [
        ("convert", "sum-a", "level A"),
        ("fault", "fault-distance", "distance"),
        ("convert", "value", "value"),
    ],
)
async def test_problem_names_the_field_as_labelled(tmp_path: Path, mode, field_id, named):
    # "level a" and "otdr dist" read as typing errors of our own; the label's case is kept.
    from textual.widgets import Static

    from fieldkit.tui.widgets.quantity_field import field_name

    assert field_name("Level B") == "level B" and field_name("OTDR dist") == "OTDR dist"
    assert field_name("Group index") == "group index" and field_name("λ or f") == "λ or f"
    app = _app(tmp_path, mode)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        app.screen.query_one(f"#{field_id}", Input).value = "3 parsec"
        await pilot.pause()
        error = app.screen.query_one(f"#{field_id}-field .field-error", Static)
        assert str(error.render()).startswith(f"{named}: unknown unit 'parsec'")


@pytest.mark.parametrize("size", SIZES)
@pytest.mark.parametrize("mode", ["convert", "budget", "fault", "jobs"])
async def test_every_visible_hint_fits_its_field(tmp_path: Path, size, mode) -> None:
    app = _app(tmp_path, mode)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        shown = [i for i in app.screen.query(Input) if i.content_region.width and i.placeholder]
        assert shown
        for field in shown:
            assert len(field.placeholder) <= field.content_region.width, field.id
