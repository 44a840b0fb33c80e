"""Plain text and CSV traces: two columns, distance and level.

Accepted shapes:

- a header line naming each column and its unit: ``distance_km,level_db``,
  ``distance_m;level_db``, ``distance (ft)<TAB>level (dB)``; or no header and the units given
  as options (``distance_unit``);
- comma, semicolon, tab or space separated; lines starting with ``#`` are comments;
- a decimal comma where it cannot be a separator: in a semicolon-, tab- or space-separated
  file a number such as ``1,25`` is 1.25. A number holding both a point and a comma
  (``1.234,5``) is refused: thousands separators are never guessed.

Distances must increase. A trace whose spacing varies by more than 1 % is resampled onto its
median spacing by linear interpolation (said in the trace's notes).
"""

from __future__ import annotations

import re

import numpy as np

from fieldkit.traces.model import Trace, TraceFileError

#: Metres per unit: the international foot is exactly 0.3048 m and the mile 1609.344 m by
#: definition (1959 international yard and pound agreement).
DISTANCE_UNITS: dict[str, float] = {
    "m": 1.0,
    "km": 1000.0,
    "ft": 0.3048,
    "kft": 304.8,
    "mi": 1609.344,
}
MIN_POINTS = 40
MAX_TEXT_BYTES = 64 * 1024 * 1024

_NUMBER = re.compile(r"^[+\-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+\-]?\d+)?$")
_HEADER_DISTANCE = re.compile(
    r"^(?:distance|dist|x|position)[\s_\-]*[\(\[]?\s*(?P<unit>km|kft|ft|mi|m)?\s*[\)\]]?$", re.I
)
_HEADER_LEVEL = re.compile(
    r"^(?:level|y|power|backscatter)[\s_\-]*[\(\[]?\s*(?P<unit>db)?\s*[\)\]]?$", re.I
)


def _split(line: str, sep: str | None) -> list[str]:
    if sep is None:
        return line.split()
    return [p.strip() for p in line.split(sep)]


def _detect_sep(line: str) -> str | None:
    for sep in ("\t", ";", ","):
        if sep in line:
            return sep
    return None


def read_text(
    text: str,
    source: str,
    *,
    distance_unit: str | None = None,
    wavelength_nm: float | None = None,
    pulse_width_ns: float | None = None,
    group_index: float | None = None,
) -> Trace:
    """A :class:`Trace` from a two-column text trace (shapes in the module docstring).

    Raises
    ------
    TraceFileError
        One line naming ``source`` and the first problem (the line number where there is one).
    """
    if "\0" in text:
        raise TraceFileError(f"{source}: not a text trace (it holds binary data)")
    lines = text.lstrip("\ufeff").splitlines()
    rows: list[tuple[int, str]] = [
        (k + 1, ln.strip())
        for k, ln in enumerate(lines)
        if ln.strip() and not ln.lstrip().startswith("#")
    ]
    if not rows:
        raise TraceFileError(f"{source}: an empty trace file")
    sep = _detect_sep(rows[0][1])
    first = _split(rows[0][1], sep)
    unit = distance_unit
    if len(first) >= 2 and not _NUMBER.match(first[0].replace("\u2212", "-")):
        if len(first) != 2:
            raise TraceFileError(
                f"{source}: line {rows[0][0]}: expected two columns (distance and level), "
                f"found {len(first)}"
            )
        dist_m = _HEADER_DISTANCE.match(first[0])
        level_m = _HEADER_LEVEL.match(first[1])
        if not dist_m or not level_m:
            raise TraceFileError(
                f"{source}: line {rows[0][0]}: header {rows[0][1]!r} does not name a distance "
                "and a level column (e.g. distance_km,level_db)"
            )
        header_unit = (dist_m.group("unit") or "").lower() or None
        if header_unit and unit and header_unit != unit:
            raise TraceFileError(
                f"{source}: the header says distance in {header_unit}, the option says {unit}"
            )
        unit = header_unit or unit
        rows = rows[1:]
        if len(rows) > 0:
            sep = _detect_sep(rows[0][1]) if sep is None else sep
    if unit is None:
        raise TraceFileError(
            f"{source}: the distance unit is not named: add a header such as distance_m,level_db "
            "or give --distance-unit"
        )
    if unit not in DISTANCE_UNITS:
        raise TraceFileError(f"{source}: unknown distance unit {unit!r} (m, km, ft, kft, mi)")
    comma_is_decimal = sep != ","
    if len(rows) < MIN_POINTS:
        raise TraceFileError(f"{source}: {len(rows)} points; a trace needs at least {MIN_POINTS}")
    dist = np.empty(len(rows))
    level = np.empty(len(rows))
    for k, (number, line) in enumerate(rows):
        parts = _split(line, sep)
        if len(parts) != 2:
            raise TraceFileError(
                f"{source}: line {number}: expected two values (distance and level), found "
                f"{len(parts)}"
            )
        dist[k] = _number(parts[0], source, number, comma_is_decimal)
        level[k] = _number(parts[1], source, number, comma_is_decimal)
    dist *= DISTANCE_UNITS[unit]
    steps = np.diff(dist)
    if (steps <= 0).any():
        bad = int(np.flatnonzero(steps <= 0)[0]) + 1
        raise TraceFileError(f"{source}: line {rows[bad][0]}: the distance does not increase")
    spacing = float(np.median(steps))
    notes: tuple[str, ...] = ()
    if float(np.max(np.abs(steps - spacing))) > 0.01 * spacing:
        grid = dist[0] + np.arange(int((dist[-1] - dist[0]) / spacing) + 1) * spacing
        level = np.interp(grid, dist, level)
        notes = (f"resampled onto a uniform {spacing:g} m spacing",)
    return Trace(
        level_db=level,
        spacing_m=spacing,
        source=source,
        file_format="text",
        start_m=float(dist[0]),
        wavelength_nm=wavelength_nm,
        pulse_width_ns=pulse_width_ns,
        group_index=group_index,
        notes=notes,
    )


def _number(text: str, source: str, line: int, comma_is_decimal: bool) -> float:
    t = text.replace("\u2212", "-").strip()
    if not _NUMBER.match(t):
        if "," in t and "." in t:
            raise TraceFileError(
                f"{source}: line {line}: {text!r} holds both a point and a comma; write the "
                "number without thousands separators"
            )
        raise TraceFileError(f"{source}: line {line}: {text!r} is not a number")
    if "," in t:
        if not comma_is_decimal:
            raise TraceFileError(f"{source}: line {line}: {text!r} is not a number")
        t = t.replace(",", ".")
    value = float(t)
    if not np.isfinite(value):
        raise TraceFileError(f"{source}: line {line}: {text!r} is not a finite number")
    return value
