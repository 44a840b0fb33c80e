"""Loss budget of a passive link, per wavelength, and the application and transceiver checks.

A :class:`LinkDescription` holds resolved values (fibres with their attenuation per wavelength,
loss per connection, per splice, per component). :func:`compute_budget` turns it into one
:class:`WavelengthBudget` per wavelength whose line items add up to the total:

.. math:: L_{link}(\\lambda) = \\sum_i \\alpha_i(\\lambda) \\ell_i + n_c L_c + n_s L_s
          + \\sum_k L_k + L_{mismatch}(\\lambda)

The design margin (repairs, ageing) is reported beside the link loss, never inside it.

Three totals per wavelength:
- ``loss_db``: the maximum (acceptance) loss, from the standards' maximum values;
- ``typical_loss_db``: the design expectation, when every item has a typical value;
- ``loss_min_db``: the lowest plausible loss, for receiver overload: fibre at its typical
  attenuation, connections and splices at 0 dB, splitters at their ideal 10·log10(N), fixed
  attenuators at their value, other components at 0 dB.

References
----------
ANSI/TIA-568.3-D (2016) Annex on link attenuation: fibre + connections + splices (from memory).
ISO/IEC 14763-3:2014, the same sum for the installed link (from memory).
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any, Literal

from fieldkit.calc import coupling
from fieldkit.calc.fibre import Fibre, check_wavelength_nm
from fieldkit.calc.units import InputError, format_number

if TYPE_CHECKING:
    from fieldkit.calc.checks import LinkChecks

#: An application or transceiver wavelength matches a budget wavelength in the same window
#: (e.g. 1300 and 1310 nm, both "the 1310 nm window"), in nm.
WINDOW_MATCH_NM = 20.0

#: Fixed attenuator values commonly stocked, in dB (common practice).
STOCK_ATTENUATORS_DB: tuple[float, ...] = (1.0, 2.0, 3.0, 5.0, 7.0, 10.0, 15.0, 20.0)


#: Upper bounds that keep every sum finite and catch a slipped unit: no passive link is longer
#: than 100 000 km, no single loss is above 1000 dB.
MAX_LENGTH_M = 1e8
MAX_LOSS_DB = 1000.0
MAX_COUNT = 100_000


def _finite(
    x: float, what: str, *, low: float | None = None, high: float | None = None, unit: str = ""
) -> float:
    if isinstance(x, bool) or not isinstance(x, (int, float)) or not math.isfinite(x):
        raise InputError(f"{what}: {x!r} is not a finite number")
    if low is not None and x < low:
        raise InputError(f"{what}: {format_number(x)} must not be below {format_number(low)}")
    if high is not None and x > high:
        raise InputError(
            f"{what}: {format_number(x)}{unit} is more than fieldkit accepts "
            f"({format_number(high)}{unit}); check the unit"
        )
    return float(x)


def _count(n: int, what: str) -> int:
    if isinstance(n, bool) or not isinstance(n, int) or n < 0:
        raise InputError(f"{what}: {n!r} must be a whole number, 0 or more")
    if n > MAX_COUNT:
        raise InputError(f"{what}: {n} is more than fieldkit will count ({MAX_COUNT})")
    return n


def _check_items(
    count: int, loss_max_db: float, loss_typical_db: float | None, items: str, item: str
) -> None:
    """Check ``count`` like items and their loss each (mated connector pairs, splices).

    Parameters
    ----------
    count : int
        How many there are: a whole number from 0 to ``MAX_COUNT``.
    loss_max_db : float
        The maximum loss of one, dB: from 0 to ``MAX_LOSS_DB``.
    loss_typical_db : float or None
        The typical loss of one, dB, when known: the same range.
    items, item : str
        What they are, as the errors name them: the items (``"fusion splices"``), one item's
        loss (``"splice"`` gives ``"splice loss"`` and ``"typical splice loss"``).

    Raises
    ------
    InputError
        The count or a loss is out of range, or not a number.
    """
    _count(count, items)
    _finite(loss_max_db, f"{item} loss", low=0.0, high=MAX_LOSS_DB, unit=" dB")
    if loss_typical_db is not None:
        _finite(loss_typical_db, f"typical {item} loss", low=0.0, high=MAX_LOSS_DB, unit=" dB")


def _nm(wavelength_nm: float) -> str:
    return f"{format_number(wavelength_nm)} nm"


def _length_text(length_m: float) -> str:
    return (
        f"{format_number(length_m / 1000.0)} km"
        if length_m >= 1000
        else f"{format_number(length_m)} m"
    )


# -- the link description ----------------------------------------------------------------------


@dataclass(frozen=True)
class Segment:
    """A length of one fibre type."""

    fibre: Fibre
    length_m: float
    label: str = ""

    def __post_init__(self) -> None:
        _finite(
            self.length_m,
            f"segment {self.label or self.fibre.name}: length",
            low=0.0,
            high=MAX_LENGTH_M,
            unit=" m",
        )


@dataclass(frozen=True)
class Connections:
    """Mated connector pairs: ``count`` of them at ``loss_max_db`` each (typical when known)."""

    count: int
    loss_max_db: float
    loss_typical_db: float | None = None
    name: str = ""
    source: str = ""

    def __post_init__(self) -> None:
        _check_items(
            self.count, self.loss_max_db, self.loss_typical_db, "mated connector pairs", "connector"
        )


@dataclass(frozen=True)
class Splices:
    """Splices of one method: ``count`` at ``loss_max_db`` each."""

    count: int
    loss_max_db: float
    loss_typical_db: float | None = None
    method: str = "fusion"
    name: str = ""
    source: str = ""

    def __post_init__(self) -> None:
        _check_items(
            self.count, self.loss_max_db, self.loss_typical_db, f"{self.method} splices", "splice"
        )


@dataclass(frozen=True)
class Component:
    """A passive component in the path: splitter, WDM, filter, fixed attenuator or other.

    ``loss_min_db`` is its lowest plausible loss (a splitter's ideal split, an attenuator's value).
    """

    name: str
    kind: str
    loss_max_db: float
    loss_typical_db: float | None = None
    loss_min_db: float = 0.0
    count: int = 1
    source: str = ""

    def __post_init__(self) -> None:
        _count(self.count, f"{self.name}: count")
        _finite(self.loss_max_db, f"{self.name}: loss", low=0.0, high=MAX_LOSS_DB, unit=" dB")
        _finite(self.loss_min_db, f"{self.name}: minimum loss", low=0.0, high=MAX_LOSS_DB)
        if self.loss_typical_db is not None:
            _finite(
                self.loss_typical_db,
                f"{self.name}: typical loss",
                low=0.0,
                high=MAX_LOSS_DB,
                unit=" dB",
            )


def splitter(
    outputs: int,
    *,
    inputs: int = 1,
    excess_max_db: float = 0.0,
    excess_typical_db: float | None = None,
    source: str = "",
    count: int = 1,
) -> Component:
    """A 1xN or 2xN splitter: the ideal split 10·log10(N) plus the excess loss.

    .. math:: L = 10 \\log_{10} N + L_{excess}
    """
    if inputs not in (1, 2):
        raise InputError(f"splitter: {inputs} inputs; fieldkit handles 1xN and 2xN splitters")
    ideal = coupling.splitter_ideal_loss_db(outputs)
    _finite(excess_max_db, "splitter excess loss", low=0.0)
    typical = (
        None
        if excess_typical_db is None
        else ideal + _finite(excess_typical_db, "splitter typical excess loss", low=0.0)
    )
    text = f"ideal 10·log10({outputs}) = {ideal:.2f} dB + excess {excess_max_db:.2f} dB" + (
        f"; {source}" if source else ""
    )
    return Component(
        name=f"{inputs}x{outputs} splitter",
        kind="splitter",
        loss_max_db=ideal + excess_max_db,
        loss_typical_db=typical,
        loss_min_db=ideal,
        count=count,
        source=text,
    )


def attenuator(loss_db: float, count: int = 1) -> Component:
    """A fixed attenuator of ``loss_db`` (its value is its minimum, typical and maximum loss)."""
    value = _finite(loss_db, "attenuator", low=0.0)
    return Component(
        name=f"{format_number(value)} dB attenuator",
        kind="attenuator",
        loss_max_db=value,
        loss_typical_db=value,
        loss_min_db=value,
        count=count,
        source="value of the fixed attenuator",
    )


@dataclass(frozen=True)
class LinkDescription:
    """A passive link: fibre segments in order from end A to end B, and what joins them.

    ``connectors`` counts every mated pair, including the two end connections at the patch
    panels. ``wavelengths_nm`` empty means the defaults of the fibre family.
    """

    segments: tuple[Segment, ...]
    connectors: Connections | None = None
    splices: tuple[Splices, ...] = ()
    components: tuple[Component, ...] = ()
    margin_db: float = 0.0
    wavelengths_nm: tuple[float, ...] = ()
    label: str = ""

    def __post_init__(self) -> None:
        if not self.segments:
            raise InputError("link: give at least one fibre segment with a length")
        _finite(self.margin_db, "design margin", low=0.0, high=MAX_LOSS_DB, unit=" dB")
        for nm in self.wavelengths_nm:
            _finite(nm, "wavelength", low=0.0)
            check_wavelength_nm(nm)
        families = {s.fibre.family for s in self.segments if s.fibre.family is not None}
        if len(families) > 1:
            raise InputError(
                "link: multimode and single-mode segments cannot be joined in one passive link "
                "(light from multimode fibre does not couple into single-mode fibre)"
            )

    @property
    def length_m(self) -> float:
        """Total fibre length in m."""
        return sum(s.length_m for s in self.segments)

    @property
    def family(self) -> str | None:
        for s in self.segments:
            if s.fibre.family is not None:
                return s.fibre.family
        return None

    @property
    def fibre_names(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(s.fibre.name for s in self.segments))

    @property
    def connector_count(self) -> int:
        return 0 if self.connectors is None else self.connectors.count

    def budget_wavelengths_nm(self) -> tuple[float, ...]:
        """The wavelengths asked for, else the first segment's test wavelengths."""
        if self.wavelengths_nm:
            return tuple(dict.fromkeys(self.wavelengths_nm))
        return self.segments[0].fibre.test_wavelengths_nm()


