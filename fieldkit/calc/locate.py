"""Fault location: from an OTDR distance or a round-trip time to a place on the route.

The chain, for a reading taken from the start of the route (end A):

1. **Fibre distance.** An OTDR measures the round-trip time ``t`` of light and shows
   ``d = c·t / (2·n_set)`` for the group index ``n_set`` it was set to. The fibre distance at the
   fibre's true group index ``n`` is

   .. math:: d = \\frac{c\\,t}{2\\,n} \\qquad d_{true} = d_{shown}\\,\\frac{n_{set}}{n}

   with ``c`` = 299 792 458 m/s exactly (BIPM SI, 9th ed., 2019).
2. **Sheath length.** Fibre lies in a helix (or with excess length) inside the cable, so the
   cable sheath is shorter than the fibre: ``L_sheath = d / (1 + h/100)`` for a helix (excess
   fibre length) of ``h`` percent.
3. **Route position.** Slack loops and storage coils hold cable at one route position: walking the
   route from the start, each loop consumes its cable length with no route progress. A fault whose
   sheath length falls inside a loop is *at* the loop's route position.
4. **Landmarks** (a splice closure, a handhole, a building entry) whose OTDR distance (same set-up)
   and route distance are known calibrate steps 1–2 on the span itself: between the two landmarks
   that bracket the fault, the fibre-per-sheath ratio of that span is used, which cancels most of
   the index and helix error. The start of the route (OTDR distance 0, route 0) is a landmark
   unless a landmark at route 0 is given (e.g. a launch cord left on the trace). Beyond the last
   landmark, the ratio measured from the first to the last landmark is extrapolated, and the
   result says so.
5. **Sheath markings**: the marking to look for is the marking at the start plus (counting up) or
   minus (counting down) the sheath length from the start, in the marking's unit (m or ft). The
   printed markings are themselves only so exact (``MARKING_TOLERANCE_PERCENT`` of the length
   counted), which widens the marking range beyond the sheath-length range.
6. **Two-ended check**: with the fault's distance from end B and the end-to-end length (both as
   shown with the same set-up), ``d_A + d_B`` must equal the total within the uncertainty; the
   combined estimate from A is the weighted mean of ``d_A`` and ``total − d_B``.

Uncertainty
-----------
Each independent error source is given as a half-width (a typical ± figure, editable):

- instrument offset ``o`` (the zero point; common to every reading of one set-up),
- scale error ``e`` (a fraction of the distance; the time base),
- sample spacing ``s`` (an event is located to within one sample; independent per reading),
- group-index uncertainty ``δn``,
- helix uncertainty ``δh`` (percentage points); with no helix given (and no landmarks), the
  helix is estimated at the middle of 0–``UNKNOWN_HELIX_MAX_PERCENT`` and the term spans that
  whole interval (the cable can only be shorter than its fibre, never longer),
- the route-distance uncertainty of each landmark (as-built records),
- beyond the landmarks, the helix uncertainty once more, applied to the extrapolated stretch
  (the cable there may not have the ratio measured between the landmarks).

Each term is propagated by evaluating the whole chain with that one input moved by its half-width
either way and taking the larger change ``u_i`` (the chain is piecewise linear, so this is the
first-order sensitivity times the half-width, and it shows automatically which terms landmarks
cancel). The terms combine as the root-sum-square of independent contributions,

.. math:: u = \\sqrt{\\sum_i u_i^2}

and the result is shown as the range ``x − u .. x + u``. The linear sum ``Σ u_i`` is the worst
case (every error at its limit in the same direction) and is reported too. For a bare reading with
no landmarks this gives the fibre-distance uncertainty

.. math:: u_d = \\sqrt{o^2 + (e\\,d)^2 + s^2 + (d\\,\\delta n / n)^2}

Every length here is in metres; percentages are percent.

References
----------
BIPM, The International System of Units (SI), 9th edition (2019): c = 299 792 458 m/s.
The OTDR range equation d = c·t/(2n): any fibre-optic measurement text, e.g. IEC 61746-1
(calibration of OTDRs) for the distance-scale terms (offset, scale, sampling).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from typing import Literal

from fieldkit.calc.optics import SPEED_OF_LIGHT_M_PER_S
from fieldkit.calc.units import InputError, format_number, linear

#: Typical half-widths of the error terms (common practice; every one is editable).
DEFAULT_OFFSET_M = 1.0
DEFAULT_SCALE_ERROR_PERCENT = 0.01
DEFAULT_SAMPLE_SPACING_M = 1.0
DEFAULT_GROUP_INDEX_UNCERTAINTY = 0.001

#: The longest distance accepted anywhere in a location (10 000 km): longer than any fibre span
#: an OTDR measures (a few hundred km), so only a wrong unit or a typing slip is refused. It also
#: keeps the error arithmetic (squares of the terms) inside floating-point range.
MAX_DISTANCE_M = 1.0e7

#: How far printed sheath length markings may stray from the true sheath length, in percent of
#: the length counted (common practice: cable specifications commonly hold length markings to
#: within 1 %, from memory). Editable per reading (:attr:`Marking.tolerance_percent`).
MARKING_TOLERANCE_PERCENT = 1.0

#: The largest helix a cable of unknown construction is taken to have, in percent (common
#: practice: cables are typically 0–3 % shorter than their fibre). With no helix given (and no
#: landmarks) the estimate takes the middle, ``UNKNOWN_HELIX_ESTIMATE_PERCENT``, and the range
#: runs from no helix (the sheath as long as the fibre) to this much.
UNKNOWN_HELIX_MAX_PERCENT = 3.0
UNKNOWN_HELIX_ESTIMATE_PERCENT = UNKNOWN_HELIX_MAX_PERCENT / 2.0

#: Helix uncertainty when a helix is typed without one, in percentage points (common practice).
TYPED_HELIX_UNCERTAINTY_PERCENT = 0.5

#: Cable a closure may hold coiled beside it, in m (common practice: a storage loop of a few
#: tens of metres at a joint, so the closure can be opened on the surface). It lies on the
#: fibre before the splice but adds no route length, so an OTDR event at a closure may read up
#: to this much further than the route position alone would put it, never less.
CLOSURE_STORAGE_LOOP_M = 20.0

#: Units a result may be shown in.
OUTPUT_UNITS = ("m", "km", "ft", "mi")

MarkingUnit = Literal["m", "ft"]
MarkingDirection = Literal["up", "down"]


# -- inputs ---------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class Landmark:
    """A named point whose OTDR distance (as shown, same set-up) and route distance are known."""

    name: str
    otdr_distance_m: float
    route_distance_m: float


@dataclass(frozen=True, slots=True)
class SlackLoop:
    """A slack loop or storage coil: ``cable_length_m`` of cable held at ``route_position_m``."""

    route_position_m: float
    cable_length_m: float
    label: str = ""

    def describe(self) -> str:
        name = self.label or "slack"
        return (
            f"{name} ({format_number(self.cable_length_m)} m at "
            f"{format_number(self.route_position_m)} m)"
        )


@dataclass(frozen=True, slots=True)
class Marking:
    """The sheath marking at the start, its unit, and whether markings count up or down.

    ``tolerance_percent`` is how far the printed markings may stray from the true length, in
    percent of the length counted (a ± half-width).
    """

    start: float
    unit: MarkingUnit = "m"
    direction: MarkingDirection = "up"
    tolerance_percent: float = MARKING_TOLERANCE_PERCENT


@dataclass(frozen=True, slots=True)
class TwoEnded:
    """The same fault seen from end B, and the end-to-end length, both as shown (same set-up)."""

    from_b_otdr_m: float
    total_otdr_m: float


@dataclass(frozen=True, slots=True)
class ErrorTerms:
    """Half-widths of the instrument's distance errors (typical defaults, common practice)."""

    offset_m: float = DEFAULT_OFFSET_M
    scale_error_percent: float = DEFAULT_SCALE_ERROR_PERCENT
    sample_spacing_m: float = DEFAULT_SAMPLE_SPACING_M
    group_index_uncertainty: float = DEFAULT_GROUP_INDEX_UNCERTAINTY
    helix_uncertainty_percent: float = 0.0
    landmark_route_uncertainty_m: float = 0.0


