"""Snapshots of the Splices (F7) and Traces (F8) workspaces at a laptop's and a phone's size.

The traces are the demo's own files (fieldkit.traces.demo: fibres 6 and 7 of the invented
backbone, both ends at 1550 nm), written into the working folder so the path on screen is the
same in every run.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from textual.pilot import Pilot
from textual.widgets import Input

from fieldkit.traces.demo import demo_trace_files

SIZES = [(80, 24), (44, 22)]
IDS = ["80x24", "44x22"]
BACKBONE = "de30000000000001"


@pytest.mark.parametrize("size", SIZES, ids=IDS)
def test_splices_before_a_link_is_chosen(workspace_snap: Any, size: tuple[int, int]) -> None:
    """The start: what the workspace is for and the first key, the short shard caution."""
    assert workspace_snap("splices", size)


@pytest.mark.parametrize("size", SIZES, ids=IDS)
def test_splices_of_the_backbone_closure(workspace_snap: Any, size: tuple[int, int]) -> None:
    """Closure JC-3 of the demo backbone opened: its splices with both OTDR directions."""

    async def before(pilot: Pilot[Any]) -> None:
        screen: Any = pilot.app.screen
        job = pilot.app.store.load(BACKBONE)  # type: ignore[attr-defined]
        link = job.links[0]
        screen.choose((job.id, link.id))
        await pilot.pause()
        screen.open_closure(link.closures[0].name)
        await pilot.pause()

    assert workspace_snap("splices", size, run_before=before)


@pytest.fixture
def trace_folder(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> str:
    monkeypatch.chdir(tmp_path)
    folder = tmp_path / "LIB-TH-01"
    folder.mkdir()
    for name, data in demo_trace_files().items():
        (folder / name).write_bytes(data)
    return "LIB-TH-01"


@pytest.mark.parametrize("size", SIZES, ids=IDS)
def test_traces_of_a_folder(workspace_snap: Any, trace_folder: str, size: tuple[int, int]) -> None:
    """A folder of four files: one row per fibre, both directions paired, fibre 7 failing."""

    async def before(pilot: Pilot[Any]) -> None:
        field = pilot.app.screen.query(Input).first()
        field.focus()
        field.value = trace_folder
        await pilot.press("enter")
        await pilot.pause(0.3)

    assert workspace_snap("traces", size, run_before=before)


@pytest.mark.parametrize("size", SIZES, ids=IDS)
def test_traces_of_a_failed_fibre(
    workspace_snap: Any, trace_folder: str, size: tuple[int, int]
) -> None:
    """Fibre 7 opened from the folder: the trace drawn with its events numbered, and the
    averaged event table (its JC-3 splice 0.21 dB from A, 0.47 dB from B, 0.34 dB averaged)."""

    async def before(pilot: Pilot[Any]) -> None:
        field = pilot.app.screen.query(Input).first()
        field.focus()
        field.value = trace_folder
        await pilot.press("enter")
        await pilot.pause(0.3)
        await pilot.press("down", "down", "enter")
        await pilot.pause(0.3)

    assert workspace_snap("traces", size, run_before=before)
