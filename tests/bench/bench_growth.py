"""How cost grows with the work: the jobs list, the meter, export and memory (a plain script).

    .venv/bin/python tests/bench/bench_growth.py [--sizes 1000,10000,100000]
        [--fibres 144,864,6912] [--results 1000,10000] [--only jobs,meter,export,memory]

Each table prints a cost at each size, its growth against the smallest size, and the growth
of the work itself, so "grows no faster than the work" reads off one line: a growth figure at
or below the work's is linear or better. Every size is measured in the same run, alternating
where it can, because these machines are noisy. No assertions.

- jobs: a data folder of 1,000 / 10,000 / 100,000 jobs (settled, with its index). The store:
  the first page from a new store, again from the same store (the Jobs workspace lists on every
  visit), the first filter keystroke (each job's search text is made then) and the next ones as
  a filter is typed and erased. The Jobs workspace: F6 from Convert until the list shows its
  first page, and one key typed into the filter until the list has been redrawn, beside a bare
  Input's keystroke. Goal: first page and keystroke far slower than the work.
- meter: a cable of 144 / 864 / 6,912 fibres. The save of one reading into a job already holding
  a result for every fibre (``JobStore.update``: reload, change, validate, write), and a
  reading's keys and Enter in the Meter workspace until its cell shows. Goal: no faster than
  the work.
- export: one job of 1,000 and 10,000 results in each format, against a plain ``json.dumps`` of
  the same job in the same run. Goal: no faster than the work (10x for 10x).
- memory: the peak resident memory (each a fresh process) of the app with 100,000 jobs in its
  data folder open on the Jobs workspace, and of the Meter workspace on a 6,912-fibre cable
  holding a result per fibre, against a bare Textual app with one Static.
"""

from __future__ import annotations

import argparse
import asyncio
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from bench_jobs import make_job  # the same jobs as the store benchmark (tests/bench/)
from textual.app import App, ComposeResult
from textual.widgets import Input, OptionList

from fieldkit import reports
from fieldkit.jobs.store import JobStore, filter_summaries

PAGE = 200
#: What a technician types into the filter: narrowing letter by letter, then a miss, then back.
FILTER_KEYS = ["w", "r", "e", "n", "space", "1", "backspace", "backspace", "z", "backspace"]


def median_s(func: Callable[[], object], repeat: int) -> float:
    samples = []
    for _ in range(repeat):
        start = time.perf_counter()
        func()
        samples.append(time.perf_counter() - start)
    return statistics.median(samples)


def growth_table(title: str, unit: str, sizes: list[int], rows: dict[str, list[float]]) -> None:
    print(title)
    head = "".join(f"{n:>12,}" for n in sizes)
    print(f"  {'':40}{head}")
    base = sizes[0]
    print(f"  {'work x':40}" + "".join(f"{n / base:>12.0f}" for n in sizes))
    for label, values in rows.items():
        print(f"  {label + ' ' + unit:40}" + "".join(f"{v * 1000:>12.2f}" for v in values))
        print(f"  {'  growth x':40}" + "".join(f"{v / values[0]:>12.1f}" for v in values))


# -- jobs ---------------------------------------------------------------------------------


