"""The workspaces of the app: one row each. A new workspace adds its row here.

The app builds its modes, its keys and its command-palette entries from this table, so a
workspace is reachable by one key and from the palette as soon as it is listed. Its key comes from
the key table (``fieldkit.tui.keys.PLACES``), which reserves one for each workspace being built.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass

from textual import events
from textual.screen import Screen

from fieldkit.tui import keys


@dataclass(frozen=True, slots=True)
class Workspace:
    mode: str  # the mode name, also the command-palette id
    title: str  # the footer label and the palette title
    help: str  # the palette help line
    module: str  # module of the screen class
    screen_class: str

    @property
    def key(self) -> str:
        """The one key that opens it, from the key table (fieldkit.tui.keys.PLACES)."""
        return keys.place_key(self.mode)

    def make_screen(self) -> Screen:
        cls = getattr(importlib.import_module(self.module), self.screen_class)
        screen: Screen = cls()
        # The layout class for the terminal's width (-wide / -narrow) goes on before the screen
        # is mounted: set on its first resize, it would restyle every widget once more.
        breakpoints = screen.HORIZONTAL_BREAKPOINTS
        if breakpoints is None:
            breakpoints = screen.app.HORIZONTAL_BREAKPOINTS
        width = screen.app.size.width
        for threshold, name in sorted(breakpoints or [], reverse=True):
            if width >= threshold:
                screen.add_class(name)
                break
        return screen


class WorkspaceScreen(Screen[None]):
    """A workspace screen styled once before its first frame, not twice.

    Textual restyles every widget of a screen when it is resumed (a screen coming back may have
    missed a theme or CSS change). A new mode's screen is resumed twice right after it was
    mounted, and mounting has just styled each widget with the CSS in force: restyling it all
    again was a sixth of the first workspace's start-up. Until the screen's first frame, a
    resume skips the restyle (its layout and focus still happen); after it, resumes are as
    Textual makes them. A theme or CSS change in between restyles everything as always.
    """

    _before_first_frame = True

    def _on_screen_resume(self, event: events.ScreenResume) -> None:
        # Textual calls the handler of each class on the way up, this one before Screen's.
        if self._before_first_frame and event.refresh_styles:
            self.call_after_refresh(self._first_frame_shown)
            event.refresh_styles = False

    def _first_frame_shown(self) -> None:
        self._before_first_frame = False


WORKSPACES: tuple[Workspace, ...] = (
    Workspace(
        "convert",
        "Convert",
        "Levels, power units, attenuation, wavelength and grid",
        "fieldkit.tui.screens.convert",
        "ConvertScreen",
    ),
    Workspace(
        "budget",
        "Budget",
        "Loss budget per wavelength, application and transceiver",
        "fieldkit.tui.screens.budget",
        "BudgetScreen",
    ),
    Workspace(
        "meter",
        "Meter",
        "Meter reference, readings to insertion loss, pass/fail",
        "fieldkit.tui.screens.meter",
        "MeterScreen",
    ),
    Workspace(
        "fault",
        "Fault",
        "Fault location: OTDR distance to a place on the route",
        "fieldkit.tui.screens.fault",
        "FaultScreen",
    ),
    Workspace(
        "jobs",
        "Jobs",
        "Per-job logs: find, read, note, finish, export; end of day",
        "fieldkit.tui.screens.jobs",
        "JobsScreen",
    ),
    Workspace(
        "splices",
        "Splices",
        "Splice log: closures, trays, every splice by number and colour, both directions",
        "fieldkit.tui.screens.splices",
        "SplicesScreen",
    ),
    Workspace(
        "traces",
        "Traces",
        "OTDR traces: events, both directions averaged, the trace drawn",
        "fieldkit.tui.screens.traces",
        "TracesScreen",
    ),
)
