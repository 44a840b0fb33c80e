"""What the Jobs workspace shows, as plain state: the listing, the filter, the page, the job shown.

No Textual here: the screen (``fieldkit.tui.screens.jobs``) lays out and wires keys; this
decides which jobs are listed, in what order, which one stays picked and what the count line
and the filter buttons say. Tested at unit speed (tests/unit/test_jobs_model.py).
"""

from __future__ import annotations

from datetime import date
from typing import TYPE_CHECKING, Literal, NamedTuple

from fieldkit.jobs.errors import StoreError
from fieldkit.jobs.search import JobFinder
from fieldkit.text.escape import terminal

if TYPE_CHECKING:
    from fieldkit.jobs.index import JobSummary
    from fieldkit.jobs.models import Job
    from fieldkit.jobs.store import JobStore

#: How many matching jobs the list shows at once; typing in the filter narrows the rest.
PAGE = 200

#: The status filter steps: every job, open ones, done ones.
STATUS_CYCLE: dict[str | None, str | None] = {None: "open", "open": "done", "done": None}
STATUS_LABELS: dict[str | None, str] = {None: "All jobs", "open": "Open jobs", "done": "Done jobs"}


class Page(NamedTuple):
    """One answer of the filter: the jobs shown, how many matched, which row is picked."""

    shown: list[JobSummary]
    matched: int
    total: int
    picked: int | None  # row of the job to show, None: the list is empty
    quarantined: int = 0

    @property
    def count_line(self) -> str:
        more = f", first {PAGE} shown: type to narrow" if self.matched > PAGE else ""
        held = (
            f", {self.quarantined} set aside (fieldkit jobs quarantine)" if self.quarantined else ""
        )
        return f"{self.matched} of {self.total} jobs{more}{held}"

    @property
    def picked_id(self) -> str | None:
        return self.shown[self.picked].id if self.picked is not None else None


class JobsModel:
    """The listing, the filter's state and the job shown.

    A plain class, not a dataclass: it is made for the Jobs workspace's first frame, and
    defining a dataclass costs about a millisecond at start-up.
    """

    def __init__(self, summaries: list[JobSummary] | None = None, quarantined: int = 0) -> None:
        self.summaries: list[JobSummary] = summaries if summaries is not None else []
        self.status: str | None = None  # None (all), "open" or "done"
        self.today_only = False
        self.job: Job | None = None
        #: The job shown from its summary (its head only) until it is read; ``job`` is None
        #: then.
        self.pending_id: str | None = None
        self.quarantined = quarantined
        self._finder: JobFinder | None = None

    @property
    def job_id(self) -> str | None:
        """The id of the job shown (read, or shown from its summary until it is)."""
        return self.job.id if self.job is not None else self.pending_id

    @property
    def status_label(self) -> str:
        return STATUS_LABELS[self.status]

    @property
    def day_label(self) -> str:
        return "Today" if self.today_only else "Any day"

    def cycle_status(self) -> None:
        self.status = STATUS_CYCLE[self.status]

    def toggle_today(self) -> None:
        self.today_only = not self.today_only

    def page(self, text: str, today: date) -> Page:
        """The jobs matching ``text`` (and the status and day filters), first ``PAGE`` of them;
        the job shown stays picked when it is listed, else the first row is."""
        if self._finder is None or self._finder.summaries is not self.summaries:
            self._finder = JobFinder(self.summaries)  # answers as the filter is typed
        matches = self._finder.find(text, self.status, today if self.today_only else None)
        shown = matches[:PAGE]
        ids = [s.id for s in shown]
        keep = self.job_id
        picked = ids.index(keep) if keep in ids else (0 if ids else None)
        return Page(shown, len(matches), len(self.summaries), picked, self.quarantined)

    def relist(
        self, store: JobStore, rescan: bool = False
    ) -> list[tuple[str, Literal["error", "warning"]]]:
        """List the jobs of ``store`` again (and count those set aside); returns what to tell,
        as (message, severity): a listing that failed, and the store's problems (a file it
        skipped or set aside), each told once."""
        told: list[tuple[str, Literal["error", "warning"]]] = []
        try:
            self.summaries = store.list(rescan=rescan)
        except (StoreError, OSError) as exc:
            self.summaries = []
            told.append((terminal(f"The jobs could not be listed: {exc}"), "error"))
        try:
            self.quarantined = len(store.quarantined())
        except OSError:
            self.quarantined = 0
        told.extend((terminal(problem), "warning") for problem in store.problems)
        store.problems.clear()
        return told

    def replace(self, job: Job) -> None:
        """``job`` was saved here: it is the job shown, and its row moves to the top."""
        from fieldkit.jobs.index import JobSummary

        self.job = job
        self.pending_id = None
        fresh = JobSummary.of(job)
        summaries = [fresh if s.id == job.id else s for s in self.summaries]
        summaries.sort(key=lambda s: (s.updated_iso, s.id), reverse=True)
        self.summaries = summaries
