"""Units: the one pint registry, parsing of what people type, and formatting.

Linear quantities (length, time, power in watts, frequency) go through pint. Levels (dBm,
dBW), ratios (dB) and attenuation coefficients (dB per length) are handled here with explicit
formulas, because pint's logarithmic units are unreliable for this work (see DESIGN §3).

Everything that can refuse input raises :class:`InputError`, whose message names the problem
in words a technician can act on.
"""

from __future__ import annotations

import math
import re
import sys
from dataclasses import dataclass, field
from enum import StrEnum
from functools import cache
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # pint is imported lazily: start-up must not pay for it
    import pint


class InputError(ValueError):
    """Typed input that fieldkit will not guess about. The message says why."""


#: The smallest magnitude a float holds at full precision (about 2.2e-308). Below it a number
#: loses digits and then becomes zero, so a power that small is refused rather than shown as 0.
SMALLEST_NORMAL = sys.float_info.min


# Control characters (C0, DEL, C1) as escapes when typed text is echoed in a message, so that a
# refusal is one line and sends nothing to a terminal.
_ECHO = str.maketrans({c: f"\\x{c:02x}" for c in [*range(0x20), *range(0x7F, 0xA0)]})


def _echo(text: str) -> str:
    """Typed text as a message may quote it: control characters written as ``\\xNN``."""
    return text.translate(_ECHO)


def _tiny(x: float) -> bool:
    """True for a non-zero result that fell below full float precision (or to zero)."""
    return abs(x) < SMALLEST_NORMAL


class Kind(StrEnum):
    """What a typed value measures."""

    POWER = "power"  # an optical power: a level in dBm/dBW or a linear power in W, mW, µW, nW
    RATIO = "ratio"  # a loss or gain in dB, or percent of power transmitted
    ATTENUATION = "attenuation"  # dB per unit length
    LENGTH = "length"  # also wavelength
    TIME = "time"
    FREQUENCY = "frequency"

    @property
    def noun(self) -> str:
        return {
            Kind.POWER: "an optical power (dBm, dBW, W, mW, µW, nW)",
            Kind.RATIO: "a loss or ratio (dB)",
            Kind.ATTENUATION: "an attenuation coefficient (dB/km, dB/kft, dB/mi, dB/m)",
            Kind.LENGTH: "a length (m, km, ft, kft, mi, nm)",
            Kind.TIME: "a time (s, ms, µs, ns)",
            Kind.FREQUENCY: "a frequency (Hz, GHz, THz)",
        }[self]


@cache
def ureg() -> pint.UnitRegistry:
    """The one unit registry of the program, built on first use.

    Built with pint's definition cache so that later runs load it quickly.
    """
    import pint

    try:
        registry: pint.UnitRegistry = pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # a read-only or broken cache folder must not stop the tool
        registry = pint.UnitRegistry()
    return registry


# Canonical spellings of the linear units we accept, with their pint names. The key is how the
# trade writes the unit; µ is typed as "u" after normalisation.
_LINEAR_UNITS: dict[str, tuple[Kind, str]] = {
    "W": (Kind.POWER, "watt"),
    "mW": (Kind.POWER, "milliwatt"),
    "uW": (Kind.POWER, "microwatt"),
    "nW": (Kind.POWER, "nanowatt"),
    "pW": (Kind.POWER, "picowatt"),
    "m": (Kind.LENGTH, "meter"),
    "km": (Kind.LENGTH, "kilometer"),
    "cm": (Kind.LENGTH, "centimeter"),
    "mm": (Kind.LENGTH, "millimeter"),
    "um": (Kind.LENGTH, "micrometer"),
    "nm": (Kind.LENGTH, "nanometer"),
    "ft": (Kind.LENGTH, "foot"),
    "kft": (Kind.LENGTH, "kilofoot"),
    "mi": (Kind.LENGTH, "mile"),
    "yd": (Kind.LENGTH, "yard"),
    "s": (Kind.TIME, "second"),
    "ms": (Kind.TIME, "millisecond"),
    "us": (Kind.TIME, "microsecond"),
    "ns": (Kind.TIME, "nanosecond"),
    "ps": (Kind.TIME, "picosecond"),
    "Hz": (Kind.FREQUENCY, "hertz"),
    "kHz": (Kind.FREQUENCY, "kilohertz"),
    "GHz": (Kind.FREQUENCY, "gigahertz"),
    "THz": (Kind.FREQUENCY, "terahertz"),
}

