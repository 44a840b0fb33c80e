"""``fieldkit locate``: an OTDR distance or a round-trip time to a place on the route.

Also the shared pieces the fault workspace uses: turning a :class:`~fieldkit.calc.locate.Location`
into JSON, into report lines, and into a job's :class:`~fieldkit.jobs.models.FaultRecord`.
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldkit.commands.common import (
    CommandError,
    add_by,
    add_data_dir,
    add_fibre_type,
    add_job_link,
    open_store,
    plain_text,
    print_json,
    saved_on_link,
    warn_preset_problems,
)

if TYPE_CHECKING:  # imported lazily at run time: `fieldkit --help` must stay fast
    from fieldkit.calc.locate import LocateInput, Location


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "locate",
        help="where on the route an OTDR event or a round-trip time lies, with its range",
        description="Turn an OTDR distance (or a round-trip time) into fibre, sheath and route "
        "distance, the nearest landmark and the sheath marking to look for, with an uncertainty "
        "range. --distance needs a unit, as the OTDR shows it (m, km, ft, kft, mi): '3.412' "
        "alone could be km or m, so a bare number is refused; the other lengths read a bare "
        "number as metres. Landmarks "
        "(OTDR distance with the same set-up, and route distance) are interpolated, which "
        "cancels most index and helix error. The search window is the route distance ± the "
        "root-sum-square of independent "
        "terms (instrument offset, scale error × distance, sample spacing, group index, helix); "
        "the worst case, their sum, is shown beside it. Distances are shown to the place "
        "their ± allows (2010 m ± 30 m); --json keeps every digit.",
    )
    reading = parser.add_argument_group("the reading (one of)")
    reading.add_argument(
        "--distance",
        metavar="D",
        help="the event's distance as the OTDR shows it, with its unit, e.g. '3.412 km'",
    )
    reading.add_argument("--time", metavar="T", help="the round-trip time, e.g. '34.1 us'")
    index = parser.add_argument_group("group index")
    index.add_argument(
        "--ior-set",
        metavar="N",
        help="the index set on the OTDR (its group index setting; default: the fibre's)",
    )
    index.add_argument("--ior", metavar="N", help="the fibre's group index, typed")
    add_fibre_type(
        index, "a fibre preset (e.g. G.652.D, OS2, OM3) giving the group index", fibre_alias=True
    )
    index.add_argument(
        "--wavelength", metavar="NM", help="the OTDR wavelength for --fibre-type, e.g. 1550"
    )
    route = parser.add_argument_group("cable and route")
    route.add_argument("--helix", metavar="PCT", help="helix / excess fibre length, percent")
    route.add_argument(
        "--cable",
        metavar="NAME",
        help="a cable construction preset giving the helix and its uncertainty (see --list-cables)",
    )
    route.add_argument(
        "--slack",
        action="append",
        default=[],
        metavar="POS:LEN",
        help="a slack loop or storage coil: route position and cable length "
        "(repeatable), e.g. '1200:20' or '1.2 km:20 m'",
    )
    route.add_argument(
        "--landmark",
        action="append",
        default=[],
        metavar="NAME:OTDR_DISTANCE:ROUTE_DISTANCE",
        help="a landmark (repeatable), e.g. 'closure 7:3.400 km:3330'",
    )
    marking = parser.add_argument_group("sheath markings")
    marking.add_argument("--marking-start", metavar="M", help="the sheath marking at the start")
    marking.add_argument(
        "--marking-unit",
        choices=("m", "ft"),
        default="m",
        help="the unit the sheath is marked in (default m)",
    )
    marking.add_argument(
        "--marking-direction",
        choices=("up", "down"),
        default="up",
        help="whether markings count up or down away from the start (default up)",
    )
    two = parser.add_argument_group("two-ended check")
    two.add_argument(
        "--from-b", metavar="D", help="the same event's distance from the far end (same set-up)"
    )
    two.add_argument("--total", metavar="D", help="the end-to-end length as the OTDR shows it")
    err = parser.add_argument_group("uncertainty (± half-widths; typical defaults)")
    err.add_argument("--offset", metavar="D", help="instrument offset (default 1 m)")
    err.add_argument(
        "--scale-error", metavar="PCT", help="scale error, percent of distance (default 0.01)"
    )
    err.add_argument("--sample-spacing", metavar="D", help="sample spacing (default 1 m)")
    err.add_argument(
        "--ior-uncertainty", metavar="N", help="group index uncertainty (default 0.001)"
    )
    err.add_argument(
        "--helix-uncertainty",
        metavar="PCT",
        help="helix uncertainty, percentage "
        "points (default: the cable preset's, or 0.5 with --helix)",
    )
    err.add_argument(
        "--landmark-uncertainty",
        metavar="D",
        help="route distance uncertainty of each landmark (default 0)",
    )
    out = parser.add_argument_group("output")
    out.add_argument(
        "--unit",
        choices=("m", "km", "ft", "mi"),
        default="m",
        help="unit of the text output (default m; --json is always in metres)",
    )
    out.add_argument("--json", action="store_true", help="print one JSON object")
    out.add_argument(
        "--list-cables", action="store_true", help="list the cable construction presets and exit"
    )
    save = parser.add_argument_group("saving onto a job's link")
    add_job_link(
        save,
        job="the job (its id or the start of it)",
        link="the link's id or label (created if new)",
    )
    add_by(save, "who located the fault")
    save.add_argument("--notes", default="", metavar="TEXT", help="a note to keep with it")
    add_data_dir(parser)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from fieldkit import safety
    from fieldkit.calc.locate import locate

    if args.list_cables:
        return _list_cables(args)
    inp, inputs, notes = build_input(args)
    location = locate(inp)
    saved: dict[str, Any] | None = None
    if args.job or args.link:
        saved = _save(args, location, inputs)
    if args.json:
        data = result_json(location, inputs, unit=args.unit)
        data["notes"] = notes
        data["saved"] = saved
        print_json(data)
        return 0
    from fieldkit.text.locate import report_lines

    for line in report_lines(location, unit=args.unit, notes=notes):
        print(line)
    if saved:
        print(
            f"Saved onto job {saved['job_id']}, link {saved['link_label']} "
            f"(fault {saved['fault_id']})."
        )
    print()
    print(safety.DIGGING)
    print(safety.DEFER)
    return 0


# -- parsing the command line -----------------------------------------------------------------
def _length_m(text: str, what: str) -> float:
    from fieldkit.calc.units import Kind, parse

    value = parse(text, Kind.LENGTH, default_unit="m", what=what)
    return value.to("m")


def _number(text: str, what: str) -> float:
    from fieldkit.calc.units import parse_number

    return parse_number(text, what)


def _percent(text: str, what: str) -> float:
    from fieldkit.calc.units import normalise_text, parse_number

    cleaned = normalise_text(text).rstrip()
    if cleaned.endswith("%"):
        cleaned = cleaned[:-1]
    return parse_number(cleaned, what)


def parse_landmark(text: str) -> Any:
    """``NAME:OTDR_DISTANCE:ROUTE_DISTANCE`` (the name may hold colons; the last two split)."""
    from fieldkit.calc.locate import Landmark

    parts = text.rsplit(":", 2)
    if len(parts) != 3 or not parts[0].strip():
        raise CommandError(f"landmark: '{text}' is not NAME:OTDR_DISTANCE:ROUTE_DISTANCE")
    name = plain_text(parts[0].strip(), "landmark name")
    return Landmark(
        name,
        _length_m(parts[1], f"landmark '{name}' OTDR distance"),
        _length_m(parts[2], f"landmark '{name}' route distance"),
    )


def parse_slack(text: str) -> Any:
    """``POS:LEN`` or ``POS:LEN:LABEL``: a slack loop's route position and cable length."""
    from fieldkit.calc.locate import SlackLoop

    parts = text.split(":", 2)
    if len(parts) < 2:
        raise CommandError(f"slack: '{text}' is not POS:LEN (route position : cable length)")
    label = parts[2].strip() if len(parts) == 3 else ""
    return SlackLoop(
        _length_m(parts[0], "slack route position"),
        _length_m(parts[1], "slack cable length"),
        label,
    )


