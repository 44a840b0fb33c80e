"""The end-of-day summary over the demo day: counts checked by hand against the scenario."""

from __future__ import annotations

import io
from datetime import timedelta
from pathlib import Path

import pytest

from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore, local_date
from fieldkit.jobs.today import day_summary


def test_demo_day_counts(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    for job in build(local_day_start(now())):
        store.save(job)
    summary = day_summary(store, local_date(now()))
    totals = summary.totals()
    # Backbone 12 fibres × 2 wavelengths, fit-out 24 × 2, feed 6 × 1: 24 + 48 + 6 = 78.
    assert totals["results_today"] == totals["tested"] == 78
    # Fails: backbone fibre 7 at 1550 nm, feed fibre 5; no limit: the feed's negative loss.
    # The feed's negative loss is a reference problem (its own count, not "no limit").
    assert (totals["failed"], totals["reference_problems"], totals["no_limit"]) == (2, 1, 0)
    assert totals["passed"] + totals["in_doubt"] == 78 - 3
    # In doubt: backbone 1550 nm fibres 8..12 (read after the reference went into doubt).
    assert totals["in_doubt"] == 5
    assert (totals["jobs"], totals["open_jobs"]) == (4, 3)
    survey = next(j for j in summary.jobs if j.name == "Station Road duct survey")
    assert "SR-SPUR: no results yet" in survey.open_items
    feed = next(j for j in summary.jobs if j.name == "North Reservoir feed repair")
    assert any("fault located at 2889.2 m" in item for item in feed.open_items)
    # one name for the window, as in the fault workspace and `fieldkit locate` (review C30)
    assert any("(search from 2876.0 to 2902.4 m)" in item for item in feed.open_items)
    done = next(j for j in summary.jobs if j.status == "done")
    assert done.open_items == [] and done.failures == []


def test_another_day_has_no_jobs(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    store.create("Only today")
    assert day_summary(store, local_date(now()) - timedelta(days=3)).jobs == []


def test_open_items_count_in_words_that_agree(tmp_path: Path) -> None:
    from fieldkit.jobs.today import counted

    assert counted(1, "failed result") == "1 failed result"
    assert counted(2, "failed result") == "2 failed results"
    assert counted(0, "open item") == "0 open items"
    store = JobStore(tmp_path / "jobs")
    for job in build(local_day_start(now())):
        store.save(job)
    summary = day_summary(store, local_date(now()))
    # The demo feed repair has one failed fibre (fibre 5 at 1550 nm): one result, singular.
    feed = next(j for j in summary.jobs if j.name == "North Reservoir feed repair")
    assert "RES-N-FEED: fibre 5 at 1550 nm A→B: failed, repair and retest" in feed.open_items
    # The negative loss of fibre 6 is an open item too (a reference problem).
    assert (
        "RES-N-FEED: fibre 6 at 1550 nm A→B: reference problem, clean and re-reference"
        in feed.open_items
    )
    # The backbone has five results against the reference that drifted: one item each.
    items = [item for j in summary.jobs for item in j.open_items]
    assert sum(item.endswith("reference in doubt, retest") for item in items) == 5


@pytest.mark.parametrize("hour", [0, 8, 13, 15, 16, 23])
def test_the_demo_never_stamps_a_record_in_the_future(hour: int) -> None:
    # the demo is a day of work that is over: written at any hour, no record lies after the
    # moment it is written, and the day's order is kept (created before every later stamp)
    from fieldkit.jobs.demo import build_for, last_stamp

    moment = local_day_start(now()) + timedelta(hours=hour, minutes=7)
    jobs = build_for(moment)
    assert last_stamp(jobs) <= moment
    for job in jobs:
        assert job.created_at <= job.updated_at
        assert all(note.at >= job.created_at for note in job.notes)
    # whole days only: the clock times the notes mention ("after 10:00") stay true
    assert {r.at.astimezone().time() for j in jobs for _, r in j.results()} == {
        r.at.astimezone().time() for j in build(local_day_start(moment)) for _, r in j.results()
    }


def test_the_jobs_detail_names_a_faults_window_as_the_fault_workspace() -> None:
    # Review C30: one name for the search window, "search from … to …", in the fault
    # workspace, `fieldkit locate` and the Jobs detail (the demo feed's fault, 2876.0–2902.4 m).
    from rich.console import Console

    from fieldkit.tui.jobs_view import links_text

    feed = next(j for j in build(local_day_start(now())) if j.name.startswith("North Reservoir"))
    console = Console(width=200, record=True, file=io.StringIO())
    console.print(links_text(feed))
    text = console.export_text()
    assert "(search from 2876.0 to 2902.4 m)" in " ".join(text.split())
