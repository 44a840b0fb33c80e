"""The fieldkit app: wires the workspaces, keys, themes and the command palette.

No calculation and no file I/O of its own: screens call ``fieldkit.calc`` and ``fieldkit.jobs``;
settings go through ``fieldkit.settings`` (the theme through ``fieldkit.settings_file``).
"""

from __future__ import annotations

import gc
from collections.abc import Iterable
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING, Any

from textual import events
from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.css.stylesheet import Stylesheet
from textual.screen import Screen

from fieldkit import __version__, locations, settings_file
from fieldkit.tui import keys, layout_fix
from fieldkit.tui.themes import HIGH_CONTRAST, register_themes
from fieldkit.tui.workspaces import WORKSPACES

if TYPE_CHECKING:
    from fieldkit.jobs.store import JobStore

layout_fix.install()


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
    # From the key table: Help, a function key per workspace, sunlight, quit (every screen's
    # footer shows Quit first; see fieldkit.tui.keys).
    BINDINGS = keys.app_bindings(WORKSPACES)

    def __init__(
        self,
        data_dir: Path,
        config_dir: Path,
        start_mode: str | None = None,
        welcome: bool = False,
    ) -> None:
        self.data_dir = data_dir
        self.config_dir = config_dir
        #: On a start by a person (not a test or a script): ask the operator's name once, and
        #: on an empty data folder say where data lives and offer a new job.
        self._welcome = welcome
        self._start_mode = start_mode or WORKSPACES[0].mode
        # The first workspace is the app's first screen: no blank default screen composed,
        # styled and painted before it, and no switch to it (a tenth of the start-up).
        self.DEFAULT_MODE = self._start_mode  # type: ignore[misc]
        super().__init__()
        self.stylesheet = _OnceParsedStylesheet(variables=self.get_css_variables())
        register_themes(self)
        self._previous_theme = "textual-dark"
        self._store: JobStore | None = None
        self._operator: str | None = None
        #: Screens pushed whose focus is not set yet -> the keys typed for them meanwhile.
        self._settling: dict[Screen[Any], list[events.Key | events.Paste]] = {}

    _css_variables: tuple[object, dict[str, str]] | None = None

    def get_css_variables(self) -> dict[str, str]:
        # Worked out from the theme (a colour system of some 150 shades) four times before the
        # first frame, each the same: kept until the theme changes.
        theme = self.current_theme
        if self._css_variables is None or self._css_variables[0] is not theme:
            self._css_variables = (theme, super().get_css_variables())
        self.theme_variables = dict(self._css_variables[1])
        return dict(self._css_variables[1])

    # -- services the screens use -------------------------------------------------------
    @property
    def store(self) -> JobStore:
        """The job store of this app's data folder, opened on first use."""
        if self._store is None:
            from fieldkit.jobs.store import JobStore

            self._store = JobStore(locations.jobs_dir(self.data_dir))
        return self._store

    @property
    def operator(self) -> str:
        """Who is working: the name saved in the settings, else ``$FIELDKIT_OPERATOR``.

        Stamped on every result, reference, budget, fault, splice and note saved from here."""
        if self._operator is None:
            from fieldkit.actions.operator import resolve_operator, saved_operator

            self._operator = saved_operator(self.config_dir) or resolve_operator(None, None)
        return self._operator

    def set_operator(self, name: str) -> str:
        """Save a new operator name in the settings; returns it as saved."""
        from fieldkit.actions.operator import save_operator

        self._operator = save_operator(self.config_dir, name)
        return self._operator

    def on_load(self) -> None:
        # Before the first workspace is composed (at the app's Compose, right after this):
        # it is styled once, in the theme it is shown in.
        saved = settings_file.load(self.config_dir).get("theme")
        if isinstance(saved, str) and saved in self.available_themes:
            self.theme = saved

    def on_mount(self) -> None:
        self.theme_changed_signal.subscribe(self, self._remember_theme)
        self.call_after_refresh(self._started)
        if self._welcome:
            self.call_after_refresh(self._first_start)

    async def on_event(self, event: events.Event) -> None:
        # A workspace still mounting the fields a key goes to holds it (WorkspaceScreen
        # .hold_keys) and hands it on once they are there: nothing typed is lost or misplaced.
        if isinstance(event, (events.Key, events.Paste)) and not event.is_forwarded:
            stack = self.screen_stack
            if stack and stack[-1] in self._settling:
                # A dialog just pushed, its focus not set yet: the key waits for it.
                self._settling[stack[-1]].append(event)
                return
            hold = getattr(stack[-1], "hold_key", None) if stack else None
            if hold is not None and hold(event):
                return
        await super().on_event(event)

    def push_screen(self, screen: Any, *args: Any, **kwargs: Any) -> Any:
        """As Textual's, and keys typed before the pushed screen has mounted and set its focus
        (Ctrl+S then Down at once) are held and handed on to it in order once it has."""
        result = super().push_screen(screen, *args, **kwargs)
        top = self.screen_stack[-1]
        if top not in self._settling:
            self._settling[top] = []
            # Queued behind its mount and its ScreenResume (AUTO_FOCUS): runs once they ran.
            top.call_later(self.call_later, self._hand_on_to_pushed, top)
        return result

    async def _hand_on_to_pushed(self, screen: Screen[Any]) -> None:
        # In the app's queue: keys that came before this are held, those after it follow.
        for event in self._settling.pop(screen, []):
            again: events.Key | events.Paste
            if isinstance(event, events.Key):
                again = events.Key(event.key, event.character)
            else:
                again = events.Paste(event.text)
            await self.on_event(again)

    # -- first start: the operator, where data lives, a new job ----------------------------
    def _first_start(self) -> None:
        # Asked while no name is known (none saved, FIELDKIT_OPERATOR unset): no record is
        # saved without one.
        if self.operator:
            self._offer_new_job()
        else:
            self.action_set_operator(then_offer_job=True)

    def action_set_operator(self, then_offer_job: bool = False) -> None:
        """Ask for the operator's name (stamped on everything saved from here)."""
        from fieldkit.tui.widgets.dialogs import NameDialog

        def given(name: str | None) -> None:
            if name is not None:
                try:
                    self.set_operator(name)
                except (OSError, ValueError) as exc:
                    self.notify(f"The name was not saved: {exc}", severity="warning")
                else:
                    if name:
                        self.notify(f"Saving as {name}.")
            if then_offer_job:
                self._offer_new_job()

        self.push_screen(
            NameDialog(
                "Who is working?",
                "Your name goes on every result, reference, budget, fault, splice and note "
                f"you save (change it from the command palette, {keys.display('ctrl+p')}).",
                self.operator,
                # asked on a start with no name known: no record is saved without one
                required=then_offer_job and not self.operator,
            ),
            given,
        )

    # -- quitting never drops unsaved work ---------------------------------------------------
    def unsaved_workspaces(self) -> list[tuple[str, str]]:
        """(mode, title) of each open workspace holding edits not saved onto a job."""
        out = []
        for ws in WORKSPACES:
            for screen in getattr(self, "_screen_stacks", {}).get(ws.mode, []):
                if getattr(screen, "unsaved_edits", False):
                    out.append((ws.mode, ws.title))
                    break
        return out

    async def action_quit(self) -> None:
        from fieldkit.tui.widgets.dialogs import AskDialog

        pending = self.unsaved_workspaces()
        if not pending or isinstance(self.screen, AskDialog):
            self.exit()
            return
        mode, title = pending[0]

        def answered(answer: tuple[str, str] | None) -> None:
            if answer is None:
                return
            if answer[0] == "quit":
                self.exit()
            else:
                self.switch_mode(mode)

        names = ", ".join(t for _, t in pending)
        self.push_screen(
            AskDialog(
                "Unsaved work",
                [f"{names}: changes not saved onto a job ({keys.display('save')} there saves)."],
                [("go", f"Go to {title}"), ("quit", "Quit without saving")],
            ),
            answered,
        )

    def _offer_new_job(self) -> None:
        from fieldkit.tui.widgets.dialogs import AskDialog

        try:
            has_jobs = bool(self.store.list())
        except OSError:
            has_jobs = True
        if has_jobs:
            return

        def answered(answer: tuple[str, str] | None) -> None:
            if answer is not None and answer[0] == "new":
                self.switch_mode("jobs")
                self.call_after_refresh(self._new_job_in_jobs)

        self.push_screen(
            AskDialog(
                "Welcome to fieldkit",
                [
                    f"Jobs are kept in {self.store.jobs_dir} (--data-dir or "
                    "FIELDKIT_DATA_DIR points elsewhere); settings in "
                    f"{self.config_dir}.",
                    "Everything you save goes onto a job: start one now?",
                ],
                [("new", "New job")],
            ),
            answered,
        )

    def _new_job_in_jobs(self) -> None:
        action = getattr(self.screen, "action_new_job", None)
        if callable(action):
            action()

    def run(self, *args: Any, **kwargs: Any) -> Any:
        # Start-up makes tens of thousands of objects that live as long as the app; the
        # collector walking them while they are made costs a tenth of the first frame.
        # It runs again once the first workspace is on screen (see _started).
        gc.disable()
        try:
            # The app's return value (a headless run's screenshot, for one) is passed on.
            return super().run(*args, **kwargs)
        finally:
            gc.enable()

    def _started(self) -> None:
        # What exists now lives as long as the app: kept out of every later collection.
        gc.freeze()
        gc.enable()

    def _remember_theme(self, theme: object) -> None:
        try:
            settings_file.save(self.config_dir, theme=self.theme)
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

    def get_key_display(self, binding: Binding) -> str:
        """Every key shown in one style, the key table's (``^S``, ``Esc``, ``F1``)."""
        return binding.key_display or keys.display(binding.key)

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        """The palette: the actions of the screen it was opened from, by name from the key
        table (fieldkit.tui.keys.commands), then the places and the app's own commands.
        Textual's own entries (widget help, maximize, screenshot, the theme list) are left out:
        they speak to developers, not crews."""
        for mode in keys.screen_modes(type(screen).BINDINGS):
            for command in keys.commands(mode):
                if screen.check_action(command.action.split("(")[0], ()) is False:
                    continue
                yield SystemCommand(
                    command.title,
                    command.help,
                    partial(screen.run_action, command.action),
                    command.discover,
                )
        for ws in WORKSPACES:
            yield SystemCommand(
                f"Open {ws.title}",
                f"{ws.help} ({keys.display(ws.key)})",
                partial(self.action_workspace, ws.mode),
            )
        yield SystemCommand(
            "Help and safety", "Keys and safety cautions (F1)", self.action_show_help
        )
        yield SystemCommand(
            keys.SUNLIGHT_THEME,
            f"{keys.SUNLIGHT_ABOUT[:1].upper()}{keys.SUNLIGHT_ABOUT[1:]} "
            f"({keys.display('ctrl+t')})",
            self.action_toggle_sunlight,
        )
        yield SystemCommand(
            "Operator name",
            f"Who is working (now: {self.operator or 'not set'}); stamped on everything saved",
            self.action_set_operator,
        )
        yield SystemCommand(
            "Quit fieldkit",
            f"Asks first if a workspace holds unsaved work ({keys.display('quit')})",
            self.action_quit,
        )


def make_app(
    data_dir: str | Path | None = None,
    config_dir: str | Path | None = None,
    start_mode: str | None = None,
    welcome: bool = False,
) -> FieldkitApp:
    """The app factory used by the CLI and the tests (``welcome``: a start by a person, see
    :class:`FieldkitApp`)."""
    return FieldkitApp(
        data_dir=locations.data_dir(data_dir),
        config_dir=locations.config_dir(config_dir),
        start_mode=start_mode,
        welcome=welcome,
    )
