"""Power levels (dBm, dBW), power ratios (dB) and attenuation coefficients (dB per length).

Levels are absolute (referred to 1 mW or 1 W); ratios are relative. A loss subtracts from a
level; two levels subtract to a ratio; powers add only in linear units.

References
----------
ITU-R V.574-5, "Use of the decibel and the neper in telecommunications": the decibel of a power
ratio is 10·log10(P1/P2); dBm is referred to 1 mW and dBW to 1 W.
"""

from __future__ import annotations

import math
from collections.abc import Iterable

from fieldkit.calc.units import SMALLEST_NORMAL, InputError, linear

#: dBW − dBm for the same power: 1 W = 1000 mW, so 10·log10(1000) = 30 dB exactly.
DBW_TO_DBM_DB = 30.0


def _finite(x: float, what: str) -> float:
    if not math.isfinite(x):
        raise InputError(f"{what}: {x} is not a finite number")
    return x


def _result(x: float, what: str) -> float:
    """A computed value, refusing one that left float range (e.g. 1e308 dBm less −1e308 dB)."""
    if not math.isfinite(x):
        raise InputError(f"{what}: the result is too large for a number")
    return x


def _exp10(db: float, what: str, unit: str) -> float:
    """10^(db/10), refusing a value whose power does not fit in a float.

    Above about +3082 dB the power overflows; below about −3076 dB it falls under the smallest
    full-precision float and then to zero, whose logarithm a later step could not take.
    """
    try:
        result = 10.0 ** (_finite(db, what) / 10.0)
    except OverflowError:
        raise InputError(
            f"{what}: {db:g} {unit} is too large to express as a linear power or ratio"
        ) from None
    if result < SMALLEST_NORMAL:
        below = "below any measurable level" if unit == "dBm" else "too small"
        raise InputError(
            f"{what}: {db:g} {unit} is {below} (its linear power or ratio is too small for a "
            "number)"
        )
    return result


def dbm_to_mw(level_dbm: float) -> float:
    """Power in mW of a level in dBm.

    .. math:: P_{mW} = 10^{L_{dBm}/10}

    Raises
    ------
    InputError
        For a level whose power does not fit in a float: above about +3082 dBm or below about
        −3076 dBm.
    """
    return _exp10(level_dbm, "level", "dBm")


def mw_to_dbm(power_mw: float) -> float:
    """Level in dBm of a power in mW.

    .. math:: L_{dBm} = 10 \\log_{10}(P_{mW} / 1\\,\\mathrm{mW})

    Raises
    ------
    InputError
        For zero or a negative power (the logarithm is undefined).
    """
    _finite(power_mw, "power")
    if power_mw <= 0:
        raise InputError(
            f"power: {power_mw} mW has no level in dBm (the logarithm of zero or a negative "
            "power is undefined)"
        )
    return 10.0 * math.log10(power_mw)


def dbm_to_dbw(level_dbm: float) -> float:
    """Level in dBW of a level in dBm: L_dBW = L_dBm − 30 dB."""
    return _finite(level_dbm, "level") - DBW_TO_DBM_DB


def dbw_to_dbm(level_dbw: float) -> float:
    """Level in dBm of a level in dBW: L_dBm = L_dBW + 30 dB."""
    return _finite(level_dbw, "level") + DBW_TO_DBM_DB


def dbm_to_power(level_dbm: float, unit: str) -> float:
    """Power of a level in dBm, in a linear unit ``W``, ``mW``, ``uW``, ``nW`` or ``pW``."""
    try:
        return linear(dbm_to_mw(level_dbm), "mW", unit)
    except InputError as exc:
        raise InputError(f"level: {exc}") from None


def power_to_dbm(power: float, unit: str) -> float:
    """Level in dBm of a linear power given in ``unit`` (``W``, ``mW``, ``uW``, ``nW``, ``pW``)."""
    _finite(power, "power")
    if power <= 0:
        raise InputError(
            f"power: {power} {unit} has no level in dBm (the logarithm of zero or a negative "
            "power is undefined)"
        )
    try:
        power_mw = linear(power, unit, "mW")
    except InputError as exc:
        raise InputError(f"power: {exc}") from None
    return mw_to_dbm(power_mw)


