"""Power-meter reference methods, readings to insertion loss, pass/fail, drift and plausibility.

A light source and a power meter measure insertion loss as the difference between a reference
level, taken with test cords only, and the level through the link under test. What the
reference cords include decides which connections of the link the result counts:

============  ==========================  ======================  =========================
method        IEC 61280-4-1 / -4-2 name   TIA-526-14 / -7 letter  end connections included
============  ==========================  ======================  =========================
one-cord      one-cord reference          Method B                2 (both ends)
two-cord      two-cord reference          Method A                1
three-cord    three-cord reference        Method C                0
============  ==========================  ======================  =========================

A limit (from a loss budget that counts both end connections) is therefore reduced by the
connections the method leaves out before a result is compared with it.

References
----------
IEC 61280-4-1 (multimode attenuation measurement) and IEC 61280-4-2 (single-mode attenuation
measurement): the one-, two- and three-cord reference methods and the end connections each
includes. TIA-526-14 (multimode) and TIA-526-7 (single-mode): the same methods as Methods B, A
and C. ITU-R V.574-5: the decibel and dBm (10·log10 of a power ratio; dBm referred to 1 mW).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from datetime import datetime
from enum import StrEnum
from typing import Protocol

from fieldkit.calc.units import InputError, Kind, normalise_text, parse


class Method(StrEnum):
    """A reference method, by its IEC 61280-4-1 / 61280-4-2 name."""

    ONE_CORD = "one-cord"
    TWO_CORD = "two-cord"
    THREE_CORD = "three-cord"

    @property
    def end_connections(self) -> int:
        """How many of the link's two end connections a result measured this way includes."""
        return END_CONNECTIONS_INCLUDED[self]

    @property
    def tia_letter(self) -> str:
        """The TIA-526-14 / 526-7 letter of the same method."""
        return {Method.ONE_CORD: "B", Method.TWO_CORD: "A", Method.THREE_CORD: "C"}[self]

    @property
    def label(self) -> str:
        """The method as a technician reads it, with its TIA letter."""
        return f"{self.value} (TIA Method {self.tia_letter})"


#: End connections included in the measured loss, per method (IEC 61280-4-1 / -4-2).
END_CONNECTIONS_INCLUDED: dict[Method, int] = {
    Method.ONE_CORD: 2,
    Method.TWO_CORD: 1,
    Method.THREE_CORD: 0,
}

_METHOD_WORDS: dict[str, Method] = {}
for _method, _count, _letter in (
    (Method.ONE_CORD, ("one", "1"), "b"),
    (Method.TWO_CORD, ("two", "2"), "a"),
    (Method.THREE_CORD, ("three", "3"), "c"),
):
    for _n in _count:
        for _noun in ("cord", "cords", "jumper", "jumpers", "test cord", "test cords"):
            _METHOD_WORDS[f"{_n} {_noun}"] = _method
        _METHOD_WORDS[f"{_n} cord reference"] = _method
    for _prefix in ("", "method ", "tia ", "tia method "):
        _METHOD_WORDS[f"{_prefix}{_letter}"] = _method


def parse_method(text: str) -> Method:
    """The reference method named by ``text``.

    Accepts the IEC names (``one-cord``, ``two-cord``, ``three-cord``), the same with digits or
    "jumper" (``1-cord``, ``1 jumper``), and the TIA-526-14 / 526-7 letters (``B``,
    ``Method A``, ``TIA C``).

    Raises
    ------
    InputError
        For anything else, listing what is accepted.
    """
    words = normalise_text(text).lower().replace("-", " ").replace("_", " ")
    words = " ".join(words.split())
    if words in _METHOD_WORDS:
        return _METHOD_WORDS[words]
    raise InputError(
        f"method: '{text.strip()}' is not a reference method; use one-cord, two-cord or "
        "three-cord (TIA Method B, A or C)"
    )


# -- levels and losses -------------------------------------------------------------------------


def level_dbm(text: str, what: str = "level") -> float:
    """A typed optical level or power as a level in dBm; a bare number is read as dBm.

    ``-7.5``, ``-7.5 dBm``, ``-37.5 dBW``, ``178 uW`` and ``0.178 mW`` all give about -7.5 dBm.

    Raises
    ------
    InputError
        For text that is not a power (see :func:`fieldkit.calc.units.parse`), or a level outside
        what an optical power meter reads (:data:`METER_RANGE_DBM`): a wrong unit or a typo.
    """
    level = parse(text, Kind.POWER, default_unit="dBm", what=what).to("dBm")
    low, high = METER_RANGE_DBM
    if not low <= level <= high:
        raise InputError(
            f"{what}: {level:.4g} dBm is outside what a power meter reads ({low:g} to "
            f"+{high:g} dBm); check the unit"
        )
    return level


