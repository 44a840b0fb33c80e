"""The crew lead's friction in issue 14, one Pilot test each, at 80x24 and 44x22:

- focus started in find and arrows did not move the list;
- the end-of-day view did not scroll with Down / PgDn, and toasts covered it;
- the job picker hid done jobs;
- at 44 columns the workspace bar showed bare "F2 F3 F4 ...".
"""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.containers import VerticalScroll
from textual.widgets import Input, OptionList

from fieldkit import locations
from fieldkit.jobs.demo import DEMO_IDS, build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs import JobsScreen
from fieldkit.tui.screens.jobs_today import EndOfDayScreen
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker
from fieldkit.tui.widgets.workspace_bar import TABS, WorkspaceBar

SIZES = [(80, 24), (44, 22)]


def _demo(data: Path) -> JobStore:
    store = JobStore(locations.jobs_dir(data))
    for job in build(local_day_start(now())):
        store.save(job)
    return store


def _app(tmp_path: Path, mode: str = "jobs"):
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)


@pytest.mark.parametrize("size", SIZES)
async def test_focus_opens_on_the_list_and_arrows_move_it(tmp_path: Path, size) -> None:
    _demo(tmp_path / "d")
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, JobsScreen)
        options = screen.query_one("#jobs-list", OptionList)
        assert app.focused is options
        first = options.get_option_at_index(0).id
        assert screen.model.job_id == first
        await pilot.press("down", "down")
        await pilot.pause()
        assert options.highlighted == 2
        assert screen.model.job_id == options.get_option_at_index(2).id  # the details follow
        await pilot.press("up")
        await pilot.pause()
        assert options.highlighted == 1
        # Typing on the list goes on in the find field; Down from there back to the list.
        await pilot.press(*"mill")
        await pilot.pause()
        find = screen.query_one("#jobs-filter", Input)
        assert app.focused is find and find.value == "mill"
        assert options.option_count == 1
        await pilot.press("down")
        await pilot.pause()
        assert app.focused is options
        assert "Old Mill" in str(options.get_option_at_index(options.highlighted or 0).prompt)


@pytest.mark.parametrize("size", SIZES)
async def test_end_of_day_scrolls_with_down_and_pgdn_and_no_toast_covers_it(
    tmp_path: Path, size
) -> None:
    _demo(tmp_path / "d")
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        app.notify("a toast from before", timeout=30)
        await pilot.pause()
        await pilot.press("ctrl+g")
        await pilot.pause()
        day = app.screen
        assert isinstance(day, EndOfDayScreen)
        assert not list(app._notifications)  # the jobs workspace's toasts are gone
        items = day.query_one("#eod-items", VerticalScroll)
        jobs = day.query_one("#eod-jobs", OptionList)
        assert items.max_scroll_y > 0, "the demo day's items should not fit (else no test)"
        await pilot.press("pagedown")
        await pilot.pause()
        assert items.scroll_y > 0
        await pilot.press("pageup")
        await pilot.pause()
        assert items.scroll_y == 0
        # Down moves the jobs and brings each one's items into view; past the last, scrolls.
        for _ in range(jobs.option_count - 1):
            await pilot.press("down")
        await pilot.pause()
        assert jobs.highlighted == jobs.option_count - 1
        at_last = items.scroll_y
        for _ in range(30):
            await pilot.press("down")
        await pilot.pause()
        assert items.scroll_y == items.max_scroll_y
        assert items.scroll_y >= at_last
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, JobsScreen)


@pytest.mark.parametrize("size", SIZES)
async def test_the_job_picker_lists_done_jobs_on_request(tmp_path: Path, size) -> None:
    store = _demo(tmp_path / "d")
    done = [s for s in store.list() if s.status == "done"]
    assert done, "the demo has a finished job (the fit-out)"
    app = _app(tmp_path, "convert")
    chosen: list[tuple[str, str] | None] = []
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        app.push_screen(JobLinkPicker(), chosen.append)
        await pilot.pause()
        picker = app.screen
        assert isinstance(picker, JobLinkPicker)
        jobs = picker.query_one("#jlp-jobs", OptionList)
        listed = [jobs.get_option_at_index(i).id for i in range(jobs.option_count)]
        assert done[0].id not in listed  # open jobs only, at first
        await pilot.press("ctrl+y")
        await pilot.pause()
        listed = [jobs.get_option_at_index(i).id for i in range(jobs.option_count)]
        statuses = [next(s.status for s in store.list() if s.id == i) for i in listed]
        assert done[0].id in listed
        assert statuses == sorted(statuses, key=lambda s: s != "open")  # open ones first
        jobs.highlighted = listed.index(done[0].id)
        await pilot.pause()
        assert "marked done" in str(picker.query_one("#jlp-message").render())
        await pilot.press("enter", "enter")  # the job, then its first link
        await pilot.pause()
    assert chosen and chosen[0] is not None and chosen[0][0] == done[0].id
    assert set(DEMO_IDS) >= {s.id for s in store.list()}  # nothing made on the way


@pytest.mark.parametrize("mode", ["convert", "jobs", "traces"])
async def test_the_workspace_bar_shows_words_at_44_columns(tmp_path: Path, mode: str) -> None:
    app = _app(tmp_path, mode)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        line = str(app.screen.query_one(WorkspaceBar).render())
        assert len(line) <= 44
        words = [tab for tab in TABS if f"{tab.key_label} {tab.title}" in line]
        bare = [tab for tab in TABS if tab.key_label in line and tab not in words]
        assert not bare, line
        assert len(words) >= 3, line
        assert any(tab.mode == mode for tab in words)  # the current one always shows
