"""``fieldkit demo``: write an invented day of fibre work into a demo folder and open it.

The demo folder is ``<data folder>/demo`` unless ``--data-dir`` names another. The demo only
ever writes its own four jobs (fixed ids) there, so running it again regenerates them and
leaves anything else alone; a folder that already holds jobs but no demo marker is refused, so
the demo never mixes into a user's real jobs.
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from fieldkit.commands.common import CommandError, StartUi, add_data_dir

MARKER = "fieldkit-demo.txt"
MARKER_TEXT = (
    "This folder holds the invented demo scenario of 'fieldkit demo' (the fictional town of "
    "Wrenfield).\nRunning 'fieldkit demo' again regenerates the demo jobs here.\n"
)


def register(subparsers: Any) -> None:
    parser: argparse.ArgumentParser = subparsers.add_parser(
        "demo",
        help="open the app on an invented day of fibre work (demo data)",
        description="Write an invented scenario (fictional town, sites, crews; jobs with "
        "links, budgets, references, results, notes, splices and a located fault) into a demo "
        "folder and start the terminal UI on it, in the jobs workspace. The demo folder is "
        "<data folder>/demo, or --data-dir; your own jobs are never touched.",
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


def write_demo(folder: Path) -> list[str]:
    """Write (or regenerate) the demo jobs into ``folder``; returns their ids."""
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
    atomic_write_bytes(marker, MARKER_TEXT.encode())
    ids = []
    for job in build_for(now()):
        try:
            store.delete(job.id)
            store.save(job)
        except StoreError as exc:
            raise CommandError(f"the demo could not be written: {exc}") from None
        ids.append(job.id)
    return ids


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
