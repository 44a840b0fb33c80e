"""The splice workspace's top line names the closure whole, or cuts it with "…" (review: "…
· closure JC-3 Market" for "JC-3 Market Street" at 80x24, "LIB-TH-01 · JC-3 Market" at
44x22), and the colour swatch stands one space from its word."""

from __future__ import annotations

from datetime import UTC, datetime
from pathlib import Path

import pytest
from textual.widgets import Static

from fieldkit import locations
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.splices import SplicesScreen

BACKBONE = "de30000000000001"  # the demo backbone job (fieldkit.jobs.demo)


def _line(screen: SplicesScreen, selector: str) -> str:
    return str(screen.query_one(selector, Static).render())


@pytest.mark.parametrize("size", [(80, 24), (44, 22)], ids=["80x24", "44x22"])
async def test_the_closure_name_is_whole(tmp_path: Path, size: tuple[int, int]) -> None:
    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    for job in build(local_day_start(datetime(2026, 3, 10, 17, 30, tzinfo=UTC))):
        store.save(job)
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="splices")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, SplicesScreen)
        job = store.load(BACKBONE)
        link = job.links[0]
        screen.choose((job.id, link.id))
        await pilot.pause()
        name = link.closures[0].name
        assert name == "JC-3 Market Street"  # the demo's first closure
        screen.open_closure(name)
        await pilot.pause()
        where = screen.query_one("#sp-where", Static)
        shown = _line(screen, "#sp-where")
        assert len(shown) <= where.content_size.width  # nothing lost past the edge
        assert name in shown  # at both sizes there is room for the whole name
        # the swatch: two painted cells, then one plain space, then the word
        rendered = screen.query_one("#sp-colour", Static).render()
        plain = rendered.plain
        start = plain.index("tube")
        assert plain[start - 3 : start] == "   "
        painted = [(s.start, s.end) for s in rendered.spans if s.start < start]
        assert painted == [(start - 3, start - 1)]  # two cells; the space before the word plain
