"""What the meter workspace shows of its session outside the grid: the set-up fields (the active
column's texts, errors beside the fields, the note under them, the folded one-line set-up) and
the entry line (where the cursor is, the message under it), and the summary beside the grid.

Plain helpers over the screen's widgets, found once: the screen wires keys and events to the
session and calls these to show the result. The text itself comes from
:class:`~fieldkit.tui.meter_session.MeterSession`.
"""

from __future__ import annotations

from collections.abc import Callable

from textual.dom import DOMNode
from textual.timer import Timer
from textual.widget import Widget
from textual.widgets import Collapsible, Input, Static

from fieldkit.actions.meter import ReferenceDetails
from fieldkit.tui import keys
from fieldkit.tui.meter_session import GridColumn, MeterSession
from fieldkit.tui.wrapped import Wrapped


class _Widgets:
    """``query_one`` remembered: the screen's widgets stay mounted, and a query walks the whole
    screen (per keystroke it cost more than the grid's own work)."""

    def __init__(self, root: DOMNode) -> None:
        self._root = root
        self._found: dict[str, Widget] = {}

    def __call__(self, selector: str) -> Widget:
        found = self._found.get(selector)
        if found is None:
            found = self._found[selector] = self._root.query_one(selector)
        return found

    def input(self, field_id: str) -> Input:
        found = self(f"#{field_id}")
        assert isinstance(found, Input)
        return found

    def static(self, selector: str) -> Static:
        found = self(selector)
        assert isinstance(found, Static)  # a Label is a Static too
        return found


class SetupView:
    """The set-up fields and the note under them."""

    def __init__(self, root: DOMNode, session: MeterSession) -> None:
        self.one = _Widgets(root)
        self.session = session
        self._synced: GridColumn | None = None

    @property
    def details_open(self) -> bool:
        details = self.one("#meter-details")
        assert isinstance(details, Collapsible)
        return not details.collapsed

    def tab_from(self, focused: Widget | None) -> Widget | None:
        """Focus the field Tab goes to from ``focused``; None: the next in order (not done)."""
        if focused is None or not focused.id:
            return None
        to = self.session.tab_from(focused.id, details_open=self.details_open)
        if to is None:
            return None
        widget = self.one(f"#{to}")
        widget.focus()
        return widget

    def error(self, field_id: str, message: str) -> None:
        """The field's error beside it (empty: none)."""
        error = self.one.static(f"#{field_id}-error")
        error.update(message)
        error.display = bool(message)

    def fill(self, texts: dict[str, str]) -> None:
        """Set-up fields' new texts, by field id (the Changed events this causes find the
        session's state already matching)."""
        for field_id, value in texts.items():
            self.one.input(field_id).value = value

    def meaning(self, words: str) -> None:
        self.one.static("#directions-meaning").update(words)

    def placeholder(self, narrow: bool) -> None:
        self.one.input("limit").placeholder = self.session.limit_placeholder(narrow)

    def sync_column(self, *, narrow: bool, force: bool = False) -> bool:
        """Show the active column's reference and its wavelength's limit in the fields, only
        when the column changed (or ``force``): the fields are never rewritten under text the
        user is typing for the same column. True when the note changed height."""
        s = self.session
        column = s.active_column
        if force or column != self._synced:
            self._synced = column
            # The Changed events these cause find the texts already stored: no-ops.
            self.one.input("reference").value = s.ref_text.get(column.measured, "")
            self.one.input("limit").value = s.limit_text.get(column.wavelength_nm, "")
            self.error("reference", "")
            self.error("limit", "")
        self.one.static("#reference-box Label").update(s.reference_label())
        self.placeholder(narrow)
        return self.note(narrow=narrow)

    def note(self, *, narrow: bool) -> bool:
        """The note under the set-up; True when it changed height (the grid's rows move)."""
        text, source_error = self.session.reference_note(
            narrow=narrow,
            source_text=self.one.input("source-level").value,
            launch=self.one.input("launch").value,
            details_open=self.details_open,
        )
        if source_error is not None:
            self.error("source-level", source_error)
        widget = self.one.static("#reference-note")
        moved = len(str(widget.render()).splitlines()) != len(text.splitlines())
        widget.update(text)
        return moved

    def line(self, width: int) -> None:
        """The set-up in one line (shown while readings are typed at 44 columns)."""
        self.one.static("#setup-line").update(self.session.setup_line(width), layout=False)

    def details(self, operator: Callable[[], str]) -> ReferenceDetails:
        """Who set the reference and with what, from the Reference details fields."""

        def text(field_id: str) -> str:
            return self.one.input(field_id).value.strip()

        return ReferenceDetails(
            source_id=text("source"),
            meter_id=text("meter"),
            cords=tuple(c.strip() for c in text("cords").split(",") if c.strip()),
            launch_condition=text("launch") or None,
            # The operator unless another name is typed for this session.
            by=text("by") or operator(),
        )


