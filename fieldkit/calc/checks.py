"""Checks beyond loss: a link can meet its loss budget and still not work.

- **Chromatic dispersion** (single-mode): the G.652 coefficient at each wavelength, over the
  recommendation's whole range of zero-dispersion wavelength and slope, times each segment's
  length; judged against a receiver's dispersion tolerance (ps/nm), or against a quarter of a bit
  period for a source's spectral width at a bit rate.
- **Modal bandwidth** (multimode): the bandwidth·length product of the fibres (effective modal
  bandwidth at 850 nm, overfilled-launch bandwidth at 1300 nm), combined over the segments as
  ``L / Σ(L_i / BL_i)``, and the reach it allows at a bit rate.
- **Cut-off** (single-mode): a wavelength below the fibre's cable cut-off, where it carries a few
  modes.

And the fibre data of one fibre at one wavelength: NA, acceptance angle, V-number, guided modes,
theoretical cut-off, dispersion coefficient.

References
----------
See :mod:`fieldkit.calc.waveguide` for the formulas and their sources.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from fieldkit.calc import waveguide as wg
from fieldkit.calc.budget import WINDOW_MATCH_NM, LinkDescription
from fieldkit.calc.fibre import Fibre
from fieldkit.calc.units import InputError

#: The names of the formulas, as results cite them.
DISPERSION_FORMULA = "ITU-T G.652 D(λ) = S0/4·(λ − λ0⁴/λ³)"
BANDWIDTH_FORMULA = "BL_link = L / Σ(L_i / BL_i); reach = BL / (0.6 × line rate)"


@dataclass(frozen=True)
class DispersionCheck:
    """Chromatic dispersion of the link's single-mode fibre at one wavelength."""

    wavelength_nm: float
    length_m: float  # of fibre with dispersion data
    low_ps_nm: float  # the accumulated dispersion over the fibres' limits, lowest
    high_ps_nm: float  # and highest
    tolerance_ps_nm: float | None
    spectral_width_nm: float | None
    bit_rate_gbd: float | None
    unknown_fibres: tuple[str, ...]  # fibres without dispersion data (not counted)

    @property
    def worst_ps_nm(self) -> float:
        """The largest magnitude the link's dispersion can have, in ps/nm."""
        return max(abs(self.low_ps_nm), abs(self.high_ps_nm))

    @property
    def either_sign(self) -> bool:
        """True where the link's dispersion can have either sign (the wavelength inside the
        zero-dispersion range): the range's ends, λ0 at each end of its range with S0 at its
        maximum, are then real extremes. Elsewhere ITU-T G.652 bounds only the magnitude
        (S0 has a maximum, no minimum), so only the worst case means anything: the range's
        other end, 0 from S0 = 0, is no real fibre's."""
        return self.low_ps_nm < 0 < self.high_ps_nm

    def words(self) -> str:
        """The accumulated dispersion in words, one rule for the CLI, the workspace and the
        stored check: ``"worst |D|·L 720.4 ps/nm"``, with the range where it means something,
        ``"worst |D|·L 15.7 ps/nm (D·L −15.7 to 10.9 ps/nm)"``; one decimal throughout."""

        def ps(x: float) -> str:
            return f"{x:.1f}".replace("-", "−")

        text = f"worst |D|·L {ps(self.worst_ps_nm)} ps/nm"
        if self.either_sign:
            text += f" (D·L {ps(self.low_ps_nm)} to {ps(self.high_ps_nm)} ps/nm)"
        return text

    @property
    def tolerance_pass(self) -> bool | None:
        if self.tolerance_ps_nm is None:
            return None
        return self.worst_ps_nm <= self.tolerance_ps_nm

    @property
    def spread_ps(self) -> float | None:
        """The pulse spread |D·L|·Δλ in ps, when a spectral width is known."""
        if self.spectral_width_nm is None:
            return None
        return wg.dispersion_broadening_ps(self.worst_ps_nm, self.spectral_width_nm)

    @property
    def spread_limit_ps(self) -> float | None:
        """A quarter of the bit period in ps, when a bit rate is known."""
        if self.bit_rate_gbd is None:
            return None
        return wg.DISPERSION_SPREAD_LIMIT * 1000.0 / self.bit_rate_gbd

    @property
    def spread_pass(self) -> bool | None:
        spread, limit = self.spread_ps, self.spread_limit_ps
        if spread is None or limit is None:
            return None
        return spread <= limit

    @property
    def passed(self) -> bool | None:
        """False when either judgement fails, True when one passes and none fails."""
        flags = [f for f in (self.tolerance_pass, self.spread_pass) if f is not None]
        return None if not flags else all(flags)

    def as_dict(self) -> dict[str, Any]:
        return {
            "wavelength_nm": self.wavelength_nm,
            "length_m": self.length_m,
            "low_ps_nm": self.low_ps_nm,
            "high_ps_nm": self.high_ps_nm,
            "worst_ps_nm": self.worst_ps_nm,
            # low/high are real extremes only where D can be either sign (see either_sign)
            "either_sign": self.either_sign,
            "tolerance_ps_nm": self.tolerance_ps_nm,
            "tolerance_pass": self.tolerance_pass,
            "spectral_width_nm": self.spectral_width_nm,
            "bit_rate_gbd": self.bit_rate_gbd,
            "spread_ps": self.spread_ps,
            "spread_limit_ps": self.spread_limit_ps,
            "spread_pass": self.spread_pass,
            "pass": self.passed,
            "unknown_fibres": list(self.unknown_fibres),
            "formula": DISPERSION_FORMULA,
        }


