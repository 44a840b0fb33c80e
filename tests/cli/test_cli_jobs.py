"""``fieldkit jobs`` and ``fieldkit demo`` run as a user runs them, in-process (cli_runner.py)."""

from __future__ import annotations

import csv
import io
import json
import subprocess
from pathlib import Path

import cli_runner
import pytest


def run(*args: str, data: Path | None = None) -> subprocess.CompletedProcess[str]:
    extra = ["--data-dir", str(data)] if data is not None else []
    return cli_runner.run(*args, *extra)


def ok(*args: str, data: Path | None = None) -> str:
    proc = run(*args, data=data)
    assert proc.returncode == 0, proc.stderr
    return proc.stdout


def test_new_note_done_show_list(tmp_path: Path) -> None:
    d = tmp_path / "d"
    created = json.loads(
        ok(
            "jobs",
            "new",
            "Quay cabinet",
            "--site",
            "Quay",
            "--customer",
            "Harbour board",
            "--json",
            data=d,
        )
    )
    job_id = created["id"]
    assert ok("jobs", "note", job_id[:13], "Cabinet mounted", "--by", "Ana", data=d)
    assert ok("jobs", "done", job_id[:13], data=d).strip() == "Quay cabinet: done"
    shown = json.loads(ok("jobs", "show", job_id, "--json", data=d))
    assert shown["job"]["status"] == "done"
    assert [(n["by"], n["text"]) for n in shown["job"]["notes"]] == [("Ana", "Cabinet mounted")]
    listing = json.loads(ok("jobs", "list", "--json", "--status", "done", data=d))
    assert [j["id"] for j in listing["jobs"]] == [job_id]
    assert (
        json.loads(ok("jobs", "list", "--json", "--search", "nothing-like-it", data=d))["count"]
        == 0
    )
    plain = ok("jobs", "new", "Second", data=d).strip()
    assert len(plain) >= 12 and plain in ok("jobs", "list", data=d)


def test_data_dir_from_the_environment(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("FIELDKIT_DATA_DIR", str(tmp_path / "env"))
    ok("jobs", "new", "From env")
    assert list((tmp_path / "env" / "jobs").glob("*.json"))


@pytest.mark.parametrize(
    "args, message",
    [
        (("jobs", "show", "zz"), "not a job id"),
        (("jobs", "show", "abcdef"), "no job with an id starting"),
        (("jobs", "new", "  "), "needs a name"),
        (("jobs", "list", "--date", "14/03/2026"), "not a date"),
        (("jobs", "import", "/nonexistent/handoff.json"), "cannot read"),
    ],
)
def test_errors_exit_2_with_one_line(tmp_path: Path, args: tuple[str, ...], message: str) -> None:
    proc = run(*args, data=tmp_path / "d")
    assert proc.returncode == 2
    assert message in proc.stderr and len(proc.stderr.strip().splitlines()) == 1
    assert "Traceback" not in proc.stderr


def test_demo_export_import_round_trip(tmp_path: Path) -> None:
    demo = tmp_path / "demo"
    assert ok("demo", "--no-ui", data=demo).strip() == str(demo)
    ok("demo", "--no-ui", data=demo)  # again: regenerated, not doubled
    listing = json.loads(ok("jobs", "list", "--json", data=demo))
    assert listing["count"] == 4
    backbone = next(j for j in listing["jobs"] if j["name"].startswith("Library"))
    out = tmp_path / "report.csv"
    ok("jobs", "export", backbone["id"], "--format", "csv", "-o", str(out), data=demo)
    raw = out.read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf")  # UTF-8 byte-order mark for spreadsheets
    results = raw.decode("utf-8-sig").split("\r\n\r\n")[0]  # the splice log follows
    rows = list(csv.DictReader(io.StringIO(results)))
    assert len(rows) == 24 and sum(r["result"] == "fail" for r in rows) == 1
    for fmt in ("md", "html"):
        assert "Safety and disclaimer" in ok(
            "jobs", "export", backbone["id"], "--format", fmt, data=demo
        )
    handoff = tmp_path / "handoff.json"
    ok("jobs", "export", backbone["id"], "--format", "json", "-o", str(handoff), data=demo)
    other = tmp_path / "other"
    first = json.loads(ok("jobs", "import", str(handoff), "--json", data=other))
    again = json.loads(ok("jobs", "import", str(handoff), "--json", data=other))
    assert first["added_jobs"] == [backbone["id"]] and again["unchanged_jobs"] == [backbone["id"]]
    today = json.loads(ok("jobs", "today", "--json", data=demo))
    assert today["totals"]["jobs"] == 4 and today["totals"]["failed"] == 2


def test_demo_refuses_a_folder_of_real_jobs(tmp_path: Path) -> None:
    real = tmp_path / "real"
    ok("jobs", "new", "My real job", data=real)
    proc = run("demo", "--no-ui", data=real)
    assert proc.returncode == 2 and "not demo data" in proc.stderr
    assert [j["name"] for j in json.loads(ok("jobs", "list", "--json", data=real))["jobs"]] == [
        "My real job"
    ]


def test_demo_default_folder_is_beside_the_users_jobs(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("FIELDKIT_DATA_DIR", str(tmp_path / "data"))
    ok("jobs", "new", "Mine")
    assert ok("demo", "--no-ui").strip() == str(tmp_path / "data" / "demo")
    assert len(json.loads(ok("jobs", "list", "--json"))["jobs"]) == 1


def test_import_refuses_hostile_file_and_writes_nothing(tmp_path: Path) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text(
        json.dumps(
            {
                "format": "fieldkit-jobs-handoff",
                "jobs": [
                    {"schema_version": 2, "id": "../../../tmp/evil", "name": "x", "links": []}
                ],
            }
        )
    )
    proc = run("jobs", "import", str(bad), data=tmp_path / "d")
    assert proc.returncode == 2 and "nothing imported" in proc.stderr
    assert not (tmp_path / "d").exists()


def test_today_and_show_list_every_count_in_words_that_agree(tmp_path: Path) -> None:
    # The demo day (tests/unit/test_jobs_today.py, checked by hand): 78 fibres, 70 pass,
    # 2 fail, 1 reference problem, 5 in doubt, 0 no limit (review A1, C39).
    demo = tmp_path / "demo"
    ok("demo", "--no-ui", data=demo)
    head = ok("jobs", "today", data=demo).splitlines()[0]
    assert head.endswith(
        "78 fibres tested: 70 pass, 2 fail, 1 reference problem, 5 in doubt, 0 no limit"
    ), head
    assert "reference problems" not in head and "4 jobs (3 open)" in head
    listing = json.loads(ok("jobs", "list", "--json", data=demo))
    feed = next(j for j in listing["jobs"] if j["name"].startswith("North Reservoir"))
    shown = ok("jobs", "show", feed["id"], data=demo)
    assert (
        "1550 nm: 6 fibres tested: 4 pass, 1 fail, 1 reference problem, 0 in doubt, 0 no limit"
        in shown
    ), shown


def test_list_says_fail_as_every_view_does(tmp_path: Path) -> None:
    # Review C33: one word per count ("1 fail", as the Jobs list and the End of day say).
    demo = tmp_path / "demo"
    ok("demo", "--no-ui", data=demo)
    listed = ok("jobs", "list", data=demo)
    feed = next(line for line in listed.splitlines() if "North Reservoir" in line)
    assert " 1 fail" in feed and "failed" not in feed, feed
