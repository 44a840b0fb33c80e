"""Wavelength and optical frequency, and the ITU-T WDM grids.

References
----------
BIPM, The International System of Units (SI), 9th edition (2019): c = 299 792 458 m/s exactly.
ITU-T G.694.1 (10/2020), "Spectral grids for WDM applications: DWDM frequency grid": nominal
central frequencies f = 193.1 THz + n × spacing, for spacings of 12.5, 25, 50 and 100 GHz.
ITU-T G.694.2 (12/2003), "Spectral grids for WDM applications: CWDM wavelength grid": 18
nominal central wavelengths from 1271 nm to 1611 nm every 20 nm.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from fieldkit.calc.units import InputError, format_number

#: Speed of light in vacuum, m/s: exact by the SI definition of the metre (BIPM).
SPEED_OF_LIGHT_M_PER_S = 299_792_458.0

#: The anchor of the ITU-T G.694.1 DWDM grid, in THz.
DWDM_ANCHOR_THZ = 193.1

#: Spacings of the ITU-T G.694.1 fixed grids, in GHz.
DWDM_SPACINGS_GHZ = (100.0, 50.0, 25.0, 12.5)

#: ITU-T G.694.2 CWDM nominal central wavelengths, nm.
CWDM_WAVELENGTHS_NM: tuple[float, ...] = tuple(float(1271 + 20 * k) for k in range(18))


def _positive(x: float, what: str) -> float:
    if not math.isfinite(x) or x <= 0:
        raise InputError(f"{what}: {format_number(x)} must be a positive, finite number")
    return x


def wavelength_nm_to_thz(wavelength_nm: float) -> float:
    """Optical frequency in THz of a vacuum wavelength in nm.

    .. math:: f = c / \\lambda
    """
    nm = _positive(wavelength_nm, "wavelength")
    return _in_range(lambda: SPEED_OF_LIGHT_M_PER_S / (nm * 1e-9) / 1e12, nm, "wavelength", "nm")


def thz_to_wavelength_nm(frequency_thz: float) -> float:
    """Vacuum wavelength in nm of an optical frequency in THz: λ = c / f."""
    thz = _positive(frequency_thz, "frequency")
    return _in_range(lambda: SPEED_OF_LIGHT_M_PER_S / (thz * 1e12) * 1e9, thz, "frequency", "THz")


def _in_range(compute: Callable[[], float], x: float, what: str, unit: str) -> float:
    """The result of ``compute``, refusing one that leaves floating-point range (a wavelength of
    1e-320 nm has no frequency a float can hold)."""
    try:
        result = compute()
    except ZeroDivisionError:
        result = math.inf
    if not math.isfinite(result) or result <= 0:
        raise InputError(f"{what}: {format_number(x)} {unit} is too far out of range to convert")
    return result


@dataclass(frozen=True, slots=True)
class DwdmChannel:
    """The nearest ITU-T G.694.1 grid channel to a frequency.

    ``n`` is the integer of the standard's formula f = 193.1 THz + n × spacing.
    """

    spacing_ghz: float
    n: int
    frequency_thz: float
    wavelength_nm: float
    offset_ghz: float  # the given frequency minus the channel's frequency

    @property
    def within_half_spacing(self) -> bool:
        return abs(self.offset_ghz) <= self.spacing_ghz / 2


def nearest_dwdm_channel(frequency_thz: float, spacing_ghz: float = 100.0) -> DwdmChannel:
    """The nearest G.694.1 channel to ``frequency_thz`` on the grid of ``spacing_ghz``.

    .. math:: n = \\mathrm{round}((f - 193.1\\,\\mathrm{THz}) / \\Delta f)

    Raises
    ------
    InputError
        For a spacing the standard does not define, or a frequency outside 150–250 THz
        (about 1200–2000 nm), where no DWDM grid applies.
    """
    _positive(frequency_thz, "frequency")
    if spacing_ghz not in DWDM_SPACINGS_GHZ:
        raise InputError(
            f"grid spacing: {spacing_ghz:g} GHz is not a G.694.1 spacing "
            f"({', '.join(f'{s:g}' for s in DWDM_SPACINGS_GHZ)} GHz)"
        )
    if not 150.0 <= frequency_thz <= 250.0:
        raise InputError(
            f"frequency: {frequency_thz:.4f} THz is outside the DWDM bands (about 150–250 THz)"
        )
    step_thz = spacing_ghz / 1000.0
    # One step from the anchor (n × spacing, never an accumulated sum), so the channel frequency
    # carries a single rounding; a frequency exactly half-way between two channels is a tie.
    n = round((frequency_thz - DWDM_ANCHOR_THZ) / step_thz)
    channel_thz = DWDM_ANCHOR_THZ + n * step_thz
    return DwdmChannel(
        spacing_ghz=spacing_ghz,
        n=n,
        frequency_thz=channel_thz,
        wavelength_nm=thz_to_wavelength_nm(channel_thz),
        offset_ghz=(frequency_thz - channel_thz) * 1000.0,
    )


@dataclass(frozen=True, slots=True)
class CwdmChannel:
    """The nearest ITU-T G.694.2 CWDM channel to a wavelength."""

    wavelength_nm: float
    offset_nm: float  # the given wavelength minus the channel's

    @property
    def within_band(self) -> bool:
        """G.694.2 allows ±6.5 nm of wavelength variation around each nominal wavelength."""
        return abs(self.offset_nm) <= 6.5


def nearest_cwdm_channel(wavelength_nm: float) -> CwdmChannel:
    """The nearest G.694.2 CWDM channel (1271–1611 nm, 20 nm apart).

    Raises
    ------
    InputError
        For a wavelength more than 10 nm outside the grid.
    """
    _positive(wavelength_nm, "wavelength")
    lowest, highest = CWDM_WAVELENGTHS_NM[0], CWDM_WAVELENGTHS_NM[-1]
    if not lowest - 10 <= wavelength_nm <= highest + 10:
        raise InputError(
            f"wavelength: {wavelength_nm:.1f} nm is outside the CWDM grid "
            f"({lowest:.0f}–{highest:.0f} nm)"
        )
    channel = min(CWDM_WAVELENGTHS_NM, key=lambda c: abs(c - wavelength_nm))
    return CwdmChannel(wavelength_nm=channel, offset_nm=wavelength_nm - channel)
