"""``fieldkit convert``: a typed value in another unit, in every related unit, or on the grid."""

from __future__ import annotations

import argparse
from typing import Any

from fieldkit.commands.common import CommandError, print_json


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "convert",
        help="convert levels, powers, losses, attenuation, lengths, wavelength and frequency",
        description="Convert a typed value, e.g. '-3.5 dBm' --to uW, '0.35 dB/km' --to dB/kft, "
        "'1550 nm' --to THz. Without --to, prints the value in every related unit. "
        "--grid gives the nearest ITU-T DWDM (G.694.1) and CWDM (G.694.2) channels.",
    )
    parser.add_argument("quantity", help="a value with its unit, e.g. '-3.5 dBm' or '250 uW'")
    parser.add_argument("--to", metavar="UNIT", help="the unit to convert to")
    parser.add_argument(
        "--grid", action="store_true", help="nearest WDM grid channels of a wavelength or frequency"
    )
    parser.add_argument(
        "--spacing",
        type=float,
        action="append",
        metavar="GHZ",
        help="DWDM grid spacing for --grid (100, 50, 25 or 12.5; repeatable; default 100 and 50)",
    )
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from fieldkit.calc.conversions import convert_to, grid_report, related_values
    from fieldkit.calc.units import display_unit, parse
    from fieldkit.text.convert import converted, related_lines

    value = parse(args.quantity, what="quantity")
    if args.grid:
        if args.to is not None:
            raise CommandError("give either --to or --grid, not both")
        report = grid_report(value, tuple(args.spacing or (100.0, 50.0)))
        _print_grid(report, args.json)
        return 0
    if args.spacing:
        raise CommandError("--spacing goes with --grid")
    if args.to is not None:  # an empty --to is refused by the parser, not read as "all units"
        number, unit = convert_to(value, args.to)
        if args.json:
            print_json(
                {
                    "value": number,
                    "unit": display_unit(unit),
                    "input": {
                        "value": value.magnitude,
                        "unit": display_unit(value.unit),
                        "kind": value.kind.value,
                    },
                }
            )
        else:
            print(converted(number, unit))  # the workspace's figures (fieldkit.text.convert)
        return 0
    rows = related_values(value)
    if args.json:
        print_json(
            {
                "input": {
                    "value": value.magnitude,
                    "unit": display_unit(value.unit),
                    "kind": value.kind.value,
                },
                "value": rows[0][1],
                "unit": display_unit(rows[0][0]),
                "values": [{"value": n, "unit": display_unit(u)} for u, n in rows],
            }
        )
    else:
        print("\n".join(related_lines(value, rows)))
    return 0


def _print_grid(report: Any, as_json: bool) -> None:
    if as_json:
        print_json(
            {
                "value": report.frequency_thz,
                "unit": "THz",
                "wavelength_nm": report.wavelength_nm,
                "frequency_thz": report.frequency_thz,
                "dwdm": [
                    {
                        "spacing_ghz": c.spacing_ghz,
                        "n": c.n,
                        "frequency_thz": c.frequency_thz,
                        "wavelength_nm": c.wavelength_nm,
                        "offset_ghz": c.offset_ghz,
                    }
                    for c in report.dwdm
                ],
                "cwdm": None
                if report.cwdm is None
                else {
                    "wavelength_nm": report.cwdm.wavelength_nm,
                    "offset_nm": report.cwdm.offset_nm,
                    "within_band": report.cwdm.within_band,
                },
            }
        )
        return
    from fieldkit.text.convert import GRID_SOURCES, grid_rows, rows_text

    print(rows_text(grid_rows(report)))
    print(GRID_SOURCES)
