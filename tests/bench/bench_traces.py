"""Benchmark: a 144-fibre cable traced from both ends (288 records of 32 000 points).

Prints the time to read all the files (parse + checksum) and the time to read and analyse them
(fieldkit trace folder's work, pairing included), per trace and in total, and their ratio. The
goal in issue 12 is 288 traces in at most 10 s. Then the time to keep the folder on a job's link
(``trace folder --save``: a record per fibre, decimated points, one save of the job file) as a
ratio to the analysis, and the job file's size after each round (a round is a retest: the
earlier records stay, superseded). The traces are written once into a temporary
folder from the physical model (not timed). No assertions.

    .venv/bin/python tests/bench/bench_traces.py [--fibres 144] [--points 32000]
"""

from __future__ import annotations

import argparse
import tempfile
import time
from dataclasses import replace
from pathlib import Path

from fieldkit.actions.traces import save_fibres
from fieldkit.jobs.store import JobStore
from fieldkit.traces.files import read_trace
from fieldkit.traces.folder import analyse_folder, folder_fibres, trace_files
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import example_fibre, synth_trace


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--fibres", type=int, default=144)
    ap.add_argument("--points", type=int, default=32_000)
    ap.add_argument("--rounds", type=int, default=2)
    opts = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        base = example_fibre(1, length_m=12_000.0, spacing_m=0.5, points=opts.points)
        for number in range(1, opts.fibres + 1):
            fibre = replace(
                example_fibre(number, length_m=12_000.0, spacing_m=0.5, points=opts.points),
                events=base.events,
            )
            for direction, f in (("AB", fibre), ("BA", fibre.reversed())):
                trace = synth_trace(f, seed=number * 2 + (direction == "BA"))
                (folder / f"F{number:03d}_1550_{direction}.sor").write_bytes(write_sor(trace))
        files = trace_files(folder)
        n = len(files)
        store = JobStore(Path(tmp) / "data" / "jobs")
        job = store.create("bench")
        store.update(job.id, lambda j: j.add_link("L1") and None)
        print(f"{n} traces of {opts.points} points")
        for r in range(opts.rounds):
            t0 = time.perf_counter()
            for path in files:
                read_trace(path)
            t_read = time.perf_counter() - t0
            t0 = time.perf_counter()
            result = analyse_folder(folder)
            t_all = time.perf_counter() - t0
            paired = sum(1 for row in result.rows if row.paired is not None)
            print(
                f"round {r + 1}: read only {t_read:.2f} s ({1000 * t_read / n:.1f} ms/trace); "
                f"read + analyse + pair {t_all:.2f} s ({1000 * t_all / n:.1f} ms/trace); "
                f"ratio {t_all / t_read:.1f}x read; {paired} fibres paired; goal <= 10 s"
            )
            t0 = time.perf_counter()
            saved = save_fibres(store, job.id, "L1", folder_fibres(result), by="bench")
            t_save = time.perf_counter() - t0
            size = store.path_of(job.id).stat().st_size
            print(
                f"  kept on a link: {t_save:.2f} s ({t_save / t_all:.2f}x the analysis), "
                f"{len(saved.records)} records, {saved.superseded} superseded; job file "
                f"{size / 1e6:.1f} MB"
            )


if __name__ == "__main__":
    main()