def make_folder(root: Path, n_jobs: int) -> Path:
    """A data folder of ``n_jobs`` small jobs (one link, two results), listed once so the
    index exists, and settled (nothing renamed into it for longer than the store's window)."""
    data = root / f"jobs-{n_jobs}"
    jobs_dir = data / "jobs"
    jobs_dir.mkdir(parents=True)
    base = datetime(2026, 3, 1, tzinfo=UTC)
    template = make_job(0, 2, base)
    for i in range(n_jobs):
        job = template.model_copy(
            update={
                "id": f"{0xB000000000000 + i:016x}",
                "name": f"Job {i} Wrenfield street {i % 331}",
                "site": f"Site {i % 113}",
                "customer": f"Customer {i % 17}",
                "created_at": base.replace(minute=i % 60, hour=(i // 60) % 24),
                "updated_at": base.replace(minute=i % 60, hour=(i // 60) % 24),
            }
        )
        (jobs_dir / f"{job.id}.json").write_bytes(job.model_dump_json().encode())
    return data


def settle(folders: list[Path]) -> None:
    time.sleep(2.2)  # past the store's settle window (SETTLE_NS): the index is trusted
    for data in folders:
        JobStore(data / "jobs").list()


def store_figures(data: Path) -> dict[str, float]:
    jobs_dir = data / "jobs"

    def first_page() -> None:
        JobStore(jobs_dir).list()[:PAGE]

    one_store = JobStore(jobs_dir)
    one_store.list()

    def page_again() -> None:
        one_store.list()[:PAGE]

    # What the Jobs workspace does as the filter is typed: a finder over one listing where the
    # code has one (it narrows from earlier answers), else filter_summaries on every key.
    try:
        from fieldkit.jobs.search import JobFinder
    except ImportError:
        JobFinder = None  # noqa: N806
    queries = ["w", "wr", "wre", "wren", "wren 1", "wren", "wre", "z", ""]

    def typing() -> list[float]:
        summaries = JobStore(jobs_dir).list()
        find = (
            JobFinder(summaries).find
            if JobFinder is not None
            else lambda text: filter_summaries(summaries, text=text)
        )
        took = []
        for text in queries:
            start = time.perf_counter()
            find(text)[:PAGE]
            took.append(time.perf_counter() - start)
        return took

    runs = [typing() for _ in range(5)]
    first_keys = [run[0] for run in runs]  # each job's search text is made on the first key
    later_keys = [t for run in runs for t in run[1:]]
    return {
        "page": median_s(first_page, 5),
        "again": median_s(page_again, 5),
        "first key": statistics.median(first_keys),
        "key": statistics.median(later_keys),
    }


class BareInput(App[None]):
    """The baseline of a keystroke: one Input and nothing listening to it."""

    def compose(self) -> ComposeResult:
        yield Input(id="bare")


async def bare_keystroke() -> float:
    keys = []
    app = BareInput()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        for key in FILTER_KEYS:
            start = time.perf_counter()
            await pilot.press(key)
            await pilot.pause()
            keys.append(time.perf_counter() - start)
    return statistics.median(keys)


async def workspace_figures(data: Path) -> dict[str, float]:
    from fieldkit.tui.app import make_app

    opens, keys, bare = [], [], []
    for _ in range(3):
        bare.append(await bare_keystroke())
        app = make_app(data_dir=data, config_dir=data / "config")
        async with app.run_test(size=(80, 24)) as pilot:
            await pilot.pause()
            start = time.perf_counter()
            await pilot.press("f6")
            await pilot.pause()
            listed = app.screen.query_one("#jobs-list", OptionList)
            opens.append(time.perf_counter() - start)
            if not listed.option_count:
                raise SystemExit(f"the Jobs workspace listed nothing in {data}")
            app.screen.query_one("#jobs-filter", Input).focus()
            await pilot.pause()
            for key in FILTER_KEYS:
                start = time.perf_counter()
                await pilot.press(key)
                await pilot.pause()
                keys.append(time.perf_counter() - start)
    return {
        "open": statistics.median(opens),
        "key": statistics.median(keys),
        "bare": statistics.median(bare),
    }


def bench_jobs(root: Path, sizes: list[int]) -> list[Path]:
    folders = []
    for n in sizes:
        start = time.perf_counter()
        folders.append(make_folder(root, n))
        print(f"  ({n:,} job files written in {time.perf_counter() - start:.1f} s)", flush=True)
    first_listing = []
    for data in folders:
        start = time.perf_counter()
        JobStore(data / "jobs").list()
        first_listing.append(time.perf_counter() - start)
    settle(folders)
    store = [store_figures(data) for data in folders]
    workspace = [asyncio.run(workspace_figures(data)) for data in folders]
    growth_table(
        "jobs list: the store",
        "ms",
        sizes,
        {
            "first listing (builds the index)": first_listing,
            "first page (a new store)": [f["page"] for f in store],
            "first page again (same store)": [f["again"] for f in store],
            "first filter keystroke": [f["first key"] for f in store],
            "next filter keystrokes": [f["key"] for f in store],
        },
    )
    growth_table(
        "jobs list: the Jobs workspace (80x24)",
        "ms",
        sizes,
        {
            "F6 to the first page shown": [f["open"] for f in workspace],
            "filter key to the list redrawn": [f["key"] for f in workspace],
            "bare Input keystroke (baseline)": [f["bare"] for f in workspace],
        },
    )
    print(
        "  filter key / bare Input key:          "
        + "".join(f"{f['key'] / f['bare']:>12.2f}" for f in workspace)
    )
    print("  goal: first page and filter keystroke grow far slower than the work")
    return folders


# -- meter --------------------------------------------------------------------------------


def job_with_results(store: JobStore, fibres: int) -> tuple[str, str]:
    """A job whose link of ``fibres`` fibres holds a 1310 nm result for every fibre."""
    from fieldkit.actions import meter as meter_log
    from fieldkit.calc.reference import Method

    job = store.create(f"Cable of {fibres}")
    made: list[str] = []

    def fill(j: Any) -> None:
        link = j.add_link("Trunk", fibre_count=fibres)
        made.append(link.id)
        reference = meter_log.add_reference(
            link, wavelength_nm=1310.0, level_dbm=-7.2, method=Method.ONE_CORD
        )
        for fibre in range(1, fibres + 1):
            meter_log.put_result(
                link,
                fibre=fibre,
                wavelength_nm=1310.0,
                direction="A->B",
                reading_dbm=-8.0 - fibre % 40 / 20,
                reference=reference,
                limit_db=3.0,
            )

    store.update(job.id, fill)
    return job.id, made[0]


def save_one_reading(store: JobStore, job_id: str, link_id: str, repeat: int = 5) -> float:
    """One reading put into the job (reload, change, validate, write under the lock)."""
    from fieldkit.actions import meter as meter_log

    state = {"n": 0}

    def put(j: Any) -> None:
        link = j.link(link_id)
        state["n"] += 1
        meter_log.put_result(
            link,
            fibre=1 + state["n"] % 12,
            wavelength_nm=1310.0,
            direction="A->B",
            reading_dbm=-9.0 - state["n"] / 100,
            reference=link.references[-1],
            limit_db=3.0,
        )

    return median_s(lambda: store.update(job_id, put), repeat)


async def meter_keystrokes(root: Path, fibres: int, readings: int = 24) -> float:
    """Per reading: its keys pressed one by one and Enter, each processed, in the meter at
    ``fibres`` fibres (the workspace also saves each reading into the job meanwhile)."""
    import bench_meter_entry as entry

    from fieldkit.tui.app import make_app

    entry.FIBRES = fibres  # the bench cable's size, read by entry.new_job / prepare_meter
    app = make_app(data_dir=root / f"meter-{fibres}", config_dir=root / "c", start_mode="meter")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await entry.prepare_meter(app, pilot)
        took = []
        for index in range(readings):
            start = time.perf_counter()
            for char in entry.reading_text(index):
                await pilot.press(entry.key_name(char))
            await pilot.press("enter")
            await pilot.pause()
            took.append(time.perf_counter() - start)
        while not await entry.meter_done(screen, readings):
            await pilot.pause(0.01)
    return statistics.median(took)


def bench_meter(root: Path, sizes: list[int]) -> None:
    store = JobStore(root / "meter-save" / "jobs")
    jobs = [job_with_results(store, n) for n in sizes]
    saves = [save_one_reading(store, *job) for job in jobs]
    keys = [asyncio.run(meter_keystrokes(root, n)) for n in sizes]
    bare = asyncio.run(bare_keystroke())
    growth_table(
        "meter (fibres in the cable)",
        "ms",
        sizes,
        {
            "save of a reading (as many results)": saves,
            "a reading's keys, Enter: its cell": keys,
        },
    )
    print(f"  (a bare Input takes {bare * 1000:.2f} ms a key, Pilot included; a reading is 6 keys)")
    print("  goal: no faster than the work")


# -- export -------------------------------------------------------------------------------


def bench_export(result_counts: list[int]) -> None:
    base = datetime(2026, 3, 1, tzinfo=UTC)
    rows: dict[str, list[float]] = {"plain json.dumps (baseline)": []}
    ratios: dict[str, list[float]] = {}
    for count in result_counts:
        job = make_job(1, count, base)
        data = job.model_dump(mode="json")
        plain = median_s(lambda data=data: json.dumps(data), 5)
        rows["plain json.dumps (baseline)"].append(plain)
        for fmt in reports.EXPORT_FORMATS:
            took = median_s(lambda job=job, fmt=fmt: reports.export(job, fmt), 3)
            rows.setdefault(f"export {fmt}", []).append(took)
            ratios.setdefault(fmt, []).append(took / plain)
    growth_table("export of one job (results per job)", "ms", result_counts, rows)
    print("  ratio to json.dumps at " + ", ".join(f"{n:,}" for n in result_counts) + ":")
    for fmt, values in ratios.items():
        print(f"    {fmt:8}" + "".join(f"{v:>10.1f}" for v in values))
    print("  goal: no faster than the work")


# -- memory -------------------------------------------------------------------------------

# The children read their own high-water mark (VmHWM): ru_maxrss would include this process's,
# which Linux carries across fork and exec.
PEAK = "int(next(l for l in open('/proc/self/status') if l.startswith('VmHWM')).split()[1])"

BARE_CHILD = f"""
import os
from textual.app import App
from textual.widgets import Static

class Bare(App):
    def compose(self):
        yield Static("bare")

    def on_mount(self):
        self.call_after_refresh(self.report)

    def report(self):
        print({PEAK}, flush=True)
        os._exit(0)

Bare().run()
"""

JOBS_CHILD = f"""
import os, sys
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.jobs import JobsScreen

mounted = JobsScreen.__dict__.get("on_mount")

def on_mount(self):
    if mounted is not None:
        mounted(self)
    self.set_timer(0.5, report)  # after the list, the first job's details and a few frames

def report():
    print({PEAK}, flush=True)
    os._exit(0)

JobsScreen.on_mount = on_mount
make_app(data_dir=sys.argv[1], config_dir=sys.argv[2], start_mode="jobs").run()
"""


METER_CHILD = f"""
import os, sys
sys.path.insert(0, sys.argv[3])  # tests/bench, for job_with_results
from pathlib import Path
from bench_growth import job_with_results
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.meter import MeterScreen

data = Path(sys.argv[1])
job = job_with_results(JobStore(data / "jobs"), int(sys.argv[2]))
mounted = MeterScreen.__dict__.get("on_mount")

def on_mount(self):
    if mounted is not None:
        mounted(self)
    self.attach(*job)  # the cable's results in the grid, as after Ctrl+O
    self.set_timer(0.5, report)

def report():
    print({PEAK}, flush=True)
    os._exit(0)

MeterScreen.on_mount = on_mount
make_app(data_dir=data, config_dir=data / "config", start_mode="meter").run()
"""


def peak_rss_kib(code: str, *args: str, cwd: Path) -> int:
    env = {**os.environ, "TEXTUAL_DRIVER": "textual.drivers.headless_driver:HeadlessDriver"}
    out = subprocess.run(
        [sys.executable, "-c", code, *args],
        env=env,
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=300,
        check=True,
    ).stdout
    return int(out.strip().splitlines()[-1])


def bench_memory(root: Path, big_folder: Path, fibres: int, rounds: int = 3) -> None:
    bare, jobs, meter = [], [], []
    here = str(Path(__file__).parent)
    for n in range(rounds):
        bare.append(peak_rss_kib(BARE_CHILD, cwd=root))
        jobs.append(
            peak_rss_kib(JOBS_CHILD, str(big_folder), str(root / "memory-config"), cwd=root)
        )
        meter.append(
            peak_rss_kib(METER_CHILD, str(root / f"memory-meter-{n}"), str(fibres), here, cwd=root)
        )
    b, j, m = statistics.median(bare), statistics.median(jobs), statistics.median(meter)
    count = len(list((big_folder / "jobs").glob("*.json")))
    print(f"peak resident memory (VmHWM), median of {rounds} fresh processes")
    print(f"  bare Textual app, one Static         {b / 1024:8.1f} MiB")
    print(
        f"  Jobs workspace, {count:,} jobs        {j / 1024:8.1f} MiB   "
        f"ratio {j / b:.2f} (+{(j - b) / 1024:.1f} MiB)"
    )
    print(
        f"  Meter workspace, {fibres:,} fibres       {m / 1024:8.1f} MiB   "
        f"ratio {m / b:.2f} (+{(m - b) / 1024:.1f} MiB)"
    )


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--sizes", default="1000,10000,100000")
    parser.add_argument("--results", default="1000,10000", help="results per exported job")
    parser.add_argument("--fibres", default="144,864,6912", help="fibres of the meter's cable")
    parser.add_argument("--only", default="jobs,meter,export,memory")
    options = parser.parse_args()
    sizes = [int(s) for s in options.sizes.split(",")]
    only = set(options.only.split(","))
    with tempfile.TemporaryDirectory(prefix="fieldkit-growth-") as name:
        root = Path(name)
        folders: list[Path] = []
        if "jobs" in only or "memory" in only:
            folders = bench_jobs(root, sizes) if "jobs" in only else []
            if not folders:
                folders = [make_folder(root, sizes[-1])]
                settle(folders)
        if "meter" in only:
            bench_meter(root, [int(n) for n in options.fibres.split(",")])
        if "export" in only:
            bench_export([int(n) for n in options.results.split(",")])
        if "memory" in only:
            bench_memory(root, folders[-1], int(options.fibres.split(",")[-1]))


if __name__ == "__main__":
    main()
