"""A fibre as a waveguide: numerical aperture, acceptance angle, V-number, guided modes, cut-off
and chromatic dispersion.

Every function takes bare floats with the unit in the name and returns one; the fibre data view
and the checks beyond loss (:mod:`fieldkit.calc.checks`) use them.

References
----------
G. Keiser, "Optical Fiber Communications", 4th ed., ch. 2 (acceptance angle, V-number, mode
count of step- and graded-index fibre, LP11 cut-off at V = 2.405) (from memory).
ITU-T G.652 (11/2016), the chromatic dispersion coefficient of G.652 fibre,
D(λ) = S0/4 · (λ − λ0⁴/λ³), with the zero-dispersion wavelength λ0 and slope S0 limits of the
attributes tables (from memory).
"""

from __future__ import annotations

import math

from fieldkit.calc.units import InputError

#: First zero of the Bessel function J0: the V-number below which a step-index fibre guides
#: only its fundamental mode (LP01); Abramowitz & Stegun, Table 9.5: j0,1 = 2.404826.
SINGLE_MODE_V = 2.404826


def _positive(x: float, what: str) -> float:
    if isinstance(x, bool) or not math.isfinite(x) or x <= 0:
        raise InputError(f"{what}: {x!r} must be a positive, finite number")
    return float(x)


def acceptance_half_angle_deg(numerical_aperture: float) -> float:
    """The half-angle of the acceptance cone in air, in degrees.

    .. math:: \\theta_a = \\arcsin(NA)

    NA 0.200: asin(0.2) = 11.537°; NA 0.275: 15.962°.
    """
    na = _positive(numerical_aperture, "numerical aperture")
    if na >= 1.0:
        raise InputError(f"numerical aperture: {na:g} must be below 1")
    return math.degrees(math.asin(na))


def v_number(core_diameter_um: float, numerical_aperture: float, wavelength_nm: float) -> float:
    """The normalised frequency (V-number) of a fibre, dimensionless.

    .. math:: V = \\frac{\\pi\\, d\\, NA}{\\lambda}

    50 µm, NA 0.2 at 850 nm: π × 50 × 0.2 / 0.85 = 36.960.
    """
    d_um = _positive(core_diameter_um, "core diameter")
    na = _positive(numerical_aperture, "numerical aperture")
    return math.pi * d_um * na / (_positive(wavelength_nm, "wavelength") / 1000.0)


def guided_modes(v: float, graded_index: bool) -> float:
    """The approximate number of guided modes, for V well above 2.405.

    .. math:: M \\approx V^2/2 \\ \\text{(step index)}, \\qquad M \\approx V^2/4
              \\ \\text{(graded index, parabolic profile)}

    V = 36.960: 683.0 (step), 341.5 (graded). Below :data:`SINGLE_MODE_V` the fibre guides one mode
    (two polarisations), and the approximation does not hold: 1 is returned.
    """
    _positive(v, "V-number")
    if v < SINGLE_MODE_V:
        return 1.0
    return v * v / (4.0 if graded_index else 2.0)


def cutoff_wavelength_nm(core_diameter_um: float, numerical_aperture: float) -> float:
    """The theoretical (step-index) cut-off wavelength of the first higher mode, in nm: above it
    the fibre is single-mode.

    .. math:: \\lambda_c = \\frac{\\pi\\, d\\, NA}{2.405}

    8.2 µm, NA 0.12: π × 8.2 × 0.12 / 2.404826 = 1.28547 µm = 1285.5 nm. The cable cut-off a
    standard specifies (G.652: ≤ 1260 nm) is lower: bends in a cable strip the higher mode.
    """
    d_um = _positive(core_diameter_um, "core diameter")
    na = _positive(numerical_aperture, "numerical aperture")
    return math.pi * d_um * na / SINGLE_MODE_V * 1000.0


