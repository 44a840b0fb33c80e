"""``fieldkit demo`` leaves demo jobs that are still as it wrote them today, and regenerates
them when one was changed or removed, on another day or from changed code
(fieldkit.commands.demo: the state file beside the marker)."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from fieldkit import locations
from fieldkit.commands import demo
from fieldkit.commands.demo import DEMO_JOB_IDS, MARKER, STATE_FILE, write_demo
from fieldkit.jobs.demo import DEMO_IDS
from fieldkit.jobs.store import JobStore


def _stamps(folder: Path) -> dict[str, int]:
    jobs = locations.jobs_dir(folder)
    return {i: os.stat(jobs / f"{i}.json").st_mtime_ns for i in DEMO_JOB_IDS}


def test_the_ids_known_without_the_records_are_the_demo_ids() -> None:
    assert DEMO_JOB_IDS == DEMO_IDS


def test_unchanged_demo_is_not_written_again(tmp_path: Path) -> None:
    folder = tmp_path / "demo"
    assert write_demo(folder) == list(DEMO_IDS)
    first = _stamps(folder)
    assert (folder / STATE_FILE).is_file()
    assert write_demo(folder) == list(DEMO_IDS)
    assert _stamps(folder) == first  # left as they were


def test_a_changed_or_removed_demo_job_is_regenerated(tmp_path: Path) -> None:
    folder = tmp_path / "demo"
    write_demo(folder)
    store = JobStore(locations.jobs_dir(folder))
    job = store.load(DEMO_IDS[0])
    original_notes = len(job.notes)
    job.notes = []
    store.save(job)  # the user played with the demo in the app
    write_demo(folder)
    assert len(store.load(DEMO_IDS[0]).notes) == original_notes
    (locations.jobs_dir(folder) / f"{DEMO_IDS[1]}.json").unlink()
    write_demo(folder)
    assert store.load(DEMO_IDS[1]).id == DEMO_IDS[1]


def test_an_older_demo_folder_regenerates(tmp_path: Path) -> None:
    # as an earlier fieldkit left it: a digest in the marker, no state file
    folder = tmp_path / "demo"
    write_demo(folder)
    before = _stamps(folder)
    (folder / STATE_FILE).unlink()
    (folder / MARKER).write_text(
        f"This folder holds the invented demo scenario.\nstate {'0' * 64}\n"
    )
    write_demo(folder)
    assert all(_stamps(folder)[i] != before[i] for i in DEMO_JOB_IDS)


def test_a_changed_code_file_regenerates(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    code = tmp_path / "code"
    (code / "sub").mkdir(parents=True)
    (code / "sub" / "build.py").write_text("X = 1\n")
    monkeypatch.setattr(demo, "_sources", lambda: [code])
    folder = tmp_path / "demo"
    write_demo(folder)
    before = _stamps(folder)
    write_demo(folder)
    assert _stamps(folder) == before
    (code / "sub" / "build.py").write_text("X = 22\n")  # another size: another fieldkit
    write_demo(folder)
    after = _stamps(folder)
    assert all(after[i] != before[i] for i in DEMO_JOB_IDS)
    (code / "sub" / "new.py").write_text("")  # a file added
    write_demo(folder)
    assert all(_stamps(folder)[i] != after[i] for i in DEMO_JOB_IDS)


def test_another_day_regenerates(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    folder = tmp_path / "demo"
    write_demo(folder)
    before = _stamps(folder)
    state = (folder / STATE_FILE).read_text(encoding="utf-8")
    first, rest = state.split("\n", 1)
    version = first.split(" ")[0]
    (folder / STATE_FILE).write_text(f"{version} 2000-01-01\n{rest}", encoding="utf-8")
    write_demo(folder)  # as if the state were written on another day
    assert all(_stamps(folder)[i] != before[i] for i in DEMO_JOB_IDS)


def test_a_missing_or_cut_state_regenerates(tmp_path: Path) -> None:
    folder = tmp_path / "demo"
    write_demo(folder)
    before = _stamps(folder)
    state = (folder / STATE_FILE).read_text(encoding="utf-8")
    (folder / STATE_FILE).write_text(state[: len(state) // 2], encoding="utf-8")
    write_demo(folder)
    middle = _stamps(folder)
    assert all(middle[i] != before[i] for i in DEMO_JOB_IDS)
    (folder / STATE_FILE).unlink()
    write_demo(folder)
    assert all(_stamps(folder)[i] != middle[i] for i in DEMO_JOB_IDS)


def test_without_the_marker_a_folder_of_real_jobs_is_refused_state_or_not(
    tmp_path: Path,
) -> None:
    from fieldkit.commands.common import CommandError
    from fieldkit.jobs.models import Job

    folder = tmp_path / "demo"
    write_demo(folder)
    store = JobStore(locations.jobs_dir(folder))
    mine = Job(name="My own job")
    store.save(mine)
    write_demo(folder)  # the marker is there: only the demo's own jobs are written
    assert store.load(mine.id).name == "My own job"
    (folder / MARKER).unlink()
    with pytest.raises(CommandError, match="not demo data"):
        write_demo(folder)
    assert store.load(mine.id).name == "My own job"
