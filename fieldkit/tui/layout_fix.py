"""A correction to Textual's widget refresh: a change of content always re-measures the widget.

Textual (8.2) keeps each widget's measured size in a cache keyed by a count of its layout
requests, and ``refresh(layout=True)`` adds to that count only when no layout request is still
waiting. A widget whose text changes while its previous request waits (a Static filled just
after it is mounted, as the Jobs detail is when a job opens at start) keeps the height it
was measured at before the change: a job's link list showed as one blank line. Here every
layout request counts, so the next layout measures the new content. Nothing else changes.
"""

from __future__ import annotations

from typing import Any

from textual.geometry import Region
from textual.widget import Widget

_refresh = Widget.refresh


def _refresh_counting_every_layout(
    self: Widget,
    *regions: Region,
    repaint: bool = True,
    layout: bool = False,
    recompose: bool = False,
) -> Any:
    if layout and self._layout_required:
        self._layout_updates += 1  # Textual counts only the first of waiting requests
    return _refresh(self, *regions, repaint=repaint, layout=layout, recompose=recompose)


def install() -> None:
    """Apply the correction (idempotent)."""
    if Widget.refresh is not _refresh_counting_every_layout:
        Widget.refresh = _refresh_counting_every_layout  # type: ignore[method-assign]
