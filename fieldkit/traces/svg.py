"""A trace as inline SVG: the backscatter curve, numbered event marks, axes. No scripts.

The SVG holds only numbers and fixed labels (no user text), so it needs no escaping; the page
around it (file names, the event table) is built by the caller with the HTML escaper.
Decimated to at most two points (the lowest and highest) per horizontal pixel, so a 32 000
point trace stays a few kilobytes and its narrow reflections still show.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

from fieldkit.traces.analysis import TraceResult

KIND_COLOURS = {"splice": "#1f77b4", "reflective": "#d62728", "gainer": "#2ca02c", "end": "#555"}


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


def trace_svg(result: TraceResult, *, width: int = 760, height: int = 260) -> str:
    """The trace of ``result`` with its events, as one ``<svg>`` element."""
    left, right, top, bottom = 56, 10, 12, 34
    pw, ph = width - left - right, height - top - bottom
    x = result.trace.distance_m
    y = result.trace.level_db
    end = result.length_m
    x_max = float(min(x[-1], end * 1.08 + 10.0)) if end is not None else float(x[-1])
    x_min = float(x[0])
    keep = x <= x_max
    fibre = keep & (x < end) if end is not None else keep
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

    points = " ".join(f"{px(a):.1f},{py(b):.1f}" for a, b in zip(xd, yd, strict=True))
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
    parts.append(f'<polyline fill="none" stroke="#2b6" stroke-width="1" points="{points}"/>')
    for e in result.events:
        xx = px(e.distance_m)
        colour = KIND_COLOURS.get(e.kind, "#555")
        parts.append(
            f'<line x1="{xx:.1f}" y1="{top}" x2="{xx:.1f}" y2="{top + ph}" stroke="{colour}" '
            f'stroke-dasharray="3,3"/><text x="{xx + 2:.1f}" y="{top + 10}" fill="{colour}">'
            f"{e.number}</text>"
        )
    parts.append("</svg>")
    return "".join(parts)