# Words people type for the same units.
_UNIT_WORDS: dict[str, str] = {
    "meter": "m",
    "meters": "m",
    "metre": "m",
    "metres": "m",
    "kilometer": "km",
    "kilometers": "km",
    "kilometre": "km",
    "kilometres": "km",
    "foot": "ft",
    "feet": "ft",
    "'": "ft",
    "kilofeet": "kft",
    "kilofoot": "kft",
    "mile": "mi",
    "miles": "mi",
    "watt": "W",
    "watts": "W",
    "milliwatt": "mW",
    "milliwatts": "mW",
    "microwatt": "uW",
    "microwatts": "uW",
    "nanowatt": "nW",
    "nanowatts": "nW",
}

# Units for which the case of the first letter changes the meaning (milli vs mega, pico vs peta).
_CASE_SENSITIVE_PREFIXES = {"m": "M", "p": "P"}

_BASE_UNIT = {
    Kind.POWER: "mW",
    Kind.LENGTH: "m",
    Kind.TIME: "s",
    Kind.FREQUENCY: "Hz",
}

_NUMBER = re.compile(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
# U+2212 minus, U+2010 hyphen and U+2011 non-breaking hyphen (what word processors and phone
# keyboards put in place of "-"), figure dash, en and em dash, small and full-width hyphen-minus.
_MINUS_SIGNS = "\u2212\u2010\u2011\u2012\u2013\u2014\ufe63\uff0d"
_MICRO_SIGNS = "\u00b5\u03bc"
_SPACES = "\u00a0\u2009\u202f\u2007"


@dataclass(frozen=True, slots=True)
class Value:
    """A typed value after parsing.

    ``magnitude`` and ``unit`` are what the user typed, with the unit in its canonical spelling
    (``"dBm"``, ``"uW"``, ``"dB/km"``, ``"kft"``). Keeping the typed form means a value typed in
    dBm converts back to dBm exactly.
    """

    kind: Kind
    magnitude: float
    unit: str
    #: The field the value was typed into; conversion refusals start with it.
    what: str = field(default="value", compare=False)

    def to(self, unit: str) -> float:
        """This value in ``unit`` (a canonical or typed spelling)."""
        return convert(self, unit)

    def __str__(self) -> str:
        return f"{format_number(self.magnitude)} {display_unit(self.unit)}"


def normalise_text(text: str) -> str:
    """Fold the characters people type in place of ASCII: Unicode minus, µ/μ, odd spaces."""
    for ch in _MINUS_SIGNS:
        text = text.replace(ch, "-")
    for ch in _MICRO_SIGNS:
        text = text.replace(ch, "u")
    for ch in _SPACES:
        text = text.replace(ch, " ")
    return text.strip()


def parse_number(text: str, what: str = "value") -> float:
    """Parse a bare number as people type it.

    Accepts a Unicode minus and a decimal comma when it cannot be a thousands separator
    (``-7,5`` is -7.5). Refuses ``1,234`` (could be 1.234 or 1234), a number holding both a comma
    and a point, NaN, infinity and empty text.

    Raises
    ------
    InputError
        With a message naming the problem.
    """
    number, rest = _split_number(normalise_text(text), what)
    if rest:
        raise InputError(
            f"{what}: '{_echo(rest)}' after the number is not expected; type a number only"
        )
    return number


def _split_number(text: str, what: str) -> tuple[float, str]:
    if not text:
        raise InputError(f"{what}: empty; type a number with its unit")
    lowered = text.lower().lstrip("+-").strip()
    if lowered.startswith("nan"):
        raise InputError(f"{what}: 'NaN' is not a number; type a measured value")
    if lowered.startswith(("inf", "∞")):
        raise InputError(f"{what}: infinity is not a value fieldkit can use")
    text = _fold_decimal_comma(text, what)
    match = _NUMBER.match(text)
    if not match:
        raise InputError(f"{what}: '{_echo(text)}' does not start with a number")
    number = float(match.group(0))
    if not math.isfinite(number):
        raise InputError(f"{what}: '{match.group(0)}' is too large to be a value")
    if _tiny(number) and any(d in "123456789" for d in match.group(0).lower().split("e")[0]):
        # 1e-400 would silently become 0 (and 1e-320 a number with a few digits left)
        raise InputError(f"{what}: '{match.group(0)}' is too close to zero to be a value")
    return number, text[match.end() :].strip()


_COMMA_NUMBER = re.compile(r"^([+-]?\d*),(\d+)(?![\d.,])")


def _fold_decimal_comma(text: str, what: str) -> str:
    head = re.match(r"^[+-]?[\d.,]+", text)
    if not head or "," not in head.group(0):
        return text
    digits = head.group(0)
    if "." in digits or digits.count(",") > 1:
        raise InputError(
            f"{what}: '{digits}' mixes separators; type the number with one decimal point "
            "and no thousands separator"
        )
    match = _COMMA_NUMBER.match(text)
    if not match:
        raise InputError(f"{what}: '{digits}' is not a number")
    whole, frac = match.groups()
    if len(frac) == 3 and whole.lstrip("+-"):
        raise InputError(
            f"{what}: '{digits}' is ambiguous: a decimal comma or a thousands separator? "
            "Type it with a decimal point"
        )
    return f"{whole}.{frac}" + text[match.end() :]


def canonical_unit(unit_text: str, what: str = "value") -> tuple[Kind, str]:
    """The kind and canonical spelling of a unit as typed.

    ``dBm``/``dbm``/``DBM`` are the same level unit; ``MW`` (megawatt) is refused rather than
    read as ``mW``.

    Raises
    ------
    InputError
        For an unknown or ambiguous unit.
    """
    unit = normalise_text(unit_text).replace(" ", "")
    if not unit:
        raise InputError(f"{what}: no unit; type one, e.g. dBm, dB, km")
    low = unit.lower()
    if low in ("dbm", "dbw", "db"):
        return (Kind.POWER if low != "db" else Kind.RATIO), {
            "dbm": "dBm",
            "dbw": "dBW",
            "db": "dB",
        }[low]
    if low == "%":
        return Kind.RATIO, "%"
    if low.startswith("db/") or low.startswith("dbper"):
        length = unit[3:] if low.startswith("db/") else unit[5:]
        kind, length_unit = canonical_unit(length, what)
        if kind is not Kind.LENGTH:
            raise InputError(
                f"{what}: an attenuation coefficient needs a length after 'dB/', not "
                f"'{_echo(length)}'"
            )
        return Kind.ATTENUATION, f"dB/{length_unit}"
    if low in _UNIT_WORDS:
        unit = _UNIT_WORDS[low]
    if unit in _LINEAR_UNITS:
        return _LINEAR_UNITS[unit][0], unit
    matches = [u for u in _LINEAR_UNITS if u.lower() == low]
    if len(matches) == 1:
        canonical = matches[0]
        typed_first, canon_first = unit[0], canonical[0]
        if (
            canon_first in _CASE_SENSITIVE_PREFIXES
            and typed_first == _CASE_SENSITIVE_PREFIXES[canon_first]
        ):
            raise InputError(
                f"{what}: '{_echo(unit)}' would mean {'mega' if typed_first == 'M' else 'peta'}-; "
                f"did you mean {display_unit(canonical)}? Type it with a lower-case "
                f"'{canon_first}'"
            )
        return _LINEAR_UNITS[canonical][0], canonical
    if unit in ("MW", "Mw"):
        raise InputError(f"{what}: 'MW' is megawatts; for milliwatts type mW")
    raise InputError(f"{what}: unknown unit '{_echo(unit_text.strip())}'")


def parse(
    text: str,
    expect: Kind | tuple[Kind, ...] | None = None,
    *,
    default_unit: str | None = None,
    what: str = "value",
) -> Value:
    """Parse typed text such as ``-7.5 dBm``, ``250 µW``, ``0.35 dB/km`` or ``1.2 kft``.

    Parameters
    ----------
    text
        What the user typed.
    expect
        The kind (or kinds) of quantity the field asks for; anything else is refused.
    default_unit
        The unit of a bare number (``"-7.5"`` in a dBm field). Without it a unit is required.
    what
        The field's name, used to start every error message.

    Raises
    ------
    InputError
        For empty text, NaN, infinity, an unknown unit, the wrong kind of quantity, or a linear
        power of zero or below (it has no level in dBm).
    """
    number, unit_text = _split_number(normalise_text(text), what)
    if not unit_text:
        if default_unit is None:
            raise InputError(f"{what}: {format_number(number)} needs a unit")
        unit_text = default_unit
    kind, unit = canonical_unit(unit_text, what)
    expected = (expect,) if isinstance(expect, Kind) else expect
    if expected is not None and kind not in expected:
        wanted = " or ".join(k.noun for k in expected)
        raise InputError(
            f"{what}: '{_echo(text.strip())}' is {kind.noun.split(' (')[0]}; {wanted} is needed "
            "here"
        )
    if kind is Kind.POWER and unit not in ("dBm", "dBW") and number <= 0:
        raise InputError(
            f"{what}: a power of {format_number(number)} {display_unit(unit)} has no level in dBm "
            "(the logarithm of zero or a negative power is undefined)"
        )
    if kind is Kind.RATIO and unit == "%" and not 0 < number:
        raise InputError(f"{what}: {format_number(number)} % transmitted has no value in dB")
    return Value(kind, number, unit, what)


def convert(value: Value, unit: str) -> float:
    """Express ``value`` in ``unit`` (same kind). Levels and linear powers convert both ways.

    .. math:: P_{mW} = 10^{L_{dBm}/10}, \\qquad L_{dBm} = 10 \\log_{10}(P / 1\\,mW)

    Raises
    ------
    InputError
        When ``unit`` measures something else.
    """
    kind, target = canonical_unit(unit, "unit")
    if kind is not value.kind:
        raise InputError(
            f"{value.what}: cannot convert {value} to {display_unit(target)}: "
            f"{value.kind.noun.split(' (')[0]} is not {kind.noun.split(' (')[0]}"
        )
    if value.unit == target:
        return value.magnitude
    try:
        result = _convert(value, kind, target)
    except OverflowError:
        result = math.inf
    except _Underflow as exc:
        raise InputError(f"{value.what}: {value} {exc}") from None
    except InputError as exc:  # from linear(): a length or power out of float range
        raise InputError(f"{value.what}: {exc}") from None
    if not math.isfinite(result):
        raise InputError(
            f"{value.what}: cannot convert {value} to {display_unit(target)}: the result is too "
            "large for a number"
        )
    return result


class _Underflow(ArithmeticError):
    """A power or ratio too small for a float; the message completes "<value> ..."."""


def _convert(value: Value, kind: Kind, target: str) -> float:
    if kind is Kind.POWER:
        # dBm and dBW differ by 30 dB exactly: no detour through a linear power that may not fit
        if value.unit == "dBm" and target == "dBW":
            return value.magnitude - 30.0
        if value.unit == "dBW" and target == "dBm":
            return value.magnitude + 30.0
        mw = _power_mw(value)
        if target == "dBm":
            return 10.0 * math.log10(mw)
        if target == "dBW":
            return 10.0 * math.log10(mw) - 30.0
        return linear(mw, "mW", target)
    if kind is Kind.RATIO:
        ratio = 10.0 ** (-value.magnitude / 10.0) if value.unit == "dB" else value.magnitude / 100.0
        if _tiny(ratio):
            raise _Underflow("passes less power than a number can hold; no value in % or dB")
        return 100.0 * ratio if target == "%" else -10.0 * math.log10(ratio)
    if kind is Kind.ATTENUATION:
        # dB per length: the number scales with the length unit, the dB do not.
        per_from = value.unit.split("/", 1)[1]
        per_to = target.split("/", 1)[1]
        return value.magnitude * linear(1.0, per_to, per_from)
    return linear(value.magnitude, value.unit, target)


def _power_mw(value: Value) -> float:
    if value.unit == "dBm":
        mw = 10.0 ** (value.magnitude / 10.0)
    elif value.unit == "dBW":
        mw = 10.0 ** ((value.magnitude + 30.0) / 10.0)
    else:
        mw = float(_pint_linear(value.magnitude, value.unit, "mW"))
    if _tiny(mw):
        # 10^(L/10) mW for L below about -3076 dBm is smaller than any float
        raise _Underflow("is below any measurable level (its power is too small for a number)")
    return mw


def linear(magnitude: float, from_unit: str, to_unit: str) -> float:
    """Convert a linear magnitude between canonical units through the registry.

    Raises
    ------
    InputError
        For a result too large or too small (but not zero) for a float.
    """
    if from_unit == to_unit:
        return magnitude
    result = _pint_linear(magnitude, from_unit, to_unit)
    shown = f"{format_number(magnitude)} {display_unit(from_unit)}"
    if not math.isfinite(result):
        raise InputError(f"{shown} is too large to express in {display_unit(to_unit)}")
    if _tiny(result) and magnitude != 0:
        raise InputError(f"{shown} is too small to express in {display_unit(to_unit)}")
    return result


def _pint_linear(magnitude: float, from_unit: str, to_unit: str) -> float:
    if from_unit == to_unit:
        return magnitude
    source = _LINEAR_UNITS[from_unit][1]
    target = _LINEAR_UNITS[to_unit][1]
    quantity: Any = ureg().Quantity(magnitude, source)
    return float(quantity.to(target).magnitude)


def units_of(kind: Kind) -> tuple[str, ...]:
    """The canonical units shown for a kind, in the order a technician reads them."""
    return {
        Kind.POWER: ("dBm", "dBW", "W", "mW", "uW", "nW"),
        Kind.RATIO: ("dB", "%"),
        Kind.ATTENUATION: ("dB/km", "dB/m", "dB/kft", "dB/mi"),
        Kind.LENGTH: ("m", "km", "ft", "kft", "mi"),
        Kind.TIME: ("s", "ms", "us", "ns"),
        Kind.FREQUENCY: ("THz", "GHz", "Hz"),
    }[kind]


def display_unit(unit: str) -> str:
    """The unit as the trade writes it (µ rather than u)."""
    if unit.startswith("u") and len(unit) > 1:
        return "\u00b5" + unit[1:]
    if unit.startswith("dB/u"):
        return "dB/\u00b5" + unit[4:]
    return unit


def format_number(number: float, digits: int = 6) -> str:
    """A number for display: ``digits`` significant figures, no exponent for everyday sizes."""
    if number == 0:
        return "0"
    magnitude = abs(number)
    if 1e-4 <= magnitude < 1e9:
        decimals = max(0, digits - 1 - math.floor(math.log10(magnitude)))
        text = f"{number:.{decimals}f}"
        if "." in text:
            text = text.rstrip("0").rstrip(".")
        return text.replace("-", "\u2212") if text.startswith("-") else text
    return f"{number:.{digits - 1}e}".replace("-", "\u2212", 1 if number < 0 else 0)
