"""``fieldkit demo``: write an invented day of fibre work into a demo folder and open it.

The demo folder is ``<data folder>/demo`` unless ``--data-dir`` names another. The demo only
ever writes its own four jobs (fixed ids) there, so running it again regenerates them and
leaves anything else alone; a folder that already holds jobs but no demo marker is refused, so
the demo never mixes into a user's real jobs.

Beside the marker, a state file keeps what the demo was written from (the day, the version,
the size and modification time of each file of the code and presets it is built with) and the
size and modification time of each demo file as written. When nothing of it changed, the jobs
on disk are already what regenerating would write, so they are left as they are: building and
saving them again was a third of ``fieldkit demo``'s start. A demo job changed in the app, a
removed file, another day or another fieldkit regenerates them all. The state is compared as
text, line for line: no digest to compute (hashlib alone was a hundredth of the start-up) and
none that two different states could share.
"""

from __future__ import annotations

import argparse
import os
from datetime import datetime
from pathlib import Path
from typing import Any

from fieldkit.commands.common import CommandError, StartUi, add_data_dir

MARKER = "fieldkit-demo.txt"
MARKER_TEXT = (
    "This folder holds the invented demo scenario of 'fieldkit demo' (the fictional town of "
    "Wrenfield).\nRunning 'fieldkit demo' again regenerates the demo jobs here when they "
    "were changed.\n"
)


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "demo",
        help="open the app on an invented day of fibre work (demo data)",
        description="Write an invented scenario (fictional town, sites, crews; jobs with "
        "links, budgets, references, results, notes, splices, a located fault; OTDR trace "
        "files) into a demo folder and start the terminal UI on it, in the jobs workspace. "
        "The demo folder is <data folder>/demo, or --data-dir; your own jobs are never "
        "touched.",
    )
    add_data_dir(parser)
    parser.add_argument(
        "--no-ui", action="store_true", help="only write the demo data and print its folder"
    )
    parser.set_defaults(func=run)


def demo_folder(args: argparse.Namespace) -> Path:
    from fieldkit import locations

    explicit = getattr(args, "data_dir", None)
    if explicit:
        return Path(explicit).expanduser()
    return locations.data_dir(None) / "demo"


#: The demo's job ids (as in fieldkit.jobs.demo.DEMO_IDS, which a test keeps equal): known
#: here without importing the records.
DEMO_JOB_IDS = ("de30000000000001", "de30000000000002", "de30000000000003", "de30000000000004")
#: The state file, beside the marker (see the module's note).
STATE_FILE = ".fieldkit-demo-state"
#: Where the demo's OTDR trace files go, under the demo folder, and their names (as
#: fieldkit.traces.demo writes them; a test checks the two agree).
TRACES_FOLDER = Path("traces") / "LIB-TH-01"
DEMO_TRACE_NAMES = tuple(f"F{f:02d}_1550_{d}.sor" for f in (6, 7) for d in ("AB", "BA"))


def _sources() -> list[Path]:
    """What the demo jobs are built from: fieldkit's code and the shipped presets."""
    package = Path(__file__).resolve().parent.parent
    presets = package / "_presets"
    return [package, presets if presets.is_dir() else package.parent / "presets"]


def _file_stats(top: str, out: list[str]) -> None:
    """A line (path under ``top``, size, modification time) for each code or presets file
    under ``top``, in name order, ``__pycache__`` and symbolic links to folders left out."""
    with os.scandir(top) as scan:
        entries = sorted(scan, key=lambda entry: entry.name)
    for entry in entries:
        if entry.is_dir(follow_symlinks=False):
            if entry.name != "__pycache__":
                _file_stats(entry.path, out)
        elif entry.name.endswith((".py", ".toml")):
            info = entry.stat()
            out.append(f"{entry.path} {info.st_size} {info.st_mtime_ns}\n")


