"""``fieldkit trace``: read OTDR traces, find and measure their events, pair both directions.

``show FILE`` analyses one trace, ``pair A_TO_B B_TO_A`` averages the two directions of one
fibre, ``folder DIR`` analyses a folder into one table per fibre, ``example DIR`` writes an
invented cable's traces as standard records to try the others on. ``--job ID --link L`` judges
by the link's presets; with ``--save`` the analysis is also kept on that link (a
:class:`~fieldkit.jobs.models.TraceRecord` per fibre, through
:func:`fieldkit.actions.traces.save_traces`).
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldkit import safety
from fieldkit.commands.common import (
    CommandError,
    add_by,
    add_data_dir,
    add_fibre_type,
    add_job_link,
    operator,
    print_json,
)

if TYPE_CHECKING:
    from fieldkit.traces.analysis import Settings
    from fieldkit.traces.files import ReadOptions

SAFETY = f"{safety.OTDR_LIVE_FIBRE} {safety.DEFER}"


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "trace",
        help="OTDR traces: events, losses, reflectance; both directions averaged",
        description="Read OTDR traces (the standard SR-4731 record, or two-column text/CSV), "
        "find their events and measure them, average both directions of a fibre, analyse a "
        "folder of traces. Safety: " + SAFETY,
    )
    sub = parser.add_subparsers(dest="trace_command", metavar="SUBCOMMAND", required=True)

    show = sub.add_parser(
        "show",
        help="analyse one trace",
        description="The events (distance, kind, loss, reflectance, cumulative loss), the "
        "sections' attenuation and the verdicts of one trace, with the instrument's own "
        "events beside them. Kinds (--json 'kind'): splice (any non-reflective loss, shown as "
        "splice/bend: a splice and a bend look alike; judged by the splice maximum), "
        "reflective (the connector maximum and the reflectance), gainer, end. Safety: " + SAFETY,
    )
    show.add_argument("file", help="a trace file (.sor, or text/CSV with a header)")
    show.add_argument(
        "--html", metavar="OUT", help="also write a self-contained HTML page (trace as SVG)"
    )
    show.add_argument(
        "--direction",
        choices=("ab", "ba"),
        default=None,
        help="with --save: the trace was taken from end A (ab) or B (ba); default: AB/BA in "
        "the file name, else ab",
    )
    _common(show)
    _job_options(show, fibre=True)
    show.set_defaults(func=run_show)

    pair = sub.add_parser(
        "pair",
        help="average both directions of one fibre",
        description="Align the two traces of one fibre by their lengths and end events, match "
        "events within a tolerance and average their losses (ITU-T G.650.3). Distances are "
        "from end A. A gainer in one direction is explained, not judged alone. Safety: " + SAFETY,
    )
    pair.add_argument("a_to_b", metavar="A_TO_B", help="the trace taken from end A")
    pair.add_argument("b_to_a", metavar="B_TO_A", help="the trace taken from end B")
    pair.add_argument(
        "--html", metavar="OUT", help="also write a self-contained HTML page (both traces as SVG)"
    )
    pair.add_argument(
        "--tolerance",
        metavar="M",
        help="match events within this distance, m (default: the "
        "larger of 5 m, four samples and one pulse)",
    )
    _common(pair)
    _job_options(pair, fibre=True)
    pair.set_defaults(func=run_pair)

    folder = sub.add_parser(
        "folder",
        help="analyse a folder of traces into one table per fibre",
        description="Every trace in a folder: fibre (from the record, or the first number in "
        "the file name), direction (AB/BA in the name, or the record's start location), both "
        "directions paired, the worst event and the verdict per fibre. A progress bar shows "
        "on a terminal. Safety: " + SAFETY,
    )
    folder.add_argument("folder", metavar="DIR", help="the folder holding the traces")
    folder.add_argument("--quiet", action="store_true", help="no progress bar")
    folder.add_argument(
        "--csv",
        metavar="OUT",
        help="also write the table as CSV (one row per fibre and wavelength)",
    )
    _common(folder)
    _job_options(folder)
    folder.set_defaults(func=run_folder)

    fill = sub.add_parser(
        "fill-splices",
        help="splice losses from traces into a closure's splice log on a job's link",
        description="Find the event at the closure's route position on each fibre's traces and "
        "write its one-way losses (A→B, B→A) into the closure's splice log; the splice log "
        "shows their average. One trace and --fibre, both directions and --fibre, or --folder "
        "(fibres from the file names). A splice that already holds a different loss is not "
        "overwritten without --overwrite; --dry-run shows what would be written. Safety: " + SAFETY,
    )
    fill.add_argument("files", nargs="*", metavar="FILE", help="A→B trace, then B→A (optional)")
    fill.add_argument("--folder", metavar="DIR", help="every fibre's traces in a folder")
    fill.add_argument("--fibre", metavar="N", help="the fibre the FILE(s) hold")
    fill.add_argument(
        "--direction",
        choices=("ab", "ba"),
        default="ab",
        help="the direction of a single FILE (default ab: taken from end A)",
    )
    add_job_link(fill, required=True)
    fill.add_argument("--closure", required=True, metavar="NAME", help="the closure's name or id")
    fill.add_argument("--overwrite", action="store_true", help="replace losses already recorded")
    fill.add_argument("--dry-run", action="store_true", help="write nothing; say what would be")
    add_by(fill, "who did the work")
    _common(fill)
    fill.set_defaults(func=run_fill)

    example = sub.add_parser(
        "example",
        help="write an invented cable's traces to try the other commands on",
        description="Standard records of an invented 8 km cable, both directions of each "
        "fibre, made from the physical model (backscatter, splices, a connector, a clean end, "
        "noise). Writes only new files into DIR.",
    )
    example.add_argument("folder", metavar="DIR", help="where to write (created if missing)")
    example.add_argument("--fibres", default="4", metavar="N", help="how many fibres (1-288)")
    example.add_argument("--points", default=None, metavar="N", help="points per trace")
    example.set_defaults(func=run_example)


def _common(p: argparse.ArgumentParser) -> None:
    p.add_argument("--json", action="store_true", help="print one JSON object")
    g = p.add_argument_group("analysis (defaults are common practice)")
    g.add_argument("--splice-threshold", metavar="DB", help="smallest loss reported (0.05 dB)")
    g.add_argument(
        "--reflectance-threshold", metavar="DB", help="weakest reflection reported (-72 dB)"
    )
    g.add_argument("--end-threshold", metavar="DB", help="a loss this large is the end (3 dB)")
    g.add_argument(
        "--loss-method",
        choices=("two-line", "five-point"),
        default="two-line",
        help="event loss by the two-line least-squares method (default) or the 5-point method",
    )
    g.add_argument(
        "--backscatter",
        metavar="DB",
        help="backscatter coefficient for 1 ns, dB (default: the file's, else typical: "
        "-79 dB at 1310 nm, -82 dB at 1550 nm, from memory)",
    )
    lim = p.add_argument_group("verdict limits")
    add_fibre_type(lim, "fibre preset giving the attenuation maximum (default G.652.D)")
    lim.add_argument(
        "--polish",
        choices=("UPC", "APC"),
        default=None,
        help="connector polish: its IEC 61753-1 return-loss grade limits reflectance (UPC)",
    )
    lim.add_argument(
        "--reflectance",
        metavar="NAME",
        help="a reflectance preset limiting reflective events and ORL (e.g. 'GPON ODN'; "
        "`fieldkit presets reflectance` lists them)",
    )
    lim.add_argument("--splice-max", metavar="DB", help="splice loss maximum (0.3 dB)")
    lim.add_argument("--connector-max", metavar="DB", help="connector loss maximum (0.75 dB)")
    txt = p.add_argument_group("text traces and files")
    txt.add_argument(
        "--distance-unit",
        choices=("m", "km", "ft", "kft", "mi"),
        help="distance unit of a text trace without a header",
    )
    txt.add_argument("--wavelength", metavar="NM", help="wavelength, when the file lacks it")
    txt.add_argument("--pulse-width", metavar="NS", help="pulse width, when the file lacks it")
    txt.add_argument("--ior", metavar="N", help="group index, when the file lacks it")
    txt.add_argument(
        "--no-checksum", action="store_true", help="read a record whose checksum does not match"
    )
    add_data_dir(p)


def _job_options(p: argparse.ArgumentParser, *, fibre: bool = False) -> None:
    g = p.add_argument_group("a job's link (its presets give the verdict limits)")
    add_job_link(g)
    g.add_argument(
        "--save",
        action="store_true",
        help="also keep the analysis on the link (a retest of the same fibre, wavelength "
        "and direction supersedes the earlier one, which stays)",
    )
    if fibre:
        g.add_argument(
            "--fibre",
            metavar="N",
            help="with --save: the fibre number (default: the record's fibre ID, else the "
            "first number in the file name)",
        )
    add_by(p, "who did the work, with --save")


def _num(text: str | None, what: str, lo: float, hi: float) -> float | None:
    from fieldkit.calc.units import parse_number

    if text is None:
        return None
    value = parse_number(text, what)
    if not lo <= value <= hi:
        raise CommandError(f"{what}: {value:g} is outside {lo:g} to {hi:g}")
    return value


def settings_from(args: argparse.Namespace) -> tuple[Settings, ReadOptions]:
    """Analysis settings and read options from the command line (shared by every subcommand)."""
    from dataclasses import replace

    from fieldkit.calc.otdr import Thresholds
    from fieldkit.traces.analysis import Settings
    from fieldkit.traces.files import ReadOptions

    th = Thresholds()
    splice = _num(args.splice_threshold, "--splice-threshold", 0.001, 2.0)
    refl = _num(args.reflectance_threshold, "--reflectance-threshold", -100.0, -10.0)
    end = _num(args.end_threshold, "--end-threshold", 0.5, 30.0)
    th = replace(
        th,
        splice_loss_db=splice if splice is not None else th.splice_loss_db,
        reflectance_db=refl if refl is not None else th.reflectance_db,
        end_of_fibre_db=end if end is not None else th.end_of_fibre_db,
    )
    if th.end_of_fibre_db <= th.splice_loss_db:
        raise CommandError("--end-threshold must be larger than --splice-threshold")
    limits = limits_from(args)
    settings = Settings(
        thresholds=th,
        loss_method=args.loss_method,
        backscatter_db=_num(args.backscatter, "--backscatter", -100.0, -40.0),
        group_index=_num(args.ior, "--ior", 1.3, 1.7),
        pulse_width_ns=_num(args.pulse_width, "--pulse-width", 1.0, 100_000.0),
        limits=limits,
    )
    options = ReadOptions(
        distance_unit=args.distance_unit,
        wavelength_nm=_num(args.wavelength, "--wavelength", 600.0, 1700.0),
        pulse_width_ns=settings.pulse_width_ns,
        group_index=settings.group_index,
        check_checksum=not args.no_checksum,
    )
    return settings, options


def limits_from(args: argparse.Namespace) -> Any:
    """The verdict limits: typed options first, then the presets of ``--job``/``--link``, then
    the default presets (fieldkit.actions.traces.trace_limits says which wins)."""
    from fieldkit import locations
    from fieldkit.actions.traces import trace_limits
    from fieldkit.calc.units import InputError
    from fieldkit.commands.common import warn_preset_problems
    from fieldkit.presets import load_presets

    library = load_presets(locations.config_dir(getattr(args, "config_dir", None)))
    warn_preset_problems(args, library.problems)
    typed = {
        "fibre_type": args.fibre_type,
        "polish": args.polish,
        "reflectance": args.reflectance,
        "splice_max_db": _num(args.splice_max, "--splice-max", 0.0, 10.0),
        "connector_max_db": _num(args.connector_max, "--connector-max", 0.0, 10.0),
    }
    try:
        if args.fibre_type:
            library.find("fibres", args.fibre_type)
    except InputError as exc:
        raise CommandError(f"--fibre-type: {exc}") from None
    try:
        if args.reflectance:
            library.find("reflectance", args.reflectance)
    except InputError as exc:
        raise CommandError(f"--reflectance: {exc}") from None
    link, origin = None, ""
    if getattr(args, "job", None) or getattr(args, "link", None):
        link, origin = _job_link(args)
    return trace_limits(library, link, origin=origin, **typed)


def _job_link(args: argparse.Namespace) -> tuple[Any, str]:
    """The link named by --job and --link, and the words naming it."""
    from fieldkit.actions.traces import link_origin, load_link
    from fieldkit.calc.units import InputError
    from fieldkit.commands.common import plain_text
    from fieldkit.commands.meter_record import open_store
    from fieldkit.jobs.store import StoreError

    if not args.job or not args.link:
        raise CommandError("a job's link needs both --job and --link")
    plain_text(args.link, "--link")
    store = open_store(args)
    try:
        job, link = load_link(store, store.resolve(args.job), args.link)
    except (StoreError, InputError) as exc:
        raise CommandError(str(exc)) from None
    return link, link_origin(job, link)


def _analyse(path: str, args: argparse.Namespace) -> Any:
    from fieldkit.traces.analysis import analyse_trace
    from fieldkit.traces.files import read_trace
    from fieldkit.traces.model import TraceFileError

    settings, options = settings_from(args)
    try:
        return analyse_trace(read_trace(Path(path), options), settings)
    except TraceFileError as exc:
        raise CommandError(str(exc)) from None


def _width() -> int:
    import shutil

    return shutil.get_terminal_size((80, 24)).columns


def _answer(
    args: argparse.Namespace,
    data: Callable[[], dict[str, Any]],
    text: Callable[[int], list[str]],
    saved: dict[str, Any] | None,
    *,
    cautions: bool = True,
) -> int:
    """Print a result: with ``--json`` its object (the cautions and what was saved added),
    else its lines at the terminal's width, then the summary of what was saved."""
    if args.json:
        out = data()
        if cautions:
            out["cautions"] = [safety.OTDR_LIVE_FIBRE, safety.DEFER]
        if saved is not None:
            out["saved"] = saved
        print_json(out)
        return 0
    for line in text(_width()):
        print(line)
    if saved is not None:
        print(saved["summary"])
    return 0


