"""The shipped cable constructions (presets/cables.toml) that give the helix for fault location."""

from __future__ import annotations

import pytest

from fieldkit.calc.locate import LocateInput, locate
from fieldkit.presets import load_file, load_presets, shipped_dir


def test_cables_file_loads_without_problems() -> None:
    library = load_file(shipped_dir() / "cables.toml")
    assert library.problems == []
    assert len(library.cables) >= 6


def test_every_cable_is_typical_with_a_source_and_an_uncertainty() -> None:
    for cable in load_presets().cables.values():
        # common practice: cables are 0–3 % shorter than their fibre
        assert 0.0 <= cable.helix_percent <= 3.0, cable.name
        assert 0.0 < cable.helix_uncertainty_percent <= 1.0, cable.name
        assert "common practice" in cable.source, cable.name
        assert cable.construction


def test_a_cable_preset_drives_the_sheath_length() -> None:
    cable = load_presets().find("cables", "stranded loose tube")
    # 1.5 ± 0.7 % (common practice): 2030 m of fibre / 1.015 = 2000 m of sheath
    result = locate(
        LocateInput(otdr_distance_m=2030, group_index=1.4677, helix_percent=cable.helix_percent)
    )
    assert cable.helix_percent == pytest.approx(1.5, abs=1e-12)
    assert result.position.sheath_distance_m == pytest.approx(2000.0, abs=1e-9)
