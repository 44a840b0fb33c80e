"""The end-of-day view: today's jobs, result counts, failures, doubts and open items.

Pushed from the jobs workspace (Ctrl+G, which also closes it). Enter on a job closes the view
and opens that job; Ctrl+Left / Ctrl+Right step to the day before or after; Ctrl+W writes the
day's report (every job of the day in one report or one CSV, with the export dialog's checks).
Up and Down move the job list and bring that job's failures and open items into view; past the
last job, Down goes on scrolling them, and PgDn / PgUp scroll them a page. The toasts of the
jobs workspace are cleared when the view opens, so none covers it.
"""

from __future__ import annotations

from datetime import date, timedelta

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Label, OptionList, Static
from textual.widgets.option_list import Option

from fieldkit.jobs.counting import Count, count_words, totals_tally
from fieldkit.jobs.models import now
from fieldkit.jobs.store import StoreError, local_date
from fieldkit.jobs.today import DaySummary, counted, day_summary
from fieldkit.text.escape import terminal
from fieldkit.text.layout import NBSP, together
from fieldkit.tui import keys
from fieldkit.tui.jobs_view import COUNT_STYLES
from fieldkit.tui.wrapped import Wrapped


class DayJobs(OptionList):
    """The day's jobs; Down past the last one and PgDn / PgUp scroll the details below."""

    BINDINGS = [
        Binding("pagedown", "page_details(1)", "Page down", show=False),
        Binding("pageup", "page_details(-1)", "Page up", show=False),
    ]

    @property
    def details(self) -> VerticalScroll:
        return self.screen.query_one("#eod-items", VerticalScroll)

    def _at_last(self) -> bool:
        return self.highlighted is not None and self.highlighted >= self.option_count - 1

    def action_cursor_down(self) -> None:
        if self._at_last() or not self.option_count:
            self.details.scroll_down(animate=False)
        else:
            super().action_cursor_down()

    def action_cursor_up(self) -> None:
        screen = self.screen
        top = screen.section_top(self.highlighted) if isinstance(screen, EndOfDayScreen) else 0
        if self._at_last() and self.details.scroll_y > top:
            self.details.scroll_up(animate=False)  # back up through the last job's items
        else:
            super().action_cursor_up()

    def action_page_details(self, step: int) -> None:
        if step > 0:
            self.details.scroll_page_down(animate=False)
        else:
            self.details.scroll_page_up(animate=False)


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
            yield DayJobs(id="eod-jobs", markup=False)
            yield VerticalScroll(id="eod-items")
            with Horizontal(id="eod-bottom"):  # the top row has no room for it at 44 columns
                yield Button(
                    f"Export the day {keys.hint('export')}",
                    id="eod-export",
                    compact=True,
                    tooltip=keys.tip("jobs_today", "export"),
                )

    async def on_mount(self) -> None:
        self.app.clear_notifications()  # a toast from the jobs workspace would cover the view
        await self.refresh_day()

    def section_top(self, index: int | None) -> int:
        """Where the details of the job at ``index`` start, in the scrolled view's rows."""
        sections = self.query(".eod-job")
        if index is None or not 0 <= index < len(sections):
            return 0
        return sections[index].virtual_region.y

    async def refresh_day(self) -> None:
        store = self.app.store  # type: ignore[attr-defined]
        try:
            summary = day_summary(store, self._day)
        except (StoreError, OSError) as exc:
            self.query_one("#eod-totals", Static).update(Text(f"Not readable: {exc}", "red"))
            return
        self.summary = summary
        t = summary.totals()
        self.query_one("#eod-title", Label).update(f"End of day {self._day.isoformat()}")
        totals = Text(
            f"{counted(t['jobs'], 'job')} ({t['open_jobs']} open), "
            f"{counted(t['results_today'], 'result')} today\n"
        )
        tally = totals_tally(t)
        # Every count by the one rule, so the parts add up to the fibres tested; a count's
        # number and words are never parted by a wrap ("5 in doubt").
        totals.append(f"{counted(tally.tested, 'fibre')} tested: ")
        for i, (count, words) in enumerate(tally.parts()):
            n = tally.of(count)
            # The dot goes with the count after it: a wrap never leaves one at a line's end.
            totals.append(f" ·{NBSP}" if i else "")
            totals.append(together(words), COUNT_STYLES[count] if n else "")
        totals.append(f"\n{counted(t['open_items'], 'open item')}")
        self.query_one("#eod-totals", Static).update(Wrapped(totals))
        jobs = self.query_one("#eod-jobs", OptionList)
        jobs.clear_options()
        for job in summary.jobs:
            mark = "✓" if job.status == "done" else "•"
            fail = f", {count_words(Count.FAIL, job.failed)}" if job.failed else ""
            results = counted(job.results_today, "result")
            # Two lines, each cut with "…" where narrow: the counts never fall off the end.
            jobs.add_option(Option(f"{mark} {terminal(job.name)}\n  {results}{fail}", id=job.id))
        items = self.query_one("#eod-items", VerticalScroll)
        await items.remove_children()
        sections: list[Static] = []
        if not summary.jobs:
            sections.append(
                Static(Text("No job was created or updated on this day.", "dim"), id="eod-none")
            )
        for job in summary.jobs:
            detail = Text()  # the name bold, not the whole section (a base style covers all)
            detail.append(terminal(job.name), "bold")
            for failure in job.failures:
                detail.append(f"\n  ✗ {terminal(failure)}", "red")
            for item in job.open_items:
                detail.append(f"\n  • {terminal(item)}")
            # A wrapped failure or item goes on under its own text, not at column 1.
            sections.append(Static(Wrapped(detail), classes="eod-job"))
        await items.mount_all(sections)
        items.scroll_home(animate=False)
        jobs.focus()  # Down and PgDn scroll the details even on a day without jobs
        if summary.jobs:
            jobs.highlighted = 0

    @on(OptionList.OptionHighlighted, "#eod-jobs")
    def _job_highlighted(self, event: OptionList.OptionHighlighted) -> None:
        sections = self.query(".eod-job")
        if 0 <= event.option_index < len(sections):
            self.query_one("#eod-items", VerticalScroll).scroll_to_widget(
                sections[event.option_index], top=True, animate=False
            )

    @on(OptionList.OptionSelected, "#eod-jobs")
    def _open_job(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(event.option_id)

    async def action_day(self, step: int) -> None:
        self._day += timedelta(days=step)
        await self.refresh_day()

    @on(Button.Pressed, "#eod-before")
    async def _before(self) -> None:
        await self.action_day(-1)

    @on(Button.Pressed, "#eod-after")
    async def _after(self) -> None:
        await self.action_day(1)

    @on(Button.Pressed, "#eod-export")
    def action_export_day(self) -> None:
        """The day's report through the export dialog (its formats and guarded targets)."""
        from fieldkit.tui.widgets.export_dialog import DayExportDialog

        if self.summary is not None and not self.summary.jobs:
            self.notify("No job was worked on on this day: nothing to export.", severity="warning")
            return
        self.app.push_screen(DayExportDialog(self._day, self.app.store))  # type: ignore[attr-defined]

    @on(Button.Pressed, "#eod-close")
    def action_close(self) -> None:
        self.dismiss(None)
