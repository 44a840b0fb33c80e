"""Snapshots of the Convert and Jobs workspaces and of Help, at 80x24 and 44x22 (issue 14:
"nothing is cut at 80x24 or 44x22"). Look at the SVGs in __snapshots__/ when one changes."""

from __future__ import annotations

from collections.abc import Callable

import pytest

Snap = Callable[..., bool]
SIZES = [(80, 24), (44, 22)]


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_convert_on_start(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """Convert as a plain start shows it: focus in Value, every panel's prompt."""
    assert workspace_snap("convert", size, demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_convert_a_level(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """A level typed: its power in every unit, figures as the CLI prints them."""
    assert workspace_snap("convert", size, press=[*"-7.5 dBm"], demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_jobs_on_demo(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """Jobs as ``fieldkit demo`` opens it: the list of the four demo jobs, the first shown."""
    assert workspace_snap("jobs", size)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_help(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """Help (F1) over Convert: the safety cautions first."""
    assert workspace_snap("convert", size, press=["f1"], demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_jobs_end_of_day(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """End of day (Ctrl+G) on the demo day: totals, the day's jobs, their items."""
    assert workspace_snap("jobs", size, press=["ctrl+g"])


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_job_picker_with_done_jobs(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """The job picker of every workspace, done jobs listed too (Ctrl+Y), open ones first."""

    def open_picker(pilot: object) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        pilot.app.push_screen(JobLinkPicker())  # type: ignore[attr-defined]

    assert workspace_snap("convert", size, press=["ctrl+y"], run_before=open_picker)
