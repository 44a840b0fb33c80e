"""Fault location: worked examples with the hand computation beside each expected value."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldkit.calc.locate import (
    ErrorTerms,
    Landmark,
    LocateInput,
    Marking,
    SlackLoop,
    TwoEnded,
    cable_at_route,
    describe_offset,
    fibre_distance_from_time,
    format_distance,
    in_unit,
    locate,
    rescale_distance,
    route_from_cable,
    sheath_length,
    sheath_marking,
)
from fieldkit.calc.optics import SPEED_OF_LIGHT_M_PER_S
from fieldkit.calc.units import InputError

if TYPE_CHECKING:
    from fieldkit.calc.locate import Location


def _locate(**given: Any) -> Location:
    """``locate(LocateInput(**given))``: every worked example below gives its input this way."""
    return locate(LocateInput(**given))


NO_ERRORS = ErrorTerms(
    offset_m=0, scale_error_percent=0, sample_spacing_m=0, group_index_uncertainty=0
)


def test_speed_of_light_is_the_si_definition() -> None:
    # BIPM SI Brochure, 9th ed. (2019): c = 299 792 458 m/s exactly
    assert SPEED_OF_LIGHT_M_PER_S == 299_792_458


def test_distance_from_round_trip_time() -> None:
    # d = c·t / 2n = 299 792 458 × 10e-6 / (2 × 1.5) = 2997.92458 / 3 = 999.30819333 m
    assert fibre_distance_from_time(10e-6, 1.5) == pytest.approx(999.3081933, abs=1e-6)
    # 50 µs at 1.4677: 14 989.6229 / 2.9354 = 5106.50 m
    assert fibre_distance_from_time(50e-6, 1.4677) == pytest.approx(5106.5010, abs=1e-3)


def test_time_reading_through_locate_matches_the_formula() -> None:
    result = _locate(round_trip_time_s=10e-6, group_index=1.5, helix_percent=0.0, errors=NO_ERRORS)
    assert result.position.fibre_distance_m == pytest.approx(999.3081933, abs=1e-6)


def test_rescaling_from_the_index_set_on_the_instrument() -> None:
    # 3412 m shown at n_set 1.4700 on a fibre of 1.4677: 3412 × 1.47 / 1.4677 = 5015.64 / 1.4677
    # = 3417.3469 m
    assert rescale_distance(3412, 1.4700, 1.4677) == pytest.approx(3417.3469, abs=1e-3)
    result = _locate(
        otdr_distance_m=3412,
        index_set=1.47,
        group_index=1.4677,
        helix_percent=0.0,
        errors=NO_ERRORS,
    )
    assert result.position.fibre_distance_m == pytest.approx(3417.3469, abs=1e-3)


def test_helix_shortens_the_sheath() -> None:
    # 1015 m of fibre at 1.5 % helix: 1015 / 1.015 = 1000 m of sheath
    assert sheath_length(1015, 1.5) == pytest.approx(1000.0, abs=1e-9)
    assert sheath_length(1000, 0) == 1000


def test_slack_loops_take_cable_with_no_route_progress() -> None:
    loops = (SlackLoop(500, 20), SlackLoop(1200, 30))
    # 1550 m of sheath: loop 1 holds cable 500–520, loop 2 holds 1220–1250; past both:
    # route = 1550 − 20 − 30 = 1500 m
    assert route_from_cable(1550, loops) == (1500, None)
    # 510 m of sheath is inside loop 1: the route position is the loop's, 500 m
    assert route_from_cable(510, loops) == (500, loops[0])
    # before any loop the route equals the sheath length
    assert route_from_cable(400, loops) == (400, None)
    # and back: 1500 m of route holds 1500 + 50 = 1550 m of sheath
    assert cable_at_route(1500, loops) == 1550


def test_model_chain_with_helix_and_slack() -> None:
    # 2040 m shown, index right, 2 % helix: sheath 2040 / 1.02 = 2000 m;
    # a 25 m loop at 800 m: route = 2000 − 25 = 1975 m
    result = _locate(
        otdr_distance_m=2040,
        group_index=1.468,
        helix_percent=2.0,
        slack=(SlackLoop(800, 25, "coil"),),
        errors=NO_ERRORS,
    )
    p = result.position
    assert p.sheath_distance_m == pytest.approx(2000.0, abs=1e-9)
    assert p.route_distance_m == pytest.approx(1975.0, abs=1e-9)
    assert p.basis == "model"


LANDMARKS = (Landmark("closure 6", 2000, 1950), Landmark("closure 7", 3400, 3330))


def test_interpolation_between_landmarks() -> None:
    # fault shown at 2800 m between closure 6 (2000 m OTDR, 1950 m route) and closure 7 (3400,
    # 3330): route = 1950 + (2800 − 2000) × (3330 − 1950) / (3400 − 2000)
    #              = 1950 + 800 × 1380 / 1400 = 1950 + 788.5714 = 2738.5714 m
    result = _locate(
        otdr_distance_m=2800, group_index=1.4677, landmarks=LANDMARKS, errors=NO_ERRORS
    )
    p = result.position
    assert p.route_distance_m == pytest.approx(2738.5714, abs=1e-3)
    assert p.basis == "interpolated"
    assert p.between == ("closure 6", "closure 7")
    # nearest: closure 7, 3330 − 2738.5714 = 591.43 m before it
    assert p.nearest_landmark == "closure 7"
    assert p.offset_from_landmark_m == pytest.approx(-591.4286, abs=1e-3)
    assert not any("extrapolated" in w for w in result.warnings)


def test_interpolation_cancels_index_and_helix_error() -> None:
    plain = _locate(
        otdr_distance_m=2800, group_index=1.4677, landmarks=LANDMARKS, errors=NO_ERRORS
    ).position
    # a wrong index set on the instrument and a large helix change nothing between landmarks
    skewed = _locate(
        otdr_distance_m=2800,
        index_set=1.50,
        group_index=1.4677,
        helix_percent=3.0,
        landmarks=LANDMARKS,
        errors=NO_ERRORS,
    ).position
    assert skewed.route_distance_m == pytest.approx(plain.route_distance_m, abs=1e-6)
    # and their uncertainty terms vanish: only the readings' sampling remains
    full = _locate(
        otdr_distance_m=2800,
        group_index=1.4677,
        helix_percent=1.5,
        landmarks=LANDMARKS,
        errors=ErrorTerms(helix_uncertainty_percent=0.5),
    ).position
    names = {c.name: c.route_m for c in full.contributions}
    assert "helix" not in names
    assert names.get("group index", 0.0) == pytest.approx(0.0, abs=1e-9)
    assert names.get("instrument offset", 0.0) == pytest.approx(0.0, abs=1e-9)


def test_interpolation_with_a_slack_loop_between_landmarks() -> None:
    # a 20 m loop at route 2500 between the closures: sheath at closure 7 = 3330 + 20 = 3350 m,
    # fibre per sheath = 1400 / (3350 − 1950) = 1; sheath at the fault = 1950 + 800 = 2750 m;
    # the loop holds sheath 2500–2520, so route = 2750 − 20 = 2730 m
    result = _locate(
        otdr_distance_m=2800,
        group_index=1.4677,
        landmarks=LANDMARKS,
        slack=(SlackLoop(2500, 20),),
        errors=NO_ERRORS,
    )
    assert result.position.sheath_distance_m == pytest.approx(2750.0, abs=1e-9)
    assert result.position.route_distance_m == pytest.approx(2730.0, abs=1e-9)


def test_extrapolation_beyond_the_last_landmark_says_so() -> None:
    # 4000 m shown, past closure 7; ratio start → closure 7 = 3400 / 3330;
    # route = 3330 + (4000 − 3400) × 3330 / 3400 = 3330 + 587.647 = 3917.647 m
    result = _locate(
        otdr_distance_m=4000, group_index=1.4677, landmarks=LANDMARKS, errors=NO_ERRORS
    )
    p = result.position
    assert p.route_distance_m == pytest.approx(3917.647, abs=1e-3)
    assert p.basis == "extrapolated"
    assert p.nearest_landmark == "closure 7"
    assert p.offset_from_landmark_m == pytest.approx(587.647, abs=1e-3)
    assert any("Beyond the last landmark (closure 7)" in w for w in result.warnings)


def test_a_landmark_at_route_zero_replaces_the_start() -> None:
    # launch cord left on the trace: the panel shows at 150 m OTDR, route 0; the next closure at
    # 1150 m OTDR, 1000 m route. Fault at 650 m: route = (650 − 150) × 1000 / 1000 = 500 m
    marks = (Landmark("panel", 150, 0), Landmark("closure 1", 1150, 1000))
    result = _locate(otdr_distance_m=650, group_index=1.4677, landmarks=marks, errors=NO_ERRORS)
    assert result.position.route_distance_m == pytest.approx(500.0, abs=1e-9)
    assert result.position.basis == "interpolated"


def test_sheath_marking_counting_up_and_down() -> None:
    # counting up in metres: 1000 m at the start + 2000 m of sheath = 3000
    assert sheath_marking(Marking(1000, "m", "up"), 2000) == pytest.approx(3000, abs=1e-9)
    # counting down in feet: 20 000 ft − 1000 m / 0.3048 m per ft (international foot, exact)
    # = 20 000 − 3280.8399 = 16 719.1601 ft
    assert sheath_marking(Marking(20000, "ft", "down"), 1000) == pytest.approx(16719.1601, abs=1e-3)


def test_marking_through_locate_has_a_range() -> None:
    # 1020 m shown, 2 % helix: sheath 1000 m; marking 5000 up: 6000 m
    result = _locate(
        otdr_distance_m=1020, group_index=1.468, helix_percent=2.0, marking=Marking(5000, "m", "up")
    )
    marking = result.position.marking
    assert marking is not None
    assert marking.value == pytest.approx(6000.0, abs=1e-9)
    assert marking.low < marking.value < marking.high
    down = _locate(
        otdr_distance_m=1020,
        group_index=1.468,
        helix_percent=2.0,
        marking=Marking(500, "m", "down"),
    ).warnings
    assert any("past zero" in w for w in down)


def test_marking_range_includes_the_print_tolerance_of_the_markings() -> None:
    # No instrument errors: 1020 m shown at 2 % helix is exactly 1000 m of sheath. Printed
    # markings within 1 % of the length counted (common practice, from memory): ±10 m, so
    # marking 5000 counting up gives 6000 (5990 to 6010).
    result = _locate(
        otdr_distance_m=1020,
        group_index=1.468,
        helix_percent=2.0,
        marking=Marking(5000, "m", "up"),
        errors=NO_ERRORS,
    )
    marking = result.position.marking
    assert marking is not None
    assert (marking.low, marking.value, marking.high) == (
        pytest.approx(5990.0, abs=1e-9),
        pytest.approx(6000.0, abs=1e-9),
        pytest.approx(6010.0, abs=1e-9),
    )
    # 0.5 % counting down in feet: ±5 m = ±16.4042 ft (5 / 0.3048) around
    # 20 000 − 1000 / 0.3048 = 16 719.1601 ft
    feet = _locate(
        otdr_distance_m=1020,
        group_index=1.468,
        helix_percent=2.0,
        marking=Marking(20000, "ft", "down", tolerance_percent=0.5),
        errors=NO_ERRORS,
    ).position.marking
    assert feet is not None
    assert feet.high == pytest.approx(16719.1601 - 16.4042, abs=1e-3)
    assert feet.low == pytest.approx(16719.1601 + 16.4042, abs=1e-3)
    # with the sheath-length range too, root-sum-square: helix ±0.5 % on 1020 m of fibre moves
    # the sheath to 1020 / 1.015 = 1004.926 (+4.926 m) or 1020 / 1.025 = 995.122 (−4.878 m);
    # √(4.926² + 10²) = 11.147 m
    both = _locate(
        otdr_distance_m=1020,
        group_index=1.468,
        helix_percent=2.0,
        marking=Marking(5000, "m", "up"),
        errors=ErrorTerms(
            offset_m=0,
            scale_error_percent=0,
            sample_spacing_m=0,
            group_index_uncertainty=0,
            helix_uncertainty_percent=0.5,
        ),
    ).position.marking
    assert both is not None
    assert both.high - both.value == pytest.approx(11.147, abs=1e-3)
    with pytest.raises(InputError, match="marking tolerance"):
        _locate(
            otdr_distance_m=1020,
            group_index=1.468,
            marking=Marking(5000, "m", "up", tolerance_percent=-1),
        )


def test_two_ended_consistent_and_combined() -> None:
    # from A 3412 m, from B 1590 m, total 5000 m: 3412 + 1590 − 5000 = 2 m.
    # Tolerance with defaults (offset 1 m, sample 1 m): A's offset is common to from-A and the
    # total and cancels; B's own offset 1 m; three readings' sampling 1 m each:
    # √(1² + 1² + 1² + 1²) = 2 m (scale and index terms ≈ 0.0002 m)
    result = _locate(
        otdr_distance_m=3412, group_index=1.4677, helix_percent=0.0, two_ended=TwoEnded(1590, 5000)
    )
    two = result.two_ended
    assert two is not None
    assert two.discrepancy_m == pytest.approx(2.0, abs=1e-9)
    assert two.tolerance_m == pytest.approx(2.0, abs=1e-3)
    assert two.consistent
    # weights: var A = 1 + 1 + (1e-4 × 3412)² = 2.11642; var B+total = 2 × 2 + (1e-4 × 1590)²
    # + (1e-4 × 5000)² = 4.27528; w_A = 4.27528 / 6.39170 = 0.66888;
    # combined = 0.66888 × 3412 + 0.33112 × (5000 − 1590) = 3410 + 2 × 0.66888 = 3411.3378 m
    assert two.weight_a == pytest.approx(0.66888, abs=1e-4)
    assert two.combined.fibre_distance_m == pytest.approx(3411.3378, abs=1e-3)
    # combining two readings narrows the fibre-distance range
    assert two.combined.fibre_uncertainty_m < result.position.fibre_uncertainty_m


def test_two_ended_inconsistent_is_flagged() -> None:
    # 3412 + 1600 − 5000 = 12 m, far beyond ±2 m
    result = _locate(
        otdr_distance_m=3412, group_index=1.4677, helix_percent=0.0, two_ended=TwoEnded(1600, 5000)
    )
    assert result.two_ended is not None and not result.two_ended.consistent
    assert any("Two-ended check fails" in w for w in result.warnings)


def test_uncertainty_is_the_root_sum_square_of_the_terms() -> None:
    # bare reading 5000 m, index 1.468 right, no helix; defaults: offset 1 m, scale 0.01 %,
    # sample 1 m, index ±0.001.
    # offset 1; scale 5000 × 1e-4 = 0.5; sample 1; index: 5000 × 0.001 / (1.468 − 0.001)
    # = 3.40832 (the larger side of ±δn);
    # u = √(1 + 0.25 + 1 + 11.6166) = √13.8666 = 3.72379 m; worst case 1 + 0.5 + 1 + 3.40832
    # = 5.90832 m
    p = _locate(otdr_distance_m=5000, group_index=1.468, helix_percent=0.0).position
    terms = {c.name: c.route_m for c in p.contributions}
    assert terms["instrument offset"] == pytest.approx(1.0, abs=1e-9)
    assert terms["scale error"] == pytest.approx(0.5, abs=1e-9)
    assert terms["sample spacing (fault reading)"] == pytest.approx(1.0, abs=1e-9)
    assert terms["group index"] == pytest.approx(3.40832, abs=1e-4)
    assert p.uncertainty_m == pytest.approx(3.72379, abs=1e-4)
    assert p.worst_case_m == pytest.approx(5.90832, abs=1e-4)
    assert p.low_m == pytest.approx(5000 - 3.72379, abs=1e-4)
    assert p.high_m == pytest.approx(5000 + 3.72379, abs=1e-4)
    # the docstring's first-order form √(o² + (e·d)² + s² + (d·δn/n)²) agrees to 3 mm (2.1 mm here)
    first_order = math.sqrt(1 + 0.25 + 1 + (5000 * 0.001 / 1.468) ** 2)
    assert p.fibre_uncertainty_m == pytest.approx(first_order, abs=3e-3)


def test_helix_uncertainty_dominates_a_long_bare_reading() -> None:
    # 5000 m fibre, helix 1.5 ± 0.5 %: sheath 5000/1.015 = 4926.108; at 1.0 %: 4950.495 (+24.387);
    # at 2.0 %: 4901.961 (−24.147); the term is the larger, 24.387 m
    p = _locate(
        otdr_distance_m=5000,
        group_index=1.468,
        helix_percent=1.5,
        errors=ErrorTerms(helix_uncertainty_percent=0.5),
    ).position
    assert p.route_distance_m == pytest.approx(4926.108, abs=1e-3)
    terms = {c.name: c.route_m for c in p.contributions}
    assert terms["helix"] == pytest.approx(24.387, abs=1e-3)
    assert p.uncertainty_m > 24.387


def test_a_helix_not_given_runs_the_range_from_the_fibre_down_to_the_shortest_cable() -> None:
    # No helix given, no landmarks: a cable is 0–3 % shorter than its fibre (common practice),
    # never longer. The estimate takes the middle, 1.5 %: 5000 / 1.015 = 4926.108 m. The helix
    # term spans 0 % (5000 − 4926.108 = 73.892 m) to 3 % (4926.108 − 5000 / 1.03 = 4926.108 −
    # 4854.369 = 71.739 m); the larger, 73.892 m, is the half-width. So the range is 4852.216 to
    # 5000.000 m: from the fibre distance down past the shortest plausible cable (4854.369 m).
    result = _locate(otdr_distance_m=5000, group_index=1.468, errors=NO_ERRORS)
    p = result.position
    assert p.route_distance_m == pytest.approx(4926.108, abs=1e-3)
    terms = {c.name: c.route_m for c in p.contributions}
    assert terms == {"helix (not given: 0–3 %)": pytest.approx(73.892, abs=1e-3)}
    assert p.high_m == pytest.approx(5000.0, abs=1e-3)
    assert p.low_m == pytest.approx(4852.216, abs=1e-3)
    assert any("the estimate takes 1.5 %" in w for w in result.warnings)
    # the old range, ±145.6 m around 5000 m, had half its width above the fibre distance
    assert p.high_m <= 5000.0 + 1e-6
    # a helix given (even 0 %) is taken at its word: no such term
    given_zero = _locate(
        otdr_distance_m=5000, group_index=1.468, helix_percent=0.0, errors=NO_ERRORS
    ).position
    assert given_zero.uncertainty_m == pytest.approx(0.0, abs=1e-9)
    assert given_zero.route_distance_m == pytest.approx(5000.0, abs=1e-9)


@pytest.mark.parametrize(
    ("metres", "unit", "expected"),
    [
        (1609.344, "mi", 1.0),  # international mile = 1609.344 m exactly (NIST SP 811)
        (0.3048, "ft", 1.0),  # international foot = 0.3048 m exactly (NIST SP 811)
        (3412.0, "km", 3.412),
        (5.0, "m", 5.0),
    ],
)
def test_output_units(metres: float, unit: str, expected: float) -> None:
    assert in_unit(metres, unit) == pytest.approx(expected, abs=1e-12)


def test_formatting_and_offsets() -> None:
    assert format_distance(3412.04, "m") == "3412.0 m"
    assert format_distance(3412.0, "km") == "3.4120 km"
    assert format_distance(304.8, "ft") == "1000 ft"
    assert describe_offset(12.0, "closure 7") == "12.0 m past closure 7"
    assert describe_offset(-3.048, "handhole 2", "ft") == "10 ft before handhole 2"
    assert describe_offset(0.01, "start") == "at start"
    with pytest.raises(InputError, match="unit"):
        in_unit(1.0, "yd")


@pytest.mark.parametrize(
    ("inp", "message"),
    [
        (LocateInput(otdr_distance_m=-5, group_index=1.468), "negative"),
        (LocateInput(round_trip_time_s=-1e-6, group_index=1.468), "more than zero"),
        (LocateInput(otdr_distance_m=100, group_index=0.9), "below 1"),
        (LocateInput(otdr_distance_m=100, group_index=float("nan")), "not a finite number"),
        (LocateInput(otdr_distance_m=100, index_set=float("inf"), group_index=1.46), "finite"),
        (LocateInput(otdr_distance_m=100), "group index"),
        (LocateInput(round_trip_time_s=1e-6, index_set=1.47), "needs the fibre's group index"),
        (LocateInput(group_index=1.468), "either"),
        (LocateInput(otdr_distance_m=1, round_trip_time_s=1e-6, group_index=1.468), "either"),
        (LocateInput(otdr_distance_m=100, group_index=1.468, helix_percent=-1), "helix"),
        (
            LocateInput(otdr_distance_m=100, group_index=1.468, slack=(SlackLoop(10, -2),)),
            "slack cable length",
        ),
        (
            LocateInput(
                otdr_distance_m=100,
                group_index=1.468,
                landmarks=(Landmark("a", 500, 400), Landmark("b", 450, 600)),
            ),
            "not further",
        ),
        (
            LocateInput(
                otdr_distance_m=100,
                group_index=1.468,
                landmarks=(Landmark("a", 500, 400), Landmark("a", 900, 800)),
            ),
            "used twice",
        ),
        (
            LocateInput(otdr_distance_m=100, group_index=1.468, two_ended=TwoEnded(600, 500)),
            "longer than the total",
        ),
        (
            LocateInput(
                otdr_distance_m=100, group_index=1.468, errors=ErrorTerms(sample_spacing_m=-1)
            ),
            "sample spacing",
        ),
    ],
)
def test_bad_input_is_refused_with_a_message(inp: LocateInput, message: str) -> None:
    with pytest.raises(InputError, match=message):
        locate(inp)


@given(st.floats(0, 1e5), st.lists(st.tuples(st.floats(0, 1e5), st.floats(0, 500)), max_size=5))
def test_route_and_sheath_round_trip(route: float, loops: list[tuple[float, float]]) -> None:
    slack = tuple(SlackLoop(p, length) for p, length in loops)
    back, _ = route_from_cable(cable_at_route(route, slack), slack)
    assert back == pytest.approx(route, abs=1e-6)


def test_extrapolation_carries_a_helix_term_for_the_unmeasured_stretch() -> None:
    # one landmark HH 3 (1500 m OTDR, 1460 m route); fault 2040 m: ratio 1500/1460 = 1.027397,
    # 540 m of fibre past HH 3 = 525.600 m of sheath. With the helix ± 0.5 points the stretch may
    # be 525.600 / 0.995 = 528.241 (+2.641) or 525.600 / 1.005 = 522.985 (−2.615) m: term 2.641
    p = _locate(
        otdr_distance_m=2040,
        group_index=1.468,
        helix_percent=2.0,
        landmarks=(Landmark("HH 3", 1500, 1460),),
        errors=ErrorTerms(helix_uncertainty_percent=0.5),
    ).position
    assert p.route_distance_m == pytest.approx(1460 + 525.600, abs=1e-3)
    terms = {c.name: c.route_m for c in p.contributions}
    assert terms["helix beyond the landmarks"] == pytest.approx(2.641, abs=1e-3)
    # between landmarks the same term is zero: nothing is extrapolated
    inside = _locate(
        otdr_distance_m=1000,
        group_index=1.468,
        helix_percent=2.0,
        landmarks=(Landmark("HH 3", 1500, 1460),),
        errors=ErrorTerms(helix_uncertainty_percent=0.5),
    ).position
    assert "helix beyond the landmarks" not in {c.name for c in inside.contributions}


def test_before_the_first_landmark_is_extrapolated_and_named() -> None:
    # a launch cord left on: the panel at 150 m OTDR is route 0, closure 1 at 1150 m / 1000 m;
    # a reading of 100 m lies on the cord, before the panel
    marks = (Landmark("panel", 150, 0), Landmark("closure 1", 1150, 1000))
    result = _locate(otdr_distance_m=100, group_index=1.4677, landmarks=marks, errors=NO_ERRORS)
    assert result.position.basis == "extrapolated"
    assert result.position.route_distance_m == 0.0
    assert any("Before the first landmark (panel)" in w for w in result.warnings)


def test_range_of_an_interpolated_fault_by_hand() -> None:
    # A fault shown at 2800 m between closure 6 (2000 m OTDR, 1950 m route) and closure 7
    # (3400 m, 3330 m); only the sample spacing (±1 m per reading) counts. The span's ratio is
    # 1380 m route per 1400 m fibre: route = 1950 + 800 × 1380 / 1400 = 2738.571429 m.
    # Each term is the larger change of the route when its reading moves 1 m either way:
    #   fault reading: 1380 / 1400 = 0.985714 m;
    #   closure 6 at 2001 m: 1950 + 799 × 1380 / 1399 = 2738.148678 (0.422751 m; at 1999 m
    #   2738.993576, 0.422148 m);
    #   closure 7 at 3399 m: 1950 + 800 × 1380 / 1399 = 2739.135096 (0.563668 m; at 3401 m
    #   2738.008565, 0.562863 m).
    # Root-sum-square √(0.971633 + 0.178718 + 0.317722) = √1.468073 = 1.211641 m; worst case
    # (their sum) 1.972133 m.
    marks = (Landmark("closure 6", 2000, 1950), Landmark("closure 7", 3400, 3330))
    p = _locate(
        otdr_distance_m=2800,
        group_index=1.4677,
        landmarks=marks,
        errors=ErrorTerms(
            offset_m=0, scale_error_percent=0, sample_spacing_m=1.0, group_index_uncertainty=0
        ),
    ).position
    assert p.route_distance_m == pytest.approx(2738.571, abs=1e-3)
    assert p.uncertainty_m == pytest.approx(1.211641, abs=1e-5)
    assert p.worst_case_m == pytest.approx(1.972133, abs=1e-5)


@pytest.mark.parametrize(
    ("value", "plus_minus", "shown"),
    [
        # one significant digit of the ±, two when it starts with 1 (common practice), the
        # value to the same place
        (2009.85, 30.2, "2010 m ± 30 m"),
        (2019.6, 5.7, "2020 m ± 6 m"),
        (2040.0, 1.99, "2040 m ± 2 m"),
        (2040.0, 1.4, "2040.0 m ± 1.4 m"),
        (512.34, 0.96, "512.3 m ± 1.0 m"),
        (100.0, 0.02, "100.0 m ± 0.0 m"),  # never finer than 0.1 m
    ],
)
def test_honest_digits(value: float, plus_minus: float, shown: str) -> None:
    from fieldkit.text.locate import plus_minus as pm

    assert pm(value, plus_minus) == shown


def test_search_window_rounds_outwards() -> None:
    from fieldkit.text.locate import search_text

    # ± 30 m: to the tens, the low end down and the high end up, so the window holds the range
    assert search_text(1979.6, 2040.1, 30.2) == "from 1970 to 2050 m"
    assert search_text(1979.6, 2040.1, 30.2, "km") == "from 1.97 to 2.05 km"
