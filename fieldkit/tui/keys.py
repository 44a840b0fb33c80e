"""One table of keys: it builds every footer's bindings, the Help page and the README key table.

Our mapping, in two rules a crew learns once:

- **Function keys go to a place.** F1 Help, then one key per workspace (F2 Convert ... F9).
- **Ctrl+letter keys act where you are, with the same meaning in every workspace.** Ctrl+N is
  always *new*, Ctrl+O *open*, Ctrl+S *save*, Ctrl+A *add*, Ctrl+X *remove*, Ctrl+R
  *recheck / reload*, and so on (`COMMON` below). A workspace that has nothing for a key leaves
  it unused rather than giving it another meaning. They work while a field has focus, so
  Ctrl+A, Ctrl+E and Ctrl+D do not move or delete in a text field: Home, End and Delete do.
- **Alt+letter goes to a field** of the set-up from wherever you type (``LOCAL``: Alt+R the
  reference, Alt+W the wavelengths, Alt+F the fibre count); Enter there goes back.
- Ctrl+Q quits and shows first in every footer.

A screen takes its bindings from here (``BINDINGS = keys.bindings("budget")``) and its button
hints from ``keys.hint(...)``; the app takes its own from ``keys.app_bindings()``; the Help page
renders ``keys.help_markdown()``; the README's key tables are ``keys.readme_tables()``, and a test
checks that README.md holds exactly that (``python -m fieldkit.tui.keys README.md`` rewrites it).

A new workspace gets its function key from ``PLACES`` and lists what it does with the common keys
in ``USES``; a key of its own goes in ``LOCAL`` (named by the workspace, so Help shows it beside
that workspace only). No import of Textual at module level beyond ``Binding``: it is cheap.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import TYPE_CHECKING, NamedTuple, Protocol

from textual.binding import Binding, BindingType

if TYPE_CHECKING:
    from collections.abc import Iterable


class _Workspace(Protocol):
    @property
    def mode(self) -> str: ...
    @property
    def title(self) -> str: ...
    @property
    def help(self) -> str: ...


__all__ = [
    "COMMAND_NAMES",
    "COMMON",
    "KEYLESS_COMMANDS",
    "LOCAL",
    "PLACES",
    "USES",
    "Key",
    "Use",
    "Command",
    "app_bindings",
    "bindings",
    "commands",
    "display",
    "help_markdown",
    "hint",
    "place_key",
    "readme_tables",
    "screen_modes",
]


class Key(NamedTuple):
    """A key and the one thing it means wherever it is used."""

    name: str  # our id: "new", "open", ...
    key: str  # Textual's key name(s): "ctrl+n"; the first one is shown
    label: str  # the footer word
    meaning: str  # what it means in every workspace (Help, README)


class Use(NamedTuple):
    """What a key does in one workspace."""

    name: str  # a Key.name from COMMON or LOCAL
    action: str | None  # the screen's Textual action; None: a widget handles it (documented only)
    does: str  # what it does here (Help, README, the footer tooltip)
    show: bool = True  # shown in the footer (a button or the hint line may carry it instead)
    label: str | None = None  # a footer word of its own, where the common one reads wrong


#: The keys that mean the same everywhere. Order: the order Help and the README list them.
COMMON: tuple[Key, ...] = (
    Key("quit", "ctrl+q", "Quit", "quit fieldkit (every footer shows it first)"),
    Key("new", "ctrl+n", "New", "start a new, empty one: a budget, a fault, a job, a closure"),
    Key(
        "open",
        "ctrl+o",
        "Open",
        "choose what to work on: a saved budget, a job and link, trace files, a job in the list",
    ),
    Key("save", "ctrl+s", "Save", "save onto a job's link"),
    Key("add", "ctrl+a", "Add", "add an item, a row, a link"),
    Key("remove", "ctrl+x", "Remove", "remove the picked item, row or reading (a job asks first)"),
    Key("edit", "ctrl+e", "Edit", "edit or redo the picked job, link or splice"),
    Key("recheck", "ctrl+r", "Recheck", "recheck or reload: the reference, the list"),
    Key("find", "ctrl+f", "Find", "jump to the find field"),
    Key(
        "result",
        "ctrl+g",
        "Result",
        "go to the result: the position, the totals, the day, a break sent to Fault",
    ),
    Key("done", "ctrl+d", "Done", "mark done, or open again"),
    Key("export", "ctrl+w", "Export", "write a report: CSV, Markdown, HTML, hand-off"),
    Key("note", "ctrl+l", "Note", "log a note"),
    Key(
        "filter",
        "ctrl+y",
        "Show",
        "change what is shown: which jobs, which values, a fibre's history, which events",
    ),
)

#: Keys that belong to a kind of work rather than to every workspace (moving in a list or a
#: grid, taking an entry). They still mean one thing wherever they appear.
LOCAL: tuple[Key, ...] = (
    Key("enter", "enter", "Enter", "take what you typed and go on"),
    Key("next", "down", "Next", "next fibre, row or job"),
    Key("previous", "up", "Prev", "previous fibre, row or job"),
    Key("page_down", "pagedown", "+12", "12 fibres on"),
    Key("page_up", "pageup", "-12", "12 fibres back"),
    Key("column_next", "ctrl+right", "Next col", "next column or day"),
    Key("column_previous", "ctrl+left", "Prev col", "previous column or day"),
    Key("move_up", "ctrl+up", "Up", "move the picked item up the list"),
    Key("move_down", "ctrl+down", "Down", "move the picked item down the list"),
    Key("delete", "delete", "Delete", "in a list: remove the picked row"),
    Key("close", "escape", "Close", "close a dialog or page, keep what was typed"),
    Key("today", "ctrl+k", "Today", "only today's jobs, or every day again"),
    Key("list", "ctrl+b", "List", "go to the list you pick from: a budget's items"),
    # Alt+letter goes to a field of the set-up, from wherever you type (Enter comes back).
    Key("to_reference", "alt+r", "Ref", "go to the reference field"),
    Key("to_wavelength", "alt+w", "Wavelength", "go to the wavelengths field"),
    Key("to_fibres", "alt+f", "Fibres", "go to the fibre count field"),
)

#: The function key of each workspace (mode name -> key). F1 is Help. Modes listed here but
#: not (yet) in fieldkit.tui.workspaces.WORKSPACES are reserved for workspaces being built.
PLACES: dict[str, str] = {
    "help": "f1",
    "convert": "f2",
    "budget": "f3",
    "meter": "f4",
    "fault": "f5",
    "jobs": "f6",
    "splices": "f7",
    "traces": "f8",
    "fibre": "f9",  # reserved: the fibre data view, if it becomes a workspace (issue 13)
}

#: App-wide keys besides the workspaces (Help and README list them after the places).
#: The one name of the theme for reading in sunlight (Help, the palette, the tooltip).
SUNLIGHT_THEME = "Sunlight theme"
SUNLIGHT_ABOUT = "black on white, high contrast for direct sunlight; on or off (remembered)"

GENERAL: tuple[tuple[str, str, str], ...] = (
    (
        "palette",
        "ctrl+p",
        "the command palette: this workspace's actions, the workspaces and fieldkit's own "
        "commands, by name",
    ),
    ("sunlight", "ctrl+t", f"the {SUNLIGHT_THEME}: {SUNLIGHT_ABOUT}"),
    ("focus", "tab", "the next field; Shift+Tab the previous one"),
)

#: What each workspace does with the keys. Reserved entries for workspaces being built say what
#: they are expected to do; a workspace adopts its row when it lands (or changes it here).
USES: dict[str, tuple[Use, ...]] = {
    "convert": (Use("enter", None, "next field", show=False),),
    "budget": (
        Use(
            "add",
            "add_item",
            "choose the kind of item to add (the list opens at Fibre; a digit picks)",
        ),
        Use("new", "new_budget", "start an empty budget (asks first if this one is not saved)"),
        Use("save", "save", "save this budget onto a job's link"),
        Use("open", "open_saved", "open the budget saved on a job's link"),
        Use("remove", "remove_item", "remove the picked item", show=False),
        Use("list", "focus_items", "go to the link's items (arrows move, Enter edits)", show=False),
        Use("next", None, "in an item's fields: edit the next item", show=False),
        Use("previous", None, "in an item's fields: edit the previous item", show=False),
        Use("result", "focus_result", "go to the per-wavelength totals", show=False),
        Use("move_up", "move_item(-1)", "move the picked item towards end A", show=False),
        Use("move_down", "move_item(1)", "move the picked item towards end B", show=False),
    ),
    "meter": (
        Use(
            "save",
            "pick_job",
            "choose the job's link the readings are saved onto (each one as it is typed)",
        ),
        Use(
            "open",
            "pick_job",
            "choose a job's link: its readings come into the grid, new ones go there",
            show=False,
        ),
        Use("recheck", "recheck", "recheck this column's reference at the end of the session"),
        Use(
            "filter",
            "history",
            "every reading of this fibre saved in the job, retests and cleared ones too",
            show=False,
            label="History",
        ),
        Use("remove", "clear_cell", "remove the reading under the cursor", show=False),
        Use("enter", None, "take the reading, go to the next fibre", show=False),
        Use("next", "move(1)", "next fibre", show=False),
        Use("previous", "move(-1)", "previous fibre", show=False),
        Use("page_down", "move(12)", "12 fibres on", show=False),
        Use("page_up", "move(-12)", "12 fibres back", show=False),
        Use("column_next", "column(1)", "next wavelength / direction column", show=False),
        Use("column_previous", "column(-1)", "previous wavelength / direction column", show=False),
        Use(
            "to_reference",
            "focus_field('reference')",
            "the Ref field of this column; Enter goes back to the reading",
            show=False,
        ),
        Use(
            "to_wavelength",
            "focus_field('wavelengths')",
            "the Wavelength field; Enter goes back to the reading",
            show=False,
        ),
        Use(
            "to_fibres",
            "focus_field('fibres')",
            "the Fibres field; Enter goes back to the reading",
            show=False,
        ),
    ),
    "fault": (
        Use(
            "new", "new_fault", "empty the reading and the rows; the set-up stays (twice if typed)"
        ),
        Use("save", "save", "save this located fault onto a job's link"),
        Use("result", "focus_result", "go to the result and the route diagram"),
        Use("add", "add_point", "add the landmark or slack row being typed", show=False),
        Use("remove", "remove_point", "remove the picked landmark or slack row", show=False),
        Use("enter", None, "in a landmark or slack row: add it", show=False),
        Use("delete", None, "in the landmark or slack list: remove the picked row", show=False),
    ),
    "jobs": (
        Use("find", "focus_filter", "find jobs by name, customer, site, crew, link or day"),
        Use("note", "focus_note", "type a note for this job; Enter saves it"),
        Use("open", "focus_list", "choose a job: go to the job list (arrows move)", show=False),
        Use("done", "toggle_done", "mark the job done, or open it again", show=False),
        Use("export", "export", "write the job's report", show=False),
        Use(
            "result",
            "end_of_day",
            "the end-of-day view: today's counts and open items",
            show=False,  # a button under the job's name carries it
            label="End of day",
        ),
        Use("filter", "cycle_status", "all, open or done jobs", show=False),
        Use("recheck", "reload", "read the jobs again (changes by another program)", show=False),
        Use("new", "new_job", "start a job: name, customer, site, crew"),
        Use("edit", "edit_job", "edit the job: name, customer, site, crew", show=False),
        Use("add", "link", "add a link to the job, or edit one", show=False, label="Link"),
        Use("remove", "delete_job", "delete the job into the trash (asks first)", show=False),
        Use("today", "toggle_today", "only today's jobs, or every day again", show=False),
    ),
    "jobs_picker": (
        Use(
            "filter",
            "toggle_done",
            "show done jobs too (after the open ones), or open jobs only",
            label="Done jobs",
        ),
        Use("close", "cancel", "close it, nothing saved", label="Cancel"),
    ),
    "jobs_today": (
        Use("column_previous", "day(-1)", "the day before", label="Day before"),
        Use("column_next", "day(1)", "the day after", label="Day after"),
        Use(
            "export",
            "export_day",
            "write the day's report: all its jobs in one HTML or Markdown report, or one CSV",
            label="Export day",
        ),
        Use("close", "close", "close the view", label="Close"),
        Use("result", "close", "close the view", show=False),
    ),
    "splices": (
        Use("open", "pick_job", "choose the job and link"),
        Use("new", "new_closure", "set up a new closure"),
        Use(
            "save",
            "start_closure",
            "save the new closure set up above onto the link, then splice (Enter there too)",
            show=False,
        ),
        Use("edit", "resplice", "re-splice the fibre under the cursor (the old one kept)"),
        Use("filter", "cycle_entry", "which values Enter takes", label="Fields"),
        Use("enter", None, "take the value, go to the next splice", show=False),
        Use("next", "move(1)", "next fibre", show=False),
        Use("previous", "move(-1)", "previous fibre", show=False),
        Use("page_down", "move(12)", "12 fibres on", show=False),
        Use("page_up", "move(-12)", "12 fibres back", show=False),
        Use("close", "keep", "keep what is there, do not replace it", show=False),
    ),
    "traces": (
        Use("open", "open", "open the files typed above"),
        Use(
            "result",
            "send_fault",
            "send the picked event (or the end: the break) to Fault",
            label="To fault",
        ),
        Use(
            "save",
            "save_what",
            "save onto a job's link: the traces themselves (1), or their losses into a "
            "closure's splice log (2)",
        ),
        Use("filter", "cycle_view", "cycle A→B, B→A, the instrument's own events"),
        Use("close", "back", "back to the folder's fibres", label="Fibres"),
    ),
    # Reserved: "fibre" (issue 13), if the fibre data view becomes a workspace of its own.
}

#: The command palette's name of a use, where the first words of ``does`` do not read as one.
#: Every use with an action is a palette command of its workspace (``commands``).
COMMAND_NAMES: dict[tuple[str, str], str] = {
    ("budget", "add"): "Add an item",
    ("budget", "new"): "New budget",
    ("meter", "save"): "Save the readings onto a job's link",
    ("meter", "open"): "Open a job's link: its readings",
    ("meter", "recheck"): "Recheck the reference",
    ("meter", "filter"): "History of this fibre",
    ("meter", "column_next"): "Next column",
    ("meter", "column_previous"): "Previous column",
    ("meter", "to_reference"): "Go to the Ref field",
    ("meter", "to_wavelength"): "Go to the Wavelength field",
    ("meter", "to_fibres"): "Go to the Fibres field",
    ("fault", "new"): "New fault",
    ("jobs", "find"): "Find jobs",
    ("jobs", "note"): "Note on this job",
    ("jobs", "open"): "Go to the job list",
    ("jobs", "export"): "Export the job",
    ("jobs", "result"): "End of day",
    ("jobs", "filter"): "Show all, open or done jobs",
    ("jobs", "recheck"): "Reload the jobs",
    ("jobs", "new"): "New job",
    ("jobs", "remove"): "Delete the job",
    ("jobs_picker", "close"): "Cancel: nothing saved",
    ("jobs_today", "export"): "Export the day",
    ("splices", "open"): "Open a job's link: its splice log",
    ("splices", "new"): "New closure",
    ("splices", "save"): "Save the new closure",
    ("splices", "close"): "Keep what is there",
    ("traces", "result"): "Send the picked event to Fault",
    ("traces", "save"): "Save onto a job's link: traces or splice log",
    ("traces", "filter"): "Cycle the events shown",
}

#: Palette commands with no key of their own, each reached by a key and a choice after it:
#: (mode, name, action, what it does, the key, the choice).
KEYLESS_COMMANDS: tuple[tuple[str, str, str, str, str, str], ...] = (
    (
        "traces",
        "Keep the traces on a job's link",
        "save_traces",
        "the traces themselves, their events and curves",
        "save",
        "1",
    ),
    (
        "traces",
        "Fill a closure's splice log",
        "fill_splices",
        "these losses into a closure's splice log on a job's link",
        "save",
        "2",
    ),
)

#: Keys that move rather than act: their commands are found by name, not listed at first.
_MOVES = {"next", "previous", "page_down", "page_up", "column_next", "column_previous"}


class Command(NamedTuple):
    """One entry of the command palette: a workspace action, by name, with its key."""

    title: str
    help: str  # what it does, and the key
    action: str  # the screen's Textual action
    discover: bool  # listed before anything is typed


def commands(mode: str) -> list[Command]:
    """The palette commands of ``mode``: each use with an action, by name, then the keyless ones.

    An action already listed (two keys for one action) is listed once, under its first key."""
    out: list[Command] = []
    seen: set[str] = set()
    for use in uses(mode):
        if use.action is None or use.action in seen:
            continue
        seen.add(use.action)
        title = COMMAND_NAMES.get((mode, use.name)) or _first_words(use.does)
        out.append(
            Command(
                title,
                f"{_sentence(use.does)} ({display(use.name)})",
                use.action,
                use.name not in _MOVES,
            )
        )
    for where, title, action, what, key, then in KEYLESS_COMMANDS:
        if where == mode:
            help_ = f"{_sentence(what)} ({display(key)}, then {then})"
            out.append(Command(title, help_, action, True))
    return out


def _first_words(does: str) -> str:
    for cut in (" (", "; ", ": "):
        does = does.split(cut)[0]
    return _sentence(does)


def screen_modes(screen_bindings: Iterable[BindingType]) -> list[str]:
    """The USES entries a screen's bindings come from (``bindings(mode)`` ids ``mode.name``)."""
    modes: list[str] = []
    for b in screen_bindings:
        if isinstance(b, Binding) and b.id and "." in b.id:
            mode = b.id.split(".")[0]
            if mode in USES and mode not in modes:
                modes.append(mode)
    return modes


