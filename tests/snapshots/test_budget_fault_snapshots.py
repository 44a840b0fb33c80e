"""Snapshots of the Budget and Fault workspaces at 80x24 and 44x22 (issue 14: "nothing is cut
at 80x24 or 44x22"). Look at the SVGs in __snapshots__/ when one changes."""

from __future__ import annotations

from collections.abc import Callable

import pytest

Snap = Callable[..., bool]
SIZES = [(80, 24), (44, 22)]


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_budget_on_start(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """Budget as it opens: Save/Open/New first, focus in Length, hints dim and italic, the
    calm prompt for the length said once (no empty result panels yet), "Line rate" and
    "Spectral width" whole, the invisible-light caution one line above the keys."""
    assert workspace_snap("budget", size, demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_budget_with_splices(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """12 km of OS2 and 6 fusion splices added through the kind chooser (Ctrl+A, 2): the
    breakdown wraps under each item's name, "× 0.30 dB" whole."""
    assert workspace_snap("budget", size, press=[*"12 km", "ctrl+a", "2", "6", "_"], demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_budget_kind_chooser(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """The kind chooser (Ctrl+A) over the budget, at Fibre: every kind named in full, no empty
    row above "1 Fibre"."""
    assert workspace_snap("budget", size, press=[*"12 km", "ctrl+a"], demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_fault_on_start(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """Fault as it opens: focus in Distance, the prompt said once (on the summary line), the
    digging caution under it, no route drawn yet, the no-helix assumption under Cable."""
    assert workspace_snap("fault", size, demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_fault_located(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """A distance typed and Ctrl+G: the digging caution folded to one line with "more" under
    the summary (never scrolled away), the result to the digits its ± allows, then the route."""
    assert workspace_snap("fault", size, press=[*"2040 m", "ctrl+g", "_"], demo=False)
