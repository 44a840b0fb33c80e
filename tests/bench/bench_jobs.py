"""Benchmarks of the job store (a plain script, not collected by pytest).

    .venv/bin/python tests/bench/bench_jobs.py [--jobs 10000] [--results 20]

Prints each figure with its ratio to a baseline measured in the same run, because these
machines are noisy:

- listing: 10,000 jobs of 20 results; the first page of the jobs list (a fresh store reading
  the index, sorting, taking the first page; also with every file's stat checked, as when the
  folder was written to in the last two seconds) and one filter keystroke, against a plain
  ``json.load`` of every job file. Goals: first page <= 0.2x, a filter keystroke <= 0.05x.
- saving: one job of 1,000 results through ``JobStore.save`` (revision check under the lock,
  validation of what is written, temp file, fsync, rename, backup, fsync of the folder) against
  a plain ``json.dump`` plus fsync of the same data. Goal: ratio <= 1.5.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import tempfile
import time
from datetime import UTC, datetime, timedelta
from pathlib import Path

from fieldkit.jobs.models import Job, Link, LossResult
from fieldkit.jobs.store import JobStore, filter_summaries

PAGE = 200


def make_job(i: int, results: int, base: datetime) -> Job:
    link = Link(
        label=f"L{i % 97}-{i}",
        end_a=f"Cabinet {i % 41}",
        end_b=f"Chamber {i % 53}",
        fibre_type="OS2",
        length_m=100.0 + i % 900,
        fibre_count=max(1, results // 2),
    )
    for n in range(results):
        link.results.append(
            LossResult(
                fibre=n // 2 + 1,
                wavelength_nm=1310.0 if n % 2 == 0 else 1550.0,
                reading_dbm=-8.0 - n / 100,
                loss_db=1.0 + n / 100,
                reference_id="ref0001",
                limit_db=3.0,
                passed=True,
                by="Bench crew",
                at=base + timedelta(minutes=n),
            )
        )
    return Job(
        id=f"{0xB000000000000 + i:016x}",
        name=f"Job {i} Wrenfield street {i % 331}",
        customer=f"Customer {i % 17}",
        site=f"Site {i % 113}",
        crew=["Ana", "Bo"],
        created_at=base + timedelta(minutes=i),
        updated_at=base + timedelta(minutes=i),
        links=[link],
        revision=1,
    )


def timed(func, repeat: int) -> float:  # noqa: ANN001
    """Median seconds of ``repeat`` calls."""
    samples = []
    for _ in range(repeat):
        start = time.perf_counter()
        func()
        samples.append(time.perf_counter() - start)
    return statistics.median(samples)


def bench_listing(root: Path, n_jobs: int, n_results: int) -> dict[str, float]:
    jobs_dir = root / "jobs"
    jobs_dir.mkdir()
    base = datetime(2026, 3, 1, tzinfo=UTC)
    for i in range(n_jobs):
        (jobs_dir / f"{0xB000000000000 + i:016x}.json").write_bytes(
            make_job(i, n_results, base).model_dump_json(indent=1).encode()
        )

    def plain_load() -> None:
        for path in jobs_dir.glob("*.json"):
            with open(path, "rb") as handle:
                json.load(handle)

    start = time.perf_counter()
    JobStore(jobs_dir).list()  # the first listing ever parses every file and writes the index
    index_build_s = time.perf_counter() - start

    def first_page(rescan: bool = False) -> None:
        summaries = JobStore(jobs_dir).list(rescan=rescan)
        page = summaries[:PAGE]
        assert len(page) == min(PAGE, n_jobs)

    def first_page_checking_files() -> None:
        first_page(rescan=True)

    # A folder written to within the last two seconds gets each file's stat checked against
    # the index; measure that case too, then let the folder settle as it is when the app opens.
    busy_s = timed(first_page_checking_files, 5)
    time.sleep(2.2)
    JobStore(jobs_dir).list()  # records the settled folder in the index

    summaries = JobStore(jobs_dir).list()
    queries = ["w", "wr", "wre", "wren", "wrenf", "street 12", "site 7", "l42", "zzz"]
    state = {"i": 0}

    def keystroke() -> None:
        text = queries[state["i"] % len(queries)]
        state["i"] += 1
        filter_summaries(summaries, text=text)[:PAGE]

    # Pairs measured back to back, so load from other programs hits both sides alike; the
    # figures are medians over the pairs.
    baselines, pages = [], []
    for _ in range(5):
        baselines.append(timed(plain_load, 1))
        pages.append(timed(first_page, 1))
    baseline_s, page_s = statistics.median(baselines), statistics.median(pages)
    page_ratio = statistics.median(p / b for p, b in zip(pages, baselines, strict=True))
    key_s = timed(keystroke, 45)
    return {
        "baseline_plain_load_s": baseline_s,
        "index_build_s": index_build_s,
        "first_page_s": page_s,
        "filter_keystroke_s": key_s,
        "first_page_checking_files_s": busy_s,
        "busy_ratio": busy_s / baseline_s,
        "first_page_ratio": page_ratio,
        "filter_ratio": key_s / baseline_s,
    }


def bench_save(root: Path, n_results: int) -> dict[str, float]:
    store = JobStore(root / "save-jobs")
    job = make_job(1, n_results, datetime(2026, 3, 1, tzinfo=UTC))
    job.revision = 0
    store.save(job)
    data = job.model_dump(mode="json")
    plain = root / "plain.json"

    def plain_save() -> None:
        with open(plain, "w", encoding="utf-8") as handle:
            json.dump(data, handle)
            handle.flush()
            os.fsync(handle.fileno())

    def store_save() -> None:
        store.save(job)

    # Interleave the two so drifting machine load hits both alike.
    plain_samples, store_samples = [], []
    for _ in range(15):
        plain_samples.append(timed(plain_save, 1))
        store_samples.append(timed(store_save, 1))
    plain_s, store_s = statistics.median(plain_samples), statistics.median(store_samples)
    return {
        "plain_dump_fsync_s": plain_s,
        "store_save_s": store_s,
        "save_ratio": store_s / plain_s,
        "file_bytes": float(store.path_of(job.id).stat().st_size),
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--jobs", type=int, default=10_000)
    parser.add_argument("--results", type=int, default=20)
    parser.add_argument("--save-results", type=int, default=1000)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="fieldkit-bench-") as tmp:
        root = Path(tmp)
        listing = bench_listing(root, args.jobs, args.results)
        save = bench_save(root, args.save_results)
    print(f"jobs list, {args.jobs} jobs x {args.results} results")
    print(f"  plain json.load of every file  {listing['baseline_plain_load_s'] * 1000:9.1f} ms")
    print(f"  first listing (builds index)   {listing['index_build_s'] * 1000:9.1f} ms")
    print(
        f"  first page (index)             {listing['first_page_s'] * 1000:9.1f} ms  "
        f"ratio {listing['first_page_ratio']:.3f} (goal <= 0.2)"
    )
    busy_ms = listing["first_page_checking_files_s"] * 1000
    print(
        f"  first page, checking each file {busy_ms:9.1f} ms  "
        f"ratio {listing['busy_ratio']:.3f} (folder written in the last 2 s)"
    )
    print(
        f"  filter keystroke               {listing['filter_keystroke_s'] * 1000:9.2f} ms  "
        f"ratio {listing['filter_ratio']:.4f} (goal <= 0.05)"
    )
    print(f"save one job of {args.save_results} results ({save['file_bytes'] / 1e3:.0f} kB)")
    print(f"  plain json.dump + fsync        {save['plain_dump_fsync_s'] * 1000:9.2f} ms")
    print(
        f"  JobStore.save                  {save['store_save_s'] * 1000:9.2f} ms  "
        f"ratio {save['save_ratio']:.2f} (goal <= 1.5)"
    )


if __name__ == "__main__":
    main()
