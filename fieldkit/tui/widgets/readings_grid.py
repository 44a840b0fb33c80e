"""The readings grid of the meter workspace: fibres as rows, wavelength x direction as columns.

A light :class:`~textual.widgets.DataTable` (one widget, not an Input per cell): typing goes into
the workspace's single entry field, and the grid only shows values and where the cursor is.
"""

from __future__ import annotations

from collections.abc import Callable

from rich.segment import Segment
from rich.style import Style
from rich.text import Text
from textual import events
from textual.cache import LRUCache
from textual.coordinate import Coordinate
from textual.geometry import Size
from textual.message import Message
from textual.reactive import Reactive
from textual.widgets import DataTable, Input
from textual.widgets.data_table import ColumnKey, RowKey

from fieldkit.tui.meter_session import GridColumn, MeterSession

__all__ = ["EntryInput", "GridColumn", "ReadingsGrid"]

SegmentLines = list[list[Segment]]
#: A cursor position outside every cell (the header's row label is (-1, -1)).
_NOWHERE = Coordinate(-2, -2)


def _cell(session: MeterSession, fibre: int, column: GridColumn) -> Text:
    shown = session.cell_text(fibre, column)
    return Text("") if shown is None else Text(shown[0], style=shown[1], justify="right")


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
        self.header_height = 2
        self.columns_shown: list[GridColumn] = []
        self.fibres = 0
        self._row_versions: dict[RowKey, int] = {}
        self._cell_versions: dict[tuple[RowKey, ColumnKey], int] = {}
        self._fast_cells: LRUCache[tuple[object, ...], SegmentLines] = LRUCache(4000)
        self._scrolled_column = -1

    def set_layout(
        self, fibres: int, columns: list[GridColumn], cells: dict[tuple[int, str], Text]
    ) -> None:
        """Rebuild the grid for ``fibres`` rows and ``columns``, filled from ``cells``."""
        self.clear(columns=True)
        self._row_versions.clear()
        self._cell_versions.clear()
        self._fast_cells.clear()
        self._scrolled_column = -1
        self.fibres = fibres
        self.columns_shown = list(columns)
        # The cells are losses in dB (the entry prompt's levels are dBm): the unit under each
        # head (review F1 #3), in the header's second line.
        self.add_column(Text("Fibre\n"), key="fibre", width=5)
        for column in columns:
            self.add_column(Text(f"{column.heading}\n loss dB"), key=column.key, width=9)
        blank = Text("")
        for fibre in range(1, fibres + 1):
            row = [Text(str(fibre), justify="right")]
            row += [cells.get((fibre, c.key), blank) for c in columns]
            self.add_row(*row, key=str(fibre))

    def draw(self, session: MeterSession) -> None:
        """Build the grid for the session's fibres and columns, with its readings."""
        columns = session.grid_columns()
        cells: dict[tuple[int, str], Text] = {}
        for column in columns:
            for fibre in range(1, session.fibres + 1):
                text = _cell(session, fibre, column)
                if text.plain:
                    cells[(fibre, column.key)] = text
        self.set_layout(session.fibres, columns, cells)
        self.point_at(session.fibre, session.active_column)

    def draw_cell(
        self, session: MeterSession, fibre: int, wavelength_nm: float, direction: str
    ) -> None:
        """Show one reading again, and its fibre's average with two directions."""
        for column in (GridColumn(wavelength_nm, direction), GridColumn(wavelength_nm, None)):
            self.show(fibre, column, _cell(session, fibre, column))

    def show(self, fibre: int, column: GridColumn, text: Text) -> None:
        """Change one cell (no-op for a fibre or column not shown); only its row is drawn again.

        DataTable's ``update_cell`` counts an update that every render cache is keyed by, so the
        next frame renders every visible cell again. Here the cell's row gets a version of its
        own instead (see :meth:`_render_line_in_row`), and the other rows keep their renders.
        """
        if not 1 <= fibre <= self.fibres or column not in self.columns_shown:
            return
        row_key = self._row_locations.get_key(fibre - 1)
        column_key = self._column_locations.get_key(self.columns_shown.index(column) + 1)
        if row_key is None or column_key is None:
            return
        if self._data[row_key][column_key] == text:
            return
        self._data[row_key][column_key] = text
        self._row_versions[row_key] = self._row_versions.get(row_key, 0) + 1
        cell = (row_key, column_key)
        self._cell_versions[cell] = self._cell_versions.get(cell, 0) + 1
        self._line_cache.clear()  # keyed by line, not by row: cheap to build from row renders
        self.refresh_row(fibre - 1)

    def _render_line_in_row(
        self,
        row_key: RowKey,
        line_no: int,
        base_style: Style,
        cursor_location: Coordinate,
        hover_location: Coordinate,
    ) -> tuple[SegmentLines, SegmentLines]:
        # A row draws the same wherever the cursor is when the cursor is not in it: one cache
        # entry for it, not one per cursor position (every move used to draw every row again).
        row_index = self._row_locations.get(row_key) if row_key in self._row_locations else -1
        if cursor_location.row != row_index:
            cursor_location = _NOWHERE
        if hover_location.row != row_index:
            hover_location = _NOWHERE
        # The caches below this are keyed by the table's update count; a row's own version
        # stands in for it, so a cell shown again redraws its row only.
        count = self._update_count
        self._update_count = (count, row_key, self._row_versions.get(row_key, 0))  # type: ignore[assignment]
        try:
            return super()._render_line_in_row(
                row_key, line_no, base_style, cursor_location, hover_location
            )
        finally:
            self._update_count = count

    def _clear_caches(self) -> None:
        super()._clear_caches()  # the styles or the theme changed, or the table was cleared
        if hasattr(self, "_fast_cells"):
            self._fast_cells.clear()

    def _render_cell(
        self,
        row_index: int,
        column_index: int,
        base_style: Style,
        width: int,
        cursor: bool = False,
        hover: bool = False,
    ) -> SegmentLines:
        # Within a row drawn again, a cell that did not change keeps its render: its own
        # version stands in for the update count (the fibre number is not drawn per reading).
        count = self._update_count
        if row_index < 0 or column_index < 0:
            return super()._render_cell(row_index, column_index, base_style, width, cursor, hover)
        row_key = self._row_locations.get_key(row_index)
        column_key = self._column_locations.get_key(column_index)
        if row_key is None or column_key is None:
            return super()._render_cell(row_index, column_index, base_style, width, cursor, hover)
        version = self._cell_versions.get((row_key, column_key), 0)
        key: tuple[object, ...] = (row_key, column_key, base_style, cursor, hover, width)
        key += (self._show_hover_cursor, count[0] if isinstance(count, tuple) else count)
        key += (version, self._pseudo_class_state)
        lines = self._fast_cells.get(key)
        if lines is None:
            lines = self._fast_cells[key] = self._cell_lines(
                row_index,
                column_index,
                self._data[row_key][column_key],
                base_style,
                width,
                cursor,
                hover,
            )
        return lines

    def _cell_lines(
        self,
        row_index: int,
        column_index: int,
        cell: Text,
        base_style: Style,
        width: int,
        cursor: bool,
        hover: bool,
    ) -> SegmentLines:
        """One line of a cell, as DataTable draws it (padding, the cell's style between the
        table's row and cursor styles) without Rich's layout of a one-line text, which cost
        a reading more than the rest of its drawing. A right-justified text keeps its
        trailing spaces (Rich strips them), so the losses line up above their marks."""
        component_style, post_style = self._get_styles_to_render_cell(
            False,
            False,
            column_index < self.fixed_columns,
            hover,
            cursor,
            self.show_cursor,
            self._show_hover_cursor,
            self.cursor_foreground_priority == "css",
            self.cursor_background_priority == "css",
        )
        pre = base_style + Style.from_meta({"row": row_index, "column": column_index})
        pre += component_style
        pad = self.cell_padding
        inner = width - 2 * pad
        text = cell.plain
        own = self.app.console.get_style(cell.style) if cell.style else Style.null()
        if len(text) > inner or "\n" in text or cell.spans:
            return super()._render_cell(row_index, column_index, base_style, width, cursor, hover)
        shown = text.rjust(inner) if cell.justify == "right" else text.ljust(inner)
        blank = Segment(" " * pad, pre + post_style)
        return [[blank, Segment(shown, pre + own + post_style), blank]]

    def column_at(self, grid_column: int) -> GridColumn | None:
        """The session's column shown in grid column ``grid_column`` (0 is the fibre numbers:
        None, as for a column past the last)."""
        shown = self.columns_shown
        return shown[grid_column - 1] if 0 < grid_column <= len(shown) else None

    def point_at(self, fibre: int, column: GridColumn) -> None:
        """Put the cursor on a cell and scroll it into view."""
        if not 1 <= fibre <= self.fibres or column not in self.columns_shown:
            return
        target = Coordinate(fibre - 1, self.columns_shown.index(column) + 1)
        if target == self.cursor_coordinate:
            self.scroll_to_cursor()
            return
        # A move made here is no user's pick of a cell: no CellHighlighted message to build
        # and bubble through the screen (DataTable's watcher would also scroll twice). Only the
        # two cells are drawn again.
        old = self.cursor_coordinate
        self.set_reactive(DataTable.cursor_coordinate, target)
        self.refresh_coordinate(old)
        self.refresh_coordinate(target)
        self._scroll_cursor_into_view()

    def _scroll_cursor_into_view(self, animate: bool = False) -> None:
        # Moving down a column, the cursor is nearly always in view already: skip the work of
        # finding its region then (the column must be the one last scrolled to).
        row, column = self.cursor_coordinate
        top = int(self.scroll_y)
        rows_shown = self.scrollable_content_region.height - (1 if self.show_header else 0)
        same_column = column == getattr(self, "_scrolled_column", -1)
        if same_column and top <= row < top + rows_shown:
            return
        self._scrolled_column = column
        super()._scroll_cursor_into_view(animate=animate)

    def scroll_to_cursor(self) -> None:
        """Scroll the cursor's cell into view (after the grid's height changed, say)."""
        if self.row_count:
            self._scrolled_column = -1
            self.call_after_refresh(self._scroll_cursor_into_view)


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
        self,
        *args: object,
        check: Callable[[str], bool] | None = None,
        typed: Callable[[str], None] | None = None,
        **kwargs: object,
    ) -> None:
        """``check``: whether Enter may take the text. ``typed``: called with the text after
        each character typed, instead of an ``Input.Changed`` message bubbling up through the
        screen (which cost a reading more than the grid's own work); emptying the field on
        Enter posts none either. Other changes (a paste, Backspace, a value set in code) still
        post ``Changed``."""
        super().__init__(*args, **kwargs)  # type: ignore[arg-type]
        self._check = check
        self._typed = typed

    async def _on_key(self, event: events.Key) -> None:
        if event.key == "enter":
            # Taken here, in key order: as a binding, Enter would run only after the key event
            # bubbled up to the app, by which time keys typed ahead are already in the field.
            event.stop()
            event.prevent_default()
            await self.action_submit()
            return
        if self._typed is None or not event.is_printable:
            await super()._on_key(event)
            return
        before = self.value
        with self.prevent(Input.Changed):
            await super()._on_key(event)
        if self.value != before:
            self._typed(self.value)

    async def action_submit(self) -> None:
        value = self.value
        accepted = self._check(value) if self._check is not None else True
        if accepted:
            if self._typed is None:
                self.value = ""
            else:
                with self.prevent(Input.Changed):
                    self.value = ""
        self.post_message(self.Entered(self, value, accepted))