#: The titles used in Help and the README for entries of USES that are not workspaces.
_SUB_TITLES = {
    "jobs_picker": "Choosing a job and link (Save and Open in every workspace)",
    "jobs_today": "End of day (in Jobs)",
}

_BY_NAME: dict[str, Key] = {k.name: k for k in (*COMMON, *LOCAL)}

_KEY_WORDS = {
    "ctrl": "Ctrl",
    "alt": "Alt",
    "shift": "Shift",
    "up": "↑",
    "down": "↓",
    "left": "←",
    "right": "→",
    "pageup": "PgUp",
    "pagedown": "PgDn",
    "escape": "Esc",
    "enter": "Enter",
    "delete": "Delete",
    "tab": "Tab",
    "home": "Home",
    "end": "End",
}


def key_of(name: str) -> Key:
    """The key called ``name`` in COMMON or LOCAL (KeyError if there is none)."""
    return _BY_NAME[name]


#: How a Ctrl key is written everywhere (footers, buttons, hints, Help, README): ``^S``.
CTRL = "^"


def display(key: str) -> str:
    """A Textual key name in the one style used everywhere: ``ctrl+n`` -> ``^N``,
    ``ctrl+left`` -> ``^←``, ``alt+r`` -> ``Alt+R``, ``pagedown`` -> ``PgDn``.

    A name of COMMON or LOCAL (``"save"``) is looked up first.
    """
    if key in _BY_NAME:
        key = _BY_NAME[key].key
    first = key.split(",")[0]
    parts = first.split("+")
    shown = [_KEY_WORDS.get(p, p.upper() if len(p) <= 3 else p.capitalize()) for p in parts]
    if shown[0] == "Ctrl" and len(shown) > 1:
        return CTRL + "+".join(shown[1:])
    return "+".join(shown)


