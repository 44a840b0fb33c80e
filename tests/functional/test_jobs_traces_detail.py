"""The Jobs workspace's job detail shows a link's kept OTDR traces at 44 columns: per
wavelength the fibres traced, current and superseded, the worst event and the verdicts, each
line whole (a number never parted from its unit) and the same words ``fieldkit jobs show``
prints."""

from __future__ import annotations

from pathlib import Path

from textual.geometry import Region
from textual.widgets import Static
from traced_sample import traced_job

from fieldkit.jobs.store import JobStore
from fieldkit.jobs.trace_summary import link_traces
from fieldkit.tui.app import make_app


async def test_the_detail_shows_each_links_traces_at_44_columns(
    isolated_dirs: dict[str, Path],
) -> None:
    data = isolated_dirs["data"]
    job_id = traced_job(data)
    app = make_app(data_dir=data, config_dir=isolated_dirs["config"], start_mode="jobs")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        await pilot.press("enter")  # the job list has focus: open its only job
        await pilot.pause()
        links = app.screen.query_one("#job-links", Static)
        rows = [
            strip.text.rstrip()
            for strip in links.render_lines(Region(0, 0, links.size.width, links.size.height))
        ]
    shown = "\n".join(rows)
    feed = shown[shown.index("Link FEED") : shown.index("Link SPARE")]
    # wrapped lines read as the CLI's lines: rejoin each continuation (indented 2 further)
    joined = " ".join(r.strip() for r in feed.splitlines())
    for part in (
        "OTDR 1310 nm: 1 fibre traced 1 current, 0 superseded no event over its limit",
        "OTDR 1550 nm: 2 fibres traced 2 current, 1 superseded",
        "1 trace with an event over its limit events: 1 FAIL, 3 pass",
        "worst loss 0.35 dB, fibre 1 at 2100.0 m",  # averaged both ways (ITU-T G.650.3)
        "worst reflectance -42.00 dB, fibre 2 at 35.0 m",
    ):
        assert part in joined, (part, feed)
    # no unit alone at a line's start (the panel's own wrap would leave one there)
    assert not [r for r in feed.splitlines() if r.strip().split(" ")[0] in ("m", "dB", "nm")]
    assert "no results yet" not in feed  # traces are results of the link
    assert "OTDR" not in shown[shown.index("Link SPARE") :]
    # the same lines as the CLI (one builder: fieldkit.jobs.trace_summary), none cut
    [feed_link, _spare] = JobStore(data / "jobs").load(job_id).links
    for row in link_traces(feed_link):
        for line in row.lines():
            assert line.strip() in joined