def run_show(args: argparse.Namespace) -> int:
    from fieldkit.actions.traces import FibreTraces
    from fieldkit.traces import lines
    from fieldkit.traces.folder import direction_token

    _check_save(args)
    result = _analyse(args.file, args)
    if args.html:
        _write_html(Path(args.html), html_page([result], None))
    saved = None
    if args.save:
        token = args.direction or (direction_token(result.trace.source) or "AB").lower()
        direction = "B->A" if token == "ba" else "A->B"
        number = _fibre_number(args, result.trace)
        saved = _save(args, [FibreTraces(number, one_way=result, direction=direction)])
    return _answer(args, result.to_json, partial(lines.trace_lines, result), saved)


def run_pair(args: argparse.Namespace) -> int:
    from fieldkit.actions.traces import FibreTraces
    from fieldkit.traces import lines
    from fieldkit.traces.model import TraceFileError
    from fieldkit.traces.pairing import pair

    _check_save(args)
    a = _analyse(args.a_to_b, args)
    b = _analyse(args.b_to_a, args)
    tol = _num(args.tolerance, "--tolerance", 0.1, 1000.0)
    try:
        result = pair(a, b, tolerance_m=tol)
    except TraceFileError as exc:
        raise CommandError(str(exc)) from None
    if args.html:
        _write_html(Path(args.html), html_page([a, b], result))
    saved = None
    if args.save:
        saved = _save(args, [FibreTraces(_fibre_number(args, a.trace), paired=result)])
    return _answer(args, result.to_json, partial(lines.pair_lines, result), saved)


