"""The link-length and splitter field rules (fieldkit.inputs), shared by ``fieldkit budget``
and the budget workspace."""

from __future__ import annotations

import pytest

from fieldkit import inputs
from fieldkit.calc.units import InputError


@pytest.mark.parametrize("typed", ["1x64", "1:64", "1×64", "1 : 64", "1X64"])
def test_a_split_is_read_the_same_way_however_it_is_written(typed: str) -> None:
    # 1:64 and 1x64 are both usual ways to write a 1-in, 64-out splitter (common practice).
    assert inputs.splitter(typed) == (1, 64)


def test_a_two_input_split_with_a_colon() -> None:
    assert inputs.splitter("2:32") == inputs.splitter("2x32") == (2, 32)


def test_a_split_without_a_separator_is_refused_naming_both_forms() -> None:
    with pytest.raises(InputError, match=r"split: '164' is not 1xN or 2xN \(e.g. 1x32 or 1:32\)"):
        inputs.splitter("164", "split")


@pytest.mark.parametrize("typed", ["1550 nm", "5 um", "5 µm"])
def test_a_link_length_in_wavelength_units_is_refused_naming_the_unit(typed: str) -> None:
    # Review F3: nm is a length to the unit parser (wavelengths are lengths), not a link's.
    with pytest.raises(InputError) as refused:
        inputs.length_m(typed)
    message = str(refused.value)
    assert "is not a link length" in message and "m, km, ft, kft, mi" in message
    assert ("nm" if "nm" in typed else "µm") in message


def test_another_quantity_lists_only_fibre_length_units() -> None:
    with pytest.raises(InputError) as refused:
        inputs.length_m("5 dBm")
    message = str(refused.value)
    assert "(m, km, ft, kft, mi)" in message and "nm" not in message


@pytest.mark.parametrize(
    ("typed", "said"), [("-3 km", "−3 km is negative"), ("-3000 ft", "−3000 ft is negative")]
)
def test_a_negative_length_is_said_in_the_unit_typed(typed: str, said: str) -> None:
    # Review F3: "-3 km" came back as "−3000 m is negative".
    with pytest.raises(InputError, match=f"length: {said}"):
        inputs.length_m(typed)


@pytest.mark.parametrize(
    ("typed", "metres"), [("12.4 km", 12400.0), ("3900 ft", 1188.72), ("1 mi", 1609.344)]
)
def test_fibre_lengths_still_convert(typed: str, metres: float) -> None:
    # 1 ft = 0.3048 m, 1 mi = 1609.344 m (international yard and pound, 1959)
    assert inputs.length_m(typed) == pytest.approx(metres)