@dataclass(frozen=True)
class BandwidthCheck:
    """Modal bandwidth of the link's multimode fibre at one wavelength."""

    wavelength_nm: float
    length_m: float
    bandwidth_length_mhz_km: float  # of the link as a whole: L / Σ(L_i / BL_i)
    bit_rate_gbd: float | None
    unknown_fibres: tuple[str, ...]

    @property
    def link_bandwidth_mhz(self) -> float:
        km = self.length_m / 1000.0
        return math.inf if km == 0 else self.bandwidth_length_mhz_km / km

    @property
    def reach_m(self) -> float | None:
        if self.bit_rate_gbd is None:
            return None
        return wg.modal_bandwidth_reach_m(self.bandwidth_length_mhz_km, self.bit_rate_gbd)

    @property
    def passed(self) -> bool | None:
        reach = self.reach_m
        return None if reach is None else self.length_m <= reach

    def as_dict(self) -> dict[str, Any]:
        return {
            "wavelength_nm": self.wavelength_nm,
            "length_m": self.length_m,
            "bandwidth_length_mhz_km": self.bandwidth_length_mhz_km,
            "link_bandwidth_mhz": None
            if math.isinf(self.link_bandwidth_mhz)
            else self.link_bandwidth_mhz,
            "bit_rate_gbd": self.bit_rate_gbd,
            "reach_m": self.reach_m,
            "pass": self.passed,
            "unknown_fibres": list(self.unknown_fibres),
            "formula": BANDWIDTH_FORMULA,
        }


@dataclass(frozen=True)
class CutoffCheck:
    """A single-mode fibre at a wavelength below its cable cut-off."""

    fibre: str
    wavelength_nm: float
    cable_cutoff_nm: float

    def as_dict(self) -> dict[str, Any]:
        return {
            "fibre": self.fibre,
            "wavelength_nm": self.wavelength_nm,
            "cable_cutoff_nm": self.cable_cutoff_nm,
        }


