"""Named field parsers: one rule per field, used by the CLI, the workspaces and preset files.

Each parser takes what the user typed and returns a typed value or raises
:class:`fieldkit.calc.units.InputError` with one line naming the field and the problem.
"""

from __future__ import annotations

import re

from fieldkit.calc.splicing import PlanRange
from fieldkit.calc.units import InputError, Kind, parse, parse_number

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
