"""``fieldkit loss``: meter readings to insertion loss, judged against a method-aware limit.

With ``--job``/``--link``/``--fibre`` the reference and the result are also recorded into the
job (see :mod:`fieldkit.commands.meter_record`).
"""

from __future__ import annotations

import argparse
from typing import Any

from fieldkit.commands.common import CommandError, add_data_dir, print_json


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "loss",
        help="insertion loss from a meter reference and readings, with pass/fail",
        description="Insertion loss = reference level − reading (dB). Levels in dBm (a bare "
        "number) or in W, mW, µW, nW. The reference method decides how many end connections "
        "the result includes (one-cord 2, two-cord 1, three-cord 0) and so the limit taken "
        "from a link budget. A negative loss is a reference problem, never a pass. With "
        "--job, --link and --fibre the reference and the result are saved into the job.",
    )
    parser.add_argument(
        "--reference",
        required=True,
        metavar="LEVEL",
        help="the reference level, e.g. -7.2 or '-7.2 dBm' or '190 uW'",
    )
    parser.add_argument(
        "--reading", required=True, metavar="LEVEL", help="the level read through the link (A->B)"
    )
    parser.add_argument(
        "--reading-back",
        metavar="LEVEL",
        help="the level read in the other direction (B->A); gives the average",
    )
    parser.add_argument(
        "--reference-back",
        metavar="LEVEL",
        help="the reference for the B->A direction (default: --reference)",
    )
    parser.add_argument(
        "--method",
        default="one-cord",
        help="one-cord, two-cord or three-cord (TIA Method B, A or C); default one-cord",
    )
    parser.add_argument(
        "--wavelength",
        metavar="NM",
        help="test wavelength, e.g. 1310 or '850 nm' (for the plausibility check, "
        "the budget row and the job record)",
    )
    parser.add_argument(
        "--limit",
        metavar="DB",
        help="the largest loss allowed, in dB, for a result taken with this method",
    )
    parser.add_argument(
        "--source-level",
        metavar="LEVEL",
        help="what the source should deliver through a good cord (default: "
        "-20 dBm multimode, -7 dBm single-mode; common practice)",
    )
    parser.add_argument(
        "--launch", metavar="TEXT", help="the launch condition for multimode, e.g. 'encircled flux'"
    )
    from fieldkit.commands import meter_record

    meter_record.add_record_options(parser)
    from fieldkit.commands import budget

    budget.add_link_options(parser)
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    add_data_dir(parser)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from fieldkit.calc import reference as ref
    from fieldkit.commands.meter_record import check_text

    check_text(args)
    method = ref.parse_method(args.method)
    reference_dbm = ref.level_dbm(args.reference, "reference")
    reference_back_dbm = (
        ref.level_dbm(args.reference_back, "reference back")
        if args.reference_back
        else reference_dbm
    )
    reading_dbm = ref.level_dbm(args.reading, "reading")
    reading_back_dbm = (
        ref.level_dbm(args.reading_back, "reading back") if args.reading_back else None
    )
    if args.reference_back and reading_back_dbm is None:
        raise CommandError("--reference-back goes with --reading-back")
    from fieldkit.inputs import wavelength_nm as parse_wavelength

    wavelength_nm = parse_wavelength(args.wavelength) if args.wavelength else None
    source_dbm = ref.level_dbm(args.source_level, "source level") if args.source_level else None

    limit_db, limit_from = _limit(args, method, wavelength_nm)

    losses = {"A->B": ref.insertion_loss_db(reference_dbm, reading_dbm)}
    if reading_back_dbm is not None:
        losses["B->A"] = ref.insertion_loss_db(reference_back_dbm, reading_back_dbm)
    verdict = ref.judge_fibre(losses, limit_db)

    warnings = ref.reference_warnings(
        reference_dbm,
        source_dbm=source_dbm,
        wavelength_nm=wavelength_nm,
        launch_condition=args.launch,
    )
    if reading_back_dbm is not None and args.reference_back:
        warnings += [
            f"B->A {w}"
            for w in ref.reference_warnings(
                reference_back_dbm,
                source_dbm=source_dbm,
                wavelength_nm=wavelength_nm,
                launch_condition=args.launch,
            )
            if "launch condition" not in w
        ]
    warnings += ref.level_warnings(reading_dbm, "reading")
    if reading_back_dbm is not None:
        warnings += ref.level_warnings(reading_back_dbm, "reading back")
    warnings += list(verdict.warnings)
    flags = sorted({f for v in verdict.directions.values() for f in v.flags})

    saved = None
    from fieldkit.commands import meter_record

    if meter_record.wants_record(args):
        saved = meter_record.record_readings(
            args,
            method=method,
            wavelength_nm=wavelength_nm,
            references_dbm={"A->B": reference_dbm, "B->A": reference_back_dbm},
            readings_dbm={"A->B": reading_dbm, "B->A": reading_back_dbm},
            verdict=verdict,
        )
        warnings += saved.get("warnings", [])

    if args.json:
        print_json(
            {
                "loss_db": verdict.directions["A->B"].loss_db,
                "loss_back_db": verdict.directions["B->A"].loss_db if "B->A" in losses else None,
                "average_db": verdict.average_db,
                "limit_db": limit_db,
                "limit_from": limit_from,
                "margin_db": verdict.margin_db,
                "pass": verdict.passed,
                "status": verdict.status.value,
                "method": method.value,
                "tia_method": method.tia_letter,
                "end_connections_included": method.end_connections,
                "wavelength_nm": wavelength_nm,
                "reference_dbm": reference_dbm,
                "reading_dbm": reading_dbm,
                "reading_back_dbm": reading_back_dbm,
                "flags": flags,
                "warnings": warnings,
                "saved": saved,
            }
        )
        return 0
    _print_text(verdict, method, limit_db, limit_from, warnings, saved)
    return 0