#: Levels an optical power meter can read, widest case, in dBm (common practice: field meters
#: span about −70 to +27 dBm; the bounds leave room for any meter and refuse only typos).
METER_RANGE_DBM = (-100.0, 40.0)


def loss_limit_db(text: str, what: str = "limit") -> float:
    """A typed loss limit in dB; a bare number is read as dB.

    Raises
    ------
    InputError
        For text that is not a loss, or a negative limit.
    """
    limit_db = parse(text, Kind.RATIO, default_unit="dB", what=what).to("dB")
    if limit_db < 0:
        raise InputError(
            f"{what}: a loss limit of {limit_db:g} dB is negative; type the "
            "largest loss allowed, e.g. 3.5"
        )
    return limit_db


def insertion_loss_db(reference_dbm: float, reading_dbm: float) -> float:
    """Insertion loss of what was added between the reference and the reading.

    .. math:: IL_{dB} = L_{ref,dBm} - L_{meas,dBm} = 10 \\log_{10}(P_{ref} / P_{meas})

    Both levels are referred to 1 mW, so their difference is a power ratio in dB (ITU-R V.574).
    A negative result means more light arrived than at the reference: a reference problem.
    """
    for value, what in ((reference_dbm, "reference"), (reading_dbm, "reading")):
        if not math.isfinite(value):
            raise InputError(f"{what}: {value} is not a finite level")
    loss_db = reference_dbm - reading_dbm
    if not math.isfinite(loss_db):
        raise InputError("loss: the two levels are too far apart for a number")
    return loss_db


def bidirectional_average_db(loss_a_to_b_db: float, loss_b_to_a_db: float) -> float:
    """The mean of the two directions' losses, the value usually reported for a fibre."""
    for value, what in ((loss_a_to_b_db, "loss A->B"), (loss_b_to_a_db, "loss B->A")):
        if not math.isfinite(value):
            raise InputError(f"{what}: {value} is not a finite loss")
    return loss_a_to_b_db / 2.0 + loss_b_to_a_db / 2.0  # halved first: no overflow


def method_limit_db(
    budget_loss_db: float,
    end_connection_loss_db: float,
    method: Method,
    end_connections_in_budget: int = 2,
) -> float:
    """The limit a result taken with ``method`` is compared with, from a loss budget.

    The budget counts ``end_connections_in_budget`` end connections (normally both); the method
    includes :attr:`Method.end_connections` of them; the others come off the budget:

    .. math:: L_{limit} = L_{budget} - (n_{budget} - n_{method}) \\cdot L_{connection}

    Raises
    ------
    InputError
        When the budget counts fewer end connections than the method includes, or the result
        would be negative.
    """
    if not 0 <= end_connections_in_budget <= 2:
        raise InputError(
            f"end connections in the budget: {end_connections_in_budget} is not 0, 1 or 2"
        )
    if end_connections_in_budget < method.end_connections:
        raise InputError(
            f"the budget counts {end_connections_in_budget} end connection(s) but a {method.value} "
            f"result includes {method.end_connections}; count every mated pair including the "
            "two end connections"
        )
    if end_connection_loss_db < 0:
        raise InputError(f"connector loss: {end_connection_loss_db:g} dB is negative")
    left_out = end_connections_in_budget - method.end_connections
    limit_db = budget_loss_db - left_out * end_connection_loss_db
    if limit_db < 0:
        raise InputError(
            f"the limit for a {method.value} result comes out negative "
            f"({limit_db:.2f} dB); check the budget"
        )
    return limit_db


# -- verdicts ----------------------------------------------------------------------------------

#: Flags a result can carry (stored with the result in the job).
NEGATIVE_LOSS = "negative-loss"
REFERENCE_IN_DOUBT = "reference-in-doubt"


class Status(StrEnum):
    """What a result means for the fibre."""

    PASS = "pass"
    FAIL = "fail"
    REFERENCE_PROBLEM = "reference-problem"  # a negative loss: never a good fibre
    NO_LIMIT = "no-limit"  # loss known, nothing to compare with


@dataclass(frozen=True, slots=True)
class Verdict:
    """One loss compared with a limit."""

    loss_db: float
    limit_db: float | None
    margin_db: float | None  # limit − loss: positive is headroom, negative is the excess
    status: Status
    flags: tuple[str, ...] = ()
    warnings: tuple[str, ...] = ()

    @property
    def passed(self) -> bool | None:
        """True or False against the limit; None without a limit or with a reference problem."""
        if self.status is Status.PASS:
            return True
        if self.status is Status.FAIL:
            return False
        return None


