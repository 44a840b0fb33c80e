"""Start-up: ``fieldkit`` to its first composed screen, against a bare Textual app with one Static.

Each run is a fresh process under Textual's headless driver. The clock starts just before the
process is spawned and stops when the first screen has been composed, laid out and refreshed
once (``call_after_refresh`` from that screen's mount); the process then leaves at once, so
neither shutdown nor a screenshot is counted. fieldkit starts through its real entry point
(``fieldkit.cli.main`` with no arguments: argument parsing, settings, themes, the first
workspace). The two alternate, ``rounds`` times each. Goal: ratio <= 1.15.

    python tests/bench/bench_startup.py [rounds]
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

# Both children print the wall-clock time of their first frame and leave with os._exit.
FIELDKIT_CHILD = """
import os, sys, time
from fieldkit.tui.workspaces import WORKSPACES
import importlib
first = WORKSPACES[0]
screen_class = getattr(importlib.import_module(first.module), first.screen_class)
mounted = screen_class.on_mount if hasattr(screen_class, "on_mount") else None

def on_mount(self):
    if mounted is not None:
        mounted(self)
    self.call_after_refresh(lambda: (print(time.time(), flush=True), os._exit(0)))

screen_class.on_mount = on_mount
from fieldkit.cli import main
sys.argv = ["fieldkit"]
main()
"""

BARE_CHILD = """
import os, time
from textual.app import App
from textual.widgets import Static

class Bare(App):
    def compose(self):
        yield Static("bare")

    def on_mount(self):
        self.call_after_refresh(lambda: (print(time.time(), flush=True), os._exit(0)))

Bare().run()
"""


def first_frame_s(code: str, env: dict[str, str]) -> float:
    start = time.time()
    out = subprocess.run(
        [sys.executable, "-c", code],
        env=env,
        capture_output=True,
        text=True,
        timeout=60,
        check=True,
    ).stdout
    return float(out.strip().splitlines()[-1]) - start


def main() -> None:
    rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 15
    with tempfile.TemporaryDirectory() as tmp:
        env = {
            **os.environ,
            "TEXTUAL_DRIVER": "textual.drivers.headless_driver:HeadlessDriver",
            "FIELDKIT_DATA_DIR": str(Path(tmp) / "data"),
            "FIELDKIT_CONFIG_DIR": str(Path(tmp) / "config"),
        }
        first_frame_s(FIELDKIT_CHILD, env)  # warm the OS file cache for both
        first_frame_s(BARE_CHILD, env)
        ours, base = [], []
        for _ in range(rounds):
            ours.append(first_frame_s(FIELDKIT_CHILD, env))
            base.append(first_frame_s(BARE_CHILD, env))
    o, b = statistics.median(ours), statistics.median(base)
    print(f"start-up to the first composed screen, median of {rounds} alternated runs:")
    print(f"  fieldkit (convert workspace) {o * 1000:7.1f} ms")
    print(f"  bare Textual, one Static     {b * 1000:7.1f} ms")
    print(f"  ratio                        {o / b:7.3f}   (goal <= 1.15)")


if __name__ == "__main__":
    main()
