"""Wavelength, frequency and the ITU-T WDM grids."""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldkit.calc import optics
from fieldkit.calc.conversions import convert_to, grid_report, related_values
from fieldkit.calc.units import InputError, parse


def test_speed_of_light_is_the_si_definition() -> None:
    # BIPM SI Brochure, 9th ed. (2019): c = 299 792 458 m/s exactly.
    assert optics.SPEED_OF_LIGHT_M_PER_S == 299_792_458


def test_wavelength_frequency() -> None:
    # 193.1 THz -> 299792458 / 193.1e12 = 1552.524 nm (ITU-T G.694.1 Table A.1 lists 1552.52 nm)
    assert optics.thz_to_wavelength_nm(193.1) == pytest.approx(1552.5244, abs=1e-4)
    # 1550 nm -> 193.414 THz (hand computation: 299792458 / 1550e-9)
    assert optics.wavelength_nm_to_thz(1550.0) == pytest.approx(193.41449, abs=1e-5)
    # 1310 nm -> 228.849 THz
    assert optics.wavelength_nm_to_thz(1310.0) == pytest.approx(228.8492, abs=1e-4)
    with pytest.raises(InputError):
        optics.wavelength_nm_to_thz(0.0)


@given(st.floats(min_value=100.0, max_value=20000.0))
def test_wavelength_round_trip(nm: float) -> None:
    assert optics.thz_to_wavelength_nm(optics.wavelength_nm_to_thz(nm)) == pytest.approx(
        nm, rel=1e-12
    )


# ITU-T G.694.1 (10/2020): f = 193.1 THz + n × spacing. Table A.1 values (from memory).
DWDM = [
    (193.1, 100.0, 0, 193.1, 1552.52),
    (193.2, 100.0, 1, 193.2, 1551.72),
    (192.0, 100.0, -11, 192.0, 1561.42),
    (196.1, 100.0, 30, 196.1, 1528.77),
    (193.15, 50.0, 1, 193.15, 1552.12),
    (193.14, 50.0, 1, 193.15, 1552.12),
    (193.17, 100.0, 1, 193.2, 1551.72),
]


@pytest.mark.parametrize(("thz", "spacing", "n", "channel_thz", "channel_nm"), DWDM)
def test_dwdm_nearest_channel(
    thz: float, spacing: float, n: int, channel_thz: float, channel_nm: float
) -> None:
    channel = optics.nearest_dwdm_channel(thz, spacing)
    assert channel.n == n
    assert channel.frequency_thz == pytest.approx(channel_thz, abs=1e-9)
    assert channel.wavelength_nm == pytest.approx(channel_nm, abs=0.005)
    assert channel.offset_ghz == pytest.approx((thz - channel_thz) * 1000, abs=1e-6)
    assert channel.within_half_spacing


def test_dwdm_refuses_odd_spacing_and_far_frequencies() -> None:
    with pytest.raises(InputError, match="spacing"):
        optics.nearest_dwdm_channel(193.1, 75.0)
    with pytest.raises(InputError, match="outside"):
        optics.nearest_dwdm_channel(350.0, 100.0)


def test_cwdm_grid() -> None:
    # ITU-T G.694.2 (12/2003): 18 wavelengths 1271..1611 nm every 20 nm.
    assert optics.CWDM_WAVELENGTHS_NM == tuple(float(x) for x in range(1271, 1612, 20))
    assert len(optics.CWDM_WAVELENGTHS_NM) == 18
    channel = optics.nearest_cwdm_channel(1550.0)
    assert channel.wavelength_nm == 1551.0
    assert channel.offset_nm == pytest.approx(-1.0)
    assert optics.nearest_cwdm_channel(1310.0).wavelength_nm == 1311.0
    assert optics.nearest_cwdm_channel(1480.0).wavelength_nm == 1471.0  # 9 nm off: outside band
    assert not optics.nearest_cwdm_channel(1480.0).within_band
    with pytest.raises(InputError, match="outside the CWDM grid"):
        optics.nearest_cwdm_channel(850.0)


def test_spectral_conversion_and_grid_report() -> None:
    number, unit = convert_to(parse("1550 nm"), "THz")
    assert (number, unit) == (pytest.approx(193.41449, abs=1e-5), "THz")
    number, unit = convert_to(parse("193.1 THz"), "nm")
    assert number == pytest.approx(1552.5244, abs=1e-4)
    report = grid_report(parse("1550.12 nm"))
    assert [c.n for c in report.dwdm] == [3, 6]  # 193.4 THz on both the 100 and 50 GHz grids
    assert report.cwdm is not None and report.cwdm.wavelength_nm == 1551.0
    with pytest.raises(InputError):
        grid_report(parse("3 dBm"))
    with pytest.raises(InputError, match="neither"):
        grid_report(parse("850 nm"))


def test_related_values_of_a_wavelength() -> None:
    units = [unit for unit, _ in related_values(parse("1310 nm"))]
    assert units == ["nm", "THz"]
