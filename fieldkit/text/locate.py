"""The located fault as lines of text: ``fieldkit locate`` prints them and the fault workspace
shows them (a panel about 40 columns wide), so the two always say the same thing.

Digits follow the uncertainty (one rule, :func:`step_for`): a ± is shown to one significant
digit (two when it starts with 1), and the distance it belongs to is rounded to the same place,
so "2010 m ± 30 m", never "2009.9 m ± 30.2 m". The search window is rounded outwards to that
place, so it still holds the whole range.
"""

from __future__ import annotations

import math

from fieldkit.calc.locate import Location, Position, in_unit

__all__ = [
    "distance_text",
    "plus_minus",
    "report_lines",
    "result_lines",
    "search_text",
    "step_for",
    "term_text",
    "worst_text",
    "summary_line",
]

#: The finest step shown in each unit (a dig needs no more): 0.1 m, 1 ft.
_FINEST = {"m": 0.1, "km": 0.0001, "ft": 1.0, "mi": 0.0001}
_BASIS = {
    "model": "index and helix (no landmark)",
    "interpolated": "between landmarks",
    "extrapolated": "extrapolated past landmarks",
}
_SHORT_TERMS = {
    "instrument offset": "offset",
    "scale error": "scale",
    "sample spacing (fault reading)": "sampling",
    "group index": "index",
    "helix": "helix",
}


def step_for(uncertainty_m: float, unit: str = "m") -> float:
    """The rounding step (in ``unit``) that a ± of ``uncertainty_m`` allows: its first
    significant digit's place, or the second's when the first is 1 (common practice for
    quoting an uncertainty); never finer than the unit's finest step (0.1 m, 1 ft)."""
    finest = _FINEST[unit]
    u = abs(in_unit(uncertainty_m, unit))
    if not math.isfinite(u) or u <= finest:
        return finest
    exponent = math.floor(math.log10(u))
    first = round(u / 10**exponent)  # the ± to one significant digit
    if first >= 10:  # 9.6 -> 10: one place up
        exponent, first = exponent + 1, 1
    step = 10.0 ** (exponent - 1 if first == 1 else exponent)
    return max(finest, step)


def _decimals(step: float) -> int:
    return max(0, -math.floor(math.log10(step) + 1e-9))


def _fmt(value: float, step: float, unit: str) -> str:
    rounded = round(value / step) * step
    text = f"{rounded:.{_decimals(step)}f}"
    if text.lstrip("-").strip("0.") == "":
        text = text.lstrip("-")
    return f"{text.replace('-', '−')} {unit}"


def distance_text(distance_m: float, uncertainty_m: float, unit: str = "m") -> str:
    """A distance to the place its ± allows, with its unit: ``"2010 m"``."""
    return _fmt(in_unit(distance_m, unit), step_for(uncertainty_m, unit), unit)


def plus_minus(distance_m: float, uncertainty_m: float, unit: str = "m") -> str:
    """``"2010 m ± 30 m"``: the distance and its ± to the same place."""
    step = step_for(uncertainty_m, unit)
    return (
        f"{_fmt(in_unit(distance_m, unit), step, unit)} ± "
        f"{_fmt(in_unit(uncertainty_m, unit), step, unit)}"
    )


def term_text(uncertainty_m: float, unit: str = "m") -> str:
    """One uncertainty term, by the same rule as a ±: ``"30 m"``, ``"1.4 m"``."""
    return _fmt(in_unit(uncertainty_m, unit), step_for(uncertainty_m, unit), unit)


def worst_text(worst_m: float, unit: str = "m") -> str:
    """The worst case (all terms at once) to two significant digits, so it reads apart from the
    ± it is larger than: ``"34 m"``."""
    u = abs(in_unit(worst_m, unit))
    finest = _FINEST[unit]
    step = finest if u <= finest else max(finest, 10.0 ** (math.floor(math.log10(u)) - 1))
    return _fmt(u, step, unit)


def search_text(low_m: float, high_m: float, uncertainty_m: float, unit: str = "m") -> str:
    """The search window rounded outwards to the ±'s place: ``"from 1970 to 2050 m"``."""
    step = step_for(uncertainty_m, unit)
    low = math.floor(round(in_unit(low_m, unit) / step, 6)) * step
    high = math.ceil(round(in_unit(high_m, unit) / step, 6)) * step
    lo, hi = _fmt(max(0.0, low), step, unit), _fmt(high, step, unit)
    return f"from {lo.removesuffix(' ' + unit)} to {hi}"


