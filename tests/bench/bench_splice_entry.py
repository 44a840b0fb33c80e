"""Logging a straight-through 144-fibre closure in the splice workspace, one splicer's estimate
per splice, against a bare Textual Input that accepts the same keystrokes.

Two figures, each with the bare Input measured in the same run:

- keystrokes beyond the digits typed, per splice (goal: at most 1 -- the Enter): counted from
  the keys actually pressed, and checked against the splices found in the job file;
- time per splice, key by key through Pilot (latency as the splicer feels it) and typed ahead
  (all keys queued at once, timed until the last splice is saved: throughput).

The workspace saves every splice into the job file as it is entered (an atomic, fsynced write),
so its figures include the saving. CPU time is printed beside the wall time.

    python tests/bench/bench_splice_entry.py [splices_key_by_key]
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
from fieldkit.tui.splice_session import ClosureSetup

FIBRES = 144


def estimate_text(index: int) -> str:
    """The estimate typed for the index-th splice: 0.01 to 0.09 dB, four characters."""
    return f"0.0{index % 9 + 1}"


def key_name(char: str) -> str:
    return {".": "full_stop"}.get(char, char)


class BareInput(App[None]):
    """The baseline: one Input that takes a value on Enter and empties itself."""

    def __init__(self) -> None:
        super().__init__()
        self.entered = 0

    def compose(self) -> ComposeResult:
        yield Input(id="value")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        self.entered += 1
        event.input.value = ""


async def prepare(app: Any, pilot: Any) -> Any:
    """A job with a link and a 144-fibre closure of 12 trays of 12, opened in the workspace."""
    store = JobStore(app.data_dir / "jobs")
    job = store.create("Bench closure")
    store.update(job.id, lambda j: j.add_link("Trunk", fibre_count=FIBRES))
    link_id = store.load(job.id).links[0].id
    screen = app.screen
    screen.choose((job.id, link_id))
    await pilot.pause()
    form = ClosureSetup(name="JC-1", count_a=str(FIBRES), count_b=str(FIBRES))
    for key, value in vars(form).items():
        screen.query_one(f"#setup-{key}", Input).value = value
    await pilot.pause()
    await pilot.press("ctrl+s")
    await pilot.pause()
    if screen.session is None:
        raise SystemExit("the bench closure could not be opened")
    return screen


def check_order(app: Any, texts: list[str]) -> None:
    """Every estimate typed ahead landed on its own fibre, in order."""
    screen = app.screen
    job = app.store.load(screen.job_id)
    [closure] = job.link(screen.link_id).closures
    got = [(s.fibre_a, s.estimate_db) for s in closure.current_splices()]
    want = [(i + 1, float(t)) for i, t in enumerate(texts)]
    if got != want:
        raise SystemExit(f"typed-ahead estimates landed out of order: {got[:5]} ...")


def count_saved(app: Any) -> int:
    screen = app.screen
    job = app.store.load(screen.job_id)
    return sum(len(c.splices) for c in job.link(screen.link_id).closures)


async def key_by_key(make: Any, texts: list[str], ours: bool) -> tuple[float, float, int]:
    app = make()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        keys = 0
        if ours:
            await prepare(app, pilot)
        else:
            app.screen.query_one("#value", Input).focus()
            await pilot.pause()
        wall, cpu = time.perf_counter(), time.process_time()
        for text in texts:
            for char in text:
                await pilot.press(key_name(char))
                keys += 1
            await pilot.press("enter")
            keys += 1
        await pilot.pause()
        done = count_saved(app) if ours else app.entered
        if done != len(texts):
            raise SystemExit(f"expected {len(texts)} splices, found {done}")
        elapsed = time.perf_counter() - wall, time.process_time() - cpu
        return elapsed[0] / len(texts), elapsed[1] / len(texts), keys


async def typed_ahead(make: Any, texts: list[str], ours: bool) -> tuple[float, float]:
    app = make()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        if ours:
            await prepare(app, pilot)
        else:
            app.screen.query_one("#value", Input).focus()
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
        while (count_saved(app) if ours else app.entered) < len(texts):
            await pilot.pause(0.005)
        if ours:
            check_order(app, texts)
        return (
            (time.perf_counter() - wall) / len(texts),
            (time.process_time() - cpu) / len(texts),
        )


def factory(tmp: Path, run: int) -> Any:
    def make() -> Any:
        return make_app(data_dir=tmp / f"d{run}", config_dir=tmp / f"c{run}", start_mode="splices")

    return make


async def main() -> None:
    per_run = int(sys.argv[1]) if len(sys.argv) > 1 else 48
    texts = [estimate_text(i) for i in range(FIBRES)]
    digits = sum(len(t) for t in texts)
    print(f"{FIBRES} splices straight through, one estimate each, {digits} characters typed")
    with tempfile.TemporaryDirectory() as name:
        tmp = Path(name)
        o = await typed_ahead(factory(tmp, 0), texts, True)
        b = await typed_ahead(BareInput, texts, False)
        print(f"typed ahead, all {FIBRES} splices (throughput):")
        print(f"  splice workspace (incl. saving) {o[0] * 1000:7.2f} ms/splice wall, "
              f"{o[1] * 1000:7.2f} ms CPU")  # fmt: skip
        print(f"  bare Input                      {b[0] * 1000:7.2f} ms/splice wall, "
              f"{b[1] * 1000:7.2f} ms CPU")  # fmt: skip
        print(f"  ratio                           {o[0] / b[0]:7.3f} wall, {o[1] / b[1]:7.3f} CPU")

        ours, base, ours_cpu, base_cpu, keys = [], [], [], [], []
        for run in range(3):
            chunk = texts[run * per_run : (run + 1) * per_run]
            ow, oc, k = await key_by_key(factory(tmp, run + 1), chunk, True)
            bw, bc, _ = await key_by_key(BareInput, chunk, False)
            ours.append(ow)
            ours_cpu.append(oc)
            base.append(bw)
            base_cpu.append(bc)
            keys.append((k - sum(len(t) for t in chunk)) / len(chunk))
        print(f"  keystrokes beyond the digits: {max(keys):.2f} per splice (goal <= 1): Enter "
              "only; the fibre and the tray slot move on by themselves")  # fmt: skip
        o_w, b_w = statistics.median(ours), statistics.median(base)
        o_c, b_c = statistics.median(ours_cpu), statistics.median(base_cpu)
        print(f"key by key ({per_run} splices x 3 runs, alternated, median):")
        print(f"  splice workspace (incl. saving) {o_w * 1000:7.2f} ms/splice wall, "
              f"{o_c * 1000:7.2f} ms CPU")  # fmt: skip
        print(f"  bare Input                      {b_w * 1000:7.2f} ms/splice wall, "
              f"{b_c * 1000:7.2f} ms CPU")  # fmt: skip
        print(f"  ratio                           {o_w / b_w:7.3f} wall, {o_c / b_c:7.3f} CPU")


if __name__ == "__main__":
    asyncio.run(main())
