"""Keystroke to updated result in the convert workspace, against a bare Input echoing into a Static.

Both apps run in this process under Textual's test driver; each keystroke is pressed and the
app is given the time it needs to process it (``pilot.pause()``), alternating the two apps. Goal:
ratio <= 1.5.

    python tests/bench/bench_keystroke.py [rounds]
"""

from __future__ import annotations

import asyncio
import statistics
import sys
import tempfile
import time
from pathlib import Path

from textual.app import App, ComposeResult
from textual.widgets import Input, Static

from fieldkit.tui.app import make_app

# What a technician types: a level, a power with µ, an attenuation, a length in feet.
TEXT = "-7.5 dBm"
KEYS = [c if c != " " else "space" for c in TEXT] + ["backspace"] * len(TEXT)


class BareEcho(App[None]):
    def compose(self) -> ComposeResult:
        yield Input(id="value")
        yield Static(id="out")

    def on_input_changed(self, event: Input.Changed) -> None:
        self.query_one("#out", Static).update(event.value)


async def per_key(app: App[None], rounds: int) -> float:
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.screen.query_one("#value", Input).focus()
        await pilot.pause()
        start = time.perf_counter()
        for _ in range(rounds):
            for key in KEYS:
                await pilot.press(key)
                await pilot.pause()
        return (time.perf_counter() - start) / (rounds * len(KEYS))


async def main() -> None:
    rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    ours, base = [], []
    with tempfile.TemporaryDirectory() as tmp:
        for _ in range(3):
            ours.append(
                await per_key(
                    make_app(data_dir=Path(tmp) / "d", config_dir=Path(tmp) / "c"), rounds
                )
            )
            base.append(await per_key(BareEcho(), rounds))
    o, b = statistics.median(ours), statistics.median(base)
    print(f"keystroke to result ({len(KEYS)} keys x {rounds} rounds x 3 runs, median):")
    print(f"  convert workspace {o * 1000:7.2f} ms/key")
    print(f"  bare Input echo   {b * 1000:7.2f} ms/key")
    print(f"  ratio             {o / b:7.3f}   (goal <= 1.5)")


if __name__ == "__main__":
    asyncio.run(main())