def hint(name: str) -> str:
    """A key for a button label or a hint line: the same as :func:`display` (``^S``, ``F7``)."""
    return display(name)


def place_key(mode: str) -> str:
    """The function key of a workspace (``"f3"``)."""
    return PLACES[mode]


def uses(mode: str) -> tuple[Use, ...]:
    return USES.get(mode, ())


def does(mode: str, name: str) -> str:
    """What key ``name`` does in workspace ``mode`` (for tooltips)."""
    for use in uses(mode):
        if use.name == name:
            return use.does
    raise KeyError((mode, name))


def tip(mode: str, name: str) -> str:
    """A tooltip: what the key does here, and the key: ``Save onto a job's link (Ctrl+S)``."""
    text = does(mode, name)
    return f"{text[:1].upper()}{text[1:]} ({display(name)})"


def _quit_binding() -> Binding:
    # Priority, so no field can swallow it; first in the footer, so it is never cut off.
    return Binding("ctrl+q", "app.quit", "Quit", id="app.quit", priority=True, tooltip="Quit")


def bindings(mode: str) -> list[BindingType]:
    """The Textual bindings of a screen: Quit first, then its uses of the table, in order.

    Ctrl keys are priority bindings, so they act while a text field has focus. Uses with no
    action are documentation only (a widget handles the key).
    """
    result: list[BindingType] = [_quit_binding()]
    for use in uses(mode):
        if use.action is None:
            continue
        key = _BY_NAME[use.name]
        result.append(
            Binding(
                key.key,
                use.action,
                use.label or key.label,
                show=use.show,
                id=f"{mode}.{use.name}",
                tooltip=f"{use.does[:1].upper()}{use.does[1:]}",
                # Alt+letter too: a text field would type the letter.
                priority=key.key.startswith(("ctrl+", "alt+")),
            )
        )
    return result


