"""The meter workspace's state as a plain model: the grid, where the cursor is, what was typed,
the references in use, the results and their marks, and the summary. No Textual here; the
screen (:mod:`fieldkit.tui.screens.meter`) lays it out and wires keys to it, and it is tested
at unit speed (``tests/unit/test_meter_session.py``).

The rules that change a job are not repeated here: a reading, a clearing, a limit and a recheck
become typed changes (:class:`~fieldkit.actions.meter.PutReading` and the others) that the
:class:`SaveQueue` holds until :func:`fieldkit.actions.meter.apply_changes` saves them. Marking
results in doubt after a drifted recheck uses the same rule as
:func:`fieldkit.actions.meter.recheck_reference` (:func:`fieldkit.calc.reference.results_in_doubt`
since the last good check), and counting uses :mod:`fieldkit.jobs.counting`.
"""

from __future__ import annotations

import re
import threading
from dataclasses import dataclass, field, replace
from datetime import datetime
from itertools import count as _counter
from typing import TYPE_CHECKING, Any, Literal

from fieldkit import inputs
from fieldkit.actions import meter as meter_log
from fieldkit.actions.meter import (
    ClearReading,
    MeterChange,
    PutReading,
    Recheck,
    ReferenceDetails,
    SetLimit,
)
from fieldkit.calc import reference as ref
from fieldkit.calc.units import InputError
from fieldkit.jobs.counting import Count, Tally, cell_count, fibre_count
from fieldkit.jobs.models import now, result_in_doubt
from fieldkit.jobs.today import counted
from fieldkit.text import meter as meter_text
from fieldkit.text.meter import cell_mark, fit, verdict_words
from fieldkit.text.numbers import arrow, minus

if TYPE_CHECKING:
    from fieldkit.jobs.models import Link

CellKey = tuple[int, float, str]  # (fibre, wavelength nm, direction)
Severity = Literal["information", "warning", "error"]  # of a notification
ColumnKey = tuple[float, str]  # (wavelength nm, direction)

DIRECTION_WORDS = inputs.DIRECTION_WORDS
MAX_WAVELENGTHS = inputs.MAX_WAVELENGTHS

_ids = _counter(1)
#: A reading still being typed: a sign, digits, one decimal point or comma.
_NUMBER_ON_ITS_WAY = re.compile(r"[+\-\u2212]?\d*(?:[.,]\d*)?")


@dataclass(frozen=True, slots=True)
class GridColumn:
    """A column of the grid: a measured direction at a wavelength, or their average."""

    wavelength_nm: float
    direction: str | None  # "A->B" / "B->A"; None for the bidirectional average

    @property
    def key(self) -> str:
        return f"{self.wavelength_nm:g}:{self.direction or 'avg'}"

    @property
    def heading(self) -> str:
        arrow = {"A->B": "A→B", "B->A": "B→A", None: "avg"}[self.direction]
        return f"{self.wavelength_nm:g} {arrow}"

    @property
    def measured(self) -> ColumnKey:
        """The (wavelength, direction) whose reference and readings this column uses."""
        return (self.wavelength_nm, self.direction or "A->B")


@dataclass(slots=True)
class Cell:
    """One reading as entered, with the reference it was taken against."""

    reading_dbm: float
    reference_dbm: float
    at: datetime
    in_doubt: bool = False
    #: The session's id of the column reference it was taken against (see ColumnReference).
    reference_id: str = ""
    id: str = ""

    @property
    def loss_db(self) -> float:
        return ref.insertion_loss_db(self.reference_dbm, self.reading_dbm)


@dataclass(slots=True)
class ColumnReference:
    """The reference in use for one column (wavelength and direction)."""

    level_dbm: float
    set_at: datetime
    last_good_at: datetime
    reference_id: str | None = None  # once saved into the job
    in_doubt: bool = False
    #: This session's id of the reference (cells name it; the job's id comes later).
    local_id: str = field(default_factory=lambda: f"r{next(_ids)}")


def meter_tallies(
    cells: dict[CellKey, Cell],
    limits_db: dict[float, float | None],
    fibres: int,
    directions: list[str],
) -> dict[float, Tally]:
    """The fibres of each wavelength counted by the one rule (:mod:`fieldkit.jobs.counting`)."""
    per_fibre: dict[tuple[float, int], list[Count]] = {}
    for (fibre, w, d), cell in cells.items():
        if fibre > fibres or w not in limits_db or d not in directions:
            continue
        count = cell_count(cell.loss_db, limits_db[w], in_doubt=cell.in_doubt)
        per_fibre.setdefault((w, fibre), []).append(count)
    out = {w: Tally() for w in limits_db}
    for (w, _fibre), counts in per_fibre.items():
        out[w].add(fibre_count(counts))
    return out


