"""A writer killed with SIGKILL at moments spread over its saves, a dozen times over
(tests/fuzz/kill_run.py does it thousands of times at random moments).

Afterwards the job file always parses and holds one complete saved version (its notes are an
unbroken run n0, n1, ... — the old or the new content, never a mix), no save that finished is
lost, and the backup is a valid earlier version.
"""

from __future__ import annotations

import json
import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from fieldkit.jobs.models import LossResult
from fieldkit.jobs.store import JobStore

pytestmark = pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL")

WRITER = """
import sys
from pathlib import Path
from fieldkit.jobs.store import JobStore
store = JobStore(Path(sys.argv[1]))
job_id = sys.argv[2]
def add(job):
    job.add_note(f"n{len(job.notes)}")
while True:
    job = store.update(job_id, add)
    print(len(job.notes), flush=True)
"""


def _notes_are_a_run(texts: list[str]) -> bool:
    return texts == [f"n{i}" for i in range(len(texts))]


def test_sigkill_during_saves_leaves_old_or_new(tmp_path: Path) -> None:
    jobs_dir = tmp_path / "jobs"
    store = JobStore(jobs_dir)
    job = store.create("Killed writer")

    def big(j: object) -> None:
        link = j.add_link("K-1")  # type: ignore[attr-defined]
        link.results.extend(
            LossResult(fibre=i % 144 + 1, wavelength_nm=1310.0, loss_db=0.5 + i / 1000)
            for i in range(600)
        )

    store.update(job.id, big)  # ~250 KB per save, so kills land inside writes
    rng = random.Random(20261201)
    confirmed = 0
    rounds = 12
    # one kill in each of twelve equal slices of the 0.2 s after the first save (stratified:
    # early, mid-write and late kills all happen), in a shuffled order
    moments = [0.2 * (i + rng.random()) / rounds for i in range(rounds)]
    rng.shuffle(moments)
    for moment in moments:
        proc = subprocess.Popen(
            [sys.executable, "-c", WRITER, str(jobs_dir), job.id], stdout=subprocess.PIPE, text=True
        )
        assert proc.stdout is not None
        first = proc.stdout.readline()  # started and saved once: now kill at a random moment
        time.sleep(moment)
        os.kill(proc.pid, signal.SIGKILL)
        out, _ = proc.communicate(timeout=30)
        printed = [int(x) for x in (first + out).split()]
        fresh = JobStore(jobs_dir)
        loaded = fresh.load(job.id)  # parses and validates, or this raises
        texts = [n.text for n in loaded.notes]
        assert _notes_are_a_run(texts)
        # Every save the writer reported finished is on disk (it may have finished one more).
        if printed:
            assert len(texts) >= printed[-1]
        assert len(texts) >= confirmed
        confirmed = len(texts)
        backup = json.loads(jobs_dir.joinpath(f"{job.id}.json.bak").read_text())
        # A kill between renaming the backup and the new file leaves both at the old version.
        assert backup["revision"] <= loaded.revision
        assert _notes_are_a_run([n["text"] for n in backup["notes"]])
        assert fresh.quarantined() == []
    assert confirmed > rounds  # the writers did save between the kills
    # Temp files of killed saves are cleared by the next save.
    JobStore(jobs_dir).update(job.id, lambda j: None)
    assert list(jobs_dir.glob(f".{job.id}.json.*.tmp")) == []