def _progress_bar(done: int, total: int, name: str) -> None:
    width = 30
    filled = width * done // max(total, 1)
    bar = "#" * filled + "." * (width - filled)
    sys.stderr.write(f"\r[{bar}] {done}/{total} {name[:30]:<30}")
    if done == total:
        sys.stderr.write("\n")
    sys.stderr.flush()


def run_folder(args: argparse.Namespace) -> int:
    from fieldkit.actions.traces import folder_fibres
    from fieldkit.traces import lines
    from fieldkit.traces.folder import analyse_folder
    from fieldkit.traces.model import TraceFileError

    _check_save(args)
    settings, options = settings_from(args)
    show_bar = not args.quiet and sys.stderr.isatty()
    try:
        result = analyse_folder(
            Path(args.folder),
            settings=settings,
            options=options,
            progress=_progress_bar if show_bar else None,
        )
    except TraceFileError as exc:
        raise CommandError(str(exc)) from None
    if result.files == 0:
        raise CommandError(f"{args.folder}: no trace files (.sor, .csv, .txt, .tsv, .dat)")
    saved = None
    if args.save:
        saved = _save(args, folder_fibres(result), progress=not args.quiet)
    if args.csv:
        _write_html(Path(args.csv), folder_csv(result))
    return _answer(args, result.to_json, partial(lines.folder_lines, result), saved, cautions=False)