@dataclass(frozen=True, slots=True)
class LocateInput:
    """Everything :func:`locate` needs. Give ``otdr_distance_m`` or ``round_trip_time_s``.

    ``index_set`` is the group index the OTDR was set to when it showed the distances (the fault's
    and the landmarks'); ``group_index`` is the fibre's. Either may be left out, in which case it
    is taken equal to the other (the instrument was set right). With a round-trip time,
    ``index_set`` only says how the landmark distances were shown.
    """

    otdr_distance_m: float | None = None
    round_trip_time_s: float | None = None
    index_set: float | None = None
    group_index: float | None = None
    helix_percent: float | None = None
    slack: tuple[SlackLoop, ...] = ()
    landmarks: tuple[Landmark, ...] = ()
    marking: Marking | None = None
    two_ended: TwoEnded | None = None
    errors: ErrorTerms = field(default_factory=ErrorTerms)


# -- outputs --------------------------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class Contribution:
    """One error term's share of the route-position uncertainty (and of the fibre distance)."""

    name: str
    route_m: float
    fibre_m: float


@dataclass(frozen=True, slots=True)
class MarkingResult:
    """The sheath marking to look for, with the range that matches the route range."""

    value: float
    low: float
    high: float
    unit: MarkingUnit
    direction: MarkingDirection

    def describe(self) -> str:
        lo, hi = sorted((self.low, self.high))
        return (
            f"{self.value:.0f} {self.unit} (between {lo:.0f} and {hi:.0f}; markings count "
            f"{self.direction})"
        )


@dataclass(frozen=True, slots=True)
class Position:
    """One located fault: fibre, sheath and route positions with their uncertainties."""

    fibre_distance_m: float
    sheath_distance_m: float
    route_distance_m: float
    uncertainty_m: float  # half-width of the route range (root-sum-square)
    worst_case_m: float  # the linear sum of the terms
    fibre_uncertainty_m: float
    sheath_uncertainty_m: float
    basis: Literal["model", "interpolated", "extrapolated"]
    between: tuple[str, str] | None
    nearest_landmark: str | None
    offset_from_landmark_m: float | None
    in_slack: SlackLoop | None
    marking: MarkingResult | None
    contributions: tuple[Contribution, ...]

    @property
    def low_m(self) -> float:
        return max(0.0, self.route_distance_m - self.uncertainty_m)

    @property
    def high_m(self) -> float:
        return self.route_distance_m + self.uncertainty_m


