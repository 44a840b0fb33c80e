"""The convert workspace and the app shell, driven with Pilot at 80x24 and 44x22."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from textual.widgets import Input, Static

from fieldkit.tui.app import make_app
from fieldkit.tui.screens.convert import ConvertScreen
from fieldkit.tui.screens.help import HelpScreen
from fieldkit.tui.themes import HIGH_CONTRAST

SIZES = [(80, 24), (44, 22)]


def text_of(app, selector: str) -> str:
    return str(app.screen.query_one(selector, Static).render())


async def type_into(pilot, app, input_id: str, text: str) -> None:
    field = app.screen.query_one(f"#{input_id}", Input)
    field.focus()
    field.value = ""
    await pilot.press(*[c if c != " " else "space" for c in text])
    await pilot.pause()


@pytest.mark.parametrize("size", SIZES)
async def test_value_updates_as_you_type(tmp_path: Path, size: tuple[int, int]) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, ConvertScreen)
        assert app.focused is not None and app.focused.id == "value"
        await pilot.press("-", "3", ".", "5", "space", "d", "B", "m")
        await pilot.pause()
        out = text_of(app, "#value-out")
        # 10^(-0.35) mW = 446.684 µW (ITU-R V.574 definition of dBm)
        assert "446.684 µW" in out
        assert "−33.5 dBW" in out
        # one more keystroke changes the result at once
        await pilot.press("backspace", "backspace", "backspace", "u", "W")
        await pilot.pause()
        assert "−3.5 µW" not in text_of(app, "#value-out")
        field_error = app.screen.query_one("#value-field .field-error", Static)
        assert "logarithm" in str(field_error.render())  # -3.5 µW is a negative power


async def test_error_shown_beside_the_field_and_text_kept(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await type_into(pilot, app, "value", "2 MW")
        error = str(app.screen.query_one("#value-field .field-error", Static).render())
        assert "did you mean mW" in error
        assert app.screen.query_one("#value", Input).value == "2 MW"  # nothing typed is lost
        await type_into(pilot, app, "value", "-7,5 dBm")
        assert "−7.5 dBm" in text_of(app, "#value-out")
        assert not app.screen.query_one("#value-field .field-error", Static).display


async def test_level_loss_sum_and_grid_panels(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await type_into(pilot, app, "loss-level", "-3.2")
        await type_into(pilot, app, "loss-db", "4.5")
        assert "−7.7 dBm" in text_of(app, "#loss-out")  # -3.2 dBm - 4.5 dB
        await type_into(pilot, app, "sum-a", "-3")
        await type_into(pilot, app, "sum-b", "-3 dBm")
        assert "0.0103 dBm" in text_of(app, "#sum-out")  # 2 × 0.501 mW = 1.002 mW
        await type_into(pilot, app, "grid-in", "1550.12")
        out = text_of(app, "#grid-out")
        assert "n=+3 193.400 THz" in out  # G.694.1: 193.1 THz + 3 × 100 GHz
        assert "1551 nm" in out  # G.694.2 CWDM channel


async def test_mouse_click_focuses_a_field(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        await pilot.click("#loss-level")
        await pilot.pause()
        assert app.focused is not None and app.focused.id == "loss-level"


async def test_help_has_the_safety_cautions(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("f1")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        from fieldkit.tui.screens.help import help_markdown

        text = help_markdown()
        for phrase in (
            "invisible",
            "Never look into a fibre end",
            "Class 2",
            "shard",
            "local codes",
        ):
            assert phrase in text
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.screen, ConvertScreen)


async def test_sunlight_theme_is_remembered(tmp_path: Path) -> None:
    config = tmp_path / "c"
    app = make_app(data_dir=tmp_path / "d", config_dir=config)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+t")
        await pilot.pause()
        assert app.theme == HIGH_CONTRAST
    assert json.loads((config / "settings.json").read_text())["theme"] == HIGH_CONTRAST
    again = make_app(data_dir=tmp_path / "d", config_dir=config)
    async with again.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert again.theme == HIGH_CONTRAST
        await pilot.press("ctrl+t")
        await pilot.pause()
        assert again.theme != HIGH_CONTRAST


async def test_workspaces_are_in_the_command_palette(tmp_path: Path) -> None:
    from fieldkit.tui.workspaces import WORKSPACES

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        titles = [command.title for command in app.get_system_commands(app.screen)]
        for workspace in WORKSPACES:
            assert f"Open {workspace.title}" in titles
        keys = {binding.key for binding in app.BINDINGS if hasattr(binding, "key")}
        assert {workspace.key for workspace in WORKSPACES} <= keys


@pytest.mark.parametrize("size", SIZES)
async def test_workspace_bar_shows_keys_and_takes_clicks(tmp_path: Path, size) -> None:
    from fieldkit.tui.widgets.workspace_bar import TABS, WorkspaceBar

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        bar = app.screen.query_one(WorkspaceBar)
        line = str(bar.render())
        assert "F2 Convert" in line
        # Every entry shown is a key and its word (issue 14: bare "F2 F3 F4" at 44 columns);
        # at 80 columns all of them, at 44 a window with "›" where more lie beyond.
        shown = [tab for tab in TABS if f"{tab.key_label} {tab.title}" in line]
        bare = [tab for tab in TABS if tab.key_label in line and tab not in shown]
        assert not bare
        assert len(shown) == len(TABS) if size[0] >= 80 else len(shown) >= 4 and "›" in line
        assert len(line) <= size[0]
        current = bar.tab_style(TABS[0])
        assert all(bar.tab_style(tab) != current for tab in TABS[1:])  # only Convert is lit
        await pilot.click(WorkspaceBar, offset=(line.index("F4") + 1, 0))
        await pilot.pause()
        assert app.current_mode == "meter"
        line = str(app.screen.query_one(WorkspaceBar).render())
        while "F1" not in line:  # the marker goes on to the hidden workspaces
            await pilot.click(WorkspaceBar, offset=(line.index("›"), 0))
            await pilot.pause()
            line = str(app.screen.query_one(WorkspaceBar).render())
        await pilot.click(WorkspaceBar, offset=(line.rindex("F1") + 1, 0))
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)


async def test_enter_moves_to_the_next_field(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("-", "3", "enter")
        await pilot.pause()
        assert app.focused is not None and app.focused.id == "loss-level"
        await pilot.press("-", "3", "enter", "4", "enter")
        await pilot.pause()
        assert app.focused.id == "sum-a"
        assert "−7 dBm" in text_of(app, "#loss-out")


async def test_an_error_quoting_markup_characters_is_shown_as_text(tmp_path: Path) -> None:
    from fieldkit.tui.widgets.quantity_field import QuantityField

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        field = app.screen.query_one("#value-field", QuantityField)
        field.show_error("value: '[/b]' is not a unit [red]")
        await pilot.pause()
        assert "[/b]" in str(app.screen.query_one("#value-field .field-error", Static).render())


@pytest.mark.parametrize("size", SIZES)
async def test_workspace_bar_entries_never_run_together(size) -> None:
    # The lit entry is padded by a space each side inside its highlight; a plain space before
    # it keeps that highlight off the entry before ("F5 Fault" then "F6 Jobs" read as one).
    # The bar alone, in an app that names each workspace as current in turn: what it draws
    # depends only on the current workspace and the width (building every workspace to get
    # there took two seconds a size).
    from textual.app import App, ComposeResult

    from fieldkit.tui.widgets.workspace_bar import TABS, WorkspaceBar

    class BarOnly(App[None]):
        shown = "convert"

        @property
        def current_mode(self) -> str:  # type: ignore[override]
            return self.shown

        def compose(self) -> ComposeResult:
            yield WorkspaceBar()

    app = BarOnly()
    async with app.run_test(size=size) as pilot:
        for tab in TABS[:-1]:
            app.shown = tab.mode
            bar = app.screen.query_one(WorkspaceBar)
            bar.refresh()
            await pilot.pause()
            line = bar.render()
            plain = line.plain
            assert len(plain) <= size[0]
            for shown in TABS:
                words = WorkspaceBar.tab_text(shown)
                if words in plain:
                    at = plain.index(words)
                    assert at > 0 and plain[at - 1] == " ", (tab.mode, plain)
            at = plain.index(WorkspaceBar.tab_text(tab))
            (lit,) = [s for s in line.spans if s.start <= at < s.end]
            assert lit.start == at - 1 and plain[lit.end - 1] == " "  # padded inside
            assert lit.start == 0 or plain[lit.start - 1] == " ", (tab.mode, plain)
            assert not [s for s in line.spans if s.start < lit.start < s.end]
