"""Start-up: ``fieldkit`` and ``fieldkit demo`` to their first frame, against a bare Textual app.

Each run is a fresh process under Textual's headless driver. The clock starts just before the
process is spawned. Two marks are taken, each when the screen's compositor has rendered a
frame (``Screen._compositor_refresh`` returns); the process then leaves at once, so neither
shutdown nor a screenshot is counted:

- **first frame**: the first frame of the workspace. Each child reports which widget has the
  focus then and how many widgets the screen holds: the first field of the workspace must
  already take keys (a loading screen would show here as another screen or no focus).
- **whole workspace**: the first frame in which every widget of the workspace is mounted
  (``WorkspaceScreen.workspace_complete``) and the footer shows its keys.

What the first frame holds:

- ``fieldkit`` (Convert): the workspace bar, the Value panel with its field focused, and the
  footer. The Level and loss, Two levels, and Wavelength and grid panels are mounted right
  after it into the same columns (nothing on screen moves); keys typed meanwhile are held and
  handed on (tests/functional/test_convert_first_frame.py).
- ``fieldkit demo`` (Jobs): see ``JobsScreen``.
- The footer's keys: Textual's footer adds them one frame after the first, for fieldkit as for
  any app; they count in "whole workspace".

The runs:

- ``fieldkit``: the real entry point with no arguments (``fieldkit.cli.main([])``, as the
  ``fieldkit`` script calls it: settings, themes, the Convert workspace), with
  ``$FIELDKIT_DATA_DIR`` on a folder of demo jobs. Nothing is imported before it: the frame
  mark is hooked into ``textual.screen`` as fieldkit first imports it.
- ``fieldkit demo``: ``fieldkit.cli.main(["demo", ...])`` -- checks the demo jobs, then opens
  the Jobs workspace on them.
- the baseline: a bare Textual app with one Static (both marks are its first frame).

Both fieldkit runs are a returning crew member's start: the name was asked before and the data
folder holds jobs, so no first-start dialog covers the workspace. The fieldkit timed is the one
of the checkout this script is in (put first on PYTHONPATH), not whatever an editable install
of the interpreter points at.

The runs alternate, ``rounds`` times each; the figures are medians, and the ratios are the
medians of each round's ratio to the baseline's first frame measured beside it. Goal: the
first frame's ratio <= 1.15.

``--also CHECKOUT`` adds the same two fieldkit runs from another checkout (for example a
worktree of main), alternated in the same rounds, so a change is measured against the code
before it in one sitting:

    git worktree add --detach /tmp/before main
    python tests/bench/bench_startup.py [--rounds 15] [--also /tmp/before]
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

# Each child prints "<wall clock of the first frame> <CPU seconds by then> <wall clock when the
# whole workspace is on screen> <CPU seconds by then> <screen> <focused widget id at the first
# frame> <widgets at the first frame>" and leaves with os._exit, so shutdown is not counted.
# A frame is marked when the screen's compositor has rendered it (Screen._compositor_refresh
# returns); the headless driver writes nothing, for the baseline as for fieldkit.
FIELDKIT_CHILD = """
import importlib.abc, importlib.util, os, sys, time
argv = sys.argv[1:]
mode = "jobs" if "demo" in argv else "convert"
first = []

def whole(screen):
    # Every panel mounted (a workspace may mount some right after its first frame) and the
    # footer's keys drawn (Textual's footer adds them once the bindings have settled).
    from textual.widgets._footer import FooterKey
    return getattr(screen, "workspace_complete", True) and bool(screen.query(FooterKey))

def watch(screen_module):
    painted = screen_module.Screen._compositor_refresh

    def compositor_refresh(self):
        painted(self)
        from fieldkit.tui.workspaces import WORKSPACES  # imported by now
        workspace = next(w for w in WORKSPACES if w.mode == mode)
        if type(self).__name__ != workspace.screen_class or self is not self.app.screen:
            return
        if not first:
            focused = self.app.focused
            first.extend((time.time(), time.process_time(), type(self).__name__,
                          getattr(focused, "id", None), len(list(self.walk_children()))))
        if whole(self):
            wall, cpu, *shown = first
            print(wall, cpu, time.time(), time.process_time(), *shown, flush=True)
            os._exit(0)

    screen_module.Screen._compositor_refresh = compositor_refresh

class WatchScreens(importlib.abc.MetaPathFinder):
    # Hooks the frame mark into textual.screen as it is first imported, so nothing is imported
    # before fieldkit's own entry point runs: the start is the ``fieldkit`` command's.
    def find_spec(self, name, path, target=None):
        if name != "textual.screen":
            return None
        sys.meta_path.remove(self)
        spec = importlib.util.find_spec(name)
        run = spec.loader.exec_module

        def exec_module(module):
            run(module)
            watch(module)

        spec.loader.exec_module = exec_module
        return spec

sys.meta_path.insert(0, WatchScreens())
from fieldkit.cli import main  # what the ``fieldkit`` script runs
main(argv)
"""

BARE_CHILD = """
import os, time
from textual.app import App
from textual.screen import Screen
from textual.widgets import Static

