"""The readings grid of the meter workspace: fibres as rows, wavelength x direction as columns.

A light :class:`~textual.widgets.DataTable` (one widget, not an Input per cell): typing goes into
the workspace's single entry field, and the grid only shows values and where the cursor is.
"""

from __future__ import annotations

from collections.abc import Callable

from rich.text import Text
from textual import events
from textual.coordinate import Coordinate
from textual.geometry import Size
from textual.message import Message
from textual.reactive import Reactive
from textual.widgets import DataTable, Input

from fieldkit.tui.meter_session import GridColumn

__all__ = ["EntryInput", "GridColumn", "ReadingsGrid"]


class ReadingsGrid(DataTable[Text]):
    """Fibres 1..N as rows; losses in dB in the cells, marked when they fail or look wrong."""

    DEFAULT_CSS = """
    ReadingsGrid {
        height: 1fr;
        min-height: 4;
    }
    """

    def __init__(self, *, id: str | None = None) -> None:  # noqa: A002 - Textual's own name
        super().__init__(
            id=id, cursor_type="cell", zebra_stripes=True, show_row_labels=False, fixed_columns=1
        )
        self.columns_shown: list[GridColumn] = []
        self.fibres = 0

    def set_layout(
        self, fibres: int, columns: list[GridColumn], cells: dict[tuple[int, str], Text]
    ) -> None:
        """Rebuild the grid for ``fibres`` rows and ``columns``, filled from ``cells``."""
        self.clear(columns=True)
        self.fibres = fibres
        self.columns_shown = list(columns)
        self.add_column(Text("Fibre"), key="fibre", width=5)
        for column in columns:
            self.add_column(Text(column.heading), key=column.key, width=9)
        blank = Text("")
        for fibre in range(1, fibres + 1):
            row = [Text(str(fibre), justify="right")]
            row += [cells.get((fibre, c.key), blank) for c in columns]
            self.add_row(*row, key=str(fibre))

    def show(self, fibre: int, column: GridColumn, text: Text) -> None:
        """Change one cell (no-op for a fibre or column not shown)."""
        if not 1 <= fibre <= self.fibres or column not in self.columns_shown:
            return
        self.update_cell_at(Coordinate(fibre - 1, self.columns_shown.index(column) + 1), text)

    def point_at(self, fibre: int, column: GridColumn) -> None:
        """Put the cursor on a cell and scroll it into view."""
        if not 1 <= fibre <= self.fibres or column not in self.columns_shown:
            return
        self.move_cursor(row=fibre - 1, column=self.columns_shown.index(column) + 1, scroll=True)


class EntryInput(Input):
    """The one-line entry field of the grid: Enter takes the reading and empties the field.

    The field is emptied at once, in the key handler, so keys typed ahead while the screen is
    still handling the previous reading land in the empty field, in order. Text the ``check``
    callable refuses stays in the field (nothing typed is lost) and is reported all the same.

    Textual's Input sets its virtual size to the text width on every keystroke, and that
    reactive asks for a layout of the whole screen, which on a screen holding a 144-row table
    costs more than the keystroke itself. This field has a fixed size (CSS ``height: 1``,
    ``width: 1fr``) and no scrollbars, so a repaint is enough.
    """

    virtual_size: Reactive[Size] = Reactive(Size(0, 0), layout=False, repaint=True)

    class Entered(Message):
        """Enter was pressed: ``value`` is what the field held, ``accepted`` whether it was
        taken (and the field emptied)."""

        def __init__(self, entry: EntryInput, value: str, accepted: bool) -> None:
            super().__init__()
            self.entry = entry
            self.value = value
            self.accepted = accepted

        @property
        def control(self) -> EntryInput:
            return self.entry

    def __init__(
        self, *args: object, check: Callable[[str], bool] | None = None, **kwargs: object
    ) -> None:
        super().__init__(*args, **kwargs)  # type: ignore[arg-type]
        self._check = check

    async def _on_key(self, event: events.Key) -> None:
        if event.key == "enter":
            # Taken here, in key order: as a binding, Enter would run only after the key event
            # bubbled up to the app, by which time keys typed ahead are already in the field.
            event.stop()
            event.prevent_default()
            await self.action_submit()
            return
        await super()._on_key(event)

    async def action_submit(self) -> None:
        value = self.value
        accepted = self._check(value) if self._check is not None else True
        if accepted:
            self.value = ""
        self.post_message(self.Entered(self, value, accepted))
