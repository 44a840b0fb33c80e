"""A converted value and a grid position as lines of text: ``fieldkit convert`` prints them and
the Convert workspace shows them, so the two always give the same figures.

The one number rule is :func:`fieldkit.calc.units.format_number` at its default of 6
significant figures (``DIGITS``), with the typographic minus (U+2212) for negative numbers;
``--json`` keeps the full float. Six figures hold what a meter gives (a level to 0.001 dB
below 1000 dB, a power to 0.001 µW near 100 µW) with no float noise. The grid rows keep the
grid tables' own resolution instead: wavelengths to 0.001 nm and frequencies to 0.0001 THz
(0.1 GHz, finer than the 6.25 GHz steps of the flexible grid).
"""

from __future__ import annotations

from fieldkit.calc.conversions import GridReport
from fieldkit.calc.units import Kind, Value, display_unit, format_number
from fieldkit.text.numbers import MINUS

#: Significant figures of every converted value, in the CLI and in the workspace.
DIGITS = 6


def number(x: float) -> str:
    """A converted value: ``DIGITS`` significant figures, the typographic minus."""
    return format_number(x, DIGITS)


def rows_text(rows: list[tuple[str, str]]) -> str:
    """Label and text rows, the labels right-aligned in one column."""
    width = max(len(label) for label, _ in rows)
    return "\n".join(f"{label:>{width}}  {text}".rstrip() for label, text in rows)


def converted(x: float, unit: str) -> str:
    """``446.684 µW``: one value in one unit."""
    return f"{number(x)} {display_unit(unit)}"


def related_lines(value: Value, rows: list[tuple[str, float]]) -> list[str]:
    """``value`` in each related unit (``rows`` from ``calc.conversions.related_values``), the
    numbers right-aligned; a loss also says what share of the power passes."""
    shown = [(number(x), display_unit(unit)) for unit, x in rows]
    width = max(len(text) for text, _ in shown)
    lines = [f"{text:>{width}} {unit}" for text, unit in shown]
    if value.kind is Kind.RATIO:
        lines.append(f"passes {number(value.to('%'))} % of the power")
    return lines


def _signed(x: float, decimals: int) -> str:
    return f"{x:+.{decimals}f}".replace("-", MINUS)


def grid_rows(report: GridReport) -> list[tuple[str, str]]:
    """Where a wavelength or frequency sits on the ITU-T grids, as label and text rows that fit
    a 40-column panel: the value, then per DWDM spacing (G.694.1) the channel number, its
    frequency and wavelength and the offset, then the CWDM (G.694.2) channel."""
    rows = [
        ("λ", f"{report.wavelength_nm:.3f} nm"),
        ("f", f"{report.frequency_thz:.4f} THz"),
    ]
    for channel in report.dwdm:
        # the grid by its spacing, not "DWDM 100" (read as 100G optics)
        rows.append(
            (
                f"{channel.spacing_ghz:g} GHz",
                f"n={channel.n:+d} {channel.frequency_thz:.3f} THz".replace("-", MINUS),
            )
        )
        rows.append(
            ("", f"{channel.wavelength_nm:.3f} nm, Δf {_signed(channel.offset_ghz, 1)} GHz")
        )
    if report.cwdm is not None:
        note = "" if report.cwdm.within_band else " (outside band)"
        rows.append(
            (
                "CWDM",
                f"{report.cwdm.wavelength_nm:.0f} nm, Δλ {_signed(report.cwdm.offset_nm, 1)} nm"
                f"{note}",
            )
        )
    return rows


GRID_SOURCES = "Grids: ITU-T G.694.1 (DWDM, channels n from 193.1 THz), G.694.2 (CWDM)."
