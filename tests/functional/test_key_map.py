"""One key map: every workspace's footer comes from the key table, shows Quit first and fits
80x24 and 44x22; a key does the same kind of thing in every workspace."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Footer, Input, OptionList
from textual.widgets._footer import FooterKey

from fieldkit.tui import keys
from fieldkit.tui.app import make_app
from fieldkit.tui.workspaces import WORKSPACES

SIZES = [(80, 24), (44, 22)]


def _app(tmp_path: Path, mode: str):
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)


@pytest.mark.parametrize("size", SIZES)
async def test_every_footer_shows_quit_first_and_nothing_cut(tmp_path: Path, size) -> None:
    app = _app(tmp_path, WORKSPACES[0].mode)
    async with app.run_test(size=size) as pilot:
        for ws in WORKSPACES:
            await pilot.press(ws.key)
            shown: list[FooterKey] = []
            for _ in range(50):  # the footer recomposes after the bindings settle (a loaded CI)
                await pilot.pause()
                footer = app.screen.query_one(Footer)
                keys_now = footer.query(FooterKey)
                shown = [k for k in keys_now if not k.has_class("-command-palette")]
                if app.current_mode == ws.mode and shown and all(k.region.width for k in shown):
                    break
            assert app.current_mode == ws.mode
            assert shown and shown[0].description == "Quit", ws.mode
            assert shown[0].key == "ctrl+q"
            right = size[0]
            palettes = footer.query(".-command-palette")
            if palettes:
                right = palettes.first(FooterKey).region.x
            for key in shown:  # each key ends before the palette key starts: nothing cut off
                assert key.region.right <= right, (ws.mode, key.description)
            # The footer shows the table's shown uses of this workspace, in its order: all of
            # them at 80 columns; at 44 those that fit, the last ones left out (Help lists all).
            wanted = ["Quit"] + [
                u.label or keys.key_of(u.name).label
                for u in keys.uses(ws.mode)
                if u.show
                and u.action is not None
                # a key the screen turns off for now (Esc back to a folder, with none open)
                and app.screen.check_action(u.action.split("(")[0], ()) is not False
            ]
            got = [k.description for k in shown]
            if size[0] >= 80:
                assert got == wanted, ws.mode
            else:
                assert got == [w for w in wanted if w in got], ws.mode
                assert len(got) >= min(3, len(wanted)), ws.mode


async def test_ctrl_keys_act_while_typing(tmp_path: Path) -> None:
    # Ctrl+A is "home" to a bare text field; in our map it adds, even with the cursor in a field.
    app = _app(tmp_path, "budget")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert isinstance(app.screen.focused, Input)
        before = len(app.screen.model.items)
        await pilot.press("ctrl+a", "enter")  # Ctrl+A opens the kind chooser; Enter adds
        await pilot.pause()
        assert len(app.screen.model.items) == before + 1
        await pilot.press("ctrl+x")
        await pilot.pause()
        assert len(app.screen.model.items) == before


async def test_ctrl_o_opens_in_every_workspace_that_has_it(tmp_path: Path) -> None:
    # Ctrl+O means "choose what to work on": a picker in budget and meter, the list in jobs;
    # before the key map it marked a job done in Jobs.
    from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

    app = _app(tmp_path, "budget")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        for mode in ("budget", "meter"):
            await pilot.press(keys.place_key(mode))
            await pilot.pause()
            await pilot.press("ctrl+o")
            await pilot.pause()
            assert isinstance(app.screen, JobLinkPicker), mode
            await pilot.press("escape")
            await pilot.pause()
        await pilot.press(keys.place_key("jobs"))
        await pilot.pause()
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen.focused, OptionList)
        assert app.screen.focused.id == "jobs-list"


async def test_quit_works_from_a_dialog(tmp_path: Path) -> None:
    app = _app(tmp_path, "meter")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+o")
        await pilot.pause()
        await pilot.press("ctrl+q")
        await pilot.pause()
    assert app.return_code == 0


async def test_ctrl_s_saves_onto_a_link_in_every_workspace_that_saves(tmp_path: Path) -> None:
    # Review A6: the meter saved on Ctrl+O only and Traces filled the splice log on Ctrl+A
    # (which means "add"). Ctrl+S now starts the save onto a job's link in each of them.
    from fieldkit.tui.widgets.choice_dialog import ChoiceDialog
    from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

    app = _app(tmp_path, "meter")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)
        await pilot.press("escape")
        await pilot.pause()
        await pilot.press(keys.place_key("traces"))
        await pilot.pause()
        before = app.screen
        await pilot.press("ctrl+a")  # no "add" in Traces: nothing happens
        await pilot.pause()
        assert app.screen is before
        await pilot.press("ctrl+s")  # the traces, or their losses into a splice log
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        shown = " ".join(str(o.prompt) for o in app.screen.query_one(OptionList).options)
        assert "traces" in shown and "splice log" in shown
    saves = [m for m in keys.USES if any(u.name == "save" for u in keys.uses(m))]
    assert {"budget", "meter", "fault", "splices", "traces"} <= set(saves)
    # Each use of Ctrl+A adds something where you are; none writes onto a job's link.
    for mode in keys.USES:
        for use in keys.uses(mode):
            if use.name == "add":
                assert "splice log" not in use.does and "job's link" not in use.does, mode


@pytest.mark.parametrize("size", SIZES)
async def test_keys_show_in_one_style_and_help_has_its_own_footer(tmp_path: Path, size) -> None:
    # Review C34: footers showed "^q" while buttons and Help said "^S" / "Ctrl+S"; with Help
    # open the footer still showed the workspace's keys. The key table's style (keys.display)
    # is the one shown everywhere, and Help's footer is Esc to close (and Quit).
    app = _app(tmp_path, "jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        shown = list(app.screen.query_one(Footer).query(FooterKey))
        assert shown
        for key in shown:
            assert key.key_display == keys.display(key.key), key.key
        assert shown[0].key_display == "^Q"  # not Textual's "^q"
        buttons = [str(b.label) for b in app.screen.query("Button")]
        assert any(keys.display("done") in label for label in buttons), buttons
        await pilot.press("f1")
        await pilot.pause()
        footer_keys = list(app.screen.query_one(Footer).query(FooterKey))
        words = [k.description for k in footer_keys if not k.has_class("-command-palette")]
        assert "Close" in words and "Find" not in words, words
        close = next(k for k in footer_keys if k.description == "Close")
        assert close.key_display == keys.display("escape") == "Esc"
