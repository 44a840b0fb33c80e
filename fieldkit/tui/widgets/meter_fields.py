"""The meter workspace's set-up fields (method, wavelengths, fibres, directions, reference,
limit) and, folded, the reference details with the invisible-light caution.

Each field is a label, a one-line quantity input with the field's id, and an error line under
it (``#<id>-error``) that shows only when the field refuses what was typed.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.app import ComposeResult
from textual.containers import Grid, Horizontal, Vertical
from textual.widgets import Collapsible, Input, Label, Static

from fieldkit import safety
from fieldkit.tui import keys
from fieldkit.tui.meter_session import DIRECTION_WORDS
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS
from fieldkit.tui.widgets.readings_grid import EntryInput

_COLUMNS = f"{keys.display('column_previous')}/{keys.display('column_next')[len(keys.CTRL) :]}"
#: The keys, in the entry line's message until a reading or an error takes it.
KEYS_HINT = (
    f"Enter: next fibre · ↑↓ PgUp PgDn: fibres · {_COLUMNS}: columns · "
    f"{keys.hint('remove')}: remove · click a cell"
)
#: The same keys in one line of a phone terminal, where rows go to the grid.
KEYS_HINT_NARROW = f"Enter/↑↓ fibre · {_COLUMNS} col · {keys.hint('remove')} remove"

#: The set-up fields: (label, id, value, tooltip, placeholder).
SETUP = (
    ("Method", "method", "one-cord", "one-cord, two-cord or three-cord (TIA Method B, A or C)", ""),
    ("Wavelength", "wavelengths", "1310 1550", "Test wavelengths, e.g. 1310 1550 or 850 1300", ""),
    ("Fibres", "fibres", "12", "Number of fibres in the cable", ""),
    (
        "Directions",
        "directions",
        "1",
        "1: A->B only; 2: both directions (each its own reference)",
        "",
    ),
    ("Ref", "reference", "", "Reference level of this column: dBm, or µW, nW, mW", "dBm"),
    (
        "Limit",
        "limit",
        "",
        "Largest loss allowed at this wavelength, dB; empty: from the link's budget, counting "
        "the method's end connections",
        "",
    ),
)
DETAILS = (
    ("Source", "source", "Light source identifier"),
    ("Meter", "meter", "Power meter identifier"),
    ("Cords", "cords", "Reference cords used, separated by commas"),
    ("Launch", "launch", "Launch condition (multimode), e.g. encircled flux"),
    (
        "Src out",
        "source-level",
        "What the source should deliver through a good cord, dBm (default -20 multimode, -7 "
        "single-mode; common practice)",
    ),
    ("By", "by", "Who takes the readings"),
)


def setup_fields() -> ComposeResult:
    """The set-up grid, then the folded reference details."""
    with Grid(id="meter-setup"):
        for label, field_id, value, tooltip, placeholder in SETUP:
            yield from field(label, field_id, value, tooltip, placeholder)
    with Collapsible(title="Reference details", id="meter-details", collapsed=True):
        with Grid(id="meter-details-grid"):
            for label, field_id, tooltip in DETAILS:
                yield from field(label, field_id, "", tooltip)
        yield Static(safety.INVISIBLE_LIGHT, classes="caution", id="meter-caution")


def entry_line(check: Callable[[str], bool], typed: Callable[[str], None]) -> ComposeResult:
    """Where the cursor is, the one entry field of the grid, and the message under it."""
    with Horizontal(id="meter-entry"):
        yield Label("", id="entry-where")
        yield EntryInput(
            placeholder="reading, dBm",
            type="text",
            restrict=QUANTITY_CHARS,
            compact=True,
            id="reading",
            check=check,
            typed=typed,
            tooltip="Type the reading and press Enter; Up/Down move between fibres, "
            f"{_COLUMNS} between columns",
        )
    yield Static("", id="entry-message", classes="field-note")


def field(
    label: str, field_id: str, value: str, tooltip: str, placeholder: str = ""
) -> ComposeResult:
    with Vertical(classes="meter-field", id=f"{field_id}-box"):
        with Horizontal():
            yield Label(label, classes="meter-label")
            yield Input(
                value=value,
                type="text",
                restrict=QUANTITY_CHARS,
                compact=True,
                id=field_id,
                tooltip=tooltip,
                placeholder=placeholder,
            )
            if field_id == "directions":
                # What the number means, beside it: "1 A→B", "2 both".
                yield Label(DIRECTION_WORDS["1"], classes="meter-meaning", id=f"{field_id}-meaning")
        yield Static("", classes="field-error", id=f"{field_id}-error")
