"""``fieldkit demo`` leaves demo jobs that are still as it wrote them today, and regenerates
them when one was changed or removed (fieldkit.commands.demo: the marker's fingerprint)."""

from __future__ import annotations

import os
from pathlib import Path

from fieldkit import locations
from fieldkit.commands.demo import DEMO_JOB_IDS, MARKER, write_demo
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
    assert "state " in (folder / MARKER).read_text(encoding="utf-8")
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


def test_an_old_marker_without_a_fingerprint_regenerates(tmp_path: Path) -> None:
    folder = tmp_path / "demo"
    write_demo(folder)
    before = _stamps(folder)
    (folder / MARKER).write_text("This folder holds the invented demo scenario.\n")
    write_demo(folder)
    assert all(_stamps(folder)[i] != before[i] for i in DEMO_JOB_IDS)
