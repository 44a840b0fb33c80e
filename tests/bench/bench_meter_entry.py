"""Entering a 144-fibre cable at two wavelengths (288 readings) in the meter workspace, against
a bare Textual Input that accepts the same keystrokes.

Two figures, each with the bare Input measured in the same run:

- keystrokes beyond the digits typed, per reading (goal: at most 1 -- the Enter);
- time per reading (goal: ratio <= 1.5), measured two ways:
  * typed ahead: all 288 readings queued as fast as keys can arrive and timed until the last
    is handled -- and, for the workspace, saved into the job file (throughput);
  * key by key: every key pressed through Pilot and the app given the time it needs to process
    it before the next (latency as a technician feels it); alternated between the two apps.

The workspace saves the readings into the job as they are entered (a background save worker),
so its figures include the saving. CPU time (all threads) is printed beside the wall time. The
typing and the printing are shared with bench_splice_entry.py (entry_bench.py).

    python tests/bench/bench_meter_entry.py [readings_key_by_key] [runs]
"""

from __future__ import annotations

import asyncio
import sys
import tempfile
from pathlib import Path
from typing import Any

from entry_bench import Entry, compare, key_name
from textual.widgets import Input

from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app

FIBRES = 144
WAVELENGTHS_NM = (1310, 1550)
__all__ = ["key_name", "meter_done", "prepare_meter", "reading_text"]


def reading_text(index: int) -> str:
    """The reading typed for the index-th entry: realistic levels, 4 to 5 characters."""
    return f"-{8 + (index * 7 % 40) / 20:.2f}"


def readings() -> list[str]:
    return [reading_text(i) for i in range(FIBRES * len(WAVELENGTHS_NM))]


def new_job(data: Path) -> tuple[str, str]:
    store = JobStore(data / "jobs")
    job = store.create("Bench cable")
    made: list[str] = []

    def add(j: Any) -> None:
        made.clear()
        made.append(j.add_link("Trunk", fibre_count=FIBRES).id)

    store.update(job.id, add)
    return job.id, made[0]


async def prepare_meter(app: Any, pilot: Any) -> Any:
    """A job with a 144-fibre link opened in the meter, a reference for both columns."""
    job_id, link_id = new_job(app.data_dir)
    screen = app.screen
    screen.attach(job_id, link_id)
    await pilot.pause()
    if screen.session.fibres != FIBRES:
        raise SystemExit("the bench job could not be opened")
    screen.query_one("#wavelengths", Input).value = " ".join(str(w) for w in WAVELENGTHS_NM)
    await pilot.pause()
    for level in ("-7.20", "-7.00"):
        screen.query_one("#reference", Input).value = level
        await pilot.pause()
        await pilot.press("ctrl+right")
    await pilot.press("ctrl+left", "ctrl+left")
    screen.query_one("#reading", Input).focus()
    await pilot.pause()
    return screen


async def meter_done(screen: Any, count: int) -> bool:
    """Every reading is in the grid; then the save worker's last batch is awaited."""
    if len(screen.session.cells) < count:
        return False
    await screen.saves_settled()
    return not screen.unsaved


def check_saved(app: Any, texts: list[str]) -> None:
    """The readings are in the job file, one result each."""
    session = app.screen.session
    results = app.store.load(session.job_id).link(session.link_id).results
    if len(results) != len(texts):
        raise SystemExit(f"expected {len(texts)} results in the job, found {len(results)}")


def meter(tmp: Path) -> Any:
    def entry(run: int) -> Entry:
        async def ready(app: Any, pilot: Any) -> None:
            await prepare_meter(app, pilot)

        async def done(app: Any, count: int) -> bool:
            return await meter_done(app.screen, count)

        return Entry(
            lambda: make_app(
                data_dir=tmp / f"d{run}", config_dir=tmp / f"c{run}", start_mode="meter"
            ),
            ready,
            done,
            check_saved,
        )

    return entry


async def main() -> None:
    per_run = int(sys.argv[1]) if len(sys.argv) > 1 else 48
    runs = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    texts = readings()
    print(
        f"{len(texts)} readings ({FIBRES} fibres x {len(WAVELENGTHS_NM)} wavelengths), "
        f"{sum(len(t) for t in texts)} characters typed"
    )
    with tempfile.TemporaryDirectory() as name:
        beyond = await compare(
            "meter workspace (incl. saving)", "reading", meter(Path(name)), texts, per_run, runs
        )
    print(
        f"  keystrokes beyond the digits: {max(beyond):.2f} per reading (goal <= 1): Enter "
        "only; the cursor moves on by itself, and from the last fibre to the next wavelength"
    )


if __name__ == "__main__":
    asyncio.run(main())
