"""`jobs export -o` writes only a regular file: it refuses a FIFO, a device, a symlink or a
folder at the target, a folder that does not exist, and any place inside the data folder; `-`
writes to standard output. Whatever is refused is left exactly as it was (issue 16, item 5;
the rules live in fieldkit.actions.export)."""

from __future__ import annotations

import os
import stat
from pathlib import Path

import cli_runner
import pytest

from fieldkit.jobs.store import JobStore


@pytest.fixture
def job_id(isolated_dirs: dict[str, Path]) -> str:
    return JobStore(isolated_dirs["data"] / "jobs").create("Station Road").id


def _refused(result: object) -> None:
    assert result.returncode == 2, (result.stdout, result.stderr)  # type: ignore[attr-defined]
    assert len(result.stderr.strip().splitlines()) == 1  # type: ignore[attr-defined]


def test_a_fifo_at_the_target_is_refused_and_stays_a_fifo(tmp_path: Path, job_id: str) -> None:
    fifo = tmp_path / "report.md"
    os.mkfifo(fifo)
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "md", "-o", str(fifo)))
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode)


def test_a_symlink_at_the_target_is_refused_and_kept(tmp_path: Path, job_id: str) -> None:
    aimed = tmp_path / "elsewhere.txt"
    aimed.write_text("keep me")
    link = tmp_path / "report.md"
    link.symlink_to(aimed)
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "md", "-o", str(link)))
    assert link.is_symlink() and aimed.read_text() == "keep me"


def test_a_device_is_refused_and_never_replaced(tmp_path: Path, job_id: str) -> None:
    # a device node of the test's own (the same kind as /dev/null: character device 1, 3), so
    # that a broken guard can never replace the machine's /dev/null
    device = tmp_path / "null"
    try:
        os.mknod(device, 0o666 | stat.S_IFCHR, os.makedev(1, 3))
    except (PermissionError, AttributeError):
        pytest.skip("making a device node needs root")
    before = os.lstat(device)
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "csv", "-o", str(device)))
    after = os.lstat(device)
    assert stat.S_ISCHR(after.st_mode) and after.st_ino == before.st_ino


def test_a_symlink_to_a_device_is_refused(tmp_path: Path, job_id: str) -> None:
    link = tmp_path / "report.csv"
    link.symlink_to("/dev/null")
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "csv", "-o", str(link)))
    assert link.is_symlink() and stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_dash_writes_the_report_to_standard_output(job_id: str) -> None:
    result = cli_runner.run("jobs", "export", job_id, "--format", "md", "-o", "-")
    assert result.returncode == 0, result.stderr
    assert result.stdout.startswith("# ")


def test_a_missing_folder_is_refused_not_created(tmp_path: Path, job_id: str) -> None:
    target = tmp_path / "no" / "such" / "report.md"
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "md", "-o", str(target)))
    assert not (tmp_path / "no").exists()


@pytest.mark.parametrize(
    "where", ["jobs/report.html", "report.html", "jobs/{id}.json", "jobs/{id}.json.bak"]
)
def test_nothing_is_written_inside_the_data_folder(
    isolated_dirs: dict[str, Path], job_id: str, where: str
) -> None:
    target = isolated_dirs["data"] / where.format(id=job_id)
    before = target.read_bytes() if target.exists() else None
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "html", "-o", str(target)))
    assert (target.read_bytes() if target.exists() else None) == before
    assert JobStore(isolated_dirs["data"] / "jobs").load(job_id).name == "Station Road"


def test_a_hard_link_to_a_job_file_is_refused(
    isolated_dirs: dict[str, Path], tmp_path: Path, job_id: str
) -> None:
    job_file = isolated_dirs["data"] / "jobs" / f"{job_id}.json"
    twin = tmp_path / "report.html"
    os.link(job_file, twin)
    before = job_file.read_bytes()
    _refused(cli_runner.run("jobs", "export", job_id, "--format", "html", "-o", str(twin)))
    assert job_file.read_bytes() == before
