"""`fieldkit settings` (letterhead, equipment, CSV style) and the report exports from the
command line: day and range exports, the CSV styles, export names from the job, and that bad
input is one line with exit status 2 (the CLI's rule, fieldkit/cli.py)."""

from __future__ import annotations

import csv
import io
import json
from datetime import UTC, datetime
from pathlib import Path

import cli_runner
import pytest

from fieldkit.jobs.models import Job, Link, LossResult
from fieldkit.jobs.store import JobStore


def _refused(result: object, words: str) -> None:
    assert result.returncode == 2, (result.stdout, result.stderr)  # type: ignore[attr-defined]
    lines = result.stderr.strip().splitlines()  # type: ignore[attr-defined]
    assert len(lines) == 1 and words in lines[0], lines
    assert "Traceback" not in result.stderr  # type: ignore[attr-defined]


def ok(*args: str) -> str:
    done = cli_runner.run(*args)
    assert done.returncode == 0, (done.stdout, done.stderr)
    return done.stdout


# -- settings -----------------------------------------------------------------------------------
def test_contractor_crew_and_equipment_are_kept_and_listed(isolated_dirs: dict[str, Path]) -> None:
    ok("settings", "contractor", "Northline Fibre Works")
    ok("settings", "crew", "Splice crew 2")
    ok(
        "settings",
        "equipment-add",
        "meter",
        "PM-4",
        "--calibrated",
        "2026-01-10",
        "--due",
        "2027-01-10",
    )
    ok("settings", "equipment-add", "otdr", "OT-1", "--calibrated", "2025-12-01")
    shown = json.loads(ok("settings", "show", "--json"))
    assert (shown["contractor"], shown["crew"], shown["csv_style"]) == (
        "Northline Fibre Works",
        "Splice crew 2",
        "comma",
    )
    assert [e["id"] for e in shown["equipment"]] == ["PM-4", "OT-1"]
    assert "power meter PM-4: calibrated 2026-01-10, due 2027-01-10" in ok(
        "settings", "equipment-list"
    )
    assert ok("settings", "equipment-remove", "pm-4").strip() == "removed PM-4"
    assert [
        e["id"] for e in json.loads(ok("settings", "equipment-list", "--json"))["equipment"]
    ] == ["OT-1"]


@pytest.mark.parametrize(
    "args,words",
    [
        (
            ("equipment-add", "lamp", "X", "--calibrated", "2026-01-10"),
            "kind: 'lamp' is not one of",
        ),
        (
            ("equipment-add", "meter", "X", "--calibrated", "10/01/2026"),
            "not a date written YYYY-MM-DD",
        ),
        (("equipment-add", "meter", "X", "--calibrated", "2026-02-30"), "not a calendar date"),
        (("equipment-add", "meter", "X", "--calibrated", "2999-01-01"), "is in the future"),
        (
            ("equipment-add", "meter", "X", "--calibrated", "2026-01-10", "--due", "2025-01-10"),
            "is not after the calibration date",
        ),
        (("equipment-add", "meter", "  ", "--calibrated", "2026-01-10"), "id: give a value"),
        (("equipment-remove", "nothing"), "no equipment 'nothing' is listed"),
        (("contractor", "A\x1b[2JB"), "control character"),
        (("crew", "x" * 201), "too long"),
    ],
)
def test_bad_settings_are_one_line_and_exit_2(
    isolated_dirs: dict[str, Path], args: tuple[str, ...], words: str
) -> None:
    _refused(cli_runner.run("settings", *args), words)
    assert not (isolated_dirs["config"] / "settings.json").exists()  # nothing was written


def test_an_id_listed_twice_is_refused(isolated_dirs: dict[str, Path]) -> None:
    ok("settings", "equipment-add", "meter", "PM-4", "--calibrated", "2026-01-10")
    _refused(
        cli_runner.run("settings", "equipment-add", "source", "pm-4", "--calibrated", "2026-01-10"),
        "already listed",
    )


def test_a_hand_edited_bad_entry_is_reported_and_kept(isolated_dirs: dict[str, Path]) -> None:
    config = isolated_dirs["config"]
    config.mkdir(parents=True)
    stored = [{"kind": "meter", "id": "OLD", "calibrated": "yesterday"}]
    (config / "settings.json").write_text(json.dumps({"equipment": stored}))
    shown = ok("settings", "show")
    assert "warning: equipment entry 1: calibrated: 'yesterday' is not a date" in shown
    ok("settings", "equipment-add", "meter", "NEW", "--calibrated", "2026-01-10")
    kept = json.loads((config / "settings.json").read_text())["equipment"]
    assert kept[0] == stored[0] and kept[1]["id"] == "NEW"  # no data is ever lost


# -- exports ------------------------------------------------------------------------------------
def _job(name: str, days: list[int]) -> Job:
    """A job created on its first day with one result at noon UTC on each day of June 2025."""
    first = datetime(2025, 6, days[0], 12, tzinfo=UTC)
    results = [
        LossResult(
            fibre=n,
            wavelength_nm=1310.0,
            loss_db=1.0 + n / 10,
            limit_db=2.0,
            passed=True,
            at=datetime(2025, 6, d, 12, tzinfo=UTC),
        )
        for n, d in enumerate(days, 1)
    ]
    return Job(name=name, created_at=first, links=[Link(label="L1", results=results)])


@pytest.fixture
def three_jobs(isolated_dirs: dict[str, Path]) -> JobStore:
    store = JobStore(isolated_dirs["data"] / "jobs")
    for job in (_job("Alpha", [1]), _job("Bravo", [3]), _job("Charlie", [1, 3])):
        store.save(job)
    return store


