"""Hostile entries in the data and config folders: FIFOs, device symlinks, folders and
unreadable files named like jobs, a quarantine that cannot be made, a corrupt index, stale temp
files. The listing never hangs, never reads without bound, and one bad entry never hides the
others.

The CLI cases run in-process through ``cli.main`` (tests/cli_runner.py) with a timeout: a hang
is a failure, not a stuck suite. (They were subprocesses, a third of a second each.)
"""

from __future__ import annotations

import json
import os
import subprocess
from pathlib import Path

import cli_runner
import pytest

from fieldkit.jobs.models import new_id
from fieldkit.jobs.store import JobStore

TIMEOUT_S = 60


def fieldkit(
    *args: str, data: Path, config: Path | None = None
) -> subprocess.CompletedProcess[str]:
    env = {"FIELDKIT_DATA_DIR": str(data)}
    if config is not None:
        env["FIELDKIT_CONFIG_DIR"] = str(config)
    return cli_runner.run(*args, env=env, timeout_s=TIMEOUT_S)


def _two_jobs(jobs_dir: Path) -> tuple[JobStore, list[str]]:
    store = JobStore(jobs_dir)
    ids = [store.create(name).id for name in ("Station Road", "Mill Lane")]
    return store, ids


def _hostile_entry(jobs_dir: Path, kind: str) -> Path:
    path = jobs_dir / f"{new_id()}.json"
    if kind == "fifo":
        os.mkfifo(path)
    elif kind == "dev-zero-link":
        path.symlink_to("/dev/zero")
    elif kind == "dev-null-link":
        path.symlink_to("/dev/null")
    elif kind == "folder":
        path.mkdir()
        (path / "inner.json").write_text("{}")
    elif kind == "dangling-link":
        path.symlink_to(jobs_dir / "nowhere.json")
    return path


KINDS = ["fifo", "dev-zero-link", "dev-null-link", "folder", "dangling-link"]


@pytest.mark.parametrize("kind", KINDS)
def test_a_special_entry_named_like_a_job_is_skipped_and_reported(
    tmp_path: Path, kind: str
) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    bad = _hostile_entry(tmp_path / "jobs", kind)
    fresh = JobStore(tmp_path / "jobs")
    assert {s.id for s in fresh.list(rescan=True)} == set(ids)
    assert any(bad.name in p for p in fresh.problems), fresh.problems
    assert os.path.lexists(bad)  # reported, not moved or destroyed


@pytest.mark.parametrize(
    "command", [("jobs", "list"), ("jobs", "today"), ("jobs", "list", "--rescan")]
)
@pytest.mark.parametrize("kind", ["fifo", "dev-zero-link", "folder"])
def test_the_cli_lists_the_other_jobs_beside_a_special_entry(
    tmp_path: Path, kind: str, command: tuple[str, ...]
) -> None:
    data = tmp_path / "data"
    _store, ids = _two_jobs(data / "jobs")
    bad = _hostile_entry(data / "jobs", kind)
    result = fieldkit(*command, data=data)
    assert "Traceback" not in result.stderr, result.stderr
    assert result.returncode == 0, result.stderr
    for job_id in ids:
        if command[1] == "list":
            assert job_id in result.stdout
    assert bad.name in result.stderr  # a warning names the entry


@pytest.mark.parametrize("kind", ["fifo", "dev-zero-link", "folder"])
def test_show_and_export_of_a_special_entry_refuse_in_one_line(tmp_path: Path, kind: str) -> None:
    data = tmp_path / "data"
    _two_jobs(data / "jobs")
    bad = _hostile_entry(data / "jobs", kind)
    for command in (("jobs", "show", bad.stem), ("jobs", "export", bad.stem, "--format", "md")):
        result = fieldkit(*command, data=data)
        assert result.returncode == 2, result.stderr
        assert len(result.stderr.strip().splitlines()) == 1, result.stderr
        assert "not a regular file" in result.stderr


