"""What the Traces workspace holds: one trace, a pair, or a folder; the event table it shows;
the hand-off of an event to the fault workspace. Plain state, tested without a terminal.
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np
import numpy.typing as npt

from fieldkit.text.numbers import arrow
from fieldkit.traces.analysis import Settings, TraceResult, analyse_trace, rejudge
from fieldkit.traces.closures import Closure, event_at, reading_uncertainty_m
from fieldkit.traces.closures import closure_at as closure_of_event
from fieldkit.traces.files import ReadOptions, read_trace
from fieldkit.traces.folder import (
    FibreRow,
    FibreTraces,
    FolderResult,
    Progress,
    analyse_folder,
    fibre_label,
    folder_fibres,
    rejudge_folder,
)
from fieldkit.traces.lines import (
    defaults_notice,
    event_cells,
    fmt,
    instrument_cells,
    limits_summary,
    paired_cells,
)
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.pairing import PairResult, pair
from fieldkit.traces.verdicts import Limits

#: The loss methods (calc.otdr) in a technician's words, for the events table's title.
LOSS_METHOD_WORDS = {
    "two-line": "lines fitted either side",
    "five-point": "five points around the event",
}


@dataclass(frozen=True, slots=True)
class EventMark:
    """An event to mark on the drawn trace, numbered as in the table."""

    number: int
    distance_m: float  # in the frame of the trace shown
    kind: str
    failed: bool = False


def row_number(key: str, kind: str) -> int | None:
    """The number in a :class:`TableView` row key of ``kind`` (``event`` or ``fibre``), None
    for a row of the other kind."""
    prefix = f"{kind}-"
    return int(key.removeprefix(prefix)) if key.startswith(prefix) else None


@dataclass(frozen=True, slots=True)
class TableView:
    """What the workspace's table shows: its title, its columns and its rows, each with the
    key that says what the row is (``fibre-<index>`` in the folder's table, ``event-<number>``
    in an event table) and its cells in column order."""

    title: str
    columns: tuple[str, ...] = ()
    rows: tuple[tuple[str, tuple[str, ...]], ...] = ()


@dataclass(frozen=True, slots=True)
class FaultHandoff:
    """What the fault workspace needs: the OTDR distance as read from the instrument's end."""

    distance_m: float
    group_index: float
    from_end: str  # "A" or "B"
    landmarks: tuple[tuple[str, float, float], ...]  # (name, OTDR distance, route distance)
    note: str


def start_hint(data_dir: Path) -> str:
    """What the empty workspace says: what to type, and the first trace folder kept beside the
    jobs (``<data folder>/traces/*``, where ``fieldkit demo`` puts its files) as the example."""
    try:
        folders = sorted(p for p in (data_dir / "traces").iterdir() if p.is_dir())
    except OSError:
        folders = []
    if not folders:
        return "Type a trace file (and the other end's) or a folder, then Enter."
    return f"Type a trace file or a folder, then Enter; e.g. {folders[0]}"


def is_folder(path: str) -> bool:
    """True when ``path`` (as typed: spaces around it, ``~``) names a folder to analyse."""
    return bool(path.strip()) and Path(path.strip()).expanduser().is_dir()


def names_link(label: str, names: list[str]) -> bool:
    """True when link ``label`` is one of ``names`` or stands whole inside one (``LIB-TH-01``
    in ``LIB-TH-01_F07_AB``; not ``TH-0`` in it), letters in either case."""
    wanted = label.strip().casefold()
    if not wanted:
        return False
    whole = re.compile(rf"(?<![0-9a-z]){re.escape(wanted)}(?![0-9a-z])")
    return any(whole.search(n.casefold()) for n in names)