def test_a_day_export_holds_every_job_worked_on_that_day(
    three_jobs: JobStore, tmp_path: Path
) -> None:
    html = ok("jobs", "export", "--day", "2025-06-01", "--format", "html")
    assert html.count("<article") == 3  # the cover page and two jobs
    assert html.count('<article class="page">') == 2  # each job starts a printed page
    assert "<h1>Fibre test report: Alpha</h1>" in html and "Charlie" in html
    assert "Bravo" not in html
    assert html.count('<div class="signature">') == 2 * 2  # each job: summary + its link
    text = ok("jobs", "export", "--from", "2025-06-02", "--to", "2025-06-03", "--format", "csv")
    rows = list(csv.DictReader(io.StringIO(text)))
    # one header, the results of Bravo and Charlie (all their results: the whole job reports)
    assert sorted({r["job"] for r in rows}) == ["Bravo", "Charlie"] and len(rows) == 1 + 2
    wrote = ok("jobs", "export", "--day", "2025-06-01", "--format", "md", "-o", f"{tmp_path}/")
    assert wrote.strip() == f"wrote {tmp_path / 'jobs_2025-06-01.md'} (2 jobs)"
    md = (tmp_path / "jobs_2025-06-01.md").read_text(encoding="utf-8")
    assert "**Overall: PASS** — 2 jobs." in md
    ok(
        "jobs",
        "export",
        "--from",
        "2025-06-01",
        "--to",
        "2025-06-03",
        "--format",
        "html",
        "-o",
        f"{tmp_path}/",
    )
    assert (tmp_path / "jobs_2025-06-01_to_2025-06-03.html").is_file()


def test_a_day_without_work_says_so(three_jobs: JobStore) -> None:
    done = cli_runner.run("jobs", "export", "--day", "2025-06-02", "--format", "md")
    assert done.returncode == 0 and "No job was worked on in these dates." in done.stdout
    assert "no job was worked on" in done.stderr


@pytest.mark.parametrize(
    "args,words",
    [
        (("--day", "2025-13-01"), "--day: '2025-13-01' is not a date"),
        (("--from", "2025-06-03"), "needs both --from and --to"),
        (("--from", "2025-06-03", "--to", "2025-06-01"), "ends (2025-06-01) before it starts"),
        (("--day", "2025-06-01", "--from", "2025-06-01"), "--day or --from and --to, not both"),
        ((), "give a job id, or --day DATE"),
    ],
)
def test_bad_dates_are_refused(three_jobs: JobStore, args: tuple[str, ...], words: str) -> None:
    _refused(cli_runner.run("jobs", "export", "--format", "md", *args), words)


def test_the_semicolon_style_from_the_setting_or_the_option(three_jobs: JobStore) -> None:
    alpha = next(s.id for s in three_jobs.list() if s.name == "Alpha")
    plain = ok("jobs", "export", alpha, "--format", "csv")
    assert plain.splitlines()[1].split(",")[7] == "1.10"  # loss_db of fibre 1: 1.0 + 0.1
    semi = ok("jobs", "export", alpha, "--format", "csv", "--csv-style", "semicolon")
    assert semi.splitlines()[1].split(";")[7] == "1,10"
    ok("settings", "csv", "semicolon")
    assert ok("jobs", "export", alpha, "--format", "csv") == semi
    assert ok("jobs", "export", alpha, "--format", "csv", "--csv-style", "comma") == plain


def test_a_folder_gets_a_name_from_the_job_and_a_suffix_when_taken(
    three_jobs: JobStore, tmp_path: Path
) -> None:
    alpha = next(s.id for s in three_jobs.list() if s.name == "Alpha")
    first = ok("jobs", "export", alpha, "--format", "html", "-o", f"{tmp_path}/")
    assert first.strip() == f"wrote {tmp_path / 'Alpha_2025-06-01.html'}"
    second = ok("jobs", "export", alpha, "--format", "html", "-o", f"{tmp_path}/")
    assert second.strip() == f"wrote {tmp_path / 'Alpha_2025-06-01-2.html'}"
    assert alpha not in first + second  # never the hex id
    # a folder without the trailing / is still refused, as before (issue 16 item 5)
    _refused(
        cli_runner.run("jobs", "export", alpha, "--format", "md", "-o", str(tmp_path)),
        "is a folder",
    )


def test_a_folder_inside_the_data_folder_is_refused(
    three_jobs: JobStore, isolated_dirs: dict[str, Path]
) -> None:
    alpha = next(s.id for s in three_jobs.list() if s.name == "Alpha")
    inside = f"{isolated_dirs['data'] / 'jobs'}/"
    _refused(
        cli_runner.run("jobs", "export", alpha, "--format", "md", "-o", inside),
        "inside the data folder",
    )
    _refused(
        cli_runner.run("jobs", "export", "--day", "2025-06-01", "--format", "md", "-o", inside),
        "inside the data folder",
    )


def test_the_report_takes_the_letterhead_from_the_settings(three_jobs: JobStore) -> None:
    ok("settings", "contractor", "Northline Fibre Works")
    ok("settings", "equipment-add", "source", "SRC-2", "--calibrated", "2025-01-02")
    alpha = next(s.id for s in three_jobs.list() if s.name == "Alpha")
    md = ok("jobs", "export", alpha, "--format", "md")
    assert md.splitlines()[2] == "**Northline Fibre Works** — Fibre test report"
    assert "| light source | SRC-2 |  | 2025-01-02 |  |  |" in md
