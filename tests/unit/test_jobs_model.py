"""The Jobs workspace's plain state (fieldkit.tui.jobs_model): which jobs are listed, which one
stays picked, what the count line and the filter buttons say. No Textual here."""

from __future__ import annotations

from datetime import UTC, date, datetime
from pathlib import Path

from fieldkit.jobs.index import JobSummary
from fieldkit.jobs.models import Job
from fieldkit.tui.jobs_model import PAGE, JobsModel

DAY = date(2026, 3, 10)


def _summary(i: int, status: str = "open", name: str = "") -> JobSummary:
    stamp = f"2026-03-10T{i % 24:02d}:00:00.000000+00:00"
    return JobSummary(
        id=f"{i:016x}",
        name=name or f"job {i}",
        customer="",
        site="",
        crew=[],
        status=status,
        created_iso=stamp,
        updated_iso=stamp,
        revision=1,
        link_count=0,
        result_count=0,
        failed_count=0,
        note_count=0,
    )


def test_the_first_row_is_picked_and_a_shown_job_stays_picked() -> None:
    model = JobsModel(summaries=[_summary(i) for i in range(1, 4)])
    page = model.page("", DAY)
    assert page.picked == 0 and page.count_line == "3 of 3 jobs"
    model.job = Job(id=model.summaries[2].id, name="job 3")
    assert model.page("", DAY).picked == 2
    assert model.page("job 1", DAY).picked == 0  # not listed: the first row instead


def test_status_cycle_and_labels() -> None:
    model = JobsModel(summaries=[_summary(1), _summary(2, "done")])
    assert (model.status_label, model.day_label) == ("All jobs", "Any day")
    model.cycle_status()
    assert model.status_label == "Open jobs" and model.page("", DAY).matched == 1
    model.cycle_status()
    assert model.status_label == "Done jobs"
    assert [s.id for s in model.page("", DAY).shown] == [model.summaries[1].id]
    model.cycle_status()
    assert model.status == None  # noqa: E711 - back to every job
    model.toggle_today()
    assert model.day_label == "Today"


def test_a_long_listing_shows_a_page_and_says_so() -> None:
    model = JobsModel(summaries=[_summary(i) for i in range(PAGE + 5)], quarantined=2)
    page = model.page("", DAY)
    assert len(page.shown) == PAGE
    assert page.count_line == (
        f"{PAGE + 5} of {PAGE + 5} jobs, first {PAGE} shown: type to narrow, "
        "2 set aside (fieldkit jobs quarantine)"
    )


def test_a_saved_job_moves_to_the_top_and_stays_picked() -> None:
    model = JobsModel(summaries=[_summary(3), _summary(2), _summary(1)])
    job = Job(id=model.summaries[2].id, name="renamed")
    job.updated_at = datetime(2026, 3, 10, 23, 0, tzinfo=UTC)
    model.replace(job)
    assert [s.name for s in model.summaries] == ["renamed", "job 3", "job 2"]
    assert model.page("", DAY).picked == 0


def test_relist_counts_the_set_aside_and_tells_each_problem_once(tmp_path: Path) -> None:
    from fieldkit.jobs.store import JobStore

    store = JobStore(tmp_path / "jobs")
    store.save(Job(name="Feed repair"))
    (tmp_path / "jobs" / "0123456789abcdef.json").write_text("{ not json")  # a job's name
    model = JobsModel()
    told = model.relist(store, rescan=True)
    assert [s.name for s in model.summaries] == ["Feed repair"]
    assert model.quarantined == 1  # the file that does not parse is moved aside, not lost
    assert told and all(severity == "warning" for _, severity in told)
    assert any("0123456789abcdef.json" in message for message, _ in told)
    assert model.relist(store) == []  # told once: the store's problems are cleared


def test_relist_of_an_unreadable_folder_says_so(tmp_path: Path) -> None:
    from fieldkit.jobs.store import JobStore

    (tmp_path / "jobs").write_text("a file where the jobs folder should be")
    model = JobsModel(summaries=[_summary(1)])
    told = model.relist(JobStore(tmp_path / "jobs"))
    assert model.summaries == []
    assert told[0][1] == "error" and told[0][0].startswith("The jobs could not be listed:")