def _check_save(args: argparse.Namespace) -> None:
    """Refuse --save without a job's link, and its own options without --save, before any
    trace is read."""
    if args.save and not (args.job and args.link):
        raise CommandError("--save keeps the traces on a job's link: give --job and --link")
    if not args.save and getattr(args, "fibre", None) is not None:
        raise CommandError("--fibre goes with --save (the fibre the traces are kept as)")


def _fibre_number(args: argparse.Namespace, trace: Any) -> int:
    """The fibre a saved trace is kept as: --fibre, else the record's fibre ID or the file
    name's first number (as ``trace folder`` reads them)."""
    from fieldkit.traces.folder import fibre_label

    if args.fibre is not None:
        number = _num(args.fibre, "--fibre", 1, 10_000)
        if number is None or number != int(number):
            raise CommandError("--fibre: give a whole fibre number, e.g. 12")
        return int(number)
    label = fibre_label(trace, trace.source)
    if label.isdigit() and 1 <= int(label) <= 10_000:
        return int(label)
    raise CommandError(
        f"{trace.source}: neither the record nor the file name gives a fibre number; give --fibre N"
    )


def _save(args: argparse.Namespace, fibres: list[Any], *, progress: bool = False) -> dict[str, Any]:
    """Keep the fibres' traces on --job/--link; what was saved, for the output."""
    from fieldkit.actions.traces import fibre_record, save_traces
    from fieldkit.commands.meter_record import open_store
    from fieldkit.jobs.store import StoreError

    by = operator(args)
    show = progress and sys.stderr.isatty()
    records = []
    for k, ft in enumerate(fibres, start=1):
        records.append(fibre_record(ft, by=by))
        if show:
            _progress_bar(k, len(fibres), f"fibre {ft.fibre}")
    store = open_store(args)
    try:
        saved = save_traces(store, store.resolve(args.job), args.link, records, by=by)
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    return {
        "job_id": saved.job_id,
        "job": saved.job_name,
        "link_id": saved.link_id,
        "link": saved.link_label,
        "records": [
            {
                "id": r.id,
                "fibre": r.fibre,
                "wavelength_nm": r.wavelength_nm,
                "direction": r.direction,
            }
            for r in saved.records
        ],
        "superseded": saved.superseded,
        "summary": saved.summary(),
    }