def demo_state(folder: Path) -> str | None:
    """What the demo in ``folder`` is as of now: the day, what the demo is built from and the
    demo files in ``folder``; None when one of the files is missing."""
    from fieldkit import __version__, locations

    lines = [f"{__version__} {datetime.now().astimezone().date()}\n"]
    for top in _sources():
        _file_stats(str(top), lines)
    jobs = locations.jobs_dir(folder)
    for job_id in DEMO_JOB_IDS:
        try:
            info = os.stat(jobs / f"{job_id}.json")
        except OSError:
            return None
        lines.append(f"{job_id} {info.st_size} {info.st_mtime_ns}\n")
    for name in DEMO_TRACE_NAMES:
        try:
            info = os.stat(folder / TRACES_FOLDER / name)
        except OSError:
            return None
        lines.append(f"{name} {info.st_size} {info.st_mtime_ns}\n")
    return "".join(lines)


def _unchanged(folder: Path) -> bool:
    """The demo jobs in ``folder`` are as the demo wrote them, on this day, by this code."""
    from fieldkit.fsutil import read_regular

    if not (folder / MARKER).is_file():
        return False
    try:
        # a regular file of at most 1 MiB (the state of a checkout is some 12 KB): a FIFO or
        # a device here must not hang the start
        saved = read_regular(folder / STATE_FILE, 1024 * 1024).decode("utf-8")
    except (OSError, ValueError):
        return False
    return saved == demo_state(folder)


def write_demo(folder: Path) -> list[str]:
    """Write (or regenerate) the demo jobs into ``folder``; returns their ids. Jobs that are
    still as the demo wrote them today are left alone (see the module's note)."""
    if _unchanged(folder):
        return list(DEMO_JOB_IDS)
    from fieldkit import locations
    from fieldkit.fsutil import atomic_write_bytes
    from fieldkit.jobs.demo import DEMO_IDS, build_for
    from fieldkit.jobs.models import now
    from fieldkit.jobs.store import JobStore, StoreError

    store = JobStore(locations.jobs_dir(folder))
    marker = folder / MARKER
    if not marker.exists():
        existing = [s.id for s in store.list() if s.id not in DEMO_IDS]
        if existing:
            raise CommandError(
                f"{folder} already holds {len(existing)} jobs that are not demo "
                "data; give the demo an empty folder with --data-dir"
            )
    folder.mkdir(parents=True, exist_ok=True)
    # No state until every file is written again: a start cut short regenerates next time.
    (folder / STATE_FILE).unlink(missing_ok=True)
    atomic_write_bytes(marker, MARKER_TEXT.encode())
    write_demo_traces(folder)
    ids = []
    for job in build_for(now()):
        if job.id == DEMO_IDS[0]:
            job.add_note(
                "OTDR traces of fibres 6 and 7 taken from both ends at 1550 nm; the files are "
                f"kept with the job's records ({TRACES_FOLDER.as_posix()}).",
                by="Ana Ruiz",
            ).at = job.updated_at
        try:
            store.delete(job.id)
            store.save(job)
        except StoreError as exc:
            raise CommandError(f"the demo could not be written: {exc}") from None
        ids.append(job.id)
    state = demo_state(folder)
    if state is not None:
        atomic_write_bytes(folder / STATE_FILE, state.encode())
    return ids


def write_demo_traces(folder: Path) -> Path:
    """Write the demo's trace files (fieldkit.traces.demo) under ``folder``; returns their
    folder. Files of other names there are left alone."""
    from fieldkit.fsutil import atomic_write_bytes
    from fieldkit.traces.demo import demo_trace_files

    target = folder / TRACES_FOLDER
    target.mkdir(parents=True, exist_ok=True)
    for name, data in demo_trace_files().items():
        atomic_write_bytes(target / name, data)
    return target


def run(args: argparse.Namespace) -> int:
    folder = demo_folder(args)
    try:
        write_demo(folder)
    except OSError as exc:
        raise CommandError(
            f"the demo could not be written to {folder}: {exc.strerror or exc}"
        ) from None
    if args.no_ui:
        print(folder)
        return 0
    args.start_ui = StartUi(data_dir=folder, start_mode="jobs")
    return 0
