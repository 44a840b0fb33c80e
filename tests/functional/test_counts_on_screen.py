"""Counts on screen add up (review A1, C33, C39) and wrap without parting a count or a time
(review B19, B20, B21), at 80x24 and 44x22, driven by keys.

The demo day's counts are the scenario's (tests/unit/test_jobs_today.py, checked by hand):
78 fibres, 70 pass, 2 fail, 1 reference problem (North Reservoir fibre 6 at 1550 nm), 5 in
doubt, 0 no limit. North Reservoir at 1550 nm: 6 tested, 4 pass, 1 fail, 1 reference problem.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from textual.widget import Widget

from fieldkit import locations
from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.models import now
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs_today import EndOfDayScreen

SIZES = [(80, 24), (44, 22)]


def _demo(data: Path) -> JobStore:
    store = JobStore(locations.jobs_dir(data))
    for job in build(local_day_start(now())):
        store.save(job)
    return store


def shown_lines(widget: Widget) -> list[str]:
    """What the widget shows, line by line, as drawn on the terminal (its wraps included)."""
    return [widget.render_line(y).text.rstrip() for y in range(widget.size.height)]


def _numbers(words: str) -> dict[str, int]:
    return {
        name: int(n)
        for n, name in re.findall(
            r"(\d+) (pass|fail|reference problems?|"
            r"in doubt|no limit)",
            words,
        )
    }


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
async def test_end_of_day_counts_add_up_and_stay_whole(tmp_path: Path, size) -> None:
    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+g")
        await pilot.pause()
        day = app.screen
        assert isinstance(day, EndOfDayScreen)
        lines = shown_lines(day.query_one("#eod-totals"))
        flat = " ".join(lines)
        counts = _numbers(flat)
        assert counts == {
            "pass": 70,
            "fail": 2,
            "reference problem": 1,
            "in doubt": 5,
            "no limit": 0,
        }
        assert "78 fibres tested" in flat and sum(counts.values()) == 78
        # No count is parted from its words by a wrap (B21: "5 in / doubt").
        for words in ("70 pass", "1 reference problem", "5 in doubt", "0 no limit"):
            assert any(words in line for line in lines), (words, lines)
        # A failure too long for the line goes on under its own text (B20), not at column 1.
        items = [line for w in day.query(".eod-job") for line in shown_lines(w)]
        failure = next(i for i, line in enumerate(items) if "✗" in line)
        if size == (44, 22):
            assert items[failure + 1].startswith("    ") and items[failure + 1].strip()


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
async def test_jobs_detail_counts_add_up(tmp_path: Path, size) -> None:
    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        for _ in range(6):
            job = getattr(screen, "_job", None)
            if job is not None and job.name.startswith("North Reservoir"):
                break
            await pilot.press("down")
            await pilot.pause()
        assert screen._job.name.startswith("North Reservoir")  # type: ignore[attr-defined]
        lines = shown_lines(screen.query_one("#job-summary"))
        flat = " ".join(line.strip() for line in lines)
        assert "RES-N-FEED 1550 nm: 6 tested" in flat
        counts = _numbers(flat.split("RES-N-FEED 1550 nm:")[1])
        assert counts == {
            "pass": 4,
            "fail": 1,
            "reference problem": 1,
            "in doubt": 0,
            "no limit": 0,
        }
        # B19: "updated 2026-12-02 14:20 UTC" is never split between the date and the time.
        head = shown_lines(screen.query_one("#job-head"))
        stamp = next(line for line in head if "updated" in line or "UTC" in line)
        assert re.search(r"\d{4}-\d\d-\d\d \d\d:\d\d", " ".join(head))
        assert not re.search(r"\d{4}-\d\d-\d\d$", stamp)


async def test_meter_at_44_columns_counts_readings_without_a_limit(tmp_path: Path) -> None:
    # Review A1's case: no limit, Ref -7.0 dBm, readings -7.5, -12 and -6.8 dBm: losses 0.5 and
    # 5.0 dB (no limit to judge them) and -0.2 dB (a reference problem: more light than the
    # reference). All three are counted, the "(no limit)" stays, the units are said (A11).
    from fieldkit.tui.screens.meter import MeterScreen

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="meter")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, MeterScreen)
        keys = [*"-7.0", "enter", *"-7.5", "enter", *"-12", "enter", *"-6.8", "enter"]
        await pilot.press(*keys)
        await screen.saves_settled()
        await pilot.pause()
        summary = screen.query_one("#meter-summary")
        lines = shown_lines(summary)
        flat = " ".join(line.strip() for line in lines)
        assert "1310 nm (no limit): 3/12" in flat, lines
        assert "1 reference problem, 2 no limit" in flat, lines
        assert "worst: fibre 2 5.00 dB" in flat and "0.20 dB" not in flat, lines
        # The caution stays once the reference is set (A3), whole within 44 columns.
        note = shown_lines(screen.query_one("#reference-note"))
        assert note[0].strip() == "⚠ Invisible light: never look into fibres.", note