@dataclass(frozen=True, slots=True)
class TwoEndedResult:
    """The consistency check of a two-ended measurement and the combined estimate."""

    from_a_m: float  # fibre distances, corrected to the true index
    from_b_m: float
    total_m: float
    discrepancy_m: float  # from_a + from_b - total
    tolerance_m: float  # the discrepancy's own uncertainty (root-sum-square)
    consistent: bool
    combined: Position
    weight_a: float  # weight of the reading from A in the combined estimate


@dataclass(frozen=True, slots=True)
class Location:
    """The result of :func:`locate`: the reading from A, and the two-ended check if given."""

    position: Position
    two_ended: TwoEndedResult | None
    group_index: float
    index_set: float
    helix_percent: float
    warnings: tuple[str, ...]


# -- the basic formulas ---------------------------------------------------------------------
def fibre_distance_from_time(round_trip_time_s: float, group_index: float) -> float:
    """Fibre distance in m of an event whose echo returns after ``round_trip_time_s``.

    .. math:: d = \\frac{c\\,t}{2\\,n}

    with c = 299 792 458 m/s exactly (BIPM SI) and ``n`` the fibre's group index.
    """
    _check_time(round_trip_time_s)
    _check_index(group_index, "group index")
    return SPEED_OF_LIGHT_M_PER_S * round_trip_time_s / (2.0 * group_index)


def rescale_distance(shown_m: float, index_set: float, group_index: float) -> float:
    """A distance shown with the OTDR set to ``index_set``, at the fibre's true ``group_index``.

    .. math:: d_{true} = d_{shown}\\,\\frac{n_{set}}{n}

    The instrument measured time; it divided by the index it was given, so the distance scales
    by the ratio of the indices.
    """
    _check_distance(shown_m, "OTDR distance")
    _check_index(index_set, "index set on the OTDR")
    _check_index(group_index, "group index")
    return shown_m * index_set / group_index


def sheath_length(fibre_m: float, helix_percent: float) -> float:
    """Cable sheath length in m holding ``fibre_m`` of fibre with a helix of ``helix_percent``.

    .. math:: L_{sheath} = \\frac{d}{1 + h/100}
    """
    _check_helix(helix_percent)
    _finite(fibre_m, "fibre distance")
    return fibre_m / (1.0 + helix_percent / 100.0)


def cable_at_route(route_m: float, slack: Sequence[SlackLoop]) -> float:
    """Sheath length from the start to route position ``route_m``.

    A loop at exactly ``route_m`` counts as already passed (a loop at a landmark lies before it).
    """
    return route_m + sum(loop.cable_length_m for loop in slack if loop.route_position_m <= route_m)


def route_from_cable(cable_m: float, slack: Sequence[SlackLoop]) -> tuple[float, SlackLoop | None]:
    """Route position of the point ``cable_m`` of sheath from the start, walking past each loop.

    Returns the route position and the loop the point lies in (None when on the run of cable).
    """
    held = 0.0
    for loop in sorted(slack, key=lambda s: s.route_position_m):
        loop_start = loop.route_position_m + held
        if cable_m < loop_start:
            break
        if cable_m <= loop_start + loop.cable_length_m:
            return loop.route_position_m, loop
        held += loop.cable_length_m
    return cable_m - held, None


def sheath_marking(marking: Marking, sheath_m: float) -> float:
    """The marking printed ``sheath_m`` of cable from the start, in the marking's unit."""
    length = linear(sheath_m, "m", marking.unit) if marking.unit != "m" else sheath_m
    return marking.start + length if marking.direction == "up" else marking.start - length


def in_unit(distance_m: float, unit: str) -> float:
    """``distance_m`` in ``unit`` (m, km, ft or mi), through the unit registry."""
    if unit not in OUTPUT_UNITS:
        raise InputError(f"unit: '{unit}' is not one of {', '.join(OUTPUT_UNITS)}")
    return _finite(distance_m, "distance") if unit == "m" else linear(distance_m, "m", unit)


def format_distance(distance_m: float, unit: str = "m") -> str:
    """A distance for display in ``unit``, to a resolution that suits a dig (0.1 m, 1 ft)."""
    value = in_unit(distance_m, unit)
    decimals = {"m": 1, "km": 4, "ft": 0, "mi": 4}[unit]
    text = f"{value:.{decimals}f}"
    return f"{text.replace('-', '−')} {unit}"


def describe_offset(offset_m: float, landmark: str, unit: str = "m") -> str:
    """``"12.0 m past closure 7"``, ``"3 ft before handhole 2"`` or ``"at start"``."""
    if abs(in_unit(offset_m, unit)) < {"m": 0.05, "km": 0.00005, "ft": 0.5, "mi": 0.00005}[unit]:
        return f"at {landmark}"
    side = "past" if offset_m > 0 else "before"
    return f"{format_distance(abs(offset_m), unit)} {side} {landmark}"


# -- validation -----------------------------------------------------------------------------
def _finite(x: float, what: str) -> float:
    if not isinstance(x, (int, float)) or isinstance(x, bool) or not math.isfinite(x):
        raise InputError(f"{what}: {x!r} is not a finite number")
    return float(x)


