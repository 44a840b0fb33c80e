"""Snapshot tests: SVG screenshots of the workspaces at fixed terminal sizes.

The fixture ``workspace_snap`` runs the real app (``make_app``) on a fixed scene, so a
screenshot changes only when the screen does:

- the demo jobs (``fieldkit.jobs.demo``) written with a frozen clock, ``FROZEN_NOW``: every
  ``now()`` of fieldkit (record stamps, the store's ``updated_at``, "today" in the Jobs and
  end-of-day views) answers that moment, and the local zone is UTC;
- a fixed operator (``FIELDKIT_OPERATOR``), fresh config (so the default dark theme, set again
  before the picture), no first-start questions;
- the text cursor never blinks (a focused field always shows it), no tooltips, no animations.

How to add a snapshot of a workspace: see "Snapshot tests" under Interfaces in COORD.md and
the tests in test_shell_snapshots.py. Baselines live in ``tests/snapshots/__snapshots__/``;
after a deliberate change of a screen, rewrite them (serially) with
``python -m pytest -o addopts="" tests/snapshots/THE_FILE.py --snapshot-update`` and look at
every changed SVG before committing it.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Awaitable, Callable, Iterable
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

import pytest
from textual.pilot import Pilot
from textual.widgets import Input

from fieldkit import locations
from fieldkit.jobs import base

#: The moment every snapshot lives in: the demo day is 2026-03-10 (UTC), late afternoon.
FROZEN_NOW = datetime(2026, 3, 10, 17, 30, tzinfo=UTC)

#: The terminal sizes every workspace is shown at (issue 14: a laptop and a phone terminal).
SIZES = [(80, 24), (44, 22)]

_real_now = base.now


def _frozen_now() -> datetime:
    return FROZEN_NOW


def _freeze_clock(monkeypatch: pytest.MonkeyPatch) -> None:
    """Point every fieldkit module's ``now`` at the frozen clock, and the local zone at UTC."""
    # Import what reads the clock first, so their module-level ``now`` names exist to patch.
    import fieldkit.actions.jobs  # noqa: F401
    import fieldkit.jobs.store  # noqa: F401
    import fieldkit.tui.screens.jobs  # noqa: F401
    import fieldkit.tui.screens.jobs_today  # noqa: F401

    for name, module in list(sys.modules.items()):
        if (name == "fieldkit" or name.startswith("fieldkit.")) and getattr(
            module, "now", None
        ) is _real_now:
            monkeypatch.setattr(module, "now", _frozen_now)
    monkeypatch.setenv("TZ", "UTC")
    time.tzset()


@pytest.fixture
def snapshot_scene(
    isolated_dirs: dict[str, Path], monkeypatch: pytest.MonkeyPatch
) -> Iterable[dict[str, Path]]:
    """The fixed scene: frozen clock, UTC, a named operator, an Input cursor that never
    blinks. Yields the data and config folders (empty; ``write_demo_jobs`` fills one)."""
    _freeze_clock(monkeypatch)
    monkeypatch.setenv("FIELDKIT_OPERATOR", "A. Tester")
    # The cursor of a focused field stays on: a 0.5 s blink would make pictures flicker.
    monkeypatch.setattr(Input, "_toggle_cursor", lambda self: None)
    yield isolated_dirs
    monkeypatch.undo()
    time.tzset()


def write_demo_jobs(data_dir: Path) -> None:
    """The four demo jobs, as ``fieldkit demo`` writes them, on the frozen day."""
    from fieldkit.jobs.demo import build, local_day_start
    from fieldkit.jobs.store import JobStore

    store = JobStore(locations.jobs_dir(data_dir))
    for job in build(local_day_start(FROZEN_NOW)):
        store.save(job)


Snap = Callable[..., bool]


@pytest.fixture
def workspace_snap(snap_compare: Callable[..., bool], snapshot_scene: dict[str, Path]) -> Snap:
    """``workspace_snap(mode, size, press=(), run_before=None, demo=True)`` -> bool.

    Starts the app on workspace ``mode`` (a ``fieldkit.tui.workspaces`` mode: "convert",
    "jobs", "meter", ...) at ``size`` (columns, rows), on the demo jobs unless ``demo=False``,
    presses ``press`` (Textual key names; "_" is a short pause), runs ``run_before(pilot)``
    (sync or async) first if given, and compares the screen with the stored SVG.
    Use it in a plain (not async) test: ``assert workspace_snap("jobs", (80, 24))``.
    """
    from fieldkit.tui.app import make_app

    def snap(
        mode: str,
        size: tuple[int, int],
        press: Iterable[str] = (),
        run_before: Callable[[Pilot[Any]], Awaitable[None] | None] | None = None,
        demo: bool = True,
    ) -> bool:
        if demo:
            write_demo_jobs(snapshot_scene["data"])
        app = make_app(
            data_dir=snapshot_scene["data"], config_dir=snapshot_scene["config"], start_mode=mode
        )

        async def before(pilot: Pilot[Any]) -> None:
            pilot.app.theme = "textual-dark"
            await pilot.pause()
            if run_before is not None:
                result = run_before(pilot)
                if result is not None:
                    await result
            await pilot.pause()

        return snap_compare(app, press=press, terminal_size=size, run_before=before)

    return snap