def run_example(args: argparse.Namespace) -> int:
    from dataclasses import replace

    from fieldkit.traces.analysis import analyse_trace
    from fieldkit.traces.model import InstrumentEvent
    from fieldkit.traces.sor import write_sor
    from fieldkit.traces.synthetic import example_fibre, synth_trace

    fibres = int(_num(args.fibres, "--fibres", 1, 288) or 4)
    points = _num(args.points, "--points", 1000, 256_000)
    out = Path(args.folder)
    out.mkdir(parents=True, exist_ok=True)
    written = 0
    for number in range(1, fibres + 1):
        fibre = example_fibre(number, points=int(points) if points else None)
        for direction, f in (("AB", fibre), ("BA", fibre.reversed())):
            path = out / f"F{number:03d}_{int(f.wavelength_nm)}_{direction}.sor"
            if path.exists():
                continue
            trace = synth_trace(f, seed=number * 2 + (direction == "BA"), source=path.name)
            # the "instrument's" events: our own analysis, as an instrument would record it
            found = analyse_trace(trace)
            events = [
                InstrumentEvent(
                    e.number,
                    e.distance_m,
                    e.loss_db,
                    e.reflectance_db,
                    ("1" if e.reflectance_db is not None else "0")
                    + ("E" if e.kind == "end" else "F")
                    + "9999",
                )
                for e in found.events
            ]
            data = write_sor(replace(trace, acquired_unix_s=1_780_000_000), events=events)
            tmp = path.with_suffix(".sor.tmp")
            tmp.write_bytes(data)
            tmp.replace(path)
            written += 1
    print(f"wrote {written} traces into {out}")
    return 0


def _write_html(path: Path, page: str) -> None:
    from fieldkit.fsutil import atomic_write_bytes

    if path.exists() and path.is_dir():
        raise CommandError(f"{path}: is a folder; give a file to write")
    atomic_write_bytes(path, page.encode("utf-8"))


