"""The jobs workspace and the end-of-day view, driven by keys and mouse at 80x24 and 44x22."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input, OptionList, Static

from fieldkit import locations
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore
from fieldkit.tui import keys
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs import JobsScreen
from fieldkit.tui.screens.jobs_today import EndOfDayScreen
from fieldkit.tui.widgets.export_dialog import ExportDialog

SIZES = [(80, 24), (44, 22)]


def _demo(data: Path) -> JobStore:
    store = JobStore(locations.jobs_dir(data))
    for job in build(local_day_start(now())):
        store.save(job)
    return store


def _text(screen: object, selector: str) -> str:
    return str(screen.query_one(selector, Static).render())  # type: ignore[attr-defined]


@pytest.mark.parametrize("size", SIZES)
async def test_filter_open_note_and_done_by_keyboard(tmp_path: Path, size: tuple[int, int]) -> None:
    store = _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, JobsScreen)
        assert screen.query_one("#jobs-list", OptionList).option_count == 4
        await pilot.press(*"reservoir")
        await pilot.pause()
        assert screen.query_one("#jobs-list", OptionList).option_count == 1
        assert "1 of 4 jobs" in _text(screen, "#jobs-count")
        await pilot.press("enter", "enter")  # to the list, open the job
        await pilot.pause()
        assert "North Reservoir feed repair" in _text(screen, "#job-head")
        assert "RES-N-FEED fibre 5 1550 nm A→B: 4.63 dB" in _text(screen, "#job-failures")
        await pilot.press("ctrl+l", *"Marks confirmed", "enter")  # a note in two keystrokes
        await pilot.pause()
        await pilot.press("ctrl+d")
        await pilot.pause()
        # Open items (fibre 5 fails, fibre 6 a reference problem): listed, the reason noted.
        await pilot.press(*"retest booked")
        await pilot.click("#ask-done")
        await pilot.pause()
    saved = store.load("de30000000000003")
    assert saved.notes[-2].text == "Marks confirmed"
    assert saved.notes[-1].text == "Marked done: retest booked"
    assert saved.status == "done"


async def test_note_keeps_an_entry_saved_meanwhile_by_another_program(tmp_path: Path) -> None:
    store = _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        shown = app.screen._job  # type: ignore[attr-defined]
        assert shown is not None
        # Another program (say the CLI) appends while this screen shows the job.
        JobStore(locations.jobs_dir(tmp_path / "d")).update(
            shown.id, lambda j: j.add_note("from the CLI") and None
        )
        await pilot.press("ctrl+l", *"from the screen", "enter")
        await pilot.pause()
    texts = [n.text for n in store.load(shown.id).notes]
    assert texts[-2:] == ["from the CLI", "from the screen"]


@pytest.mark.parametrize("size", SIZES)
async def test_mouse_picks_a_job_and_adds_a_note(tmp_path: Path, size: tuple[int, int]) -> None:
    store = _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#jobs-filter", Input).value = "mill"
        await pilot.pause()
        assert await pilot.click("#jobs-list", offset=(4, 0))
        await pilot.pause()
        assert "Old Mill business park" in _text(screen, "#job-head")
        screen.query_one("#job-note", Input).value = "Clicked"
        screen.query_one("#job-note-add").scroll_visible(animate=False)
        await pilot.pause()
        assert await pilot.click("#job-note-add")
        await pilot.pause()
    assert store.load("de30000000000002").notes[-1].text == "Clicked"


@pytest.mark.parametrize("size", SIZES)
async def test_end_of_day_view_counts_and_opens_a_job(
    tmp_path: Path, size: tuple[int, int]
) -> None:
    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+g")
        await pilot.pause()
        day = app.screen
        assert isinstance(day, EndOfDayScreen)
        totals = _text(day, "#eod-totals")
        # The demo day: 78 results, 2 failures, 5 in doubt (see tests/unit/test_jobs_today.py).
        assert "78 results today" in totals and "2 fail" in totals and "5 in doubt" in totals
        details = " ".join(str(w.render()) for w in day.query(".eod-job"))
        assert "SR-SPUR: no results yet" in details
        wanted = day.query_one("#eod-jobs", OptionList).get_option_at_index(1).id
        await pilot.press("down", "enter")
        await pilot.pause()
        assert isinstance(app.screen, JobsScreen)
        assert app.screen._job is not None and app.screen._job.id == wanted


async def test_export_dialog_writes_the_report(tmp_path: Path) -> None:
    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        job = app.screen._job  # type: ignore[attr-defined]
        await pilot.press("ctrl+w")
        await pilot.pause()
        assert isinstance(app.screen, ExportDialog)
        await pilot.press("up", "enter")  # from HTML up to Markdown
        await pilot.pause()
        assert isinstance(app.screen, JobsScreen)
    # Reports go to the home folder by default, never into the data folder, under a name
    # built from the job's name and the date of its last result, not its hex id.
    from fieldkit.actions.export import job_file_name

    name = job_file_name(job, "md")
    assert job.id not in name and name.endswith(".md")
    report = Path.home() / name
    assert "Safety and disclaimer" in report.read_text(encoding="utf-8")


async def test_export_dialog_refuses_the_jobs_own_file_and_keeps_the_job(tmp_path: Path) -> None:
    # The repro: typing the job's own <id>.json wrote the report over it.
    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        job_id = app.screen._job.id  # type: ignore[attr-defined]
        job_file = tmp_path / "d" / "jobs" / f"{job_id}.json"
        before = job_file.read_bytes()
        await pilot.press("ctrl+w")
        await pilot.pause()
        app.screen.query_one("#export-path", Input).value = str(job_file)
        await pilot.click("#export-write")
        await pilot.pause()
        assert isinstance(app.screen, ExportDialog)  # still open, saying why
        assert "inside the data folder" in str(app.screen.query_one("#export-error").render())
        assert job_file.read_bytes() == before


async def test_empty_store_says_so(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert "0 of 0 jobs" in _text(app.screen, "#jobs-count")
        # The issue: live Done/Export/Note controls beside "0 of 0 jobs". Now the details say
        # where jobs are kept and how to start one; the job's controls are off.
        head = _text(app.screen, "#job-head")
        assert "No jobs yet" in head and keys.display("new") in head
        assert str(tmp_path / "d" / "jobs") in head.replace("\n", "")
        for wid in ("#job-done", "#job-export", "#job-note", "#job-delete"):
            assert app.screen.query_one(wid).disabled, wid
        assert not app.screen.query_one("#job-new").disabled


@pytest.mark.parametrize("size", SIZES)
async def test_footer_fits_and_job_actions_are_buttons(
    tmp_path: Path, size: tuple[int, int]
) -> None:
    from textual.widgets import Button, Footer
    from textual.widgets._footer import FooterKey

    store = _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        width, height = size
        keys = {k.description: k.region for k in screen.query_one(Footer).query(FooterKey)}
        # Find, Note and the app's own keys; each whole, inside the screen's width.
        assert {"Find", "Note"} <= set(keys)
        assert not {"Done/open", "Export", "End of day"} & set(keys)
        for name, region in keys.items():
            assert region.width > 0 and region.right <= width, name
        await pilot.press(*"reservoir", "enter", "enter")
        await pilot.pause()
        # The job's actions sit right under its name, with their keys, whole and on screen.
        for selector, label in (
            ("#job-done", "Done ^D"),
            ("#job-export", "Export ^W"),
            ("#job-today", "End of day ^G"),
        ):
            button = screen.query_one(selector, Button)
            assert str(button.label) == label
            region = button.region
            assert region.width >= len(label) and region.right <= width, selector
            assert 0 < region.y < height - 1, selector
        await pilot.click("#job-done")
        await pilot.pause()
        # The feed repair has a failed fibre and a reference problem: listed, and asked.
        from fieldkit.tui.widgets.dialogs import AskDialog

        assert isinstance(app.screen, AskDialog)
        await pilot.click("#ask-done")
        await pilot.pause()
        assert str(screen.query_one("#job-done", Button).label) == "Reopen ^D"
        await pilot.press("ctrl+w")  # the keys still work with the footer not showing them
        await pilot.pause()
        assert isinstance(app.screen, ExportDialog)
        await pilot.press("escape")
        await pilot.pause()
        await pilot.click("#job-today")
        await pilot.pause()
        assert isinstance(app.screen, EndOfDayScreen)
    assert store.load("de30000000000003").status == "done"


async def test_export_dialog_shows_the_whole_file_name_at_44_columns(tmp_path: Path) -> None:
    """Review B22: the field shows one line of a long path; the name under it is whole."""
    from fieldkit.actions.export import job_file_name

    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        job = app.screen._job  # type: ignore[attr-defined]
        await pilot.press("ctrl+w")
        await pilot.pause()
        dialog = app.screen
        assert isinstance(dialog, ExportDialog)
        name = job_file_name(job, "html")
        shown = dialog.query_one("#export-name", Static)
        lines = [line.rstrip() for line in str(shown.render()).splitlines()]
        width = shown.content_size.width
        assert len(name) > width  # the demo's name is longer than the dialog is wide
        name_part = lines[:-1]  # then "in FOLDER"
        assert "".join(name_part) == name and all(len(x) <= width for x in name_part)
        assert all(x[-1] in "-_." for x in name_part[:-1])  # broken after a separator only
        assert shown.region.right <= 44 and lines[-1].startswith("in ")
        await pilot.press("up")  # Markdown: the name follows the format
        await pilot.pause()
        assert job_file_name(job, "md") in str(shown.render()).replace("\n", "")
