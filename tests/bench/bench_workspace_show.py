"""The Budget and Fault workspaces: first show (F-key to painted) and a keystroke to the result,
each against a bare Textual app measured alongside, alternating the two.

- **first show**: the app runs on Convert; the workspace's key is pressed; the time is taken
  when the new workspace's first frame has been rendered (``Screen._compositor_refresh``
  returned for it) and again when everything the key set going is done and drawn ("settled",
  every panel mounted). The bare app switches from a screen with one Static to a screen with
  one Input and one Static on the same kind of key.
- **started in it**: entering ``run_test`` with the workspace as the start mode and the first
  ``pilot.pause()``, against the bare app started the same way.
- **keystroke**: what a technician types into Budget's length field and Fault's distance
  field, then the backspaces, one key at a time, each until the result is updated and drawn;
  the bare app is an Input echoing into a Static.

Keys go in through tests/pilot_settle.py (the suite's waits: until the app has handled the
key and drawn what it changed), not Textual's idle sleeps, so a key costs what it costs.
Wall and CPU time are both printed (CPU: this process only, so a core shared with other work
does not count). fieldkit is imported from this checkout, or from ``--src DIR``.

    python tests/bench/bench_workspace_show.py [--rounds 7] [--src DIR]
"""

from __future__ import annotations

import argparse
import asyncio
import statistics
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

CHECKOUT = Path(__file__).resolve().parents[2]
SIZE = (80, 24)
#: What is typed into each workspace's first field (then as many backspaces).
TYPED = {"budget": "12.5 km", "fault": "2040 m"}
FIELD = {"budget": "#item-value", "fault": "#fault-distance"}


def _keys(text: str) -> list[str]:
    return [c if c != " " else "space" for c in text] + ["backspace"] * len(text)


class Clock:
    """Wall and CPU seconds since :meth:`start`."""

    def __init__(self) -> None:
        self.start()

    def start(self) -> None:
        self.wall, self.cpu = time.perf_counter(), time.process_time()

    def read(self) -> tuple[float, float]:
        return time.perf_counter() - self.wall, time.process_time() - self.cpu


_frames: list[tuple[Any, tuple[float, float]]] = []
_clock = Clock()


def _mark_frames() -> None:
    """Note every rendered frame (screen, time since the clock started)."""
    from textual.screen import Screen

    painted = Screen._compositor_refresh

    def compositor_refresh(self: Screen[Any]) -> None:
        painted(self)
        if self is self.app.screen:
            _frames.append((self, _clock.read()))

    Screen._compositor_refresh = compositor_refresh  # type: ignore[method-assign]


def _bare_app() -> Any:
    from textual.app import App, ComposeResult
    from textual.binding import Binding
    from textual.screen import Screen
    from textual.widgets import Input, Static

    class Start(Screen[None]):
        def compose(self) -> ComposeResult:
            yield Static("start")

    class Workspace(Screen[None]):
        AUTO_FOCUS = "#value"

        def compose(self) -> ComposeResult:
            yield Input(id="value")
            yield Static(id="out")

        def on_input_changed(self, event: Input.Changed) -> None:
            self.query_one("#out", Static).update(event.value)

    class Bare(App[None]):
        MODES = {"start": Start, "workspace": Workspace}  # noqa: RUF012 - Textual's name
        BINDINGS = [Binding("f5", "app.switch_mode('workspace')")]  # noqa: RUF012

        def __init__(self, start: str = "start") -> None:
            super().__init__()
            self._start = start

        def on_mount(self) -> None:
            self.switch_mode(self._start)

    return Bare


def _fieldkit_app(tmp: Path, mode: str) -> Any:
    from fieldkit.tui.app import make_app

    return make_app(data_dir=tmp / "data", config_dir=tmp / "config", start_mode=mode)


