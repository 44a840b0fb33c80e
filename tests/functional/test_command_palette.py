"""The command palette (Ctrl+P) lists the workspace's own actions by name, from the key table,
and none of Textual's developer entries (review A8)."""

from __future__ import annotations

from pathlib import Path

from textual.command import CommandList, CommandPalette

from fieldkit.tui import keys
from fieldkit.tui.app import make_app
from fieldkit.tui.workspaces import WORKSPACES

#: Textual's own palette entries (textual/app.py App.get_system_commands, Textual 8.2).
TEXTUAL_ENTRIES = {"Theme", "Quit", "Keys", "Maximize", "Minimize", "Screenshot"}


def _app(tmp_path: Path, mode: str):
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)


async def test_each_workspace_lists_its_own_actions_and_no_developer_entries(
    tmp_path: Path,
) -> None:
    app = _app(tmp_path, WORKSPACES[0].mode)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        titles_of: dict[str, list[str]] = {}
        for ws in WORKSPACES:
            await pilot.press(ws.key)
            await pilot.pause()
            screen = app.screen
            commands = list(app.get_system_commands(screen))
            titles = [c.title for c in commands]
            titles_of[ws.mode] = titles
            assert not TEXTUAL_ENTRIES & set(titles), ws.mode
            assert keys.SUNLIGHT_THEME in titles and "Help and safety" in titles
            assert len(titles) == len(set(titles)), ws.mode  # one name, one command
            for command in keys.commands(ws.mode):
                # each action named in the table is one the screen has
                name = command.action.split("(")[0]
                assert callable(getattr(screen, f"action_{name}", None)), (ws.mode, name)
        assert "Save the readings onto a job's link" in titles_of["meter"]
        assert "Recheck the reference" in titles_of["meter"]
        assert "Export the job" in titles_of["jobs"]
        assert "Fill a closure's splice log" in titles_of["traces"]
        # scoped: the budget's own commands are not offered in Jobs
        assert "New budget" in titles_of["budget"] and "New budget" not in titles_of["jobs"]


async def test_typing_save_in_the_palette_finds_and_runs_the_meters_save(tmp_path: Path) -> None:
    from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

    app = _app(tmp_path, "meter")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+p")
        await pilot.pause()
        assert isinstance(app.screen, CommandPalette)
        await pilot.press(*"save the readings")
        listed: list[str] = []
        for _ in range(50):  # the palette searches in a worker
            await pilot.pause(0.05)
            options = app.screen.query_one(CommandList).options
            listed = [str(o.prompt) for o in options]
            if any("Save the readings" in t for t in listed):
                break
        assert any("Save the readings onto a job's link" in t for t in listed), listed
        await pilot.press("enter")
        for _ in range(50):
            await pilot.pause(0.05)
            if isinstance(app.screen, JobLinkPicker):
                break
        assert isinstance(app.screen, JobLinkPicker)
