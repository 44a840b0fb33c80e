"""The Jobs workspace shows control characters from a job file visibly: none reaches the
terminal raw through the list, the details or the notes (ECMA-48 controls, from memory)."""

from __future__ import annotations

import re
from pathlib import Path

from textual.widgets import OptionList, Static

from fieldkit.jobs.models import Job
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app

_RAW = re.compile("[\x00-\x09\x0b-\x1f\x7f-\x9f]")
_HOSTILE = "\x1b]0;owned\x07\x1b[2J\x9b31m"


async def test_jobs_list_and_details_show_control_characters_visibly(
    isolated_dirs: dict[str, Path],
) -> None:
    job = Job(name="Spur" + _HOSTILE, site="S" + _HOSTILE, customer="[link=https://x]c[/link]")
    job.add_note("n" + _HOSTILE)
    job.add_link("L" + _HOSTILE)
    JobStore(isolated_dirs["data"] / "jobs").save(job)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="jobs"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        options = app.screen.query_one("#jobs-list", OptionList)
        prompt = str(options.get_option_at_index(0).prompt)
        assert "Spur\u241b" in prompt and not _RAW.search(prompt)
        for name in ("job-head", "job-links", "job-notes"):
            shown = str(app.screen.query_one(f"#{name}", Static).render())
            assert not _RAW.search(shown), (name, shown)
        head = str(app.screen.query_one("#job-head", Static).render())
        assert "[link=https://x]c[/link]" in head  # shown as typed, not read as markup


async def test_an_over_long_note_is_refused_beside_the_field_and_kept(
    isolated_dirs: dict[str, Path],
) -> None:
    from textual.widgets import Input

    store = JobStore(isolated_dirs["data"] / "jobs")
    job = store.create("Station Road")
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="jobs"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        field = app.screen.query_one("#job-note", Input)
        long_note = "x" * 20_001  # one over the 20,000-character note limit (jobs/base.py)
        field.value = long_note
        await pilot.pause()
        app.screen.query_one("#job-note-add").press()
        await pilot.pause()
        assert app.is_running
        error = str(app.screen.query_one("#job-note-error", Static).render())
        assert "20000" in error.replace(",", "")
        assert field.value == long_note  # nothing typed is lost
    assert store.load(job.id).notes == []
