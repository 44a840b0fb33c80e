"""Logging a straight-through 144-fibre closure in the splice workspace, one splicer's estimate
per splice, against a bare Textual Input that accepts the same keystrokes.

Two figures, each with the bare Input measured in the same run:

- keystrokes beyond the digits typed, per splice (goal: at most 1 -- the Enter): counted from
  the keys actually pressed, and checked against the splices found in the job file;
- time per splice, typed ahead (all keys queued at once, timed until the last splice is saved:
  throughput) and key by key through Pilot (latency as the splicer feels it).

The workspace saves every splice into the job file as it is entered (an atomic, fsynced write),
so its figures include the saving. CPU time is printed beside the wall time. The typing and the
printing are shared with bench_meter_entry.py (entry_bench.py).

    python tests/bench/bench_splice_entry.py [splices_key_by_key] [runs]
"""

from __future__ import annotations

import asyncio
import sys
import tempfile
from pathlib import Path
from typing import Any

from entry_bench import Entry, compare
from textual.widgets import Input

from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.splice_session import ClosureSetup

FIBRES = 144


def estimate_text(index: int) -> str:
    """The estimate typed for the index-th splice: 0.01 to 0.09 dB, four characters."""
    return f"0.0{index % 9 + 1}"


async def prepare(app: Any, pilot: Any) -> None:
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


def check_order(app: Any, texts: list[str]) -> None:
    """Every estimate typed ahead landed on its own fibre, in order."""
    screen = app.screen
    job = app.store.load(screen.job_id)
    [closure] = job.link(screen.link_id).closures
    got = [(s.fibre_a, s.estimate_db) for s in closure.current_splices()]
    want = [(i + 1, float(t)) for i, t in enumerate(texts)]
    if got != want:
        raise SystemExit(f"typed-ahead estimates landed out of order: {got[:5]} ...")


async def saved(app: Any, count: int) -> bool:
    """The splice workspace saves each splice as it is entered: count them in the file."""
    screen = app.screen
    job = app.store.load(screen.job_id)
    return sum(len(c.splices) for c in job.link(screen.link_id).closures) >= count


def splices(tmp: Path) -> Any:
    def entry(run: int) -> Entry:
        return Entry(
            lambda: make_app(
                data_dir=tmp / f"d{run}", config_dir=tmp / f"c{run}", start_mode="splices"
            ),
            prepare,
            saved,
            check_order,
        )

    return entry


async def main() -> None:
    per_run = int(sys.argv[1]) if len(sys.argv) > 1 else 48
    runs = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    texts = [estimate_text(i) for i in range(FIBRES)]
    digits = sum(len(t) for t in texts)
    print(f"{FIBRES} splices straight through, one estimate each, {digits} characters typed")
    with tempfile.TemporaryDirectory() as name:
        beyond = await compare(
            "splice workspace (incl. saving)", "splice", splices(Path(name)), texts, per_run, runs
        )
    print(
        f"  keystrokes beyond the digits: {max(beyond):.2f} per splice (goal <= 1): Enter "
        "only; the fibre and the tray slot move on by themselves"
    )


if __name__ == "__main__":
    asyncio.run(main())