@dataclass
class TraceSession:
    settings: Settings = field(default_factory=Settings)
    options: ReadOptions = field(default_factory=ReadOptions)
    a: TraceResult | None = None
    b: TraceResult | None = None
    paired: PairResult | None = None
    folder: FolderResult | None = None
    shown: str = "AB"  # which direction the plot shows
    instrument_table: bool = False  # the instrument's own events instead of ours
    a_direction: str = "A->B"  # of ``a``: a folder's fibre with only its B→A trace opens B→A
    #: The chosen link's closures: a non-reflective event at one is a splice, elsewhere it is
    #: a splice or a bend (a trace alone cannot tell)
    closures: tuple[Closure, ...] = ()
    selected: int | None = None  # the event selected in the table or on the plot
    last_link: tuple[str, str] | None = None  # the (job, link) last chosen to save onto

    # -- opening ---------------------------------------------------------------------------
    def open(self, path_a: str, path_b: str = "") -> str:
        """Open one trace, or both directions of a fibre. Returns a one-line summary.

        Raises
        ------
        TraceFileError
            A file that cannot be read, or two that cannot be paired; nothing changes then.
        """
        if not path_a.strip():
            raise TraceFileError("type the path of a trace file (or a folder)")
        a = analyse_trace(
            read_trace(Path(path_a.strip()).expanduser(), self.options), self.settings
        )
        b = None
        paired = None
        if path_b.strip():
            b = analyse_trace(
                read_trace(Path(path_b.strip()).expanduser(), self.options), self.settings
            )
            paired = pair(a, b)
        self.a, self.b, self.paired = a, b, paired
        self.shown = "AB"
        self.a_direction = "A->B"
        self.folder = None
        self.selected = None
        return self.summary()

    def open_folder(self, path: str, progress: Progress | None = None) -> FolderResult:
        """Analyse a folder (kept; :meth:`open_row` shows one of its fibres)."""
        result = analyse_folder(
            Path(path.strip()).expanduser(),
            settings=self.settings,
            options=self.options,
            progress=progress,
        )
        if result.files == 0:
            raise TraceFileError(
                f"{Path(path).name}: no trace files (.sor, .csv, .txt, .tsv, .dat)"
            )
        self.folder = result
        self.a = self.b = self.paired = None  # the folder's table shows
        self.selected = None
        return result

    def open_row(self, row: FibreRow) -> str:
        a = row.a_to_b or row.b_to_a
        if a is None:
            raise TraceFileError(f"fibre {row.fibre}: no trace could be read")
        self.a = a
        self.b = row.b_to_a if row.a_to_b is not None else None
        self.paired = row.paired
        self.shown = "AB"
        self.a_direction = "A->B" if row.a_to_b is not None else "B->A"
        self.selected = None
        return self.summary()

    def set_limits(self, limits: Limits) -> None:
        """Judge what is open (and whatever is opened next) against ``limits`` (a job link's
        presets): verdicts again, no trace read or analysed again."""
        self.settings = replace(self.settings, limits=limits)
        if self.folder is not None:
            self.folder = rejudge_folder(self.folder, limits)
        if self.a is not None:
            self.a = rejudge(self.a, limits)
        if self.b is not None:
            self.b = rejudge(self.b, limits)
        if self.paired is not None and self.a is not None and self.b is not None:
            self.paired = pair(self.a, self.b, tolerance_m=self.paired.tolerance_m)

    @property
    def limits(self) -> Limits:
        """The limits that judge the shown trace (without one: what judges the next)."""
        r = self.current
        return r.limits if r is not None else self.settings.limits

    @property
    def judged_by_defaults(self) -> bool:
        """True until presets judge (the built-in figures of :class:`Limits` so far)."""
        return self.settings.limits.origin == "defaults"

    def limits_summary(self) -> str:
        """Which limits judge the shown trace, in one line."""
        return limits_summary(self.limits)

    def note_lines(self, text: str, wide: bool) -> list[str]:
        """The lines under the table: ``text`` (an event's verdict reason, the limits) and,
        while no job's link judges, the one saying the limits are the shipped defaults."""
        return [t for t in (text, defaults_notice(self.limits, wide)) if t]

    def use_closures(self, closures: Iterable[tuple[str, float | None]]) -> None:
        """The chosen link's closures (name, route position), those with a position kept."""
        self.closures = tuple(Closure(name, m) for name, m in closures if m is not None)

    # -- what is shown ---------------------------------------------------------------------
    @property
    def current(self) -> TraceResult | None:
        if self.shown == "BA" and self.b is not None:
            return self.b
        return self.a

    def toggle_direction(self) -> str:
        if self.b is None:
            return "only one direction is open"
        self.shown = "BA" if self.shown == "AB" else "AB"
        return f"showing {'B→A' if self.shown == 'BA' else 'A→B'}"

    def summary(self) -> str:
        if self.paired is not None:
            p = self.paired
            return (
                f"pair: {p.length_m:.1f} m, total {fmt(p.total_loss_db, 2, 'dB')} averaged, "
                f"{sum(1 for e in p.events if e.kind != 'end')} events"
            )
        if self.a is not None:
            a = self.a.analysis
            length = f"{a.length_m:.1f} m" if a.length_m is not None else "no end found"
            return f"{self.a.trace.source}: {length}, total {fmt(a.total_loss_db, 2, 'dB')}"
        return "no trace open"

    def curve(self) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]] | None:
        r = self.current
        if r is None:
            return None
        return r.trace.distance_m, r.trace.level_db

    def marks(self) -> list[EventMark]:
        """The events to mark on the shown trace, numbered as in the table."""
        r = self.current
        if r is None:
            return []
        if self.paired is not None and not self.instrument_table:
            to_frame = (lambda x: x) if self.shown == "AB" else (lambda x: self.paired_length_b - x)
            return [
                EventMark(e.number, to_frame(e.distance_m), e.kind, e.verdict == "fail")
                for e in self.paired.events
            ]
        if self.instrument_table:
            return [
                EventMark(e.number, e.distance_m, e.kind, False) for e in r.trace.instrument_events
            ]
        return [EventMark(e.number, e.distance_m, e.kind, e.verdict == "fail") for e in r.events]

    @property
    def paired_length_b(self) -> float:
        assert self.paired is not None
        return self.paired.length_ba_m

    def columns(self, wide: bool) -> tuple[str, ...]:
        if self.instrument_table:
            return ("#", "distance", "kind", "loss dB", "refl dB", "code")
        if self.paired is not None:
            if wide:
                return ("#", "from A", "kind", "A→B dB", "B→A dB", "avg dB", "verdict")
            return ("#", "from A", "kind", "avg dB", "verdict")
        if wide:
            return ("#", "distance", "kind", "loss dB", "refl dB", "cum dB", "verdict")
        return ("#", "distance", "kind", "loss dB", "verdict")

    def table(self, wide: bool) -> TableView:
        """The folder's fibres while its table shows, else the shown trace's events (no
        columns while nothing is open)."""
        if self.whole_folder:
            rows = tuple((f"fibre-{k}", c) for k, c in enumerate(self.folder_rows(wide)))
            return TableView("Fibres (Enter opens one)", self.folder_columns(wide), rows)
        if self.current is None:
            return TableView(self.table_title())
        events = tuple((f"event-{c[0]}", c) for c in self.rows(wide))
        return TableView(self.table_title(), self.columns(wide), events)

    def table_title(self) -> str:
        r = self.current
        if self.instrument_table and r is not None:
            return f"The instrument's own events ({r.trace.source}), as recorded"
        if self.paired is not None:
            return "Events, both directions averaged"
        method = LOSS_METHOD_WORDS.get(self.settings.loss_method, self.settings.loss_method)
        return f"Events, loss from {method}"

    def rows(self, wide: bool) -> list[tuple[str, ...]]:
        r = self.current
        if r is None:
            return []
        if self.instrument_table:
            return [instrument_cells(e) for e in r.trace.instrument_events]
        # narrow: number, distance, kind, the (average) loss and the verdict
        if self.paired is not None:
            paired = [paired_cells(e) for e in self.paired.events]
            return self._at_closures(paired if wide else [(*c[:3], c[5], c[6]) for c in paired])
        cells = [event_cells(ev) for ev in r.events]
        return self._at_closures(cells if wide else [(*c[:4], c[6]) for c in cells])

    def closure_at(self, distance_m: float) -> Closure | None:
        """The link's closure that the event ``distance_m`` from end A is, if any (the one
        rule: :mod:`fieldkit.traces.closures`)."""
        if self.a is None:
            return None
        return closure_of_event(distance_m, self.closures, self.a.group_index, self._placing_m())

    def _placing_m(self) -> float:
        """How well the open trace(s) place an event (m): the pair's matching tolerance, else
        one trace's own."""
        if self.paired is not None:
            return self.paired.tolerance_m
        return reading_uncertainty_m(self.a) if self.a is not None else 0.0

    def _from_a(self) -> bool:
        """True when the table's distances are from end A (a pair, or A→B shown)."""
        if self.instrument_table:
            return False
        return self.paired is not None or (self.a_direction == "A->B" and self.shown == "AB")

    def _at_closures(self, rows: list[tuple[str, ...]]) -> list[tuple[str, ...]]:
        """Rows whose non-reflective event sits at one of the link's closures called "splice"."""
        if not self.closures or not self._from_a():
            return rows
        events = self.paired.events if self.paired is not None else self.current.events  # type: ignore[union-attr]
        at = {str(e.number) for e in events if e.kind == "splice" and self.closure_at(e.distance_m)}
        return [(r[0], r[1], "splice", *r[3:]) if r[0] in at else r for r in rows]

    def event_note(self, number: int) -> str:
        """The verdict reason and the gainer note of an event, for the line under the table."""
        if self.instrument_table:
            return "the instrument's own event, as recorded in the file (not judged)"
        found = None
        if self.paired is not None:
            for e in self.paired.events:
                if e.number == number:
                    found = (e.kind, e.distance_m, [e.verdict_reason, e.note])
        elif self.current is not None:
            for ev in self.current.events:
                if ev.number == number:
                    found = (ev.kind, ev.distance_m, [ev.verdict_reason])
        if found is None:
            return ""
        kind, distance_m, texts = found
        closure = self.closure_at(distance_m) if kind == "splice" and self._from_a() else None
        if closure is not None:  # the reason's "splice or bend": here, the closure's splice
            texts = [t.replace("; splice or bend", "") for t in texts]
            texts.append(f"at closure {closure.name} (route {closure.route_m:.0f} m)")
        return "; ".join(t for t in texts if t)

    def folder_counts(self) -> str:
        """ "12 files, 6 fibres" of the open folder."""
        if self.folder is None:
            return ""
        files, rows = self.folder.files, len(self.folder.rows)
        fails = sum(1 for r in self.folder.rows if r.verdict == "fail")
        return (
            f"{files} file{'s' if files != 1 else ''}, {rows} fibre{'s' if rows != 1 else ''}, "
            f"{fails} failed"
        )

    def folder_status(self) -> str:
        """The status line while the folder's table shows."""
        return f"{self.folder_counts()}; Enter on a fibre opens it"

    def open_fibre(self, index: int) -> str:
        """Open fibre ``index`` (its row in the folder's table); the one-line summary.

        Raises
        ------
        TraceFileError
            No folder open, no such row, or a fibre with no trace that could be read.
        """
        if self.folder is None or not 0 <= index < len(self.folder.rows):
            raise TraceFileError(f"no fibre {index + 1} in the folder's table")
        return self.open_row(self.folder.rows[index])

    def close_fibre(self) -> bool:
        """Back from one of a folder's fibres to the folder's table (False: no folder open)."""
        if self.folder is None:
            return False
        self.a = self.b = self.paired = None
        self.selected = None
        return True

    def cycle_view(self) -> str | None:
        """Show the next of A→B, B→A (when both are open), then the instrument's own events of
        each; the words saying what is shown now (None: nothing open)."""
        if self.current is None:
            return None
        views = [("AB", False)]
        if self.b is not None:
            views.append(("BA", False))
        for direction, result in (("AB", self.a), ("BA", self.b)):
            if result is not None and result.trace.instrument_events:
                views.append((direction, True))
        now = (self.shown, self.instrument_table)
        k = views.index(now) if now in views else 0
        self.shown, self.instrument_table = views[(k + 1) % len(views)]
        self.selected = None
        which = "B→A" if self.shown == "BA" else "A→B"
        return f"{which}: " + (
            "the instrument's own events" if self.instrument_table else "our events"
        )

    # -- into a job ------------------------------------------------------------------------
    @property
    def anything_open(self) -> bool:
        """True when a trace, a pair or a folder is open (something can go into a job)."""
        return self.a is not None or self.folder is not None

    @property
    def can_go_back(self) -> bool:
        """True while one of a folder's fibres is open (Esc goes back to the folder's table)."""
        return self.folder is not None and self.a is not None

    def select(self, number: int) -> bool:
        """Select event ``number``; True when that changed the selection."""
        changed = number != self.selected
        self.selected = number
        return changed

    def handoff(self) -> FaultHandoff:
        """:meth:`fault_handoff` of the selected event; of the end (the break) while nothing
        is selected or the instrument's own table shows (its numbers are not ours), with the
        chosen link's closures (:meth:`use_closures`) as landmarks.

        Raises
        ------
        TraceFileError
            When no trace is open or there is no such event.
        """
        return self.fault_handoff(None if self.instrument_table else self.selected, self.closures)

    def offered_link(self, found: list[tuple[str, str]]) -> tuple[str, str] | None:
        """Of the (job, link) pairs the open traces name (:meth:`names`), the one to offer
        first: the only one; else (none, or several) the last one chosen, None before any."""
        return found[0] if len(found) == 1 else self.last_link

    @property
    def whole_folder(self) -> bool:
        """True while the folder's table shows (saving and filling take every fibre)."""
        return self.a is None and self.folder is not None

    def fibre_number(self) -> int | None:
        """The open trace's fibre number from its record or file name, if it gives one."""
        if self.a is None:
            return None
        label = fibre_label(self.a.trace, self.a.trace.source)
        return int(label) if label.isdigit() and 1 <= int(label) <= 10_000 else None

    def fibres(self, fibre: int | None) -> list[FibreTraces]:
        """What goes into a job: the folder's fibres (its table showing), else the open pair
        or trace as fibre ``fibre``.

        Raises
        ------
        InputError
            A folder's fibre with no number, or no fibre number for what is open.
        """
        if self.whole_folder:
            assert self.folder is not None
            return folder_fibres(self.folder)
        if self.a is None:
            raise TraceFileError("open traces first")
        if fibre is None:
            raise TraceFileError("type the fibre number these traces hold")
        if self.paired is not None:
            return [FibreTraces(fibre, paired=self.paired)]
        return [FibreTraces(fibre, one_way=self.a, direction=self.a_direction)]

    def save_lines(self, current: set[tuple[int, float | None, str]]) -> list[str]:
        """What a save keeps, for the dialog before it: which traces, the limits that judged
        them, how many earlier saves of the same it supersedes (``current``: the keys of the
        link's current traces).

        Raises
        ------
        InputError
            A folder's fibre with no number (nothing can be saved then).
        """
        limits = self.limits_summary()
        if self.whole_folder:
            fibres = self.fibres(None)
            lines = [f"every fibre of the folder: {len(fibres)} fibre(s) and direction(s)"]
            wavelengths = sorted({f.wavelength_nm for f in fibres if f.wavelength_nm})
            if len(wavelengths) == 1:  # the attenuation maximum of that wavelength
                limits = limits_summary(self.settings.limits.for_wavelength(wavelengths[0]))
        else:
            fibres = self.fibres(self.fibre_number() or 1)
            what = (
                "both directions averaged"
                if self.paired is not None
                else arrow(self.a_direction)  # shown A→B, as the table
            )
            names = ", ".join(fibres[0].files)
            lines = [f"this fibre, {what}: {names}"]
        lines.append(f"judged by {limits}")
        known = sum(1 for f in fibres if f.key in current)
        if known:
            lines.append(f"{known} earlier save(s) of the same stay, marked superseded")
        return lines

    def names(self) -> list[str]:
        """What names the open traces: the folder's name, the files' names (without their
        suffix) and the cable ids the records carry; a job's link labelled with one of them is
        where they most likely belong."""
        out: list[str] = []
        results: list[TraceResult] = []
        if self.folder is not None:
            out.append(Path(self.folder.folder).name)
            for row in self.folder.rows:
                results += [r for r in (row.a_to_b, row.b_to_a) if r is not None]
        results += [r for r in (self.a, self.b) if r is not None]
        for r in results:
            out += [Path(r.trace.source).stem, r.trace.cable_id]
        return list(dict.fromkeys(n.strip() for n in out if n.strip()))

    # -- the folder's table ----------------------------------------------------------------
    def folder_columns(self, wide: bool) -> tuple[str, ...]:
        if wide:
            return ("fibre", "nm", "dirs", "ev", "worst dB", "total", "verdict")
        return ("fibre", "nm", "worst dB", "verdict")

    def folder_rows(self, wide: bool) -> list[tuple[str, ...]]:
        """One row of cells per fibre of the open folder, in :meth:`folder_columns` order."""
        out: list[tuple[str, ...]] = []
        for row in self.folder.rows if self.folder is not None else ():
            worst = row.worst()
            wl = f"{row.wavelength_nm:g}" if row.wavelength_nm else "?"
            worst_db = f"{worst[1]:.2f}" if worst else "-"  # as the splice log
            total = f"{row.total_loss_db:.2f}" if row.total_loss_db is not None else "-"
            cells: tuple[str, ...]
            if wide:
                cells = (row.fibre, wl, row.directions, str(row.event_count), worst_db, total)
            else:
                cells = (row.fibre, wl, worst_db)
            out.append((*cells, row.verdict))
        return out

    # -- hand-offs -------------------------------------------------------------------------
    def fault_handoff(
        self, number: int | None, closures: list[Closure] | tuple[Closure, ...] = ()
    ) -> FaultHandoff:
        """The OTDR distance of event ``number`` (default: the end, the break) as the
        instrument at end A (or B, when only B→A is open) reads it, with the group index the
        trace was taken with, and landmarks: each closure matched to its event by the one rule
        (:mod:`fieldkit.traces.closures`); a closure with no event there is left out.

        Raises
        ------
        TraceFileError
            When no trace is open or there is no such event.
        """
        r = self.a
        if r is None:
            raise TraceFileError("open a trace first")
        if self.paired is not None:
            events = [(e.number, e.distance_m, e.kind) for e in self.paired.events]
        else:
            events = [(e.number, e.distance_m, e.kind) for e in r.events]
        if number is None:
            ends = [e for e in events if e[2] == "end"]
            if not ends:
                raise TraceFileError("no end of fibre found: pick the event to send")
            chosen = ends[0]
        else:
            found = [e for e in events if e[0] == number]
            if not found:
                raise TraceFileError(f"no event {number}")
            chosen = found[0]
        from_end = "A"  # self.a is the trace from end A (or the only one open)
        landmarks = []
        others = [e for e in events if e[2] != "end" and e[0] != chosen[0]]
        placing_m = self._placing_m()
        from_a = self.paired is not None or self.a_direction == "A->B"
        for c in closures if from_a else ():  # route positions are from end A
            best = event_at(c.route_m, others, [e[1] for e in others], r.group_index, placing_m)
            if best is not None:
                landmarks.append((c.name, best[1], c.route_m))
        kind = "break (end of fibre)" if chosen[2] == "end" else f"event {chosen[0]} ({chosen[2]})"
        note = f"From the Traces workspace: {kind} at {chosen[1]:.1f} m from end {from_end}"
        return FaultHandoff(chosen[1], r.group_index, from_end, tuple(landmarks), note)