def _check_distance(x: float, what: str) -> None:
    if _finite(x, what) < 0:
        raise InputError(f"{what}: {format_number(x)} m is negative; a distance is 0 or more")
    if x > MAX_DISTANCE_M:
        raise InputError(
            f"{what}: {format_number(x)} m is longer than any fibre span "
            f"({format_number(MAX_DISTANCE_M / 1000)} km at most); check the unit"
        )


def _check_time(x: float) -> None:
    if _finite(x, "round-trip time") <= 0:
        raise InputError(f"round-trip time: {format_number(x)} s must be more than zero")
    # Light in glass (group index above 1) covers less than c·t/2 in a round trip of t.
    if SPEED_OF_LIGHT_M_PER_S * x / 2.0 > MAX_DISTANCE_M:
        raise InputError(
            f"round-trip time: {format_number(x)} s is longer than any fibre span "
            "gives; check the unit"
        )


def _check_index(n: float, what: str) -> None:
    if _finite(n, what) < 1.0:
        raise InputError(
            f"{what}: {format_number(n)} is below 1; a group index of glass fibre "
            "is about 1.46–1.48"
        )
    if n > 3.0:
        raise InputError(
            f"{what}: {format_number(n)} is not a group index of fibre (about 1.46–1.48)"
        )


def _check_helix(h: float) -> None:
    if _finite(h, "helix") < 0 or h >= 20:
        raise InputError(
            f"helix: {format_number(h)} % is outside 0–20 % (cables are typically 0–3 %)"
        )


def validate(inp: LocateInput) -> None:
    """Refuse inputs that cannot describe a real measurement, with a message naming the problem.

    Raises
    ------
    InputError
        For a missing or doubled reading, a negative distance or time, an index below 1 or not a
        number, a helix outside 0–20 %, negative slack, landmarks out of order, a negative or
        doubtful uncertainty, or a two-ended total shorter than either reading.
    """
    if (inp.otdr_distance_m is None) == (inp.round_trip_time_s is None):
        raise InputError("reading: give either the OTDR distance or the round-trip time")
    if inp.otdr_distance_m is not None:
        _check_distance(inp.otdr_distance_m, "OTDR distance")
        if inp.group_index is None and inp.index_set is None:
            raise InputError(
                "group index: give the fibre's group index (or a fibre type and "
                "wavelength), or the index the OTDR was set to"
            )
    if inp.round_trip_time_s is not None:
        _check_time(inp.round_trip_time_s)
        if inp.group_index is None:
            raise InputError("group index: a round-trip time needs the fibre's group index")
    if inp.group_index is not None:
        _check_index(inp.group_index, "group index")
    if inp.index_set is not None:
        _check_index(inp.index_set, "index set on the OTDR")
    if inp.helix_percent is not None:
        _check_helix(inp.helix_percent)
    for loop in inp.slack:
        _check_distance(loop.route_position_m, "slack route position")
        _check_distance(loop.cable_length_m, "slack cable length")
    names = set()
    for mark in inp.landmarks:
        if not mark.name.strip():
            raise InputError("landmark: every landmark needs a name")
        if mark.name in names:
            raise InputError(f"landmark '{mark.name}': the name is used twice")
        names.add(mark.name)
        _check_distance(mark.otdr_distance_m, f"landmark '{mark.name}' OTDR distance")
        _check_distance(mark.route_distance_m, f"landmark '{mark.name}' route distance")
    ordered = sorted(inp.landmarks, key=lambda m: m.route_distance_m)
    for a, b in zip(ordered, ordered[1:], strict=False):
        if b.route_distance_m == a.route_distance_m:
            raise InputError(f"landmarks '{a.name}' and '{b.name}' are at the same route distance")
        if b.otdr_distance_m <= a.otdr_distance_m:
            raise InputError(
                f"landmark '{b.name}' is further along the route than '{a.name}' but not further "
                "on the OTDR trace; check their distances"
            )
    if ordered and ordered[0].route_distance_m > 0 and ordered[0].otdr_distance_m == 0:
        raise InputError(
            f"landmark '{ordered[0].name}': OTDR distance 0 is the start; give its "
            "route distance as 0 too, or its real OTDR distance"
        )
    if inp.marking is not None:
        _finite(inp.marking.start, "marking at the start")
        if inp.marking.unit not in ("m", "ft"):
            raise InputError(f"marking unit: '{inp.marking.unit}' must be m or ft")
        if inp.marking.direction not in ("up", "down"):
            raise InputError(f"marking direction: '{inp.marking.direction}' must be up or down")
        tolerance = _finite(inp.marking.tolerance_percent, "marking tolerance")
        if not 0 <= tolerance <= 10:
            raise InputError(
                f"marking tolerance: {format_number(tolerance)} % is outside 0–10 % "
                "(printed markings are typically within 1 %)"
            )
    if inp.two_ended is not None:
        _check_distance(inp.two_ended.from_b_otdr_m, "distance from end B")
        _check_distance(inp.two_ended.total_otdr_m, "total length")
        if inp.two_ended.total_otdr_m <= 0:
            raise InputError("total length: must be more than zero")
        if inp.two_ended.from_b_otdr_m > inp.two_ended.total_otdr_m:
            raise InputError("distance from end B: longer than the total length")
    err = inp.errors
    for value, what in (
        (err.offset_m, "instrument offset"),
        (err.scale_error_percent, "scale error"),
        (err.sample_spacing_m, "sample spacing"),
        (err.group_index_uncertainty, "group index uncertainty"),
        (err.helix_uncertainty_percent, "helix uncertainty"),
        (err.landmark_route_uncertainty_m, "landmark route uncertainty"),
    ):
        if _finite(value, what) < 0:
            raise InputError(f"{what}: {format_number(value)} is negative; give a ± half-width")
    for value, what in (
        (err.offset_m, "instrument offset"),
        (err.sample_spacing_m, "sample spacing"),
        (err.landmark_route_uncertainty_m, "landmark route uncertainty"),
    ):
        if value > MAX_DISTANCE_M:
            raise InputError(
                f"{what}: {format_number(value)} m is longer than any fibre span; check the unit"
            )
    if err.scale_error_percent > 5:
        raise InputError(
            f"scale error: {format_number(err.scale_error_percent)} % is not an "
            "instrument's scale error (typically 0.001–0.01 %)"
        )
    if err.group_index_uncertainty > 0.1:
        raise InputError(
            "group index uncertainty: above 0.1 is not an uncertainty of a fibre's "
            "index (typically 0.0002–0.001)"
        )