async def first_show(make: Any, key: str) -> tuple[tuple[float, float], tuple[float, float]]:
    """(painted, settled): wall and CPU seconds from the key to the new screen's first frame
    and to everything done."""
    app = make()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        before = app.screen
        _frames.clear()
        _clock.start()
        await pilot.press(key)
        await pilot.pause()
        settled = _clock.read()
        painted = next(t for screen, t in _frames if screen is not before)
    return painted, settled


async def started_in(make: Any) -> tuple[float, float]:
    app = make()
    _clock.start()
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        return _clock.read()


async def per_key(make: Any, field: str, text: str, rounds: int = 2) -> tuple[float, float]:
    """Wall and CPU seconds a key, typing ``text`` and its backspaces ``rounds`` times."""
    from textual.widgets import Input

    app = make()
    keys = _keys(text) * rounds
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        app.screen.query_one(field, Input).focus()
        await pilot.pause()
        _clock.start()
        for key in keys:
            await pilot.press(key)
        wall, cpu = _clock.read()
    return wall / len(keys), cpu / len(keys)


def _line(name: str, ours: list[tuple[float, float]], base: list[tuple[float, float]]) -> str:
    o_wall, o_cpu = (statistics.median(t[i] for t in ours) for i in (0, 1))
    b_wall, b_cpu = (statistics.median(t[i] for t in base) for i in (0, 1))
    return (
        f"  {name:34} {o_wall * 1000:8.1f} {b_wall * 1000:8.1f} {o_wall / b_wall:6.2f}"
        f"   {o_cpu * 1000:8.1f} {b_cpu * 1000:8.1f} {o_cpu / b_cpu:6.2f}"
    )


async def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=7)
    parser.add_argument("--src", type=Path, default=CHECKOUT, help="the checkout to time")
    args = parser.parse_args()
    sys.path.insert(0, str(args.src.resolve()))
    sys.path.insert(0, str(CHECKOUT / "tests"))
    import pilot_settle

    import fieldkit
    from fieldkit.tui import keys

    pilot_settle.install()
    _mark_frames()
    bare = _bare_app()
    figures: dict[str, tuple[list[Any], list[Any]]] = {}

    def note(name: str, ours: Any, base: Any) -> None:
        mine, theirs = figures.setdefault(name, ([], []))
        mine.append(ours)
        theirs.append(base)

    with tempfile.TemporaryDirectory() as tmp:
        for round_ in range(args.rounds + 1):  # the first round warms up and is not counted
            for mode in ("budget", "fault"):
                folder = Path(tmp) / f"{mode}-{round_}"
                key = keys.place_key(mode)
                base = await first_show(bare, "f5")
                ours = await first_show(lambda f=folder: _fieldkit_app(f, "convert"), key)
                if round_:
                    note(f"{mode}: first show, painted", ours[0], base[0])
                    note(f"{mode}: first show, settled", ours[1], base[1])
                base_t = await started_in(lambda: bare("workspace"))
                ours_t = await started_in(lambda f=folder, m=mode: _fieldkit_app(f, m))
                if round_:
                    note(f"{mode}: started in it", ours_t, base_t)
                base_k = await per_key(lambda: bare("workspace"), "#value", TYPED[mode])
                ours_k = await per_key(
                    lambda f=folder, m=mode: _fieldkit_app(f, m), FIELD[mode], TYPED[mode]
                )
                if round_:
                    note(f"{mode}: a key in {FIELD[mode]}", ours_k, base_k)

    print(f"fieldkit from {Path(fieldkit.__file__).parent.parent}, {SIZE[0]}x{SIZE[1]},")
    print(f"median of {args.rounds} rounds, alternating with the bare app (ms)")
    print(f"  {'':34} {'wall':>8} {'bare':>8} {'ratio':>6}   {'CPU':>8} {'bare':>8} {'ratio':>6}")
    for name, (ours_list, base_list) in figures.items():
        print(_line(name, ours_list, base_list))


if __name__ == "__main__":
    asyncio.run(main())
