"""The workspaces of the app: one row each. A new workspace adds its row here.

The app builds its modes, its keys and its command-palette entries from this table, so a
workspace is reachable by one key and from the palette as soon as it is listed. Its key comes from
the key table (``fieldkit.tui.keys.PLACES``), which reserves one for each workspace being built.
"""

from __future__ import annotations

import asyncio
import importlib
from collections.abc import Callable
from typing import TYPE_CHECKING, NamedTuple

from textual import events
from textual.screen import Screen

from fieldkit.tui import keys

if TYPE_CHECKING:
    from textual.dom import QueryType
    from textual.widget import Widget


class Workspace(NamedTuple):
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
                screen.add_class(name, update=False)  # styled when mounted
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

    #: False while widgets of the workspace are still to be mounted after its first frame (a
    #: screen that defers some sets this False and calls :meth:`whole_workspace_mounted`).
    workspace_complete = True
    #: Keys held for this screen (the app keeps them here instead of handing them on), None
    #: when keys go through as usual; see :meth:`hold_keys`.
    held_keys: list[events.Key | events.Paste] | None = None
    _held_moves: list[Callable[[], object]] | None = None
    _handing_on: events.Key | events.Paste | None = None

    def hold_key(self, event: events.Key | events.Paste) -> bool:
        """Keep ``event`` for later when keys are held (the app asks before handing it on)."""
        if self.held_keys is None or event is self._handing_on:
            return False
        self.held_keys.append(event)
        return True

    def hold_keys(self) -> None:
        """Keep the keys that come from now on until the whole workspace is mounted: a key
        typed after Enter or Tab belongs to the field focus moves to, which may not exist yet.
        """
        if self.held_keys is None:
            self.held_keys = []

    def focus_next(self, selector: str | type[QueryType] = "*") -> Widget | None:
        if not self.workspace_complete:
            self.when_whole(lambda: Screen.focus_next(self, selector))
            return None
        return super().focus_next(selector)

    def focus_previous(self, selector: str | type[QueryType] = "*") -> Widget | None:
        if not self.workspace_complete:
            self.when_whole(lambda: Screen.focus_previous(self, selector))
            return None
        return super().focus_previous(selector)

    def when_whole(self, move: Callable[[], object]) -> None:
        """Run ``move`` (a focus move) now, or once the whole workspace is mounted when what it
        moves to is not there yet; the keys typed after it wait for it."""
        if self.workspace_complete:
            move()
            return
        self._held_moves = [*(self._held_moves or []), move]
        self.hold_keys()

    def whole_workspace_mounted(self) -> None:
        """Every widget is mounted: the focus moves asked meanwhile are made, in order, then
        the keys held since are handed on as if typed now."""
        self.workspace_complete = True
        moves, self._held_moves = self._held_moves or [], None
        for move in moves:
            move()
        if self.held_keys is not None:
            self.run_worker(self._hand_on_held_keys(), group="held-keys")

    async def _hand_on_held_keys(self) -> None:
        # One at a time, each handled before the next goes (a Tab has moved the focus before
        # the digit after it is typed), as when they are typed; keys that come meanwhile are
        # held behind them.
        while self.held_keys:
            event = self.held_keys.pop(0)
            again: events.Key | events.Paste
            if isinstance(event, events.Key):
                again = events.Key(event.key, event.character)
            else:
                again = events.Paste(event.text)
            self._handing_on = again
            self.app.post_message(again)
            await self._handled()
        self._handing_on = None
        self.held_keys = None

    async def _handled(self) -> None:
        """Until what is waiting in the app, this screen and its widgets has been handled,
        and what that passed on to their parents (a key bubbles up one widget per turn)."""
        focused = self.app.focused
        depth = len(focused.ancestors_with_self) if focused is not None else 1
        for _ in range(depth + 1):
            waits = []
            for pump in (self.app, *self.walk_children(with_self=True)):
                turn = asyncio.Event()
                if pump.call_later(turn.set):
                    waits.append(turn.wait())
            await asyncio.gather(*waits)

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
