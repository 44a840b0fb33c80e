"""A fibre type as the budget and the fault locator use it: values per wavelength.

The values come from presets (``fieldkit.presets``) or from what the user typed; this module only
holds them and looks them up. A wavelength the fibre has no value for is refused with a message
naming the fibre and the wavelengths it has, never interpolated silently.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Literal

from fieldkit.calc.units import InputError, format_number

Family = Literal["multimode", "singlemode"]
Grade = Literal["max", "typical"]

#: How close a requested wavelength must be to a tabulated one to use its value, in nm.
WAVELENGTH_MATCH_NM = 0.5

#: Default test wavelengths by fibre family: TIA-568.3-D and ISO/IEC 14763-3 test multimode at
#: 850 and 1300 nm and single-mode at 1310 and 1550 nm (from memory).
DEFAULT_WAVELENGTHS_NM: dict[str, tuple[float, ...]] = {
    "multimode": (850.0, 1300.0),
    "singlemode": (1310.0, 1550.0),
}


#: The wavelengths fibre work uses, in nm: from the 650 nm of a visual fault locator to the
#: 1625/1650 nm monitoring band (common practice). One rule for budgets, meters and presets.
FIBRE_BAND_NM = (600.0, 1700.0)


def check_wavelength_nm(wavelength_nm: float, what: str = "wavelength") -> float:
    """``wavelength_nm`` when it lies in :data:`FIBRE_BAND_NM`.

    Raises
    ------
    InputError
        For a wavelength outside the fibre bands (a slipped unit, 1.31 for 1310 nm) or not finite.
    """
    low, high = FIBRE_BAND_NM
    if not math.isfinite(wavelength_nm) or not low <= wavelength_nm <= high:
        raise InputError(
            f"{what}: {format_number(wavelength_nm)} nm is outside the fibre bands "
            f"({format_number(low)}–{format_number(high)} nm)"
        )
    return float(wavelength_nm)


def _nm(wavelength_nm: float) -> str:
    return f"{format_number(wavelength_nm)} nm"


def lookup(table: Mapping[float, float], wavelength_nm: float) -> float | None:
    """The value tabulated at ``wavelength_nm`` (within ``WAVELENGTH_MATCH_NM``), else None."""
    if not math.isfinite(wavelength_nm):
        return None
    best: float | None = None
    best_gap = WAVELENGTH_MATCH_NM
    for nm, value in table.items():
        gap = abs(nm - wavelength_nm)
        if gap <= best_gap:
            best, best_gap = value, gap
    return best


@dataclass(frozen=True)
class Fibre:
    """A fibre type: attenuation, group index and geometry per wavelength.

    Attributes
    ----------
    attenuation_max
        Maximum (acceptance) attenuation coefficient in dB/km by wavelength in nm.
    attenuation_typical
        Typical (design expectation) attenuation coefficient in dB/km by wavelength in nm.
    group_indices
        Typical group index (dimensionless) by wavelength in nm.
    mfd_um
        Single-mode mode-field diameter in µm by wavelength in nm.
    modal_bandwidth_mhz_km
        Multimode bandwidth·length product in MHz·km by wavelength in nm: the effective modal
        bandwidth at 850 nm where the grade defines one, the overfilled-launch bandwidth
        otherwise.
    cable_cutoff_nm
        Single-mode cable cut-off wavelength in nm: below it the fibre carries more than one mode.
    zero_dispersion_nm
        Single-mode zero-dispersion wavelength range (lowest, highest) in nm.
    dispersion_slope_ps_nm2_km
        Single-mode maximum zero-dispersion slope S0 in ps/(nm²·km).
    estimated_nm
        Wavelengths whose maximum attenuation no standard gives: the value held there is an
        estimate (see :func:`rayleigh_scaled_db_per_km`), and a budget using it says so.
    """

    name: str
    family: Family | None
    attenuation_max: Mapping[float, float]
    attenuation_typical: Mapping[float, float] = field(default_factory=dict)
    group_indices: Mapping[float, float] = field(default_factory=dict)
    core_diameter_um: float | None = None
    numerical_aperture: float | None = None
    mfd_um: Mapping[float, float] = field(default_factory=dict)
    source: str = ""
    standard: str = ""
    default_wavelengths_nm: tuple[float, ...] = ()
    modal_bandwidth_mhz_km: Mapping[float, float] = field(default_factory=dict)
    cable_cutoff_nm: float | None = None
    zero_dispersion_nm: tuple[float, float] | None = None
    dispersion_slope_ps_nm2_km: float | None = None
    estimated_nm: tuple[float, ...] = ()

    @property
    def wavelengths_nm(self) -> tuple[float, ...]:
        """The wavelengths with a maximum attenuation, in ascending order."""
        return tuple(sorted(self.attenuation_max))

    def _missing(self, what: str, table: Mapping[float, float], wavelength_nm: float) -> InputError:
        have = ", ".join(_nm(nm) for nm in sorted(table)) or "none"
        return InputError(
            f"fibre {self.name}: no {what} at {_nm(wavelength_nm)} (it has values at {have})"
        )

    def attenuation_db_per_km(self, wavelength_nm: float, grade: Grade = "max") -> float:
        """The attenuation coefficient in dB/km at ``wavelength_nm``.

        ``grade="typical"`` falls back to nothing: it raises when no typical value is held.

        Raises
        ------
        InputError
            Naming the fibre and the wavelengths it has values for.
        """
        table = self.attenuation_max if grade == "max" else self.attenuation_typical
        value = lookup(table, wavelength_nm)
        if value is None:
            label = "maximum attenuation" if grade == "max" else "typical attenuation"
            raise self._missing(label, table, wavelength_nm)
        return value

    def is_estimated(self, wavelength_nm: float) -> bool:
        """True when the maximum attenuation at ``wavelength_nm`` is an estimate, not a
        standard's value."""
        return any(abs(nm - wavelength_nm) <= WAVELENGTH_MATCH_NM for nm in self.estimated_nm)

    def below_cutoff(self, wavelength_nm: float) -> bool:
        """True for a single-mode fibre used below its cable cut-off (it carries a few modes)."""
        return (
            self.family == "singlemode"
            and self.cable_cutoff_nm is not None
            and wavelength_nm < self.cable_cutoff_nm
        )

    def modal_bandwidth(self, wavelength_nm: float) -> float | None:
        """The bandwidth·length product in MHz·km at ``wavelength_nm`` (multimode), or None."""
        return lookup(self.modal_bandwidth_mhz_km, wavelength_nm)

    def has_typical(self, wavelength_nm: float) -> bool:
        return lookup(self.attenuation_typical, wavelength_nm) is not None

    def group_index(self, wavelength_nm: float) -> float:
        """The typical group index at ``wavelength_nm`` (for OTDR distance, d = c·t / 2n).

        Raises
        ------
        InputError
            Naming the fibre and the wavelengths it has a group index for.
        """
        value = lookup(self.group_indices, wavelength_nm)
        if value is None:
            raise self._missing("group index", self.group_indices, wavelength_nm)
        return value

    def mode_field_diameter_um(self, wavelength_nm: float) -> float:
        """The typical mode-field diameter in µm at ``wavelength_nm`` (single-mode fibre).

        Raises
        ------
        InputError
            For multimode fibre, or a wavelength without a value.
        """
        value = lookup(self.mfd_um, wavelength_nm)
        if value is None:
            raise self._missing("mode-field diameter", self.mfd_um, wavelength_nm)
        return value

    def test_wavelengths_nm(self) -> tuple[float, ...]:
        """The wavelengths a budget uses when none are asked for."""
        if self.default_wavelengths_nm:
            return self.default_wavelengths_nm
        if self.family is not None:
            return DEFAULT_WAVELENGTHS_NM[self.family]
        return self.wavelengths_nm


