"""Start-up: ``fieldkit`` and ``fieldkit demo`` to their first frame, against a bare Textual app.

Each run is a fresh process under Textual's headless driver. The clock starts just before the
process is spawned and stops when the first workspace has been composed, laid out and painted
once (``call_after_refresh`` from that screen's mount); the process then leaves at once, so
neither shutdown nor a screenshot is counted. Each child reports which widget has the focus at
that frame: the first field of the workspace must already take keys (a loading screen would
show here as another screen or no focus).

- ``fieldkit``: the real entry point (``fieldkit.cli.main`` with no arguments: argument
  parsing, settings, themes, the Convert workspace).
- ``fieldkit demo``: ``fieldkit.cli.main(["demo", ...])`` -- writes the demo jobs, then opens the
  Jobs workspace on them.
- the baseline: a bare Textual app with one Static.

The three alternate, ``rounds`` times each; the figures are medians, and the ratios are the
medians of each round's ratio to the baseline measured beside it. Goal: ratio <= 1.15.

``--also PYTHON`` adds the same two fieldkit runs through another interpreter (for example the
virtualenv of another checkout), alternated in the same rounds, so a change is measured against
the code before it in one sitting:

    python tests/bench/bench_startup.py [--rounds 15] [--also ../before/.venv/bin/python]
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

# Each child prints "<wall clock of the first frame> <CPU seconds so far> <screen> <focused
# widget id> <widgets>" and leaves with os._exit, so shutdown is not counted.
FIELDKIT_CHILD = """
import os, sys, time
argv = sys.argv[1:]
mode = "jobs" if argv[:1] == ["demo"] else "convert"
from fieldkit.tui.workspaces import WORKSPACES
import importlib
workspace = next(w for w in WORKSPACES if w.mode == mode)
screen_class = getattr(importlib.import_module(workspace.module), workspace.screen_class)
mounted = screen_class.__dict__.get("on_mount")

def report(screen):
    focused = screen.app.focused
    print(time.time(), time.process_time(), type(screen.app.screen).__name__,
          getattr(focused, "id", None), len(list(screen.walk_children())), flush=True)
    os._exit(0)

def on_mount(self):
    if mounted is not None:
        mounted(self)
    self.call_after_refresh(report, self)

screen_class.on_mount = on_mount
from fieldkit.cli import main
main(argv)
"""

BARE_CHILD = """
import os, time
from textual.app import App
from textual.widgets import Static

class Bare(App):
    def compose(self):
        yield Static("bare")

    def on_mount(self):
        self.call_after_refresh(
            lambda: (
                print(time.time(), time.process_time(), "Screen", None, 1, flush=True),
                os._exit(0),
            )
        )

Bare().run()
"""


def first_frame(
    python: str, code: str, args: list[str], env: dict[str, str], cwd: Path
) -> tuple[float, float, str]:
    """Seconds from spawning the process to its first frame, the CPU seconds the process used
    by then, and what that frame showed."""
    start = time.time()
    out = subprocess.run(
        [python, "-c", code, *args],
        env=env,
        cwd=cwd,  # not a checkout: "-c" puts the working folder first on sys.path
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    ).stdout
    stamp, cpu, *shown = out.strip().splitlines()[-1].split()
    return float(stamp) - start, float(cpu), " ".join(shown)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=15)
    parser.add_argument(
        "--also", metavar="PYTHON", help="also time fieldkit through this interpreter"
    )
    options = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="fieldkit-bench-") as name:
        tmp = Path(name)
        env = {
            **os.environ,
            # Compiled bytecode, as an installed copy has (pip writes it): with
            # PYTHONDONTWRITEBYTECODE set, every fieldkit module would be compiled from source
            # at each start while Textual's came compiled, a third of fieldkit's start-up.
            # The warm-up round writes it here, outside the checkout.
            "PYTHONPYCACHEPREFIX": str(tmp / "pycache"),
            "TEXTUAL_DRIVER": "textual.drivers.headless_driver:HeadlessDriver",
            "FIELDKIT_DATA_DIR": str(tmp / "data"),
            "FIELDKIT_CONFIG_DIR": str(tmp / "config"),
        }
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        pythons = {"": sys.executable}
        if options.also:
            pythons["other "] = options.also
        runs: dict[str, tuple[str, str, list[str]]] = {"bare Textual app, one Static": ("", "", [])}
        for tag, python in pythons.items():
            runs[f"{tag}fieldkit (Convert)"] = (python, FIELDKIT_CHILD, [])
            runs[f"{tag}fieldkit demo (Jobs)"] = (
                python,
                FIELDKIT_CHILD,
                ["demo", "--data-dir", str(tmp / f"{tag.strip() or 'this'}-demo")],
            )
        times: dict[str, list[float]] = {label: [] for label in runs}
        cpus: dict[str, list[float]] = {label: [] for label in runs}
        shown: dict[str, str] = {}
        for round_ in range(options.rounds + 1):  # the first round warms the file cache
            for label, (python, code, args) in runs.items():
                if not code:
                    seconds, cpu, what = first_frame(sys.executable, BARE_CHILD, [], env, tmp)
                else:
                    seconds, cpu, what = first_frame(python, code, args, env, tmp)
                if round_:
                    times[label].append(seconds)
                    cpus[label].append(cpu)
                shown[label] = what
    bare = "bare Textual app, one Static"
    print(f"start-up to the first frame, median of {options.rounds} alternated runs")
    if options.also:
        print(f"  (other = {options.also})")
    print(
        f"  {'':30} {'wall ms':>8} {'ratio':>6} {'CPU ms':>8} {'ratio':>6}"
        "   first frame: screen, focus, widgets"
    )
    for label in runs:
        wall, cpu = times[label], cpus[label]
        wall_ratio = statistics.median(s / b for s, b in zip(wall, times[bare], strict=True))
        cpu_ratio = statistics.median(s / b for s, b in zip(cpu, cpus[bare], strict=True))
        print(
            f"  {label:30} {statistics.median(wall) * 1000:8.1f} {wall_ratio:6.3f}"
            f" {statistics.median(cpu) * 1000:8.1f} {cpu_ratio:6.3f}   {shown[label]}"
        )
    print(
        "  goal: ratio <= 1.15, with the workspace's first field focused. On a shared machine "
        "the CPU ratio is the steadier one: waiting for a core counts in the wall time only."
    )


if __name__ == "__main__":
    main()
