"""Named field parsers: one rule per field, used by the CLI, the workspaces and files alike.

Each parser takes what a person typed (or a number from a file) and the field's name, and returns
a bare value in the unit of its name, or raises :class:`fieldkit.calc.units.InputError` with one
line naming the field and the problem. Nothing here knows about the terminal, argparse or Textual.
"""

from __future__ import annotations

import math
import re
from typing import Any

from fieldkit.calc import budget as b
from fieldkit.calc.fibre import check_wavelength_nm
from fieldkit.calc.splicing import PlanRange
from fieldkit.calc.units import (
    InputError,
    Kind,
    display_unit,
    format_number,
    parse,
    parse_number,
)

#: The largest cables made hold 6912 fibres (common practice).
MAX_FIBRE_NUMBER = 6912


def fibre_number(text: str, what: str = "fibre", *, count: int | None = None) -> int:
    """A fibre number 1..``count`` (1..6912 when the cable's count is not known)."""
    number = parse_number(text, what)
    if number != int(number) or number < 1:
        raise InputError(f"{what}: {text.strip()} is not a fibre number (1, 2, 3 ...)")
    if count is not None and number > count:
        raise InputError(f"{what}: {int(number)} is past the cable's {count} fibres")
    if number > MAX_FIBRE_NUMBER:
        raise InputError(
            f"{what}: {text.strip()} is more fibres than any cable holds (at most "
            f"{MAX_FIBRE_NUMBER})"
        )
    return int(number)


def count(text: str, what: str, *, high: int = MAX_FIBRE_NUMBER) -> int:
    """A whole number 1..``high`` (a fibre count, fibres per tube, a tray number or size)."""
    number = parse_number(text, what)
    if number != int(number) or not 1 <= number <= high:
        raise InputError(f"{what}: {text.strip()} is not a whole number from 1 to {high}")
    return int(number)


def splice_loss_db(text: str, what: str = "splice loss") -> float:
    """A splice loss in dB (a bare number is dB). A level in dBm is refused: a loss is a
    ratio. A one-way OTDR value may be negative (a gainer) down to −5 dB; up to 20 dB."""
    value = parse(text, Kind.RATIO, default_unit="dB", what=what)
    if value.unit != "dB":
        raise InputError(f"{what}: type the loss in dB, e.g. 0.05")
    loss = value.to("dB")
    if not -5.0 <= loss <= 20.0:
        raise InputError(
            f"{what}: {loss:g} dB is not a splice loss (one-way OTDR values run from about "
            "−1 to a few dB)"
        )
    return loss


_ARROW = re.compile(r"\s*(?:→|->|=>|>)\s*")
_SIDE = re.compile(r"^(?:(?P<cable>.+?)\s*:\s*)?(?P<first>\d+)(?:\s*[-–]\s*(?P<last>\d+))?$")


def _side(text: str, default_cable: str, what: str) -> tuple[str, int | None, int | None]:
    text = text.strip()
    match = _SIDE.match(text)
    if match is None:
        # A bare cable name: "drop 13-24 > D" starts at the cable's fibre 1.
        if text and not any(ch.isdigit() for ch in text[:1]):
            return (text, None, None)
        raise InputError(f"{what}: '{text}' is not a fibre range such as 1-12 or C2:25-36")
    cable = (match.group("cable") or default_cable).strip()
    first = int(match.group("first"))
    last = int(match.group("last") or first)
    if first < 1 or last < first:
        raise InputError(f"{what}: '{text}' is not a fibre range (first 1 or more, then a larger)")
    return (cable, first, last)


