"""A terminal OTDR trace: braille dots, numbered event marks, a cursor, zoom and pan.

Our own small widget rather than a plotting library: no extra dependency to ship on field
laptops, and full control over what matters at 44 columns (event numbers under the trace, a
cursor column, a one-line readout). Braille characters give 2×4 dots per cell, so a 40×8 cell
plot shows 80×32 points; each dot column draws the span between the lowest and highest sample
it covers, so noise reads as a band and a narrow reflection is never skipped.

:class:`PlotView` is the plain state (what part of the trace is shown, where the cursor is)
and is tested without a terminal; :func:`braille_rows` draws.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
from rich.text import Text
from textual import events
from textual.binding import Binding
from textual.message import Message
from textual.widget import Widget

from fieldkit.traces.lines import KIND_LABELS, signed
from fieldkit.traces.session import EventMark

#: An event to mark on the trace: the session's own (one class, not a copy of it).
Mark = EventMark

#: Braille dot bits by (row 0-3, column 0-1) within a cell (Unicode braille patterns).
_BITS = np.array([[0x01, 0x08], [0x02, 0x10], [0x04, 0x20], [0x40, 0x80]], dtype=np.int32)


def braille_rows(
    x: npt.NDArray[np.float64],
    y: npt.NDArray[np.float64],
    width: int,
    height: int,
    x_range: tuple[float, float],
    y_range: tuple[float, float],
) -> list[str]:
    """``height`` strings of ``width`` braille characters drawing y against x in the ranges."""
    width, height = max(width, 1), max(height, 1)
    px_w, px_h = width * 2, height * 4
    x0, x1 = x_range
    y0, y1 = y_range
    if x1 <= x0:
        x1 = x0 + 1.0
    if y1 <= y0:
        y1 = y0 + 1.0
    inside = (x >= x0) & (x <= x1)
    xs, ys = x[inside], y[inside]
    grid = np.zeros((px_h, px_w), dtype=bool)
    if xs.size:
        col = np.clip(((xs - x0) / (x1 - x0) * (px_w - 1)).round().astype(int), 0, px_w - 1)
        row = np.clip(((y1 - ys) / (y1 - y0) * (px_h - 1)).round().astype(int), 0, px_h - 1)
        lo = np.full(px_w, px_h, dtype=int)
        hi = np.full(px_w, -1, dtype=int)
        np.minimum.at(lo, col, row)
        np.maximum.at(hi, col, row)
        # fill gaps between neighbouring columns when zoomed in further than the samples
        have = np.flatnonzero(hi >= 0)
        if have.size > 1:
            for a, b in zip(have[:-1], have[1:], strict=True):
                if b - a > 1:
                    for c in range(a + 1, b):
                        t = (c - a) / (b - a)
                        v = int(round(lo[a] + (lo[b] - lo[a]) * t))
                        lo[c] = hi[c] = v
            # join each column to the next so steep edges stay connected
            lo2, hi2 = lo.copy(), hi.copy()
            valid = hi >= 0
            nxt_lo = np.roll(lo, -1)
            nxt_hi = np.roll(hi, -1)
            both = valid & np.roll(valid, -1)
            both[-1] = False
            lo2[both] = np.minimum(lo[both], nxt_hi[both] + 1)
            hi2[both] = np.maximum(hi[both], nxt_lo[both] - 1)
            lo, hi = np.minimum(lo, lo2), np.maximum(hi, hi2)
        rows = np.arange(px_h)[:, None]
        grid = (rows >= lo[None, :]) & (rows <= hi[None, :])
    cells = grid.reshape(height, 4, width, 2)
    codes = (cells * _BITS[None, :, None, :]).sum(axis=(1, 3)) + 0x2800
    return ["".join(map(chr, line)) for line in codes.tolist()]


def round_up(distance_m: float) -> float:
    """``distance_m`` up to a round figure for an axis end: to 1, 2 or 5 of the next lower
    power of ten (1840 -> 1900, 1932 -> 2000, 4120 -> 4200, 212 -> 220)."""
    if distance_m <= 0:
        return distance_m
    step = 10.0 ** (math.floor(math.log10(distance_m)) - 1)
    for k in (1, 2, 5, 10):
        if distance_m / (k * step) <= 25:  # no more than 25 steps: a figure read at a glance
            return math.ceil(distance_m / (k * step)) * k * step
    return distance_m


@dataclass
class PlotView:
    """What the plot shows: a distance window, a cursor, and the events to jump between."""

    start_m: float
    end_m: float
    full: tuple[float, float]
    cursor_m: float
    marks: list[Mark] = field(default_factory=list)
    current: int | None = None  # index into marks of the selected event

    @classmethod
    def of(cls, x_min: float, x_max: float, marks: list[Mark]) -> PlotView:
        right = x_max
        ends = [m.distance_m for m in marks if m.kind == "end"]
        if ends:  # the fibre and a little of the noise past its end, to a round figure
            right = min(x_max, round_up(ends[0] * 1.03 + 10.0))
        return cls(x_min, right, (x_min, x_max), x_min, list(marks))

    @property
    def span_m(self) -> float:
        return self.end_m - self.start_m

    def _clamp(self) -> None:
        lo, hi = self.full
        span = min(max(self.span_m, 1.0), hi - lo if hi > lo else 1.0)
        start = min(max(self.start_m, lo), max(hi - span, lo))
        self.start_m, self.end_m = start, start + span
        self.cursor_m = min(max(self.cursor_m, lo), hi)

    def zoom(self, factor: float, around_m: float | None = None) -> None:
        """Zoom by ``factor`` (< 1 in) keeping ``around_m`` (default the cursor) in place."""
        c = self.cursor_m if around_m is None else around_m
        share = (c - self.start_m) / self.span_m if self.span_m else 0.5
        span = self.span_m * factor
        self.start_m = c - share * span
        self.end_m = self.start_m + span
        self._clamp()

    def pan(self, share: float) -> None:
        """Move the window by ``share`` of its width (negative: towards the start)."""
        step = self.span_m * share
        self.start_m += step
        self.end_m += step
        self._clamp()
        self.cursor_m = min(max(self.cursor_m, self.start_m), self.end_m)

    def move_cursor(self, step_m: float) -> None:
        self.cursor_m += step_m
        self._clamp()
        self._follow()

    def set_cursor(self, distance_m: float) -> None:
        self.cursor_m = distance_m
        self._clamp()
        self._follow()

    def _follow(self) -> None:
        if self.cursor_m < self.start_m:
            self.pan((self.cursor_m - self.start_m) / self.span_m - 0.1)
        elif self.cursor_m > self.end_m:
            self.pan((self.cursor_m - self.end_m) / self.span_m + 0.1)

    def reset(self) -> None:
        fresh = PlotView.of(self.full[0], self.full[1], self.marks)
        self.start_m, self.end_m = fresh.start_m, fresh.end_m

    def jump(self, step: int) -> Mark | None:
        """Select the next (+1) or previous (-1) event and put the cursor on it."""
        if not self.marks:
            return None
        if self.current is None:
            ahead = [k for k, m in enumerate(self.marks) if m.distance_m > self.cursor_m + 1e-6]
            behind = [k for k, m in enumerate(self.marks) if m.distance_m < self.cursor_m - 1e-6]
            if step > 0:
                k = ahead[0] if ahead else len(self.marks) - 1
            else:
                k = behind[-1] if behind else 0
        else:
            k = min(max(self.current + step, 0), len(self.marks) - 1)
        self.select(k)
        return self.marks[k]

    def select(self, k: int) -> None:
        self.current = k
        self.set_cursor(self.marks[k].distance_m)
        m = self.marks[k]
        if not self.start_m <= m.distance_m <= self.end_m:
            self.pan((m.distance_m - (self.start_m + self.end_m) / 2) / self.span_m)


class TracePlot(Widget, can_focus=True):
    """The trace with numbered events, a cursor and a readout line (see the module doc)."""

    DEFAULT_CSS = """
    TracePlot {
        height: 1fr;
        min-height: 6;
    }
    TracePlot:focus {
        background: $boost;
    }
    """

    BINDINGS = [
        Binding("left", "cursor(-1)", "◀", show=False),
        Binding("right", "cursor(1)", "▶", show=False),
        Binding("shift+left,ctrl+left", "pan(-0.5)", "Pan ◀", show=False),
        Binding("shift+right,ctrl+right", "pan(0.5)", "Pan ▶", show=False),
        Binding("plus,equals_sign,up", "zoom(0.5)", "Zoom in", show=False),
        Binding("minus,down", "zoom(2.0)", "Zoom out", show=False),
        Binding("home,0", "reset", "Whole trace", show=False),
        Binding("pagedown,n", "jump(1)", "Next event", show=False),
        Binding("pageup,p", "jump(-1)", "Previous event", show=False),
    ]

    class CursorMoved(Message):
        """The cursor moved; ``mark`` is the event selected by a jump (else None)."""

        def __init__(self, plot: TracePlot, mark: Mark | None) -> None:
            super().__init__()
            self.plot = plot
            self.mark = mark

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self.x: npt.NDArray[np.float64] = np.zeros(0)
        self.y: npt.NDArray[np.float64] = np.zeros(0)
        self.view: PlotView | None = None
        self.caption = ""
        self._drag: tuple[int, float, bool] | None = None  # (x, view start, moved) while dragging
        self._dragged = False
        self.tooltip = (
            "←/→ cursor, +/- or wheel zoom, Shift+←/→ or drag pan, PgUp/PgDn events, Home whole"
        )

    def show_trace(
        self,
        x: npt.NDArray[np.float64],
        y: npt.NDArray[np.float64],
        marks: list[Mark],
        caption: str = "",
    ) -> None:
        self.x, self.y = x, y
        self.view = PlotView.of(float(x[0]), float(x[-1]), marks) if x.size else None
        self.caption = caption
        self.refresh()

    def clear(self) -> None:
        self.x, self.y, self.view = np.zeros(0), np.zeros(0), None
        self.refresh()

    # -- reading -------------------------------------------------------------------------
    def level_at(self, distance_m: float) -> float | None:
        if not self.x.size:
            return None
        k = int(np.clip(np.searchsorted(self.x, distance_m), 0, self.x.size - 1))
        return float(self.y[k])

    def readout(self) -> str:
        v = self.view
        if v is None:
            return "no trace"
        level = self.level_at(v.cursor_m)
        text = signed(f"{v.cursor_m:.1f} m  {level:.2f} dB") if level is not None else ""
        if v.current is not None:
            m = v.marks[v.current]
            kind = KIND_LABELS["splice"] if m.kind == "splice" else m.kind  # a splice or a bend
            text += f"  event {m.number} {kind}"
        return text

    # -- drawing -------------------------------------------------------------------------
    def _level_range(self, v: PlotView) -> tuple[float, float]:
        """Levels to show: the fibre's backscatter, not the peaks or the noise past the end.

        The 0.5 % and 99.5 % points of the samples in view that lie before the end event:
        narrow reflections and the noise draw clipped at the edges, and the slope stays
        readable in a few rows.
        """
        inside = (self.x >= v.start_m) & (self.x <= v.end_m)
        ends = [m.distance_m for m in v.marks if m.kind == "end"]
        fibre = inside & (self.x < ends[0]) if ends else inside
        ys = self.y[fibre] if fibre.sum() > 8 else (self.y[inside] if inside.any() else self.y)
        lo, hi = (float(q) for q in np.percentile(ys, [0.5, 99.5]))
        if hi - lo < 0.2:
            mid = (hi + lo) / 2
            lo, hi = mid - 0.1, mid + 0.1
        return lo, hi

    def render(self) -> Text:
        v = self.view
        width, height = self.size.width, self.size.height
        if v is None or width < 4 or height < 3:
            return Text("Open a trace: type its file above (Enter).", style="dim")
        plot_h = max(1, height - 3)  # marks row, axis row, readout row
        lo, hi = self._level_range(v)
        pad = max(0.05 * (hi - lo), 0.05)
        rows = braille_rows(
            self.x, self.y, width, plot_h, (v.start_m, v.end_m), (lo - pad, hi + pad)
        )

        def column(distance_m: float) -> int:
            return int(round((distance_m - v.start_m) / v.span_m * (width - 1))) if v.span_m else 0

        cursor_col = column(v.cursor_m)
        text = Text()
        for r, line in enumerate(rows):
            segment = Text(line, style="green")
            if 0 <= cursor_col < width:
                segment.stylize("reverse", cursor_col, cursor_col + 1)
            if r == 0:
                label = signed(f"{hi + pad:.1f} dB".replace("-0.0", "0.0"))
                segment = Text(label, style="dim") + segment[len(label) :]
            elif r == plot_h - 1 and plot_h > 1:
                label = signed(f"{lo - pad:.1f} dB".replace("-0.0", "0.0"))
                segment = Text(label, style="dim") + segment[len(label) :]
            text.append_text(segment)
            text.append("\n")
        marks_row = [" "] * width
        styles: list[tuple[int, int, str]] = []
        for k, m in enumerate(v.marks):
            c = column(m.distance_m)
            if not 0 <= c < width:
                continue
            label = str(m.number)
            start = min(c, width - len(label))
            if all(ch == " " for ch in marks_row[start : start + len(label)]):
                marks_row[start : start + len(label)] = list(label)
                style = (
                    "bold red"
                    if m.failed
                    else ("bold yellow" if m.kind == "reflective" else "bold cyan")
                )
                if v.current == k:
                    style += " reverse"
                styles.append((start, start + len(label), style))
        marks_text = Text("".join(marks_row))
        for a, b, style in styles:
            marks_text.stylize(style, a, b)
        text.append_text(marks_text)
        text.append("\n")
        left, right = f"{v.start_m:.0f} m", f"{v.end_m:.0f} m"
        gap = max(1, width - len(left) - len(right))
        text.append(f"{left}{' ' * gap}{right}"[:width], style="dim")
        text.append("\n")
        text.append(self.readout()[:width], style="bold")
        return text

    # -- keys and mouse ------------------------------------------------------------------
    def _changed(self, mark: Mark | None = None) -> None:
        self.refresh()
        self.post_message(self.CursorMoved(self, mark))

    def action_cursor(self, step: int) -> None:
        if self.view is not None:
            self.view.current = None
            self.view.move_cursor(step * self.view.span_m / max(self.size.width - 1, 1))
            self._changed()

    def action_pan(self, share: float) -> None:
        if self.view is not None:
            self.view.pan(share)
            self._changed()

    def action_zoom(self, factor: float) -> None:
        if self.view is not None:
            self.view.zoom(factor)
            self._changed()

    def action_reset(self) -> None:
        if self.view is not None:
            self.view.reset()
            self._changed()

    def action_jump(self, step: int) -> None:
        if self.view is not None:
            mark = self.view.jump(step)
            self._changed(mark)

    def select_event(self, number: int) -> None:
        """Put the cursor on event ``number`` (as numbered in the marks)."""
        if self.view is None:
            return
        for k, m in enumerate(self.view.marks):
            if m.number == number:
                self.view.select(k)
                self._changed(m)
                return

    def _distance_at(self, x: int) -> float | None:
        if self.view is None or self.size.width < 2:
            return None
        return self.view.start_m + x / (self.size.width - 1) * self.view.span_m

    def on_mouse_down(self, event: events.MouseDown) -> None:
        if self.view is not None and event.button == 1:
            self._drag = (event.x, self.view.start_m, False)
            self.capture_mouse()

    def on_mouse_move(self, event: events.MouseMove) -> None:
        if self._drag is None or self.view is None or self.size.width < 2:
            return
        x0, start, _moved = self._drag
        if event.x != x0:
            shift = (event.x - x0) / (self.size.width - 1) * self.view.span_m
            self.view.pan((start - shift - self.view.start_m) / self.view.span_m)
            self._drag = (x0, start, True)
            self._changed()

    def on_mouse_up(self, event: events.MouseUp) -> None:
        if self._drag is not None:
            self.release_mouse()
            self._dragged = self._drag[2]
            self._drag = None

    def on_click(self, event: events.Click) -> None:
        if self._dragged:  # the end of a drag is not a click on a place
            self._dragged = False
            return
        d = self._distance_at(event.x)
        if d is not None and self.view is not None:
            self.view.current = None
            self.view.set_cursor(d)
            self._changed()

    def on_mouse_scroll_up(self, event: events.MouseScrollUp) -> None:
        d = self._distance_at(event.x)
        if self.view is not None:
            event.stop()
            self.view.zoom(0.7, d)
            self._changed()

    def on_mouse_scroll_down(self, event: events.MouseScrollDown) -> None:
        d = self._distance_at(event.x)
        if self.view is not None:
            event.stop()
            self.view.zoom(1 / 0.7, d)
            self._changed()
