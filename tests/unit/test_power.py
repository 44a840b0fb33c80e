"""Levels, ratios, losses and attenuation coefficients against their definitions."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldkit.calc import power
from fieldkit.calc.units import InputError

# ITU-R V.574-5: L = 10·log10(P / 1 mW) for dBm; 10·log10(P1/P2) for a power ratio.
LEVELS = [
    (1.0, 0.0),
    (10.0, 10.0),
    (0.001, -30.0),
    (1e-6, -60.0),
    (2.0, 10 * math.log10(2)),  # 3.0103 dBm
    (0.5, -3.010299956639812),
]


@pytest.mark.parametrize(("mw", "dbm"), LEVELS)
def test_dbm_definition_both_ways(mw: float, dbm: float) -> None:
    assert power.mw_to_dbm(mw) == pytest.approx(dbm, abs=1e-12)
    assert power.dbm_to_mw(dbm) == pytest.approx(mw, rel=1e-12)


def test_dbw_is_dbm_less_30() -> None:
    # ITU-R V.574: 1 W = 0 dBW = 30 dBm.
    assert power.dbm_to_dbw(30.0) == 0.0
    assert power.dbw_to_dbm(-30.0) == 0.0
    assert power.power_to_dbm(1.0, "W") == pytest.approx(30.0, abs=1e-12)
    assert power.dbm_to_power(-30.0, "uW") == pytest.approx(1.0, rel=1e-12)


@pytest.mark.parametrize("bad", [0.0, -1.0])
def test_log_of_zero_or_negative_power_is_refused(bad: float) -> None:
    with pytest.raises(InputError, match="logarithm"):
        power.mw_to_dbm(bad)
    with pytest.raises(InputError):
        power.power_to_dbm(bad, "uW")
    with pytest.raises(InputError):
        power.ratio_to_db(bad)


def test_nan_is_refused() -> None:
    with pytest.raises(InputError):
        power.dbm_to_mw(float("nan"))
    with pytest.raises(InputError):
        power.apply_loss(-3.0, float("inf"))


def test_ratio_and_percent() -> None:
    # 10·log10(2) = 3.0103 dB (ITU-R V.574 definition, computed by hand)
    assert power.ratio_to_db(2.0) == pytest.approx(3.010299956639812, abs=1e-12)
    assert power.db_to_ratio(10.0) == pytest.approx(10.0)
    assert power.loss_db_to_percent_transmitted(3.0) == pytest.approx(50.1187, abs=1e-4)
    assert power.loss_db_to_percent_transmitted(10.0) == pytest.approx(10.0, abs=1e-12)
    assert power.percent_transmitted_to_loss_db(50.0) == pytest.approx(3.0103, abs=1e-4)


def test_loss_and_level_arithmetic() -> None:
    # A loss subtracts from a level; two levels subtract to a ratio in dB.
    assert power.apply_loss(-3.2, 4.5) == pytest.approx(-7.7, abs=1e-12)
    assert power.apply_gain(-7.7, 4.5) == pytest.approx(-3.2, abs=1e-12)
    assert power.level_difference_db(-3.2, -7.7) == pytest.approx(4.5, abs=1e-12)


def test_sum_of_levels_in_linear_units() -> None:
    # Two equal powers double: +10·log10(2) dB. 1 mW + 1 mW + 2 mW = 4 mW = 6.0206 dBm.
    assert power.sum_levels_dbm([-3.0, -3.0]) == pytest.approx(-3.0 + 3.010299956639812, abs=1e-12)
    assert power.sum_levels_dbm([0.0, 0.0, power.mw_to_dbm(2.0)]) == pytest.approx(
        10 * math.log10(4.0), abs=1e-12
    )
    # A tiny level next to a large one does not underflow.
    assert power.sum_levels_dbm([0.0, -400.0]) == pytest.approx(0.0, abs=1e-12)
    with pytest.raises(InputError):
        power.sum_levels_dbm([])


def test_attenuation_coefficients() -> None:
    # international foot 0.3048 m exactly: 0.35 dB/km = 0.10668 dB/kft
    assert power.attenuation_in(0.35, "kft") == pytest.approx(0.10668, abs=1e-12)
    assert power.attenuation_in(1.0, "mi") == pytest.approx(1.609344, abs=1e-12)
    assert power.attenuation_in(3.5, "m") == pytest.approx(0.0035, abs=1e-15)
    assert power.attenuation_to_db_per_km(3.5, "kft") == pytest.approx(11.48293963, abs=1e-8)
    # G.652 fibre at 0.35 dB/km over 12.4 km: 4.34 dB (hand computation)
    assert power.loss_of_length_db(0.35, 12_400.0) == pytest.approx(4.34, abs=1e-12)
    with pytest.raises(InputError, match="negative"):
        power.loss_of_length_db(0.35, -1.0)


@given(st.floats(min_value=-100, max_value=50), st.floats(min_value=0, max_value=60))
def test_loss_then_gain_round_trip(level_dbm: float, loss_db: float) -> None:
    assert power.apply_gain(power.apply_loss(level_dbm, loss_db), loss_db) == pytest.approx(
        level_dbm, abs=1e-9
    )