def app_bindings(workspaces: Iterable[_Workspace]) -> list[BindingType]:
    """The app's own bindings: Help, a function key per workspace, sunlight, quit.

    ``workspaces`` is fieldkit.tui.workspaces.WORKSPACES (passed in: that module imports this).
    """
    result: list[BindingType] = [
        Binding(
            PLACES["help"],
            "show_help",
            "Help",
            id="app.help",
            tooltip="Keys and safety cautions",
            show=False,
        )
    ]
    for ws in workspaces:
        result.append(
            Binding(
                place_key(ws.mode),
                f"workspace('{ws.mode}')",
                ws.title,
                id=f"workspace.{ws.mode}",
                tooltip=ws.help,
                show=False,  # the workspace bar at the top shows these keys, and takes clicks
            )
        )
    result.append(
        Binding(
            "ctrl+t",
            "toggle_sunlight",
            "Sunlight",
            id="app.sunlight",
            tooltip=f"{SUNLIGHT_THEME}: {SUNLIGHT_ABOUT}",
            show=False,  # the footer's room goes to Quit and the workspace's keys; Help lists it
        )
    )
    result.append(_quit_binding())
    return result


# -- Help and README ------------------------------------------------------------------------
def _workspaces() -> tuple[_Workspace, ...]:
    from fieldkit.tui.workspaces import WORKSPACES

    return WORKSPACES


