"""``fieldkit jobs``: per-job logs from the command line.

    fieldkit jobs new NAME [--site S] [--customer C] [--crew NAME]... [--json]
    fieldkit jobs edit ID [--name N] [--site S] [--customer C] [--crew NAME]...
    fieldkit jobs list [--status open|done] [--search TEXT] [--date YYYY-MM-DD|--today]
                       [--rescan] [--json]
    fieldkit jobs show ID [--json]
    fieldkit jobs note ID TEXT
    fieldkit jobs link-add ID LABEL [--end-a A] [--end-b B] [--fibre-type T] [--fibre-count N]
                                    [--cable-id C] [--length L]
    fieldkit jobs link-edit ID LINK [--label L] [--end-a A] ...
    fieldkit jobs done ID [--yes] [--reason TEXT]   /  fieldkit jobs reopen ID
    fieldkit jobs delete ID  /  fieldkit jobs restore ID  /  fieldkit jobs trash
    fieldkit jobs export ID --format csv|md|html|json [-o FILE|FOLDER|-] [--csv-style S]
    fieldkit jobs export --day YYYY-MM-DD | --from YYYY-MM-DD --to YYYY-MM-DD --format ...
    fieldkit jobs import FILE [--json]
    fieldkit jobs today [--date YYYY-MM-DD] [--json]
    fieldkit jobs quarantine [--json]

ID may be any unique prefix of a job id. Every subcommand accepts ``--data-dir`` and every
change ``--by NAME`` (default ``$FIELDKIT_OPERATOR``). The changes themselves are in
:mod:`fieldkit.actions.jobs`, which the Jobs workspace calls too.
"""

from __future__ import annotations

import argparse
import builtins
import sys
from collections.abc import Callable
from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldkit.commands.common import (
    CommandError,
    add_by,
    add_data_dir,
    open_store,
    operator,
    print_json,
)
from fieldkit.text.escape import terminal

if TYPE_CHECKING:
    from fieldkit.jobs.models import Job
    from fieldkit.jobs.store import JobStore


