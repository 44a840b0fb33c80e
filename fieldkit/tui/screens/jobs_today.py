"""The end-of-day view: today's jobs, result counts, failures, doubts and open items.

Pushed from the jobs workspace (Ctrl+G, which also closes it). Enter on a job closes the view
and opens that job; Ctrl+Left / Ctrl+Right step to the day before or after.
"""

from __future__ import annotations

from datetime import date, timedelta

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.jobs.models import now
from fieldkit.jobs.store import StoreError, local_date
from fieldkit.jobs.today import DaySummary, counted, day_summary
from fieldkit.text.escape import terminal
from fieldkit.tui import keys


class EndOfDayScreen(ModalScreen[str | None]):
    """Dismisses with the id of a job to open, or None."""

    CSS_PATH = "jobs_today.tcss"
    BINDINGS = keys.bindings("jobs_today")

    def __init__(self, day: date | None = None) -> None:
        super().__init__()
        self._day = day or local_date(now())
        self.summary: DaySummary | None = None

    def compose(self) -> ComposeResult:
        with Vertical(id="eod-panel"):
            with Horizontal(id="eod-top"):
                yield Label("", id="eod-title")
                yield Button(
                    "◀",
                    id="eod-before",
                    compact=True,
                    tooltip=keys.tip("jobs_today", "column_previous"),
                )
                yield Button(
                    "▶", id="eod-after", compact=True, tooltip=keys.tip("jobs_today", "column_next")
                )
                yield Button("Close", id="eod-close", compact=True, tooltip="Escape")
            yield Static("", id="eod-totals")
            yield OptionList(id="eod-jobs", markup=False)
            with VerticalScroll(id="eod-items"):
                yield Static("", id="eod-detail")

    def on_mount(self) -> None:
        self.refresh_day()

    def refresh_day(self) -> None:
        store = self.app.store  # type: ignore[attr-defined]
        try:
            summary = day_summary(store, self._day)
        except (StoreError, OSError) as exc:
            self.query_one("#eod-totals", Static).update(Text(f"Not readable: {exc}", "red"))
            return
        self.summary = summary
        t = summary.totals()
        self.query_one("#eod-title", Label).update(f"End of day {self._day.isoformat()}")
        totals = Text()
        totals.append(
            f"{counted(t['jobs'], 'job')} ({t['open_jobs']} open), "
            f"{counted(t['results_today'], 'result')} today\n"
        )
        totals.append(f"{t['passed']} pass", "green")
        totals.append(" · ")
        totals.append(f"{t['failed']} fail", "bold red" if t["failed"] else "")
        totals.append(f" · {t['no_limit']} no limit · ")
        totals.append(f"{t['in_doubt']} in doubt", "yellow" if t["in_doubt"] else "")
        totals.append(f" · {counted(t['open_items'], 'open item')}")
        self.query_one("#eod-totals", Static).update(totals)
        jobs = self.query_one("#eod-jobs", OptionList)
        jobs.clear_options()
        for job in summary.jobs:
            mark = "✓" if job.status == "done" else "•"
            fail = f", {job.failed} FAIL" if job.failed else ""
            results = counted(job.results_today, "result")
            jobs.add_option(Option(f"{mark} {terminal(job.name)}: {results}{fail}", id=job.id))
        detail = Text()
        if not summary.jobs:
            detail.append("No job was created or updated on this day.", "dim")
        for job in summary.jobs:
            detail.append(f"{terminal(job.name)}\n", "bold")
            for failure in job.failures:
                detail.append(f"  ✗ {terminal(failure)}\n", "red")
            for item in job.open_items:
                detail.append(f"  • {terminal(item)}\n")
        self.query_one("#eod-detail", Static).update(detail)
        if summary.jobs:
            jobs.highlighted = 0
            jobs.focus()

    @on(OptionList.OptionSelected, "#eod-jobs")
    def _open_job(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(event.option_id)

    def action_day(self, step: int) -> None:
        self._day += timedelta(days=step)
        self.refresh_day()

    @on(Button.Pressed, "#eod-before")
    def _before(self) -> None:
        self.action_day(-1)

    @on(Button.Pressed, "#eod-after")
    def _after(self) -> None:
        self.action_day(1)

    @on(Button.Pressed, "#eod-close")
    def action_close(self) -> None:
        self.dismiss(None)