def _sentence(text: str) -> str:
    return f"{text[:1].upper()}{text[1:]}"


def help_markdown() -> str:
    """The Keys part of the Help page, as Markdown lists (a table's key column is cut to
    "Ctrl…" on a phone terminal, so lists, which wrap). Every claim in it is read off the
    table: which workspaces use each key, and which text-field keys the Ctrl keys take."""
    lines = [*_mapping_lines(), "", "## Places", ""]
    lines.append(f"- **{display(PLACES['help'])} Help**: this page (Esc closes it)")
    for ws in _workspaces():
        lines.append(f"- **{display(place_key(ws.mode))} {ws.title}**: {ws.help}")
    lines += ["", "## The same everywhere", ""]
    for k in COMMON:
        if _used(k):
            where = _where(k.name)
            tail = f"; used in {_joined(where)}" if where and k.name != "quit" else ""
            lines.append(f"- **{display(k.key)} {k.label}**: {k.meaning}{tail}")
    lines += [f"- **{display(key)}**: {what}" for _, key, what in GENERAL]
    for mode, title in _used_places():
        lines += ["", f"## {title}", ""]
        lines += [f"- **{display(u.name)}**: {u.does}" for u in uses(mode)]
    return "\n".join(lines) + "\n"


#: Short names of the entries of USES that are not workspaces, for "in Budget, Meter, ...".
_SUB_NAMES = {"jobs_picker": "the job picker", "jobs_today": "End of day"}


