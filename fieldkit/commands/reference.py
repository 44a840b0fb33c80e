"""``fieldkit reference``: check a meter reference, save it into a job, or recheck it."""

from __future__ import annotations

import argparse
from typing import Any

from fieldkit.commands.common import CommandError, add_data_dir, print_json, saved_on_link


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "reference",
        help="check a power-meter reference, save it into a job, or recheck it for drift",
        description="A reference level (dBm, or W, mW, µW, nW) taken by a named method. Warns "
        "when it is several dB below what the source should deliver, and when a multimode "
        "reference has no launch condition. With --job and --link it is saved onto the link; "
        "with --recheck it is compared with the reference in use at that wavelength: a drift "
        "beyond the tolerance puts the results taken since the last good reference in doubt.",
    )
    parser.add_argument(
        "--level",
        required=True,
        metavar="LEVEL",
        help="the level the meter reads through the reference cords",
    )
    parser.add_argument("--wavelength", required=True, metavar="NM", help="e.g. 1310 or '850 nm'")
    parser.add_argument(
        "--method",
        default="one-cord",
        help="one-cord, two-cord or three-cord (TIA Method B, A or C)",
    )
    parser.add_argument(
        "--launch", metavar="TEXT", help="the launch condition for multimode, e.g. 'encircled flux'"
    )
    parser.add_argument(
        "--source-level",
        metavar="LEVEL",
        help="what the source should deliver (default -20 dBm multimode, -7 dBm "
        "single-mode; common practice)",
    )
    parser.add_argument(
        "--recheck",
        action="store_true",
        help="this is the end-of-session recheck of the reference in use",
    )
    parser.add_argument(
        "--of",
        metavar="REFERENCE_ID",
        dest="of_reference",
        help="for --recheck: the reference to recheck (default: the latest one "
        "set at this wavelength; give it when both directions have their own)",
    )
    parser.add_argument(
        "--tolerance",
        metavar="DB",
        help="drift tolerance for --recheck (default 0.1 dB single-mode, 0.2 dB "
        "multimode; common practice)",
    )
    from fieldkit.commands import meter_record

    meter_record.add_record_options(parser, fibre=False)
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    add_data_dir(parser)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from fieldkit.calc import reference as ref
    from fieldkit.commands import meter_record
    from fieldkit.commands.meter_record import check_text

    check_text(args)
    level_dbm = ref.level_dbm(args.level, "level")
    from fieldkit.inputs import wavelength_nm as parse_wavelength

    wavelength_nm = parse_wavelength(args.wavelength)  # the one wavelength rule
    method = ref.parse_method(args.method)
    source_dbm = ref.level_dbm(args.source_level, "source level") if args.source_level else None
    tolerance_db = ref.loss_limit_db(args.tolerance, "tolerance") if args.tolerance else None
    if tolerance_db is not None and not args.recheck:
        raise CommandError("--tolerance goes with --recheck")
    if args.of_reference and not args.recheck:
        raise CommandError("--of goes with --recheck")
    warnings = ref.reference_warnings(
        level_dbm, source_dbm=source_dbm, wavelength_nm=wavelength_nm, launch_condition=args.launch
    )
    out: dict[str, Any] = {
        "level_dbm": level_dbm,
        "wavelength_nm": wavelength_nm,
        "method": method.value,
        "tia_method": method.tia_letter,
        "end_connections_included": method.end_connections,
        "source_level_dbm": source_dbm
        if source_dbm is not None
        else ref.default_source_dbm(wavelength_nm),
        "launch_condition": args.launch,
        "warnings": warnings,
        "saved": None,
    }
    if args.recheck and not meter_record.wants_record(args):
        raise CommandError("--recheck needs --job and --link (the reference to recheck is there)")
    if meter_record.wants_record(args):
        out.update(_save(args, level_dbm, wavelength_nm, method, tolerance_db))
    if args.json:
        print_json(out)
        return 0
    from fieldkit.text.numbers import minus
    from fieldkit.text.words import counted

    print(minus(f"reference  {level_dbm:.2f} dBm at {wavelength_nm:g} nm"))
    ends = counted(method.end_connections, "end connection")
    print(f"method     {method.label}: {ends} included")
    if "drift_db" in out:
        drift = f"{out['drift_db']:+.2f} dB (tolerance ±{out['tolerance_db']:.2f} dB)"
        print(minus(f"drift      {drift}"))
        print(minus(out["drift_message"]))
        if out["in_doubt_result_ids"]:
            doubted = counted(len(out["in_doubt_result_ids"]), "result")
            print(f"{doubted} marked reference-in-doubt")
    for warning in warnings:
        print(f"warning: {warning}")
    if out["saved"]:
        saved = out["saved"]
        print(
            f"saved into job {saved['job_id']}, link {saved['link_label']}: reference "
            f"{saved['reference_id']}"
        )
    return 0


def _save(
    args: argparse.Namespace,
    level_dbm: float,
    wavelength_nm: float,
    method: Any,
    tolerance_db: float | None,
) -> dict[str, Any]:
    from fieldkit.actions.meter import record_reference
    from fieldkit.commands import meter_record
    from fieldkit.jobs.store import StoreError

    store = meter_record.open_store(args)
    job_id = meter_record.resolve_job(store, args)
    try:
        saved = record_reference(
            store,
            job_id,
            args.link,
            wavelength_nm=wavelength_nm,
            level_dbm=level_dbm,
            method=method,
            details=meter_record.details_of(args),
            recheck=args.recheck,
            tolerance_db=tolerance_db,
            of_reference=args.of_reference,
        )
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    out: dict[str, Any] = {}
    if saved.recheck is not None:
        outcome = saved.recheck
        out.update(
            drift_db=outcome.drift.drift_db,
            tolerance_db=outcome.drift.tolerance_db,
            within_tolerance=outcome.drift.within,
            drift_message=outcome.drift.message,
            rechecked_reference_id=outcome.initial.id,
            in_doubt_result_ids=outcome.in_doubt_ids,
        )
    out["saved"] = saved_on_link(saved, reference_id=saved.record.id, kind=saved.record.kind)
    return out
