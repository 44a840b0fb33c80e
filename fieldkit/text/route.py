"""A route drawn in text: the start, landmarks, slack loops and the located fault with its range.

Two parts, both fitting a width (44 columns and up, narrower if need be):

- a strip to scale, ``├──1────∞───2───[═X═]──3``: the start, each landmark by its number, each
  slack loop as ``∞``, the search range in brackets and the fault as ``X``;
- a legend (the key) in route order, one entry per point, the fault's giving its range; an
  entry too long for the width goes on under its label rather than being cut.

Pure (text in, lines out): the fault workspace's :class:`~fieldkit.tui.widgets.route_diagram.
RouteDiagram` shows it, and it is tested without a terminal.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from fieldkit.calc.locate import format_distance, in_unit
from fieldkit.calc.units import linear
from fieldkit.text.layout import wrap
from fieldkit.text.locate import distance_text, search_text, step_for

__all__ = ["FAULT_SYMBOL", "FaultMark", "RoutePoint", "render_route", "route_lines"]


@dataclass(frozen=True, slots=True)
class RoutePoint:
    """A point to draw: ``kind`` is "landmark" or "slack"."""

    kind: str
    name: str
    route_m: float


@dataclass(frozen=True, slots=True)
class FaultMark:
    """The located fault: its route position, the search window and the ± (which sets the
    digits shown, as in the result lines)."""

    route_m: float
    low_m: float
    high_m: float
    uncertainty_m: float = 0.0


_LANDMARK_SYMBOLS = "123456789ABCDEFGHIJKLMNOPQRSTUVWYZ"
_SLACK = "∞"
FAULT_SYMBOL = _FAULT = "X"


def _symbol(index: int) -> str:
    return _LANDMARK_SYMBOLS[index] if index < len(_LANDMARK_SYMBOLS) else "+"


def render_route(
    points: Sequence[RoutePoint], fault: FaultMark | None, width: int, unit: str = "m"
) -> list[str]:
    """The diagram as lines no wider than ``width``: see :func:`route_lines`."""
    return [line for line, _ in route_lines(points, fault, width, unit)]


def route_lines(
    points: Sequence[RoutePoint], fault: FaultMark | None, width: int, unit: str = "m"
) -> list[tuple[str, bool]]:
    """The diagram as (line, is the fault's) pairs, lines no wider than ``width`` (at least 20).

    A legend line longer than ``width`` goes on under its label (a word longer than the room
    left is cut with "…", the only cut). Landmarks are numbered 1, 2, 3 ... in route order on
    the strip and in the legend.
    """
    width = max(20, width)
    if not points and fault is None:
        return []  # nothing typed yet: no scale to show
    ordered = sorted(points, key=lambda p: (p.route_m, p.kind))
    # A little room past the furthest point, so a fault at the end still shows its range.
    # The end rounded up to about three digits, so the scale's label is the end exactly.
    end_m = 1.05 * max([p.route_m for p in ordered] + ([fault.high_m] if fault else []) + [1.0])
    end_step = step_for(end_m / 100, unit)
    end_in_unit = math.ceil(round(in_unit(end_m, unit) / end_step, 6)) * end_step
    end_m = end_in_unit if unit == "m" else linear(end_in_unit, unit, "m")
    cols = width - 1

    def col(x: float) -> int:
        return max(0, min(cols, round(x / end_m * cols)))

    strip = ["─"] * width
    strip[0] = "├"
    if fault is not None:
        lo, hi = col(fault.low_m), col(fault.high_m)
        for i in range(lo, hi + 1):
            strip[i] = "═"
        if hi - lo >= 2:
            strip[lo], strip[hi] = "[", "]"
    symbols: dict[int, str] = {}
    number = 0
    for p in ordered:
        if p.kind == "landmark":
            symbols[id(p)] = _symbol(number)
            number += 1
        else:
            symbols[id(p)] = _SLACK
        strip[col(p.route_m)] = symbols[id(p)]
    if fault is not None:
        strip[col(fault.route_m)] = _FAULT
    scale = f"0{distance_text(end_m, end_m / 100, unit).rjust(width - 1)}"
    lines = [("".join(strip), fault is not None), (scale[:width], False)]
    rows: list[tuple[float, int, str, str]] = [(0.0, -1, "├", "start")]
    for p in ordered:
        label = p.name if p.kind == "landmark" else f"slack {p.name}".strip()
        rows.append((p.route_m, 0, symbols[id(p)], label))
    if fault is not None:
        window = search_text(fault.low_m, fault.high_m, fault.uncertainty_m, unit)
        rows.append((fault.route_m, 1, _FAULT, f"fault, search {window}"))
    rows.sort(key=lambda r: (r[0], r[1]))

    def where_text(where: float, order: int) -> str:
        # The fault's distance to the place its ± allows; the points as typed (0.1 m).
        if order == 1 and fault is not None:
            return distance_text(where, fault.uncertainty_m, unit)
        return format_distance(where, unit)

    dist_width = max(len(where_text(r[0], r[1])) for r in rows)
    for where, order, symbol, label in rows:
        line = f"{where_text(where, order):>{dist_width}} {symbol} {label}"
        # A long line goes on under its label: the fault's range and a name are never cut.
        for part in wrap(line, width, dist_width + 3):
            lines.append((part if len(part) <= width else part[: width - 1] + "…", order == 1))
    return lines