def splice_plan(
    text: str, cable_a: str, cable_b: str, count_a: int | None = None, what: str = "plan"
) -> list[PlanRange]:
    """A splice plan as typed: rows separated by ``;`` or new lines.

    - ``straight``: every fibre of ``cable_a`` to the same number of ``cable_b`` (needs
      ``count_a``);
    - ``1-12 > 25-36`` (or ``→``, ``->``): a range to a range of the same length, or to
      a start (``1-12 > 25``); either side may name its cable, ``C2:25-36``;
    - ``drop 13-24 > D``: those fibres go to another cable (from its fibre 1, or ``D:5``);
    - ``park 25-36``: those fibres are cut and stored, not spliced here.
    """
    rows: list[PlanRange] = []
    for raw in re.split(r"[;\n]", text):
        line = raw.strip()
        if not line:
            continue
        low = line.casefold()
        if low in ("straight", "straight through", "straight-through"):
            if count_a is None:
                raise InputError(f"{what}: 'straight' needs cable {cable_a}'s fibre count")
            rows.append(PlanRange(cable_a, 1, count_a, cable_b, 1))
            continue
        word, _, rest = line.partition(" ")
        if word.casefold() in ("park", "cut"):
            cable, first, last = _side(rest, cable_a, what)
            if first is None or last is None:
                raise InputError(f"{what}: '{line}' needs the fibres to park, e.g. park 25-36")
            rows.append(PlanRange(cable, first, last))
            continue
        if word.casefold() == "drop":
            line = rest
        parts = _ARROW.split(line)
        if len(parts) != 2:
            raise InputError(
                f"{what}: '{raw.strip()}' is not a plan row (straight; 1-12 > 25-36; "
                "drop 13-24 > D; park 25-36)"
            )
        a_cable, a_first, a_last = _side(parts[0], cable_a, what)
        if a_first is None or a_last is None:
            raise InputError(f"{what}: '{parts[0].strip()}' needs fibre numbers")
        b_cable, b_first, b_last = _side(parts[1], cable_b, what)
        length = a_last - a_first + 1
        if b_first is None:
            b_first = 1
        elif b_last is not None and b_last != b_first and b_last - b_first + 1 != length:
            raise InputError(
                f"{what}: '{raw.strip()}' maps {length} fibres onto {b_last - b_first + 1}"
            )
        rows.append(PlanRange(a_cable, a_first, a_last, b_cable, b_first))
    if not rows:
        raise InputError(f"{what}: is empty (e.g. straight, or 1-12 > 25-36)")
    return rows


def plan_text(rows: list[PlanRange], cable_a: str, cable_b: str) -> str:
    """A plan written back the way :func:`splice_plan` reads it."""

    def side(cable: str, first: int, last: int, default: str) -> str:
        span = f"{first}" if first == last else f"{first}-{last}"
        return span if cable == default else f"{cable}:{span}"

    out = []
    for row in rows:
        if row.cable_b is None or row.first_b is None or row.last_b is None:
            out.append("park " + side(row.cable_a, row.first_a, row.last_a, cable_a))
        else:
            out.append(
                side(row.cable_a, row.first_a, row.last_a, cable_a)
                + " > "
                + side(row.cable_b, row.first_b, row.last_b, cable_b)
            )
    return "; ".join(out)


#: The most things of one kind fieldkit counts in a link (connections, splices, components).
MAX_COUNT = 10_000

_SPLITTER = re.compile(r"^\s*([12])\s*[x×X:]\s*(\d+)\s*$")
_PAIR = re.compile(r"^\s*(\d+(?:[.,]\d+)?\s*(?:nm)?)\s*[=:@]\s*(.+?)\s*$")


def _text_or_number(value: Any, what: str) -> str:
    if isinstance(value, bool) or value is None:
        raise InputError(f"{what}: {value!r} is not a value")
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise InputError(f"{what}: {value} is not a finite number")
        return repr(value)
    if isinstance(value, str):
        return value
    raise InputError(f"{what}: {value!r} is not a value")


#: The units a fibre length is typed in, as a refusal lists them.
LENGTH_UNITS = "m, km, ft, kft, mi"
#: Length units no fibre link is measured in: a wavelength's and a core's (a link length in nm
#: is a wavelength typed in the wrong field, or a slip for m).
_NOT_LINK_LENGTHS = ("nm", "um")


