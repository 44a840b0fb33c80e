"""The located fault as lines of text: ``fieldkit locate`` prints them and the fault workspace
shows them (a panel about 40 columns wide), so the two always say the same thing."""

from __future__ import annotations

from fieldkit.calc.locate import Location, Position, describe_offset, format_distance

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


def position_rows(p: Position, unit: str) -> list[str]:
    def f(x: float) -> str:
        return format_distance(x, unit)

    rows = [
        f"route    {f(p.route_distance_m)} ± {f(p.uncertainty_m)}",
        f"look     {f(p.low_m)} to {f(p.high_m)}",
    ]
    if _has_landmark(p) and p.nearest_landmark is not None and p.offset_from_landmark_m is not None:
        where = describe_offset(p.offset_from_landmark_m, p.nearest_landmark, unit)
        rows.append(f"nearest  {where}")
    if p.marking is not None:
        lo, hi = sorted((p.marking.low, p.marking.high))
        rows.append(f"marking  {p.marking.value:.0f} {p.marking.unit} ({lo:.0f}–{hi:.0f})")
    rows += [
        f"fibre    {f(p.fibre_distance_m)} ± {f(p.fibre_uncertainty_m)}",
        f"sheath   {f(p.sheath_distance_m)} ± {f(p.sheath_uncertainty_m)}",
    ]
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
    worst = format_distance(p.worst_case_m, unit)
    lines.append(f"± is the root-sum-square of (worst case ± {worst}):")
    lines.append(
        ", ".join(f"{_short_term(c.name)} {format_distance(c.route_m, unit)}" for c in terms)
        or "no term above 0.05 m"
    )
    two = location.two_ended
    if two is not None:
        verdict = "consistent" if two.consistent else "NOT consistent"
        lines.append(
            f"Two ends: A + B − total = {format_distance(two.discrepancy_m, unit)} "
            f"(± {format_distance(two.tolerance_m, unit)}), {verdict}"
        )
        lines.append("Combined from both ends:")
        lines += position_rows(two.combined, unit)
    return lines


def summary_line(location: Location, unit: str) -> str:
    """One line: the route position, its ± and the nearest landmark."""
    p = location.position
    where = ""
    if _has_landmark(p) and p.nearest_landmark and p.offset_from_landmark_m is not None:
        where = f" · {describe_offset(p.offset_from_landmark_m, p.nearest_landmark, unit)}"
    return (
        f"Fault {format_distance(p.route_distance_m, unit)} ± "
        f"{format_distance(p.uncertainty_m, unit)}{where}"
    )


def report_lines(location: Location, unit: str = "m", notes: list[str] | None = None) -> list[str]:
    """What ``fieldkit locate`` prints (the cautions are the caller's): the workspace's result
    lines under a heading, then the notes and the warnings."""
    lines = ["Fault from the start (end A):"]
    lines += [f"  {line}" for line in result_lines(location, unit)]
    lines += list(notes or [])
    lines += [f"Warning: {w}" for w in location.warnings]
    return lines
