"""The app, typed, for screens and widgets: ``fieldkit_app(self).store`` instead of
``self.app.store  # type: ignore[attr-defined]`` on every line that needs the job store,
the config folder or the operator."""

from __future__ import annotations

from typing import TYPE_CHECKING, cast

from textual.dom import DOMNode

if TYPE_CHECKING:
    from fieldkit.tui.app import FieldkitApp


def fieldkit_app(node: DOMNode) -> FieldkitApp:
    """The running :class:`FieldkitApp` of a mounted screen or widget."""
    return cast("FieldkitApp", node.app)
