"""Property tests for the parsers in fieldkit.calc.units, fed arbitrary and near-miss text.

The rules are DESIGN §3: Unicode minus, µ/μ/u, any case of dBm; a decimal comma never becomes a
number ten or a thousand times off; NaN, infinity, empty text and wrong kinds refused with a
message; only InputError ever escapes.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import assume, example, given, settings
from hypothesis import strategies as st

from fieldkit.calc.power import db_to_ratio, dbm_to_mw
from fieldkit.calc.units import (
    InputError,
    Kind,
    convert,
    parse,
    parse_number,
    units_of,
)

# The first conversion builds the pint registry (a few hundred ms): no per-example deadline.
_NO_DEADLINE = settings(deadline=None)

_KINDS = list(Kind)
_DEFAULT_UNITS = [None, "dBm", "dB", "m", "nm", "s", "Hz", "dB/km"]

# Text built from the characters people really type into these fields, so the search reaches
# the parser's corners (signs, separators, exponents, unit letters) far more often than
# arbitrary Unicode does.
_FIELD_TEXT = st.text(
    alphabet=st.sampled_from(
        list("0123456789.,+-eE /%'dDbBmMwWkKuUnNfFtTiIaAhHzZsS")
        + ["\u2212", "\u00b5", "\u03bc", "\u00a0", "\u221e"]
    ),
    max_size=24,
)


def _refused_or_finite(call: object, *args: object, **kw: object) -> None:
    try:
        result = call(*args, **kw)  # type: ignore[operator]
    except InputError as exc:
        assert str(exc), "a refusal must say why"
    else:
        magnitude = getattr(result, "magnitude", result)
        assert isinstance(magnitude, float) and math.isfinite(magnitude)


@given(st.one_of(st.text(max_size=40), _FIELD_TEXT))
@example("1e400")
@example("-1e-400")
@example("\u22127,5")
@example("∞")
@example(",5")
@example("1,2,3")
def test_parse_number_refuses_or_gives_a_finite_number(text: str) -> None:
    _refused_or_finite(parse_number, text, what="field")


@given(
    st.one_of(st.text(max_size=40), _FIELD_TEXT),
    st.sampled_from(_KINDS),
    st.sampled_from(_DEFAULT_UNITS),
)
@example("1e308 dBm", Kind.POWER, None)
@example("-7,5", Kind.POWER, "dBm")
@example("5 MW", Kind.POWER, None)
@example("0.35 dB/", Kind.ATTENUATION, None)
def test_parse_with_a_kind_refuses_or_gives_that_kind(
    text: str, kind: Kind, default_unit: str | None
) -> None:
    try:
        value = parse(text, kind, default_unit=default_unit, what="field")
    except InputError as exc:
        assert str(exc).startswith("field"), "every refusal names the field"
    else:
        assert value.kind is kind
        assert math.isfinite(value.magnitude)


@_NO_DEADLINE
@given(_FIELD_TEXT)
@example("1e308 dBm")
@example("-1e308 dB")
@example("4000 dBm")
@example("-4000 dBm")
@example("1e308 dB")
@example("1e-300 pW")
@example("1e-320 pW")
@example("1e-307 nm")
def test_converting_anything_parsed_raises_only_input_error(text: str) -> None:
    try:
        value = parse(text, what="field")
    except InputError:
        return
    for unit in units_of(value.kind):
        try:
            result = convert(value, unit)
        except InputError as exc:
            assert any(
                words in str(exc) for words in ("too large", "too small", "below any", "less power")
            ), str(exc)
        else:
            assert math.isfinite(result)


@given(st.floats(min_value=-1e308, max_value=1e308, allow_nan=False))
@example(4000.0)
@example(-4000.0)
@example(-3076.0)
@example(-3090.0)
def test_levels_and_gains_never_overflow_or_underflow_silently(db: float) -> None:
    # P = 10^(L/10) mW (ITU-R V.574); floats stop near 1.8e308, i.e. L ≈ 3082.5 dB, and hold
    # full precision down to about 2.2e-308, i.e. L ≈ −3076.5 dB (IEEE 754, from memory)
    for function in (dbm_to_mw, db_to_ratio):
        try:
            result = function(db)
        except InputError as exc:
            if db > 0:
                assert "too large" in str(exc)
                assert db > 3000
            else:
                assert "below any measurable level" in str(exc) or "too small" in str(exc)
                assert db < -3000
        else:
            assert math.isfinite(result) and result > 0


_FRACTIONS = st.text(alphabet="0123456789", min_size=1, max_size=6)


@given(st.integers(min_value=0, max_value=99_999), _FRACTIONS, st.sampled_from(["", "-", "\u2212"]))
def test_a_decimal_comma_is_never_a_thousands_guess(whole: int, frac: str, sign: str) -> None:
    text = f"{sign}{whole},{frac}"
    dotted = float(f"{'-' if sign else ''}{whole}.{frac}")
    try:
        number = parse_number(text)
    except InputError as exc:
        # only the ambiguous case (exactly three digits after a comma with digits before it)
        # may be refused, and the message says so
        assert len(frac) == 3, text
        assert "ambiguous" in str(exc)
    else:
        assert len(frac) != 3, text
        assert number == pytest.approx(dotted, rel=1e-15, abs=0.0)


@given(
    st.floats(min_value=-60, max_value=30, allow_nan=False).map(lambda x: round(x, 3)),
    st.sampled_from(["dBm", "dbm", "DBM", "DbM"]),
    st.sampled_from(["-", "\u2212", "\u2012", "\u2013", "\ufe63", "\uff0d"]),
    st.sampled_from(["", " ", "\u00a0", "\u202f"]),
)
def test_minus_signs_spaces_and_dbm_case_all_read_the_same(
    level: float, unit: str, minus: str, space: str
) -> None:
    assume(level != 0)
    typed = f"{minus if level < 0 else ''}{abs(level)}{space}{unit}"
    value = parse(typed, Kind.POWER, what="level")
    assert value.unit == "dBm"
    assert value.magnitude == level


@_NO_DEADLINE
@given(
    st.floats(min_value=1e-3, max_value=1e6, allow_nan=False),
    st.sampled_from(["uW", "\u00b5W", "\u03bcW", "microwatts"]),
)
def test_every_spelling_of_micro_is_micro(power: float, unit: str) -> None:
    value = parse(f"{power!r} {unit}", Kind.POWER, what="power")
    # 1 µW = 1e-3 mW (SI prefix micro = 1e-6)
    assert convert(value, "mW") == pytest.approx(power * 1e-3, rel=1e-12)


@given(st.sampled_from(["MW", "Mw", "PW", "Pw"]), st.floats(min_value=0.001, max_value=1e3))
def test_mega_and_peta_are_asked_about_not_read_as_milli_or_pico(unit: str, x: float) -> None:
    with pytest.raises(InputError, match="mega|peta|megawatts"):
        parse(f"{x!r} {unit}", Kind.POWER, what="power")
