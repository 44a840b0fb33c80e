"""The top line of every workspace: the app's name, and each workspace with its key.

It takes the place of a title bar. The current workspace is highlighted; every entry can be
clicked or tapped. On a narrow terminal the other workspaces shrink to their keys, so the line
fits 40 columns. The footer below keeps its room for the current screen's own keys.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.events import Click
from textual.widgets import Static

from fieldkit.tui.workspaces import WORKSPACES


class WorkspaceTab(Static):
    """One workspace: its key and title; a click opens it."""

    def __init__(self, mode: str, key: str, title: str, action: str | None = None) -> None:
        super().__init__(id=f"tab-{mode}", classes="workspace-tab", markup=False)
        self.mode = mode
        self.action = action or f"workspace('{mode}')"
        self.key_label = key.upper()
        self.title = title
        self.tooltip = f"{title} ({self.key_label})"

    def show(self, current: bool, narrow: bool) -> None:
        self.set_class(current, "-current")
        self.update(self.key_label if narrow and not current else f"{self.key_label} {self.title}")

    async def _on_click(self, event: Click) -> None:
        event.stop()
        await self.app.run_action(self.action)


class WorkspaceBar(Horizontal):
    """Name of the app, then a tab per workspace, then Help."""

    DEFAULT_CSS = """
    WorkspaceBar {
        height: 1;
        width: 1fr;
        background: $panel;
    }
    WorkspaceBar > .app-name {
        width: auto;
        padding: 0 1;
        text-style: bold;
        color: $text;
    }
    WorkspaceBar > .workspace-tab {
        width: auto;
        padding: 0 1;
        color: $text-muted;
    }
    WorkspaceBar > .workspace-tab:hover {
        background: $boost;
        color: $text;
    }
    WorkspaceBar > .workspace-tab.-current {
        background: $primary;
        color: $text;
        text-style: bold;
    }
    """

    #: Below this width the other workspaces show only their keys.
    NARROW_BELOW = 72

    def compose(self) -> ComposeResult:
        yield Static("fieldkit", classes="app-name")
        for ws in WORKSPACES:
            yield WorkspaceTab(ws.mode, ws.key, ws.title)
        yield WorkspaceTab("help", "f1", "Help", action="show_help")

    def on_mount(self) -> None:
        self._refresh_tabs()

    def on_resize(self) -> None:
        self._refresh_tabs()

    def _refresh_tabs(self) -> None:
        current = self.app.current_mode
        narrow = self.app.size.width < self.NARROW_BELOW
        self.query_one(".app-name", Static).display = not narrow
        for tab in self.query(WorkspaceTab):
            tab.show(tab.mode == current, narrow)