# -- the chain, as a function of every perturbable input -------------------------------------
@dataclass(frozen=True, slots=True)
class _Chain:
    """The inputs the chain depends on, so each error term can move one of them."""

    fault_shown_m: float  # the reading from A as the OTDR would show it at index_set
    landmark_shown_m: tuple[float, ...]
    landmark_route_m: tuple[float, ...]
    landmark_names: tuple[str, ...]
    index_set: float
    group_index: float
    helix_percent: float
    slack: tuple[SlackLoop, ...]
    offset_m: float = 0.0  # added to every reading of the A-end set-up
    offset_b_m: float = 0.0  # added to the reading from B (its own set-up)
    scale: float = 1.0  # multiplies every reading
    b_shown_m: float | None = None
    total_shown_m: float | None = None
    weight_a: float = 1.0  # 1: the reading from A alone; less: the two-ended combination
    # Beyond the landmarks the measured ratio is assumed to hold; this moves it by a helix change
    # (percentage points) to say how far it may not.
    extrapolation_helix_delta: float = 0.0

    def fibre(self, shown_m: float, offset_m: float) -> float:
        return (shown_m * self.scale + offset_m) * self.index_set / self.group_index

    def fault_fibre(self) -> float:
        from_a = self.fibre(self.fault_shown_m, self.offset_m)
        if self.weight_a >= 1.0 or self.b_shown_m is None or self.total_shown_m is None:
            return from_a
        total = self.fibre(self.total_shown_m, self.offset_m)
        from_b = self.fibre(self.b_shown_m, self.offset_b_m)
        return self.weight_a * from_a + (1.0 - self.weight_a) * (total - from_b)

    def discrepancy(self) -> float:
        assert self.b_shown_m is not None and self.total_shown_m is not None
        return (
            self.fibre(self.fault_shown_m, self.offset_m)
            + self.fibre(self.b_shown_m, self.offset_b_m)
            - self.fibre(self.total_shown_m, self.offset_m)
        )

    def anchors(self) -> list[tuple[str, float, float]]:
        """(name, fibre distance, sheath length from the start) of each landmark, in order."""
        marks = sorted(
            zip(self.landmark_names, self.landmark_shown_m, self.landmark_route_m, strict=True),
            key=lambda m: m[2],
        )
        out: list[tuple[str, float, float]] = []
        if not marks or marks[0][2] > 0:
            out.append(("start", 0.0, 0.0))  # not a reading: no offset, no sampling error
        for name, shown, route in marks:
            out.append((name, self.fibre(shown, self.offset_m), cable_at_route(route, self.slack)))
        return out

    def solve(self) -> tuple[float, float, float, SlackLoop | None, str, tuple[str, str] | None]:
        """(fibre, sheath, route, loop, basis, between) of the fault."""
        fibre_m = self.fault_fibre()
        anchors = self.anchors() if self.landmark_names else []
        if len(anchors) < 2:
            sheath_m = sheath_length(fibre_m, self.helix_percent)
            route_m, loop = route_from_cable(sheath_m, self.slack)
            return fibre_m, sheath_m, route_m, loop, "model", None
        basis = "interpolated"
        for a, b in zip(anchors, anchors[1:], strict=False):
            if fibre_m <= b[1]:
                lo, hi = a, b
                if fibre_m < a[1]:
                    basis = "extrapolated"  # before the first landmark
                break
        else:
            lo, hi = anchors[0], anchors[-1]
            basis = "extrapolated"
        fibre_per_sheath = (hi[1] - lo[1]) / (hi[2] - lo[2])
        if basis == "extrapolated":
            fibre_per_sheath *= 1.0 + self.extrapolation_helix_delta / 100.0
        if basis == "extrapolated" and fibre_m > anchors[-1][1]:
            sheath_m = anchors[-1][2] + (fibre_m - anchors[-1][1]) / fibre_per_sheath
            between = (anchors[-1][0], anchors[-1][0])
        else:
            sheath_m = lo[2] + (fibre_m - lo[1]) / fibre_per_sheath
            between = (lo[0], hi[0])
        route_m, loop = route_from_cable(max(sheath_m, 0.0), self.slack)
        return fibre_m, sheath_m, route_m, loop, basis, between


_Move = Callable[[float], "_Chain"]