# -- the save queue ----------------------------------------------------------------------------
@dataclass
class SaveQueue:
    """Typed changes waiting to go into the job, and how the last save went.

    One saver at a time: :meth:`put` says when a saver should start (none is running);
    the saver takes batches (:meth:`take`), saves each in one job update, reports it
    (:meth:`done`) and ends when :meth:`take` finds nothing left. A failed save leaves its
    batch queued (nothing typed is lost); it goes again with the next entry. Thread-safe: the
    screen's saver is a thread worker.
    """

    pending: list[MeterChange] = field(default_factory=list)
    running: bool = False
    error: str | None = None
    saved_at: datetime | None = None
    _lock: threading.Lock = field(default_factory=threading.Lock, repr=False)

    def put(self, change: MeterChange | None) -> bool:
        """Queue ``change`` (None: nothing new). True when a saver should start now."""
        with self._lock:
            if change is not None:
                self.pending.append(change)
            if self.running or not self.pending:
                return False
            self.running = True
            return True

    def claim(self) -> bool:
        """Become the saver (for a save here and now); False while another one runs."""
        with self._lock:
            if self.running:
                return False
            self.running = True
            return True

    def take(self) -> list[MeterChange]:
        """The saver's next batch: everything queued. Empty: nothing left, the saver ends."""
        with self._lock:
            batch = list(self.pending)
            if not batch:
                self.running = False
            return batch

    def done(self, batch: list[MeterChange], at: datetime) -> None:
        with self._lock:
            del self.pending[: len(batch)]
            self.error = None
            self.saved_at = at

    def failed(self, message: str) -> None:
        """The batch stays queued and the saver ends."""
        with self._lock:
            self.running = False
            self.error = message

    @property
    def unsaved(self) -> int:
        with self._lock:
            return len(self.pending)

    @property
    def busy(self) -> bool:
        with self._lock:
            return self.running


# -- what the screen does after an entry -------------------------------------------------------
@dataclass
class Entered:
    """What Enter in the reading field came to."""

    message: str
    error: bool = False
    cell: CellKey | None = None  # the cell recorded (its text changes)
    change: PutReading | None = None


@dataclass
class FieldChange:
    """What a set-up field's new text changed, for the screen to show."""

    #: The field's error: "" clears it, None leaves it as it is.
    error: str | None = ""
    grid: bool = False  # the columns or the fibres changed: the grid is built again
    note: bool = False  # the reference note and the summary
    #: A limit or the method changed: stored results to judge again (the grid shows it too).
    limits: list[SetLimit] | None = None
    meaning: str | None = None  # the Directions number's meaning beside it

    @property
    def redraw(self) -> bool:
        """True when the grid is drawn again: new columns or fibres, or results judged again."""
        return self.grid or self.limits is not None


#: The set-up fields :meth:`MeterSession.change_field` reads.
SETUP_FIELDS = ("method", "wavelengths", "fibres", "directions", "reference", "limit")


@dataclass
class Moved:
    """After a reading: where the cursor went and what to say about it."""

    message: str | None = None
    column_changed: bool = False


@dataclass
class PendingView:
    """What the grid and the entry line still have to show after the readings just taken:
    typed ahead, a burst of readings is drawn once, with the last one's message."""

    cells: set[CellKey] = field(default_factory=set)
    say: tuple[str | None, bool] | None = None  # (message, is an error); None: nothing new
    pending: bool = False  # a view is already asked for

    def add(self, entered: Entered, moved: Moved) -> bool:
        """Note a reading taken and where the cursor went; True when the screen has to ask
        for a view (none is pending yet)."""
        if entered.cell is not None:
            self.cells.add(entered.cell)
        # where the cursor went speaks over the reading's own message (and its error)
        self.say = (moved.message or entered.message, entered.error and not moved.message)
        asked, self.pending = self.pending, True
        return not asked

    def take(self) -> tuple[list[CellKey], tuple[str | None, bool] | None]:
        """The cells to draw again and what to say (None: nothing); nothing is pending then."""
        cells, say = sorted(self.cells), self.say
        self.cells.clear()
        self.say, self.pending = None, False
        return cells, say


@dataclass
class RecheckDone:
    drift: ref.Drift
    change: Recheck
    doubted: list[CellKey]

    def words(self, column: GridColumn, *, short: bool = False) -> str:
        """What the recheck found; ``short``: one line of 42 columns (under a standing
        problem on a phone terminal)."""
        return meter_text.recheck_words(column.heading, self.drift, short=short)


