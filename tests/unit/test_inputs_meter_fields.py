"""The meter set-up's wavelengths and directions are named field parsers in fieldkit.inputs,
with one separator rule for every wavelength list (the workspace, the budget, link files)."""

from __future__ import annotations

import pytest

from fieldkit import inputs
from fieldkit.calc.units import InputError


@pytest.mark.parametrize(
    "text",
    ["1310 1550", "1310, 1550", "1310;1550", "1310/1550", "1310 / 1550 nm"],
)
def test_every_wavelength_list_reads_the_same_separators(text: str) -> None:
    # "1310/1550" is how meters and data sheets write the pair (common practice)
    assert inputs.wavelength_list(text) == [1310.0, 1550.0]
    assert inputs.meter_wavelengths(text) == [1310.0, 1550.0]


def test_a_meter_session_tests_one_to_four_wavelengths_none_twice() -> None:
    assert inputs.meter_wavelengths("850 1300 1310 1550") == [850.0, 1300.0, 1310.0, 1550.0]
    with pytest.raises(InputError, match="at most 4"):
        inputs.meter_wavelengths("850 1300 1310 1490 1550")
    with pytest.raises(InputError, match="1310.4 nm is listed twice"):
        inputs.meter_wavelengths("1310 1310.4")  # within 0.5 nm: the same source
    assert inputs.meter_wavelengths("1310 1311") == [1310.0, 1311.0]
    with pytest.raises(InputError, match="type at least one"):
        inputs.meter_wavelengths(" / ")
    with pytest.raises(InputError, match="fibre bands"):
        inputs.meter_wavelengths("1.31")  # a slipped unit: 1.31 nm


def test_directions_are_one_or_two() -> None:
    assert inputs.directions(" 1 ") == ["A->B"]
    assert inputs.directions("2") == ["A->B", "B->A"]
    for bad in ("", "3", "both", "0"):
        with pytest.raises(InputError, match="1 \\(A->B only\\) or 2"):
            inputs.directions(bad)