def length_m(value: Any, what: str = "length") -> float:
    """A length typed with its unit ("12.4 km", "3900 ft"), in m. Refused: a negative length
    (said in the unit typed), a length in nm or µm (wavelength units), and any other quantity
    (a level, a loss), each naming the fibre-length units."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        _text_or_number(value, what)  # NaN and infinity are refused as such
        raise InputError(f"{what}: {format_number(float(value))} needs a unit ({LENGTH_UNITS})")
    text = _text_or_number(value, what)
    typed = parse(text, what=what) if _has_unit(text, what) else None
    if typed is None:
        number = format_number(parse_number(text, what))
        raise InputError(f"{what}: {number} needs a unit ({LENGTH_UNITS})")
    if typed.kind is not Kind.LENGTH:
        raise InputError(
            f"{what}: '{text.strip()}' is {typed.kind.noun.split(' (')[0]}; a fibre length "
            f"({LENGTH_UNITS}) is needed here"
        )
    if typed.unit in _NOT_LINK_LENGTHS:
        raise InputError(
            f"{what}: {typed} is not a link length ({display_unit(typed.unit)} measures "
            f"wavelengths); type it in {LENGTH_UNITS}"
        )
    if typed.magnitude < 0:
        raise InputError(f"{what}: {typed} is negative")
    metres = typed.to("m")
    if not math.isfinite(metres) or metres > b.MAX_LENGTH_M:
        raise InputError(f"{what}: {value} is longer than any fibre link; check the unit")
    return metres


def _has_unit(text: str, what: str) -> bool:
    """True when ``text`` is a number followed by something (a unit, or junk to refuse)."""
    try:
        parse_number(text, what)
    except InputError:
        return True
    return False


def otdr_distance_m(text: str, what: str = "distance") -> float:
    """A distance as an OTDR shows it, in m. A bare number is refused: instruments show km or m
    depending on the range, so "3.412" could be 3.412 km or 3.412 m.

    Raises
    ------
    InputError
        For a number without a unit (asking for one), or anything :func:`length_m` refuses.
    """
    try:
        number = parse_number(text, what)
    except InputError:
        return length_m(text, what)
    shown = format_number(number)
    if number < 0:
        raise InputError(f"{what}: {shown} is negative; an OTDR distance is 0 or more")
    raise InputError(f"{what}: {shown} needs a unit, as the OTDR shows it: {shown} km or {shown} m")


def loss_db(value: Any, what: str = "loss") -> float:
    """A loss in dB (a bare number is dB); negative refused."""
    db = parse(_text_or_number(value, what), Kind.RATIO, default_unit="dB", what=what).to("dB")
    if db < 0:
        raise InputError(f"{what}: {format_number(db)} dB is negative; a loss is 0 or more")
    if db > b.MAX_LOSS_DB:
        raise InputError(
            f"{what}: {format_number(db)} dB is more than fieldkit accepts "
            f"({format_number(b.MAX_LOSS_DB)} dB); check the unit"
        )
    return db


def attenuation_db_per_km(value: Any, what: str = "attenuation") -> float:
    """An attenuation coefficient with its length unit ("0.35 dB/km", "0.1 dB/kft")."""
    text = _text_or_number(value, what)
    try:
        coef = parse(text, Kind.ATTENUATION, what=what).to("dB/km")
    except InputError as exc:
        if re.fullmatch(r"\s*[-+]?[\d.,]+\s*(dB)?\s*", text, flags=re.IGNORECASE):
            raise InputError(
                f"{what}: '{text.strip()}' has no length unit; type it as dB/km, dB/kft, dB/mi "
                "or dB/m"
            ) from None
        raise exc
    if coef < 0:
        raise InputError(f"{what}: {format_number(coef)} dB/km is negative")
    if coef > 1000:
        raise InputError(
            f"{what}: {format_number(coef)} dB/km is more than any fibre; check the unit"
        )
    return coef


def attenuation_entry(values: str | list[str], what: str = "attenuation") -> str | dict[str, str]:
    """Typed attenuation as a link description keeps it: one coefficient for every wavelength,
    or ``NM=COEF`` per wavelength, separated by ``;`` (``1310=0.35 dB/km; 1550=0.22 dB/km``) or
    given one per option (``--attenuation 1310=... --attenuation 1550=...``). The same rule for
    the command line and the workspace.

    Raises
    ------
    InputError
        For a mix of bare coefficients and pairs, or more than one bare coefficient.
    """
    texts = [values] if isinstance(values, str) else list(values)
    parts = [p for text in texts for p in text.split(";") if p.strip()]
    pairs = [_PAIR.match(p) for p in parts]
    if parts and all(pairs):
        return {m.group(1).strip(): m.group(2) for m in pairs if m}
    if len(parts) == 1:
        return parts[0]
    if not parts:
        raise InputError(f"{what}: empty; type a coefficient such as 0.35 dB/km")
    raise InputError(
        f"{what}: give one coefficient, or NM=COEF for each wavelength (separated by ';')"
    )


def wavelength_nm(value: Any, what: str = "wavelength") -> float:
    """A wavelength in nm (a bare number is nm), inside the fibre bands
    (:data:`fieldkit.calc.fibre.FIBRE_BAND_NM`)."""
    nm = parse(_text_or_number(value, what), Kind.LENGTH, default_unit="nm", what=what).to("nm")
    return check_wavelength_nm(nm, what)


def wavelength_list(value: Any, what: str = "wavelength") -> list[float]:
    """Wavelengths typed as one value or a list ("1310, 1550", "1310 1550 nm").

    Commas separate wavelengths here: "1310,1550" is two wavelengths, never 1310.155 nm; so
    does "/", as meters and data sheets write a pair ("1310/1550").
    """
    if isinstance(value, (list, tuple)):
        return [nm for v in value for nm in wavelength_list(v, what)]
    if isinstance(value, str):
        parts = [p for p in re.split(r"[,;/\s]+(?!nm\b)", value.strip()) if p]
        if not parts:
            raise InputError(f"{what}: empty; type a wavelength in nm, e.g. 1310")
        return [wavelength_nm(p, what) for p in parts]
    return [wavelength_nm(value, what)]


#: How many wavelengths one meter session measures at a time.
MAX_WAVELENGTHS = 4


def meter_wavelengths(text: str, what: str = "wavelengths") -> list[float]:
    """The wavelengths a meter session tests: one to :data:`MAX_WAVELENGTHS`, each by
    :func:`wavelength_list` (in the fibre bands; ",", "/" or spaces between), none twice
    (within 0.5 nm), rounded to 0.001 nm."""
    if not text.replace("/", " ").strip():
        raise InputError(f"{what}: type at least one, e.g. 1310 1550")
    out: list[float] = []
    for nm in wavelength_list(text, "wavelength"):
        if any(abs(nm - w) <= 0.5 for w in out):
            raise InputError(f"wavelength: {nm:g} nm is listed twice")
        out.append(round(nm, 3))
    if len(out) > MAX_WAVELENGTHS:
        raise InputError(f"{what}: at most {MAX_WAVELENGTHS} at a time")
    return out


#: The directions field: what each answer means.
DIRECTION_WORDS = {"1": "A→B", "2": "both"}


def directions(text: str, what: str = "directions") -> list[str]:
    """How many directions each fibre is measured in: ``1`` (A->B) or ``2`` (A->B, B->A)."""
    value = text.strip()
    if value not in DIRECTION_WORDS:
        raise InputError(f"{what}: 1 (A->B only) or 2 (both directions)")
    return ["A->B"] if value == "1" else ["A->B", "B->A"]


def item_count(value: Any, what: str) -> int:
    """A whole number of things in a link (connections, splices, components), 0 or more."""
    if isinstance(value, bool):
        raise InputError(f"{what}: {value!r} is not a number")
    number = value if isinstance(value, int) else parse_number(_text_or_number(value, what), what)
    if isinstance(number, float):
        if not number.is_integer():
            raise InputError(f"{what}: {format_number(number)} is not a whole number")
        number = int(number)
    if number < 0:
        raise InputError(f"{what}: {number} is negative")
    if number > MAX_COUNT:
        shown = str(number) if number < 10**12 else f"a {len(str(number))}-digit number"
        raise InputError(f"{what}: {shown} is more than fieldkit will count ({MAX_COUNT})")
    return int(number)


def splitter(text: Any, what: str = "splitter") -> tuple[int, int]:
    """``"1x32"``, ``"1×32"`` or ``"1:32"`` → (1, 32); 1xN and 2xN with N ≥ 2. The one rule
    for a split, in the link description (the CLI) and the workspace's Split field alike."""
    if not isinstance(text, str):
        raise InputError(f"{what}: write the split as 1xN or 2xN, e.g. 1x32 or 1:32")
    match = _SPLITTER.match(text)
    if not match:
        raise InputError(f"{what}: '{text}' is not 1xN or 2xN (e.g. 1x32 or 1:32)")
    inputs, outputs = int(match.group(1)), int(match.group(2))
    if outputs < 2:
        raise InputError(f"{what}: {text} has fewer than 2 outputs")
    if outputs > 1024:
        raise InputError(f"{what}: {outputs} outputs is more than a passive splitter has")
    return inputs, outputs


