"""``fieldkit levels``: a loss or gain applied to a level, and the sum and difference of levels.

The same arithmetic as the convert workspace's "Level and loss" and "Two levels" panels.
"""

from __future__ import annotations

import argparse
from typing import Any

from fieldkit.commands.common import CommandError, print_json


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "levels",
        help="apply a loss or gain to a level; combine or compare levels",
        description="With one level and --loss or --gain: the level after it. With two or more "
        "levels: their combined power (summed in linear units) and the difference of the first "
        "two in dB. Plain numbers are dBm; a power may be typed in W, mW, µW or nW.",
    )
    parser.add_argument("level", nargs="+", help="levels, e.g. '-3.2 dBm' or '250 uW'")
    group = parser.add_mutually_exclusive_group()
    group.add_argument("--loss", metavar="DB", help="a loss in dB to take from the level")
    group.add_argument("--gain", metavar="DB", help="a gain in dB to add to the level")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from fieldkit.calc import power
    from fieldkit.calc.units import Kind, format_number, parse

    levels_dbm = [
        parse(text, Kind.POWER, default_unit="dBm", what=f"level {i}").to("dBm")
        for i, text in enumerate(args.level, 1)
    ]
    result: dict[str, Any] = {"levels_dbm": levels_dbm}
    lines: list[str] = []
    if args.loss is not None or args.gain is not None:
        if len(levels_dbm) != 1:
            raise CommandError("--loss and --gain take exactly one level")
        text = args.loss if args.loss is not None else args.gain
        change_db = parse(
            text, Kind.RATIO, default_unit="dB", what="loss" if args.loss is not None else "gain"
        ).to("dB")
        if args.loss is not None:
            after = power.apply_loss(levels_dbm[0], change_db)
        else:
            after = power.apply_gain(levels_dbm[0], change_db)
        after_mw = power.dbm_to_mw(after)
        result.update(value=after, unit="dBm", level_dbm=after, power_mw=after_mw)
        if args.loss is not None:
            result["percent_transmitted"] = power.loss_db_to_percent_transmitted(change_db)
        lines.append(f"{format_number(after)} dBm ({format_number(after_mw)} mW)")
    elif len(levels_dbm) >= 2:
        total = power.sum_levels_dbm(levels_dbm)
        difference = power.level_difference_db(levels_dbm[0], levels_dbm[1])
        result.update(
            value=total,
            unit="dBm",
            sum_dbm=total,
            sum_mw=power.dbm_to_mw(total),
            difference_db=difference,
        )
        lines.append(
            f"combined: {format_number(total)} dBm ({format_number(power.dbm_to_mw(total))} mW)"
        )
        lines.append(f"first − second: {format_number(difference)} dB")
    else:
        raise CommandError("give two or more levels, or one level with --loss or --gain")
    if args.json:
        print_json(result)
    else:
        print("\n".join(lines))
    return 0
