"""A trace as read from a file, the instrument's own events, and the one error files raise."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt


class TraceFileError(Exception):
    """A trace file that cannot be read: one line naming the file and the problem."""


@dataclass(frozen=True, slots=True)
class InstrumentEvent:
    """One event of the instrument's own event table (the record's key events), as recorded.

    Shown beside fieldkit's events, never merged with them.
    """

    number: int
    distance_m: float
    loss_db: float | None
    reflectance_db: float | None
    code: str  # the record's six-character event code, e.g. "1F9999"
    comment: str = ""

    @property
    def kind(self) -> str:
        """``end``, ``reflective`` or ``splice`` from the event code (from memory: the first
        character is 0 non-reflective, 1 reflective, 2 saturated reflective; the second is F
        found by the instrument, M manual, E end of fibre)."""
        if len(self.code) > 1 and self.code[1] == "E":
            return "end"
        if self.code[:1] in ("1", "2"):
            return "reflective"
        if self.loss_db is not None and self.loss_db < 0:
            return "gainer"
        return "splice"


@dataclass(frozen=True)
class Trace:
    """Backscattered level against distance, uniformly sampled, with what the file says."""

    level_db: npt.NDArray[np.float64]
    spacing_m: float
    source: str  # the file's name (never its folder)
    file_format: str  # "SR-4731" or "text"
    start_m: float = 0.0
    wavelength_nm: float | None = None
    pulse_width_ns: float | None = None
    group_index: float | None = None
    backscatter_db: float | None = None
    fibre_id: str = ""
    cable_id: str = ""
    origin: str = ""  # originating location (where the instrument was)
    destination: str = ""  # terminating location
    acquired_unix_s: int | None = None
    instrument_events: tuple[InstrumentEvent, ...] = ()
    notes: tuple[str, ...] = field(default=())

    @property
    def points(self) -> int:
        return int(self.level_db.size)

    @property
    def distance_m(self) -> npt.NDArray[np.float64]:
        return self.start_m + np.arange(self.points, dtype=np.float64) * self.spacing_m

    @property
    def range_m(self) -> float:
        return self.start_m + (self.points - 1) * self.spacing_m
