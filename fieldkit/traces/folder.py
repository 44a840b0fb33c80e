"""A folder of traces analysed into one table: fibre, direction, events, verdicts, worst event.

Which fibre and which direction a file holds:

- the fibre is the record's fibre ID, else the first whole number in the file name that is not
  a wavelength (``F012_1550_AB.sor`` is fibre 12);
- the direction is a token ``AB``/``BA`` (also ``A-B``, ``AtoB``) in the file name, else the
  record's originating location: the location most files start from is end A.

Both directions of a fibre at one wavelength are paired (:mod:`fieldkit.traces.pairing`); a
file that cannot be read is listed with its one-line problem and the rest go on.
"""

from __future__ import annotations

import re
from collections import Counter
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from fieldkit.calc.units import InputError
from fieldkit.traces.analysis import Settings, TraceResult, analyse_trace, rejudge
from fieldkit.traces.files import TRACE_SUFFIXES, ReadOptions, read_trace
from fieldkit.traces.model import Trace, TraceFileError
from fieldkit.traces.pairing import PairResult, pair
from fieldkit.traces.verdicts import Limits

WAVELENGTHS_NM = {850, 1300, 1310, 1383, 1490, 1550, 1577, 1625, 1650}
_DIRECTION = re.compile(r"(?i)(?:^|[^a-z])(a-?b|b-?a|a-?to-?b|b-?to-?a)(?:[^a-z]|$)")
_NUMBER = re.compile(r"\d+")

Progress = Callable[[int, int, str], None]


@dataclass
class FibreRow:
    """One fibre at one wavelength: its traces, their pairing and the verdict."""

    fibre: str
    wavelength_nm: float | None
    a_to_b: TraceResult | None = None
    b_to_a: TraceResult | None = None
    paired: PairResult | None = None
    problems: list[str] = field(default_factory=list)

    @property
    def directions(self) -> str:
        return "+".join(d for d, r in (("A→B", self.a_to_b), ("B→A", self.b_to_a)) if r) or "-"

    def worst(self) -> tuple[float, float] | None:
        """(distance from A, loss) of the event with the highest loss: averaged when paired."""
        best: tuple[float, float] | None = None
        if self.paired is not None:
            cands = [
                (e.distance_m, e.average_db) for e in self.paired.events if e.average_db is not None
            ]
        else:
            one = self.a_to_b or self.b_to_a
            cands = [
                (e.distance_m, e.loss_db)
                for e in (one.events if one else ())
                if e.loss_db is not None
            ]
        for d, loss in cands:
            if loss is not None and (best is None or loss > best[1]):
                best = (d, loss)
        return best

    def verdicts(self) -> Counter[str]:
        if self.paired is not None:
            return Counter(e.verdict for e in self.paired.events if e.kind != "end")
        one = self.a_to_b or self.b_to_a
        return Counter(e.verdict for e in (one.events if one else ()) if e.kind != "end")

    @property
    def verdict(self) -> str:
        if self.problems and not (self.a_to_b or self.b_to_a):
            return "unread"
        counts = self.verdicts()
        for word in ("fail", "in doubt"):
            if counts.get(word):
                return word
        return "pass" if counts.get("pass") else "no limit"

    @property
    def event_count(self) -> int:
        if self.paired is not None:
            return sum(1 for e in self.paired.events if e.kind != "end")
        one = self.a_to_b or self.b_to_a
        return sum(1 for e in (one.events if one else ()) if e.kind != "end")

    @property
    def total_loss_db(self) -> float | None:
        if self.paired is not None:
            return self.paired.total_loss_db
        one = self.a_to_b or self.b_to_a
        return one.analysis.total_loss_db if one else None

    @property
    def length_m(self) -> float | None:
        if self.paired is not None:
            return self.paired.length_m
        one = self.a_to_b or self.b_to_a
        return one.length_m if one else None

    def to_json(self) -> dict[str, Any]:
        worst = self.worst()
        return {
            "fibre": self.fibre,
            "wavelength_nm": self.wavelength_nm,
            "directions": self.directions,
            "files": [r.trace.source for r in (self.a_to_b, self.b_to_a) if r],
            "length_m": self.length_m,
            "total_loss_db": self.total_loss_db,
            "events": self.event_count,
            "worst_distance_m": worst[0] if worst else None,
            "worst_loss_db": worst[1] if worst else None,
            "verdict": self.verdict,
            "verdict_counts": dict(self.verdicts()),
            "problems": list(self.problems),
        }


@dataclass
class FolderResult:
    folder: str
    rows: list[FibreRow]
    unread: list[tuple[str, str]]  # (file name, problem)
    files: int

    def to_json(self) -> dict[str, Any]:
        return {
            "folder": self.folder,
            "files": self.files,
            "fibres": [r.to_json() for r in self.rows],
            "unread": [{"file": n, "problem": p} for n, p in self.unread],
        }


@dataclass(frozen=True, slots=True)
class FibreTraces:
    """One fibre's traces: both directions paired, or one direction alone."""

    fibre: int
    paired: PairResult | None = None
    one_way: TraceResult | None = None
    direction: str = "A->B"  # of ``one_way``

    @property
    def kept_direction(self) -> str:
        """The direction a job keeps them as: ``A<->B`` for a pair."""
        return "A<->B" if self.paired is not None else self.direction

    @property
    def wavelength_nm(self) -> float | None:
        first = self.paired.a_to_b if self.paired is not None else self.one_way
        return first.trace.wavelength_nm if first is not None else None

    @property
    def key(self) -> tuple[int, float | None, str]:
        """Fibre, wavelength (0.1 nm) and direction: what a later save of them supersedes
        (as :attr:`fieldkit.jobs.models.TraceRecord.key`)."""
        wl = self.wavelength_nm
        return (self.fibre, None if wl is None else round(wl, 1), self.kept_direction)

    @property
    def files(self) -> list[str]:
        if self.paired is not None:
            return [self.paired.a_to_b.trace.source, self.paired.b_to_a.trace.source]
        return [self.one_way.trace.source] if self.one_way is not None else []


