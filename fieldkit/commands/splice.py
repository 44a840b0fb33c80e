"""``fieldkit splice``: the splice log of a link, from the command line.

Sub-commands: ``colour`` (a fibre number to its tube and fibre colours), ``closure``, ``cable``,
``tray`` and ``limit`` (set a closure up), ``add`` (record a splice), ``plan`` (a splice plan:
typed, a preset or a CSV file; written back as CSV), ``otdr`` (fill one-way OTDR losses) and
``list`` (a closure's record, ``--json`` for scripts). Every change goes through
:mod:`fieldkit.actions.splices`, the same functions the splice workspace calls.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from fieldkit.commands.common import (
    CommandError,
    add_by,
    add_data_dir,
    operator,
    plain_text,
    print_json,
)


def _job_options(parser: argparse.ArgumentParser, *, closure: bool = True) -> None:
    parser.add_argument("--job", required=True, metavar="ID", help="the job (id or its start)")
    parser.add_argument(
        "--link",
        required=True,
        metavar="LINK",
        help="the link's label or id (a new link by that label is added if the job has none)",
    )
    if closure:
        parser.add_argument(
            "--closure", required=True, metavar="NAME", help="the closure's name or id"
        )
    add_by(parser, "who did the work")
    add_data_dir(parser)


def _sub(
    sub: Any, name: str, help_text: str, func: Any, *, job: str | None = "closure"
) -> argparse.ArgumentParser:
    """A sub-command's parser with what every one takes: the job options (``job``:
    ``"closure"`` with ``--closure``, ``"link"`` without, None for none), ``--json``, and the
    function that runs it."""
    p: argparse.ArgumentParser = sub.add_parser(name, help=help_text)
    if job is not None:
        _job_options(p, closure=job == "closure")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=func)
    return p


def _colour_options(p: argparse.ArgumentParser) -> None:
    p.add_argument(
        "--per-tube", default="12", metavar="K", help="fibres per tube or ribbon (default 12)"
    )
    p.add_argument("--sequence", default="TIA-598", help="colour sequence preset (TIA-598)")


def _method_option(p: argparse.ArgumentParser) -> None:
    p.add_argument("--method", default="fusion", choices=("fusion", "mechanical"))


def _print(args: argparse.Namespace, data: Any, line: str) -> int:
    """``data`` as JSON with ``--json``, else ``line``; the exit status 0."""
    if args.json:
        print_json(data)
    else:
        _say(line)
    return 0


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "splice",
        help="the splice log: closures, cables, trays, splices and plans",
        description="Record a link's closures and every splice by fibre number and colour, "
        "with its OTDR loss from both ends. A splice is judged on the bidirectional average "
        "(ITU-T G.650.3 App. I) against the link's splice limit (default: the 'fusion' or "
        "'mechanical' splice preset, TIA-568.3-D 0.3 dB, from memory). Colours follow TIA-598 "
        "unless a cable names another colour sequence preset.",
    )
    sub = parser.add_subparsers(dest="splice_command", metavar="SUBCOMMAND", required=True)

    p = _sub(sub, "colour", "a fibre number's tube and fibre colours", run_colour, job=None)
    p.add_argument("fibre", metavar="N", help="the fibre number")
    _colour_options(p)
    add_data_dir(p)

    p = _sub(sub, "closure", "add a closure to a link", run_closure, job="link")
    p.add_argument("name", metavar="NAME", help="the closure's name, e.g. 'JC-3 Market St'")
    p.add_argument("--route-distance", metavar="DIST", help="its route position, e.g. 2.1km")
    p.add_argument(
        "--at-fault",
        action="store_true",
        help="at the route position of the link's latest located fault (a repair closure)",
    )
    p.add_argument("--landmark", default="", help="where it is, e.g. 'chamber by the bridge'")
    p.add_argument("--notes", default="", help="free notes")

    p = _sub(sub, "cable", "add a cable entering a closure", run_cable)
    p.add_argument("name", metavar="NAME", help="the cable's name at this closure, e.g. C1")
    p.add_argument("--fibres", required=True, metavar="N", help="its fibre count")
    _colour_options(p)
    p.add_argument("--fibre-type", default="", help="a fibre preset, e.g. G.652.D or G.657.A2")

    p = _sub(sub, "tray", "add splice trays to a closure", run_tray)
    p.add_argument("numbers", metavar="N[-M]", help="a tray number or a range, e.g. 1-6")
    p.add_argument("--capacity", required=True, metavar="K", help="splices per tray")

    p = _sub(sub, "limit", "set the link's splice loss limit", run_limit, job="link")
    _method_option(p)
    group = p.add_mutually_exclusive_group(required=True)
    group.add_argument("--preset", metavar="NAME", help="a splice preset (yours or shipped)")
    group.add_argument("--max", metavar="DB", help="a figure of your own, in dB")
    p.add_argument("--source", default="", help="where your own figure comes from")

    p = _sub(sub, "add", "record a splice (and its losses)", run_add)
    p.add_argument("--fibre", required=True, metavar="N", help="the fibre of cable A")
    p.add_argument("--to-fibre", metavar="M", help="the fibre of cable B (default: plan or N)")
    p.add_argument("--cable-a", metavar="NAME", help="default: the closure's first cable")
    p.add_argument("--cable-b", metavar="NAME", help="default: the closure's second cable")
    p.add_argument("--tray", metavar="T", help="the tray (default: the next free slot)")
    p.add_argument("--slot", metavar="S", help="the slot in the tray")
    _method_option(p)
    p.add_argument("--estimate", metavar="DB", help="the splicer's estimated loss")
    p.add_argument("--loss-ab", metavar="DB", help="OTDR loss measured from end A")
    p.add_argument("--loss-ba", metavar="DB", help="OTDR loss measured from end B")
    p.add_argument("--wavelength", metavar="NM", help="the OTDR wavelength (default 1550 nm)")
    p.add_argument("--notes", default="", help="free notes")
    p.add_argument(
        "--resplice",
        action="store_true",
        help="a re-splice of a fibre already spliced (the earlier one is kept as history)",
    )

    p = _sub(sub, "plan", "set a closure's splice plan, or write it as CSV", run_plan)
    p.add_argument(
        "plan",
        nargs="?",
        metavar="PLAN",
        help="'straight', '1-12 > 25-36', 'drop 13-24 > D', 'park 25-36' (';' between rows), "
        "or a splice-plan preset's name",
    )
    p.add_argument("--from-csv", metavar="FILE", help="read the plan from a CSV file")
    p.add_argument("--to-csv", metavar="FILE", help="write the plan as CSV ('-': stdout)")

    p = _sub(sub, "otdr", "fill one-way OTDR losses (asks before overwriting)", run_otdr)
    p.add_argument(
        "losses",
        nargs="+",
        metavar="FIBRE:DIR:DB",
        help="e.g. 5:ab:0.04 7:ba:-0.02 (ab = from end A, ba = from end B)",
    )
    p.add_argument("--overwrite", action="store_true", help="replace values already recorded")

    p = _sub(sub, "list", "a link's closures and splices", run_list, job=None)
    p.add_argument("--job", required=True, metavar="ID", help="the job (id or its start)")
    p.add_argument("--link", metavar="LINK", help="only this link")
    p.add_argument("--closure", metavar="NAME", help="only this closure")
    add_data_dir(p)


# -- helpers -----------------------------------------------------------------------------------
def _say(text: str, file: Any = None) -> None:
    """One line on the terminal, user text in it shown as typed (controls made visible)."""
    from fieldkit.text.escape import terminal

    print(terminal(text), file=file)


def _operator(args: argparse.Namespace) -> str:
    """``--by``, else ``$FIELDKIT_OPERATOR``, else the name saved in the terminal UI: the same
    rule as every other command (``commands.common.operator``)."""
    return operator(args)


def _store_and_job(args: argparse.Namespace) -> tuple[Any, str]:
    from fieldkit.commands.meter_record import open_store
    from fieldkit.jobs.store import StoreError

    for option in ("link", "closure", "by"):
        value = getattr(args, option, None)
        if value:
            plain_text(value, f"--{option}")
    store = open_store(args)
    try:
        return store, store.resolve(args.job)
    except StoreError as exc:
        raise CommandError(str(exc)) from None


def _call(fn: Any, *a: Any, **kw: Any) -> Any:
    from fieldkit.jobs.store import StoreError

    try:
        return fn(*a, **kw)
    except StoreError as exc:
        raise CommandError(str(exc)) from None


def _count(text: str | None, what: str, high: int = 6912) -> int | None:
    from fieldkit import inputs

    return None if text is None else inputs.count(text, what, high=high)


def _loss(text: str | None, what: str) -> float | None:
    from fieldkit import inputs

    return None if text is None else inputs.splice_loss_db(text, what)


def _library(args: argparse.Namespace) -> Any:
    from fieldkit import locations
    from fieldkit.commands.common import warn_preset_problems
    from fieldkit.presets import load_presets

    library = load_presets(locations.config_dir(getattr(args, "config_dir", None)))
    warn_preset_problems(args, library.problems)
    return library


# -- sub-commands ------------------------------------------------------------------------------
def run_colour(args: argparse.Namespace) -> int:
    from fieldkit import inputs
    from fieldkit.actions.splices import SpliceError
    from fieldkit.calc import splicing
    from fieldkit.calc.units import InputError
    from fieldkit.jobs.splices import colour_words, position_record

    fibre = inputs.fibre_number(args.fibre, "fibre")
    per_tube = inputs.count(args.per_tube, "--per-tube")
    try:
        preset = _library(args).find("colour_sequences", args.sequence)
    except InputError as exc:
        raise SpliceError(f"--sequence: {exc}") from None
    sequence = splicing.ColourSequence(
        preset.name, preset.colours, preset.tracer_colour, preset.tracer_on_tracer
    )
    position = splicing.fibre_position(fibre, per_tube, sequence)
    if args.json:
        print_json({**position_record(position), "per_tube": per_tube, "sequence": preset.name})
        return 0
    _say(
        f"fibre {fibre}: tube {position.tube} {colour_words(position.tube_colour)}, "
        f"fibre {position.fibre_in_tube} {colour_words(position.fibre_colour)} "
        f"({per_tube} a tube, {preset.name})"
    )
    return 0


def run_closure(args: argparse.Namespace) -> int:
    from fieldkit.actions import splices as act
    from fieldkit.calc.units import Kind, parse

    by = _operator(args)
    plain_text(args.name, "closure")
    plain_text(args.landmark, "--landmark")
    distance = None
    if args.route_distance is not None:
        distance = parse(
            args.route_distance, Kind.LENGTH, default_unit="m", what="--route-distance"
        ).to("m")
    store, job_id = _store_and_job(args)
    if args.at_fault:
        if distance is not None:
            raise CommandError("give --route-distance or --at-fault, not both")
        closure = _call(act.add_closure_at_fault, store, job_id, args.link, args.name, by=by)
        distance = closure.route_distance_m
    else:
        closure = _call(
            act.add_closure,
            store,
            job_id,
            args.link,
            args.name,
            route_distance_m=distance,
            landmark=args.landmark,
            notes=args.notes,
            by=by,
        )
    where = f" at route {distance:.1f} m" if distance is not None else ""
    line = f"closure {closure.name} added to link {args.link}{where}"
    return _print(args, closure.model_dump(mode="json"), line)


def run_cable(args: argparse.Namespace) -> int:
    from fieldkit.actions import splices as act

    by = _operator(args)
    fibres = _count(args.fibres, "--fibres")
    per_tube = _count(args.per_tube, "--per-tube")
    library = _library(args)
    store, job_id = _store_and_job(args)
    cable = _call(
        act.add_cable,
        store,
        job_id,
        args.link,
        args.closure,
        args.name,
        fibre_count=fibres,
        per_tube=per_tube,
        colour_sequence=args.sequence,
        fibre_type=args.fibre_type,
        library=library,
        by=by,
    )
    kind = f", {cable.fibre_type}" if cable.fibre_type else ""
    line = (
        f"cable {cable.name}: {cable.fibre_count} fibres, {cable.per_tube} a tube, "
        f"{cable.colour_sequence}{kind}"
    )
    return _print(args, cable.model_dump(mode="json"), line)


def run_tray(args: argparse.Namespace) -> int:
    from fieldkit.actions import splices as act

    by = _operator(args)
    first, _, last = args.numbers.partition("-")
    low = _count(first, "tray", high=1000) or 1
    high = _count(last, "tray", high=1000) if last else low
    assert high is not None
    if high < low:
        raise CommandError(f"tray: {args.numbers} is not a range (first, then a larger number)")
    capacity = _count(args.capacity, "--capacity", high=1000) or 1
    store, job_id = _store_and_job(args)
    trays = _call(
        act.add_trays,
        store,
        job_id,
        args.link,
        args.closure,
        list(range(low, high + 1)),
        capacity,
        by=by,
    )
    line = f"{len(trays)} trays of {capacity} added to closure {args.closure}"
    return _print(args, {"trays": [t.model_dump(mode="json") for t in trays]}, line)


def run_limit(args: argparse.Namespace) -> int:
    from fieldkit.actions import splices as act
    from fieldkit.calc.reference import loss_limit_db
    from fieldkit.jobs.splices import SpliceLimit

    by = _operator(args)
    if args.preset is not None:
        limit = act.limit_from_preset(args.method, args.preset, _library(args), by=by)
    else:
        value = loss_limit_db(args.max, "--max")
        if value > 5:
            raise CommandError(f"--max: {value:g} dB is not a splice limit (at most 5 dB)")
        limit = SpliceLimit(
            method=args.method,
            preset="",
            loss_max_db=value,
            source=plain_text(args.source, "--source") or f"set by {by or 'the operator'}",
            by=by,
        )
    store, job_id = _store_and_job(args)
    _call(act.set_splice_limit, store, job_id, args.link, limit)
    line = f"{args.method} splices on {args.link}: at most {limit.loss_max_db:.2f} dB"
    return _print(args, limit.model_dump(mode="json"), line)


def run_add(args: argparse.Namespace) -> int:
    from fieldkit import inputs
    from fieldkit.actions import splices as act
    from fieldkit.calc.units import Kind, parse
    from fieldkit.jobs.splices import colour_record, splice_line

    by = _operator(args)
    fibre_a = inputs.fibre_number(args.fibre, "--fibre")
    fibre_b = None if args.to_fibre is None else inputs.fibre_number(args.to_fibre, "--to-fibre")
    tray = _count(args.tray, "--tray", high=1000)
    slot = _count(args.slot, "--slot", high=1000)
    estimate = _loss(args.estimate, "--estimate")
    loss_ab = _loss(args.loss_ab, "--loss-ab")
    loss_ba = _loss(args.loss_ba, "--loss-ba")
    wavelength = None
    if args.wavelength is not None:
        wavelength = parse(args.wavelength, Kind.LENGTH, default_unit="nm", what="--wavelength").to(
            "nm"
        )
        if not 600 <= wavelength <= 1700:
            raise CommandError(f"--wavelength: {wavelength:g} nm is not an OTDR wavelength")
    for option in ("cable_a", "cable_b", "notes"):
        value = getattr(args, option)
        if value:
            plain_text(value, f"--{option.replace('_', '-')}")
    library = _library(args)
    store, job_id = _store_and_job(args)
    try:
        done = _call(
            act.record_splice,
            store,
            job_id,
            args.link,
            args.closure,
            fibre_a=fibre_a,
            fibre_b=fibre_b,
            cable_a=args.cable_a,
            cable_b=args.cable_b,
            tray=tray,
            slot=slot,
            method=args.method,
            estimate_db=estimate,
            loss_ab_db=loss_ab,
            loss_ba_db=loss_ba,
            wavelength_nm=wavelength,
            notes=args.notes,
            resplice=args.resplice,
            create=True,
            library=library,
            by=by,
        )
    except act.AlreadySpliced as exc:
        old = exc.splice
        raise CommandError(
            f"--fibre: fibre {fibre_a} is already spliced ({old.cable_a} {old.fibre_a} to "
            f"{old.cable_b} {old.fibre_b}); add --resplice to record a re-splice"
        ) from None
    s, j, closure = done.splice, done.judgement, done.closure
    if args.json:
        print_json(
            {
                "job_id": job_id,
                "link": args.link,
                "closure": closure.name,
                "splice_id": s.id,
                "replaces": s.replaces,
                "cable_a": s.cable_a,
                "fibre_a": s.fibre_a,
                "colours_a": colour_record(closure.cable(s.cable_a), s.fibre_a),
                "cable_b": s.cable_b,
                "fibre_b": s.fibre_b,
                "colours_b": colour_record(closure.cable(s.cable_b), s.fibre_b),
                "tray": s.tray,
                "slot": s.slot,
                "method": s.method,
                "estimate_db": s.estimate_db,
                "loss_ab_db": s.loss_ab_db,
                "loss_ba_db": s.loss_ba_db,
                "average_db": j.average_db,
                "limit_db": j.limit.loss_max_db if j.limit else None,
                "limit_source": j.limit.source if j.limit else None,
                "pass": j.passed,
                "verdict": j.verdict,
                "warnings": j.warnings,
                "notices": done.notices,
                "by": s.by,
            }
        )
        return 0
    for notice in done.notices:
        _say(f"note: {notice}", file=sys.stderr)
    _say(splice_line(closure, s, j))
    for warning in j.warnings:
        _say(f"  {warning}")
    return 0


def run_plan(args: argparse.Namespace) -> int:
    from fieldkit.actions import splices as act

    _operator(args)
    store, job_id = _store_and_job(args)
    if args.plan is not None and args.from_csv is not None:
        raise CommandError("give a PLAN or --from-csv, not both")
    if args.plan is not None:
        plain_text(args.plan, "plan", multiline=True)
        closure = _call(
            act.set_plan, store, job_id, args.link, args.closure, args.plan, library=_library(args)
        )
    elif args.from_csv is not None:
        path = Path(args.from_csv)
        try:
            text = path.read_text(encoding="utf-8-sig")
        except UnicodeDecodeError:
            raise CommandError(f"--from-csv: {path} is not UTF-8 text") from None
        job = _call(store.load, job_id)
        current = act.find_closure(act.find_link(job, args.link), args.closure)
        rows = act.plan_from_csv(current, text)
        closure = _call(
            act.set_plan_rows, store, job_id, args.link, args.closure, rows, f"CSV {path.name}"
        )
    else:
        job = _call(store.load, job_id)
        closure = act.find_closure(act.find_link(job, args.link), args.closure)
    if args.to_csv is not None:
        text = act.plan_to_csv(closure)
        if args.to_csv == "-":
            sys.stdout.write(text)
            return 0
        Path(args.to_csv).write_text(text, encoding="utf-8", newline="")
    data = {
        "closure": closure.name,
        "plan_source": closure.plan_source,
        "plan": [r.model_dump(mode="json") for r in closure.plan],
    }
    return _print(args, data, f"closure {closure.name}: plan {closure.plan_source or 'none'}")


def run_otdr(args: argparse.Namespace) -> int:
    from fieldkit import inputs
    from fieldkit.actions import splices as act

    by = _operator(args)
    losses = []
    for item in args.losses:
        parts = item.split(":")
        if len(parts) != 3 or parts[1].strip().lower() not in ("ab", "ba"):
            raise CommandError(f"{item}: give FIBRE:ab:DB or FIBRE:ba:DB, e.g. 5:ab:0.04")
        fibre = inputs.fibre_number(parts[0], "fibre")
        loss = inputs.splice_loss_db(parts[2], f"fibre {fibre}")
        direction = "A->B" if parts[1].strip().lower() == "ab" else "B->A"
        losses.append(act.OtdrLoss(fibre, direction, loss))  # type: ignore[arg-type]
    store, job_id = _store_and_job(args)
    fill = _call(
        act.record_otdr_losses,
        store,
        job_id,
        args.link,
        args.closure,
        losses,
        overwrite=args.overwrite,
        by=by,
    )
    if args.json:
        print_json(
            {
                "written": [vars(x) for x in fill.written],
                "created": fill.created,
                "not_overwritten": [
                    {**vars(x), "recorded_db": old} for x, old in fill.would_overwrite
                ],
            }
        )
        return 0
    _say(f"{len(fill.written)} losses recorded ({len(fill.created)} new splices)")
    for x, old in fill.would_overwrite:
        _say(
            f"  fibre {x.fibre} {x.direction}: kept {old:.2f} dB, not {x.loss_db:.2f} dB "
            "(--overwrite replaces it)"
        )
    return 0


def run_list(args: argparse.Namespace) -> int:
    from fieldkit.actions import splices as act
    from fieldkit.jobs.reports import closure_rows
    from fieldkit.jobs.splices import closure_summary, colour_record, splice_line, tray_map

    store, job_id = _store_and_job(args)
    job = _call(store.load, job_id)
    links = [act.find_link(job, args.link)] if args.link else list(job.links)
    out: list[dict[str, Any]] = []
    for link in links:
        closures = [act.find_closure(link, args.closure)] if args.closure else link.closures
        for closure in closures:
            rows = closure_rows(link, closure)
            if not args.json:
                _say(f"{link.label}: {closure_summary(closure, link.splice_limits)}")
                for line in tray_map(closure):
                    _say(f"  {line}")
                for s, j, old in rows:
                    mark = " (superseded)" if old else ""
                    _say(f"  {splice_line(closure, s, j, short=True)}{mark}")
                continue
            out.append(
                {
                    "link": link.label,
                    "closure": closure.model_dump(mode="json", exclude={"splices"}),
                    "tray_map": tray_map(closure),
                    "summary": closure_summary(closure, link.splice_limits),
                    "splices": [
                        {
                            **s.model_dump(mode="json"),
                            "colours_a": colour_record(closure.cable(s.cable_a), s.fibre_a),
                            "colours_b": colour_record(closure.cable(s.cable_b), s.fibre_b),
                            "average_db": j.average_db,
                            "pass": j.passed,
                            "verdict": j.verdict,
                            "superseded": old,
                            "warnings": j.warnings,
                        }
                        for s, j, old in rows
                    ],
                }
            )
    if args.json:
        print_json({"job_id": job.id, "closures": out})
    elif not any(link.closures for link in links):
        _say("no closures recorded")
    return 0
