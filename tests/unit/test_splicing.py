"""Colour code, fibre positions, bidirectional splice loss and plan mapping (calc.splicing)."""

from __future__ import annotations

import math

import pytest

from fieldkit.calc import splicing
from fieldkit.calc.coupling import mfd_mismatch_loss_db


def test_tia_598_sequence_in_order() -> None:
    # ANSI/TIA-598-C (2005) fibre and unit colours 1-12 (from memory; matches the sequence in
    # the issue and public summaries of the standard)
    assert splicing.TIA_598_COLOURS == (
        "blue", "orange", "green", "brown", "slate", "white",
        "red", "black", "yellow", "violet", "rose", "aqua",
    )  # fmt: skip


@pytest.mark.parametrize(
    ("position", "colour", "tracers", "tracer"),
    [
        (1, "blue", 0, ""),  # TIA-598: position 1 blue
        (12, "aqua", 0, ""),  # TIA-598: position 12 aqua
        (13, "blue", 1, "black"),  # TIA-598: 13-24 repeat with a black tracer (from memory)
        (20, "black", 1, "yellow"),  # TIA-598: black is marked yellow (from memory)
        (24, "aqua", 1, "black"),
        (25, "blue", 2, "black"),  # each further twelve adds a tracer (from memory)
    ],
)
def test_position_colour_and_tracers(position: int, colour: str, tracers: int, tracer: str) -> None:
    assert splicing.position_colour(position) == splicing.Colour(colour, tracers, tracer)


@pytest.mark.parametrize(
    ("fibre", "per_tube", "tube", "tube_colour", "in_tube", "fibre_colour"),
    [
        (
            14,
            12,
            2,
            "orange",
            2,
            "orange",
        ),  # the example: (14-1)//12+1 = 2, (14-1)%12+1 = 2
        (144, 12, 12, "aqua", 12, "aqua"),  # the example: 143//12+1 = 12, 143%12+1 = 12
        (1, 12, 1, "blue", 1, "blue"),
        (13, 12, 2, "orange", 1, "blue"),  # first fibre of the second tube
        (30, 24, 2, "orange", 6, "white"),  # 24 a tube: 29//24+1 = 2, 29%24+1 = 6
        (7, 6, 2, "orange", 1, "blue"),  # 6 a tube
    ],
)
def test_fibre_position(
    fibre: int, per_tube: int, tube: int, tube_colour: str, in_tube: int, fibre_colour: str
) -> None:
    pos = splicing.fibre_position(fibre, per_tube)
    assert (pos.tube, pos.tube_colour.colour, pos.fibre_in_tube, pos.fibre_colour.colour) == (
        tube,
        tube_colour,
        in_tube,
        fibre_colour,
    )


@pytest.mark.parametrize("per_tube", [1, 6, 12, 24])
def test_fibre_number_inverts_position(per_tube: int) -> None:
    for fibre in range(1, 289):
        pos = splicing.fibre_position(fibre, per_tube)
        assert splicing.fibre_number(pos.tube, pos.fibre_in_tube, per_tube) == fibre


def test_positions_below_one_are_refused() -> None:
    with pytest.raises(ValueError):
        splicing.fibre_position(0)
    with pytest.raises(ValueError):
        splicing.fibre_number(1, 13, 12)


@pytest.mark.parametrize(
    ("ab", "ba", "average"),
    [
        (-0.05, 0.25, 0.10),  # the gainer case: (−0.05 + 0.25) / 2 = 0.10 dB
        (0.04, 0.06, 0.05),  # (0.04 + 0.06) / 2 = 0.05 dB
        (0.30, 0.30, 0.30),
        (-0.12, 0.12, 0.0),  # a pure backscatter step cancels
    ],
)
def test_bidirectional_average_by_hand(ab: float, ba: float, average: float) -> None:
    # ITU-T G.650.3 App. I: the splice loss is the mean of the two one-way values (from memory)
    assert splicing.bidirectional_average_db(ab, ba) == pytest.approx(average, abs=1e-12)


def test_average_refuses_non_finite() -> None:
    with pytest.raises(ValueError):
        splicing.bidirectional_average_db(math.nan, 0.1)


def test_one_way_skew_of_a_mode_field_mismatch() -> None:
    # Gaussian mode field: 10·log10(8.6 / 9.2) = −0.2929 dB from the larger into the smaller
    assert splicing.one_way_skew_db(9.2, 8.6) == pytest.approx(-0.29286, abs=1e-4)
    assert splicing.one_way_skew_db(8.6, 9.2) == pytest.approx(0.29286, abs=1e-4)
    # the two directions' skews cancel in the average; the mismatch loss itself is small:
    # −10·log10((2·9.2·8.6/(9.2²+8.6²))²) = 0.0197 dB (calc.coupling)
    true_loss = mfd_mismatch_loss_db(9.2, 8.6)
    ab = true_loss + splicing.one_way_skew_db(9.2, 8.6)
    ba = true_loss + splicing.one_way_skew_db(8.6, 9.2)
    assert ab < 0 < ba
    assert splicing.bidirectional_average_db(ab, ba) == pytest.approx(true_loss, abs=1e-12)


def test_plan_maps_ranges_both_ways() -> None:
    rows = [
        splicing.PlanRange("A", 1, 12, "B", 25),  # 1-12 → 25-36
        splicing.PlanRange("A", 13, 24, "D", 1),  # a drop: 13-24 → drop cable 1-12
        splicing.PlanRange("A", 25, 36),  # parked
    ]
    assert splicing.plan_target(rows, "A", 1) == ("B", 25)
    assert splicing.plan_target(rows, "A", 12) == ("B", 36)  # 25 + (12 − 1) = 36
    assert splicing.plan_target(rows, "B", 30) == ("A", 6)  # 1 + (30 − 25) = 6
    assert splicing.plan_target(rows, "A", 20) == ("D", 8)  # 1 + (20 − 13) = 8
    assert splicing.plan_target(rows, "A", 30) == (None, 30)
    assert splicing.plan_target(rows, "A", 40) is None
    assert splicing.plan_overlaps(rows) == []


def test_plan_overlaps_are_found() -> None:
    rows = [splicing.PlanRange("A", 1, 12, "B", 1), splicing.PlanRange("C", 1, 4, "B", 10)]
    assert splicing.plan_overlaps(rows) == [(0, 1)]  # B 10-12 twice