def history_lines(link: Link, fibre: int) -> list[str]:
    """A fibre's history in the job, oldest first: every result, retests and cleared ones."""
    from fieldkit.jobs.reports import fmt_time, verdict

    return [
        minus(f"{fmt_time(r.at)} {r.wavelength_nm:g} nm {arrow(r.direction)}: {r.loss_db:.2f} dB ")
        + f"{verdict(r)}"
        + (f" ({r.by})" if r.by else "")
        for r in meter_log.fibre_history(link, fibre)
    ] or ["No reading of this fibre is saved in the job yet."]


# -- the session -----------------------------------------------------------------------------
class MeterSession:
    """One meter session: set-up, references, readings, and where the cursor is."""

    def __init__(self) -> None:
        self.method = ref.Method.ONE_CORD
        self.wavelengths: list[float] = [1310.0, 1550.0]
        self.directions: list[str] = ["A->B"]
        self.fibres = 12
        self.cells: dict[CellKey, Cell] = {}
        self.refs: dict[ColumnKey, ColumnReference] = {}
        self.ref_text: dict[ColumnKey, str] = {}
        self.limit_text: dict[float, str] = {}
        self.typed_limits: dict[float, float] = {}
        self.budget_limits: dict[float, tuple[float, str]] = {}
        self.fibre = 1
        self.column_index = 0
        self.job_id: str | None = None
        self.link_id: str | None = None
        self.link_label = ""
        self.link: Link | None = None
        #: Cells whose loss came out negative, not yet retested, removed or re-referenced: the
        #: entry line keeps saying so until they are dealt with.
        self.problems: list[CellKey] = []
        #: The column a reading was refused for, having no reference (its message stands
        #: until the column has one: :meth:`reference_arrived`).
        self.awaiting_reference: ColumnKey | None = None
        self.saves = SaveQueue()

    # -- columns -----------------------------------------------------------------------------
    @property
    def measured_columns(self) -> list[GridColumn]:
        return [GridColumn(w, d) for w in self.wavelengths for d in self.directions]

    def grid_columns(self) -> list[GridColumn]:
        out: list[GridColumn] = []
        for w in self.wavelengths:
            out += [GridColumn(w, d) for d in self.directions]
            if len(self.directions) == 2:
                out.append(GridColumn(w, None))
        return out

    @property
    def active_column(self) -> GridColumn:
        return self.measured_columns[self.column_index]

    @property
    def work_field(self) -> str:
        """The field typing goes to next: the reference while the active column has none,
        else the reading."""
        return "reading" if self.current_reference is not None else "reference"

    def tab_from(self, field_id: str, *, details_open: bool) -> str | None:
        """Where Tab goes from a field (None: the next in order). From Limit, the last set-up
        field: to the readings (or Ref, while the column has none), not onto the folded
        details' title, where what was typed next was lost; open, into their first field."""
        if field_id != "limit":
            return None
        return "source" if details_open else self.work_field

    @property
    def current_reference(self) -> ColumnReference | None:
        return self.refs.get(self.active_column.measured)

    def clamp(self) -> None:
        """Keep the cursor inside the grid after the set-up changed."""
        self.column_index = min(self.column_index, len(self.measured_columns) - 1)
        self.fibre = min(self.fibre, self.fibres)

    # -- limits ------------------------------------------------------------------------------
    def limit_db(self, wavelength_nm: float) -> float | None:
        if wavelength_nm in self.typed_limits:
            return self.typed_limits[wavelength_nm]
        budget = self.budget_limits.get(wavelength_nm)
        return budget[0] if budget else None

    def recompute_budget_limits(self) -> None:
        self.budget_limits.clear()
        if self.link is None:
            return
        for wavelength_nm in self.wavelengths:
            try:
                found = meter_log.budget_limit_db(self.link, wavelength_nm, self.method)
            except InputError:
                found = None
            if found is not None:
                self.budget_limits[wavelength_nm] = found

    def limit_changes(self, wavelength_nm: float | None = None) -> list[SetLimit]:
        """The stored results to judge again after a limit (or the method) changed."""
        targets = [wavelength_nm] if wavelength_nm is not None else self.wavelengths
        return [SetLimit(w, self.limit_db(w), self.method) for w in targets]

    def limit_placeholder(self, narrow: bool) -> str:
        budget = self.budget_limits.get(self.active_column.wavelength_nm)
        # The note above says the limit is the budget's; 44 columns leave 10 for the field.
        if not budget:
            return "dB"
        return f"{budget[0]:.2f} dB" if narrow else f"{budget[0]:.2f} budget"

    # -- the set-up fields (each raises InputError naming the problem) -----------------------
    def set_method(self, text: str) -> None:
        self.method = ref.parse_method(text)
        self.recompute_budget_limits()

    def set_wavelengths(self, text: str) -> bool:
        """True when the wavelengths changed (the grid is rebuilt)."""
        wavelengths = inputs.meter_wavelengths(text)
        if wavelengths == self.wavelengths:
            return False
        active = self.active_column
        self.wavelengths = wavelengths
        columns = self.measured_columns
        self.column_index = columns.index(active) if active in columns else 0
        self.recompute_budget_limits()
        return True

    def set_fibres(self, text: str) -> bool:
        number = inputs.count(text, "fibres")
        if number == self.fibres:
            return False
        self.fibres = number
        self.clamp()
        return True

    def set_directions(self, text: str) -> bool:
        directions = inputs.directions(text)
        if directions == self.directions:
            return False
        active = self.active_column
        self.directions = directions
        columns = self.measured_columns
        self.column_index = columns.index(active) if active in columns else 0
        return True

    def set_reference(self, text: str) -> bool:
        """The Ref field of the active column. False when nothing changed (the field shown
        again for this column). A reference the field cannot read is dropped, so no reading
        is taken against a level the field no longer shows; the InputError says why."""
        key = self.active_column.measured
        if text == self.ref_text.get(key, "") and (key in self.refs) == bool(text.strip()):
            return False
        self.ref_text[key] = text
        if not text.strip():
            self.refs.pop(key, None)
            return True
        try:
            level = ref.level_dbm(text, "reference")
        except InputError:
            self.refs.pop(key, None)
            raise
        current = self.refs.get(key)
        if current is None or abs(current.level_dbm - level) > 1e-9:
            stamp = now()
            self.refs[key] = ColumnReference(level, stamp, stamp)
            # A new reference is the advice for a negative loss: its message has done its work.
            self.problems = [p for p in self.problems if (p[1], p[2]) != key]
        return True

    def set_limit(self, text: str) -> float | None:
        """The Limit field of the active wavelength: the wavelength whose limit changed, or
        None when nothing did (the field shown again for it)."""
        wavelength_nm = self.active_column.wavelength_nm
        if text == self.limit_text.get(wavelength_nm, ""):
            return None
        self.limit_text[wavelength_nm] = text
        if not text.strip():
            self.typed_limits.pop(wavelength_nm, None)
        else:
            self.typed_limits[wavelength_nm] = ref.loss_limit_db(text)
        return wavelength_nm

    def change_field(self, field_id: str, text: str) -> FieldChange | None:
        """A set-up field's text changed (None: not a field of the set-up)."""
        layout = {
            "wavelengths": self.set_wavelengths,
            "fibres": self.set_fibres,
            "directions": self.set_directions,
        }
        try:
            if field_id == "method":
                self.set_method(text)
                return FieldChange(limits=self.limit_changes())
            if field_id in layout:
                changed = layout[field_id](text)
                meaning = DIRECTION_WORDS[text.strip()] if field_id == "directions" else None
                return FieldChange(grid=changed, meaning=meaning)
            if field_id == "reference":
                # False: the field shown again for this column (Ctrl+←/→), nothing typed.
                return FieldChange(note=True) if self.set_reference(text) else FieldChange(None)
            if field_id == "limit":
                wavelength_nm = self.set_limit(text)
                if wavelength_nm is None:  # shown again for this wavelength
                    return FieldChange(None)
                return FieldChange(limits=self.limit_changes(wavelength_nm))
        except InputError as exc:
            return FieldChange(
                str(exc),
                note=field_id == "reference",
                meaning="?" if field_id == "directions" else None,
            )
        if field_id in ("source-level", "launch"):
            return FieldChange(None, note=True)  # the note checks them and says so
        return None

    # -- readings ------------------------------------------------------------------------------
    def reading_acceptable(self, text: str) -> bool:
        """Whether Enter may take this text (a reading, with a reference set, or nothing)."""
        if not text.strip():
            return True
        if self.current_reference is None:
            return False
        try:
            ref.level_dbm(text, "reading")
        except InputError:
            return False
        return True

    def typing_problem(self, text: str) -> str | None:
        """What is wrong with the reading being typed (None: nothing, or not yet: a sign,
        digits and a decimal point are a number on its way, not an error to flash)."""
        if not text.strip() or _NUMBER_ON_ITS_WAY.fullmatch(text.strip()):
            return None
        try:
            ref.level_dbm(text, "reading")
        except InputError as exc:
            return str(exc)
        return None

    def enter(self, text: str, details: ReferenceDetails, *, short: bool = False) -> Entered:
        """A reading typed into the active cell (the text is not empty)."""
        column = self.active_column
        current = self.current_reference
        try:
            reading_dbm = ref.level_dbm(text, "reading")
        except InputError as exc:
            return Entered(str(exc), error=True)
        if current is None:
            self.awaiting_reference = column.measured
            return Entered(
                f"Set the reference for {column.heading} first (the Ref field); "
                "the reading is kept here.",
                error=True,
            )
        stamp = now()
        key = (self.fibre, *column.measured)
        cell = Cell(
            reading_dbm,
            current.level_dbm,
            stamp,
            in_doubt=current.in_doubt,
            reference_id=current.local_id,
            id=f"c{next(_ids)}",
        )
        self.cells[key] = cell
        limit_db = self.limit_db(column.wavelength_nm)
        verdict = ref.judge(cell.loss_db, limit_db)
        if key in self.problems:
            self.problems.remove(key)
        negative = verdict.status is ref.Status.REFERENCE_PROBLEM
        if negative:
            self.problems.append(key)
        change = PutReading(
            self.fibre,
            column.wavelength_nm,
            column.measured[1],
            reading_dbm,
            current.level_dbm,
            self.method,
            limit_db,
            stamp,
            replace(details, set_at=current.set_at),
        )
        return Entered(
            verdict_words(self.fibre, column.heading, verdict, short=short), negative, key, change
        )

    def reference_arrived(self) -> bool:
        """True once: the column a reading was refused for has a reference now (typed, or
        loaded from a job): its "Set the reference ... first" message is stale."""
        if self.awaiting_reference is None or self.awaiting_reference not in self.refs:
            return False
        self.awaiting_reference = None
        return True

    def problem_words(self, *, short: bool = False, besides: str = "") -> str | None:
        """The standing word about negative losses not yet dealt with (None: none, or the
        message ``besides`` it already says it)."""
        if not self.problems:
            return None
        fibre, w, d = self.problems[-1]
        where = f"fibre {fibre} {GridColumn(w, d).heading}"
        if besides.startswith(f"{where}:"):
            return None
        more = f" (+{len(self.problems) - 1} more)" if len(self.problems) > 1 else ""
        if short:
            return fit(42, f"⚠ {where} negative{more}: retest", f"⚠ {where} negative{more}")
        cell = self.cells.get(self.problems[-1])
        loss = minus(f"{cell.loss_db:.2f} dB, ") if cell else ""
        return fit(
            76,
            f"⚠ {where}: {loss}negative{more}. Clean, re-reference, retest (^X removes)",
            f"⚠ {where}: {loss}negative{more}: re-reference, retest",
        )

    def cleared_words(self) -> str:
        """Said after :meth:`clear_cell` took the reading under the cursor."""
        return f"fibre {self.fibre} {self.active_column.heading}: reading removed"

    def clear_cell(self, by: str) -> ClearReading | None:
        """Remove the reading under the cursor (None: there was none)."""
        key = (self.fibre, *self.active_column.measured)
        if self.cells.pop(key, None) is None:
            return None
        if key in self.problems:
            self.problems.remove(key)
        return ClearReading(key[0], key[1], key[2], by=by, at=now())

    def move(self, step: int) -> None:
        self.fibre = min(max(self.fibre + step, 1), self.fibres)

    def column(self, step: int) -> None:
        self.column_index = (self.column_index + step) % len(self.measured_columns)

    def go_to(self, fibre: int, column: GridColumn) -> bool:
        """The cursor to a cell (a click); True when the active column changed."""
        changed = False
        if column.direction is not None and column in self.measured_columns:
            index = self.measured_columns.index(column)
            changed = index != self.column_index
            self.column_index = index
        self.fibre = min(max(fibre, 1), self.fibres)
        return changed

    def next_empty(self) -> Moved:
        """After a reading: the next fibre down; past the last fibre, the first empty fibre of
        this or a following column. When every cell is filled the cursor stays (it never wraps
        onto a filled fibre, where the next number would be a retest)."""
        if self.fibre < self.fibres:
            self.move(1)
            return Moved()
        columns = self.measured_columns
        for offset in range(len(columns)):
            index = (self.column_index + offset) % len(columns)
            column = columns[index]
            for fibre in range(1, self.fibres + 1):
                if (fibre, *column.measured) not in self.cells:
                    changed = index != self.column_index
                    self.column_index = index
                    self.fibre = fibre
                    return Moved(
                        f"Last fibre done; on to the first empty one: fibre {fibre} "
                        f"{column.heading}.",
                        changed,
                    )
        return Moved(
            f"Every fibre has a reading. The cursor stays on fibre {self.fibre}; a number typed "
            "here is a retest (the earlier result is kept as superseded)."
        )

    # -- what cells show -----------------------------------------------------------------------
    def cell_text(self, fibre: int, column: GridColumn) -> tuple[str, str] | None:
        """The text and style of a grid cell (None: empty)."""
        limit_db = self.limit_db(column.wavelength_nm)
        if column.direction is None:
            a = self.cells.get((fibre, column.wavelength_nm, "A->B"))
            b = self.cells.get((fibre, column.wavelength_nm, "B->A"))
            if a is None or b is None:
                return None
            verdict = ref.judge_fibre({"A->B": a.loss_db, "B->A": b.loss_db}, limit_db)
            average_db = verdict.average_db if verdict.average_db is not None else 0.0
            return cell_mark(average_db, verdict.status, a.in_doubt or b.in_doubt)
        cell = self.cells.get((fibre, column.wavelength_nm, column.direction))
        if cell is None:
            return None
        return cell_mark(cell.loss_db, ref.judge(cell.loss_db, limit_db).status, cell.in_doubt)

    def cells_of(self, fibre: int, wavelength_nm: float) -> list[GridColumn]:
        """The grid columns one reading shows in: its own, and the average with two directions."""
        del fibre
        out = [GridColumn(wavelength_nm, d) for d in self.directions]
        if len(self.directions) == 2:
            out.append(GridColumn(wavelength_nm, None))
        return out

    def entry_where(self, narrow: bool) -> tuple[str, str]:
        """The entry line's label and the reading field's placeholder."""
        column = self.active_column
        cell = self.cells.get((self.fibre, *column.measured))
        replace_words = "" if narrow else "; type to replace"  # 21 columns at 44
        placeholder = (
            minus(f"now {cell.reading_dbm:.2f} dBm{replace_words}") if cell else "reading, dBm"
        )
        return f"fibre {self.fibre} {column.heading}", placeholder

    def setup_line(self, width: int) -> str:
        """The set-up in one line (44 columns, while typing readings)."""
        what = (
            f"{self.method.value} {' '.join(f'{w:g}' for w in self.wavelengths)} nm, "
            f"{self.fibres} fibres, {DIRECTION_WORDS[str(len(self.directions))]}"
        )
        return fit(width, f"{what} · Alt+R Ref", f"{what} · Alt+R", what)

    def reference_label(self) -> str:
        column = self.active_column
        arrow = "" if len(self.directions) == 1 else " →" if column.direction == "A->B" else " ←"
        return f"Ref {column.wavelength_nm:g}{arrow}"

    # -- the reference note --------------------------------------------------------------------
    def reference_note(
        self, *, narrow: bool, source_text: str = "", launch: str = "", details_open: bool = False
    ) -> tuple[str, str | None]:
        """The note under the set-up and the source-output field's error (None: no error)."""
        column = self.active_column
        current = self.current_reference
        if current is None:
            note = meter_text.set_reference_note(
                column.heading, narrow=narrow, details_open=details_open
            )
            return note, None
        source_dbm = None
        source_error: str | None = None
        if source_text.strip():
            try:
                source_dbm = ref.level_dbm(source_text, "source output")
                source_error = ""
            except InputError as exc:
                source_error = str(exc)
        else:
            source_error = ""
        warnings = ref.reference_warnings(
            current.level_dbm,
            source_dbm=source_dbm,
            wavelength_nm=column.wavelength_nm,
            launch_condition=launch,
        )
        budget = self.budget_limits.get(column.wavelength_nm)
        from_budget = (
            budget[0] if budget and column.wavelength_nm not in self.typed_limits else None
        )
        note = meter_text.reference_note(
            self.method,
            narrow=narrow,
            budget_limit_db=from_budget,
            drifted=current.in_doubt,
            warnings=warnings,
        )
        return note, source_error

    # -- recheck -------------------------------------------------------------------------------
    def recheck_asked(self) -> tuple[GridColumn, float, float]:
        """What the recheck dialog asks about: the active column, its reference level (dBm)
        and the default drift tolerance at its wavelength (dB, common practice).

        Raises
        ------
        InputError
            The column has no reference to recheck yet.
        """
        column, current = self.active_column, self.current_reference
        if current is None:
            raise InputError(f"No reference set for {column.heading} to recheck.")
        return column, current.level_dbm, ref.default_drift_tolerance_db(column.wavelength_nm)

    def apply_recheck(
        self, column: GridColumn, level_dbm: float, tolerance_db: float, by: str
    ) -> RecheckDone:
        """Compare a recheck with the column's reference; beyond tolerance, mark in doubt the
        readings taken against it since its last good check (the rule of
        :func:`fieldkit.actions.meter.recheck_reference`, through
        :func:`fieldkit.calc.reference.results_in_doubt`)."""
        key = column.measured
        current = self.refs[key]
        drift = ref.reference_drift(current.level_dbm, level_dbm, tolerance_db)
        stamp = now()
        doubted: list[CellKey] = []
        if drift.within:
            current.last_good_at = stamp
        else:
            current.in_doubt = True
            by_id = {cell.id: k for k, cell in self.cells.items() if (k[1], k[2]) == key}
            ids = ref.results_in_doubt(
                [self.cells[k] for k in by_id.values()], [current.local_id], current.last_good_at
            )
            for cell_id in ids:
                self.cells[by_id[cell_id]].in_doubt = True
                doubted.append(by_id[cell_id])
        change = Recheck(
            column.wavelength_nm,
            key[1],
            current.level_dbm,
            self.method,
            level_dbm,
            tolerance_db,
            stamp,
            by=by,
        )
        return RecheckDone(drift, change, doubted)

    # -- the job -------------------------------------------------------------------------------
    @staticmethod
    def read_link(store: Any, job_id: str, link_id: str) -> Link:
        """Job ``job_id``'s link ``link_id`` as the store holds it now.

        Raises
        ------
        InputError
            The job cannot be read or has no such link (the store's words).
        """
        from fieldkit.jobs.store import StoreError

        try:
            link: Link = store.load(job_id).link(link_id)
        except (StoreError, KeyError) as exc:
            raise InputError(str(exc)) from None
        return link

    def attach_from(
        self, store: Any, job_id: str, link_id: str, details: ReferenceDetails
    ) -> tuple[list[MeterChange], dict[str, str]]:
        """:meth:`attach` to the link as the store holds it now.

        Raises
        ------
        InputError
            The job cannot be read or has no such link (nothing changes then).
        """
        return self.attach(job_id, self.read_link(store, job_id, link_id), details)

    def history(self, store: Any) -> tuple[str, list[str]]:
        """The fibre under the cursor's history in the chosen job: the dialog's title and
        :func:`history_lines`.

        Raises
        ------
        InputError
            No job chosen yet, or it cannot be read.
        """
        if self.job_id is None or self.link_id is None:
            raise InputError("no job chosen")
        link = self.read_link(store, self.job_id, self.link_id)
        return f"Fibre {self.fibre} on {link.label}", history_lines(link, self.fibre)

    def attach(
        self, job_id: str, link: Link, details: ReferenceDetails
    ) -> tuple[list[MeterChange], dict[str, str]]:
        """Save into this job's link from now on; load what it already holds. Returns the
        readings typed before a job was chosen, as changes to save into it now (they win over
        the link's), and the set-up fields' new texts."""
        self.job_id, self.link_id, self.link_label = job_id, link.id, link.label
        self.link = link
        typed_before = dict(self.cells)
        fields = self.load_link(link)
        self.recompute_budget_limits()
        self.keep_stored_limits(link)
        changes: list[MeterChange] = []
        for (fibre, w, d), cell in typed_before.items():
            column_ref = self.refs.get((w, d))
            set_at = (
                column_ref.set_at
                if column_ref is not None and abs(column_ref.level_dbm - cell.reference_dbm) < 1e-9
                else cell.at
            )
            changes.append(
                PutReading(
                    fibre,
                    w,
                    d,
                    cell.reading_dbm,
                    cell.reference_dbm,
                    self.method,
                    self.limit_db(w),
                    cell.at,
                    replace(details, set_at=set_at),
                )
            )
        self.clamp()
        return changes, fields

    def keep_stored_limits(self, link: Link) -> None:
        """A wavelength with no limit typed takes the limit its latest stored result was
        judged with (filled into its Limit field), so the grid, the summary and Jobs agree on
        that result's verdict. A stored limit equal to the budget's stays the budget's."""
        for r in sorted(link.results, key=lambda r: r.at, reverse=True):
            w = round(r.wavelength_nm, 3)
            if not r.current or r.limit_db is None or w not in self.wavelengths:
                continue
            if w in self.typed_limits or self.limit_text.get(w, "").strip():
                continue
            budget = self.budget_limits.get(w)
            if budget is not None and abs(budget[0] - r.limit_db) < 1e-9:
                continue
            self.typed_limits[w] = r.limit_db
            self.limit_text[w] = f"{r.limit_db:g}"

    def load_link(self, link: Link) -> dict[str, str]:
        """The link's current results and latest references into the grid (cells typed in
        this session win); returns the set-up fields' new texts."""
        if link.fibre_count:
            self.fibres = max(self.fibres, link.fibre_count) if self.cells else link.fibre_count
        wavelengths = sorted({round(r.wavelength_nm, 3) for r in link.results})
        directions = sorted({r.direction for r in link.results})
        # The latest reference of each column is the one in use.
        local_ids: dict[str, str] = {}
        for reference in sorted(link.references, key=lambda x: x.at, reverse=True):
            if reference.kind != "initial":
                continue
            used = [r.direction for r in link.results if r.reference_id == reference.id]
            direction = used[-1] if used else "A->B"
            column_key = (round(reference.wavelength_nm, 3), direction)
            if column_key not in self.refs:
                column_ref = ColumnReference(
                    reference.level_dbm,
                    reference.at,
                    meter_log.last_good_check(link, reference),
                    reference.id,
                    reference.in_doubt_since is not None,
                )
                self.refs[column_key] = column_ref
                local_ids[reference.id] = column_ref.local_id
                self.ref_text[column_key] = f"{reference.level_dbm:g}"
        for r in sorted(link.results, key=lambda r: r.at, reverse=True):
            if not r.current:
                continue  # a retest or a clearing superseded it; its history stays in the job
            against = link.reference(r.reference_id)
            if r.reading_dbm is None or against is None:
                continue
            key = (r.fibre, round(r.wavelength_nm, 3), r.direction)
            if key not in self.cells:
                self.cells[key] = Cell(
                    r.reading_dbm,
                    against.level_dbm,
                    r.at,
                    in_doubt=result_in_doubt(link, r),
                    reference_id=local_ids.get(against.id, against.id),
                    id=r.id,
                )
        for w in wavelengths:
            if w not in self.wavelengths:
                self.wavelengths.append(w)
        if "B->A" in directions and len(self.directions) == 1:
            self.directions = ["A->B", "B->A"]
        return {
            "wavelengths": " ".join(f"{w:g}" for w in self.wavelengths),
            "fibres": str(self.fibres),
            "directions": str(len(self.directions)),
        }

    def save_notices(self, outcome: meter_log.Applied | str) -> list[tuple[str, Severity]]:
        """What to notify after a save, as (text, severity): why it failed (a ``str``; the
        readings stay queued here and go with the next entry), else each recheck's drift."""
        if isinstance(outcome, str):
            return [
                (
                    f"Readings not saved (kept here; saving again with the next entry): {outcome}",
                    "error",
                )
            ]
        return [(warning, "warning") for warning in self.saved(outcome)]

    def saved(self, outcome: meter_log.Applied) -> list[str]:
        """A save went through: note the job's reference ids; the warnings to show."""
        for (w, d, level), reference_id in outcome.reference_ids.items():
            current = self.refs.get((w, d))
            if current is not None and abs(current.level_dbm - level) < 1e-9:
                current.reference_id = reference_id
        return [
            minus(f"{column}: {drift.message} ({counted(doubted, 'result')} marked in doubt)")
            for column, drift, doubted in outcome.rechecks
            if not drift.within
        ]

    # -- the summary ---------------------------------------------------------------------------
    def save_words(self, open_key: str) -> str:
        """Where the readings go and how their saving stands (:func:`text.meter.save_line`)."""
        return meter_text.save_line(
            None if self.job_id is None else self.link_label,
            pending=self.saves.unsaved,
            error=self.saves.error,
            saved_at=self.saves.saved_at,
            open_key=open_key,
        )

    def summary_lines(self, *, width: int, open_key: str, at: datetime | None = None) -> list[str]:
        """The summary (:func:`fieldkit.text.meter.summary_lines`) of the fibres, wavelengths
        and directions set up: readings, limits, tallies by the one counting rule, references."""
        readings = [
            (fibre, w, d, cell.loss_db)
            for (fibre, w, d), cell in self.cells.items()
            if fibre <= self.fibres and w in self.wavelengths and d in self.directions
        ]
        limits = {w: self.limit_db(w) for w in self.wavelengths}
        references = [
            meter_text.ReferenceShown(w, d, r.level_dbm, r.set_at, r.in_doubt)
            for (w, d), r in sorted(self.refs.items())
            if w in self.wavelengths and d in self.directions
        ]
        return meter_text.summary_lines(
            width=width,
            save=self.save_words(open_key),
            wavelengths=self.wavelengths,
            fibres=self.fibres,
            directions=self.directions,
            readings=readings,
            limits_db=limits,
            tallies=meter_tallies(self.cells, limits, self.fibres, self.directions),
            references=references,
            at=at or now(),
        )


__all__ = [
    "DIRECTION_WORDS",
    "Cell",
    "ColumnReference",
    "Entered",
    "GridColumn",
    "MeterSession",
    "Moved",
    "RecheckDone",
    "SaveQueue",
    "cell_mark",
    "fit",
    "meter_tallies",
    "verdict_words",
]
