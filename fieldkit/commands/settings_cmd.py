"""``fieldkit settings``: what the reports print in their letterhead and test-equipment block.

    fieldkit settings show [--json]
    fieldkit settings contractor NAME        (an empty NAME clears it)
    fieldkit settings crew NAME
    fieldkit settings csv comma|semicolon
    fieldkit settings equipment-add KIND ID --calibrated YYYY-MM-DD [--due YYYY-MM-DD]
                                    [--description TEXT]      (KIND: meter, source, otdr)
    fieldkit settings equipment-list [--json]
    fieldkit settings equipment-remove ID

Bad input (an unknown kind, a date that is not YYYY-MM-DD or lies in the future, a due date
before the calibration) is refused with one line and exit status 2; nothing is written.
"""

from __future__ import annotations

import argparse
from datetime import date
from typing import Any

from fieldkit.commands.common import CommandError, print_json
from fieldkit.text.escape import terminal


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "settings",
        help="report letterhead (contractor, crew), test equipment, CSV style",
        description="Settings the reports use: the contractor and crew named in the header, the "
        "test equipment with its calibration dates, and the CSV style.",
    )
    parser.add_argument(
        "--config-dir", default=argparse.SUPPRESS, help="folder for settings and user presets"
    )
    sub = parser.add_subparsers(dest="settings_command", metavar="WHAT", required=True)

    p = sub.add_parser("show", help="every report setting")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_show))

    for key, what in (("contractor", "the contractor's name"), ("crew", "the crew's name")):
        p = sub.add_parser(key, help=f"set {what} on reports ('' clears it)")
        p.add_argument("value", metavar="NAME")
        p.set_defaults(func=_guard(run_text), key=key)

    p = sub.add_parser("csv", help="CSV style: comma (decimal point) or semicolon (decimal comma)")
    p.add_argument("style", choices=("comma", "semicolon"))
    p.set_defaults(func=_guard(run_csv))

    p = sub.add_parser("equipment-add", help="add a meter, light source or OTDR")
    p.add_argument("kind", help="meter, source or otdr")
    p.add_argument("id", help="its id or serial number, as on the instrument")
    p.add_argument("--calibrated", required=True, metavar="YYYY-MM-DD", help="last calibration")
    p.add_argument("--due", metavar="YYYY-MM-DD", help="next calibration due")
    p.add_argument("--description", default="", help="e.g. 'power meter, InGaAs'")
    p.set_defaults(func=_guard(run_add))

    p = sub.add_parser("equipment-list", help="the test equipment listed")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_list))

    p = sub.add_parser("equipment-remove", help="remove a piece of equipment by its id")
    p.add_argument("id")
    p.set_defaults(func=_guard(run_remove))


def _guard(func: Any) -> Any:
    def run(args: argparse.Namespace) -> int:
        from fieldkit.settings import SettingsError

        try:
            return int(func(args))
        except SettingsError as exc:
            raise CommandError(str(exc)) from None

    return run


def _config(args: argparse.Namespace) -> Any:
    from fieldkit import locations

    return locations.config_dir(getattr(args, "config_dir", None))


def run_show(args: argparse.Namespace) -> int:
    from fieldkit.settings import report_settings

    s = report_settings(_config(args))
    if args.json:
        print_json(
            {
                "contractor": s.contractor,
                "crew": s.crew,
                "csv_style": s.csv_style,
                "equipment": [e.as_dict() for e in s.equipment],
                "problems": list(s.problems),
            }
        )
        return 0
    print(f"contractor: {terminal(s.contractor) or '(not set)'}")
    print(f"crew: {terminal(s.crew) or '(not set)'}")
    print(f"csv style: {s.csv_style}")
    _print_equipment(s.equipment)
    for line in s.problems:
        print(f"warning: {terminal(line)}")
    return 0


def _print_equipment(kit: Any) -> None:
    from fieldkit.settings import EQUIPMENT_WORDS

    if not kit:
        print("equipment: none listed (fieldkit settings equipment-add KIND ID --calibrated DATE)")
    for e in kit:
        due = f", due {e.due.isoformat()}" if e.due else ""
        desc = f" ({terminal(e.description)})" if e.description else ""
        print(
            f"{EQUIPMENT_WORDS[e.kind]} {terminal(e.id)}{desc}: "
            f"calibrated {e.calibrated.isoformat()}{due}"
        )


def run_text(args: argparse.Namespace) -> int:
    from fieldkit.settings import set_report_text

    value = set_report_text(_config(args), args.key, args.value)
    print(f"{args.key}: {terminal(value)}" if value else f"{args.key}: cleared")
    return 0


def run_csv(args: argparse.Namespace) -> int:
    from fieldkit.settings import set_csv_style

    print(f"csv style: {set_csv_style(_config(args), args.style)}")
    return 0


def run_add(args: argparse.Namespace) -> int:
    from fieldkit.settings import add_equipment, make_equipment

    item = make_equipment(
        args.kind.strip().casefold(),
        args.id,
        args.calibrated,
        args.due,
        args.description,
        today=date.today(),
    )
    add_equipment(_config(args), item)
    _print_equipment([item])
    return 0


def run_list(args: argparse.Namespace) -> int:
    from fieldkit.settings import report_settings

    s = report_settings(_config(args))
    if args.json:
        print_json({"equipment": [e.as_dict() for e in s.equipment]})
        return 0
    _print_equipment(s.equipment)
    return 0


def run_remove(args: argparse.Namespace) -> int:
    from fieldkit.settings import remove_equipment

    print(f"removed {terminal(remove_equipment(_config(args), args.id))}")
    return 0
