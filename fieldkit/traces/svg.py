"""A trace as inline SVG: the backscatter curve, numbered event marks, axes. No scripts.

The SVG holds only numbers and fixed labels (no user text), so it needs no escaping; the page
around it (file names, the event table) is built by the caller with the HTML escaper.

:func:`draw_trace` draws from plain sequences, (distance m, level dB) points and (number,
distance m, kind) events, so a report can draw a trace kept in a job
(:class:`fieldkit.jobs.models.TraceRecord`: a curve's ``points`` and the record's ``events``)
without the raw trace. :func:`plot_points` makes such points from a raw trace: at most two (the
lowest and highest) per column, so a 32 000 point trace stays a few kilobytes and its narrow
reflections still show. :func:`trace_svg` draws an analysed trace with both.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import numpy.typing as npt

from fieldkit.traces.analysis import TraceResult

KIND_COLOURS = {"splice": "#1f77b4", "reflective": "#d62728", "gainer": "#2ca02c", "end": "#555"}

#: Width and height of a drawing, in pixels, and its margins (left, right, top, bottom).
WIDTH, HEIGHT = 760, 260
MARGINS = (56, 10, 12, 34)


def _decimate(
    x: npt.NDArray[np.float64], y: npt.NDArray[np.float64], columns: int
) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
    if x.size <= 2 * columns:
        return x, y
    edges = np.linspace(0, x.size, columns + 1).astype(int)
    xs, ys = [], []
    for a, b in zip(edges[:-1], edges[1:], strict=True):
        if b <= a:
            continue
        seg = y[a:b]
        i_lo, i_hi = a + int(np.argmin(seg)), a + int(np.argmax(seg))
        for i in sorted({i_lo, i_hi}):
            xs.append(x[i])
            ys.append(y[i])
    return np.asarray(xs), np.asarray(ys)


def x_limit_m(last_m: float, length_m: float | None) -> float:
    """Where a drawing stops: a little past the fibre's end (8 % and 10 m), or the trace's
    last point."""
    return float(min(last_m, length_m * 1.08 + 10.0)) if length_m is not None else float(last_m)


def plot_points(
    distance_m: npt.NDArray[np.float64],
    level_db: npt.NDArray[np.float64],
    length_m: float | None,
    max_points: int,
) -> list[tuple[float, float]]:
    """At most ``max_points`` (distance, level) pairs of a trace up to :func:`x_limit_m`: the
    lowest and highest level of each of ``max_points // 2`` columns, in distance order."""
    if distance_m.size == 0:
        return []
    keep = distance_m <= x_limit_m(float(distance_m[-1]), length_m)
    xd, yd = _decimate(distance_m[keep], level_db[keep], max(1, max_points // 2))
    return [(float(a), float(b)) for a, b in zip(xd, yd, strict=True)]


def draw_trace(
    points: Sequence[tuple[float, float]],
    events: Sequence[tuple[int, float, str]],
    *,
    length_m: float | None = None,
    width: int = WIDTH,
    height: int = HEIGHT,
) -> str:
    """One ``<svg>`` element: the curve through ``points`` (distance m, level dB, in distance
    order), a dashed numbered mark per event (number, distance m, kind), axes in km and dB.

    ``length_m`` (the fibre's end) stops the distance axis a little past the end, and sets the
    level axis from the fibre's part of the curve (the 0.5th to 99.5th percentile, so one
    reflection's peak does not flatten the rest). Events are drawn at their distance along the
    curve's own axis: for a curve measured from end B, give B's distances.
    """
    left, right, top, bottom = MARGINS
    pw, ph = width - left - right, height - top - bottom
    if points:
        xy = np.asarray(points, dtype=np.float64).reshape(-1, 2)
    else:
        xy = np.zeros((1, 2))
    x, y = xy[:, 0], xy[:, 1]
    x_max = x_limit_m(float(x[-1]), length_m)
    x_min = float(x[0])
    keep = x <= x_max
    fibre = keep & (x < length_m) if length_m is not None else keep
    ys = y[fibre] if fibre.sum() > 8 else y[keep]
    y_lo, y_hi = (float(q) for q in np.percentile(ys, [0.5, 99.5]))
    pad = max(0.05 * (y_hi - y_lo), 0.1)
    y_lo, y_hi = y_lo - pad, y_hi + pad
    xd, yd = _decimate(x[keep], y[keep], pw)

    def px(d: float) -> float:
        return left + (d - x_min) / (x_max - x_min or 1.0) * pw

    def py(level: float) -> float:
        clipped = min(max(level, y_lo), y_hi)
        return top + (y_hi - clipped) / (y_hi - y_lo) * ph

    line = " ".join(f"{px(a):.1f},{py(b):.1f}" for a, b in zip(xd, yd, strict=True))
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" role="img" font-family="sans-serif" font-size="11">',
        f'<rect x="{left}" y="{top}" width="{pw}" height="{ph}" fill="#fff" stroke="#999"/>',
    ]
    for k in range(5):
        level = y_hi - k * (y_hi - y_lo) / 4
        yy = py(level)
        parts.append(
            f'<line x1="{left}" y1="{yy:.1f}" x2="{left + pw}" y2="{yy:.1f}" stroke="#eee"/>'
            f'<text x="{left - 4}" y="{yy + 4:.1f}" text-anchor="end">{level:.1f}</text>'
        )
    for k in range(6):
        d = x_min + k * (x_max - x_min) / 5
        xx = px(d)
        parts.append(
            f'<text x="{xx:.1f}" y="{top + ph + 14}" text-anchor="middle">{d / 1000:.2f}</text>'
        )
    parts.append(
        f'<text x="{left + pw / 2:.1f}" y="{height - 4}" text-anchor="middle">distance, km</text>'
        f'<text x="12" y="{top + ph / 2:.1f}" transform="rotate(-90 12 {top + ph / 2:.1f})" '
        'text-anchor="middle">level, dB</text>'
    )
    if points:
        parts.append(f'<polyline fill="none" stroke="#2b6" stroke-width="1" points="{line}"/>')
    for number, distance, kind in events:
        xx = px(float(distance))
        colour = KIND_COLOURS.get(kind, "#555")
        parts.append(
            f'<line x1="{xx:.1f}" y1="{top}" x2="{xx:.1f}" y2="{top + ph}" stroke="{colour}" '
            f'stroke-dasharray="3,3"/><text x="{xx + 2:.1f}" y="{top + 10}" fill="{colour}">'
            f"{int(number)}</text>"
        )
    parts.append("</svg>")
    return "".join(parts)


def trace_svg(result: TraceResult, *, width: int = WIDTH, height: int = HEIGHT) -> str:
    """The trace of ``result`` with its events, as one ``<svg>`` element (:func:`draw_trace`
    of :func:`plot_points` at two points per column)."""
    plot_width = width - MARGINS[0] - MARGINS[1]
    points = plot_points(
        result.trace.distance_m, result.trace.level_db, result.length_m, 2 * plot_width
    )
    events = [(e.number, e.distance_m, e.kind) for e in result.events]
    return draw_trace(points, events, length_m=result.length_m, width=width, height=height)
