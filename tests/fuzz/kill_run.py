"""SIGKILL fieldkit thousands of times while it saves and lists, and count what survives.

Three kinds of victim, chosen at random each round (96 %, 2 %, 2 %):
- a writer appending notes in a loop through the store (a big job, so kills land inside writes),
  forked from this process;
- ``fieldkit jobs note`` (the whole CLI: start-up, lock, save);
- ``fieldkit jobs list --rescan`` over a folder of jobs (the index write).

After every kill: the job files parse, the notes are an unbroken run (old or new version, never
a mix), no save the victim acknowledged is lost, nothing is quarantined; at the end no temp file
is left after one more listing. Prints the counts; exit status 1 on any failure.
"""

from __future__ import annotations

import argparse
import os
import random
import signal
import subprocess
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

from fieldkit.jobs.models import LossResult
from fieldkit.jobs.store import JobStore


def _next_note(job: object) -> None:
    # numbered among the writer's own notes only: the CLI victims add "cli N" notes between
    run = [n for n in job.notes if n.text.startswith("n")]  # type: ignore[attr-defined]
    job.add_note(f"n{len(run)}")  # type: ignore[attr-defined]


def _forked_writer(jobs_dir: Path, job_id: str, delay_s: float) -> list[int]:
    """Fork a writer (fieldkit is already imported, so a kill costs milliseconds, not a new
    interpreter), let it save once and then for ``delay_s``, SIGKILL it; the note counts it
    reported as saved."""
    read_fd, write_fd = os.pipe()
    pid = os.fork()
    if pid == 0:  # the writer
        os.close(read_fd)
        store = JobStore(jobs_dir)
        while True:
            job = store.update(job_id, _next_note)
            own = sum(n.text.startswith("n") for n in job.notes)
            os.write(write_fd, f"{own}\n".encode())
    os.close(write_fd)
    with os.fdopen(read_fd, "rb") as reader:
        first = reader.readline()  # saved once: now kill it at a random moment
        time.sleep(delay_s)
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
        rest = reader.read()
    return [int(x) for x in (first + rest).split()]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--kills", type=int, default=2500)
    parser.add_argument("--seed", type=int, default=2500)
    args = parser.parse_args()
    rng = random.Random(args.seed)
    counts: Counter[str] = Counter()
    failures: list[str] = []
    started = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder:
        data = Path(folder) / "data"
        jobs_dir = data / "jobs"
        store = JobStore(jobs_dir)
        job = store.create("Killed writer")

        def big(j: object) -> None:
            link = j.add_link("K-1")  # type: ignore[attr-defined]
            link.results.extend(
                LossResult(fibre=i % 144 + 1, wavelength_nm=1310.0, loss_db=0.5) for i in range(600)
            )

        store.update(job.id, big)
        others = {store.create(f"Listed {i}").id for i in range(200)}
        env = dict(os.environ, FIELDKIT_DATA_DIR=str(data))
        acknowledged = 0
        cli_notes: list[str] = []
        for kill in range(args.kills):
            kind = rng.choices(["writer", "note", "list"], weights=[96, 2, 2])[0]
            counts[f"kills: {kind}"] += 1
            if kind == "writer":
                printed = _forked_writer(jobs_dir, job.id, rng.random() * 0.15)
                if printed:
                    acknowledged = max(acknowledged, printed[-1])
            else:
                if kind == "note":
                    cmd = [sys.executable, "-m", "fieldkit", "jobs", "note", job.id, f"cli {kill}"]
                else:
                    os.utime(jobs_dir, ns=(0, 0))
                    cmd = [sys.executable, "-m", "fieldkit", "jobs", "list", "--rescan"]
                proc = subprocess.Popen(
                    cmd, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, text=True, env=env
                )
                time.sleep(rng.uniform(0.05, 0.8))
                os.kill(proc.pid, signal.SIGKILL)
                out, _ = proc.communicate(timeout=60)
                if kind == "note" and "noted on" in out:
                    cli_notes.append(f"cli {kill}")
            fresh = JobStore(jobs_dir)
            try:
                loaded = fresh.load(job.id)
            except Exception as exc:  # noqa: BLE001 - counted, not hidden
                counts["torn or unreadable job files"] += 1
                failures.append(f"kill {kill} ({kind}): {exc}")
                break
            texts = [n.text for n in loaded.notes]
            run = [t for t in texts if not t.startswith("cli ")]
            if run != [f"n{i}" for i in range(len(run))]:
                counts["mixed versions (notes not an unbroken run)"] += 1
                failures.append(f"kill {kill} ({kind}): notes are not an unbroken run")
            if len(run) < acknowledged or any(c not in texts for c in cli_notes):
                counts["acknowledged saves lost"] += 1
                failures.append(f"kill {kill} ({kind}): an acknowledged note is missing")
            if fresh.quarantined():
                counts["files quarantined"] += 1
                failures.append(f"kill {kill} ({kind}): quarantined {fresh.quarantined()}")
                break
            if kind == "list" and {s.id for s in fresh.list()} != others | {job.id}:
                counts["listings missing a job"] += 1
                failures.append(f"kill {kill}: the listing after the kill lost a job")
        JobStore(jobs_dir).list(rescan=True)
        JobStore(jobs_dir).update(job.id, lambda j: None)
        left = [p.name for p in jobs_dir.rglob(".*.tmp")]
        counts["temp files left after the next run"] = len(left)
        counts["acknowledged saves (writer)"] = acknowledged
        counts["acknowledged notes (cli)"] = len(cli_notes)
    elapsed = time.perf_counter() - started
    print(f"kill run: {args.kills:,} SIGKILLs in {elapsed:.0f} s (seed {args.seed})")
    for key in sorted(counts):
        print(f"  {key:<36} {counts[key]:>7,}")
    for key in (
        "torn or unreadable job files",
        "acknowledged saves lost",
        "files quarantined",
        "listings missing a job",
    ):
        print(f"  {key:<36} {counts[key]:>7,}")
    for detail in failures[:20]:
        print("---", detail, sep="\n")
    bad = failures or counts["temp files left after the next run"]
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
