"""Start-up: ``fieldkit`` to its first composed screen, against a bare Textual app with one Static.

Both run headless as separate processes, alternated, with Textual's screenshot hook taking a
picture 1 s after the app is ready and exiting; the fixed 1 s is subtracted. Goal: ratio <= 1.15.

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

BARE_APP = """
from textual.app import App
from textual.widgets import Static

class Bare(App):
    def compose(self):
        yield Static("bare")

Bare().run()
"""

SCREENSHOT_DELAY_S = 1.0


def timed(cmd: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    subprocess.run(
        cmd, env=env, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, timeout=60
    )
    return time.perf_counter() - start - SCREENSHOT_DELAY_S


def main() -> None:
    rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 10
    with tempfile.TemporaryDirectory() as tmp:
        env = {
            **os.environ,
            "TEXTUAL_DRIVER": "textual.drivers.headless_driver:HeadlessDriver",
            "TEXTUAL_SCREENSHOT": "1",
            "TEXTUAL_SCREENSHOT_LOCATION": tmp,
            "FIELDKIT_DATA_DIR": str(Path(tmp) / "data"),
            "FIELDKIT_CONFIG_DIR": str(Path(tmp) / "config"),
        }
        bare = Path(tmp) / "bare_app.py"
        bare.write_text(BARE_APP)
        ours_cmd = [sys.executable, "-m", "fieldkit"]
        bare_cmd = [sys.executable, str(bare)]
        timed(ours_cmd, env)  # warm the pint cache and the OS file cache for both
        timed(bare_cmd, env)
        ours, base = [], []
        for _ in range(rounds):
            ours.append(timed(ours_cmd, env))
            base.append(timed(bare_cmd, env))
    o, b = statistics.median(ours), statistics.median(base)
    print(f"start-up to first screen, median of {rounds}:")
    print(f"  fieldkit        {o * 1000:7.1f} ms")
    print(f"  bare Textual    {b * 1000:7.1f} ms")
    print(f"  ratio           {o / b:7.3f}   (goal <= 1.15)")


if __name__ == "__main__":
    main()
