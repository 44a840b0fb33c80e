"""Parsing what technicians type, and unit conversion (DESIGN §3)."""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldkit.calc.units import (
    InputError,
    Kind,
    Value,
    canonical_unit,
    convert,
    format_number,
    parse,
    parse_number,
)

ACCEPTED = [
    # text, kind, magnitude, canonical unit
    ("-7.5 dBm", Kind.POWER, -7.5, "dBm"),
    ("-7.5dBm", Kind.POWER, -7.5, "dBm"),
    ("\u22127.5 dBm", Kind.POWER, -7.5, "dBm"),  # Unicode minus sign
    ("\u20137.5 dBm", Kind.POWER, -7.5, "dBm"),  # en dash typed as a minus
    ("\u20107.5 dBm", Kind.POWER, -7.5, "dBm"),  # HYPHEN (U+2010), as text editors paste it
    ("\u20117.5 dBm", Kind.POWER, -7.5, "dBm"),  # NON-BREAKING HYPHEN (U+2011)
    ("-7,5 dBm", Kind.POWER, -7.5, "dBm"),  # decimal comma, unambiguous
    ("-7.5 dbm", Kind.POWER, -7.5, "dBm"),
    ("-7.5 DBM", Kind.POWER, -7.5, "dBm"),
    ("+3 dBm", Kind.POWER, 3.0, "dBm"),
    ("-30 dBW", Kind.POWER, -30.0, "dBW"),
    ("250 uW", Kind.POWER, 250.0, "uW"),
    ("250 \u00b5W", Kind.POWER, 250.0, "uW"),  # MICRO SIGN
    ("250 \u03bcW", Kind.POWER, 250.0, "uW"),  # GREEK SMALL LETTER MU
    ("0.5 mW", Kind.POWER, 0.5, "mW"),
    (".5 mW", Kind.POWER, 0.5, "mW"),
    ("12 nW", Kind.POWER, 12.0, "nW"),
    ("1e-3 W", Kind.POWER, 1e-3, "W"),
    ("0.35 dB/km", Kind.ATTENUATION, 0.35, "dB/km"),
    ("3.5 dB/kft", Kind.ATTENUATION, 3.5, "dB/kft"),
    ("0.0035 dB/m", Kind.ATTENUATION, 0.0035, "dB/m"),
    ("0.5 dB/mi", Kind.ATTENUATION, 0.5, "dB/mi"),
    ("1.2 kft", Kind.LENGTH, 1.2, "kft"),
    ("3900 ft", Kind.LENGTH, 3900.0, "ft"),
    ("3900 feet", Kind.LENGTH, 3900.0, "ft"),
    ("2.5 km", Kind.LENGTH, 2.5, "km"),
    ("2.5 KM", Kind.LENGTH, 2.5, "km"),
    ("1310 nm", Kind.LENGTH, 1310.0, "nm"),
    ("193.1 THz", Kind.FREQUENCY, 193.1, "THz"),
    ("25 ns", Kind.TIME, 25.0, "ns"),
    ("4.5 dB", Kind.RATIO, 4.5, "dB"),
    ("50 %", Kind.RATIO, 50.0, "%"),
    ("  -7.5   dBm  ", Kind.POWER, -7.5, "dBm"),
    ("-7.5\u00a0dBm", Kind.POWER, -7.5, "dBm"),  # no-break space
]


@pytest.mark.parametrize(("text", "kind", "magnitude", "unit"), ACCEPTED)
def test_accepted_forms(text: str, kind: Kind, magnitude: float, unit: str) -> None:
    value = parse(text)
    assert value.kind is kind
    assert value.magnitude == pytest.approx(magnitude, rel=1e-15)
    assert value.unit == unit


REFUSED = [
    # text, expected kind, a phrase the message must hold
    ("", None, "empty"),
    ("   ", None, "empty"),
    ("nan dBm", None, "NaN"),
    ("NaN", None, "NaN"),
    ("inf dBm", None, "infinity"),
    ("-inf dBm", None, "infinity"),
    ("1e999 mW", None, "too large"),
    ("5 km", Kind.POWER, "length"),  # wrong dimension where a power is asked
    ("-3 dBm", Kind.LENGTH, "optical power"),
    ("0 mW", None, "logarithm of zero"),
    ("-1 uW", None, "logarithm"),
    ("2 MW", None, "mW"),  # megawatt is not milliwatt: ask
    ("1,234 dBm", None, "ambiguous"),  # thousands separator or decimal comma?
    ("1,234.5 m", None, "mixes separators"),
    ("1.234,5 m", None, "mixes separators"),
    ("1,2,3 m", None, "mixes separators"),
    ("dBm", None, "does not start with a number"),
    ("abc", None, "does not start with a number"),
    ("3 furlongs", None, "unknown unit"),
    ("0.35 dB/dBm", None, "length after 'dB/'"),
    ("7", None, "needs a unit"),
]


@pytest.mark.parametrize(("text", "expect", "phrase"), REFUSED)
def test_refused_forms_name_the_problem(text: str, expect: Kind | None, phrase: str) -> None:
    with pytest.raises(InputError) as caught:
        parse(text, expect, what="reading")
    message = str(caught.value)
    assert phrase in message
    assert message.startswith("reading:")


