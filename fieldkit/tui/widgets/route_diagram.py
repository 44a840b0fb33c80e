"""The route diagram of the fault workspace: :func:`fieldkit.text.route.render_route` drawn at
the widget's width, the fault's lines in bold."""

from __future__ import annotations

from collections.abc import Sequence

from rich.text import Text

from fieldkit.text.route import FaultMark, RoutePoint, render_route, route_lines
from fieldkit.tui.widgets.result_lines import ResultLines

__all__ = ["FaultMark", "RouteDiagram", "RoutePoint", "render_route"]


class RouteDiagram(ResultLines):
    """Shows :func:`render_route` at the widget's current width; the fault's line in bold."""

    DEFAULT_CSS = """
    RouteDiagram {
        height: auto;
        width: 1fr;
    }
    """

    def __init__(self, *, id: str | None = None) -> None:  # noqa: A002 - Textual's name
        super().__init__(id=id)
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
        return [line for line, _ in self._lines()]

    def _lines(self) -> list[tuple[str, bool]]:
        width = self.content_size.width or 40
        return route_lines(self._points, self._fault, width, self._unit)

    def _redraw(self) -> None:
        text = Text()
        for i, (line, fault) in enumerate(self._lines()):
            if i:
                text.append("\n")
            text.append(line, style="bold" if fault else "")
        self.show_lines(text)
