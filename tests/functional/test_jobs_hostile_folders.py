"""The TUI started on each hostile data folder opens and lists what it can (the same hostile
entries as tests/reliability/test_hostile_folders.py)."""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest
from textual.widgets import OptionList, Static

from fieldkit.jobs.models import new_id
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app


def _prepare(jobs_dir: Path, kind: str) -> list[str]:
    store = JobStore(jobs_dir)
    ids = [store.create(name).id for name in ("Station Road", "Mill [bold]Lane")]
    bad = jobs_dir / f"{new_id()}.json"
    if kind == "fifo":
        os.mkfifo(bad)
    elif kind == "dev-zero-link":
        bad.symlink_to("/dev/zero")
    elif kind == "folder":
        bad.mkdir()
    elif kind == "corrupt-index-row":
        store.list()
        index = json.loads(store.index_path.read_text())
        index["entries"][ids[0]][3][7] = 1234
        store.index_path.write_text(json.dumps(index))
    elif kind == "no-quarantine":
        (jobs_dir / "quarantine").write_text("in the way")
        bad.write_text("{not json [red]")
    elif kind == "newer-schema-wrong-id":
        data = json.loads(store.path_of(ids[0]).read_text())
        data.update(schema_version=99, id=ids[1], future=True)
        bad.write_text(json.dumps(data))
    return ids


@pytest.mark.parametrize(
    "kind",
    [
        "fifo",
        "dev-zero-link",
        "folder",
        "corrupt-index-row",
        "no-quarantine",
        "newer-schema-wrong-id",
    ],
)
async def test_the_jobs_workspace_opens_on_a_hostile_folder_and_lists_the_rest(
    isolated_dirs: dict[str, Path], kind: str
) -> None:
    ids = _prepare(isolated_dirs["data"] / "jobs", kind)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="jobs"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert app.is_running
        options = app.screen.query_one("#jobs-list", OptionList)
        listed = {options.get_option_at_index(i).id for i in range(options.option_count)}
        assert listed == set(ids)
        count = str(app.screen.query_one("#jobs-count", Static).render())
        assert count.startswith("2 of 2 jobs"), count


async def test_the_jobs_workspace_opens_when_the_jobs_folder_is_a_file(
    isolated_dirs: dict[str, Path],
) -> None:
    isolated_dirs["data"].mkdir(parents=True)
    (isolated_dirs["data"] / "jobs").write_text("not a folder")
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="jobs"
    )
    async with app.run_test(size=(80, 24), notifications=True) as pilot:
        await pilot.pause()
        assert app.is_running
        assert any("not a folder" in n.message for n in app._notifications)