def test_decimal_comma_is_never_read_as_a_thousands_separator() -> None:
    # DESIGN §3: "-7,5 dBm" must never become -75.
    assert parse("-7,5 dBm").magnitude == -7.5
    assert parse("-7,55 dBm").magnitude == pytest.approx(-7.55)
    assert parse("0,35 dB/km").magnitude == pytest.approx(0.35)
    with pytest.raises(InputError):
        parse("7,500 dBm")


def test_default_unit_for_bare_numbers() -> None:
    assert parse("-7.5", Kind.POWER, default_unit="dBm") == Value(Kind.POWER, -7.5, "dBm")
    assert parse("0.3", Kind.RATIO, default_unit="dB").unit == "dB"


def test_parse_number() -> None:
    assert parse_number("\u22122,5") == -2.5
    with pytest.raises(InputError, match="after the number"):
        parse_number("2.5 dB")


def test_case_of_prefix_matters_for_milli_and_mega() -> None:
    assert canonical_unit("mw") == (Kind.POWER, "mW")
    with pytest.raises(InputError, match="mega"):
        canonical_unit("MW")


CONVERSIONS = [
    # value, unit, to, expected, tolerance, source
    ("0 dBm", "mW", 1.0, 1e-15),  # ITU-R V.574: 0 dBm is 1 mW
    ("-30 dBm", "uW", 1.0, 1e-12),  # ITU-R V.574: 10·log10(1 µW / 1 mW) = -30 dB
    ("10 dBm", "mW", 10.0, 1e-12),  # ITU-R V.574
    ("0 dBW", "dBm", 30.0, 1e-12),  # 1 W = 1000 mW -> 30 dBm (ITU-R V.574)
    ("1 W", "dBm", 30.0, 1e-12),
    ("1 nW", "dBm", -60.0, 1e-12),
    ("-3.5 dBm", "uW", 446.683592150963, 1e-9),  # 10^(-0.35) mW, computed by hand
    ("1 kft", "m", 304.8, 1e-12),  # international foot: 0.3048 m exactly (1959 agreement)
    ("3900 ft", "m", 1188.72, 1e-9),  # 3900 × 0.3048
    ("1 mi", "ft", 5280.0, 1e-9),  # statute mile = 5280 ft
    ("0.35 dB/km", "dB/kft", 0.35 * 0.3048, 1e-15),
    ("3.5 dB/kft", "dB/km", 3.5 / 0.3048, 1e-12),
    ("1 dB/km", "dB/mi", 1.609344, 1e-12),  # 1 mi = 1609.344 m exactly
    ("3 dB", "%", 50.11872336272722, 1e-9),  # 10^(-0.3) × 100
    ("50 %", "dB", 3.0102999566398, 1e-12),  # -10·log10(0.5)
]


@pytest.mark.parametrize(("text", "unit", "expected", "tolerance"), CONVERSIONS)
def test_conversion_table_both_directions(
    text: str, unit: str, expected: float, tolerance: float
) -> None:
    value = parse(text)
    there = convert(value, unit)
    assert there == pytest.approx(expected, abs=tolerance)
    back = convert(Value(value.kind, there, unit), value.unit)
    assert back == pytest.approx(value.magnitude, rel=1e-12, abs=1e-12)


def test_conversion_to_another_kind_is_refused() -> None:
    with pytest.raises(InputError, match="cannot convert"):
        convert(parse("5 km"), "dBm")


@given(st.floats(min_value=-90, max_value=40, allow_nan=False))
def test_level_power_round_trip(level_dbm: float) -> None:
    value = Value(Kind.POWER, level_dbm, "dBm")
    for unit in ("W", "mW", "uW", "nW"):
        back = convert(Value(Kind.POWER, convert(value, unit), unit), "dBm")
        assert back == pytest.approx(level_dbm, abs=1e-9)


@given(st.floats(min_value=1e-6, max_value=1e6, allow_nan=False))
def test_length_round_trip(metres: float) -> None:
    value = Value(Kind.LENGTH, metres, "m")
    for unit in ("km", "ft", "kft", "mi"):
        assert convert(Value(Kind.LENGTH, convert(value, unit), unit), "m") == pytest.approx(
            metres, rel=1e-12
        )


@given(st.text(max_size=30))
def test_parser_never_crashes_on_arbitrary_text(text: str) -> None:
    try:
        value = parse(text)
    except InputError as exc:
        assert str(exc)
    else:
        assert math.isfinite(value.magnitude)


# Subnormal floats (below about 2.2e-308, IEEE 754) are refused as typed input: see
# test_numbers_too_close_to_zero_are_refused_not_read_as_zero.
@given(
    st.floats(
        allow_nan=False, allow_infinity=False, allow_subnormal=False, min_value=-1e8, max_value=1e8
    ).filter(lambda x: x == 0 or abs(x) > 1e-307)  # 6 digits must not round into subnormals
)
def test_formatted_numbers_parse_back(number: float) -> None:
    text = format_number(number)
    assert parse(text + " dB").magnitude == pytest.approx(number, rel=1e-5, abs=1e-9)
