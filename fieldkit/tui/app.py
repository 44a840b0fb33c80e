"""The fieldkit app: wires the workspaces, keys, themes and the command palette.

No calculation and no file I/O of its own: screens call ``fieldkit.calc`` and ``fieldkit.jobs``;
settings go through ``fieldkit.settings``.
"""

from __future__ import annotations

import gc
from collections.abc import Iterable
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING, Any

from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.css.stylesheet import Stylesheet
from textual.screen import Screen

from fieldkit import __version__, locations, settings
from fieldkit.tui.themes import HIGH_CONTRAST, register_themes
from fieldkit.tui.workspaces import WORKSPACES

if TYPE_CHECKING:
    from fieldkit.jobs.store import JobStore


class _OnceParsedStylesheet(Stylesheet):
    """A stylesheet that parses each CSS source once for a given set of theme variables.

    Textual re-parses every source in a fresh stylesheet whenever a screen brings new CSS or
    the CSS is refreshed, even when the variables are unchanged: three times before the first
    frame, a fifth of the start-up. Here the parsed rules of each source are kept until the
    variables change (a new theme), which empties the cache as before.
    """

    def set_variables(self, variables: dict[str, str]) -> None:
        if variables != self._variables:
            super().set_variables(variables)

    def reparse(self) -> None:
        self.parse()


class FieldkitApp(App[None]):
    """The terminal UI."""

    TITLE = "fieldkit"
    SUB_TITLE = f"fibre field assistant {__version__}"
    CSS_PATH = "app.tcss"
    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (72, "-wide")]
    MODES = {ws.mode: ws.make_screen for ws in WORKSPACES}
    BINDINGS = [
        Binding(
            "f1", "show_help", "Help", id="app.help", tooltip="Keys and safety cautions", show=False
        ),
        *[
            Binding(
                ws.key,
                f"workspace('{ws.mode}')",
                ws.title,
                id=f"workspace.{ws.mode}",
                tooltip=ws.help,
                # The workspace bar at the top shows these keys, and takes clicks.
                show=False,
            )
            for ws in WORKSPACES
        ],
        Binding(
            "ctrl+t",
            "toggle_sunlight",
            "Sunlight",
            id="app.sunlight",
            tooltip="Switch to the high-contrast theme for direct sunlight, and back",
        ),
        # Quit is in the help page and the palette; the footer's room goes to the workspaces.
        Binding("ctrl+q", "quit", "Quit", id="app.quit", priority=True, show=False),
    ]

    def __init__(self, data_dir: Path, config_dir: Path, start_mode: str | None = None) -> None:
        self.data_dir = data_dir
        self.config_dir = config_dir
        self._start_mode = start_mode or WORKSPACES[0].mode
        super().__init__()
        self.stylesheet = _OnceParsedStylesheet(variables=self.get_css_variables())
        register_themes(self)
        self._previous_theme = "textual-dark"
        self._store: JobStore | None = None

    # -- services the screens use -------------------------------------------------------
    @property
    def store(self) -> JobStore:
        """The job store of this app's data folder, opened on first use."""
        if self._store is None:
            from fieldkit.jobs.store import JobStore

            self._store = JobStore(locations.jobs_dir(self.data_dir))
        return self._store

    def on_mount(self) -> None:
        saved = settings.load(self.config_dir).get("theme")
        if isinstance(saved, str) and saved in self.available_themes:
            self.theme = saved
        self.theme_changed_signal.subscribe(self, self._remember_theme)
        # DEFAULT_MODE stays unset: a mode screen holding an Input crashes at start otherwise.
        self.switch_mode(self._start_mode)
        self.call_after_refresh(self._started)

    def run(self, *args: Any, **kwargs: Any) -> None:
        # Start-up makes tens of thousands of objects that live as long as the app; the
        # collector walking them while they are made costs a tenth of the first frame.
        # It runs again once the first workspace is on screen (see _started).
        gc.disable()
        try:
            super().run(*args, **kwargs)
        finally:
            gc.enable()

    def _started(self) -> None:
        # What exists now lives as long as the app: kept out of every later collection.
        gc.freeze()
        gc.enable()

    def _remember_theme(self, theme: object) -> None:
        try:
            settings.save(self.config_dir, theme=self.theme)
        except OSError as exc:
            self.notify(f"Could not save the theme choice: {exc}", severity="warning")

    # -- actions ------------------------------------------------------------------------
    def action_workspace(self, mode: str) -> None:
        if self.current_mode != mode:
            self.switch_mode(mode)

    def action_show_help(self) -> None:
        from fieldkit.tui.screens.help import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_toggle_sunlight(self) -> None:
        if self.theme == HIGH_CONTRAST:
            self.theme = self._previous_theme
        else:
            self._previous_theme = self.theme
            self.theme = HIGH_CONTRAST

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        for ws in WORKSPACES:
            yield SystemCommand(
                f"Open {ws.title}",
                f"{ws.help} ({ws.key.upper()})",
                partial(self.action_workspace, ws.mode),
            )
        yield SystemCommand(
            "Help and safety", "Keys and safety cautions (F1)", self.action_show_help
        )
        yield SystemCommand(
            "Sunlight theme", "High-contrast theme on or off (Ctrl+T)", self.action_toggle_sunlight
        )
        yield from super().get_system_commands(screen)


def make_app(
    data_dir: str | Path | None = None,
    config_dir: str | Path | None = None,
    start_mode: str | None = None,
) -> FieldkitApp:
    """The app factory used by the CLI and the tests."""
    return FieldkitApp(
        data_dir=locations.data_dir(data_dir),
        config_dir=locations.config_dir(config_dir),
        start_mode=start_mode,
    )
