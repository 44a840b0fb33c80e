"""A route drawn in text: the start, landmarks, slack loops and the located fault with its range.

Two parts, both fitting the widget's width (44 columns and up, narrower if need be):

- a strip to scale, ``├──1────∞───2───[═X═]──3``: the start, each landmark by its number, each
  slack loop as ``∞``, the search range in brackets and the fault as ``X``;
- a legend in route order, one line per point, the fault's line giving its range.

:func:`render_route` is pure (text in, lines out) so the drawing is tested without a terminal.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from rich.text import Text
from textual.widgets import Static

from fieldkit.calc.locate import format_distance


@dataclass(frozen=True, slots=True)
class RoutePoint:
    """A point to draw: ``kind`` is "landmark" or "slack"."""

    kind: str
    name: str
    route_m: float


@dataclass(frozen=True, slots=True)
class FaultMark:
    route_m: float
    low_m: float
    high_m: float


_LANDMARK_SYMBOLS = "123456789ABCDEFGHIJKLMNOPQRSTUVWYZ"
_SLACK = "∞"
_FAULT = "X"


def _symbol(index: int) -> str:
    return _LANDMARK_SYMBOLS[index] if index < len(_LANDMARK_SYMBOLS) else "+"


def render_route(
    points: Sequence[RoutePoint], fault: FaultMark | None, width: int, unit: str = "m"
) -> list[str]:
    """The diagram as lines no wider than ``width`` (at least 20).

    Landmarks are numbered 1, 2, 3 ... in route order on the strip and in the legend.
    """
    width = max(20, width)
    ordered = sorted(points, key=lambda p: (p.route_m, p.kind))
    # A little room past the furthest point, so a fault at the end still shows its range.
    end_m = 1.05 * max([p.route_m for p in ordered] + ([fault.high_m] if fault else []) + [1.0])
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
    scale = f"0{format_distance(end_m, unit).rjust(width - 1)}"
    lines = ["".join(strip), scale[:width]]
    rows: list[tuple[float, int, str, str]] = [(0.0, -1, "├", "start")]
    for p in ordered:
        label = p.name if p.kind == "landmark" else f"slack {p.name}".strip()
        rows.append((p.route_m, 0, symbols[id(p)], label))
    if fault is not None:
        rng = f"{format_distance(fault.low_m, unit)}–{format_distance(fault.high_m, unit)}"
        rows.append((fault.route_m, 1, _FAULT, f"fault, look {rng}"))
    rows.sort(key=lambda r: (r[0], r[1]))
    dist_width = max(len(format_distance(r[0], unit)) for r in rows)
    for where, _, symbol, label in rows:
        line = f"{format_distance(where, unit):>{dist_width}} {symbol} {label}"
        if len(line) > width:
            line = line[: width - 1] + "…"
        lines.append(line)
    return lines


class RouteDiagram(Static):
    """Shows :func:`render_route` at the widget's current width; the fault's line in bold."""

    DEFAULT_CSS = """
    RouteDiagram {
        height: auto;
        width: 1fr;
    }
    """

    def __init__(self, *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        super().__init__("", id=id)
        self._points: tuple[RoutePoint, ...] = ()
        self._fault: FaultMark | None = None
        self._unit = "m"

    def show(self, points: Sequence[RoutePoint], fault: FaultMark | None, unit: str = "m") -> None:
        self._points = tuple(points)
        self._fault = fault
        self._unit = unit
        self._redraw()

    def on_resize(self) -> None:
        self._redraw()

    def lines(self) -> list[str]:
        width = self.content_size.width or 40
        return render_route(self._points, self._fault, width, self._unit)

    def _redraw(self) -> None:
        text = Text()
        for i, line in enumerate(self.lines()):
            if i:
                text.append("\n")
            bold = _FAULT in line and (i == 0 or f" {_FAULT} fault" in line)
            text.append(line, style="bold" if bold else "")
        self.update(text)
