"""Loss per fibre against its limit, as inline SVG: self-contained, no scripts, no fonts or
images from outside, readable on a black-and-white print.

Every verdict has its own marker shape (filled circle pass, a cross fail, a filled triangle a
reference problem, an open square in doubt, an open circle no limit), so colour only helps; the
caption under the chart names the failing fibres in words. The limit is a dashed line (one per
fibre where the fibres' limits differ). Where both directions were measured, A→B sits left of
the fibre's tick and B→A right of it.
"""

from __future__ import annotations

import math

from fieldkit.jobs.counting import Count
from fieldkit.jobs.reports import fmt_db, fmt_nm
from fieldkit.reports.common import arrows
from fieldkit.reports.document import Chart
from fieldkit.text import escape

WIDTH, HEIGHT = 480, 190
LEFT, RIGHT, TOP, BOTTOM = 46, 10, 24, 30

#: Colour of each verdict's marker (the shape says it without colour).
COLOUR = {
    Count.PASS: "#1a7f37",
    Count.FAIL: "#b3261e",
    Count.REFERENCE_PROBLEM: "#8a5a00",
    Count.IN_DOUBT: "#5b3f99",
    Count.NO_LIMIT: "#444444",
}
#: The marker's name in words (legend, tooltips).
SHAPE_WORDS = {
    Count.PASS: "filled circle",
    Count.FAIL: "cross",
    Count.REFERENCE_PROBLEM: "filled triangle",
    Count.IN_DOUBT: "open square",
    Count.NO_LIMIT: "open circle",
}


def marker(count: Count, x: float, y: float, size: float = 4.0) -> str:
    """The SVG of one marker centred on (x, y)."""
    c = COLOUR[count]
    s = size
    if count is Count.PASS:
        return f'<circle cx="{x:.1f}" cy="{y:.1f}" r="{s:.1f}" fill="{c}" stroke="{c}"/>'
    if count is Count.FAIL:
        return (
            f'<path d="M{x - s:.1f},{y - s:.1f}L{x + s:.1f},{y + s:.1f}'
            f'M{x - s:.1f},{y + s:.1f}L{x + s:.1f},{y - s:.1f}" stroke="{c}" '
            'stroke-width="2.2" fill="none"/>'
        )
    if count is Count.REFERENCE_PROBLEM:
        return (
            f'<path d="M{x - s:.1f},{y - s * 0.8:.1f}L{x + s:.1f},{y - s * 0.8:.1f}'
            f'L{x:.1f},{y + s:.1f}Z" fill="{c}" stroke="{c}"/>'
        )
    if count is Count.IN_DOUBT:
        return (
            f'<rect x="{x - s:.1f}" y="{y - s:.1f}" width="{2 * s:.1f}" height="{2 * s:.1f}" '
            f'fill="#fff" stroke="{c}" stroke-width="1.6"/>'
        )
    return (
        f'<circle cx="{x:.1f}" cy="{y:.1f}" r="{s:.1f}" fill="#fff" stroke="{c}" '
        'stroke-width="1.6"/>'
    )


def legend_marker(count: Count) -> str:
    """A small SVG with one marker, for the legend."""
    return (
        '<svg class="mark" width="14" height="14" viewBox="0 0 14 14" role="img" '
        f'aria-label="{SHAPE_WORDS[count]}">{marker(count, 7, 7, 4.5)}</svg>'
    )


def _nice_step(span: float) -> float:
    raw = span / 5.0
    power = 10 ** math.floor(math.log10(raw))
    for mult in (1, 2, 2.5, 5, 10):
        if raw <= mult * power:
            return mult * power
    return 10 * power


def caption(chart: Chart) -> str:
    """The chart in words: what failed, what needs a retest."""
    by_count: dict[Count, list[int]] = {}
    for p in chart.points:
        fibres = by_count.setdefault(p.count, [])
        if p.fibre not in fibres:
            fibres.append(p.fibre)
    parts = []
    for count, words in (
        (Count.FAIL, "fail"),
        (Count.REFERENCE_PROBLEM, "reference problem"),
        (Count.IN_DOUBT, "in doubt"),
        (Count.NO_LIMIT, "no limit"),
    ):
        fibres = sorted(by_count.get(count, []))
        if fibres:
            noun = "fibre" if len(fibres) == 1 else "fibres"
            parts.append(f"{words}: {noun} {', '.join(map(str, fibres))}")
    passed = len(set(by_count.get(Count.PASS, [])))
    head = f"{fmt_nm(chart.wavelength_nm)} nm: {passed} pass"
    return head + ("; " + "; ".join(parts) if parts else "; no failures") + "."