def _limit(
    args: argparse.Namespace,
    method: Any,
    wavelength_nm: float | None,
) -> tuple[float | None, str | None]:
    """The limit: typed (--limit), from the link options (the budget's), or from the budget
    saved on the job's link; None when there is none of these."""
    from fieldkit.actions import meter as meter_log
    from fieldkit.calc import reference as ref
    from fieldkit.commands import budget, meter_record

    described = budget.link_given(args)
    if args.limit and described:
        raise CommandError("give either --limit or the link options, not both")
    if args.limit:
        return ref.loss_limit_db(args.limit), "typed"
    if described:
        return _limit_from_link_options(args, method, wavelength_nm)
    if not (args.job and args.link) or wavelength_nm is None:
        return None, None
    store = meter_record.open_store(args)
    job = meter_record.load_job(store, args)
    try:
        link = meter_log.find_link(job, args.link)
    except KeyError:
        return None, None
    found = meter_log.budget_limit_db(link, wavelength_nm, method)
    if found is None:
        return None, None
    return found


def _limit_from_link_options(
    args: argparse.Namespace, method: Any, wavelength_nm: float | None
) -> tuple[float, str]:
    """The budget of the described link with only the end connections the method includes.

    ``--connectors`` counts every mated pair including the two end connections; the method
    keeps 2 (one-cord), 1 (two-cord) or 0 (three-cord) of those two.
    """
    from fieldkit.calc import budget as calc_budget
    from fieldkit.commands import budget

    if wavelength_nm is None:
        raise CommandError("a limit from the link options needs --wavelength")
    link = budget.link_from_args(args)
    full = calc_budget.compute_budget(link).at(wavelength_nm)
    kept = calc_budget.method_limit(link, method.end_connections).at(wavelength_nm)
    count = link.connector_count
    return kept.loss_db, (
        f"link budget {full.loss_db:.2f} dB with {count} mated pairs; {method.value} keeps "
        f"{method.end_connections} of the 2 end connections: {count - 2 + method.end_connections}"
        " pairs counted"
    )


def _print_text(
    verdict: Any,
    method: Any,
    limit_db: float | None,
    limit_from: str | None,
    warnings: list[str],
    saved: dict[str, Any] | None,
) -> None:
    from fieldkit.text.numbers import arrow, minus
    from fieldkit.text.words import counted

    def line(label: str, text: str) -> None:
        print(minus(f"{label:<10} {text}"))

    for direction, v in verdict.directions.items():
        line(f"loss {arrow(direction)}", f"{v.loss_db:.2f} dB")
    if verdict.average_db is not None:
        line("average", f"{verdict.average_db:.2f} dB")
    ends = counted(method.end_connections, "end connection")
    line("method", f"{method.label}: {ends} included")
    if limit_db is not None:
        line("limit", f"{limit_db:.2f} dB ({limit_from})")
    if verdict.margin_db is not None:
        line("margin", f"{verdict.margin_db:+.2f} dB")
    line("result", _status_words(verdict.status.value))
    for warning in warnings:
        print(minus(arrow(f"warning: {warning}")))
    if saved:
        print(
            f"saved into job {saved['job_id']}, link {saved['link_label']}: "
            f"{counted(len(saved['result_ids']), 'result')} against reference "
            f"{', '.join(saved['reference_ids'])}"
        )


def _status_words(status: str) -> str:
    return {
        "pass": "PASS",
        "fail": "FAIL",
        "reference-problem": "REFERENCE PROBLEM (not a pass)",
        "no-limit": "no limit given (--limit or the link options)",
    }[status]