def folder_fibres(result: FolderResult) -> list[FibreTraces]:
    """Every fibre of an analysed folder as :class:`FibreTraces`: paired where both directions
    paired, else each direction alone.

    Raises
    ------
    InputError
        A fibre label that is no fibre number (nothing is saved then: name the files
        ``F012_1550_AB.sor`` or give the records a fibre ID).
    """
    out: list[FibreTraces] = []
    for row in result.rows:
        if not (row.a_to_b or row.b_to_a):
            continue
        if not row.fibre.isdigit() or not 1 <= int(row.fibre) <= 10_000:
            raise InputError(
                f"{row.fibre}: the record and the file name give no fibre number "
                "(e.g. F012_1550_AB.sor); nothing saved"
            )
        number = int(row.fibre)
        if row.paired is not None:
            out.append(FibreTraces(number, paired=row.paired))
            continue
        if row.a_to_b is not None:
            out.append(FibreTraces(number, one_way=row.a_to_b, direction="A->B"))
        if row.b_to_a is not None:
            out.append(FibreTraces(number, one_way=row.b_to_a, direction="B->A"))
    if not out:
        raise InputError("no trace in the folder could be read: nothing to save")
    return out


def trace_files(folder: Path) -> list[Path]:
    """The trace files directly in ``folder``, in name order."""
    if not folder.is_dir():
        raise TraceFileError(f"{folder.name or folder}: not a folder")
    return sorted(p for p in folder.iterdir() if p.is_file() and p.suffix.lower() in TRACE_SUFFIXES)


def fibre_label(trace: Trace, name: str) -> str:
    if trace.fibre_id.strip():
        return trace.fibre_id.strip()
    stem = _DIRECTION.sub(" ", Path(name).stem)
    for m in _NUMBER.finditer(stem):
        if int(m.group()) not in WAVELENGTHS_NM:
            return str(int(m.group()))
    return Path(name).stem


def direction_token(name: str) -> str | None:
    m = _DIRECTION.search(Path(name).stem)
    if not m:
        return None
    token = m.group(1).lower().replace("-", "").replace("to", "")
    return "AB" if token == "ab" else "BA"


def analyse_folder(
    folder: Path,
    *,
    settings: Settings | None = None,
    options: ReadOptions | None = None,
    progress: Progress | None = None,
) -> FolderResult:
    """Read, analyse and pair every trace in ``folder`` (rules in the module docstring)."""
    files = trace_files(folder)
    results: list[tuple[str, TraceResult]] = []
    unread: list[tuple[str, str]] = []
    for k, path in enumerate(files):
        try:
            results.append((path.name, analyse_trace(read_trace(path, options), settings)))
        except TraceFileError as exc:
            unread.append((path.name, str(exc)))
        if progress is not None:
            progress(k + 1, len(files), path.name)
    origins = Counter(r.trace.origin for _, r in results if r.trace.origin)
    end_a = origins.most_common(1)[0][0] if origins else None
    rows: dict[tuple[str, float | None], FibreRow] = {}
    for name, r in results:
        key = (fibre_label(r.trace, name), r.trace.wavelength_nm)
        row = rows.setdefault(key, FibreRow(key[0], key[1]))
        token = direction_token(name)
        if token is None:
            token = (
                "BA" if (end_a is not None and r.trace.origin and r.trace.origin != end_a) else "AB"
            )
        if token == "AB":
            if row.a_to_b is not None:
                row.problems.append(f"{name}: a second A→B trace; {row.a_to_b.trace.source} kept")
                continue
            row.a_to_b = r
        else:
            if row.b_to_a is not None:
                row.problems.append(f"{name}: a second B→A trace; {row.b_to_a.trace.source} kept")
                continue
            row.b_to_a = r
    for row in rows.values():
        if row.a_to_b is not None and row.b_to_a is not None:
            try:
                row.paired = pair(row.a_to_b, row.b_to_a)
            except TraceFileError as exc:
                row.problems.append(str(exc))
    ordered = sorted(rows.values(), key=lambda r: (_natural(r.fibre), r.wavelength_nm or 0.0))
    return FolderResult(str(folder), ordered, unread, len(files))


def rejudge_folder(result: FolderResult, limits: Limits) -> FolderResult:
    """The same folder judged against other limits: verdicts again, no trace read or analysed
    again."""
    rows = []
    for row in result.rows:
        a = rejudge(row.a_to_b, limits) if row.a_to_b is not None else None
        b = rejudge(row.b_to_a, limits) if row.b_to_a is not None else None
        paired = None
        if row.paired is not None and a is not None and b is not None:
            paired = pair(a, b, tolerance_m=row.paired.tolerance_m)
        rows.append(FibreRow(row.fibre, row.wavelength_nm, a, b, paired, list(row.problems)))
    return FolderResult(result.folder, rows, list(result.unread), result.files)


def _natural(label: str) -> tuple[int, str]:
    m = _NUMBER.search(label)
    return (int(m.group()) if m else 1 << 30, label)