def with_connectors(link: LinkDescription, count: int) -> LinkDescription:
    """``link`` with its number of mated connector pairs replaced by ``count``.

    Raises
    ------
    InputError
        For a negative count, or a count above 0 on a link with no connector loss given.
    """
    _count(count, "mated connector pairs")
    if link.connectors is None:
        if count == 0:
            return link
        raise InputError("link: no connector loss is given, so connections cannot be counted")
    return replace(link, connectors=replace(link.connectors, count=count))


def method_limit(link: LinkDescription, end_connections_included: int) -> BudgetResult:
    """The budget counting only the end connections a reference method includes.

    The link's connector count includes both end connections. A one-cord reference includes
    both in the measured loss (``end_connections_included=2``), two-cord one, three-cord none
    (IEC 61280-4-1 / -4-2; TIA-526-14 / -7 Methods B, A, C (from memory)). The limit keeps
    ``count − 2 + end_connections_included`` mated pairs.

    Raises
    ------
    InputError
        For an inclusion other than 0, 1 or 2, or a link with fewer than two connections.
    """
    if end_connections_included not in (0, 1, 2):
        raise InputError(f"end connections included: {end_connections_included}; 0, 1 or 2")
    count = link.connector_count
    if count < 2:
        raise InputError(
            f"link: {count} mated connector pair(s); the count includes the two end "
            "connections, so it is at least 2"
        )
    return compute_budget(with_connectors(link, count - 2 + end_connections_included))


