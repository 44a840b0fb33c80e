"""What the entry benchmarks share (bench_meter_entry.py, bench_splice_entry.py): the bare Input
they are measured against, the two ways of typing (key by key through Pilot, and typed ahead as
fast as keys can arrive), and the printed lines.

A bench gives an :class:`Entry`: how to make its app, how to get it ready for typing, and when
the last value is done (handled and, for a workspace, saved into the job file).
"""

from __future__ import annotations

import asyncio
import statistics
import time
from collections.abc import Awaitable, Callable
from dataclasses import dataclass
from typing import Any

from textual import events
from textual.app import App, ComposeResult
from textual.widgets import Input

KEY_NAMES = {"-": "minus", ".": "full_stop"}
#: How long a run may take to finish its last value before the bench gives up.
GIVE_UP_S = 300.0


def key_name(char: str) -> str:
    return KEY_NAMES.get(char, char)


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


async def _bare_ready(app: Any, pilot: Any) -> None:
    app.screen.query_one("#value", Input).focus()
    await pilot.pause()


async def _bare_done(app: Any, count: int) -> bool:
    return bool(app.entered >= count)


@dataclass
class Entry:
    """One app under test."""

    make: Callable[[], Any]
    #: Get the app ready for the first value (a job opened, the field focused).
    ready: Callable[[Any, Any], Awaitable[None]] = _bare_ready
    #: Whether ``count`` values are done (awaited: it may wait on the app's save worker).
    done: Callable[[Any, int], Awaitable[bool]] = _bare_done
    #: Checked after typing ahead (e.g. every value landed in order); raises SystemExit.
    check: Callable[[Any, list[str]], None] | None = None


def bare() -> Entry:
    return Entry(BareInput)


def send_keys(app: Any, text: str) -> None:
    """Queue the keys of ``text`` and Enter without waiting (a fast typist typing ahead)."""
    driver = app._driver
    for char in text:
        event = events.Key(key_name(char), char)
        event.set_sender(app)
        driver.send_message(event)
    event = events.Key("enter", None)
    event.set_sender(app)
    driver.send_message(event)


async def _finish(entry: Entry, app: Any, pilot: Any, count: int) -> None:
    deadline = time.monotonic() + GIVE_UP_S
    while not await entry.done(app, count):
        if time.monotonic() > deadline:
            raise SystemExit(f"the app did not finish {count} values in {GIVE_UP_S:g} s")
        await pilot.pause(0.005)


async def typed_ahead(entry: Entry, texts: list[str]) -> tuple[float, float]:
    """Seconds per value (wall, CPU of all threads), every key queued as fast as it can go."""
    app = entry.make()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await entry.ready(app, pilot)
        wall, cpu = time.perf_counter(), time.process_time()
        for index, text in enumerate(texts):
            send_keys(app, text)
            if index % 12 == 11:
                await asyncio.sleep(0)  # let the app run, as keys arriving from a terminal do
        await _finish(entry, app, pilot, len(texts))
        elapsed = (
            (time.perf_counter() - wall) / len(texts),
            (time.process_time() - cpu) / len(texts),
        )
        if entry.check is not None:
            entry.check(app, texts)
        return elapsed


async def key_by_key(entry: Entry, texts: list[str]) -> tuple[float, float, int]:
    """Seconds per value (wall, CPU) with each key pressed through Pilot and handled before the
    next, and the keys pressed."""
    app = entry.make()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await entry.ready(app, pilot)
        keys = 0
        wall, cpu = time.perf_counter(), time.process_time()
        for text in texts:
            for char in text:
                await pilot.press(key_name(char))
                keys += 1
            await pilot.press("enter")
            keys += 1
        await _finish(entry, app, pilot, len(texts))
        return (
            (time.perf_counter() - wall) / len(texts),
            (time.process_time() - cpu) / len(texts),
            keys,
        )


def lines(name: str, unit: str, ours: tuple[float, float], base: tuple[float, float]) -> None:
    """The three printed lines: ours, the bare Input, their ratio (goal <= 1.5)."""
    width = max(len(name), len("bare Input"))
    print(f"  {name:<{width}} {ours[0] * 1000:7.2f} ms/{unit} wall, {ours[1] * 1000:7.2f} ms CPU")
    print(
        f"  {'bare Input':<{width}} {base[0] * 1000:7.2f} ms/{unit} wall, "
        f"{base[1] * 1000:7.2f} ms CPU"
    )
    print(
        f"  {'ratio':<{width}} {ours[0] / base[0]:7.3f} wall, {ours[1] / base[1]:7.3f} CPU"
        "   (goal <= 1.5)"
    )


async def compare(
    name: str,
    unit: str,
    ours: Callable[[int], Entry],
    texts: list[str],
    per_run: int,
    runs: int = 3,
) -> list[float]:
    """Typed ahead ``runs`` times, then key by key ``runs`` times, each alternated with the
    bare Input (medians). ``ours(n)``
    makes the n-th fresh app. Returns the keystrokes beyond the characters, per value, of each
    key-by-key run."""
    median = statistics.median
    ahead_o, ahead_b = [], []
    for run in range(runs):
        ahead_o.append(await typed_ahead(ours(100 + run), texts))
        ahead_b.append(await typed_ahead(bare(), texts))
    print(f"typed ahead, all {len(texts)} ({runs} runs, alternated, median; throughput):")
    lines(
        name,
        unit,
        (median(w for w, _ in ahead_o), median(c for _, c in ahead_o)),
        (median(w for w, _ in ahead_b), median(c for _, c in ahead_b)),
    )
    ow, oc, bw, bc, beyond = [], [], [], [], []
    for run in range(runs):
        chunk = texts[run * per_run : (run + 1) * per_run]
        wall, cpu, keys = await key_by_key(ours(run + 1), chunk)
        ow.append(wall)
        oc.append(cpu)
        beyond.append((keys - sum(len(t) for t in chunk)) / len(chunk))
        wall, cpu, _ = await key_by_key(bare(), chunk)
        bw.append(wall)
        bc.append(cpu)
    print(f"key by key ({per_run} x {runs} runs, alternated, median):")
    lines(name, unit, (median(ow), median(oc)), (median(bw), median(bc)))
    return beyond