def _where(name: str) -> list[str]:
    """The workspaces (then the pickers and views) that use key ``name``, in the bar's order."""
    titles = {ws.mode: ws.title for ws in _workspaces()}
    found = [t for m, t in titles.items() if any(u.name == name for u in uses(m))]
    found += [
        t for m, t in _SUB_NAMES.items() if m not in titles and any(u.name == name for u in uses(m))
    ]
    return found


def _joined(words: list[str], last: str = "and") -> str:
    return words[0] if len(words) == 1 else ", ".join(words[:-1]) + f" {last} " + words[-1]


def _mapping_lines() -> list[str]:
    """How the mapping works, said from the table: the places, which Ctrl keys a workspace
    leaves unused, and what a text field gives up to them."""
    modes = [ws.mode for ws in _workspaces()]
    first, last = _workspaces()[0], _workspaces()[-1]
    ctrl_is = f"{CTRL} is the Ctrl key: {display('ctrl+s')} means hold Ctrl and press S."
    places = (
        f"Function keys go to a place: {display(PLACES['help'])} Help, "
        f"{display(place_key(first.mode))} {first.title} to "
        f"{display(place_key(last.mode))} {last.title}."
    )
    ctrl = (
        "Ctrl+letter keys act where you are. Each one has a single meaning, listed below with "
        "the workspaces that use it; a workspace with nothing for a key leaves it unused "
        "rather than giving it another meaning."
    )
    alt = [
        k for k in LOCAL if k.key.startswith("alt+") and any(_where_in(k.name, m) for m in modes)
    ]
    lines = [ctrl_is, "", f"{places} {ctrl}"]
    if alt:
        keys_ = _joined([display(k.key) for k in alt])
        lines += ["", f"Alt+letter keys ({keys_}) go to a field of the set-up; Enter goes back."]
    taken = _taken_from_fields()
    if taken:
        lines += ["", taken]
    return lines