def _terms(chain: _Chain, inp: LocateInput, two_ended: bool) -> list[tuple[str, _Move]]:
    """Each independent error term as a function moving the chain by ±1 half-width."""
    err = inp.errors
    helix_term: tuple[str, _Move]
    if inp.helix_percent is None and not chain.landmark_names:
        # Not given: the cable can only be shorter than its fibre, by up to the largest typical
        # helix. The estimate takes the middle and the term spans 0 % to the largest, so the
        # range runs from the fibre distance down to the shortest plausible cable.
        half = UNKNOWN_HELIX_MAX_PERCENT - UNKNOWN_HELIX_ESTIMATE_PERCENT
        helix_term = (
            f"helix (not given: 0–{format_number(UNKNOWN_HELIX_MAX_PERCENT)} %)",
            lambda k: replace(
                chain,
                helix_percent=min(
                    UNKNOWN_HELIX_MAX_PERCENT, max(0.0, chain.helix_percent + k * half)
                ),
            ),
        )
    else:
        helix_term = (
            "helix",
            lambda k: replace(
                chain,
                helix_percent=max(0.0, chain.helix_percent + k * err.helix_uncertainty_percent),
            ),
        )
    terms: list[tuple[str, _Move]] = [
        ("instrument offset", lambda k: replace(chain, offset_m=k * err.offset_m)),
        ("scale error", lambda k: replace(chain, scale=1.0 + k * err.scale_error_percent / 100)),
        (
            "sample spacing (fault reading)",
            lambda k: replace(chain, fault_shown_m=chain.fault_shown_m + k * err.sample_spacing_m),
        ),
        (
            "group index",
            lambda k: replace(
                chain, group_index=max(1.0, chain.group_index + k * err.group_index_uncertainty)
            ),
        ),
        helix_term,
    ]
    if chain.landmark_names and err.helix_uncertainty_percent > 0:
        terms.append(
            (
                "helix beyond the landmarks",
                lambda k: replace(
                    chain, extrapolation_helix_delta=k * err.helix_uncertainty_percent
                ),
            )
        )
    for i, name in enumerate(chain.landmark_names):

        def moved_reading(k: float, i: int = i) -> _Chain:
            shown = list(chain.landmark_shown_m)
            shown[i] = max(0.0, shown[i] + k * err.sample_spacing_m)
            return replace(chain, landmark_shown_m=tuple(shown))

        def moved_route(k: float, i: int = i) -> _Chain:
            route = list(chain.landmark_route_m)
            route[i] = max(0.0, route[i] + k * err.landmark_route_uncertainty_m)
            return replace(chain, landmark_route_m=tuple(route))

        terms.append((f"sample spacing ({name})", moved_reading))
        if err.landmark_route_uncertainty_m > 0:
            terms.append((f"route distance ({name})", moved_route))
    if two_ended and chain.b_shown_m is not None and chain.total_shown_m is not None:
        b_shown, total_shown = chain.b_shown_m, chain.total_shown_m
        terms += [
            ("instrument offset (end B)", lambda k: replace(chain, offset_b_m=k * err.offset_m)),
            (
                "sample spacing (reading from B)",
                lambda k: replace(chain, b_shown_m=b_shown + k * err.sample_spacing_m),
            ),
            (
                "sample spacing (total length)",
                lambda k: replace(chain, total_shown_m=total_shown + k * err.sample_spacing_m),
            ),
        ]
    return terms


def _ordered_chain_valid(chain: _Chain) -> bool:
    anchors = chain.anchors()
    return all(b[1] > a[1] and b[2] > a[2] for a, b in zip(anchors, anchors[1:], strict=False))


def _position(chain: _Chain, inp: LocateInput, two_ended: bool) -> Position:
    fibre_m, sheath_m, route_m, loop, basis, between = chain.solve()
    contributions: list[Contribution] = []
    sheath_parts: list[float] = []
    for name, move in _terms(chain, inp, two_ended):
        d_route = d_fibre = d_sheath = 0.0
        for k in (1.0, -1.0):
            moved = move(k)
            if moved.landmark_names and not _ordered_chain_valid(moved):
                continue  # a landmark moved past its neighbour: the term is not meaningful there
            f, s, r, _, _, _ = moved.solve()
            d_route = max(d_route, abs(r - route_m))
            d_fibre = max(d_fibre, abs(f - fibre_m))
            d_sheath = max(d_sheath, abs(s - sheath_m))
        if d_route > 0 or d_fibre > 0:
            contributions.append(Contribution(name, d_route, d_fibre))
        sheath_parts.append(d_sheath)
    uncertainty_m = math.sqrt(sum(c.route_m**2 for c in contributions))
    nearest, offset = _nearest(chain, route_m)
    marking = None
    if inp.marking is not None:
        # The sheath-length range, and the markings' own print tolerance on the length counted,
        # root-sum-square: u = √(u_sheath² + (tol · L_sheath)²).
        print_u = abs(sheath_m) * inp.marking.tolerance_percent / 100.0
        sheath_u = math.sqrt(sum(x * x for x in sheath_parts) + print_u**2)
        marking = MarkingResult(
            value=sheath_marking(inp.marking, sheath_m),
            low=sheath_marking(inp.marking, max(0.0, sheath_m - sheath_u)),
            high=sheath_marking(inp.marking, sheath_m + sheath_u),
            unit=inp.marking.unit,
            direction=inp.marking.direction,
        )
    return Position(
        fibre_distance_m=fibre_m,
        sheath_distance_m=sheath_m,
        route_distance_m=route_m,
        uncertainty_m=uncertainty_m,
        worst_case_m=sum(c.route_m for c in contributions),
        fibre_uncertainty_m=math.sqrt(sum(c.fibre_m**2 for c in contributions)),
        sheath_uncertainty_m=math.sqrt(sum(x * x for x in sheath_parts)),
        basis=basis,  # type: ignore[arg-type]
        between=between,
        nearest_landmark=nearest,
        offset_from_landmark_m=offset,
        in_slack=loop,
        marking=marking,
        contributions=tuple(contributions),
    )


