"""``fieldkit convert`` and the Convert workspace give the same figures (issue 14: the CLI printed
8 significant figures where the workspace showed 6). Both print fieldkit.text.convert's lines;
this checks what each actually shows, side by side, so neither can drift on its own."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input, Static

from fieldkit import cli
from fieldkit.tui.app import make_app

QUANTITIES = ["-7.5 dBm", "250 µW", "3 dB", "0.35 dB/km", "1550 nm", "193.1 THz", "12 kft"]


def _cli(capsys: pytest.CaptureFixture[str], *args: str) -> list[str]:
    assert cli.main(["convert", *args]) == 0
    return [line.strip() for line in capsys.readouterr().out.splitlines()]


async def _workspace(tmp_path: Path, field: str, text: str, out: str) -> list[str]:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.screen.query_one(f"#{field}", Input).value = text
        await pilot.pause()
        shown = str(app.screen.query_one(f"#{out}", Static).render())
    return [line.strip() for line in shown.splitlines()]


@pytest.mark.parametrize("quantity", QUANTITIES)
async def test_every_unit_the_same_figures(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], quantity: str
) -> None:
    printed = _cli(capsys, quantity)
    shown = await _workspace(tmp_path, "value", quantity, "value-out")
    assert printed == shown
    assert len(printed) >= 2


async def test_to_one_unit_is_the_workspace_row(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    shown = await _workspace(tmp_path, "value", "-3.5 dBm", "value-out")
    for unit in ("uW", "mW", "nW", "dBW"):
        (line,) = _cli(capsys, "-3.5 dBm", "--to", unit)
        assert line in shown, (line, shown)
    # 10^(-0.35) mW = 446.6836 µW (by hand): six figures, not eight
    assert "446.684 µW" in shown


@pytest.mark.parametrize("quantity", ["1550.12 nm", "193.1 THz", "1610 nm"])
async def test_grid_the_same_rows(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], quantity: str
) -> None:
    printed = _cli(capsys, quantity, "--grid")
    shown = await _workspace(tmp_path, "grid-in", quantity, "grid-out")
    assert printed[: len(shown)] == shown
    assert printed[len(shown) :] and "G.694.1" in printed[-1]  # the CLI names its sources