def max_loss_db(link: LinkDescription, wavelength_nm: float) -> float:
    """The maximum (acceptance) loss of ``link`` at ``wavelength_nm``, in dB."""
    return compute_budget(replace(link, wavelengths_nm=(wavelength_nm,))).wavelengths[0].loss_db


# -- the result --------------------------------------------------------------------------------


@dataclass(frozen=True)
class BudgetItem:
    """One line of the breakdown: maximum loss, typical loss when known, lowest plausible."""

    name: str
    kind: str  # "fibre", "mismatch", "connectors", "splices", "component"
    loss_db: float
    typical_loss_db: float | None
    loss_min_db: float
    source: str

    def as_dict(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "kind": self.kind,
            "loss_db": self.loss_db,
            "typical_loss_db": self.typical_loss_db,
            "loss_min_db": self.loss_min_db,
            "source": self.source,
        }


@dataclass(frozen=True)
class WavelengthBudget:
    wavelength_nm: float
    items: tuple[BudgetItem, ...]
    margin_db: float

    @property
    def loss_db(self) -> float:
        """Maximum link loss: the sum of the items' maximum losses."""
        return math.fsum(i.loss_db for i in self.items)

    @property
    def typical_loss_db(self) -> float | None:
        """Typical link loss, when every item has a typical value."""
        if any(i.typical_loss_db is None for i in self.items):
            return None
        return math.fsum(i.typical_loss_db for i in self.items if i.typical_loss_db is not None)

    @property
    def loss_min_db(self) -> float:
        return math.fsum(i.loss_min_db for i in self.items)

    @property
    def loss_with_margin_db(self) -> float:
        return self.loss_db + self.margin_db

    def as_dict(self) -> dict[str, Any]:
        typical = self.typical_loss_db
        return {
            "wavelength_nm": self.wavelength_nm,
            "loss_db": self.loss_db,
            "typical_loss_db": typical,
            "loss_min_db": self.loss_min_db,
            "margin_db": self.margin_db,
            "loss_with_margin_db": self.loss_with_margin_db,
            "typical_with_margin_db": None if typical is None else typical + self.margin_db,
            "items": [i.as_dict() for i in self.items],
        }