def test_a_note_on_a_fifo_named_like_a_job_is_refused_not_hung(tmp_path: Path) -> None:
    data = tmp_path / "data"
    _two_jobs(data / "jobs")
    bad = _hostile_entry(data / "jobs", "fifo")
    result = fieldkit("jobs", "note", bad.stem, "hello", data=data)
    assert result.returncode == 2 and "not a regular file" in result.stderr


def test_an_unreadable_job_file_is_reported_and_the_others_list(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    locked_out = store.path_of(ids[0])
    import fieldkit.jobs.store as store_module

    real = store_module.read_regular

    def refuse(path: Path, max_bytes: int, *, follow_symlinks: bool = True) -> bytes:
        if Path(path) == locked_out:
            raise PermissionError(13, "Permission denied", str(path))
        return real(path, max_bytes, follow_symlinks=follow_symlinks)

    monkeypatch.setattr(store_module, "read_regular", refuse)
    fresh = JobStore(tmp_path / "jobs")
    assert [s.id for s in fresh.list(rescan=True)] == [ids[1]]
    assert any("Permission denied" in p for p in fresh.problems)
    assert locked_out.exists()  # not quarantined: it is not broken, only unreadable here


@pytest.mark.skipif(os.geteuid() == 0, reason="root reads files whatever their mode")
def test_a_file_without_read_permission_does_not_hide_the_others(tmp_path: Path) -> None:
    data = tmp_path / "data"
    store, ids = _two_jobs(data / "jobs")
    store.path_of(ids[0]).chmod(0)
    result = fieldkit("jobs", "list", "--rescan", data=data)
    assert result.returncode == 0 and ids[1] in result.stdout


def test_a_quarantine_that_cannot_be_made_is_reported_not_fatal(tmp_path: Path) -> None:
    # "quarantine" is a file, so the folder cannot be made: the same failure as a read-only
    # jobs folder, reproducible as root
    data = tmp_path / "data"
    _store, ids = _two_jobs(data / "jobs")
    (data / "jobs" / "quarantine").write_text("in the way")
    broken = data / "jobs" / f"{new_id()}.json"
    broken.write_text("{not json")
    for command in (("jobs", "list", "--rescan"), ("jobs", "today")):
        result = fieldkit(*command, data=data)
        assert "Traceback" not in result.stderr, result.stderr
        assert result.returncode == 0, result.stderr
        assert "could not be moved to quarantine" in result.stderr
    result = fieldkit("jobs", "list", data=data)
    assert all(job_id in result.stdout for job_id in ids)
    result = fieldkit("jobs", "show", broken.stem, data=data)
    assert result.returncode == 2 and "could not be moved" in result.stderr
    assert broken.read_text() == "{not json"  # nothing lost


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only folders")
def test_a_read_only_jobs_folder_with_a_broken_file_still_lists(tmp_path: Path) -> None:
    data = tmp_path / "data"
    _store, ids = _two_jobs(data / "jobs")
    (data / "jobs" / f"{new_id()}.json").write_text("{not json")
    (data / "jobs").chmod(0o555)
    try:
        for command in (("jobs", "list", "--rescan"), ("jobs", "today"), ("jobs", "show", ids[0])):
            result = fieldkit(*command, data=data)
            assert result.returncode == 0, result.stderr
    finally:
        (data / "jobs").chmod(0o755)


@pytest.mark.parametrize(
    "damage",
    [
        lambda row: row.__setitem__(7, 1234),  # updated_iso as a number
        lambda row: row.__setitem__(4, "not a list"),
        lambda row: row.__setitem__(8, "7"),
        lambda row: row.__setitem__(0, "../../etc/passwd"),
        lambda row: row.__setitem__(6, "yesterday"),
        lambda row: row.__setitem__(5, None),
        lambda row: row.__setitem__(5, ["open"]),  # unhashable where a status belongs
        lambda row: row.__setitem__(14, [1, 2]),
    ],
)
def test_a_corrupt_index_row_is_dropped_and_rebuilt(tmp_path: Path, damage: object) -> None:
    data = tmp_path / "data"
    store, ids = _two_jobs(data / "jobs")
    store.list()
    index = json.loads(store.index_path.read_text())
    row = index["entries"][ids[0]][3]
    damage(row)  # type: ignore[operator]
    store.index_path.write_text(json.dumps(index))
    for command in (("jobs", "list"), ("jobs", "list", "--rescan"), ("jobs", "today")):
        result = fieldkit(*command, data=data)
        assert "Traceback" not in result.stderr, result.stderr
        assert result.returncode == 0, result.stderr
    fresh = JobStore(data / "jobs")
    assert {s.id for s in fresh.list()} == set(ids)
    rebuilt = json.loads(store.index_path.read_text())
    assert rebuilt["entries"][ids[0]][3][7] == store.load(ids[0]).updated_at.isoformat(
        timespec="microseconds"
    )


def test_a_settled_index_with_a_bad_row_is_not_trusted(tmp_path: Path) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    store.list()
    index = json.loads(store.index_path.read_text())
    index["settled_folder_mtime_ns"] = os.stat(tmp_path / "jobs").st_mtime_ns
    index["entries"][ids[0]][3][7] = 99
    store.index_path.write_text(json.dumps(index))
    summaries = JobStore(tmp_path / "jobs").list()
    assert {s.id for s in summaries} == set(ids)
    assert all(isinstance(s.updated_iso, str) for s in summaries)


def test_an_index_that_is_a_fifo_does_not_hang_the_listing(tmp_path: Path) -> None:
    data = tmp_path / "data"
    store, ids = _two_jobs(data / "jobs")
    store.index_path.parent.mkdir(exist_ok=True)
    with __import__("contextlib").suppress(FileNotFoundError):
        store.index_path.unlink()
    os.mkfifo(store.index_path)
    result = fieldkit("jobs", "list", data=data)
    assert result.returncode == 0 and all(i in result.stdout for i in ids)


def test_a_jobs_folder_that_is_a_file_is_an_error_with_a_hint(tmp_path: Path) -> None:
    data = tmp_path / "data"
    data.mkdir()
    (data / "jobs").write_text("not a folder")
    for command in (("jobs", "list"), ("jobs", "today")):
        result = fieldkit(*command, data=data)
        assert result.returncode == 2, result.stdout
        assert "--data-dir" in result.stderr and len(result.stderr.strip().splitlines()) == 1
        assert "no jobs yet" not in result.stdout


def test_an_unusable_data_folder_names_the_data_dir_option(tmp_path: Path) -> None:
    blocker = tmp_path / "a-file"
    blocker.write_text("x")
    result = fieldkit("jobs", "new", "Station Road", data=blocker / "data")
    assert result.returncode == 2
    assert "--data-dir" in result.stderr and len(result.stderr.strip().splitlines()) == 1


def test_stale_temp_files_are_removed_by_the_next_run_that_holds_the_lock(tmp_path: Path) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    store.list()
    jobs_dir = tmp_path / "jobs"
    left = [
        jobs_dir / f".{ids[0]}.json.abc123.tmp",  # a save killed before its rename
        jobs_dir / f".{ids[1]}.json.bak.tmp",  # a save killed between its two renames
        store.index_path.parent / ".summaries.json.k1ll3d.tmp",  # a listing killed mid-write
    ]
    for path in left:
        path.write_text("partial")
    os.utime(jobs_dir, ns=(0, 0))  # the folder looks changed: the next listing rescans
    JobStore(jobs_dir).list()
    assert not [p for p in left if p.exists()], [p.name for p in left if p.exists()]


def test_a_backup_sharing_the_job_files_inode_leaves_no_temp_file(tmp_path: Path) -> None:
    # what a kill between the backup's rename and the job's rename leaves behind
    store = JobStore(tmp_path / "jobs")
    job = store.create("Station Road")
    path = store.path_of(job.id)
    backup = path.with_name(path.name + ".bak")
    backup.unlink(missing_ok=True)
    os.link(path, backup)
    store.update(job.id, lambda j: j.add_note("after the kill") and None)
    assert not list((tmp_path / "jobs").glob(".*.tmp"))
    assert json.loads(backup.read_text())["revision"] == 1
    assert json.loads(path.read_text())["revision"] == 2


def test_newer_schema_files_are_checked_against_their_file_name(tmp_path: Path) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    newer = json.loads(store.path_of(ids[0]).read_text())
    newer["schema_version"] = 99
    newer["a_field_from_the_future"] = 1
    for content_id in ("../../etc/passwd", ids[1], "\x1b[2Jx"):
        newer["id"] = content_id
        (tmp_path / "jobs" / f"{new_id()}.json").write_text(json.dumps(newer))
    listed = [s.id for s in JobStore(tmp_path / "jobs").list(rescan=True)]
    assert sorted(listed) == sorted(ids[:1] + ids[1:])  # only the two real jobs
    assert len(listed) == len(set(listed))


def test_a_job_id_with_a_trailing_newline_is_refused(tmp_path: Path) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    from fieldkit.jobs.store import StoreError

    with pytest.raises(StoreError, match="not a job id"):
        store.path_of(ids[0] + "\n")
    with pytest.raises(StoreError):
        store.load(ids[0] + "\n")


@pytest.mark.parametrize("kind", ["fifo", "dev-zero-link"])
def test_special_files_in_the_user_presets_folder_are_reported(tmp_path: Path, kind: str) -> None:
    config = tmp_path / "config"
    presets = config / "presets"
    presets.mkdir(parents=True)
    bad = presets / "mine.toml"
    if kind == "fifo":
        os.mkfifo(bad)
    else:
        bad.symlink_to("/dev/zero")
    result = fieldkit("presets", "fibres", data=tmp_path / "data", config=config)
    assert result.returncode == 0, result.stderr
    shown = result.stdout + result.stderr
    assert "mine.toml" in shown and "not a regular file" in shown
    result = fieldkit(
        "budget", "--fibre-type", "OS2", "--length", "1km", data=tmp_path / "data", config=config
    )
    assert result.returncode == 0, result.stderr


@pytest.mark.parametrize("target", ["/dev/zero", "fifo", "folder"])
def test_budget_of_a_special_file_is_refused_in_one_line(tmp_path: Path, target: str) -> None:
    path = Path(target)
    if target == "fifo":
        path = tmp_path / "link.toml"
        os.mkfifo(path)
    elif target == "folder":
        path = tmp_path
    result = fieldkit("budget", str(path), data=tmp_path / "data")
    assert result.returncode == 2, result.stderr
    assert len(result.stderr.strip().splitlines()) == 1, result.stderr
    assert "Traceback" not in result.stderr


def test_a_settings_file_that_is_a_fifo_does_not_hang_the_start(tmp_path: Path) -> None:
    config = tmp_path / "config"
    config.mkdir()
    os.mkfifo(config / "settings.json")
    from fieldkit import settings

    assert settings.load(config) == {}


def test_a_huge_job_file_reads_at_most_its_cap(tmp_path: Path) -> None:
    store, ids = _two_jobs(tmp_path / "jobs")
    # a sparse 30 MiB file: the store must not read it (its size alone refuses it)
    big = tmp_path / "jobs" / f"{new_id()}.json"
    with open(big, "wb") as handle:
        handle.truncate(30 * 1024 * 1024)
    fresh = JobStore(tmp_path / "jobs")
    assert {s.id for s in fresh.list()} == set(ids)
    assert any("30 MiB, larger than the 20 MiB limit" in p for p in fresh.problems)
