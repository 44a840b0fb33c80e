"""Convert workspace wording a technician reads at a glance, at 80x24 and 44x22."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input, Static

from fieldkit.tui.app import make_app

SIZES = [(80, 24), (44, 22)]


async def _type(pilot, app, field_id: str, text: str) -> None:
    app.screen.query_one(f"#{field_id}", Input).value = text
    await pilot.pause()


def _out(app, out_id: str) -> Static:
    return app.screen.query_one(f"#{out_id}", Static)


@pytest.mark.parametrize("size", SIZES)
async def test_level_and_loss_rows_say_what_they_are(tmp_path: Path, size) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await _type(pilot, app, "loss-level", "-3.2 dBm")
        await _type(pilot, app, "loss-db", "4.5 dB")
        text = str(_out(app, "loss-out").render())
        # -3.2 dBm received after a 4.5 dB loss: -3.2 + 4.5 = 1.3 dBm went in
        assert "before loss  1.3 dBm" in text
        assert "after gain" not in text
        # 10^(-4.5/10) = 0.354813: 35.48 % of the power gets through (4 significant figures)
        assert "35.48 % of the power" in text


@pytest.mark.parametrize("size", SIZES)
async def test_two_levels_sum_fits_one_line(tmp_path: Path, size) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await _type(pilot, app, "sum-a", "-3 dBm")
        await _type(pilot, app, "sum-b", "-6 dBm")
        out = _out(app, "sum-out")
        # 0.501187 mW + 0.251189 mW = 0.752376 mW = -1.23565 dBm
        assert "A + B  −1.23565 dBm = 0.7524 mW" in str(out.render())
        assert out.region.height == 2  # two rows, neither wrapped


@pytest.mark.parametrize("size", SIZES)
async def test_dwdm_grids_named_by_spacing(tmp_path: Path, size) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await _type(pilot, app, "grid-in", "1550.12 nm")
        text = str(_out(app, "grid-out").render())
        # ITU-T G.694.1: f = 193.1 THz + n × 0.1 THz (100 GHz) or n × 0.05 THz (50 GHz);
        # 1550.12 nm = 193.3995 THz -> n = +3 at 100 GHz, n = +6 at 50 GHz, both 193.400 THz
        assert "100 GHz  n=+3 193.400 THz" in text
        assert " 50 GHz  n=+6 193.400 THz" in text
        assert "DWDM 100" not in text