class EntryView:
    """The entry line: where the reading goes, and the message under it."""

    def __init__(self, root: DOMNode, session: MeterSession) -> None:
        self.one = _Widgets(root)
        self.session = session
        self.said = ""  # the last message
        self._shown = ""  # what the message shows (a standing problem above it)
        self._typing: str | None = None  # the problem of the reading being typed, said

    def where(self, narrow: bool) -> None:
        where, placeholder = self.session.entry_where(narrow)
        self.one.static("#entry-where").update(where, layout=False)
        self.one.input("reading").placeholder = placeholder
        if self.session.reference_arrived() and self.said.startswith("Set the reference"):
            self.say("", narrow=narrow)  # stale: the column has its reference now

    def typed(self, problem: str | None) -> str | None:
        """What to say while a reading is typed: its problem; "" once the problem shown is
        gone (the field cleared or corrected); None: keep the message."""
        if problem is not None:
            self._typing = problem
            return problem
        stale, self._typing = self._typing is not None and self.said == self._typing, None
        return "" if stale else None

    def say(self, text: str | None, *, error: bool = False, narrow: bool = False) -> bool:
        """The message (fixed height: no layout pass per reading; None: keep the text, set the
        error state). A negative loss not yet dealt with stays on its first line, whatever is
        said after it. True when the message changed height on a phone terminal."""
        message = self.one.static("#entry-message")
        if text is not None:
            self.said = text
        problem = self.session.problem_words(short=narrow, besides=self.said)
        error = error or problem is not None
        moved = False
        if message.has_class("field-error") != error:
            message.set_class(error, "field-error")
            moved = narrow  # one row or two: the grid's height changes
        shown = self.said if problem is None else f"{problem}\n{self.said}"
        if shown != self._shown:
            self._shown = shown
            message.update(shown, layout=False)
        return moved


__all__ = ["EntryView", "SetupView"]


class SummaryView:
    """The summary beside the grid: at once (:meth:`show`), or shortly (:meth:`soon`): typing a
    reading a second never waits on it, and a burst of readings costs one refresh."""

    DELAY_S = 0.15

    def __init__(self, root: Widget, session: MeterSession, narrow: Callable[[], bool]) -> None:
        self.one = _Widgets(root)
        self._root = root
        self.session = session
        self._narrow = narrow
        self._timer: Timer | None = None

    @property
    def pending(self) -> bool:
        """True while a refresh waits."""
        return self._timer is not None

    def soon(self) -> None:
        if self._timer is None:
            self._timer = self._root.set_timer(self.DELAY_S, self.show)

    def show(self) -> None:
        if self._timer is not None:
            self._timer.stop()
            self._timer = None
        # On a phone terminal the summary has five rows: each line fits the width (shorter
        # words, fewer worst fibres) rather than wrapping, so both wavelengths' worst show.
        lines = self.session.summary_lines(
            width=42 if self._narrow() else 0, open_key=keys.display("save")
        )
        # Wrapped: a wrapped line keeps its indent, a count or a time is never parted.
        self.one.static("#meter-summary").update(Wrapped("\n".join(lines)), layout=False)
