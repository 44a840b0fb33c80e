"""The Convert workspace's first frame holds the Value panel with its field focused; the other
panels are mounted right after it (issue 15, start-up). Here that mounting is held back, to see
what the first frame holds and that keys typed before the panels exist are neither lost nor
put into the wrong field."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.pilot import Pilot
from textual.widgets import Input, Static

from fieldkit.tui.app import FieldkitApp, make_app
from fieldkit.tui.screens.convert import ConvertScreen

SIZES = [(80, 24), (44, 22)]


@pytest.fixture
def held_back(monkeypatch: pytest.MonkeyPatch) -> list[ConvertScreen]:
    """Convert screens whose later panels wait until the test mounts them (``_mount_rest``)."""
    held: list[ConvertScreen] = []
    monkeypatch.setattr(ConvertScreen, "_mount_rest", lambda self: held.append(self))
    return held


def _value(app: FieldkitApp, field_id: str) -> str:
    return app.screen.query_one(f"#{field_id}", Input).value


@pytest.mark.parametrize("size", SIZES)
async def test_first_frame_is_the_value_panel_focused(
    tmp_path: Path, held_back: list[ConvertScreen], size: tuple[int, int]
) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, ConvertScreen) and held_back == [screen]
        assert app.focused is not None and app.focused.id == "value"
        assert not screen.workspace_complete
        assert [i.id for i in screen.query(Input)] == ["value"]
        value_top = screen.query_one("#value-panel").region.y
        # Typed before the rest is there: shown at once.
        await pilot.press(*"250", "space", "u", "W")
        await pilot.pause()
        # 250 µW = 10·log10(0.25) dBm = -6.0206 dBm (definition of dBm, ITU-R V.574)
        assert "−6.0206 dBm" in str(screen.query_one("#value-out", Static).render())
        await _mount(pilot, screen)
        assert screen.workspace_complete
        assert [i.id for i in screen.query(Input)] == [
            "value",
            "loss-level",
            "loss-db",
            "sum-a",
            "sum-b",
            "grid-in",
        ]
        assert screen.query_one("#value-panel").region.y == value_top  # nothing moved
        # What the later panels say before anything is typed in them.
        assert "level after the loss" in str(screen.query_one("#loss-out", Static).render())


async def _mount(pilot: Pilot[None], screen: ConvertScreen) -> None:
    """Mount the held-back panels as the screen does right after its first frame."""
    left, right = screen._later_panels()
    await screen.run_worker(screen._mount_panels(left, right)).wait()
    await pilot.pause()


async def test_keys_after_enter_wait_for_the_field_they_belong_to(
    tmp_path: Path, held_back: list[ConvertScreen]
) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, ConvertScreen) and not screen.workspace_complete
        # Typed ahead, faster than the panels mount: Enter moves on to Level, Tab to Loss.
        await pilot.press("-", "3", "enter", "-", "3", "tab", "4", "enter", "-", "1")
        await pilot.pause()
        assert _value(app, "value") == "-3"  # nothing after Enter landed here
        assert app.focused is not None and app.focused.id == "value"
        await _mount(pilot, screen)
        await app.workers.wait_for_complete()  # the held keys, handed on one by one
        await pilot.pause()
        assert _value(app, "value") == "-3"
        assert _value(app, "loss-level") == "-3"
        assert _value(app, "loss-db") == "4"
        assert _value(app, "sum-a") == "-1"
        assert app.focused is not None and app.focused.id == "sum-a"
        # -3 dBm after a 4 dB loss is -7 dBm (a loss subtracts from a level)
        assert "−7 dBm" in str(screen.query_one("#loss-out", Static).render())
        # Keys go straight to the fields again: nothing is held any more.
        await pilot.press("shift+tab", "backspace", "5")
        await pilot.pause()
        assert _value(app, "loss-db") == "5"
        assert screen.held_keys is None
