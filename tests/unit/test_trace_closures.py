"""Which OTDR event is a closure: one rule (fieldkit.traces.closures over
fieldkit.calc.locate.route_window) for the Traces table, the hand-off to Fault and the splice
log. Checked at its boundaries against the fault calc's own range and the physics of a cable."""

from __future__ import annotations

import pytest

from fieldkit.actions.traces import FibreTraces, losses_at
from fieldkit.calc.locate import (
    CLOSURE_STORAGE_LOOP_M,
    UNKNOWN_HELIX_MAX_PERCENT,
    ErrorTerms,
    LocateInput,
    locate,
    route_window,
)
from fieldkit.calc.units import InputError
from fieldkit.traces.analysis import analyse_trace
from fieldkit.traces.closures import Closure, closure_at, event_at
from fieldkit.traces.session import TraceSession
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

N = 1.4682  # G.652 group index at 1550 nm (from memory)
D = 1500.0  # an event's OTDR distance, m
READ = 5.0  # the event placed to within 5 m (one pulse of 50 ns; pairing's floor)


def _fault_range(d: float) -> tuple[float, float]:
    """What the Fault workspace shows for a break read at ``d`` with nothing else known."""
    p = locate(
        LocateInput(otdr_distance_m=d, group_index=N, errors=ErrorTerms(sample_spacing_m=READ))
    ).position
    return p.low_m, p.high_m


def test_the_window_is_the_fault_range_widened_back_by_a_storage_loop() -> None:
    low, high = _fault_range(D)
    w = route_window(D, N, READ)
    # the upper edge is Fault's: 1 cm inside holds, 1 cm past does not
    assert w.holds(high - 0.01) and not w.holds(high + 0.01)
    # the lower edge: Fault's low less the cable a closure stores (20 m, common practice)
    assert CLOSURE_STORAGE_LOOP_M == 20.0
    assert w.holds(low - 20.0 + 0.01) and not w.holds(low - 20.0 - 0.01)


def test_the_cable_can_put_a_closure_anywhere_a_helix_and_a_loop_allow() -> None:
    w = route_window(D, N, READ)
    # no helix, no slack: the route position equals the fibre distance
    assert w.holds(D)
    # the largest typical helix, 3 % (common practice): route = d / 1.03
    assert UNKNOWN_HELIX_MAX_PERCENT == 3.0
    assert w.holds(D / 1.03)
    # and 20 m coiled at the closure on top of it (common practice)
    assert w.holds(D / 1.03 - 20.0)
    # a route position beyond the fibre distance by more than the reading error: fibre is never
    # shorter than its cable
    assert not w.holds(D + 2 * READ)


def test_the_two_old_copies_disagreed_and_both_were_wrong_somewhere() -> None:
    w = route_window(D, N, READ)
    # the Traces table used "within 10 % of the route position": a closure 9 % short of the
    # event matched, which no helix (0-3 %) and storage loop explain
    short = 0.91 * D
    assert abs(D - short) <= 0.1 * short and not w.holds(short)
    # the splice-log fill used "tolerance + 3 % + 20 m" either way: a closure 40 m past the
    # event matched, though fibre cannot be shorter than the route
    assert abs(D - (D + 40.0)) <= READ + 0.03 * (D + 40.0) + 20.0 and not w.holds(D + 40.0)


def test_a_short_distance_does_not_go_below_the_start() -> None:
    w = route_window(3.0, N, READ)
    assert w.low_m == 0.0 and w.holds(0.0)


def test_a_bad_window_is_refused_with_a_message() -> None:
    with pytest.raises(InputError, match="storage loop"):
        route_window(D, N, READ, storage_loop_m=-1.0)
    with pytest.raises(InputError):
        route_window(float("nan"), N, READ)


def test_of_two_closures_the_one_nearest_the_located_estimate_is_it() -> None:
    w = route_window(D, N, READ)
    near, far = Closure("JC-near", w.estimate_m + 1.0), Closure("JC-far", w.low_m + 1.0)
    assert closure_at(D, [far, near], N, READ) == near
    assert closure_at(D, [Closure("JC-away", D * 2)], N, READ) is None
    assert closure_at(D, [], N, READ) is None


def test_of_several_events_the_one_nearest_is_the_closure() -> None:
    events = ["a", "b", "c"]
    distances = [1400.0, 1500.0, 1530.0]
    # a closure at 1478 m of route: the 1500 m event (1.5 % helix puts it at about 1478 m)
    assert event_at(1478.0, events, distances, N, READ) == "b"
    assert event_at(900.0, events, distances, N, READ) is None


FIBRE = SynthFibre(
    length_m=4000.0, spacing_m=1.0, dynamic_range_db=18.0, events=(SynthEvent(1500.0, 0.25),)
)


def test_a_trace_from_end_b_finds_the_closure_in_end_a_terms() -> None:
    """The same rule from B: the event at 4000 − 1500 = 2500 m on the B→A trace is the
    closure at 1480 m of route (from A)."""
    from_b = analyse_trace(synth_trace(FIBRE.reversed(), seed=2))
    losses, distance = losses_at(FibreTraces(1, one_way=from_b, direction="B->A"), 1480.0)
    assert distance == pytest.approx(2500.0, abs=3.0)
    assert [loss.direction for loss in losses] == ["B->A"]
    # a closure where no event is (fibre 1000 m from A) gives nothing
    assert losses_at(FibreTraces(1, one_way=from_b, direction="B->A"), 1000.0) == ([], None)


def test_the_table_and_the_handoff_use_the_same_rule() -> None:
    a = analyse_trace(synth_trace(FIBRE, seed=1))
    s = TraceSession(a=a)
    s.use_closures([("JC-1", 1480.0), ("JC-x", 0.91 * 1500.0)])
    event = next(e for e in a.events if e.kind != "end")
    # the table calls the event at 1500 m closure JC-1; the 9 %-short one is no closure
    assert s.closure_at(event.distance_m) == Closure("JC-1", 1480.0)
    hand = s.fault_handoff(None, s.closures)
    assert [m[0] for m in hand.landmarks] == ["JC-1"]