def html_page(results: list[Any], paired: Any | None) -> str:
    """A self-contained HTML page: each trace as inline SVG with its event table, the averaged
    table of a pair, the cautions. No scripts, no external files."""
    from fieldkit.text.escape import html
    from fieldkit.traces.lines import event_cells, fmt, instrument_cells, paired_cells
    from fieldkit.traces.svg import trace_svg

    def table(head: list[str], rows: list[list[str]]) -> str:
        cells = "".join(f"<th>{html(h)}</th>" for h in head)
        body = "".join(
            "<tr>" + "".join(f"<td>{html(c)}</td>" for c in row) + "</tr>" for row in rows
        )
        return f"<table><thead><tr>{cells}</tr></thead><tbody>{body}</tbody></table>"

    parts = [
        '<!DOCTYPE html><html lang="en"><head><meta charset="utf-8">',
        "<title>OTDR traces</title><style>body{font-family:sans-serif;margin:1em}"
        "table{border-collapse:collapse;margin:.5em 0 1.5em}td,th{border:1px solid #bbb;"
        "padding:2px 6px;text-align:right}th{background:#eee}.caution{color:#8a4b00}</style>",
        "</head><body><h1>OTDR traces</h1>",
    ]
    if paired is not None:
        parts.append(
            f"<h2>Both directions averaged: {html(paired.a_to_b.trace.source)} and "
            f"{html(paired.b_to_a.trace.source)}</h2>"
            f"<p>Length {paired.length_m:.1f} m, total loss {fmt(paired.total_loss_db, 2, 'dB')} "
            f"averaged; loss by the {html(paired.a_to_b.settings.loss_method)} method.</p>"
        )
        parts.append(
            table(
                ["#", "from A", "kind", "A→B dB", "B→A dB", "average dB", "verdict", "note"],
                [[*paired_cells(e), e.note] for e in paired.events],
            )
        )
    for r in results:
        t = r.trace
        wl = f"{t.wavelength_nm:g} nm" if t.wavelength_nm else "wavelength not given"
        parts.append(f"<h2>{html(t.source)}</h2><p>{html(wl)}</p>")
        parts.append(trace_svg(r))
        parts.append(
            table(
                ["#", "distance", "kind", "loss dB", "reflectance dB", "cumulative dB", "verdict"],
                [list(event_cells(e)) for e in r.events],
            )
        )
        if t.instrument_events:
            parts.append("<p>The instrument's own events, as recorded in the file:</p>")
            parts.append(
                table(
                    ["#", "distance", "kind", "loss dB", "reflectance dB", "code"],
                    [list(instrument_cells(e)) for e in t.instrument_events],
                )
            )
    parts.append(
        f'<p class="caution">{html(safety.OTDR_LIVE_FIBRE)}</p>'
        f'<p class="caution">{html(safety.DEFER)}</p></body></html>'
    )
    return "".join(parts)


