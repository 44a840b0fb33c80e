"""The top line of every workspace: the app's name, and each workspace with its key.

It takes the place of a title bar. The current workspace is highlighted; every entry can be
clicked or tapped. On a narrow terminal the other workspaces shrink to their keys, so the line
fits 40 columns. The footer below keeps its room for the current screen's own keys.

One widget draws the whole line (each entry a clickable span), not a widget per entry: every
workspace mounts and styles this bar before its first frame.
"""

from __future__ import annotations

from typing import NamedTuple

from rich.style import Style
from rich.text import Text
from textual.events import Click, MouseEvent, MouseMove
from textual.widget import Widget

from fieldkit.tui import keys
from fieldkit.tui.workspaces import WORKSPACES


class Tab(NamedTuple):
    """One entry of the bar: what a click runs, its key and its title."""

    mode: str
    action: str  # an action of the app
    key_label: str
    title: str


TABS: tuple[Tab, ...] = (
    *(Tab(ws.mode, f"workspace('{ws.mode}')", keys.display(ws.key), ws.title) for ws in WORKSPACES),
    Tab("help", "show_help", keys.display(keys.place_key("help")), "Help"),
)


class WorkspaceBar(Widget):
    """Name of the app, then an entry per workspace, then Help."""

    COMPONENT_CLASSES = {
        "workspace-bar--name",
        "workspace-bar--tab",
        "workspace-bar--tab-hover",
        "workspace-bar--current",
    }

    DEFAULT_CSS = """
    WorkspaceBar {
        height: 1;
        width: 1fr;
        background: $panel;
    }
    WorkspaceBar > .workspace-bar--name {
        text-style: bold;
        color: $text;
    }
    WorkspaceBar > .workspace-bar--tab {
        color: $text-muted;
    }
    WorkspaceBar > .workspace-bar--tab-hover {
        background: $boost;
        color: $text;
    }
    WorkspaceBar > .workspace-bar--current {
        background: $primary;
        color: $text;
        text-style: bold;
    }
    """

    def __init__(self) -> None:
        super().__init__()
        self._hovered: str | None = None

    def tab_text(self, tab: Tab, narrow: bool) -> str:
        """What the bar shows for ``tab``: narrow, only the key unless it is the current one."""
        current = tab.mode == self.app.current_mode
        return tab.key_label if narrow and not current else f"{tab.key_label} {tab.title}"

    def tab_style(self, tab: Tab) -> Style:
        """The colours of ``tab``: current, under the pointer, or plain."""
        if tab.mode == self.app.current_mode:
            name = "workspace-bar--current"
        elif tab.mode == self._hovered:
            name = "workspace-bar--tab-hover"
        else:
            name = "workspace-bar--tab"
        return self.get_component_rich_style(name)

    def render(self) -> Text:
        # The app's name and every title when they fit, then every title, then keys only.
        width = self.size.width or self.app.size.width
        full = sum(len(self.tab_text(tab, False)) + 2 for tab in TABS)
        narrow = full > width
        line = Text(no_wrap=True, overflow="crop")
        if full + len(" fieldkit ") <= width:
            line.append(" fieldkit ", self.get_component_rich_style("workspace-bar--name"))
        for tab in TABS:
            # Each entry carries its mode, so a click or the pointer finds its tab.
            meta = Style.from_meta({"tab": tab.mode})
            line.append(f" {self.tab_text(tab, narrow)} ", self.tab_style(tab) + meta)
        return line

    def tab_at(self, event: MouseEvent) -> Tab | None:
        mode = event.style.meta.get("tab")
        return next((tab for tab in TABS if tab.mode == mode), None)

    async def on_click(self, event: Click) -> None:
        tab = self.tab_at(event)
        if tab is not None:
            event.stop()
            await self.app.run_action(tab.action)

    def on_resize(self) -> None:
        self.refresh()

    def on_mouse_move(self, event: MouseMove) -> None:
        tab = self.tab_at(event)
        hovered = tab.mode if tab is not None else None
        if hovered != self._hovered:
            self._hovered = hovered
            self.refresh()

    def on_leave(self) -> None:
        if self._hovered is not None:
            self._hovered = None
            self.refresh()