@dataclass(frozen=True)
class BudgetResult:
    wavelengths: tuple[WavelengthBudget, ...]
    margin_db: float
    length_m: float
    notes: tuple[str, ...] = ()

    def at(self, wavelength_nm: float) -> WavelengthBudget:
        for wb in self.wavelengths:
            if abs(wb.wavelength_nm - wavelength_nm) <= 0.5:
                return wb
        have = ", ".join(_nm(w.wavelength_nm) for w in self.wavelengths)
        raise InputError(f"budget: no result at {_nm(wavelength_nm)} (it has {have})")

    def in_window(self, wavelength_nm: float) -> WavelengthBudget | None:
        """The result nearest ``wavelength_nm`` within ``WINDOW_MATCH_NM``, else None."""
        near = [
            w for w in self.wavelengths if abs(w.wavelength_nm - wavelength_nm) <= WINDOW_MATCH_NM
        ]
        return min(near, key=lambda w: abs(w.wavelength_nm - wavelength_nm)) if near else None

    def as_dict(self) -> dict[str, Any]:
        return {
            "length_m": self.length_m,
            "margin_db": self.margin_db,
            "wavelengths": [w.as_dict() for w in self.wavelengths],
            "notes": list(self.notes),
        }


def compute_budget(link: LinkDescription) -> BudgetResult:
    """The loss budget of ``link`` at each of its wavelengths.

    Raises
    ------
    InputError
        When a fibre has no value at a wavelength (naming the fibre and what it has).
    """
    notes: list[str] = []
    wavelengths = link.budget_wavelengths_nm()
    if not wavelengths:
        raise InputError("link: no wavelength; give one (e.g. 1310 nm)")
    results = []
    for nm in wavelengths:
        items: list[BudgetItem] = []
        joints = _joint_items(link.segments, nm, notes)
        for index, seg in enumerate(link.segments):
            items.append(_fibre_item(seg, nm, notes))
            joint = joints.get(index)
            if joint is not None:
                items.append(joint)
        if link.connectors is not None and link.connectors.count:
            items.append(_joints_item(link.connectors, "mated connector pair", "connectors"))
        for sp in link.splices:
            if sp.count:
                items.append(_joints_item(sp, f"{sp.method} splice", "splices"))
        for comp in link.components:
            if comp.count:
                prefix = f"{comp.count} × " if comp.count != 1 else ""
                items.append(
                    BudgetItem(
                        name=f"{prefix}{comp.name}",
                        kind="component",
                        loss_db=comp.count * comp.loss_max_db,
                        typical_loss_db=None
                        if comp.loss_typical_db is None
                        else comp.count * comp.loss_typical_db,
                        loss_min_db=comp.count * comp.loss_min_db,
                        source=comp.source or "typed value",
                    )
                )
        results.append(WavelengthBudget(nm, tuple(items), link.margin_db))
    return BudgetResult(tuple(results), link.margin_db, link.length_m, tuple(dict.fromkeys(notes)))


def _joints_item(joints: Connections | Splices, one: str, kind: str) -> BudgetItem:
    """The line item of ``joints.count`` mated pairs or splices at their loss each.

    Parameters
    ----------
    joints : Connections or Splices
        How many, and the maximum (and typical, when known) loss of one, dB.
    one : str
        What one of them is called in the item's name (``"fusion splice"``).
    kind : str
        The item's kind, ``"connectors"`` or ``"splices"``.

    Returns
    -------
    BudgetItem
        Loss ``n·L`` at the maximum (and typical) loss; 0 dB at the least, since a joint may
        lose next to nothing.
    """
    n = joints.count
    return BudgetItem(
        name=f"{n} {one}{'s' if n != 1 else ''} × {joints.loss_max_db:.2f} dB",
        kind=kind,
        loss_db=n * joints.loss_max_db,
        typical_loss_db=None if joints.loss_typical_db is None else n * joints.loss_typical_db,
        loss_min_db=0.0,
        source=joints.source or (joints.name or "typed value"),
    )