def build_input(args: argparse.Namespace) -> tuple[LocateInput, dict[str, Any], list[str]]:
    """The calculation's input from the options, the inputs as given (for the job record), and
    notes on where the index and helix came from."""
    from fieldkit.calc.locate import ErrorTerms, LocateInput, Marking, TwoEnded
    from fieldkit.calc.units import Kind, parse

    notes: list[str] = []
    if bool(args.distance) == bool(args.time):
        raise CommandError("give either --distance or --time")
    distance_m = None
    if args.distance:
        from fieldkit.inputs import otdr_distance_m

        distance_m = otdr_distance_m(args.distance, "distance")
    time_s = parse(args.time, Kind.TIME, what="time").to("s") if args.time else None
    if args.ior and args.fibre_type:
        raise CommandError("give either --ior or --fibre-type, not both")
    group_index: float | None = None
    library = None
    if args.ior:
        group_index = _number(args.ior, "ior")
    elif args.fibre_type:
        if not args.wavelength:
            raise CommandError("--fibre-type needs --wavelength (the OTDR's wavelength in nm)")
        library = _presets(args)
        fibre = library.find("fibres", args.fibre_type)
        wavelength_nm = parse(
            args.wavelength, Kind.LENGTH, default_unit="nm", what="wavelength"
        ).to("nm")
        group_index = fibre.group_index(wavelength_nm)
        notes.append(
            f"Group index {group_index:.4f}: {fibre.name} at {wavelength_nm:g} nm, "
            "typical (fibre preset)."
        )
    elif args.wavelength:
        raise CommandError("--wavelength goes with --fibre-type")
    index_set = _number(args.ior_set, "ior-set") if args.ior_set else None
    if args.helix and args.cable:
        raise CommandError("give either --helix or --cable, not both")
    helix: float | None = None
    helix_u = 0.0
    if args.helix:
        helix = _percent(args.helix, "helix")
        from fieldkit.calc.locate import TYPED_HELIX_UNCERTAINTY_PERCENT

        helix_u = TYPED_HELIX_UNCERTAINTY_PERCENT
    elif args.cable:
        library = library or _presets(args)
        cable = library.find("cables", args.cable)
        helix, helix_u = cable.helix_percent, cable.helix_uncertainty_percent
        notes.append(f"Helix {helix:g} ± {helix_u:g} %: {cable.name}, typical ({cable.source}).")
    if args.helix_uncertainty:
        helix_u = _percent(args.helix_uncertainty, "helix uncertainty")
    defaults = ErrorTerms()
    errors = ErrorTerms(
        offset_m=_length_m(args.offset, "offset") if args.offset else defaults.offset_m,
        scale_error_percent=(
            _percent(args.scale_error, "scale error")
            if args.scale_error
            else defaults.scale_error_percent
        ),
        sample_spacing_m=(
            _length_m(args.sample_spacing, "sample spacing")
            if args.sample_spacing
            else defaults.sample_spacing_m
        ),
        group_index_uncertainty=(
            _number(args.ior_uncertainty, "ior uncertainty")
            if args.ior_uncertainty
            else defaults.group_index_uncertainty
        ),
        helix_uncertainty_percent=helix_u,
        landmark_route_uncertainty_m=(
            _length_m(args.landmark_uncertainty, "landmark uncertainty")
            if args.landmark_uncertainty
            else 0.0
        ),
    )
    marking = None
    if args.marking_start:
        marking = Marking(
            _number(args.marking_start, "marking start"), args.marking_unit, args.marking_direction
        )
    two_ended = None
    if args.from_b or args.total:
        if not (args.from_b and args.total):
            raise CommandError("the two-ended check needs both --from-b and --total")
        two_ended = TwoEnded(_length_m(args.from_b, "from-b"), _length_m(args.total, "total"))
    inp = LocateInput(
        otdr_distance_m=distance_m,
        round_trip_time_s=time_s,
        index_set=index_set,
        group_index=group_index,
        helix_percent=helix,
        slack=tuple(parse_slack(s) for s in args.slack),
        landmarks=tuple(parse_landmark(s) for s in args.landmark),
        marking=marking,
        two_ended=two_ended,
        errors=errors,
    )
    inputs = {
        "distance": args.distance,
        "time": args.time,
        "ior_set": args.ior_set,
        "ior": args.ior,
        "fibre": args.fibre_type,
        "wavelength": args.wavelength,
        "helix": args.helix,
        "cable": args.cable,
        "slack": list(args.slack),
        "landmarks": list(args.landmark),
        "marking_start": args.marking_start,
        "marking_unit": args.marking_unit,
        "marking_direction": args.marking_direction,
        "from_b": args.from_b,
        "total": args.total,
    }
    return inp, input_record(inp, {k: v for k, v in inputs.items() if v not in (None, [])}), notes


