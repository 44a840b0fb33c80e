"""``fieldkit jobs``: per-job logs from the command line.

    fieldkit jobs new NAME [--site S] [--customer C] [--crew NAME]... [--json]
    fieldkit jobs list [--status open|done] [--search TEXT] [--date YYYY-MM-DD|--today]
                       [--rescan] [--json]
    fieldkit jobs show ID [--json]
    fieldkit jobs note ID TEXT [--by NAME]
    fieldkit jobs done ID          /  fieldkit jobs reopen ID
    fieldkit jobs export ID --format csv|md|html|json [-o FILE]
    fieldkit jobs import FILE [--json]
    fieldkit jobs today [--date YYYY-MM-DD] [--json]
    fieldkit jobs quarantine [--json]

ID may be any unique prefix of a job id. Every subcommand accepts ``--data-dir``.
"""

from __future__ import annotations

import argparse
import builtins
import sys
from collections.abc import Callable
from datetime import date
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldkit.commands.common import CommandError, add_data_dir, plain_text, print_json
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
    p.add_argument("--by", default="", help="who creates the job (noted in its log)")
    p.add_argument("--json", action="store_true", help='print one JSON object with "id"')
    p.set_defaults(func=_guard(run_new))

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
    p.add_argument("--by", default="", metavar="NAME", help="who writes it")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(func=_guard(run_note))

    for name, status, text in (
        ("done", "done", "mark a job done"),
        ("reopen", "open", "mark a done job open again"),
    ):
        p = sub.add_parser(name, help=text)
        p.add_argument("id", help="job id or a unique prefix")
        p.add_argument("--json", action="store_true", help="print one JSON object")
        p.set_defaults(func=_guard(run_status), status=status)

    p = sub.add_parser("export", help="a report of a job as CSV, Markdown, HTML or JSON")
    p.add_argument("id", help="job id or a unique prefix")
    p.add_argument(
        "--format",
        required=True,
        choices=("csv", "md", "html", "json"),
        help="csv: one row per result; md/html: the customer report; json: a "
        "hand-off file for 'jobs import' on another laptop",
    )
    p.add_argument("-o", "--output", metavar="FILE", help="write to FILE instead of stdout")
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
    from fieldkit import locations
    from fieldkit.jobs.store import JobStore

    return JobStore(locations.jobs_dir(locations.data_dir(getattr(args, "data_dir", None))))


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
    for value, what in (
        (args.name, "name"),
        (args.site, "site"),
        (args.customer, "customer"),
        (args.by, "by"),
        *((c, "crew") for c in args.crew or ()),
    ):
        plain_text(value or "", what)
    store = store_of(args)
    job = store.create(
        args.name, site=args.site, customer=args.customer, crew=args.crew, by=args.by
    )
    if args.json:
        print_json(
            {
                "id": job.id,
                "name": job.name,
                "site": job.site,
                "customer": job.customer,
                "crew": job.crew,
            }
        )
    else:
        print(job.id)
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
        failed = f" {s.failed_count} failed" if s.failed_count else ""
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
    from fieldkit.jobs.reports import fmt_time, job_summary

    _store, job = _job(args)
    summary = job_summary(job)
    if args.json:
        print_json(
            {
                "job": job.model_dump(mode="json"),
                "summary": [row.as_dict() for row in summary],
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
    if not job.links:
        print("links: none yet")
    for link in job.links:
        ends = f"  {link.end_a} -> {link.end_b}" if link.end_a or link.end_b else ""
        print(f"link {terminal(link.label)}{terminal(ends)}")
        rows = [r for r in summary if r.link_id == link.id]
        for r in rows:
            print(
                f"  {r.wavelength_nm:g} nm: {r.tested} fibres tested, {r.passed} passed, "
                f"{r.failed} failed, {r.no_limit} without limit"
                + (f", {r.in_doubt} in doubt" if r.in_doubt else "")
            )
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
    if job.notes:
        print("notes:")
        for note in job.notes:
            by = f" {note.by}:" if note.by else ""
            print(f"  {fmt_time(note.at)}{by} {note.text}")
    return 0


def run_note(args: argparse.Namespace) -> int:
    text = plain_text(args.text, "note", multiline=True).strip()
    if not text:
        raise CommandError("the note is empty")
    plain_text(args.by or "", "by")
    store = store_of(args)
    job_id = store.resolve(args.id)
    added: list[str] = []

    def add(job: Job) -> None:
        added[:] = [job.add_note(text, by=args.by.strip()).id]

    job = store.update(job_id, add)
    if args.json:
        print_json({"id": job.id, "note_id": added[0], "notes": len(job.notes)})
    else:
        print(f"noted on {job.name} ({len(job.notes)} notes)")
    return 0


def run_status(args: argparse.Namespace) -> int:
    store = store_of(args)
    job_id = store.resolve(args.id)

    def change(job: Job) -> None:
        job.status = args.status

    job = store.update(job_id, change)
    if args.json:
        print_json({"id": job.id, "status": job.status})
    else:
        print(f"{job.name}: {job.status}")
    return 0


def run_export(args: argparse.Namespace) -> int:
    from fieldkit.fsutil import atomic_write_bytes
    from fieldkit.jobs.reports import export

    store, job = _job(args)
    text = export(job, args.format)
    if args.output:
        target = Path(args.output).expanduser()
        if target.is_dir():
            raise CommandError(f"{target} is a folder; give a file name")
        # The report must never replace a job file, the index or a backup in the jobs folder.
        if target.resolve().parent.is_relative_to(store.jobs_dir.resolve()):
            raise CommandError(f"{target} is inside the jobs folder; write the report elsewhere")
        # A byte-order mark lets spreadsheets open the UTF-8 CSV with its accents intact.
        data = ("\ufeff" + text if args.format == "csv" else text).encode("utf-8")
        atomic_write_bytes(target, data)
        print(f"wrote {target}")
    else:
        sys.stdout.write(text)
    return 0


def run_import(args: argparse.Namespace) -> int:
    from fieldkit.jobs.handoff import import_jobs, read_handoff

    store = store_of(args)
    progress = _Progress("checked") if sys.stderr.isatty() else None
    jobs = read_handoff(Path(args.file).expanduser(), progress)
    if progress is not None:
        progress = _Progress("imported")
    report = import_jobs(store, jobs, progress)
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
    from fieldkit.jobs.today import day_summary

    store = store_of(args)
    summary = day_summary(store, _day(args.date))
    _warn_problems(store)
    if args.json:
        print_json(summary.as_dict())
        return 0
    t = summary.totals()
    print(
        f"{summary.day.isoformat()}: {t['jobs']} jobs ({t['open_jobs']} open), "
        f"{t['results_today']} results today; latest per fibre: {t['passed']} passed, "
        f"{t['failed']} failed, {t['no_limit']} without limit, {t['in_doubt']} in doubt"
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
