"""The top line of every workspace: the app's name, and each workspace with its key.

It takes the place of a title bar. The current workspace is highlighted; every entry can be
clicked or tapped. Every entry is its key and its word ("F6 Jobs"): a bare "F3" says nothing to
someone new. Where not all of them fit (a phone terminal), the line shows the current one and
as many of its neighbours as fit, with "‹" or "›" where more lie beyond (a click there goes to
the nearest hidden one); Help (F1) and the palette (Ctrl+P) list them all. The footer below
keeps its room for the current screen's own keys.

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

    @staticmethod
    def tab_text(tab: Tab) -> str:
        """What the bar shows for ``tab``: its key and its word."""
        return f"{tab.key_label} {tab.title}"

    def tab_style(self, tab: Tab) -> Style:
        """The colours of ``tab``: current, under the pointer, or plain."""
        if tab.mode == self.app.current_mode:
            name = "workspace-bar--current"
        elif tab.mode == self._hovered:
            name = "workspace-bar--tab-hover"
        else:
            name = "workspace-bar--tab"
        return self.get_component_rich_style(name)

    def window(self, width: int) -> tuple[int, int]:
        """The tabs shown at ``width`` cells, ``TABS[lo:hi]``: all when they fit, else the
        current one and its neighbours, the next ones first, with room for the markers."""
        cells = [len(self.tab_text(tab)) + 1 for tab in TABS]  # a space before each
        current = next((i for i, tab in enumerate(TABS) if tab.mode == self.app.current_mode), None)
        if sum(cells) + 2 <= width or current is None:
            return 0, len(TABS)
        lo, hi = current, current + 1
        used = cells[current] + 2  # the current one is padded on both sides

        def room(lo: int, hi: int) -> int:
            return width - (2 if lo > 0 else 0) - (2 if hi < len(TABS) else 0)

        grew = True
        while grew:
            grew = False
            if hi < len(TABS) and used + cells[hi] <= room(lo, hi + 1):
                used += cells[hi]
                hi += 1
                grew = True
            if lo > 0 and used + cells[lo - 1] <= room(lo - 1, hi):
                used += cells[lo - 1]
                lo -= 1
                grew = True
        return lo, hi

    def render(self) -> Text:
        # The app's name and every entry when they fit, else a window around the current one.
        width = self.size.width or self.app.size.width
        lo, hi = self.window(width)
        line = Text(no_wrap=True, overflow="crop")
        muted = self.get_component_rich_style("workspace-bar--tab")
        entries = sum(len(self.tab_text(tab)) + 1 for tab in TABS[lo:hi]) + 2
        if lo == 0 and hi == len(TABS) and entries + len(" fieldkit") <= width:
            line.append(" fieldkit", self.get_component_rich_style("workspace-bar--name"))
        if lo > 0:
            line.append("‹", muted + Style.from_meta({"tab": TABS[lo - 1].mode}))
        for tab in TABS[lo:hi]:
            # Each entry carries its mode, so a click or the pointer finds its tab.
            meta = Style.from_meta({"tab": tab.mode})
            # A plain space before every entry, the current one too: its highlight (a space
            # either side of its words) never touches the entry before it.
            line.append(" ")
            if tab.mode == self.app.current_mode:
                line.append(f" {self.tab_text(tab)} ", self.tab_style(tab) + meta)
            else:
                line.append(self.tab_text(tab), self.tab_style(tab) + meta)
        if hi < len(TABS):
            line.append(" ")
            line.append("›", muted + Style.from_meta({"tab": TABS[hi].mode}))
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
