"""The Jobs workspace's first frame shows the list and the picked job's head from the index
(issue 15, start-up); the job itself is read right after. Here the read after the frame is held
back, to see what that frame shows and that a key needing the job reads it at once."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from textual.widgets import Button, Input, OptionList, Static

from fieldkit import locations
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore
from fieldkit.tui import jobs_view
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs import JobsScreen


def _text(screen: object, selector: str) -> str:
    return str(screen.query_one(selector, Static).render())  # type: ignore[attr-defined]


@pytest.fixture
def held_back(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> JobStore:
    """The demo jobs, and a Jobs workspace that does not read the job after its first frame."""
    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    for job in build(local_day_start(now())):
        store.save(job)
    monkeypatch.setattr(JobsScreen, "_after_first_frame", lambda self: None)
    return store


async def test_the_first_frame_shows_the_list_and_the_head_before_the_job_is_read(
    tmp_path: Path, held_back: JobStore
) -> None:
    newest = held_back.list()[0]
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, JobsScreen)
        assert screen.model.job is None and screen.model.pending_id == newest.id
        assert screen.query_one("#jobs-list", OptionList).option_count == 4
        assert app.focused is screen.query_one("#jobs-list")  # the list takes keys
        # The head reads as it will once the job is read; the rest waits for the job.
        assert _text(screen, "#job-head") == str(jobs_view.head(held_back.load(newest.id)))
        assert _text(screen, "#job-links") == ""
        screen._load_pending()  # what the read after the frame does
        await pilot.pause()
        assert screen.model.job is not None and screen.model.job.id == newest.id
        assert "Duct proven to chamber SR-4" in _text(screen, "#job-notes")  # the demo's note


async def test_a_key_that_needs_the_job_before_it_is_read_reads_it(
    tmp_path: Path, held_back: JobStore
) -> None:
    newest = held_back.list()[0]
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, JobsScreen) and screen.model.job is None
        await pilot.press("ctrl+d")  # done: the duct survey has no open items
        await pilot.pause()
        assert screen.model.job is not None and screen.model.job.id == newest.id
        assert held_back.load(newest.id).status == "done"
        assert "Reopen" in str(screen.query_one("#job-done", Button).label)


# The app started in a fresh process on the jobs folder argv[1]: at the first frame, what is
# shown and whether the records are imported; then, once the job is read (on its own, after
# the frame: the records imported on a thread), what the details say.
FRESH_START = """
import asyncio, json, sys
import fieldkit.tui.screens.jobs as jobs
from fieldkit.tui.app import make_app

seen = {}
mounted = jobs.JobsScreen.on_mount

def on_mount(self):
    mounted(self)
    self.call_after_refresh(lambda: seen.update(
        pydantic="pydantic" in sys.modules, read=self.model.job is not None,
        head=str(self.query_one("#job-head").render()),
        rows=self.query_one("#jobs-list").option_count, focus=self.app.focused.id))

jobs.JobsScreen.on_mount = on_mount

async def main():
    app = make_app(data_dir=sys.argv[1], config_dir=sys.argv[2], start_mode="jobs")
    async with app.run_test() as pilot:
        for _ in range(200):  # until the job is read (no time is asserted)
            await pilot.pause(0.05)
            if app.screen.model.job is not None:
                break
        seen["notes"] = str(app.screen.query_one("#job-notes").render())
    print(json.dumps(seen))

asyncio.run(main())
"""


def test_a_fresh_start_shows_the_list_without_the_records_then_reads_the_job(
    tmp_path: Path,
) -> None:
    import os
    import subprocess
    import sys

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    for job in build(local_day_start(now())):
        store.save(job)
    store.list()  # the index folder (changes the jobs folder's mtime once)
    past = store.jobs_dir.stat().st_mtime - 10
    os.utime(store.jobs_dir, (past, past))  # settled: nothing renamed into it for 10 s
    store.list()
    newest = store.list()[0]
    result = subprocess.run(
        [sys.executable, "-c", FRESH_START, str(tmp_path / "d"), str(tmp_path / "c")],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert result.returncode == 0, result.stderr
    seen = json.loads(result.stdout.strip().splitlines()[-1])
    assert seen["pydantic"] is False and seen["read"] is False
    assert seen["rows"] == 4 and seen["focus"] == "jobs-list"
    assert seen["head"] == str(jobs_view.head(store.load(newest.id)))
    assert "Duct proven to chamber SR-4" in seen["notes"]  # read after the frame


async def test_a_note_typed_before_the_detail_is_mounted_waits_for_its_field(
    tmp_path: Path, held_back: JobStore, monkeypatch: pytest.MonkeyPatch
) -> None:
    # The detail under the head (buttons, texts, the note field) is mounted right after the
    # first frame; here it is held back until the keys are typed.
    held: list[JobsScreen] = []
    monkeypatch.setattr(JobsScreen, "_mount_detail", lambda self: held.append(self))
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, JobsScreen) and held == [screen]
        assert not screen.query("#job-note") and not screen.query("#jobs-status")
        await pilot.press("ctrl+l", *"ok")  # Note, then its words
        await pilot.pause()
        assert app.focused is screen.query_one("#jobs-list")  # nothing typed into the list
        assert screen.query_one("#jobs-filter", Input).value == ""
        await screen.run_worker(screen._mount_detail_now()).wait()
        await app.workers.wait_for_complete()  # the held keys, handed on one by one
        await pilot.pause()
        note = screen.query_one("#job-note", Input)
        assert app.focused is note and note.value == "ok"
        assert str(screen.query_one("#jobs-status", Button).label) == "All jobs"
