"""The CLI itself killed with SIGKILL while it saves or lists, and eight writers at once.

After every kill: each job file parses, no acknowledged note is lost (the CLI printed "noted"),
the next `jobs list` lists every job, and temp files the killed run left are gone after the
next run that holds the lock. A few kills here, their moments spread evenly over the window
from before the save to after it (so even a few land in every part of it);
tests/fuzz/kill_run.py does thousands at random moments.
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from fieldkit.jobs.store import JobStore

pytestmark = pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL")

KILLS = 6


def _moments(low: float, high: float, kills: int, seed: int) -> list[float]:
    """``kills`` kill delays spread over ``low``..``high``: one at a random point of each of
    ``kills`` equal slices, in a shuffled order (stratified: no part of the window is missed)."""
    rng = random.Random(seed)
    step = (high - low) / kills
    moments = [low + step * (i + rng.random()) for i in range(kills)]
    rng.shuffle(moments)
    return moments


def _cli(data: Path, *args: str) -> subprocess.Popen[str]:
    return subprocess.Popen(
        [sys.executable, "-m", "fieldkit", *args],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=dict(os.environ, FIELDKIT_DATA_DIR=str(data)),
    )


def _temp_files(jobs_dir: Path) -> list[Path]:
    return [p for p in jobs_dir.rglob(".*.tmp")]


def test_kills_of_jobs_note_lose_no_acknowledged_note(tmp_path: Path) -> None:
    data = tmp_path / "data"
    store = JobStore(data / "jobs")
    job = store.create("Killed notes")
    acknowledged: list[str] = []
    # start-up is ~0.3 s: before, during, after the save
    for n, moment in enumerate(_moments(0.05, 0.6, KILLS, seed=16)):
        proc = _cli(data, "jobs", "note", job.id, f"note {n}")
        time.sleep(moment)
        proc.send_signal(signal.SIGKILL)
        out, _ = proc.communicate(timeout=30)
        if "noted on" in out:
            acknowledged.append(f"note {n}")
        texts = [note.text for note in JobStore(data / "jobs").load(job.id).notes]
        assert all(a in texts for a in acknowledged), (acknowledged, texts)
        assert len(texts) == len(set(texts))
    result = subprocess.run(
        [sys.executable, "-m", "fieldkit", "jobs", "list"],
        capture_output=True,
        text=True,
        timeout=60,
        env=dict(os.environ, FIELDKIT_DATA_DIR=str(data)),
    )
    assert result.returncode == 0 and job.id in result.stdout
    assert JobStore(data / "jobs").quarantined() == []


def test_kills_during_jobs_list_leave_a_working_index(tmp_path: Path) -> None:
    data = tmp_path / "data"
    store = JobStore(data / "jobs")
    ids = {store.create(f"Job {i}").id for i in range(300)}  # an index worth writing
    for moment in _moments(0.2, 0.9, KILLS, seed=1616):
        os.utime(data / "jobs", ns=(0, 0))  # force a rescan and an index write each time
        proc = _cli(data, "jobs", "list", "--rescan")
        time.sleep(moment)
        proc.send_signal(signal.SIGKILL)
        proc.communicate(timeout=30)
        listed = {s.id for s in JobStore(data / "jobs").list()}
        assert listed == ids
    assert _temp_files(data / "jobs") == []  # the listing after each kill swept them


def test_eight_concurrent_writers_lose_and_duplicate_nothing(tmp_path: Path) -> None:
    jobs_dir = tmp_path / "jobs"
    store = JobStore(jobs_dir)
    job = store.create("Eight writers")
    writer = (
        "import sys\n"
        "from pathlib import Path\n"
        "from fieldkit.jobs.store import JobStore\n"
        "store = JobStore(Path(sys.argv[1]))\n"
        "for i in range(int(sys.argv[4])):\n"
        "    store.update(sys.argv[2], lambda j, i=i: j.add_note(f'{sys.argv[3]}-{i}') and None)\n"
    )
    count = 12
    procs = [
        subprocess.Popen([sys.executable, "-c", writer, str(jobs_dir), job.id, f"w{w}", str(count)])
        for w in range(8)
    ]
    for proc in procs:
        assert proc.wait(timeout=120) == 0
    texts = [n.text for n in JobStore(jobs_dir).load(job.id).notes]
    expected = {f"w{w}-{i}" for w in range(8) for i in range(count)}
    assert sorted(texts) == sorted(expected)  # every note once: none lost, none doubled
    for w in range(8):  # each writer's notes in its own order
        assert [t for t in texts if t.startswith(f"w{w}-")] == [f"w{w}-{i}" for i in range(count)]
