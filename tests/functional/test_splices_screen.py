"""The splice workspace at 80x24 and 44x22: set up a closure, log 24 fibres by keys, and find
the closure record in the job's export."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual import events
from textual.widgets import Input, OptionList, Static

from fieldkit import locations
from fieldkit.jobs.store import JobStore
from fieldkit.reports import export
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.splices import SplicesScreen

SIZES = [(80, 24), (44, 22)]


def _send(app: object, *keys: str) -> None:
    """Queue key events without waiting after each (a splicer typing ahead), handled in order
    by whatever has focus when each arrives, as from a terminal."""
    for key in keys:
        name = {"-": "minus", ".": "full_stop", " ": "space"}.get(key, key)
        char = key if len(key) == 1 else None
        app.post_message(events.Key(name, char))  # type: ignore[attr-defined]


def _text(screen: object, selector: str) -> str:
    return str(screen.query_one(selector, Static).render())  # type: ignore[attr-defined]


@pytest.mark.parametrize("size", SIZES)
async def test_log_a_24_fibre_closure_and_find_it_in_the_export(
    tmp_path: Path, size: tuple[int, int]
) -> None:
    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Quay spur")
    store.update(job.id, lambda j: j.add_link("Q-1"))
    link_id = store.load(job.id).links[0].id
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="splices")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, SplicesScreen)
        screen.choose((job.id, link_id))
        await pilot.pause()
        assert screen.focused is screen.query_one("#setup-name", Input)
        await pilot.press(*"JC-9")
        for key in ("count_a", "count_b"):
            screen.query_one(f"#setup-{key}", Input).value = "24"
        screen.query_one("#setup-trays", Input).value = "2"
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert screen.session is not None
        assert screen.focused is screen.query_one("#sp-value", Input)
        assert "Fibre 1 of 24" in _text(screen, "#sp-fibre")
        assert "tube 1 blue" in _text(screen, "#sp-colour")
        await pilot.press(*"0.3 dBm", "enter")  # a level, not a loss: refused beside the field
        await pilot.pause()
        assert "optical power" in _text(screen, "#sp-error")
        assert screen.query_one("#sp-value", Input).value == "0.3 dBm"  # kept
        screen.query_one("#sp-value", Input).value = ""  # (cleared by hand: Ctrl+U in use)
        for fibre in range(1, 25):
            _send(app, "0", ".", "0", str(fibre % 9 + 1), "enter")
        await pilot.pause()
        assert screen.query_one("#sp-list", OptionList).option_count == 24
        assert "Fibre 24 of 24" in _text(screen, "#sp-fibre")
        assert "spliced" in _text(screen, "#sp-fibre")
        await pilot.press("ctrl+y")  # the OTDR fields for a measured fibre
        await pilot.pause()
        screen.session.goto(14)  # type: ignore[union-attr]
        await pilot.press(*"-0.05", "enter", *"0.25", "enter")
        await pilot.pause()
        assert "average 0.10 dB: pass" in _text(screen, "#sp-result")
    saved = store.load(job.id)
    [closure] = saved.links[0].closures
    assert len(closure.current_splices()) == 24 and closure.splices[0].estimate_db == 0.02
    md = export(saved, "md")
    assert "Q-1, closure JC-9" in md  # the splice log, in the appendix
    assert "| C1 14 orange/orange" not in md  # cables default to A and B
    assert "| A 14 orange/orange | B 14 orange/orange | 2/2 |" in md
    assert "glass shards" in md
    assert f"closure,{job.id},Q-1,JC-9" in export(saved, "csv")