def judge(loss_db: float, limit_db: float | None, what: str = "loss") -> Verdict:
    """Compare one loss with a limit (dB). A negative loss is a reference problem, never a pass."""
    if not math.isfinite(loss_db):
        raise InputError(f"{what}: {loss_db} is not a finite loss")
    margin_db = None if limit_db is None else limit_db - loss_db
    if loss_db < 0:
        # No margin either: a negative loss says nothing about the fibre.
        return Verdict(
            loss_db,
            limit_db,
            None,
            Status.REFERENCE_PROBLEM,
            (NEGATIVE_LOSS,),
            (negative_loss_warning(loss_db, what),),
        )
    if limit_db is None or margin_db is None:
        return Verdict(loss_db, None, None, Status.NO_LIMIT)
    status = Status.PASS if margin_db >= 0 else Status.FAIL
    return Verdict(loss_db, limit_db, margin_db, status)


def negative_loss_warning(loss_db: float, what: str = "loss") -> str:
    """What a negative loss means and what to do about it."""
    return (
        f"{what} {loss_db:.2f} dB is negative: more light arrived than at the reference, so the "
        "reference is wrong (a dirty or badly seated cord when it was set, or a changed cord "
        "since). Clean and inspect the cords and the meter port, set the reference again and "
        "retest; this is not a good fibre"
    )


@dataclass(frozen=True, slots=True)
class FibreVerdict:
    """A fibre at one wavelength: each direction measured, and their average when both exist."""

    directions: dict[str, Verdict]  # "A->B" / "B->A"
    average_db: float | None
    limit_db: float | None
    status: Status
    margin_db: float | None  # of the worst direction
    warnings: tuple[str, ...] = field(default=())

    @property
    def passed(self) -> bool | None:
        return {Status.PASS: True, Status.FAIL: False}.get(self.status)

    @property
    def worst_loss_db(self) -> float:
        return max(v.loss_db for v in self.directions.values())


DIRECTIONS: tuple[str, str] = ("A->B", "B->A")


def judge_fibre(losses_db: dict[str, float], limit_db: float | None) -> FibreVerdict:
    """Judge a fibre from its loss in one or both directions.

    Every direction measured must be within the limit for a pass (the stricter reading of a
    bidirectional test); any negative loss makes the fibre a reference problem.

    Raises
    ------
    InputError
        With no direction, or a direction other than ``A->B`` / ``B->A``.
    """
    if not losses_db:
        raise InputError("a fibre needs at least one reading")
    verdicts: dict[str, Verdict] = {}
    for direction, loss_db in losses_db.items():
        if direction not in DIRECTIONS:
            raise InputError(f"direction: '{direction}' is not A->B or B->A")
        verdicts[direction] = judge(loss_db, limit_db, f"loss {direction}")
    average_db = (
        bidirectional_average_db(losses_db["A->B"], losses_db["B->A"])
        if len(losses_db) == 2
        else None
    )
    statuses = {v.status for v in verdicts.values()}
    if Status.REFERENCE_PROBLEM in statuses:
        status = Status.REFERENCE_PROBLEM
    elif Status.NO_LIMIT in statuses:
        status = Status.NO_LIMIT
    elif Status.FAIL in statuses:
        status = Status.FAIL
    else:
        status = Status.PASS
    margins = [v.margin_db for v in verdicts.values() if v.margin_db is not None]
    warnings = tuple(w for v in verdicts.values() for w in v.warnings)
    if average_db is not None and abs(losses_db["A->B"] - losses_db["B->A"]) > DIRECTION_SPREAD_DB:
        warnings += (
            f"the two directions differ by {abs(losses_db['A->B'] - losses_db['B->A']):.2f} dB: "
            "check that both references were set with the same cords, and clean the end faces",
        )
    return FibreVerdict(
        verdicts, average_db, limit_db, status, min(margins) if margins else None, warnings
    )


#: Difference between the two directions beyond which a warning is shown (common practice).
DIRECTION_SPREAD_DB = 0.5


# -- drift and doubt ---------------------------------------------------------------------------

#: Reference drift tolerance by fibre family, in dB (common practice: 0.1 dB single-mode with a
#: laser source, 0.2 dB multimode). Editable per recheck.
DRIFT_TOLERANCE_DB: dict[str, float] = {"singlemode": 0.1, "multimode": 0.2}

#: Wavelengths (nm) of multimode tests; everything else is taken as single-mode.
MULTIMODE_WAVELENGTHS_NM = (850.0, 1300.0)