def run_fill(args: argparse.Namespace) -> int:

    from fieldkit.actions.traces import FibreTraces, fill_splice_log
    from fieldkit.commands.common import plain_text
    from fieldkit.commands.meter_record import open_store
    from fieldkit.jobs.store import StoreError
    from fieldkit.traces.folder import analyse_folder
    from fieldkit.traces.model import TraceFileError
    from fieldkit.traces.pairing import pair

    for option in ("link", "closure"):
        plain_text(getattr(args, option), f"--{option}")
    by = operator(args)
    fibres: list[FibreTraces] = []
    if args.folder:
        if args.files:
            raise CommandError("give trace files or --folder, not both")
        settings, options = settings_from(args)
        try:
            result = analyse_folder(Path(args.folder), settings=settings, options=options)
        except TraceFileError as exc:
            raise CommandError(str(exc)) from None
        for row in result.rows:
            if not row.fibre.isdigit():
                raise CommandError(
                    f"{row.fibre}: the file name gives no fibre number (e.g. F012_1550_AB.sor)"
                )
            if row.paired is not None:
                fibres.append(FibreTraces(int(row.fibre), paired=row.paired))
            elif row.a_to_b or row.b_to_a:
                one = row.a_to_b or row.b_to_a
                direction = "A->B" if row.a_to_b else "B->A"
                fibres.append(FibreTraces(int(row.fibre), one_way=one, direction=direction))
    else:
        if not 1 <= len(args.files) <= 2:
            raise CommandError("give one trace file (or both directions) and --fibre, or --folder")
        number = _num(args.fibre, "--fibre", 1, 10_000)
        if number is None or number != int(number):
            raise CommandError("--fibre: give the fibre number the traces hold")
        results = [_analyse(f, args) for f in args.files]
        if len(results) == 2:
            try:
                fibres.append(FibreTraces(int(number), paired=pair(results[0], results[1])))
            except TraceFileError as exc:
                raise CommandError(str(exc)) from None
        else:
            direction = "B->A" if args.direction == "ba" else "A->B"
            fibres.append(FibreTraces(int(number), one_way=results[0], direction=direction))
    store = open_store(args)
    try:
        job_id = store.resolve(args.job)
        done = fill_splice_log(
            store,
            job_id,
            args.link,
            args.closure,
            fibres,
            overwrite=args.overwrite,
            dry_run=args.dry_run or not args.overwrite,
            by=by,
        )
        asked = bool(done.would_overwrite) and not args.overwrite
        if not args.dry_run and not asked:
            done = fill_splice_log(
                store, job_id, args.link, args.closure, fibres, overwrite=args.overwrite, by=by
            )
    except StoreError as exc:
        raise CommandError(str(exc)) from None
    if asked and not args.dry_run:
        first, old = done.would_overwrite[0]
        more = (
            f" (and {len(done.would_overwrite) - 1} more)" if len(done.would_overwrite) > 1 else ""
        )
        raise CommandError(
            f"fibre {first.fibre} {first.direction} already holds {old:.3f} dB, the trace says "
            f"{first.loss_db:.3f} dB{more}: nothing written; --overwrite replaces them"
        )
    data = {
        "job": job_id,
        "link": args.link,
        "closure": args.closure,
        "dry_run": bool(args.dry_run),
        "written": [
            {"fibre": w.fibre, "direction": w.direction, "loss_db": w.loss_db}
            for w in done.fill.written
        ],
        "created": done.fill.created,
        "would_overwrite": [
            {"fibre": w.fibre, "direction": w.direction, "loss_db": w.loss_db, "old_db": old}
            for w, old in done.would_overwrite
        ],
        "matched": [{"fibre": f, "distance_m": d} for f, d in done.matched],
        "unmatched_fibres": done.unmatched,
    }
    if args.json:
        print_json(data)
        return 0
    verb = "would write" if args.dry_run else "wrote"
    print(
        f"{verb} {len(done.fill.written)} one-way losses into closure {args.closure} "
        f"({len(done.matched)} fibres matched, {len(done.unmatched)} without an event there)"
    )
    for w in done.fill.written:
        print(f"  fibre {w.fibre} {w.direction.replace('->', '→')} {w.loss_db:.3f} dB")
    for fibre_no in done.unmatched:
        print(f"  fibre {fibre_no}: no event near the closure")
    return 0


def folder_csv(result: Any) -> str:
    """The folder's table as CSV: text cells escaped so a spreadsheet never runs them."""
    import csv
    import io

    from fieldkit.text.escape import csv_cell

    out = io.StringIO()
    w = csv.writer(out, lineterminator="\r\n")
    w.writerow(
        [
            "fibre",
            "wavelength_nm",
            "directions",
            "length_m",
            "total_loss_db",
            "events",
            "worst_distance_m",
            "worst_loss_db",
            "verdict",
            "files",
        ]
    )

    def num(value: float | None, digits: int) -> str:
        return "" if value is None else f"{value:.{digits}f}"

    for row in result.rows:
        worst = row.worst()
        w.writerow(
            [
                csv_cell(row.fibre),
                num(row.wavelength_nm, 0),
                csv_cell(row.directions),
                num(row.length_m, 1),
                num(row.total_loss_db, 3),
                str(row.event_count),
                num(worst[0] if worst else None, 1),
                num(worst[1] if worst else None, 3),
                csv_cell(row.verdict),
                csv_cell(" ".join(r.trace.source for r in (row.a_to_b, row.b_to_a) if r)),
            ]
        )
    for name, problem in result.unread:
        w.writerow([csv_cell(name), "", "", "", "", "", "", "", "unread", csv_cell(problem)])
    return out.getvalue()