def svg(chart: Chart) -> str:
    """The chart as one ``<svg>`` element (no script, no external reference)."""
    points = chart.points
    fibres = max([chart.fibre_count or 0, *(p.fibre for p in points)] or [1])
    values = [p.loss_db for p in points] + [p.limit_db for p in points if p.limit_db is not None]
    top = max([*values, 0.5])
    bottom = min([*values, 0.0])
    step = _nice_step(top - bottom)
    y_max = math.ceil(top * 1.08 / step) * step
    y_min = math.floor(bottom / step) * step if bottom < 0 else 0.0
    plot_w = WIDTH - LEFT - RIGHT
    plot_h = HEIGHT - TOP - BOTTOM
    slot = plot_w / fibres

    def x_of(fibre: int) -> float:
        return LEFT + (fibre - 0.5) * slot

    def y_of(value: float) -> float:
        return TOP + (y_max - value) / (y_max - y_min) * plot_h

    e = escape.html
    title = f"{chart.title}: loss per fibre at {fmt_nm(chart.wavelength_nm)} nm"
    out = [
        f'<svg class="chart" viewBox="0 0 {WIDTH} {HEIGHT}" width="100%" '
        f'xmlns="http://www.w3.org/2000/svg" role="img" aria-label="{e(title)}">',
        f"<title>{e(title)}</title>",
        f'<text x="{LEFT}" y="14" font-size="11" font-weight="bold">{e(title)}</text>',
        f'<rect x="{LEFT}" y="{TOP}" width="{plot_w}" height="{plot_h}" fill="none" '
        'stroke="#888" stroke-width="0.8"/>',
    ]
    tick = y_min
    while tick <= y_max + 1e-9:
        y = y_of(tick)
        out.append(
            f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + plot_w}" y2="{y:.1f}" stroke="#ddd" '
            'stroke-width="0.6"/>'
        )
        out.append(
            f'<text x="{LEFT - 4}" y="{y + 3:.1f}" font-size="9" text-anchor="end">{tick:g}</text>'
        )
        tick += step
    out.append(
        f'<text x="10" y="{TOP + plot_h / 2:.1f}" font-size="9" text-anchor="middle" '
        f'transform="rotate(-90 10 {TOP + plot_h / 2:.1f})">loss dB</text>'
    )
    if y_min < 0:
        y0 = y_of(0.0)
        out.append(
            f'<line x1="{LEFT}" y1="{y0:.1f}" x2="{LEFT + plot_w}" y2="{y0:.1f}" stroke="#000" '
            'stroke-width="0.8"/>'
        )
    every = 1 if fibres <= 24 else 2 if fibres <= 48 else 5 if fibres <= 120 else 10
    for fibre in range(1, fibres + 1):
        if fibre % every and fibre != 1:
            continue
        out.append(
            f'<text x="{x_of(fibre):.1f}" y="{TOP + plot_h + 12}" font-size="9" '
            f'text-anchor="middle">{fibre}</text>'
        )
    out.append(
        f'<text x="{LEFT + plot_w / 2:.1f}" y="{HEIGHT - 4}" font-size="9" '
        'text-anchor="middle">fibre</text>'
    )
    limits = {p.limit_db for p in points if p.limit_db is not None}
    dash = 'stroke="#000" stroke-width="1.2" stroke-dasharray="5 3"'
    if len(limits) == 1:
        (limit,) = limits
        y = y_of(limit)
        out.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{LEFT + plot_w}" y2="{y:.1f}" {dash}/>')
        out.append(
            f'<text x="{LEFT + plot_w - 2}" y="{y - 3:.1f}" font-size="9" text-anchor="end">'
            f"limit {fmt_db(limit)} dB</text>"
        )
    elif limits:
        for p in points:
            if p.limit_db is not None:
                y = y_of(p.limit_db)
                x = x_of(p.fibre)
                out.append(
                    f'<line x1="{x - slot * 0.45:.1f}" y1="{y:.1f}" x2="{x + slot * 0.45:.1f}" '
                    f'y2="{y:.1f}" {dash}/>'
                )
        out.append(
            f'<text x="{LEFT + plot_w - 2}" y="{TOP - 4}" font-size="9" text-anchor="end">'
            "dashes: each fibre's limit</text>"
        )
    both = len({p.direction for p in points}) > 1
    size = max(2.5, min(4.5, slot * 0.22))
    for p in sorted(points, key=lambda q: (q.fibre, q.direction)):
        shift = (-slot * 0.2 if p.direction == "A->B" else slot * 0.2) if both else 0.0
        x, y = x_of(p.fibre) + shift, y_of(p.loss_db)
        against = f", limit {fmt_db(p.limit_db)} dB" if p.limit_db is not None else ""
        way = arrows(p.direction)
        tip = f"fibre {p.fibre} {way}: {fmt_db(p.loss_db)} dB{against}, {p.count.value}"
        out.append(f"<g><title>{e(tip)}</title>{marker(p.count, x, y, size)}</g>")
    out.append("</svg>")
    return "".join(out)
