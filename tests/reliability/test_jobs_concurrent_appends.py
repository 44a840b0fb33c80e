"""Two programs appending notes to one job at the same moment keep every note."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from fieldkit.jobs.store import JobStore

APPENDER = """
import sys
from pathlib import Path
from fieldkit.jobs.store import JobStore
store = JobStore(Path(sys.argv[1]))
for i in range(int(sys.argv[4])):
    store.update(sys.argv[2], lambda job, i=i: job.add_note(f"{sys.argv[3]}-{i}") and None)
"""


def test_two_processes_appending_keep_every_note(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    job = store.create("Shared job")
    count = 60
    procs = [
        subprocess.Popen(
            [sys.executable, "-c", APPENDER, str(store.jobs_dir), job.id, who, str(count)]
        )
        for who in ("tui", "cli")
    ]
    for proc in procs:
        assert proc.wait(timeout=120) == 0
    saved = store.load(job.id)
    texts = [n.text for n in saved.notes]
    assert sorted(texts) == sorted(f"{who}-{i}" for who in ("tui", "cli") for i in range(count))
    # Each writer's own notes stay in the order it wrote them.
    for who in ("tui", "cli"):
        assert [t for t in texts if t.startswith(who)] == [f"{who}-{i}" for i in range(count)]
    assert saved.revision == 1 + 2 * count