def _where_in(name: str, mode: str) -> bool:
    return any(u.name == name for u in uses(mode))


def _taken_from_fields() -> str:
    """What a text field's own Ctrl keys become: read off Textual's Input bindings."""
    from textual.widgets import Input

    ours = {
        _BY_NAME[u.name].key
        for us in USES.values()
        for u in us
        if u.action is not None and _BY_NAME[u.name].key.startswith("ctrl+")
    }
    instead: list[tuple[str, str]] = []  # (our ctrl key, the field's other key for it)
    lost: list[tuple[str, str]] = []  # (our ctrl key, what the field did with it)
    for b in Input.BINDINGS:
        if not isinstance(b, Binding):
            continue
        names = [k.strip() for k in b.key.split(",")]
        for key in names:
            if key in ours:
                other = [n for n in names if n != key and "+" not in n]
                if other:
                    instead.append((key, other[0]))
                else:
                    lost.append((key, b.description[:1].lower() + b.description[1:]))
    if not instead and not lost:
        return ""
    text = "Ctrl keys act even while you type in a field."
    if instead:
        text += (
            f" Where this page gives {_joined([display(k) for k, _ in instead], 'or')} a use, "
            f"a text field there takes {_joined([display(o) for _, o in instead])} instead"
        )
        text += "; " if lost else "."
    else:
        text += " Where this page gives a key a use, a text field there "
    if lost:
        gone = _joined([f"{display(k)} ({what})" for k, what in lost])
        text += f"{'it ' if instead else ''}gives up its own {gone} the same way."
    return text


