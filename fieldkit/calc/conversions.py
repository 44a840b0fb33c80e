"""What the convert workspace and ``fieldkit convert`` show: one typed value in every related unit.

A wavelength converts to an optical frequency and back (in vacuum); everything else converts
within its own kind (see :func:`fieldkit.calc.units.convert`).
"""

from __future__ import annotations

from dataclasses import dataclass

from fieldkit.calc import optics
from fieldkit.calc.units import (
    InputError,
    Kind,
    Value,
    canonical_unit,
    convert,
    format_number,
    linear,
    units_of,
)


def convert_to(value: Value, unit: str) -> tuple[float, str]:
    """``value`` in ``unit``; returns the number and the canonical unit.

    A length converts to a frequency (and a frequency to a length) as a vacuum wavelength:
    f = c / λ.

    Raises
    ------
    InputError
        When the two measure different things.
    """
    kind, target = canonical_unit(unit, "target unit")
    if value.kind is Kind.LENGTH and kind is Kind.FREQUENCY:
        wavelength_nm = linear(value.magnitude, value.unit, "nm")
        thz = optics.wavelength_nm_to_thz(wavelength_nm)
        return linear(thz, "THz", target), target
    if value.kind is Kind.FREQUENCY and kind is Kind.LENGTH:
        thz = linear(value.magnitude, value.unit, "THz")
        nm = optics.thz_to_wavelength_nm(thz)
        return linear(nm, "nm", target), target
    return convert(value, target), target


def related_values(value: Value) -> list[tuple[str, float]]:
    """``value`` in each unit a technician would want beside it, as (unit, number) pairs."""
    rows = [(unit, convert(value, unit)) for unit in units_of(value.kind)]
    if value.kind is Kind.LENGTH and _is_optical_wavelength(value):
        rows = [("nm", convert(value, "nm")), ("THz", convert_to(value, "THz")[0])]
    elif value.kind is Kind.FREQUENCY:
        rows = [
            ("THz", convert(value, "THz")),
            ("GHz", convert(value, "GHz")),
            ("nm", convert_to(value, "nm")[0]),
        ]
    return rows


def _is_optical_wavelength(value: Value) -> bool:
    return value.unit in ("nm", "um")


@dataclass(frozen=True, slots=True)
class GridReport:
    """Where a wavelength or frequency sits on the ITU-T grids."""

    wavelength_nm: float
    frequency_thz: float
    dwdm: list[optics.DwdmChannel]  # one per spacing that applies
    cwdm: optics.CwdmChannel | None


def grid_report(value: Value, spacings_ghz: tuple[float, ...] = (100.0, 50.0)) -> GridReport:
    """The nearest DWDM channels (per spacing) and CWDM channel of a wavelength or frequency.

    Raises
    ------
    InputError
        For a value that is neither a wavelength nor a frequency.
    """
    if value.kind is Kind.LENGTH:
        wavelength_nm = linear(value.magnitude, value.unit, "nm")
        frequency_thz = optics.wavelength_nm_to_thz(wavelength_nm)
    elif value.kind is Kind.FREQUENCY:
        frequency_thz = linear(value.magnitude, value.unit, "THz")
        wavelength_nm = optics.thz_to_wavelength_nm(frequency_thz)
    else:
        raise InputError(f"grid: {value} is not a wavelength or a frequency")
    dwdm: list[optics.DwdmChannel] = []
    if 150.0 <= frequency_thz <= 250.0:
        dwdm = [optics.nearest_dwdm_channel(frequency_thz, s) for s in spacings_ghz]
    cwdm = None
    try:
        cwdm = optics.nearest_cwdm_channel(wavelength_nm)
    except InputError:
        pass
    if not dwdm and cwdm is None:
        raise InputError(
            f"grid: {format_number(wavelength_nm)} nm ({format_number(frequency_thz)} THz) is on "
            "neither the DWDM nor "
            "the CWDM grid"
        )
    return GridReport(wavelength_nm, frequency_thz, dwdm, cwdm)