def _fibre_item(seg: Segment, nm: float, notes: list[str]) -> BudgetItem:
    fibre = seg.fibre
    cutoff = None
    if fibre.below_cutoff(nm):
        cutoff = (
            f"{fibre.name} is single-mode fibre: at {_nm(nm)}, below its cable cut-off "
            f"({_nm(fibre.cable_cutoff_nm or 0.0)}), it carries a few modes, so a multimode "
            "wavelength gives modal noise and no single-mode behaviour on it"
        )
        notes.append(cutoff)
    try:
        alpha = fibre.attenuation_db_per_km(nm, "max")
    except InputError as exc:
        if cutoff is None:
            raise
        raise InputError(f"{exc}; {cutoff}") from None
    estimate = ""
    if fibre.is_estimated(nm):
        estimate = (
            f"; at {_nm(nm)} no standard gives a maximum: {alpha:.3f} dB/km is an estimate, the "
            "nearest standard maximum scaled as Rayleigh scattering scales (λ⁻⁴)"
        )
        notes.append(
            f"{fibre.name} at {_nm(nm)}: {alpha:.3f} dB/km is an estimate (no standard gives a "
            "maximum there; the nearest standard maximum scaled as Rayleigh scattering scales, "
            "λ⁻⁴); use the cable's data sheet for an acceptance budget"
        )
    km = seg.length_m / 1000.0
    typical = fibre.attenuation_db_per_km(nm, "typical") * km if fibre.has_typical(nm) else None
    if typical is None:
        notes.append(
            f"{fibre.name} has no typical attenuation at {_nm(nm)}; its lowest "
            "plausible loss uses the maximum"
        )
    label = f"{seg.label}: " if seg.label else ""
    coefficient = f"{alpha:.3f} dB/km (estimate)" if estimate else f"{alpha:g} dB/km"
    return BudgetItem(
        name=f"{label}{fibre.name} {_length_text(seg.length_m)} × {coefficient}",
        kind="fibre",
        loss_db=alpha * km,
        typical_loss_db=typical,
        loss_min_db=typical if typical is not None else alpha * km,
        source=(fibre.source or "typed value") + estimate,
    )


def _same_fibre(a: Fibre, b: Fibre) -> bool:
    return a.name == b.name and a.family == b.family


def _joint_items(
    segments: tuple[Segment, ...], nm: float, notes: list[str]
) -> dict[int, BudgetItem]:
    """The mismatch line of each joint, keyed by the index of the segment before it.

    Multimode mismatch loss depends on the direction of the light (only larger into smaller
    costs loss), and light crosses every joint in the same direction. So the joints are
    judged together: the maximum is the joints' losses in the worse direction of the whole
    link, the lowest plausible their losses in the better direction. OM1 | OM3 | OM1 costs
    4.70 dB either way (one joint goes larger into smaller), never 2 × 4.70 dB.
    """
    pairs: dict[int, tuple[float, float, BudgetItem]] = {}
    for index in range(len(segments) - 1):
        joint = _mismatch_item(segments[index].fibre, segments[index + 1].fibre, nm, notes)
        if joint is not None:
            pairs[index] = joint
    a_to_b = math.fsum(ab for ab, _, _ in pairs.values())
    b_to_a = math.fsum(ba for _, ba, _ in pairs.values())
    forward = a_to_b >= b_to_a
    out: dict[int, BudgetItem] = {}
    for index, (ab, ba, item) in pairs.items():
        worse, better = (ab, ba) if forward else (ba, ab)
        if item.kind == "mismatch" and ab != ba:
            direction = "end A → end B" if forward else "end B → end A"
            item = replace(
                item,
                loss_db=worse,
                typical_loss_db=worse,
                loss_min_db=better,
                source=f"{item.source}; light {direction}, the link's worse direction",
            )
        out[index] = item
    return out


def _mismatch_item(
    a: Fibre, b: Fibre, nm: float, notes: list[str]
) -> tuple[float, float, BudgetItem] | None:
    """The joint of ``a`` (towards end A) and ``b``: (loss A→B, loss B→A, its line)."""
    if _same_fibre(a, b):
        return None
    if a.family is None or b.family is None:
        notes.append(
            f"joint {a.name} / {b.name}: a typed fibre has no geometry, so no "
            "mismatch loss is counted"
        )
        return None
    if a.family == "multimode":
        if None in (
            a.core_diameter_um,
            a.numerical_aperture,
            b.core_diameter_um,
            b.numerical_aperture,
        ):
            notes.append(f"joint {a.name} / {b.name}: core or NA unknown; no mismatch counted")
            return None
        assert a.core_diameter_um and a.numerical_aperture
        assert b.core_diameter_um and b.numerical_aperture
        ab = coupling.multimode_mismatch_loss_db(
            a.core_diameter_um, a.numerical_aperture, b.core_diameter_um, b.numerical_aperture
        )
        ba = coupling.multimode_mismatch_loss_db(
            b.core_diameter_um, b.numerical_aperture, a.core_diameter_um, a.numerical_aperture
        )
        worse = f"{a.name} → {b.name}" if ab >= ba else f"{b.name} → {a.name}"
        return (
            ab,
            ba,
            BudgetItem(
                name=f"core/NA mismatch {a.name} | {b.name}",
                kind="mismatch",
                loss_db=max(ab, ba),
                typical_loss_db=max(ab, ba),
                loss_min_db=min(ab, ba),
                source=f"multimode core-diameter and NA mismatch, −10·log10((d_rx/d_tx)²) "
                f"− 10·log10((NA_rx/NA_tx)²), lossy direction {worse} "
                f"({a.core_diameter_um:g} µm NA {a.numerical_aperture:g} / "
                f"{b.core_diameter_um:g} µm NA {b.numerical_aperture:g})",
            ),
        )
    try:
        w1 = a.mode_field_diameter_um(nm)
        w2 = b.mode_field_diameter_um(nm)
    except InputError as exc:
        # Like an unknown core or NA: say so and count none, rather than refuse the whole
        # budget (between single-mode fibres of one family it is a few hundredths of a dB).
        notes.append(
            f"joint {a.name} / {b.name}: {exc}; no mode-field mismatch counted at {_nm(nm)}"
        )
        return None
    loss = coupling.mfd_mismatch_loss_db(w1, w2)
    return (
        loss,
        loss,
        BudgetItem(
            name=f"MFD mismatch {a.name} | {b.name}",
            kind="mismatch",
            loss_db=loss,
            typical_loss_db=loss,
            loss_min_db=loss,
            source="single-mode mode-field mismatch, Gaussian overlap "
            f"−10·log10((2w1w2/(w1²+w2²))²), MFD {w1:g} / {w2:g} µm at {_nm(nm)}",
        ),
    )