def _nearest(chain: _Chain, route_m: float) -> tuple[str | None, float | None]:
    points = [(n, r) for n, r in zip(chain.landmark_names, chain.landmark_route_m, strict=True)]
    if not points or min(r for _, r in points) > 0:
        points.append(("start", 0.0))
    name, where = min(points, key=lambda p: (abs(route_m - p[1]), p[1]))
    return name, route_m - where


def locate(inp: LocateInput) -> Location:
    """Locate a fault on the route from an OTDR distance or a round-trip time.

    See the module docstring for the chain of formulas and how the uncertainty combines.

    Parameters
    ----------
    inp
        The reading, the indices, helix, slack, landmarks, marking, two-ended readings and error
        half-widths; every length in m.

    Returns
    -------
    Location
        The position from end A (fibre, sheath and route distance, range, nearest landmark, the
        marking to look for), the two-ended check when given, and warnings in words.

    Raises
    ------
    InputError
        For input that cannot describe a real measurement (see :func:`validate`).
    """
    validate(inp)
    warnings: list[str] = []
    group_index = inp.group_index if inp.group_index is not None else inp.index_set
    assert group_index is not None
    index_set = inp.index_set if inp.index_set is not None else group_index
    if inp.group_index is None:
        warnings.append(
            "No fibre group index given: the index set on the OTDR is taken as the fibre's."
        )
    if inp.otdr_distance_m is not None:
        fault_shown_m = inp.otdr_distance_m
    else:
        assert inp.round_trip_time_s is not None
        fault_shown_m = fibre_distance_from_time(inp.round_trip_time_s, index_set)
    helix = inp.helix_percent if inp.helix_percent is not None else 0.0
    if inp.helix_percent is None and not inp.landmarks:
        helix = UNKNOWN_HELIX_ESTIMATE_PERCENT
        warnings.append(
            f"No helix given: the estimate takes {format_number(helix)} %, the middle of the "
            f"0–{format_number(UNKNOWN_HELIX_MAX_PERCENT)} % typical of cables; the range runs "
            "from the fibre distance (no helix) to the shortest plausible cable "
            f"({format_number(UNKNOWN_HELIX_MAX_PERCENT)} %). Give the cable's helix or a "
            "landmark to narrow it."
        )
    slack = tuple(sorted(inp.slack, key=lambda s: s.route_position_m))
    marks = tuple(inp.landmarks)
    chain = _Chain(
        fault_shown_m=fault_shown_m,
        landmark_shown_m=tuple(m.otdr_distance_m for m in marks),
        landmark_route_m=tuple(m.route_distance_m for m in marks),
        landmark_names=tuple(m.name for m in marks),
        index_set=index_set,
        group_index=group_index,
        helix_percent=helix,
        slack=slack,
        b_shown_m=inp.two_ended.from_b_otdr_m if inp.two_ended else None,
        total_shown_m=inp.two_ended.total_otdr_m if inp.two_ended else None,
    )
    two: TwoEndedResult | None = None
    position: Position | None
    try:
        position = _position(chain, inp, two_ended=False)
        two = _two_ended(chain, inp) if inp.two_ended is not None else None
    except (OverflowError, ZeroDivisionError):
        position = None
    if position is None or not _plausible(position) or (two and not _plausible(two.combined)):
        # e.g. a landmark at 1e-200 m on the trace: its ratio to the route blows up the range
        if inp.landmarks:
            raise InputError(
                "landmarks: these distances put the fault beyond any span; check each "
                "landmark's OTDR and route distance and their units"
            )
        raise InputError("reading: the result is beyond any span; check the reading's unit")
    warnings += _position_warnings(position, "")
    if two is not None:
        if not two.consistent:
            warnings.append(
                f"Two-ended check fails: from A + from B − total = "
                f"{format_number(two.discrepancy_m, 4)} m, more than the ±"
                f"{format_number(two.tolerance_m, 3)} m the readings allow. Check the index, the "
                "total length and that both ends saw the same event before using either."
            )
        if two.from_a_m > two.total_m:
            warnings.append("The reading from A is beyond the total length.")
        warnings += [
            w
            for w in _position_warnings(two.combined, "Combined estimate: ")
            if w.removeprefix("Combined estimate: ") not in warnings
        ]
    if inp.marking is not None and position.marking is not None:
        if position.marking.value < 0:
            warnings.append(
                "The marking counts down past zero before the fault: check the "
                "marking at the start and the direction."
            )
        if marks:
            warnings.append(
                "Sheath markings hold only along one piece of cable: if the cable is "
                "jointed at a closure before the fault, read the marking there."
            )
    return Location(
        position=position,
        two_ended=two,
        group_index=group_index,
        index_set=index_set,
        helix_percent=helix,
        warnings=tuple(warnings),
    )