def _offset_text(p: Position, unit: str) -> str:
    """``"1030 m past JC"``, ``"at JC"``: the nearest landmark, to the route's place."""
    assert p.offset_from_landmark_m is not None and p.nearest_landmark is not None
    step = step_for(p.uncertainty_m, unit)
    offset = in_unit(p.offset_from_landmark_m, unit)
    if abs(offset) < step / 2:
        return f"at {p.nearest_landmark}"
    side = "past" if offset > 0 else "before"
    return f"{_fmt(abs(offset), step, unit)} {side} {p.nearest_landmark}"


def _short_term(name: str) -> str:
    if name in _SHORT_TERMS:
        return _SHORT_TERMS[name]
    for long, short in (
        ("sample spacing (", "sampling "),
        ("route distance (", "route "),
        ("instrument offset (", "offset "),
    ):
        if name.startswith(long):
            return short + name[len(long) :].rstrip(")")
    return name


def _has_landmark(p: Position) -> bool:
    """A nearest landmark worth naming: not the start when no landmark was given."""
    return (
        p.nearest_landmark is not None
        and p.offset_from_landmark_m is not None
        and not (p.nearest_landmark == "start" and p.basis == "model")
    )


#: The sheath row when it says what the route row says: why the two agree.
SHEATH_SAME = "sheath   same as route (no slack loop before it)"


def position_rows(p: Position, unit: str) -> list[str]:
    """Route (with its ±), the search window, the nearest landmark, the marking, fibre and
    sheath (sheath only when it differs from the route, else why they agree) and the basis."""
    route = plus_minus(p.route_distance_m, p.uncertainty_m, unit)
    rows = [
        f"route    {route}",
        f"search   {search_text(p.low_m, p.high_m, p.uncertainty_m, unit)}",
    ]
    if _has_landmark(p):
        rows.append(f"nearest  {_offset_text(p, unit)}")
    if p.marking is not None:
        lo, hi = sorted((p.marking.low, p.marking.high))
        rows.append(f"marking  {p.marking.value:.0f} {p.marking.unit} ({lo:.0f}–{hi:.0f})")
    rows.append(f"fibre    {plus_minus(p.fibre_distance_m, p.fibre_uncertainty_m, unit)}")
    sheath = plus_minus(p.sheath_distance_m, p.sheath_uncertainty_m, unit)
    rows.append(SHEATH_SAME if sheath == route else f"sheath   {sheath}")
    basis = _BASIS[p.basis]
    if p.basis == "interpolated" and p.between:
        basis += f" {p.between[0]}–{p.between[1]}"
    rows.append(f"basis    {basis}")
    return rows


def result_lines(location: Location, unit: str) -> list[str]:
    """The result as short lines for a panel about 40 columns wide."""
    p = location.position
    lines = position_rows(p, unit)
    terms = sorted((c for c in p.contributions if c.route_m >= 0.05), key=lambda c: -c.route_m)
    lines.append(f"The ± {term_text(p.uncertainty_m, unit)} combines these (root-sum-square):")
    lines.append(
        ", ".join(f"{_short_term(c.name)} {term_text(c.route_m, unit)}" for c in terms)
        or "no term above 0.05 m"
    )
    lines.append(f"All at their worst at once: ± {worst_text(p.worst_case_m, unit)}.")
    two = location.two_ended
    if two is not None:
        verdict = "consistent" if two.consistent else "NOT consistent"
        tol = step_for(two.tolerance_m, unit)
        lines.append(
            f"Two ends: A + B − total = {_fmt(in_unit(two.discrepancy_m, unit), tol, unit)} "
            f"(± {_fmt(in_unit(two.tolerance_m, unit), tol, unit)}), {verdict}"
        )
        lines.append("Combined from both ends:")
        lines += position_rows(two.combined, unit)
    return lines


def summary_line(location: Location, unit: str) -> str:
    """One line: the route position, its ± and the nearest landmark."""
    p = location.position
    where = f" · {_offset_text(p, unit)}" if _has_landmark(p) else ""
    return f"Fault {plus_minus(p.route_distance_m, p.uncertainty_m, unit)}{where}"


def report_lines(location: Location, unit: str = "m", notes: list[str] | None = None) -> list[str]:
    """What ``fieldkit locate`` prints (the cautions are the caller's): the workspace's result
    lines under a heading, then the notes and the warnings."""
    lines = ["Fault from the start (end A):"]
    lines += [f"  {line}" for line in result_lines(location, unit)]
    lines += list(notes or [])
    lines += [f"Warning: {w}" for w in location.warnings]
    return lines
