"""The route diagram in text: what it draws and that it fits the width."""

from __future__ import annotations

import pytest

from fieldkit.text.route import FaultMark, RoutePoint, render_route

POINTS = [
    RoutePoint("landmark", "closure 6", 1950.0),
    RoutePoint("slack", "20 m", 2500.0),
    RoutePoint("landmark", "closure 7", 3330.0),
    RoutePoint("landmark", "handhole 12 by the long bridge over the river", 4100.0),
]


@pytest.mark.parametrize("width", [20, 40, 44, 78])
def test_fits_the_width(width: int) -> None:
    lines = render_route(POINTS, FaultMark(2738.6, 2700.0, 2777.2), width)
    assert all(len(line) <= width for line in lines)
    assert len(lines[0]) == width


def test_strip_to_scale_and_legend_in_route_order() -> None:
    lines = render_route(POINTS, FaultMark(2738.6, 2700.0, 2777.2), 44)
    strip = lines[0]
    # the route ends 5 % past the furthest point: 4100 × 1.05 = 4305 m, rounded up to three
    # digits, 4310 m, over 43 columns; closure 6 at 1950 m: round(1950 / 4310 × 43) = column
    # 19; the fault at round(27.32) = 27
    assert strip[0] == "├"
    assert strip[19] == "1"
    assert strip[27] == "X"
    assert strip.index("∞") == round(2500 / 4310 * 43)
    assert lines[1].endswith("4310 m")
    # each entry starts with its distance; a continuation starts under the label
    legend = [line for line in lines[2:] if not line.startswith(" " * 11)]
    assert [line.split()[2] for line in legend] == ["├", "1", "∞", "X", "2", "3"]
    assert [line.split()[3] for line in legend] == [
        "start",
        "closure",
        "slack",
        "fault,",
        "closure",
        "handhole",
    ]
    # no ± given: the window to the finest place, 0.1 m
    assert "fault, search from 2700.0 to" in legend[3]
    # a long name goes on under its label, never cut: "4100.0 m 3 " is 11 columns
    assert lines[-2] == "4100.0 m 3 handhole 12 by the long bridge"
    assert lines[-1] == " " * 11 + "over the river"
    assert not any("…" in line for line in lines)


@pytest.mark.parametrize("width", [34, 38])
def test_the_fault_range_is_never_cut(width: int) -> None:
    # The fault's key line at the fault panel's width at 80 and 44 columns: the range goes on
    # the next line under "fault" instead of being cut with "…".
    lines = render_route([], FaultMark(2009.85, 1979.6, 2040.1, 30.2), width)
    text = " ".join(line.strip() for line in lines[2:])
    # ± 30.2 m: to the tens (one significant digit), the window rounded outwards
    assert "2010 m X fault, search from 1970 to 2050 m" in text
    assert not any("…" in line for line in lines)
    assert all(len(line) <= width for line in lines)


def test_range_brackets_when_wide_enough_and_feet() -> None:
    lines = render_route([], FaultMark(1000.0, 900.0, 1100.0), 44, unit="ft")
    # 1100 × 1.05 = 1155 m = 3789.4 ft, rounded up to 3790 ft over 43 columns: 900 m → col 34,
    # 1100 m → col 41
    assert lines[0][34] == "[" and lines[0][41] == "]"
    assert "═" in lines[0]
    # 1000 m / 0.3048 = 3281 ft (international foot)
    assert any(line.startswith("3281 ft X fault") for line in lines)


def test_without_a_fault_only_the_route() -> None:
    lines = render_route(POINTS[:1], None, 40)
    assert "X" not in lines[0]
    assert len(lines) == 2 + 2  # strip, scale, start, closure 6


def test_nothing_typed_draws_nothing() -> None:
    # Review C31: no route and no fault yet: no strip and no scale ("0 … 1.1 m") to show.
    assert render_route([], None, 44) == []
    # one landmark is enough for a strip and a scale
    assert len(render_route([RoutePoint("landmark", "closure 6", 1950.0)], None, 44)) >= 2