def g652_dispersion_ps_nm_km(
    wavelength_nm: float, zero_dispersion_nm: float, slope_ps_nm2_km: float
) -> float:
    """The chromatic dispersion coefficient of G.652-type fibre, in ps/(nm·km).

    .. math:: D(\\lambda) = \\frac{S_0}{4}\\left(\\lambda - \\frac{\\lambda_0^4}{\\lambda^3}\\right)

    At 1550 nm with λ0 = 1300 nm, S0 = 0.092 ps/(nm²·km): 1300⁴ / 1550³ = 766.969 nm;
    0.023 × (1550 − 766.969) = 18.010 ps/(nm·km).
    """
    nm = _positive(wavelength_nm, "wavelength")
    zero = _positive(zero_dispersion_nm, "zero-dispersion wavelength")
    slope = _positive(slope_ps_nm2_km, "zero-dispersion slope")
    return slope / 4.0 * (nm - zero**4 / nm**3)


def g652_dispersion_range_ps_nm_km(
    wavelength_nm: float, zero_range_nm: tuple[float, float], slope_max_ps_nm2_km: float
) -> tuple[float, float]:
    """The lowest and highest dispersion coefficient a fibre within the limits can have, in
    ps/(nm·km): λ0 anywhere in ``zero_range_nm``, S0 from 0 to ``slope_max_ps_nm2_km``.

    D falls as λ0 rises and scales with S0, so the extremes are at the ends of the λ0 range with
    S0 at its maximum (or 0 when that side has the other sign).
    """
    low_zero, high_zero = zero_range_nm
    d_a = g652_dispersion_ps_nm_km(wavelength_nm, low_zero, slope_max_ps_nm2_km)
    d_b = g652_dispersion_ps_nm_km(wavelength_nm, high_zero, slope_max_ps_nm2_km)
    return min(d_a, d_b, 0.0), max(d_a, d_b, 0.0)


def dispersion_broadening_ps(dispersion_ps_nm: float, spectral_width_nm: float) -> float:
    """The pulse spread from chromatic dispersion, in ps: |D·L| × Δλ."""
    return abs(dispersion_ps_nm) * _positive(spectral_width_nm, "spectral width")


#: The largest share of a bit period the dispersion spread may take: B·|D|·L·σλ ≤ 1/4
#: (G. P. Agrawal, "Fiber-Optic Communication Systems", 3rd ed., §5.2.2, from memory).
DISPERSION_SPREAD_LIMIT = 0.25


def dispersion_limited_length_km(
    dispersion_ps_nm_km: float, spectral_width_nm: float, bit_rate_gbd: float
) -> float:
    """The length at which the dispersion spread reaches a quarter of a bit period, in km.

    .. math:: L = \\frac{1/4}{B\\,|D|\\,\\sigma_\\lambda}

    18 ps/(nm·km), 0.1 nm, 10 GBd: 0.25 / (10 × 10⁹ × 18 × 10⁻¹² × 0.1) = 13.9 km.
    """
    width = _positive(spectral_width_nm, "spectral width")
    rate = _positive(bit_rate_gbd, "bit rate")
    d = abs(dispersion_ps_nm_km)
    if d == 0:
        return math.inf
    return DISPERSION_SPREAD_LIMIT / (rate * 1e9 * d * 1e-12 * width)


#: The modal bandwidth a link needs per unit of line rate, in MHz per MBd (an estimate: the
#: ratio that the IEEE Std 802.3 1000BASE-SX and 10GBASE-SR multimode rows imply, reach ×
#: line rate ≈ bandwidth·length / 0.6 (from memory); common practice rounds it to 0.6–0.7).
BANDWIDTH_PER_BAUD = 0.6


def modal_bandwidth_reach_m(bandwidth_mhz_km: float, bit_rate_gbd: float) -> float:
    """The length a multimode fibre of ``bandwidth_mhz_km`` carries a signal of
    ``bit_rate_gbd`` before its modal bandwidth runs out, in m (an estimate).

    .. math:: L = \\frac{BL}{0.6\\, B}

    OM3, 2000 MHz·km at 850 nm, 10.3125 GBd: 2000 / (0.6 × 10312.5) km = 323.2 m.
    """
    bl = _positive(bandwidth_mhz_km, "modal bandwidth")
    rate_mbd = _positive(bit_rate_gbd, "bit rate") * 1000.0
    return bl / (BANDWIDTH_PER_BAUD * rate_mbd) * 1000.0