#: Wavelength ratio exponent of Rayleigh scattering: loss ∝ λ⁻⁴.
RAYLEIGH_EXPONENT = 4.0


def rayleigh_scaled_db_per_km(alpha_db_per_km: float, from_nm: float, to_nm: float) -> float:
    """An attenuation coefficient at ``from_nm`` scaled to ``to_nm`` as Rayleigh scattering
    scales, for a wavelength no standard gives a maximum at.

    .. math:: \\alpha(\\lambda_2) = \\alpha(\\lambda_1)\\,(\\lambda_1/\\lambda_2)^4

    Applied to the whole coefficient (absorption and cabling loss scale less), so the estimate
    errs on the lossy side below ``from_nm``. 0.4 dB/km at 1310 nm → 1270 nm:
    0.4 × (1310/1270)⁴ = 0.4 × 1.13203 = 0.45281 dB/km.

    References
    ----------
    Rayleigh scattering in silica, loss ∝ λ⁻⁴: G. Keiser, "Optical Fiber Communications",
    4th ed., §3.1 (from memory).
    """
    checks = (("attenuation", alpha_db_per_km), ("wavelength", from_nm), ("wavelength", to_nm))
    for what, x in checks:
        if not math.isfinite(x) or x < 0 or (what == "wavelength" and x == 0):
            raise InputError(f"{what}: {x!r} must be a positive, finite number")
    return alpha_db_per_km * (from_nm / to_nm) ** RAYLEIGH_EXPONENT
