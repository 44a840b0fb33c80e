"""Snapshots of the meter workspace at 80x24 and 44x22 (issue 14: "nothing is cut at 80x24 or
44x22"). Look at the SVGs in __snapshots__/ when one changes.

The readings typed: reference -7.00 dBm, limit 1.5 dB; loss = reference − reading, so -7.50 is
0.50 dB (a pass), -9.50 is 2.50 dB (a fail), -6.80 is -0.20 dB (a bad reference).
"""

from __future__ import annotations

from collections.abc import Callable

import pytest

# Imported before the scene freezes the clock, so the meter's own ``now`` is frozen too.
import fieldkit.tui.meter_saver  # noqa: F401
import fieldkit.tui.meter_session  # noqa: F401
import fieldkit.tui.screens.meter  # noqa: F401
from fieldkit.tui.widgets.meter_view import SummaryView

Snap = Callable[..., bool]
SIZES = [(80, 24), (44, 22)]
#: Ref -7.00 (focus opens there), Enter to the reading, three readings; the limit last.
READINGS = [*"-7.00", "enter", *"-7.50", "enter", *"-9.50", "enter", *"-6.80", "enter"]


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_meter_on_start(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """The meter as it opens: focus in Ref, the invisible-light caution with the prompt."""
    assert workspace_snap("meter", size, demo=False)


@pytest.mark.parametrize("size", SIZES, ids=["80x24", "44x22"])
def test_meter_typing_readings(workspace_snap: Snap, size: tuple[int, int]) -> None:
    """Three readings against a 1.5 dB limit: a pass, a fail (✗) and a negative loss (!) whose
    warning stays above the latest message; at 44x22 the set-up folds to one line and the grid
    shows more fibres."""

    def limit(pilot: object) -> None:
        pilot.app.screen.query_one("#limit").value = "1.5"  # type: ignore[attr-defined]

    # The summary follows SummaryView.DELAY_S after the last key (one refresh a burst): wait.
    summary = f"wait:{round(SummaryView.DELAY_S * 1000) + 50}"
    assert workspace_snap(
        "meter", size, press=[*READINGS, "_", summary], run_before=limit, demo=False
    )