def print(*values: object, file: Any = None) -> None:  # noqa: A001
    """Every line this command prints passes through the terminal escaping: a job file or an
    import may hold control characters (an escape sequence would reach the terminal raw)."""
    builtins.print(*(terminal(v, multiline=True) for v in values), file=file)


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "jobs",
        help="per-job logs: create, list, show, note, finish, export, import, today",
        description="Per-job logs kept as one JSON file per job in the data folder. ID may be "
        "any unique prefix of a job id (see 'jobs list').",
    )
    add_data_dir(parser)
    actions = parser.add_subparsers(
        dest="jobs_command", metavar="ACTION", required=True, parser_class=type(parser)
    )

    class _Sub:
        """Every action takes --data-dir too, so it may come last on the line."""

        @staticmethod
        def add_parser(name: str, **kwargs: Any) -> argparse.ArgumentParser:
            action: argparse.ArgumentParser = actions.add_parser(name, **kwargs)
            add_data_dir(action)
            return action

    sub = _Sub()

    p = sub.add_parser("new", help="create a job and print its id")
    p.add_argument("name", help="the job's name")
    p.add_argument("--site", default="", help="where the work is")
    p.add_argument("--customer", default="", help="who it is for")
    p.add_argument(
        "--crew", action="append", default=[], metavar="NAME", help="a crew member (repeatable)"
    )
    add_by(p, "who creates the job")
    p.add_argument("--json", action="store_true", help='print one JSON object with "id"')
    p.set_defaults(func=_guard(run_new))

    p = sub.add_parser("edit", help="rename a job or change its site, customer or crew")
    p.add_argument("id", help="job id or a unique prefix")
    p.add_argument("--name", help="the new name")
    p.add_argument("--site", help="where the work is")
    p.add_argument("--customer", help="who it is for")
    p.add_argument(
        "--crew", action="append", metavar="NAME", help="the crew (repeat; replaces the list)"
    )
    add_by(p)
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_edit))

    for name, text in (("link-add", "add a link to a job"), ("link-edit", "change a link")):
        p = sub.add_parser(name, help=text)
        p.add_argument("id", help="job id or a unique prefix")
        if name == "link-add":
            p.add_argument("label", help="the link's label (e.g. 'Exchange to cabinet 4')")
        else:
            p.add_argument("link", help="the link's label or id")
            p.add_argument("--label", help="a new label")
        p.add_argument("--end-a", help="what end A is (a frame, a closure)")
        p.add_argument("--end-b", help="what end B is")
        p.add_argument("--fibre-type", help="the fibre type (e.g. OS2, OM4)")
        p.add_argument("--fibre-count", metavar="N", help="how many fibres the link has")
        p.add_argument("--cable-id", help="the cable's identifier")
        p.add_argument("--length", metavar="LENGTH", help="the route length (1.2 km, 3900 ft)")
        add_by(p)
        p.add_argument("--json", action="store_true", help="print one JSON object")
        p.set_defaults(func=_guard(run_link))

    p = sub.add_parser("list", help="list jobs, most recently updated first")
    p.add_argument("--status", choices=("open", "done"), help="only open or only done jobs")
    p.add_argument(
        "--search",
        default="",
        metavar="TEXT",
        help="words to find in the name, customer, site, crew or link labels",
    )
    when = p.add_mutually_exclusive_group()
    when.add_argument("--date", metavar="YYYY-MM-DD", help="created or updated on that day")
    when.add_argument("--today", action="store_true", help="created or updated today")
    p.add_argument(
        "--rescan",
        action="store_true",
        help="check every file against the index (after editing files by hand)",
    )
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_list))

    p = sub.add_parser("show", help="a job's details, links, results summary and notes")
    p.add_argument("id", help="job id or a unique prefix")
    p.add_argument("--json", action="store_true", help="print the whole job as JSON")
    p.set_defaults(func=_guard(run_show))

    p = sub.add_parser("note", help="add a note to a job's log")
    p.add_argument("id", help="job id or a unique prefix")
    p.add_argument("text", help="the note")
    add_by(p, "who writes it")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_note))

    for name, status, text in (
        ("done", "done", "mark a job done (with open items: lists them; --yes to go ahead)"),
        ("reopen", "open", "mark a done job open again"),
    ):
        p = sub.add_parser(name, help=text)
        p.add_argument("id", help="job id or a unique prefix")
        if name == "done":
            p.add_argument("--yes", action="store_true", help="mark it done even with open items")
        p.add_argument("--reason", default="", help="why (noted in the job's log)")
        add_by(p)
        p.add_argument("--json", action="store_true", help="print one JSON object")
        p.set_defaults(func=_guard(run_status), status=status)

    p = sub.add_parser("delete", help="move a job to the trash ('jobs restore' brings it back)")
    p.add_argument("id", help="job id or a unique prefix")
    add_by(p)
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_delete))

    p = sub.add_parser("restore", help="bring a job back from the trash")
    p.add_argument("id", help="the id of the trashed job, or a unique prefix")
    add_by(p)
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_restore))

    p = sub.add_parser("trash", help="the jobs in the trash")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_trash))

    p = sub.add_parser(
        "export",
        help="a report of a job, or of every job of a day or date range, as CSV, Markdown, "
        "HTML or JSON",
    )
    p.add_argument("id", nargs="?", help="job id or a unique prefix (or --day / --from)")
    p.add_argument(
        "--format",
        required=True,
        choices=("csv", "md", "html", "json"),
        help="csv: one row per result; md/html: the customer report; json: a "
        "hand-off file for 'jobs import' on another laptop",
    )
    p.add_argument(
        "-o",
        "--output",
        metavar="FILE",
        help="write to FILE (its folder must exist; never inside the data folder), or into "
        "an existing FOLDER under a name built from the job's name and date; "
        "- or no -o: standard output",
    )
    p.add_argument(
        "--day",
        metavar="YYYY-MM-DD",
        help="every job worked on that local date (or 'today'), in one report",
    )
    p.add_argument("--from", dest="date_from", metavar="YYYY-MM-DD", help="range start")
    p.add_argument("--to", dest="date_to", metavar="YYYY-MM-DD", help="range end (included)")
    p.add_argument(
        "--csv-style",
        choices=("comma", "semicolon"),
        help="comma: ',' and a decimal point; semicolon: ';' and a decimal comma "
        "(default: the csv setting, see 'fieldkit settings csv')",
    )
    p.set_defaults(func=_guard(run_export))

    p = sub.add_parser("import", help="merge a hand-off or job file (same ids merge)")
    p.add_argument("file", help="a file written by 'jobs export --format json'")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_import))

    p = sub.add_parser(
        "today",
        help="the end-of-day summary: today's jobs, results, "
        "failures, references in doubt and open items",
    )
    p.add_argument("--date", metavar="YYYY-MM-DD", help="another day (default: today)")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_today))

    p = sub.add_parser("quarantine", help="files set aside because they could not be read")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_quarantine))