def ratio_to_db(ratio: float) -> float:
    """A power ratio P_out/P_in in dB: 10·log10(ratio). A ratio below 1 gives a negative value.

    Raises
    ------
    InputError
        For a ratio of zero or below.
    """
    _finite(ratio, "ratio")
    if ratio <= 0:
        raise InputError(f"ratio: {ratio} has no value in dB (it must be above zero)")
    return 10.0 * math.log10(ratio)


def db_to_ratio(gain_db: float) -> float:
    """The power ratio of a gain in dB: 10^(dB/10). For a loss, pass the loss negated.

    Raises
    ------
    InputError
        For a gain whose ratio does not fit in a float (beyond about ±3080 dB).
    """
    return _exp10(gain_db, "gain", "dB")


def loss_db_to_percent_transmitted(loss_db: float) -> float:
    """Percent of the input power that gets through a loss in dB: 100·10^(−loss/10)."""
    return _result(100.0 * db_to_ratio(-loss_db), "percent transmitted")


def percent_transmitted_to_loss_db(percent: float) -> float:
    """Loss in dB of a part that passes ``percent`` of the power: −10·log10(percent/100)."""
    _finite(percent, "percent")
    if percent <= 0:
        raise InputError(f"percent transmitted: {percent} % has no loss in dB (it must be above 0)")
    return -ratio_to_db(percent / 100.0)


def apply_loss(level_dbm: float, loss_db: float) -> float:
    """The level after a loss: L_out = L_in − loss. A negative loss is a gain."""
    return _result(_finite(level_dbm, "level") - _finite(loss_db, "loss"), "level after the loss")


def apply_gain(level_dbm: float, gain_db: float) -> float:
    """The level after a gain: L_out = L_in + gain."""
    return _result(_finite(level_dbm, "level") + _finite(gain_db, "gain"), "level after the gain")


def level_difference_db(level_a_dbm: float, level_b_dbm: float) -> float:
    """The ratio between two levels in dB: L_a − L_b (dBm − dBm = dB)."""
    return _result(_finite(level_a_dbm, "level") - _finite(level_b_dbm, "level"), "difference")


def sum_levels_dbm(levels_dbm: Iterable[float]) -> float:
    """The level of the combined power of several levels (incoherent sum, in linear units).

    .. math:: L = 10 \\log_{10} \\sum_i 10^{L_i/10}

    Two equal levels sum to that level plus 10·log10(2) ≈ 3.01 dB.

    Raises
    ------
    InputError
        For an empty list.
    """
    values = [_finite(x, "level") for x in levels_dbm]
    if not values:
        raise InputError("sum of levels: give at least one level")
    top = max(values)  # factor out the largest term so tiny levels do not underflow
    return top + 10.0 * math.log10(sum(10.0 ** ((x - top) / 10.0) for x in values))


def attenuation_in(db_per_km: float, per_unit: str) -> float:
    """An attenuation coefficient in dB/km expressed per another length unit.

    ``per_unit`` is a canonical length (``m``, ``km``, ``ft``, ``kft``, ``mi``). For example
    0.35 dB/km is 0.35 × 0.3048 = 0.106680 dB/kft (international foot, 0.3048 m exactly).
    """
    return _result(_finite(db_per_km, "attenuation") * linear(1.0, per_unit, "km"), "attenuation")


def attenuation_to_db_per_km(coefficient: float, per_unit: str) -> float:
    """An attenuation coefficient given per ``per_unit`` of length, in dB/km."""
    return _result(_finite(coefficient, "attenuation") / linear(1.0, per_unit, "km"), "attenuation")


def loss_of_length_db(db_per_km: float, length_m: float) -> float:
    """Loss in dB of ``length_m`` metres of fibre at ``db_per_km``: α·L.

    Raises
    ------
    InputError
        For a negative length.
    """
    _finite(length_m, "length")
    if length_m < 0:
        raise InputError(f"length: {length_m} m is negative")
    return _result(_finite(db_per_km, "attenuation") * length_m / 1000.0, "fibre loss")
