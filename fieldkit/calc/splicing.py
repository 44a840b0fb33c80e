"""Splice-log arithmetic: fibre colour codes, bidirectional splice loss, plan mapping.

Pure functions on numbers and colour words; no files, no clock, no user sentences.

References
----------
.. [TIA598] ANSI/TIA-598-C (2005) / -D, *Optical Fiber Cable Color Coding*: positions 1-12 are
   blue, orange, green, brown, slate, white, red, black, yellow, violet, rose, aqua, for fibres
   and for the tubes (units) that hold them. Positions 13-24 repeat the twelve colours with a
   black tracer (a stripe or a dashed mark), except black, whose tracer is yellow; every further
   twelve adds one more tracer (from memory; checked only against a secondary public summary of
   TIA-598-C, not the standard's text).
.. [G6503] ITU-T G.650.3 (2008), *Test methods for installed single-mode optical fibre cable
   sections*, Appendix I: a splice loss measured by OTDR is the mean of the two one-way values
   measured from either end, which cancels the backscatter difference of the two fibres (from
   memory).
.. [Marcuse] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56
   (1977): the Gaussian mode approximation of a single-mode fibre's field (from memory).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

#: The twelve TIA-598 colours in position order, lower-case words [TIA598].
TIA_598_COLOURS: tuple[str, ...] = (
    "blue",
    "orange",
    "green",
    "brown",
    "slate",
    "white",
    "red",
    "black",
    "yellow",
    "violet",
    "rose",
    "aqua",
)


@dataclass(frozen=True, slots=True)
class ColourSequence:
    """A colour code: the colours of positions 1..len(colours) and how later positions repeat.

    Positions past the last colour repeat the sequence with ``tracers`` marks of
    ``tracer_colour`` (one mark per repetition); a colour equal to the tracer colour gets
    ``tracer_on_tracer`` marks instead, so the mark stays visible.
    """

    name: str
    colours: tuple[str, ...]
    tracer_colour: str = "black"
    tracer_on_tracer: str = "yellow"


#: The default sequence of a cable's tubes and fibres [TIA598].
TIA_598 = ColourSequence("TIA-598", TIA_598_COLOURS)


@dataclass(frozen=True, slots=True)
class Colour:
    """The colour of one position: the base colour and its tracer marks (0 for plain)."""

    colour: str
    tracers: int = 0
    tracer_colour: str = ""


def position_colour(position: int, sequence: ColourSequence = TIA_598) -> Colour:
    """The colour of a tube or fibre at ``position`` (1-based) in ``sequence``.

    With :math:`n` colours, position :math:`p` has colour :math:`c_{(p-1) \\bmod n}` and
    :math:`\\lfloor (p-1)/n \\rfloor` tracer marks [TIA598].

    >>> position_colour(14)
    Colour(colour='orange', tracers=1, tracer_colour='black')
    >>> position_colour(20)
    Colour(colour='black', tracers=1, tracer_colour='yellow')
    """
    if position < 1:
        raise ValueError("position must be 1 or more")
    count = len(sequence.colours)
    index, tracers = (position - 1) % count, (position - 1) // count
    colour = sequence.colours[index]
    if not tracers:
        return Colour(colour)
    mark = sequence.tracer_on_tracer if colour == sequence.tracer_colour else sequence.tracer_colour
    return Colour(colour, tracers, mark)


@dataclass(frozen=True, slots=True)
class FibrePosition:
    """Where fibre ``fibre`` of a cable sits: its tube and its place in the tube."""

    fibre: int
    tube: int
    fibre_in_tube: int
    tube_colour: Colour
    fibre_colour: Colour


def fibre_position(
    fibre: int, per_tube: int = 12, sequence: ColourSequence = TIA_598
) -> FibrePosition:
    """Tube and fibre colour of fibre number ``fibre`` in a cable of ``per_tube`` fibres a tube.

    .. math:: t = \\lfloor (f-1)/k \\rfloor + 1, \\qquad i = (f-1) \\bmod k + 1

    for fibre :math:`f` and :math:`k` fibres per tube (or per ribbon); tube :math:`t` and fibre
    :math:`i` take their colours from ``sequence`` [TIA598]. Fibre 14 with 12 a tube is tube 2
    (orange), fibre 2 (orange).
    """
    if fibre < 1:
        raise ValueError("fibre must be 1 or more")
    if per_tube < 1:
        raise ValueError("per_tube must be 1 or more")
    tube = (fibre - 1) // per_tube + 1
    in_tube = (fibre - 1) % per_tube + 1
    return FibrePosition(
        fibre, tube, in_tube, position_colour(tube, sequence), position_colour(in_tube, sequence)
    )


def fibre_number(tube: int, fibre_in_tube: int, per_tube: int = 12) -> int:
    """The cable fibre number of fibre ``fibre_in_tube`` of tube ``tube`` (inverse of
    :func:`fibre_position`): :math:`f = (t-1)k + i`."""
    if tube < 1 or fibre_in_tube < 1 or per_tube < 1:
        raise ValueError("tube, fibre and per_tube must be 1 or more")
    if fibre_in_tube > per_tube:
        raise ValueError("fibre_in_tube is past the tube's count")
    return (tube - 1) * per_tube + fibre_in_tube


def bidirectional_average_db(loss_ab_db: float, loss_ba_db: float) -> float:
    """The splice loss judged for acceptance: the mean of the two one-way OTDR values [G6503].

    .. math:: L = \\frac{L_{A \\to B} + L_{B \\to A}}{2}

    One direction may read negative (a "gainer") where fibre B scatters back more light than
    fibre A; the mean cancels that. −0.05 dB and 0.25 dB average to 0.10 dB.
    """
    for value in (loss_ab_db, loss_ba_db):
        if not math.isfinite(value):
            raise ValueError("losses must be finite")
    return (loss_ab_db + loss_ba_db) / 2.0


def one_way_skew_db(mfd_a_um: float, mfd_b_um: float) -> float:
    """How much an OTDR looking from A reads a joint of fibre A to fibre B too high (dB).

    In the Gaussian approximation [Marcuse] the fraction of scattered light a fibre guides back
    goes as :math:`1/w^2` for a mode-field diameter :math:`w`, so the backscatter level steps
    by :math:`20 \\log_{10}(w_B / w_A)` dB round trip at the joint; an OTDR shows one-way dB,
    half of it:

    .. math:: \\Delta_{A \\to B} = 10 \\log_{10}(w_B / w_A), \\qquad
              \\Delta_{B \\to A} = -\\Delta_{A \\to B}

    so each direction reads the true loss plus or minus :math:`\\Delta` and the bidirectional
    mean is the true loss [G6503]. 9.2 µm to 8.6 µm: 10·log10(8.6/9.2) = −0.293 dB (reads low
    from A, high from B). The true loss of the mismatch itself is
    :func:`fieldkit.calc.coupling.mfd_mismatch_loss_db` (0.020 dB for the same pair).
    """
    if not (mfd_a_um > 0 and mfd_b_um > 0) or not math.isfinite(mfd_a_um + mfd_b_um):
        raise ValueError("mode-field diameters must be positive and finite")
    return 10.0 * math.log10(mfd_b_um / mfd_a_um)


@dataclass(frozen=True, slots=True)
class PlanRange:
    """One row of a splice plan: fibres ``first_a..last_a`` of cable ``cable_a`` go to cable
    ``cable_b`` from ``first_b`` on, in order; ``cable_b`` None means they are not spliced here
    (cut and stored, e.g. the far side of a drop)."""

    cable_a: str
    first_a: int
    last_a: int
    cable_b: str | None = None
    first_b: int | None = None

    @property
    def count(self) -> int:
        return self.last_a - self.first_a + 1

    @property
    def last_b(self) -> int | None:
        return None if self.first_b is None else self.first_b + self.count - 1


def plan_overlaps(rows: Sequence[PlanRange]) -> list[tuple[int, int]]:
    """Pairs of row indexes (i, j), i < j, that use a fibre twice on either side."""
    clashes = []
    for i in range(len(rows)):
        for j in range(i + 1, len(rows)):
            a, b = rows[i], rows[j]
            sides_a = [(a.cable_a, a.first_a, a.last_a)]
            sides_b = [(b.cable_a, b.first_a, b.last_a)]
            if a.cable_b is not None and a.first_b is not None and a.last_b is not None:
                sides_a.append((a.cable_b, a.first_b, a.last_b))
            if b.cable_b is not None and b.first_b is not None and b.last_b is not None:
                sides_b.append((b.cable_b, b.first_b, b.last_b))
            if any(
                ca == cb and fa <= lb and fb <= la
                for ca, fa, la in sides_a
                for cb, fb, lb in sides_b
            ):
                clashes.append((i, j))
    return clashes


def plan_target(rows: Sequence[PlanRange], cable: str, fibre: int) -> tuple[str | None, int] | None:
    """Where ``fibre`` of ``cable`` goes under the plan.

    Returns ``(cable_b, fibre_b)`` for a mapped fibre, ``(None, fibre)`` for a fibre the plan
    leaves unspliced, and None when the plan does not mention it. Fibre :math:`f` in a row
    mapping :math:`a_1..a_2` to :math:`b_1..` goes to :math:`b_1 + (f - a_1)`; rows also map
    back (a fibre of cable B finds its cable A partner).
    """
    for row in rows:
        if row.cable_a == cable and row.first_a <= fibre <= row.last_a:
            if row.cable_b is None or row.first_b is None:
                return (None, fibre)
            return (row.cable_b, row.first_b + fibre - row.first_a)
        if (
            row.cable_b == cable
            and row.first_b is not None
            and row.last_b is not None
            and row.first_b <= fibre <= row.last_b
        ):
            return (row.cable_a, row.first_a + fibre - row.first_b)
    return None
