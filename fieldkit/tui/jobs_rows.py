"""The Jobs workspace's list rows and a job's head, from a job or from its index summary.

Split from :mod:`fieldkit.tui.jobs_view` (which re-exports these) because the first frame shows
them before the job records (pydantic) are imported: the list from the index's summaries, the
head of the job picked from its summary; the rest of the details follow once the job is read.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Protocol

from rich.text import Text

from fieldkit.text.escape import terminal
from fieldkit.text.layout import together
from fieldkit.text.words import counted, fmt_time
from fieldkit.tui import keys
from fieldkit.tui.wrapped import Wrapped

if TYPE_CHECKING:
    from collections.abc import Sequence
    from datetime import datetime
    from pathlib import Path

    from fieldkit.jobs.index import JobSummary


class Headed(Protocol):
    """What a job's head shows: a :class:`~fieldkit.jobs.models.Job` or its
    :class:`~fieldkit.jobs.index.JobSummary` (the same words either way)."""

    @property
    def id(self) -> str: ...
    @property
    def name(self) -> str: ...
    @property
    def status(self) -> str: ...
    @property
    def customer(self) -> str: ...
    @property
    def site(self) -> str: ...
    @property
    def crew(self) -> Sequence[str]: ...
    @property
    def updated_at(self) -> datetime: ...
    @property
    def read_only(self) -> str | None: ...


def plain(text: str, style: str = "") -> Text:
    """User text as plain text: a "[" in a job name must not be read as markup."""
    return Text(terminal(text, multiline=True), style=style)


def no_job_head(any_jobs: bool, jobs_dir: Path) -> Text:
    """What the details say when the list shows no job."""
    if not any_jobs:
        return plain(
            f"No jobs yet. {keys.display('new')} (or New) starts one: its name, customer, "
            f"site and crew; then its links. Jobs are kept in {jobs_dir}."
        )
    return plain(f"No job matches; clear the find field ({keys.display('find')}) to see them all.")


def prompt(s: JobSummary) -> str:
    """A row of the job list: the name, then the counts and the site (the list shows each on
    one line, cut with "…" where it is narrower: wrapped, they read as other rows; the details
    beside show them whole)."""
    mark = "✓" if s.status == "done" else "•"
    failed = f", {s.failed_count} fail" if s.failed_count else ""  # the count's one word
    site = f" · {terminal(s.site)}" if s.site else ""
    return f"{mark} {terminal(s.name)}\n  {counted(s.result_count, 'result')}{failed}{site}"


def head(job: Headed) -> Wrapped:
    text = Text()
    text.append(terminal(job.name), style="bold")
    text.append(f"  [{job.status}]", style="green" if job.status == "done" else "yellow")
    for label, value in (
        ("Customer", job.customer),
        ("Site", job.site),
        ("Crew", ", ".join(job.crew)),
    ):
        if value:
            text.append(f"\n{label}: ", style="dim")
            text.append(terminal(value))
    # The date and its time are never parted by a wrap (Wrapped below).
    text.append(f"\nId {job.id} · updated {together(fmt_time(job.updated_at))}", style="dim")
    if job.read_only:
        text.append(f"\n{job.read_only}", style="bold yellow")
    return Wrapped(text)


#: The buttons under the job's name, in rows: (row id, ((id, word, key-table name), ...)).
#: Keys and tooltips come from the key table, so a button says the key that does the same.
ACTION_ROWS: tuple[tuple[str, tuple[tuple[str, str, str], ...]], ...] = (
    # At hand without scrolling: on a phone terminal the footer has no room for them.
    (
        "job-actions",
        (
            ("job-done", "Done", "done"),
            ("job-export", "Export", "export"),
            ("job-today", "End of day", "result"),
        ),
    ),
    (
        "job-manage",
        (
            ("job-new", "New", "new"),
            ("job-edit", "Edit", "edit"),
            ("job-link", "Link", "add"),
            ("job-delete", "Delete", "remove"),
        ),
    ),
)
#: What the detail shows under the buttons, each in a Static ``job-<name>``.
DETAILS = ("summary", "failures", "links", "notes")
#: What works only on a job that can be changed: off while no job is shown or it is read-only
#: (Export and Delete work on a read-only job too).
JOB_BUTTONS = ("job-note", "job-note-add", "job-done", "job-edit", "job-link")


def done_label(status: str) -> str:
    """The Done button's words for a job in ``status``: a done job is reopened."""
    return f"{'Reopen' if status == 'done' else 'Done'} {keys.hint('done')}"