painted = Screen._compositor_refresh

def compositor_refresh(self):
    painted(self)
    wall, cpu = time.time(), time.process_time()
    print(wall, cpu, wall, cpu, "Screen", None, 1, flush=True)
    os._exit(0)

Screen._compositor_refresh = compositor_refresh

class Bare(App):
    def compose(self):
        yield Static("bare")

Bare().run()
"""


def first_frame(
    python: str, code: str, args: list[str], env: dict[str, str], cwd: Path
) -> tuple[float, float, float, float, str]:
    """Seconds from spawning the process to its first frame and the CPU seconds the process
    used by then; the same two when the whole workspace was on screen; what the first frame
    showed."""
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
    stamp, cpu, whole_stamp, whole_cpu, *shown = out.strip().splitlines()[-1].split()
    return (
        float(stamp) - start,
        float(cpu),
        float(whole_stamp) - start,
        float(whole_cpu),
        " ".join(shown),
    )


#: The checkout this script is in: its fieldkit is the one timed (PYTHONPATH), not whatever
#: an editable install of the interpreter points at.
CHECKOUT = Path(__file__).resolve().parents[2]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=15)
    parser.add_argument(
        "--also",
        metavar="CHECKOUT",
        type=Path,
        help="also time the fieldkit of this other checkout (e.g. a worktree of main)",
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
        checkouts = {"": CHECKOUT}
        if options.also:
            checkouts["other "] = options.also.resolve()
        # A returning crew member's start: the name asked before (no "Who is working?") and
        # jobs in the data folder (no welcome offering a first job); both would cover the
        # workspace with a dialog right after its first frame.
        (tmp / "config").mkdir()
        (tmp / "config" / "settings.json").write_text(json.dumps({"operator": "A. Tester"}))
        jobs = tmp / "jobs"
        subprocess.run(
            [sys.executable, "-m", "fieldkit", "demo", "--no-ui", "--data-dir", str(jobs)],
            env={**env, "PYTHONPATH": str(CHECKOUT)},
            cwd=tmp,
            capture_output=True,
            check=True,
        )
        # label -> (checkout or None for the bare app, child code, arguments)
        runs: dict[str, tuple[Path | None, str, list[str]]] = {
            "bare Textual app, one Static": (None, BARE_CHILD, [])
        }
        for tag, checkout in checkouts.items():
            runs[f"{tag}fieldkit (Convert)"] = (checkout, FIELDKIT_CHILD, [])
            runs[f"{tag}fieldkit demo (Jobs)"] = (
                checkout,
                FIELDKIT_CHILD,
                ["demo", "--data-dir", str(tmp / f"{tag.strip() or 'this'}-demo")],
            )
        firsts: dict[str, list[tuple[float, float]]] = {label: [] for label in runs}
        wholes: dict[str, list[tuple[float, float]]] = {label: [] for label in runs}
        shown: dict[str, str] = {}
        for round_ in range(options.rounds + 1):  # the first round warms the file cache
            for label, (checkout, code, args) in runs.items():
                child_env = dict(env, FIELDKIT_DATA_DIR=str(jobs))
                if checkout is not None:
                    child_env["PYTHONPATH"] = os.pathsep.join(
                        p for p in (str(checkout), env.get("PYTHONPATH", "")) if p
                    )
                wall, cpu, whole_wall, whole_cpu, what = first_frame(
                    sys.executable, code, args, child_env, tmp
                )
                if round_:
                    firsts[label].append((wall, cpu))
                    wholes[label].append((whole_wall, whole_cpu))
                shown[label] = what
    bare = "bare Textual app, one Static"
    print(
        f"start-up, median of {options.rounds} alternated runs; "
        "ratios to the bare app's first frame"
    )
    print(
        f"  (fieldkit of {CHECKOUT}" + (f"; other = {options.also}" if options.also else "") + ")"
    )
    print(
        f"  {'':30} {'first frame':>29}   {'whole workspace':>29}"
        f"\n  {'':30} {'wall ms':>8} {'ratio':>6} {'CPU ms':>8} {'ratio':>6}"
        f"   {'wall ms':>8} {'ratio':>6} {'CPU ms':>8} {'ratio':>6}"
        "   first frame: screen, focus, widgets"
    )
    base = firsts[bare]

    def figures(marks: list[tuple[float, float]]) -> str:
        out = []
        for i in (0, 1):
            ratio = statistics.median(m[i] / b[i] for m, b in zip(marks, base, strict=True))
            out.append(f"{statistics.median(m[i] for m in marks) * 1000:8.1f} {ratio:6.3f}")
        return " ".join(out)

    for label in runs:
        print(f"  {label:30} {figures(firsts[label])}   {figures(wholes[label])}   {shown[label]}")
    print(
        "  goal: first frame ratio <= 1.15, with the workspace's first field focused. On a "
        "shared machine the CPU ratio is the steadier one: waiting for a core counts in the "
        "wall time only."
    )


if __name__ == "__main__":
    main()