# -- application check -------------------------------------------------------------------------


@dataclass(frozen=True)
class ApplicationLimits:
    """An application's limits on the link's fibre: maximum channel insertion loss and reach."""

    name: str
    fibre: str
    loss_max_db: float
    reach_m: float
    wavelengths_nm: tuple[float, ...]
    loss_min_db: float | None = None
    source: str = ""
    #: Line rate in GBd (None: not given); the checks beyond loss use it.
    line_rate_gbd: float | None = None
    #: Why this row: e.g. "OM3, the lowest-grade fibre of OM3 + OM4" (empty for one fibre type).
    row_reason: str = ""


#: An application verdict: fits with the design margin, fits only without it, or does not fit.
ApplicationVerdict = Literal["pass", "no-margin", "fail"]


@dataclass(frozen=True)
class ApplicationCheck:
    name: str
    fibre: str
    wavelength_nm: float  # the application wavelength with the highest link loss
    loss_db: float
    loss_max_db: float
    loss_headroom_db: float
    loss_pass: bool
    margin_db: float
    margin_headroom_db: float  # loss headroom after the design margin
    margin_pass: bool
    length_m: float
    reach_m: float
    length_headroom_m: float
    length_pass: bool
    loss_min_db: float | None  # the class minimum (PON), if any
    link_loss_min_db: float
    min_pass: bool | None
    per_wavelength: tuple[tuple[float, float, float], ...]  # (nm, loss, headroom)
    source: str
    row_reason: str = ""

    @property
    def passed(self) -> bool:
        """Within the application's limits (loss, length, class minimum), margin aside."""
        return self.loss_pass and self.length_pass and self.min_pass is not False

    @property
    def verdict(self) -> ApplicationVerdict:
        """``pass`` with the design margin to spare, ``no-margin`` when the link fits the
        limits but not with the design margin on top, ``fail`` when it does not fit."""
        if not self.passed:
            return "fail"
        return "pass" if self.margin_pass else "no-margin"

    def as_dict(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "fibre": self.fibre,
            "row_reason": self.row_reason,
            "pass": self.passed,
            "verdict": self.verdict,
            "wavelength_nm": self.wavelength_nm,
            "loss_db": self.loss_db,
            "loss_max_db": self.loss_max_db,
            "loss_headroom_db": self.loss_headroom_db,
            "loss_pass": self.loss_pass,
            "margin_db": self.margin_db,
            "margin_headroom_db": self.margin_headroom_db,
            "margin_pass": self.margin_pass,
            "length_m": self.length_m,
            "reach_m": self.reach_m,
            "length_headroom_m": self.length_headroom_m,
            "length_pass": self.length_pass,
            "loss_min_db": self.loss_min_db,
            "link_loss_min_db": self.link_loss_min_db,
            "min_pass": self.min_pass,
            "per_wavelength": [
                {"wavelength_nm": nm, "loss_db": loss, "headroom_db": room}
                for nm, loss, room in self.per_wavelength
            ],
            "source": self.source,
        }


