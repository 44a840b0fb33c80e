"""The Jobs workspace's first frame needs no job record: the list is read from the index's
summaries without importing pydantic or the models (issue 15, start-up), and a listing the index
cannot answer (a job file changed since) still reads the job file itself."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

from fieldkit.jobs.store import JobStore

# Lists the jobs folder given as argv[1] the way the Jobs workspace does at its first frame,
# after importing that workspace, and says what it found and whether the records were imported.
LIST_CODE = (
    "import json, sys\n"
    "from pathlib import Path\n"
    "import fieldkit.tui.screens.jobs\n"
    "from fieldkit.jobs.store import JobStore\n"
    "from fieldkit.tui.jobs_rows import head, prompt\n"
    "rows = JobStore(Path(sys.argv[1])).list()\n"
    "print(json.dumps({'names': [s.name for s in rows], 'rows': [prompt(s) for s in rows],\n"
    "    'head': str(head(rows[0])), 'pydantic': 'pydantic' in sys.modules,\n"
    "    'models': 'fieldkit.jobs.models' in sys.modules}))\n"
)


def _list_elsewhere(jobs_dir: Path) -> dict[str, object]:
    result = subprocess.run(
        [sys.executable, "-c", LIST_CODE, str(jobs_dir)],
        capture_output=True,
        text=True,
        timeout=60,
        env={**os.environ, "TZ": "UTC"},
    )
    assert result.returncode == 0, result.stderr
    answer: dict[str, object] = json.loads(result.stdout)
    return answer


def _settled_store(tmp_path: Path) -> JobStore:
    store = JobStore(tmp_path / "jobs")
    store.create("Station Road spur", site="Cabinet 4", crew=["Ana Ruiz"])
    store.create("Mill Lane")
    store.list()  # makes the index folder (that changes the jobs folder's mtime once)
    past = store.jobs_dir.stat().st_mtime - 10
    os.utime(store.jobs_dir, (past, past))  # nothing renamed into the folder for 10 s
    store.list()  # writes the index, settled
    return store


def test_a_settled_index_lists_the_jobs_without_pydantic_or_the_records(tmp_path: Path) -> None:
    store = _settled_store(tmp_path)
    answer = _list_elsewhere(store.jobs_dir)
    assert answer["names"] == ["Mill Lane", "Station Road spur"]  # newest first
    assert answer["pydantic"] is False and answer["models"] is False
    # The rows and the head are the words the full records give (fieldkit.tui.jobs_view).
    from fieldkit.tui import jobs_view

    listed = store.list()
    assert answer["rows"] == [jobs_view.prompt(s) for s in listed]
    job = store.load(listed[0].id)
    assert answer["head"] == str(jobs_view.head(job)) == str(jobs_view.head(listed[0]))


def test_a_job_file_changed_since_the_index_is_read_from_the_file(tmp_path: Path) -> None:
    store = _settled_store(tmp_path)
    job_id = store.list()[-1].id
    store.update(job_id, lambda j: setattr(j, "name", "Renamed by the other copy") or None)
    answer = _list_elsewhere(store.jobs_dir)
    assert answer["names"] == ["Renamed by the other copy", "Mill Lane"]


def test_a_missing_index_is_rebuilt_from_the_job_files(tmp_path: Path) -> None:
    store = _settled_store(tmp_path)
    store.index_path.unlink()
    answer = _list_elsewhere(store.jobs_dir)
    assert answer["names"] == ["Mill Lane", "Station Road spur"]
    assert store.index_path.exists()
