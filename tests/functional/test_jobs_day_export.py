"""The end-of-day view writes that day's report: every job of the day in one HTML report and
one CSV, through the export dialog and its guarded targets, as ``fieldkit jobs export --day``
does (fieldkit/actions/export.py)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

from textual.widgets import Button, Input

from fieldkit import locations
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore, local_date
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs_today import EndOfDayScreen
from fieldkit.tui.widgets.export_dialog import DayExportDialog


async def test_the_demo_day_goes_into_one_report_and_one_csv(
    isolated_dirs: dict[str, Path], tmp_path: Path
) -> None:
    data = isolated_dirs["data"]
    store = JobStore(locations.jobs_dir(data))
    for job in build(local_day_start(now())):
        store.save(job)
    day = local_date(now())
    jobs = list(store.load_all())
    app = make_app(data_dir=data, config_dir=isolated_dirs["config"], start_mode="jobs")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+g")  # the end-of-day view
        await pilot.pause()
        assert isinstance(app.screen, EndOfDayScreen)
        button = app.screen.query_one("#eod-export", Button)
        assert str(button.label) == "Export the day ^W"  # the key from fieldkit/tui/keys.py
        assert button.region.right <= 44
        await pilot.press("ctrl+w")
        await pilot.pause()
        dialog = app.screen
        assert isinstance(dialog, DayExportDialog)
        path = dialog.query_one("#export-path", Input)
        # proposed beside the user's files, named from the day (actions.export.range_file_name)
        assert Path(path.value) == Path.home() / f"jobs_{day.isoformat()}.html"
        # a target inside the data folder is refused, the dialog stays and says why
        path.value = str(data / "day.html")
        await pilot.click("#export-write")
        await pilot.pause()
        assert app.screen is dialog
        assert "inside the data folder" in str(dialog.query_one("#export-error").render())
        assert not (data / "day.html").exists()
        path.value = str(tmp_path / "day.html")
        path.focus()
        await pilot.press("enter")  # in the file field: write (HTML is highlighted)
        await pilot.pause()
        assert isinstance(app.screen, EndOfDayScreen)
        # then the CSV of the same day
        await pilot.press("ctrl+w")
        await pilot.pause()
        await pilot.press("home")  # CSV: the first format
        await pilot.pause()
        app.screen.query_one("#export-path", Input).value = str(tmp_path / "day.csv")
        await pilot.click("#export-write")
        await pilot.pause()
        assert isinstance(app.screen, EndOfDayScreen)
        # the day after (no job worked on, the demo stamps nothing in the future): nothing to
        # write, said, and no dialog opens
        await pilot.press("ctrl+right")
        await pilot.pause()
        await pilot.press("ctrl+w")
        await pilot.pause()
        assert isinstance(app.screen, EndOfDayScreen)
        told = [n.message for n in app._notifications]
        assert any("nothing to export" in m for m in told), told
    html = (tmp_path / "day.html").read_text(encoding="utf-8")
    assert f"the jobs of {day.isoformat()}" in html
    for job in jobs:  # every job of the demo day, each with its own report
        assert job.name in html
    table = list(csv.reader(io.StringIO((tmp_path / "day.csv").read_text("utf-8-sig"))))
    head = table[0]
    # one row per result, superseded ones too, then the splice logs under their own header
    # ("record", ...: reports/spreadsheet.py), of every job of the day
    ends = [i for i, row in enumerate(table) if row and row[0] == "record"] or [len(table)]
    results = [dict(zip(head, row, strict=True)) for row in table[1 : ends[0]] if row]
    per_job = {job.id: len(job.results()) for job in jobs if job.results()}
    assert {r["job_id"] for r in results} == set(per_job) and len(per_job) > 1
    for job_id, count in per_job.items():
        assert sum(r["job_id"] == job_id for r in results) == count