def check_application(result: BudgetResult, limits: ApplicationLimits) -> ApplicationCheck:
    """Does the link fit the application? Loss and length are judged separately.

    Loss passes when the maximum link loss at every application wavelength is within the
    maximum channel insertion loss; length passes when the fibre length is within the reach.
    Headroom = limit − value (negative when over). A link within the limits whose loss plus the
    design margin is over the limit gets its own verdict, ``no-margin`` ("fits, but not with the
    design margin"), never a plain pass. A class with a minimum loss (PON) also needs the
    lowest plausible link loss at or above that minimum.

    Raises
    ------
    InputError
        When the budget has no result in the window of the application's wavelengths.
    """
    rows: list[WavelengthBudget] = []
    for nm in limits.wavelengths_nm:
        wb = result.in_window(nm)
        if wb is None:
            have = ", ".join(_nm(w.wavelength_nm) for w in result.wavelengths)
            raise InputError(
                f"application {limits.name}: works at {_nm(nm)}, but the budget has {have}; "
                f"add the wavelength {format_number(nm)} nm"
            )
        rows.append(wb)
    worst = max(rows, key=lambda w: w.loss_db)
    per = tuple(
        dict.fromkeys((w.wavelength_nm, w.loss_db, limits.loss_max_db - w.loss_db) for w in rows)
    )
    link_min = min(w.loss_min_db for w in rows)
    min_pass = None if limits.loss_min_db is None else link_min >= limits.loss_min_db
    headroom = limits.loss_max_db - worst.loss_db
    return ApplicationCheck(
        name=limits.name,
        fibre=limits.fibre,
        wavelength_nm=worst.wavelength_nm,
        loss_db=worst.loss_db,
        loss_max_db=limits.loss_max_db,
        loss_headroom_db=headroom,
        loss_pass=headroom >= 0,
        margin_db=result.margin_db,
        margin_headroom_db=headroom - result.margin_db,
        margin_pass=headroom - result.margin_db >= 0,
        length_m=result.length_m,
        reach_m=limits.reach_m,
        length_headroom_m=limits.reach_m - result.length_m,
        length_pass=result.length_m <= limits.reach_m,
        loss_min_db=limits.loss_min_db,
        link_loss_min_db=link_min,
        min_pass=min_pass,
        per_wavelength=per,
        source=limits.source,
        row_reason=limits.row_reason,
    )


# -- transceiver check -------------------------------------------------------------------------


@dataclass(frozen=True)
class Transceiver:
    """A transmitter and receiver pair: launch power range and receiver range, in dBm."""

    tx_min_dbm: float
    tx_max_dbm: float
    rx_sensitivity_dbm: float
    rx_overload_dbm: float
    name: str = "transceiver"
    wavelength_nm: float | None = None
    source: str = ""
    #: The fibre family these levels are for, when they differ by family (None: any).
    family: str | None = None
    #: Chromatic dispersion the receiver tolerates, in ps/nm (None: not given).
    dispersion_tolerance_ps_nm: float | None = None
    #: Line rate in GBd (None: not given).
    line_rate_gbd: float | None = None

    def __post_init__(self) -> None:
        for what, value in (
            ("Tx minimum", self.tx_min_dbm),
            ("Tx maximum", self.tx_max_dbm),
            ("Rx sensitivity", self.rx_sensitivity_dbm),
            ("Rx overload", self.rx_overload_dbm),
        ):
            _finite(value, what)
        if self.tx_min_dbm > self.tx_max_dbm:
            raise InputError(
                f"transceiver: Tx minimum {format_number(self.tx_min_dbm)} dBm is above the "
                f"Tx maximum {format_number(self.tx_max_dbm)} dBm"
            )
        if self.rx_sensitivity_dbm >= self.rx_overload_dbm:
            raise InputError(
                f"transceiver: Rx sensitivity {format_number(self.rx_sensitivity_dbm)} dBm must "
                f"be below the overload level {format_number(self.rx_overload_dbm)} dBm"
            )


@dataclass(frozen=True)
class TransceiverCheck:
    name: str
    wavelength_nm: float | None
    family: str | None
    power_budget_db: float
    loss_max_db: float
    loss_min_db: float
    margin_db: float  # Tx(min) − loss(max) − Rx(sensitivity)
    required_margin_db: float
    margin_pass: bool
    received_min_dbm: float
    received_max_dbm: float
    overload: bool
    attenuator_min_db: float  # at least this much attenuation keeps the receiver out of overload
    attenuator_max_db: float  # at most this much keeps the weakest case at sensitivity + margin
    attenuator_db: float | None  # the stock value that fits, when one is needed and fits
    attenuator_fits: bool
    source: str

    @property
    def passed(self) -> bool:
        return self.margin_pass and (not self.overload or self.attenuator_fits)

    def as_dict(self) -> dict[str, Any]:
        return {
            "name": self.name,
            "pass": self.passed,
            "wavelength_nm": self.wavelength_nm,
            "levels_for": self.family,
            "power_budget_db": self.power_budget_db,
            "loss_max_db": self.loss_max_db,
            "loss_min_db": self.loss_min_db,
            "margin_db": self.margin_db,
            "required_margin_db": self.required_margin_db,
            "margin_pass": self.margin_pass,
            "received_min_dbm": self.received_min_dbm,
            "received_max_dbm": self.received_max_dbm,
            "attenuator_needed": self.overload,
            "attenuator_min_db": self.attenuator_min_db,
            "attenuator_max_db": self.attenuator_max_db,
            "attenuator_db": self.attenuator_db,
            "attenuator_fits": self.attenuator_fits,
            "source": self.source,
        }


