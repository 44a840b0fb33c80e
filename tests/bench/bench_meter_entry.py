"""Entering a 144-fibre cable at two wavelengths (288 readings) in the meter workspace, against
a bare Textual Input that accepts the same keystrokes.

Two figures, each with the bare Input measured in the same run:

- keystrokes beyond the digits typed, per reading (goal: at most 1 -- the Enter);
- time per reading (goal: ratio <= 1.5), measured two ways:
  * key by key: every key pressed through Pilot and the app given the time it needs to process
    it before the next (latency as a technician feels it); alternated between the two apps;
  * typed ahead: all 288 readings queued as fast as keys can arrive and timed until the last
    is handled -- and, for the workspace, saved into the job file (throughput).

The workspace saves each reading into the job as it is entered (a background job-store update),
so its figures include the saving. CPU time (all threads) is printed beside the wall time.

    python tests/bench/bench_meter_entry.py [readings_key_by_key]
"""

from __future__ import annotations

import asyncio
import statistics
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

from textual import events
from textual.app import App, ComposeResult
from textual.widgets import Input

from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app

FIBRES = 144
WAVELENGTHS_NM = (1310, 1550)


def reading_text(index: int) -> str:
    """The reading typed for the index-th entry: realistic levels, 4 to 5 characters."""
    return f"-{8 + (index * 7 % 40) / 20:.2f}"


def readings() -> list[str]:
    return [reading_text(i) for i in range(FIBRES * len(WAVELENGTHS_NM))]


def key_name(char: str) -> str:
    return {"-": "minus", ".": "full_stop"}.get(char, char)


class BareInput(App[None]):
    """The baseline: one Input that takes a reading on Enter and empties itself."""

    def __init__(self) -> None:
        super().__init__()
        self.entered = 0

    def compose(self) -> ComposeResult:
        yield Input(id="reading")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        self.entered += 1
        event.input.value = ""


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
    job_id, link_id = new_job(app.data_dir)
    screen = app.screen
    screen.attach(job_id, link_id)
    await pilot.pause()
    if screen._fibres != FIBRES:
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


def meter_done(screen: Any, count: int) -> bool:
    return len(screen._cells) >= count and not screen.unsaved and not screen.summary_pending


def check_saved(app: Any, count: int) -> None:
    """The readings are in the job file, one result each."""
    screen = app.screen
    job = app.store.load(screen._job_id)
    results = job.link(screen._link_id).results
    if len(results) != count:
        raise SystemExit(f"expected {count} results in the job, found {len(results)}")


async def key_by_key(make: Any, texts: list[str], is_meter: bool) -> tuple[float, float]:
    app = make()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await prepare_meter(app, pilot) if is_meter else None
        if not is_meter:
            app.screen.query_one("#reading", Input).focus()
            await pilot.pause()
        wall, cpu = time.perf_counter(), time.process_time()
        for text in texts:
            for char in text:
                await pilot.press(key_name(char))
            await pilot.press("enter")
        while is_meter and not meter_done(screen, len(texts)):
            await pilot.pause(0.01)
        return ((time.perf_counter() - wall) / len(texts), (time.process_time() - cpu) / len(texts))


async def typed_ahead(make: Any, texts: list[str], is_meter: bool) -> tuple[float, float]:
    app = make()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await prepare_meter(app, pilot) if is_meter else None
        if not is_meter:
            app.screen.query_one("#reading", Input).focus()
            await pilot.pause()
        driver = app._driver
        wall, cpu = time.perf_counter(), time.process_time()
        for index, text in enumerate(texts):
            for char in text:
                event = events.Key(key_name(char), char)
                event.set_sender(app)
                driver.send_message(event)
            event = events.Key("enter", None)
            event.set_sender(app)
            driver.send_message(event)
            if index % 12 == 11:
                await asyncio.sleep(0)  # let the app run, as keys arriving from a terminal do
        while True:
            await pilot.pause(0.005)
            if is_meter and meter_done(screen, len(texts)):
                break
            if not is_meter and app.entered >= len(texts):
                break
        elapsed = (
            (time.perf_counter() - wall) / len(texts),
            (time.process_time() - cpu) / len(texts),
        )
        if is_meter:
            check_saved(app, len(texts))
        return elapsed


def meter_factory(tmp: Path, run: int) -> Any:
    def make() -> Any:
        return make_app(data_dir=tmp / f"d{run}", config_dir=tmp / f"c{run}", start_mode="meter")

    return make


async def main() -> None:
    per_run = int(sys.argv[1]) if len(sys.argv) > 1 else 48
    texts = readings()
    digits = sum(len(t) for t in texts)
    keys_per_reading = [len(t) + 1 for t in texts]  # the characters, then Enter
    beyond = sum(k - len(t) for k, t in zip(keys_per_reading, texts, strict=True)) / len(texts)
    print(
        f"{len(texts)} readings ({FIBRES} fibres x {len(WAVELENGTHS_NM)} wavelengths), "
        f"{digits} characters typed"
    )
    print(
        f"  keystrokes beyond the digits: {beyond:.2f} per reading (goal <= 1): Enter only; "
        "the cursor moves on by itself, and from the last fibre to the next wavelength"
    )

    with tempfile.TemporaryDirectory() as name:
        tmp = Path(name)
        ours_ahead, ours_ahead_cpu = await typed_ahead(meter_factory(tmp, 0), texts, True)
        base_ahead, base_ahead_cpu = await typed_ahead(BareInput, texts, False)
        print("typed ahead, all 288 readings (throughput):")
        print(
            f"  meter workspace (incl. saving) {ours_ahead * 1000:7.2f} ms/reading wall, "
            f"{ours_ahead_cpu * 1000:7.2f} ms CPU"
        )
        print(
            f"  bare Input                     {base_ahead * 1000:7.2f} ms/reading wall, "
            f"{base_ahead_cpu * 1000:7.2f} ms CPU"
        )
        print(
            f"  ratio                          {ours_ahead / base_ahead:7.3f} wall, "
            f"{ours_ahead_cpu / base_ahead_cpu:7.3f} CPU   (goal <= 1.5)"
        )

        ours, base, ours_cpu, base_cpu = [], [], [], []
        for run in range(3):
            chunk = texts[run * per_run : (run + 1) * per_run]
            o = await key_by_key(meter_factory(tmp, run + 1), chunk, True)
            b = await key_by_key(BareInput, chunk, False)
            ours.append(o[0])
            ours_cpu.append(o[1])
            base.append(b[0])
            base_cpu.append(b[1])
        o_w, b_w = statistics.median(ours), statistics.median(base)
        o_c, b_c = statistics.median(ours_cpu), statistics.median(base_cpu)
        print(f"key by key ({per_run} readings x 3 runs, alternated, median):")
        print(
            f"  meter workspace (incl. saving) {o_w * 1000:7.2f} ms/reading wall, "
            f"{o_c * 1000:7.2f} ms CPU"
        )
        print(
            f"  bare Input                     {b_w * 1000:7.2f} ms/reading wall, "
            f"{b_c * 1000:7.2f} ms CPU"
        )
        print(
            f"  ratio                          {o_w / b_w:7.3f} wall, {o_c / b_c:7.3f} CPU"
            "   (goal <= 1.5)"
        )


if __name__ == "__main__":
    asyncio.run(main())
