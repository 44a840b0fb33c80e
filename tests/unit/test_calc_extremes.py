"""The calculation API at the edges of floating point: it refuses, with InputError, what it
cannot represent, on the large and the small side, and never returns NaN or infinity.

IEEE 754 double (from memory): the largest finite value is about 1.8e308, the smallest at full
precision about 2.2e-308 (below it subnormals down to 4.9e-324, then zero). A level L dBm is
10^(L/10) mW, so levels above about +3082 dBm overflow and below about −3076 dBm underflow.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from fieldkit.calc import coupling, locate, optics, power, reference
from fieldkit.calc.units import InputError, Kind, Value, convert, linear, parse, units_of

# The first conversion builds the pint registry: no per-example deadline.
_NO_DEADLINE = settings(deadline=None)

#: Floats at the edges: huge, tiny, subnormal, zero, signed, NaN and infinity.
_EDGE = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from(
        [0.0, -0.0, 5e-324, -5e-324, 1e-320, 2.2250738585072014e-308, 1e-300, 1e300, 1.7e308]
    ),
    st.floats(min_value=-4000, max_value=4000),
)

_ONE_ARG: list[Callable[[float], float]] = [
    power.dbm_to_mw,
    power.mw_to_dbm,
    power.dbm_to_dbw,
    power.dbw_to_dbm,
    power.ratio_to_db,
    power.db_to_ratio,
    power.loss_db_to_percent_transmitted,
    power.percent_transmitted_to_loss_db,
    optics.wavelength_nm_to_thz,
    optics.thz_to_wavelength_nm,
    lambda x: power.dbm_to_power(x, "nW"),
    lambda x: power.power_to_dbm(x, "pW"),
    lambda x: power.attenuation_in(x, "kft"),
    lambda x: power.attenuation_to_db_per_km(x, "mi"),
    lambda x: locate.in_unit(x, "ft"),
    lambda x: linear(x, "pW", "W"),
    lambda x: linear(x, "km", "nm"),
]

_TWO_ARGS: list[Callable[[float, float], float]] = [
    power.apply_loss,
    power.apply_gain,
    power.level_difference_db,
    power.loss_of_length_db,
    lambda a, b: power.sum_levels_dbm([a, b]),
    coupling.core_diameter_mismatch_loss_db,
    coupling.na_mismatch_loss_db,
    coupling.mfd_mismatch_loss_db,
    reference.insertion_loss_db,
    reference.bidirectional_average_db,
    locate.fibre_distance_from_time,
    locate.sheath_length,
    lambda a, b: reference.reference_drift(a, b, 0.1).drift_db,
]


def _refuses_or_is_finite(call: Callable[[], float]) -> None:
    try:
        result = call()
    except InputError as exc:
        assert str(exc) and "\n" not in str(exc), "one line naming the problem"
    else:
        assert isinstance(result, float) and math.isfinite(result), result


@pytest.mark.parametrize("function", _ONE_ARG)
@_NO_DEADLINE
@given(x=_EDGE)
@example(x=-4000.0)  # −4000 dBm: 1e-400 mW, below the smallest float
@example(x=1e-320)  # a subnormal power
@example(x=5e-324)
def test_one_argument_functions_raise_only_input_error(
    function: Callable[[float], float], x: float
) -> None:
    _refuses_or_is_finite(lambda: function(x))


@pytest.mark.parametrize("function", _TWO_ARGS)
@_NO_DEADLINE
@given(a=_EDGE, b=_EDGE)
@example(a=1e308, b=-1e308)  # the difference overflows
@example(a=1e-300, b=1e300)  # the ratio's square underflows
@example(a=1e200, b=1e200)  # the square overflows
@example(a=-4000.0, b=3.0)
def test_two_argument_functions_raise_only_input_error(
    function: Callable[[float, float], float], a: float, b: float
) -> None:
    _refuses_or_is_finite(lambda: function(a, b))


@pytest.mark.parametrize(
    ("typed", "unit", "words"),
    [
        # 10^(-4000/10) mW = 1e-400 mW: smaller than any float (from the IEEE 754 range above)
        ("-4000 dBm", "mW", "below any measurable level"),
        ("-4000 dBm", "uW", "below any measurable level"),
        ("-3100 dBW", "W", "too small to express in W"),  # 1e-307 mW is 1e-310 W
        ("4000 dB", "%", "less power than a number can hold"),
        ("1e-300 pW", "dBm", "below any measurable level"),  # 1e-309 mW is subnormal
        ("1e-307 nm", "km", "too small"),
        ("1e308 km", "m", "too large"),
    ],
)
def test_conversions_refuse_underflow_and_overflow_naming_the_field(
    typed: str, unit: str, words: str
) -> None:
    value = parse(typed, what="reading")
    with pytest.raises(InputError, match=words) as caught:
        convert(value, unit)
    assert str(caught.value).startswith("reading: ")


def test_levels_convert_between_dbm_and_dbw_without_a_linear_detour() -> None:
    # dBW = dBm − 30 dB exactly (ITU-R V.574: 1 W = 1000 mW); −4000 dBm is a representable level
    assert convert(Value(Kind.POWER, -4000.0, "dBm"), "dBW") == -4030.0
    assert convert(Value(Kind.POWER, -3900.0, "dBW"), "dBm") == -3870.0


@pytest.mark.parametrize("typed", ["1e-320 pW", "1e-400", "-1e-330 dB", "2e-310 m", "1E-400 mW"])
def test_numbers_too_close_to_zero_are_refused_not_read_as_zero(typed: str) -> None:
    with pytest.raises(InputError, match="too close to zero"):
        parse(typed, default_unit="dB", what="field")


def test_zero_typed_as_zero_is_still_zero() -> None:
    assert parse("0e-400 dB", what="loss").magnitude == 0.0
    assert parse("0.000 dB", what="loss").magnitude == 0.0


@_NO_DEADLINE
@given(st.floats(min_value=-1e308, max_value=1e308, allow_nan=False), st.sampled_from(list(Kind)))
@example(-4000.0, Kind.POWER)
@example(4000.0, Kind.RATIO)
@example(1e-310, Kind.LENGTH)
def test_every_conversion_of_a_typed_number_is_finite_or_refused(x: float, kind: Kind) -> None:
    unit = units_of(kind)[0]
    try:
        value = parse(f"{x!r} {unit}", kind, what="field")
    except InputError:
        return
    for target in units_of(kind):
        _refuses_or_is_finite(lambda target=target: convert(value, target))
