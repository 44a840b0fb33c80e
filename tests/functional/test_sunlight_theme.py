"""The high-contrast theme: every label, hint and the current workspace stay readable."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input, Label

from fieldkit.tui.app import make_app
from fieldkit.tui.themes import HIGH_CONTRAST
from fieldkit.tui.widgets.quantity_field import QuantityField
from fieldkit.tui.widgets.workspace_bar import TABS, WorkspaceBar

SIZES = [(80, 24), (44, 22)]
MODES = ["convert", "budget", "fault", "jobs"]


def _luminance(rgb: tuple[int, int, int]) -> float:
    # WCAG 2.1, relative luminance: sRGB channels linearised, weights 0.2126, 0.7152, 0.0722
    def lin(c: int) -> float:
        s = c / 255
        return s / 12.92 if s <= 0.04045 else ((s + 0.055) / 1.055) ** 2.4

    r, g, b = (lin(c) for c in rgb)
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast(a: tuple[int, int, int], b: tuple[int, int, int]) -> float:
    # WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05)
    hi, lo = sorted((_luminance(a), _luminance(b)), reverse=True)
    return (hi + 0.05) / (lo + 0.05)


def test_contrast_formula_matches_wcag_examples() -> None:
    # WCAG 2.1: black on white is 21:1; #767676 on white is the 4.5:1 AA threshold (from memory)
    assert contrast((0, 0, 0), (255, 255, 255)) == pytest.approx(21.0, abs=0.01)
    assert contrast((0x76, 0x76, 0x76), (255, 255, 255)) == pytest.approx(4.54, abs=0.02)


def _colours(widget) -> tuple[tuple[int, int, int], tuple[int, int, int]]:
    style = widget.rich_style
    return tuple(style.color.triplet), tuple(style.bgcolor.triplet)


@pytest.mark.parametrize("size", SIZES)
@pytest.mark.parametrize("mode", MODES)
async def test_sunlight_keeps_the_current_workspace_and_labels_readable(
    tmp_path: Path, size, mode
) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+t")
        await pilot.pause()
        assert app.theme == HIGH_CONTRAST
        bar = app.screen.query_one(WorkspaceBar)
        current = next(tab for tab in TABS if tab.mode == mode)
        assert bar.tab_style(current) != bar.tab_style(TABS[-1])  # highlighted, unlike Help
        # WCAG 2.1 SC 1.4.3 (AA): at least 4.5:1 for text; the current tab was black on black
        for tab in TABS:
            style = bar.tab_style(tab)
            assert contrast(tuple(style.color.triplet), tuple(style.bgcolor.triplet)) >= 4.5, tab
        labels = [w for w in app.screen.query(Label) if w.region.height]
        # A quantity field draws its own label (no Label widget): its label style counts too.
        fields = [w for w in app.screen.query(QuantityField) if w.region.height]
        assert labels or fields or mode == "jobs"  # the jobs workspace has no field labels
        for label in labels:
            assert contrast(*_colours(label)) >= 4.5, str(label.render())
        for field in fields:
            style = field.rich_style + field.get_component_rich_style("quantity-field--label")
            colours = tuple(style.color.triplet), tuple(style.bgcolor.triplet)
            assert contrast(*colours) >= 4.5, field.label


async def test_sunlight_placeholder_is_readable_and_lighter_than_typed_text(tmp_path: Path):
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+t")
        await pilot.pause()
        field = app.screen.query(Input).first()
        hint = field.get_component_rich_style("input--placeholder")
        bg = tuple(field.rich_style.bgcolor.triplet)
        hint_rgb = tuple(hint.color.triplet)
        typed_rgb = tuple(field.rich_style.color.triplet)
        assert contrast(hint_rgb, bg) >= 4.5  # WCAG 2.1 SC 1.4.3 (AA)
        assert contrast(typed_rgb, bg) > contrast(hint_rgb, bg)


async def test_sunlight_colour_names_in_job_text_stay_readable(tmp_path: Path) -> None:
    # The jobs and end-of-day views mark failures "red", open jobs and doubtful results
    # "yellow", passes "green"; under the sunlight theme those render at least 4.5:1 on the
    # white background (WCAG 2.1 SC 1.4.3), and a failure does not look like a doubt.
    from rich.color import Color as RichColor
    from rich.style import Style
    from textual.filter import ANSIToTruecolor

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+t")
        await pilot.pause()
        assert app.theme == HIGH_CONTRAST
        filters = [f for f in app._filters if isinstance(f, ANSIToTruecolor)]
        assert filters
        white = RichColor.from_rgb(255, 255, 255)
        shown = {}
        for name in ("red", "green", "yellow", "bright_red", "bright_yellow"):
            style = filters[0].truecolor_style(Style(color=name), white)
            shown[name] = tuple(style.color.triplet)
            assert contrast(shown[name], (255, 255, 255)) >= 4.5, name
        # red and amber differ by more than a shade: at least 50 apart in the red or green channel
        red, amber = shown["red"], shown["yellow"]
        assert max(abs(red[0] - amber[0]), abs(red[1] - amber[1])) >= 50


@pytest.mark.parametrize("size", SIZES)
@pytest.mark.parametrize(("mode", "button_id"), [("budget", "remove"), ("jobs", "jobs-status")])
async def test_sunlight_buttons_look_like_buttons(tmp_path: Path, size, mode, button_id) -> None:
    # Compact buttons sat on the white background with no block of their own, so "Remove" or
    # "All jobs" read as plain bold words; now they keep a grey block and readable text.
    from textual.widgets import Button

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+t")
        await pilot.pause()
        button = app.screen.query_one(f"#{button_id}", Button)
        fg, bg = _colours(button)
        screen_bg = tuple(app.screen.rich_style.bgcolor.triplet)
        assert bg != screen_bg
        assert contrast(bg, screen_bg) >= 1.2  # a visible block, not a line drawing
        assert contrast(fg, bg) >= 4.5  # WCAG 2.1 SC 1.4.3 (AA)


@pytest.mark.parametrize("mode", ["convert", "jobs"])
async def test_a_saved_sunlight_theme_is_on_from_the_first_frame(tmp_path: Path, mode) -> None:
    # The theme is read before the first workspace is composed: its first frame is already in
    # the sunlight colours (no dark frame first, no restyle of every widget after it).
    from textual.screen import Screen

    from fieldkit import settings_file

    config = tmp_path / "config"
    settings_file.save(config, theme=HIGH_CONTRAST)
    app = make_app(data_dir=tmp_path / "data", config_dir=config, start_mode=mode)
    seen: list[str] = []
    painted = Screen._compositor_refresh

    def compositor_refresh(screen: Screen) -> None:
        seen.append(screen.app.theme)
        painted(screen)

    Screen._compositor_refresh = compositor_refresh  # type: ignore[method-assign]
    try:
        async with app.run_test(size=(80, 24)) as pilot:
            await pilot.pause()
            assert app.theme == HIGH_CONTRAST
            background = app.screen.styles.background.rgb
    finally:
        Screen._compositor_refresh = painted  # type: ignore[method-assign]
    assert seen and set(seen) == {HIGH_CONTRAST}
    assert _luminance(background) > 0.9  # white paper, as the theme sets