def _used(key: Key) -> bool:
    """Quit, or a key some workspace uses (a key kept for a workspace being built is not shown)."""
    return key.name == "quit" or any(u.name == key.name for us in USES.values() for u in us)


def _used_places() -> list[tuple[str, str]]:
    places: list[tuple[str, str]] = []
    for ws in _workspaces():
        mode, title = ws.mode, ws.title
        places.append((mode, f"{title} ({display(place_key(mode))})"))
        places += [(sub, t) for sub, t in _SUB_TITLES.items() if sub.startswith(mode + "_")]
    return [(m, t) for m, t in places if uses(m)]


def _cell(text: str) -> str:
    return text.replace("|", "\\|")


def readme_tables() -> str:
    """The README's key tables: the places, then each key by workspace (— where unused)."""
    workspaces = _workspaces()
    lines = [
        "| key | workspace | what it is for |",
        "|---|---|---|",
        f"| {display(PLACES['help'])} | Help | keys and the safety cautions; Esc closes |",
    ]
    for ws in workspaces:
        key = display(place_key(ws.mode))
        lines.append(f"| {key} | {ws.title} | {_cell(ws.help)} |")
    modes = [ws.mode for ws in workspaces]
    titles = [ws.title for ws in workspaces]
    lines += [
        "",
        "| key | means | " + " | ".join(titles) + " |",
        "|---|---|" + "---|" * len(titles),
    ]
    for entry in (*COMMON, *LOCAL):
        cells = []
        for mode in modes:
            here = [u.does for u in uses(mode) if u.name == entry.name]
            if entry.name == "quit":
                here = ["quit"]
            cells.append(_cell("; ".join(here)) if here else "—")
        if all(c == "—" for c in cells):
            continue
        lines.append(
            f"| {display(entry.key)} | {_cell(entry.meaning)} | " + " | ".join(cells) + " |"
        )
    general = "; ".join(f"{display(key)} {what}" for _, key, what in GENERAL)
    lines += ["", f"Everywhere: {general}."]
    return "\n".join(lines) + "\n"


README_START = "<!-- keys: generated by fieldkit/tui/keys.py; do not edit by hand -->"
README_END = "<!-- keys: end -->"


def readme_with_tables(readme: str) -> str:
    """README text with the block between the markers replaced by ``readme_tables()``."""
    start = readme.index(README_START) + len(README_START)
    end = readme.index(README_END)
    return readme[:start] + "\n" + readme_tables() + readme[end:]


def main(argv: list[str]) -> int:
    """``python -m fieldkit.tui.keys README.md`` rewrites the README's key tables."""
    if len(argv) != 1:
        print("usage: python -m fieldkit.tui.keys README.md", file=sys.stderr)
        return 2
    path = Path(argv[0])
    path.write_text(readme_with_tables(path.read_text(encoding="utf-8")), encoding="utf-8")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