def _presets(args: argparse.Namespace) -> Any:
    from fieldkit import locations
    from fieldkit.presets import load_presets

    config = getattr(args, "config_dir", None)
    library = load_presets(locations.config_dir(Path(config) if config else None))
    warn_preset_problems(args, library.problems)
    return library


def _list_cables(args: argparse.Namespace) -> int:
    library = _presets(args)
    cables = list(library.cables.values())
    if args.json:
        print_json(
            {
                "cables": [
                    {
                        "name": c.name,
                        "construction": c.construction,
                        "helix_percent": c.helix_percent,
                        "helix_uncertainty_percent": c.helix_uncertainty_percent,
                        "source": c.source,
                    }
                    for c in cables
                ]
            }
        )
        return 0
    for c in cables:
        print(
            f"{c.name}: {c.helix_percent:g} ± {c.helix_uncertainty_percent:g} % (typical) — "
            f"{c.construction}"
        )
    return 0


# -- shared with the fault workspace: the record is built in fieldkit.actions.saves ----------
def input_record(inp: LocateInput, typed: dict[str, Any]) -> dict[str, Any]:
    """See :func:`fieldkit.actions.saves.fault_inputs`."""
    from fieldkit.actions.saves import fault_inputs

    return fault_inputs(inp, typed)