def _guard(func: Callable[[argparse.Namespace], int]) -> Callable[[argparse.Namespace], int]:
    """Store errors become CommandError: exit 2 and one line naming the problem."""

    def run(args: argparse.Namespace) -> int:
        from fieldkit.jobs.store import StoreError

        try:
            return func(args)
        except StoreError as exc:
            raise CommandError(str(exc)) from None
        except BrokenPipeError:
            raise  # the reader went away (e.g. `| head`): cli.main ends quietly
        except OSError as exc:
            raise CommandError(
                f"{exc.strerror or exc}: {exc.filename or ''}".rstrip(": ")
            ) from None

    return run


def store_of(args: argparse.Namespace) -> JobStore:
    return open_store(args)


def _day(text: str | None) -> date:
    if text is None:
        return date.today()
    try:
        return date.fromisoformat(text.strip())
    except ValueError:
        raise CommandError(f"{text!r} is not a date; write it as YYYY-MM-DD") from None


def _warn_problems(store: JobStore) -> None:
    for problem in store.problems:
        print(f"fieldkit jobs: warning: {terminal(problem)}", file=sys.stderr)


def run_new(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import create_job

    store = store_of(args)
    created = create_job(
        store,
        args.name,
        site=args.site,
        customer=args.customer,
        crew=args.crew,
        by=operator(args),
    )
    job = created.job
    for warning in created.warnings:
        print(f"fieldkit jobs: warning: {warning}", file=sys.stderr)
    if args.json:
        print_json(
            {
                "id": job.id,
                "name": job.name,
                "site": job.site,
                "customer": job.customer,
                "crew": job.crew,
                "warnings": created.warnings,
            }
        )
    else:
        print(job.id)
    return 0


def run_edit(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import edit_job

    store = store_of(args)
    job_id = store.resolve(args.id)
    edited = edit_job(
        store,
        job_id,
        name=args.name,
        site=args.site,
        customer=args.customer,
        crew=args.crew,
        by=operator(args),
    )
    for warning in edited.warnings:
        print(f"fieldkit jobs: warning: {warning}", file=sys.stderr)
    job = edited.job
    if args.json:
        print_json(
            {
                "id": job.id,
                "name": job.name,
                "site": job.site,
                "customer": job.customer,
                "crew": job.crew,
                "warnings": edited.warnings,
            }
        )
    else:
        print(f"{job.name}: saved (revision {job.revision})")
    return 0


def run_link(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import add_link, edit_link, find_link, parse_link_text

    store = store_of(args)
    job_id = store.resolve(args.id)
    adding = args.jobs_command == "link-add"
    label = args.label
    fields = parse_link_text(
        label=label or "",
        end_a=args.end_a or "",
        end_b=args.end_b or "",
        fibre_type=args.fibre_type or "",
        fibre_count=args.fibre_count or "",
        cable_id=args.cable_id or "",
        length=args.length or "",
    )
    if adding:
        job, link = add_link(store, job_id, fields, by=operator(args))
    else:
        # Only the options given change the link.
        given = {
            "label": args.label,
            "end_a": args.end_a,
            "end_b": args.end_b,
            "fibre_type": args.fibre_type,
            "fibre_count": fields.fibre_count if args.fibre_count else None,
            "cable_id": args.cable_id,
            "length_m": fields.length_m if args.length else None,
        }
        from fieldkit.actions.jobs import LinkFields

        try:
            link_id = find_link(store.load(job_id), args.link).id
        except KeyError as exc:
            raise CommandError(str(exc.args[0])) from None
        job, link = edit_link(store, job_id, link_id, LinkFields(**given), by=operator(args))
    if args.json:
        print_json(
            {
                "id": job.id,
                "link": link.model_dump(
                    mode="json",
                    exclude={
                        "results",
                        "references",
                        "splices",
                        "faults",
                        "budget",
                        "earlier_budgets",
                    },
                ),
            }
        )
    else:
        print(f"{job.name}: link {link.label} {'added' if adding else 'saved'} ({link.id})")
    return 0


def run_list(args: argparse.Namespace) -> int:
    from fieldkit.jobs.store import filter_summaries, local_date

    store = store_of(args)
    on_date = _day(None) if args.today else _day(args.date) if args.date is not None else None
    rows = filter_summaries(
        store.list(rescan=args.rescan), text=args.search, status=args.status, on_date=on_date
    )
    _warn_problems(store)
    if args.json:
        print_json({"jobs": [s.as_dict() for s in rows], "count": len(rows)})
        return 0
    if not rows:
        print("no jobs" + (" match" if args.search or args.status or on_date else " yet"))
        return 0
    for s in rows:
        failed = f" {s.failed_count} fail" if s.failed_count else ""  # the count's one word
        where = f" · {s.site}" if s.site else ""
        flag = " (read-only)" if s.read_only else ""
        print(
            f"{s.id}  {s.status:<4}  {local_date(s.updated_at).isoformat()}  "
            f"{terminal(s.name)}{terminal(where)}  [{s.link_count} links, "
            f"{s.result_count} results{failed}]"
            f"{flag}"
        )
    return 0


def _job(args: argparse.Namespace) -> tuple[JobStore, Job]:
    store = store_of(args)
    return store, store.load(store.resolve(args.id))


def run_show(args: argparse.Namespace) -> int:
    from fieldkit.jobs.counting import open_items
    from fieldkit.jobs.reports import fmt_time, job_summary
    from fieldkit.jobs.trace_summary import link_traces
    from fieldkit.text.words import counted

    _store, job = _job(args)
    summary = job_summary(job)
    if args.json:
        print_json(
            {
                "job": job.model_dump(mode="json"),
                "summary": [row.as_dict() for row in summary],
                "traces": [
                    {"link_id": link.id, "link_label": link.label, **row.as_dict()}
                    for link in job.links
                    for row in link_traces(link)
                ],
                "read_only": job.read_only,
            }
        )
        return 0
    if job.read_only:
        print(f"note: {job.read_only}")
    print(f"{terminal(job.name)}  ({job.status})")
    print(f"  id        {job.id}")
    for label, value in (
        ("customer", job.customer),
        ("site", job.site),
        ("crew", ", ".join(job.crew)),
    ):
        if value:
            print(f"  {label:<9} {terminal(value)}")
    print(f"  created   {fmt_time(job.created_at)}")
    print(f"  updated   {fmt_time(job.updated_at)}  (revision {job.revision})")
    if job.created_by:
        print(f"  by        {job.created_by}")
    if not job.links:
        print("links: none yet")
    for link in job.links:
        ends = f"  {link.end_a} -> {link.end_b}" if link.end_a or link.end_b else ""
        print(f"link {terminal(link.label)}{terminal(ends)}")
        facts = [
            link.fibre_type,
            f"{link.fibre_count} fibres" if link.fibre_count else "",
            f"cable {link.cable_id}" if link.cable_id else "",
            f"{link.length_m:g} m" if link.length_m is not None else "",
        ]
        if any(facts):
            print("  " + ", ".join(terminal(f) for f in facts if f))
        rows = [r for r in summary if r.link_id == link.id]
        for r in rows:
            tested = counted(r.tested, "fibre")
            print(f"  {r.wavelength_nm:g} nm: {tested} tested: {r.tally.words()}")
        for row in link_traces(link):
            for line in row.lines():
                print(f"  {line}")
        extras = []
        if link.budget is not None:
            extras.append("budget")
        if link.closures:
            count = sum(len(c.current_splices()) for c in link.closures)
            extras.append(f"{len(link.closures)} closures, {count} splices")
        if link.faults:
            extras.append(f"{len(link.faults)} located faults")
        if link.references:
            extras.append(f"{len(link.references)} references")
        if extras:
            print("  " + ", ".join(extras))
    items = open_items(job)
    if items:
        print("open items:")
        for item in items:
            print(f"  {item}")
    if job.notes:
        print("notes:")
        for note in job.notes:
            by = f" {note.by}:" if note.by else ""
            print(f"  {fmt_time(note.at)}{by} {note.text}")
    return 0


def _answer(args: argparse.Namespace, data: dict[str, Any], line: str) -> int:
    """A command's one answer: ``data`` as one JSON object with ``--json``, else ``line``."""
    if args.json:
        print_json(data)
    else:
        print(line)
    return 0


def run_note(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import add_note

    store = store_of(args)
    job_id = store.resolve(args.id)
    job, note = add_note(store, job_id, args.text, by=operator(args))
    return _answer(
        args,
        {"id": job.id, "note_id": note.id, "notes": len(job.notes)},
        f"noted on {job.name} ({len(job.notes)} notes)",
    )


def run_status(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import OpenItemsError, mark_done, reopen

    store = store_of(args)
    job_id = store.resolve(args.id)
    by = operator(args)
    from fieldkit.text.words import counted

    if args.status == "done":
        try:
            job = mark_done(store, job_id, by=by, reason=args.reason, confirm=args.yes)
        except OpenItemsError as exc:
            for item in exc.items:
                print(f"open: {item}", file=sys.stderr)
            raise CommandError(
                f"{counted(len(exc.items), 'open item')} listed above; "
                "add --yes (and --reason TEXT) "
                "to mark the job done anyway"
            ) from None
    else:
        job = reopen(store, job_id, by=by, reason=args.reason)
    return _answer(args, {"id": job.id, "status": job.status}, f"{job.name}: {job.status}")


def run_delete(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import delete_job

    store = store_of(args)
    job_id = store.resolve(args.id)
    where = delete_job(store, job_id, by=operator(args))
    return _answer(
        args,
        {"id": job_id, "trash": str(where)},
        f"moved {job_id} to the trash ({where.parent}); 'fieldkit jobs restore {job_id[:8]}'",
    )


def run_restore(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import restore_job

    store = store_of(args)
    job = restore_job(store, args.id, by=operator(args))
    return _answer(args, {"id": job.id, "name": job.name}, f"restored {job.name} ({job.id})")


def run_trash(args: argparse.Namespace) -> int:
    store = store_of(args)
    jobs = store.trashed()
    if args.json:
        print_json({"jobs": [{"id": j.id, "name": j.name} for j in jobs]})
        return 0
    if not jobs:
        print("the trash is empty")
    for job in jobs:
        print(f"{job.id}  {job.name}")
    return 0


def _export_day(text: str, what: str) -> date:
    if text.strip().casefold() == "today":
        return date.today()
    try:
        return date.fromisoformat(text.strip())
    except ValueError:
        raise CommandError(f"{what}: {text!r} is not a date; write it as YYYY-MM-DD") from None


def run_export(args: argparse.Namespace) -> int:
    from fieldkit import locations
    from fieldkit.actions.export import export_job, export_range

    store = store_of(args)
    config = locations.config_dir(getattr(args, "config_dir", None))
    ranged = args.day is not None or args.date_from is not None or args.date_to is not None
    if ranged:
        if args.id is not None:
            raise CommandError("export: give a job id or --day / --from and --to, not both")
        if args.day is not None and (args.date_from or args.date_to):
            raise CommandError("export: give --day or --from and --to, not both")
        if args.day is not None:
            start = end = _export_day(args.day, "--day")
        else:
            if args.date_from is None or args.date_to is None:
                raise CommandError("export: a range needs both --from and --to")
            start = _export_day(args.date_from, "--from")
            end = _export_day(args.date_to, "--to")
        done, jobs = export_range(
            store, start, end, args.format, args.output, config=config, csv_style=args.csv_style
        )
        if done.path is not None:
            print(f"wrote {done.path} ({len(jobs)} jobs)")
        elif not jobs:
            print("fieldkit jobs: no job was worked on in those dates", file=sys.stderr)
    else:
        if args.id is None:
            raise CommandError("export: give a job id, or --day DATE, or --from DATE --to DATE")
        job_id = store.resolve(args.id)
        done = export_job(
            store, job_id, args.format, args.output, config=config, csv_style=args.csv_style
        )
        if done.path is not None:
            print(f"wrote {done.path}")
    if done.path is None:
        sys.stdout.write(done.text)
    return 0


def run_import(args: argparse.Namespace) -> int:
    from fieldkit.actions.jobs import import_file

    store = store_of(args)
    progress = _Progress("checked") if sys.stderr.isatty() else None
    report = import_file(
        store,
        Path(args.file).expanduser(),
        progress,
        lambda: _Progress("imported") if progress is not None else None,
    )
    if args.json:
        print_json(report.as_dict())
    else:
        print(
            f"{len(report.added_jobs)} jobs added, {len(report.merged_jobs)} merged "
            f"({report.added_records} new entries), {len(report.unchanged_jobs)} unchanged"
        )
        for conflict in report.conflicts:
            print(f"conflict: {conflict}")
    return 0


class _Progress:
    """``import: 1,200 of 20,000 jobs checked`` on the terminal, redrawn at most 5 times a
    second, then left as the last line (only on a terminal: a log or a pipe gets no noise)."""

    def __init__(self, verb: str) -> None:
        self.verb = verb
        self.shown = 0.0

    def __call__(self, done: int, total: int) -> None:
        import time

        moment = time.monotonic()
        if done < total and moment - self.shown < 0.2:
            return
        self.shown = moment
        end = "\n" if done >= total else ""
        sys.stderr.write(f"\rimport: {done:,} of {total:,} jobs {self.verb}{end}")
        sys.stderr.flush()


def run_today(args: argparse.Namespace) -> int:
    from fieldkit.jobs.counting import totals_tally
    from fieldkit.jobs.today import day_summary
    from fieldkit.text.words import counted

    store = store_of(args)
    summary = day_summary(store, _day(args.date))
    _warn_problems(store)
    if args.json:
        print_json(summary.as_dict())
        return 0
    t = summary.totals()
    # The one counting rule's words: the parts add up to the fibres tested.
    tally = totals_tally(t)
    print(
        f"{summary.day.isoformat()}: {counted(t['jobs'], 'job')} ({t['open_jobs']} open), "
        f"{counted(t['results_today'], 'result')} today; "
        f"{counted(tally.tested, 'fibre')} tested: {tally.words()}"
    )
    for job in summary.jobs:
        print(f"\n{terminal(job.name)} ({job.status}) {job.id}")
        for failure in job.failures:
            print(f"  FAIL {terminal(failure)}")
        for item in job.open_items:
            print(f"  open: {terminal(item)}")
    return 0


def run_quarantine(args: argparse.Namespace) -> int:
    store = store_of(args)
    files = store.quarantined()
    if args.json:
        print_json({"files": [{"path": str(f.path), "reason": f.reason} for f in files]})
        return 0
    if not files:
        print("no quarantined files")
    for f in files:
        print(f"{f.path}\n  {f.reason}")
    return 0