@dataclass(frozen=True)
class LinkChecks:
    dispersion: tuple[DispersionCheck, ...] = ()
    bandwidth: tuple[BandwidthCheck, ...] = ()
    cutoff: tuple[CutoffCheck, ...] = ()

    @property
    def passed(self) -> bool | None:
        """False when any check fails or a wavelength is below cut-off; None when nothing
        could be judged."""
        judged = [c.passed for c in self.dispersion] + [c.passed for c in self.bandwidth]
        flags = [f for f in judged if f is not None]
        if self.cutoff:
            return False
        return None if not flags else all(flags)

    def as_dict(self) -> dict[str, Any]:
        return {
            "pass": self.passed,
            "dispersion": [c.as_dict() for c in self.dispersion],
            "bandwidth": [c.as_dict() for c in self.bandwidth],
            "cutoff": [c.as_dict() for c in self.cutoff],
        }


def check_beyond_loss(
    link: LinkDescription,
    wavelengths_nm: tuple[float, ...],
    *,
    bit_rate_gbd: float | None = None,
    spectral_width_nm: float | None = None,
    dispersion_tolerance_ps_nm: float | None = None,
    tolerance_wavelength_nm: float | None = None,
    rate_wavelengths_nm: tuple[float, ...] | None = None,
) -> LinkChecks:
    """Dispersion, modal bandwidth and cut-off of ``link`` at each of ``wavelengths_nm``.

    The dispersion tolerance (a receiver's) applies at ``tolerance_wavelength_nm`` (its window,
    :data:`~fieldkit.calc.budget.WINDOW_MATCH_NM`), or at every wavelength when that is None.
    The bit rate applies at ``rate_wavelengths_nm`` (the wavelengths of the application or the
    transceiver it comes from), or at every wavelength when that is None (a typed bit rate).
    """
    dispersion: list[DispersionCheck] = []
    bandwidth: list[BandwidthCheck] = []
    cutoff: list[CutoffCheck] = []
    all_rate = bit_rate_gbd
    for nm in wavelengths_nm:
        bit_rate_gbd = all_rate
        if rate_wavelengths_nm is not None and not any(
            abs(nm - w) <= WINDOW_MATCH_NM for w in rate_wavelengths_nm
        ):
            bit_rate_gbd = None
        for seg in link.segments:
            f = seg.fibre
            if f.below_cutoff(nm) and f.cable_cutoff_nm is not None:
                cutoff.append(CutoffCheck(f.name, nm, f.cable_cutoff_nm))
        if link.family == "singlemode" and not any(s.fibre.below_cutoff(nm) for s in link.segments):
            tolerance = dispersion_tolerance_ps_nm
            if (
                tolerance is not None
                and tolerance_wavelength_nm is not None
                and abs(nm - tolerance_wavelength_nm) > WINDOW_MATCH_NM
            ):
                tolerance = None
            dispersion.append(_dispersion(link, nm, tolerance, spectral_width_nm, bit_rate_gbd))
        elif link.family == "multimode":
            check = _bandwidth(link, nm, bit_rate_gbd)
            if check is not None:
                bandwidth.append(check)
    unique_cutoff = tuple(dict.fromkeys(cutoff))
    return LinkChecks(tuple(dispersion), tuple(bandwidth), unique_cutoff)


def _dispersion(
    link: LinkDescription,
    nm: float,
    tolerance: float | None,
    width: float | None,
    rate: float | None,
) -> DispersionCheck:
    low = high = 0.0
    length = 0.0
    unknown: list[str] = []
    for seg in link.segments:
        f = seg.fibre
        if f.zero_dispersion_nm is None or f.dispersion_slope_ps_nm2_km is None:
            unknown.append(f.name)
            continue
        d_low, d_high = wg.g652_dispersion_range_ps_nm_km(
            nm, f.zero_dispersion_nm, f.dispersion_slope_ps_nm2_km
        )
        km = seg.length_m / 1000.0
        low += d_low * km
        high += d_high * km
        length += seg.length_m
    return DispersionCheck(
        wavelength_nm=nm,
        length_m=length,
        low_ps_nm=low,
        high_ps_nm=high,
        tolerance_ps_nm=tolerance,
        spectral_width_nm=width,
        bit_rate_gbd=rate,
        unknown_fibres=tuple(dict.fromkeys(unknown)),
    )