def _position_json(p: Any, unit: str) -> dict[str, Any]:
    from fieldkit.actions.saves import slack_row
    from fieldkit.calc.locate import describe_offset, in_unit

    return {
        "fiber_distance_m": p.fibre_distance_m,
        "sheath_distance_m": p.sheath_distance_m,
        "route_distance_m": p.route_distance_m,
        "uncertainty_m": p.uncertainty_m,
        "low_m": p.low_m,
        "high_m": p.high_m,
        "worst_case_m": p.worst_case_m,
        "fiber_uncertainty_m": p.fibre_uncertainty_m,
        "sheath_uncertainty_m": p.sheath_uncertainty_m,
        "basis": p.basis,
        "between": list(p.between) if p.between else None,
        "nearest_landmark": p.nearest_landmark,
        "offset_from_landmark_m": p.offset_from_landmark_m,
        "from_landmark": (
            describe_offset(p.offset_from_landmark_m, p.nearest_landmark, unit)
            if p.nearest_landmark is not None and p.offset_from_landmark_m is not None
            else None
        ),
        "in_slack": None if p.in_slack is None else slack_row(p.in_slack),
        "marking": None
        if p.marking is None
        else {
            "value": p.marking.value,
            "low": p.marking.low,
            "high": p.marking.high,
            "unit": p.marking.unit,
            "direction": p.marking.direction,
            "text": p.marking.describe(),
        },
        "terms": [
            {"name": c.name, "route_m": c.route_m, "fiber_m": c.fibre_m} for c in p.contributions
        ],
        "in_unit": {
            "unit": unit,
            "route_distance": in_unit(p.route_distance_m, unit),
            "low": in_unit(p.low_m, unit),
            "high": in_unit(p.high_m, unit),
            "uncertainty": in_unit(p.uncertainty_m, unit),
        },
    }


def result_json(location: Location, inputs: dict[str, Any], unit: str = "m") -> dict[str, Any]:
    """Everything the CLI and the workspace show, as one JSON-ready dict (lengths in m)."""
    from fieldkit import safety

    data = _position_json(location.position, unit)
    data.update(
        {
            "group_index": location.group_index,
            "index_set": location.index_set,
            "helix_percent": location.helix_percent,
            "uncertainty_method": "root-sum-square of independent terms; worst case = linear sum",
            "two_ended": None,
            "warnings": list(location.warnings),
            "cautions": [safety.DIGGING, safety.DEFER],
            "inputs": inputs,
        }
    )
    two = location.two_ended
    if two is not None:
        data["two_ended"] = {
            "from_a_m": two.from_a_m,
            "from_b_m": two.from_b_m,
            "total_m": two.total_m,
            "discrepancy_m": two.discrepancy_m,
            "tolerance_m": two.tolerance_m,
            "consistent": two.consistent,
            "weight_a": two.weight_a,
            "combined": _position_json(two.combined, unit),
        }
    return data


def fault_record(
    location: Location, inputs: dict[str, Any], *, by: str = "", notes: str = ""
) -> Any:
    """See :func:`fieldkit.actions.saves.fault_record`."""
    from fieldkit.actions.saves import fault_record as build

    return build(location, inputs, by=by, notes=notes)


def _save(args: argparse.Namespace, location: Location, inputs: dict[str, Any]) -> dict[str, Any]:
    from fieldkit.actions.saves import save_fault
    from fieldkit.commands.common import operator
    from fieldkit.jobs.store import StoreError

    if not (args.job and args.link):
        raise CommandError("saving onto a job needs both --job and --link")
    plain_text(args.link, "link")
    plain_text(args.notes or "", "notes", multiline=True)
    store = open_store(args)
    record = fault_record(location, inputs, by=operator(args), notes=args.notes)
    try:
        job_id = store.resolve(args.job)
        saved = save_fault(store, job_id, args.link, record, create=True)
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    return saved_on_link(saved, fault_id=record.id)