def _plausible(p: Position) -> bool:
    """True when every distance of a position is a number within reach of a real span."""
    values = (
        p.fibre_distance_m,
        p.sheath_distance_m,
        p.route_distance_m,
        p.uncertainty_m,
        p.worst_case_m,
        p.fibre_uncertainty_m,
        p.sheath_uncertainty_m,
    )
    return all(math.isfinite(v) and abs(v) <= 10 * MAX_DISTANCE_M for v in values)


def _position_warnings(p: Position, prefix: str) -> list[str]:
    out = []
    if p.basis == "extrapolated" and p.between is not None:
        if p.between[0] == p.between[1]:
            out.append(
                f"{prefix}Beyond the last landmark ({p.between[0]}): extrapolated with the "
                "fibre-to-sheath ratio measured between the landmarks; confirm on site."
            )
        else:
            out.append(f"{prefix}Before the first landmark ({p.between[0]}): extrapolated.")
    if p.in_slack is not None:
        out.append(
            f"{prefix}The fault falls inside a slack loop, {p.in_slack.describe()}: look "
            "in the loop as well as along the run."
        )
    return out


def _two_ended(chain: _Chain, inp: LocateInput) -> TwoEndedResult:
    err = inp.errors
    assert chain.b_shown_m is not None and chain.total_shown_m is not None
    ratio = chain.index_set / chain.group_index
    from_a = chain.fibre(chain.fault_shown_m, 0.0)
    from_b = chain.fibre(chain.b_shown_m, 0.0)
    total = chain.fibre(chain.total_shown_m, 0.0)
    scale = err.scale_error_percent / 100

    def var(*distances: float, readings: int) -> float:
        # Nominal variance of a sum of readings, used only to weigh the two estimates.
        return (
            readings * (err.offset_m**2 + err.sample_spacing_m**2)
            + sum((scale * d * ratio) ** 2 for d in distances)
            + 1e-12
        )

    var_a = var(from_a, readings=1)
    var_b = var(from_b, total, readings=2)
    weight_a = var_b / (var_a + var_b)
    combined_chain = replace(chain, weight_a=weight_a)
    combined = _position(combined_chain, inp, two_ended=True)
    # The discrepancy's uncertainty: every term moved in turn, root-sum-square (the index and
    # scale errors, common to all three readings, nearly cancel in from A + from B − total).
    discrepancy = chain.discrepancy()
    parts = []
    for _, move in _terms(chain, inp, two_ended=True):
        parts.append(max(abs(move(k).discrepancy() - discrepancy) for k in (1.0, -1.0)))
    tolerance = math.sqrt(sum(p * p for p in parts))
    return TwoEndedResult(
        from_a_m=from_a,
        from_b_m=from_b,
        total_m=total,
        discrepancy_m=discrepancy,
        tolerance_m=tolerance,
        consistent=abs(discrepancy) <= tolerance,
        combined=combined,
        weight_a=weight_a,
    )


# -- which landmark an event is ---------------------------------------------------------------
@dataclass(frozen=True, slots=True)
class RouteWindow:
    """Where on the route an OTDR event may lie: the located estimate and the range of route
    positions a landmark there may have (see :func:`route_window`)."""

    estimate_m: float
    low_m: float
    high_m: float

    def holds(self, route_m: float) -> bool:
        """True when a landmark at route position ``route_m`` (m) may be this event."""
        return self.low_m <= route_m <= self.high_m


def route_window(
    otdr_distance_m: float,
    group_index: float,
    reading_uncertainty_m: float,
    storage_loop_m: float = CLOSURE_STORAGE_LOOP_M,
) -> RouteWindow:
    """The route positions a closure (or other landmark) may have for an OTDR event read at
    ``otdr_distance_m`` from the start of the route: the rule that says which event is a closure.

    The event is located as a fault would be (:func:`locate`, with no helix known and no
    landmarks, the default instrument terms, and the event itself read to within
    ``reading_uncertainty_m``): the route range ``x − u .. x + u``. A landmark there may also
    sit up to ``storage_loop_m`` further back along the route, for the cable coiled at a closure
    (fibre with no route length):

    .. math:: x - u - S \\le r \\le x + u

    Parameters
    ----------
    otdr_distance_m
        The event's distance as the trace shows it, from the route's start (m).
    group_index
        The group index the trace was taken with (taken as the fibre's).
    reading_uncertainty_m
        How well the event is placed on the trace (m): about a pulse length or a few samples.
    storage_loop_m
        The most cable stored at a closure (m), :data:`CLOSURE_STORAGE_LOOP_M` by default.

    Returns
    -------
    RouteWindow
        The located estimate and the range of route positions, in m.

    Raises
    ------
    InputError
        For a distance, index or uncertainty that :func:`locate` refuses.
    """
    if _finite(storage_loop_m, "storage loop") < 0:
        raise InputError(f"storage loop: {format_number(storage_loop_m)} m is negative")
    errors = ErrorTerms(sample_spacing_m=reading_uncertainty_m)
    inp = LocateInput(otdr_distance_m=otdr_distance_m, group_index=group_index, errors=errors)
    position = locate(inp).position
    return RouteWindow(
        position.route_distance_m, max(0.0, position.low_m - storage_loop_m), position.high_m
    )