def fibre_family(wavelength_nm: float) -> str:
    """``multimode`` for the multimode test wavelengths (850 nm, 1300 nm, ±5 nm), else
    ``singlemode`` (1310 nm is single-mode: 10 nm from 1300 nm)."""
    if any(abs(wavelength_nm - w) <= 5.0 for w in MULTIMODE_WAVELENGTHS_NM):
        return "multimode"
    return "singlemode"


def default_drift_tolerance_db(wavelength_nm: float) -> float:
    """The common-practice drift tolerance at ``wavelength_nm`` (see DRIFT_TOLERANCE_DB)."""
    return DRIFT_TOLERANCE_DB[fibre_family(wavelength_nm)]


@dataclass(frozen=True, slots=True)
class Drift:
    """A reference re-checked: recheck − initial, and whether it is within the tolerance."""

    drift_db: float
    tolerance_db: float
    within: bool

    @property
    def message(self) -> str:
        if self.within:
            return (
                f"reference drift {self.drift_db:+.2f} dB is within "
                f"±{self.tolerance_db:.2f} dB; the results stand"
            )
        return (
            f"reference drift {self.drift_db:+.2f} dB is beyond ±{self.tolerance_db:.2f} dB: "
            "the results taken since the last good reference are in doubt; set a new "
            "reference and retest them"
        )


def reference_drift(initial_dbm: float, recheck_dbm: float, tolerance_db: float) -> Drift:
    """The drift of a reference re-checked at the end of a session.

    .. math:: \\Delta = L_{recheck} - L_{initial}

    Beyond ``tolerance_db`` (either sign) the results since the last good reference are in
    doubt.

    Raises
    ------
    InputError
        For a negative or non-finite tolerance.
    """
    if not math.isfinite(tolerance_db) or tolerance_db < 0:
        raise InputError(f"drift tolerance: {tolerance_db} dB must be zero or more")
    for value, what in ((initial_dbm, "initial reference"), (recheck_dbm, "recheck")):
        if not math.isfinite(value):
            raise InputError(f"{what}: {value} is not a finite level")
    drift_db = recheck_dbm - initial_dbm
    if not math.isfinite(drift_db):
        raise InputError("drift: the two levels are too far apart for a number")
    # Round away float noise (−7.0 → −7.1 is 0.0999…): a drift equal to the tolerance is within.
    return Drift(drift_db, tolerance_db, abs(round(drift_db, 9)) <= tolerance_db)


class Timestamped(Protocol):
    """What :func:`results_in_doubt` needs of a result."""

    @property
    def id(self) -> str: ...
    @property
    def reference_id(self) -> str | None: ...
    @property
    def at(self) -> datetime: ...


def results_in_doubt(
    results: Iterable[Timestamped], reference_ids: Iterable[str], since: datetime
) -> list[str]:
    """Ids of results measured against one of ``reference_ids`` at or after ``since``.

    ``since`` is the time of the last good reference check (the initial reference, or the last
    recheck within tolerance).
    """
    refs = set(reference_ids)
    return [r.id for r in results if r.reference_id in refs and r.at >= since]


# -- plausibility ------------------------------------------------------------------------------

#: What a test source typically delivers through a good test cord, in dBm (common practice:
#: about −20 dBm from a multimode LED source, about −7 dBm from a single-mode laser source).
#: Editable in the workspace and on the command line.
TYPICAL_SOURCE_DBM: dict[str, float] = {"multimode": -20.0, "singlemode": -7.0}

#: How far below the source's output a reference may be before it is called implausible
#: (common practice: a good test cord costs well under 1 dB; 3 dB below is "several dB").
PLAUSIBLE_SHORTFALL_DB = 3.0


#: How far above the source's output a reference may be before it is called implausible
#: (common practice: a reference cannot exceed what the source delivers; 3 dB leaves room for
#: the source's own tolerance and a different source model).
PLAUSIBLE_EXCESS_DB = 3.0

#: What field power meters plausibly read, in dBm (common practice: typical field meters span
#: about −70 to +27 dBm). A level outside is still taken, with a warning.
PLAUSIBLE_METER_DBM = (-70.0, 27.0)


def level_warnings(level_dbm: float, what: str = "level") -> list[str]:
    """A warning when ``level_dbm`` lies outside what field meters plausibly read
    (:data:`PLAUSIBLE_METER_DBM`), on either side; none otherwise."""
    low, high = PLAUSIBLE_METER_DBM
    if level_dbm < low:
        return [
            f"{what} {level_dbm:.2f} dBm is below what field meters read (about {low:g} dBm): "
            "probably no light reaches the meter (a break, the wrong fibre, the source off) "
            "or a typo"
        ]
    if level_dbm > high:
        return [
            f"{what} {level_dbm:+.2f} dBm is above what field meters read (about +{high:g} dBm) "
            "and above any test source: check the unit (mW or µW, dBm or dBW) and the number"
        ]
    return []


