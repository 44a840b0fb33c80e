"""The job-and-link picker that other workspaces push to save onto a job's link."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input

from fieldkit import locations
from fieldkit.jobs.models import Job
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

SIZES = [(80, 24), (44, 22)]


def _store(data: Path) -> JobStore:
    return JobStore(locations.jobs_dir(data))


@pytest.mark.parametrize("size", SIZES)
async def test_pick_existing_link_by_keyboard(tmp_path: Path, size: tuple[int, int]) -> None:
    store = _store(tmp_path / "d")
    job = store.create("Harbour Road duct")

    def two_links(j: Job) -> None:
        j.add_link("HR-01")
        j.add_link("HR-02")

    store.update(job.id, two_links)
    second = store.load(job.id).links[1].id
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    chosen: list[tuple[str, str] | None] = []
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        app.push_screen(JobLinkPicker(), chosen.append)
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)
        await pilot.press("enter")  # the job: focus moves to its links
        await pilot.press("down", "enter")  # the second link
        await pilot.pause()
    assert chosen == [(job.id, second)]


async def test_new_link_by_label_is_saved_and_returned(tmp_path: Path) -> None:
    store = _store(tmp_path / "d")
    job = store.create("Mill Lane")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    chosen: list[tuple[str, str] | None] = []
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.push_screen(JobLinkPicker(), chosen.append)
        await pilot.pause()
        app.screen.query_one("#jlp-new-link", Input).focus()
        await pilot.press(*"ML-7", "enter")
        await pilot.pause()
    saved = store.load(job.id)
    assert [link.label for link in saved.links] == ["ML-7"]
    assert chosen == [(job.id, saved.links[0].id)]


async def test_no_jobs_creates_one_then_cancel_returns_none(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    chosen: list[tuple[str, str] | None] = []
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        app.push_screen(JobLinkPicker(), chosen.append)
        await pilot.pause()
        assert app.screen.focused is app.screen.query_one("#jlp-new-job", Input)
        await pilot.press(*"Quarry", "enter")
        await pilot.pause()
        # The new job waits for its first link: focus is there, nothing is saved yet.
        assert app.screen.focused is app.screen.query_one("#jlp-new-link", Input)
        await pilot.press("escape")
        await pilot.pause()
    assert chosen == [None]
    assert _store(tmp_path / "d").list() == []  # cancelled: no job was created


@pytest.mark.parametrize(("mode", "key", "word"), [("budget", "ctrl+o", "Open")])
async def test_the_picker_button_says_what_it_does(
    tmp_path: Path, mode: str, key: str, word: str
) -> None:
    # opening a saved budget must not offer "Save here": the button names the action
    from textual.widgets import Button

    _store(tmp_path / "d").create("Harbour Road duct")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        await pilot.press(key)
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)
        assert str(app.screen.query_one("#jlp-ok", Button).label) == word