def _bandwidth(link: LinkDescription, nm: float, rate: float | None) -> BandwidthCheck | None:
    spread = 0.0  # Σ L_i / BL_i, in km per (MHz·km)
    length = 0.0
    unknown: list[str] = []
    for seg in link.segments:
        bl = seg.fibre.modal_bandwidth(nm)
        if bl is None:
            unknown.append(seg.fibre.name)
            continue
        spread += (seg.length_m / 1000.0) / bl
        length += seg.length_m
    if length == 0.0 and not unknown:
        return None
    if length == 0.0:
        return BandwidthCheck(nm, 0.0, math.inf, rate, tuple(dict.fromkeys(unknown)))
    return BandwidthCheck(
        wavelength_nm=nm,
        length_m=length,
        bandwidth_length_mhz_km=(length / 1000.0) / spread,
        bit_rate_gbd=rate,
        unknown_fibres=tuple(dict.fromkeys(unknown)),
    )


# -- the fibre data view -----------------------------------------------------------------------


@dataclass(frozen=True)
class FibreData:
    """What a fibre's presets say about it as a waveguide, at one wavelength."""

    fibre: str
    family: str | None
    wavelength_nm: float
    numerical_aperture: float | None
    acceptance_half_angle_deg: float | None
    v_number: float | None
    guided_modes: float | None
    graded_index: bool
    cutoff_nm: float | None  # theoretical, from core and NA
    cable_cutoff_nm: float | None  # the standard's
    mode_field_diameter_um: float | None
    dispersion_low_ps_nm_km: float | None
    dispersion_high_ps_nm_km: float | None
    modal_bandwidth_mhz_km: float | None

    def as_dict(self) -> dict[str, Any]:
        return dict(self.__dict__)


def fibre_data(fibre: Fibre, wavelength_nm: float) -> FibreData:
    """The fibre data of ``fibre`` at ``wavelength_nm``, from its core, NA, MFD and dispersion
    presets; a figure whose inputs the presets lack is None. Multimode fibres are taken as
    graded index (every OM grade is), single-mode as step index."""
    na = fibre.numerical_aperture
    core = fibre.core_diameter_um
    v = None if na is None or core is None else wg.v_number(core, na, wavelength_nm)
    graded = fibre.family == "multimode"
    d_low = d_high = None
    if fibre.zero_dispersion_nm is not None and fibre.dispersion_slope_ps_nm2_km is not None:
        d_low, d_high = wg.g652_dispersion_range_ps_nm_km(
            wavelength_nm, fibre.zero_dispersion_nm, fibre.dispersion_slope_ps_nm2_km
        )
    mfd = None
    if fibre.family == "singlemode":
        try:
            mfd = fibre.mode_field_diameter_um(wavelength_nm)
        except InputError:  # no value at this wavelength: shown as not known
            mfd = None
    return FibreData(
        fibre=fibre.name,
        family=fibre.family,
        wavelength_nm=wavelength_nm,
        numerical_aperture=na,
        acceptance_half_angle_deg=None if na is None else wg.acceptance_half_angle_deg(na),
        v_number=v,
        guided_modes=None if v is None else wg.guided_modes(v, graded),
        graded_index=graded,
        cutoff_nm=None if na is None or core is None else wg.cutoff_wavelength_nm(core, na),
        cable_cutoff_nm=fibre.cable_cutoff_nm,
        mode_field_diameter_um=mfd,
        dispersion_low_ps_nm_km=d_low,
        dispersion_high_ps_nm_km=d_high,
        modal_bandwidth_mhz_km=fibre.modal_bandwidth(wavelength_nm),
    )