def default_source_dbm(wavelength_nm: float) -> float:
    """The typical source output assumed at ``wavelength_nm`` (see TYPICAL_SOURCE_DBM)."""
    return TYPICAL_SOURCE_DBM[fibre_family(wavelength_nm)]


def reference_warnings(
    reference_dbm: float,
    *,
    source_dbm: float | None = None,
    wavelength_nm: float | None = None,
    launch_condition: str | None = None,
    shortfall_db: float = PLAUSIBLE_SHORTFALL_DB,
) -> list[str]:
    """Warnings about a reference level before any reading is taken against it.

    - outside what field meters read (:func:`level_warnings`), either side;
    - more than :data:`PLAUSIBLE_EXCESS_DB` above what the source should deliver: a slipped unit
      or a wrong number (a reference cannot exceed its source);
    - more than ``shortfall_db`` below what the source should deliver: a dirty or damaged cord;
    - a multimode wavelength with no launch condition recorded (IEC 61280-4-1 asks for an
      encircled-flux launch).
    """
    warnings: list[str] = level_warnings(reference_dbm, "reference")
    if source_dbm is None and wavelength_nm is not None:
        source_dbm = default_source_dbm(wavelength_nm)
    if source_dbm is not None and reference_dbm > source_dbm + PLAUSIBLE_EXCESS_DB:
        warnings.append(
            f"reference {reference_dbm:+.2f} dBm is {reference_dbm - source_dbm:.1f} dB above the "
            f"{source_dbm:.1f} dBm the source should deliver: a reference cannot exceed the "
            "source; check the unit, the number and the source's output setting (give it as "
            "the source level if it really is that strong)"
        )
    if source_dbm is not None and reference_dbm < source_dbm - shortfall_db:
        warnings.append(
            f"reference {reference_dbm:.2f} dBm is {source_dbm - reference_dbm:.1f} dB below the "
            f"{source_dbm:.1f} dBm the source should deliver: clean and inspect the test cord ends "
            "and the meter port, reseat both connectors, and replace the cord if it stays low"
        )
    if (
        wavelength_nm is not None
        and fibre_family(wavelength_nm) == "multimode"
        and not (launch_condition or "").strip()
    ):
        warnings.append(
            "multimode reference without a recorded launch condition: IEC 61280-4-1 asks for an "
            "encircled-flux compliant launch; record it (e.g. 'encircled flux')"
        )
    return warnings


# -- summary -----------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class WavelengthSummary:
    """Counts and the worst fibre at one wavelength."""

    wavelength_nm: float
    fibres: int
    passed: int
    failed: int
    reference_problems: int
    no_limit: int
    worst_fibre: int | None
    worst_loss_db: float | None
    worst: tuple[tuple[int, float], ...]  # (fibre, worst loss) highest first, a few


def summarise(
    losses: Sequence[tuple[int, float, str, float]],
    limits_db: dict[float, float | None],
    worst_count: int = 5,
) -> list[WavelengthSummary]:
    """Summarise readings given as ``(fibre, wavelength_nm, direction, loss_db)``.

    ``limits_db`` gives the limit per wavelength (None: no limit). Wavelengths come out in
    ascending order.
    """
    grouped: dict[float, dict[int, dict[str, float]]] = {}
    for fibre, wavelength_nm, direction, loss_db in losses:
        grouped.setdefault(wavelength_nm, {}).setdefault(fibre, {})[direction] = loss_db
    out: list[WavelengthSummary] = []
    for wavelength_nm in sorted(grouped):
        fibres = grouped[wavelength_nm]
        counts = dict.fromkeys(Status, 0)
        worst: list[tuple[int, float]] = []
        for fibre, by_direction in fibres.items():
            verdict = judge_fibre(by_direction, limits_db.get(wavelength_nm))
            counts[verdict.status] += 1
            worst.append((fibre, verdict.worst_loss_db))
        worst.sort(key=lambda item: (-item[1], item[0]))
        out.append(
            WavelengthSummary(
                wavelength_nm,
                len(fibres),
                counts[Status.PASS],
                counts[Status.FAIL],
                counts[Status.REFERENCE_PROBLEM],
                counts[Status.NO_LIMIT],
                worst[0][0] if worst else None,
                worst[0][1] if worst else None,
                tuple(worst[:worst_count]),
            )
        )
    return out
