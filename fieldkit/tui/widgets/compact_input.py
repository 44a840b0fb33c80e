"""A compact Input made without restyling it before it is mounted.

``Input(compact=True)`` sets its ``compact`` reactive in ``__init__``, which toggles the
``-textual-compact`` class and restyles the widget (and its parts) at once, before it is even
in the DOM; it is styled again when mounted. That first restyle was half a millisecond per
field on the way to the first frame. Here the class is given at construction and the reactive
set without its watcher: the same widget, the same look, ``input.compact`` still True.
"""

from __future__ import annotations

from typing import Any

from textual.widgets import Input


def compact_input(*args: Any, **kwargs: Any) -> Input:
    """An ``Input(..., compact=True)`` (same arguments), made without the early restyle."""
    field = Input(*args, **kwargs)  # not compact: setting the default restyles nothing
    field.add_class("-textual-compact", update=False)
    field.set_reactive(Input.compact, True)
    return field
