"""A crew lead starts, runs and closes a job from the workspaces alone, at 80x24 and 44x22.

The issue's flow: first start on an empty folder (the operator is asked, the data folder is
named, "new job" offered), a job and a link made in the Jobs workspace, readings with a retest
in the meter, done with the open-items warning, export; the whole history is in the job file
and in the export.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from textual.widgets import Input, OptionList, Static

from fieldkit import locations
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs import JobsScreen
from fieldkit.tui.screens.meter import MeterScreen
from fieldkit.tui.widgets.dialogs import AskDialog, NameDialog
from fieldkit.tui.widgets.export_dialog import ExportDialog
from fieldkit.tui.widgets.job_forms import JobForm, LinkForm
from fieldkit.tui.widgets.meter_view import SummaryView

SIZES = [(80, 24), (44, 22)]


def _text(screen: object, selector: str) -> str:
    return str(screen.query_one(selector, Static).render())  # type: ignore[attr-defined]


async def _settle(pilot: object, screen: MeterScreen) -> None:
    """Until the readings are in the job file and the summary is drawn: a pause waits for the
    meter's save worker (tests/pilot_settle.py); the summary follows SummaryView.DELAY_S after the
    last reading."""
    await pilot.pause()  # type: ignore[attr-defined]
    if screen.summary_pending:
        await pilot.pause(SummaryView.DELAY_S)  # type: ignore[attr-defined]
    assert not screen.unsaved, "the readings were not saved"
    assert not screen.summary_pending


@pytest.mark.parametrize("size", SIZES)
async def test_crew_lead_starts_runs_and_closes_a_job(
    isolated_dirs: dict[str, Path], size: tuple[int, int]
) -> None:
    data, config = isolated_dirs["data"], isolated_dirs["config"]
    app = make_app(data_dir=data, config_dir=config, welcome=True)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        # First start: the operator's name, asked once.
        assert isinstance(app.screen, NameDialog)
        await pilot.press(*"Ana Lead", "enter")
        await pilot.pause()
        # Where data lives, and "new job".
        assert isinstance(app.screen, AskDialog)
        assert str(locations.jobs_dir(data)) in str(
            app.screen.query_one("#ask-text", Static).render()
        )
        await pilot.click("#ask-new")
        await pilot.pause()
        assert isinstance(app.screen, JobForm)
        await pilot.press(*"Station Road", "tab", *"Town council", "enter")
        await pilot.click("#form-save")
        await pilot.pause()
        assert isinstance(app.screen, JobsScreen)
        jobs = app.screen
        assert "Station Road" in _text(jobs, "#job-head")
        # A link with its fibre count.
        await pilot.press("ctrl+a")
        await pilot.pause()
        assert isinstance(app.screen, LinkForm)
        app.screen.query_one("#link-label", Input).value = "Exch-Cab4"
        app.screen.query_one("#link-fibre-count", Input).value = "3"
        app.screen.query_one("#link-length", Input).value = "1.2 km"
        await pilot.click("#link-save")
        await pilot.pause()
        store = JobStore(locations.jobs_dir(data))
        (summary,) = store.list()
        job = store.load(summary.id)
        (link,) = job.links
        assert (link.label, link.fibre_count, link.length_m) == ("Exch-Cab4", 3, 1200.0)
        assert job.created_by == "Ana Lead"

        # Readings with a retest in the meter.
        await pilot.press("f4")
        await pilot.pause()
        meter = app.screen
        assert isinstance(meter, MeterScreen)
        meter.attach(job.id, link.id)
        meter.query_one("#wavelengths", Input).value = "1310"
        meter.query_one("#limit", Input).value = "1.5"
        meter.query_one("#reference", Input).value = "-7.0"
        await pilot.pause()
        meter.query_one("#reading", Input).focus()
        # -7.0 - (-8.0) = 1.0 pass; -9.0: 2.0 fail; -9.5: 2.5 fail.
        for text in ("-8.0", "-9.0", "-9.5"):
            await pilot.press(*text, "enter")
        # Past the last fibre the cursor stays: every fibre is filled, it never wraps to 1.
        assert meter.session.fibre == 3
        await pilot.press("up")  # fibre 2: a retest, -8.2 is 1.2 dB, a pass
        await pilot.press(*"-8.2", "enter")
        await _settle(pilot, meter)
        # Fibre 2's history on demand: the fail and the retest that superseded it.
        await pilot.press("up", "ctrl+y")
        await pilot.pause()
        assert isinstance(app.screen, AskDialog)
        history = str(app.screen.query_one("#ask-text", Static).render())
        assert "2.00 dB FAIL, superseded" in history and "1.20 dB pass" in history
        await pilot.press("escape")
        await pilot.pause()

        # Done with an open item (fibre 3 still fails): listed, asked, the reason noted.
        await pilot.press("f6")
        await pilot.pause()
        await pilot.press("ctrl+d")
        await pilot.pause()
        assert isinstance(app.screen, AskDialog)
        listed = str(app.screen.query_one("#ask-text", Static).render())
        assert "fibre 3 at 1310 nm A→B: failed, repair and retest" in listed
        await pilot.press(*"repair booked")
        await pilot.click("#ask-done")
        await pilot.pause()
        saved = store.load(job.id)
        assert saved.status == "done" and saved.notes[-1].text == "Marked done: repair booked"

        # Export through the dialog.
        await pilot.press("ctrl+w")
        await pilot.pause()
        assert isinstance(app.screen, ExportDialog)
        target = Path.home() / "station.json"
        app.screen.query_one("#export-format", OptionList).highlighted = 3  # JSON hand-off
        await pilot.pause()
        app.screen.query_one("#export-path", Input).value = str(target)
        await pilot.click("#export-write")
        await pilot.pause()
        md_target = Path.home() / "station.md"
        await pilot.press("ctrl+w")
        await pilot.pause()
        app.screen.query_one("#export-format", OptionList).highlighted = 1  # Markdown
        await pilot.pause()
        app.screen.query_one("#export-path", Input).value = str(md_target)
        await pilot.click("#export-write")
        await pilot.pause()

    # The whole history: fibre 2's fail and its retest, in the file and in the exports.
    results = store.load(job.id).links[0].results
    fibre_2 = [r for r in results if r.fibre == 2]
    assert [round(r.loss_db, 6) for r in fibre_2] == [2.0, 1.2]
    assert fibre_2[0].superseded_by == fibre_2[1].id and fibre_2[1].current
    assert all(r.by == "Ana Lead" for r in results)
    handoff = json.loads(target.read_text(encoding="utf-8"))
    exported = handoff["jobs"][0]["links"][0]["results"]
    assert len([r for r in exported if r["fibre"] == 2]) == 2
    assert "FAIL, superseded" in md_target.read_text(encoding="utf-8")


async def test_the_details_always_show_a_job_of_the_visible_list(
    isolated_dirs: dict[str, Path],
) -> None:
    # The repro: demo, Jobs, type "mill": the detail pane kept Station Road, and
    # Ctrl+O marked it done although it was not in the list.
    store = JobStore(locations.jobs_dir(isolated_dirs["data"]))
    for job in build(local_day_start(now())):
        store.save(job)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="jobs"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, JobsScreen)
        shown_first = screen._job  # noqa: SLF001
        assert shown_first is not None
        await pilot.press(*"zzzz-no-such-job")
        await pilot.pause()
        assert screen._job is None  # noqa: SLF001
        await pilot.press("ctrl+d")
        await pilot.pause()
        assert not isinstance(app.screen, AskDialog)
        assert store.load(shown_first.id).status == shown_first.status
        screen.query_one("#jobs-filter", Input).value = "reservoir"
        await pilot.pause()
        shown = screen._job  # noqa: SLF001
        assert shown is not None and "Reservoir" in shown.name


async def test_cancelling_the_picker_creates_no_job(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="budget"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.push_screen(JobLinkPicker())
        await pilot.pause()
        app.screen.query_one("#jlp-new-job", Input).focus()
        await pilot.press(*"Brand new job", "enter")
        await pilot.pause()
        await pilot.press("escape")
        await pilot.pause()
    assert JobStore(locations.jobs_dir(isolated_dirs["data"])).list() == []


async def test_delete_asks_and_moves_the_job_to_the_trash(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.actions.jobs import create_job

    store = JobStore(locations.jobs_dir(isolated_dirs["data"]))
    job = create_job(store, "Mill Lane").job
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="jobs"
    )
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        app.screen.query_one("#job-delete").scroll_visible(animate=False)
        await pilot.pause()
        await pilot.click("#job-delete")
        await pilot.pause()
        assert isinstance(app.screen, AskDialog)
        await pilot.press("escape")  # cancelled: nothing happens
        await pilot.pause()
        assert [s.id for s in store.list()] == [job.id]
        app.screen.query_one("#job-delete").scroll_visible(animate=False)
        await pilot.pause()
        await pilot.click("#job-delete")
        await pilot.pause()
        await pilot.click("#ask-delete")
        await pilot.pause()
        assert store.list() == []
        assert [j.id for j in store.trashed()] == [job.id]


async def test_open_and_quit_ask_before_dropping_an_unsaved_budget(
    isolated_dirs: dict[str, Path],
) -> None:
    # The repro: Budget, change the length, Ctrl+O: the edit was gone; Ctrl+Q quit.
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="budget"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        budget = app.screen
        assert not budget.unsaved_edits  # type: ignore[attr-defined]
        length = next(w for w in budget.query(Input) if w.id and "length" in w.id and w.display)
        length.value = "7.5 km"
        await pilot.pause()
        assert budget.unsaved_edits  # type: ignore[attr-defined]
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen, AskDialog)
        await pilot.press("escape")  # cancel: the edit stays
        await pilot.pause()
        assert length.value == "7.5 km"
        await pilot.press("ctrl+q")
        await pilot.pause()
        assert isinstance(app.screen, AskDialog)  # asked, not quit
        assert "Budget" in str(app.screen.query_one("#ask-text", Static).render())
        await pilot.click("#ask-go")
        await pilot.pause()
        assert app.screen is budget and length.value == "7.5 km"


async def test_the_operator_is_stamped_on_a_budget_saved_from_the_workspace(
    isolated_dirs: dict[str, Path],
) -> None:
    from fieldkit.actions.jobs import LinkFields, add_link, create_job
    from fieldkit.actions.operator import save_operator

    save_operator(isolated_dirs["config"], "Ana Lead")
    store = JobStore(locations.jobs_dir(isolated_dirs["data"]))
    job = create_job(store, "Mill Lane").job
    _job, link = add_link(store, job.id, LinkFields(label="Trunk"))
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="budget"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"5 km")  # the fibre length field has focus at start
        await pilot.pause()
        assert screen.report is not None  # type: ignore[attr-defined]
        screen._save_to((job.id, link.id), screen.resolved, screen.report)  # type: ignore[attr-defined]  # noqa: SLF001
        await pilot.pause()
        assert not screen.unsaved_edits  # type: ignore[attr-defined]
    saved = store.load(job.id).link(link.id).budget
    assert saved is not None and saved.by == "Ana Lead"


def _cli(*args: str) -> None:
    import contextlib
    import io

    from fieldkit import cli

    with contextlib.redirect_stdout(io.StringIO()):
        assert cli.main(list(args)) == 0


_VOLATILE = {"id", "at", "reference_id", "superseded_at", "superseded_by"}


async def test_the_cli_and_the_workspaces_write_identical_records(
    isolated_dirs: dict[str, Path], monkeypatch: pytest.MonkeyPatch
) -> None:
    from fieldkit.actions.jobs import LinkFields, add_link, create_job
    from fieldkit.actions.operator import save_operator

    save_operator(isolated_dirs["config"], "Ana Lead")
    store = JobStore(locations.jobs_dir(isolated_dirs["data"]))
    by_cli = create_job(store, "By the command line").job
    by_ui = create_job(store, "By the workspaces").job
    ui_link = add_link(store, by_ui.id, LinkFields(label="Trunk"))[1]
    # The same work from the command line: a reading of fibre 1 at 1310 nm, and a note.
    _cli(
        "loss", "--job", by_cli.id, "--link", "Trunk", "--fibre", "1", "--wavelength", "1310",
        "--reference", "-7.0", "--reading", "-8.0", "--limit", "1.5",
    )  # fmt: skip
    _cli("jobs", "note", by_cli.id, "Duct proven to chamber 4")
    # ... and from the workspaces.
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        meter = app.screen
        assert isinstance(meter, MeterScreen)
        meter.attach(by_ui.id, ui_link.id)
        meter.query_one("#wavelengths", Input).value = "1310"
        meter.query_one("#limit", Input).value = "1.5"
        meter.query_one("#reference", Input).value = "-7.0"
        await pilot.pause()
        meter.query_one("#reading", Input).focus()
        await pilot.press(*"-8.0", "enter")
        await _settle(pilot, meter)
        await pilot.press("f6")
        await pilot.pause()
        jobs = app.screen
        assert isinstance(jobs, JobsScreen)
        jobs.query_one("#jobs-filter", Input).value = "workspaces"
        await pilot.pause()
        jobs.query_one("#job-note", Input).value = "Duct proven to chamber 4"
        await pilot.click("#job-note-add")
        await pilot.pause()
    cli_job, ui_job = store.load(by_cli.id), store.load(by_ui.id)
    (cli_result,), (ui_result,) = cli_job.links[0].results, ui_job.links[0].results
    assert cli_result.model_dump(exclude=_VOLATILE) == ui_result.model_dump(exclude=_VOLATILE)
    assert cli_result.by == "Ana Lead"
    (cli_ref,), (ui_ref,) = cli_job.links[0].references, ui_job.links[0].references
    assert cli_ref.model_dump(exclude=_VOLATILE) == ui_ref.model_dump(exclude=_VOLATILE)
    assert cli_job.notes[-1].model_dump(exclude=_VOLATILE) == ui_job.notes[-1].model_dump(
        exclude=_VOLATILE
    )