def check_transceiver(
    result: BudgetResult, tx: Transceiver, stock_db: Iterable[float] = STOCK_ATTENUATORS_DB
) -> TransceiverCheck:
    """Does the transceiver pair run on the link, and does it need an attenuator?

    .. math::
        B = P_{tx,min} - S_{rx}, \\qquad M = P_{tx,min} - L_{max} - S_{rx}

    The pair fits when M ≥ the design margin. It needs an attenuator when
    P_tx,max − L_min > P_rx,overload; an attenuator A fits when
    P_tx,max − L_min − A ≤ P_rx,overload and P_tx,min − L_max − A ≥ S_rx + margin.
    Uses the budget at the transceiver's wavelength (within the window). A transceiver with no
    wavelength is judged at the worst budget wavelength for each side (highest maximum loss,
    lowest minimum loss).

    Raises
    ------
    InputError
        When the transceiver has a wavelength the budget has no result near: the loss at
        another wavelength would misjudge it (a 1550 nm receiver on a link budgeted at 1310 nm
        only would have its overload judged on the higher 1310 nm fibre loss).
    """
    nm: float | None = None
    if tx.wavelength_nm is not None:
        chosen = result.in_window(tx.wavelength_nm)
        if chosen is None:
            have = ", ".join(_nm(w.wavelength_nm) for w in result.wavelengths)
            raise InputError(
                f"transceiver {tx.name}: works at {_nm(tx.wavelength_nm)}, but the budget has "
                f"{have}; add the wavelength {format_number(tx.wavelength_nm)} nm"
            )
        rows = [chosen]
        nm = chosen.wavelength_nm
    else:
        rows = list(result.wavelengths)
    loss_max = max(w.loss_db for w in rows)
    loss_min = min(w.loss_min_db for w in rows)
    budget = tx.tx_min_dbm - tx.rx_sensitivity_dbm
    margin = tx.tx_min_dbm - loss_max - tx.rx_sensitivity_dbm
    received_max = tx.tx_max_dbm - loss_min
    received_min = tx.tx_min_dbm - loss_max
    overload = received_max > tx.rx_overload_dbm
    att_min = max(0.0, received_max - tx.rx_overload_dbm)
    att_max = margin - result.margin_db
    attenuator_db: float | None = None
    fits = False
    if overload and att_max >= att_min:
        fits = True
        for value in sorted(stock_db):
            if att_min <= value <= att_max:
                attenuator_db = value
                break
        else:
            # No stock value in the window: the smallest attenuation that fits, to 0.1 dB up.
            attenuator_db = math.ceil(att_min * 10.0 - 1e-9) / 10.0
            if attenuator_db > att_max:
                attenuator_db = att_min
    return TransceiverCheck(
        name=tx.name,
        wavelength_nm=nm,
        family=tx.family,
        power_budget_db=budget,
        loss_max_db=loss_max,
        loss_min_db=loss_min,
        margin_db=margin,
        required_margin_db=result.margin_db,
        margin_pass=margin >= result.margin_db,
        received_min_dbm=received_min,
        received_max_dbm=received_max,
        overload=overload,
        attenuator_min_db=att_min,
        attenuator_max_db=att_max,
        attenuator_db=attenuator_db,
        attenuator_fits=fits,
        source=tx.source,
    )


@dataclass(frozen=True)
class BudgetReport:
    """A budget with its optional checks, as the CLI prints it and a job stores it."""

    result: BudgetResult
    application: ApplicationCheck | None = None
    transceiver: TransceiverCheck | None = None
    extra: dict[str, Any] = field(default_factory=dict)
    #: Dispersion, modal bandwidth and cut-off (:mod:`fieldkit.calc.checks`).
    checks: LinkChecks | None = None

    def as_dict(self) -> dict[str, Any]:
        out = self.result.as_dict()
        out["application"] = None if self.application is None else self.application.as_dict()
        out["transceiver"] = None if self.transceiver is None else self.transceiver.as_dict()
        out["checks"] = None if self.checks is None else self.checks.as_dict()
        out.update(self.extra)
        return out