def level_dbm(value: Any, what: str) -> float:
    """A transmitter or receiver level typed in dBm or dBW or a linear power; a bare number is
    dBm. (Meter readings go through :func:`fieldkit.calc.reference.level_dbm`, which also
    refuses levels no power meter reads.)"""
    return parse(_text_or_number(value, what), Kind.POWER, default_unit="dBm", what=what).to("dBm")


def bit_rate_gbd(value: Any, what: str = "bit rate") -> float:
    """A line rate in GBd (a bare number is GBd; ``10.3125 Gb/s`` and ``1250 MBd`` too)."""
    text = _text_or_number(value, what).strip()
    match = re.fullmatch(r"(.*?)\s*([GM])(?:b/s|bps|bd|baud)?", text, flags=re.IGNORECASE)
    scale = 1.0
    if match and match.group(1):
        text, scale = match.group(1), (1.0 if match.group(2).upper() == "G" else 1e-3)
    rate = parse_number(text, what) * scale
    if not 0.0 < rate <= 1000.0:
        raise InputError(f"{what}: {format_number(rate)} GBd is outside 0–1000 GBd")
    return rate


def spectral_width_nm(value: Any, what: str = "spectral width") -> float:
    """A source's RMS spectral width in nm (a bare number is nm; ``0.1 nm`` too)."""
    text = _text_or_number(value, what).strip()
    if text.lower().endswith("nm"):
        text = text[:-2]
    width = parse_number(text, what)
    if not 0.0 < width <= 100.0:
        raise InputError(f"{what}: {format_number(width)} nm is outside 0–100 nm")
    return width
