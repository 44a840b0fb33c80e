"""OTDR splice losses into a closure's splice log, asking before overwriting; closures as
landmarks for the fault hand-off."""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldkit.actions import splices as act
from fieldkit.actions.traces import (
    FibreTraces,
    TraceJobError,
    closure_landmarks,
    fill_splice_log,
)
from fieldkit.jobs.store import JobStore
from fieldkit.traces.analysis import analyse_trace
from fieldkit.traces.pairing import pair
from fieldkit.traces.session import TraceSession
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

# splice 0.10 dB at 2100 m of fibre with a 0.30 dB backscatter step: A→B 0.10 - 0.15 = -0.05,
# B→A 0.10 + 0.15 = 0.25 (see tests/unit/test_traces_pairing.py for the model)
FIBRE = SynthFibre(
    length_m=5000.0,
    spacing_m=1.0,
    dynamic_range_db=18.0,
    events=(SynthEvent(2100.0, 0.10, None, backscatter_change_db=0.30),),
)


@pytest.fixture(scope="module")
def paired():
    a = analyse_trace(synth_trace(FIBRE, seed=1))
    b = analyse_trace(synth_trace(FIBRE.reversed(), seed=2))
    return pair(a, b)


@pytest.fixture
def job(tmp_path: Path) -> tuple[JobStore, str]:
    store = JobStore(tmp_path / "jobs")
    made = store.create("Traces test")
    # route 2060 m: fibre runs ~2 % longer than the route (helix), so the event is at 2100 m
    act.add_closure(store, made.id, "L1", "JC-7", route_distance_m=2060.0, by="Ana")
    act.add_closure(store, made.id, "L1", "JC-9", by="Ana")  # no route position
    return store, made.id


def test_both_directions_go_into_the_closure(job, paired):
    store, job_id = job
    done = fill_splice_log(store, job_id, "L1", "JC-7", [FibreTraces(3, paired=paired)], by="Ana")
    assert done.unmatched == [] and done.matched[0][1] == pytest.approx(2100.0, abs=2.0)
    splice = next(s for s in store.load(job_id).links[0].closures[0].splices if s.fibre_a == 3)
    assert splice.loss_ab_db == pytest.approx(-0.05, abs=0.02)
    assert splice.loss_ba_db == pytest.approx(0.25, abs=0.02)


def test_a_different_loss_is_not_overwritten_without_asking(job, paired):
    store, job_id = job
    fill_splice_log(store, job_id, "L1", "JC-7", [FibreTraces(3, paired=paired)], by="Ana")
    closure = store.load(job_id).links[0].closures[0]
    splice = next(s for s in closure.splices if s.fibre_a == 3)
    act.update_losses(store, job_id, "L1", "JC-7", splice.id, loss_ab_db=0.5, overwrite=True)
    asked = fill_splice_log(
        store, job_id, "L1", "JC-7", [FibreTraces(3, paired=paired)], dry_run=True
    )
    assert [(w.direction, old) for w, old in asked.would_overwrite] == [("A->B", 0.5)]
    kept = next(s for s in store.load(job_id).links[0].closures[0].splices if s.fibre_a == 3)
    assert kept.loss_ab_db == 0.5
    fill_splice_log(store, job_id, "L1", "JC-7", [FibreTraces(3, paired=paired)], overwrite=True)
    now = next(s for s in store.load(job_id).links[0].closures[0].splices if s.fibre_a == 3)
    assert now.loss_ab_db == pytest.approx(-0.05, abs=0.02)


def test_a_closure_without_a_route_position_is_refused(job, paired):
    store, job_id = job
    with pytest.raises(TraceJobError, match="no route position"):
        fill_splice_log(store, job_id, "L1", "JC-9", [FibreTraces(3, paired=paired)])


def test_no_event_near_the_closure_writes_nothing(job):
    store, job_id = job
    act.add_closure(store, job_id, "L1", "JC-far", route_distance_m=4000.0, by="Ana")
    one = analyse_trace(synth_trace(FIBRE, seed=1))
    with pytest.raises(TraceJobError, match="no event near"):
        fill_splice_log(store, job_id, "L1", "JC-far", [FibreTraces(3, one_way=one)])


def test_closures_become_landmarks_for_the_break(job, paired, tmp_path: Path):
    store, job_id = job
    marks = closure_landmarks(store, job_id, "L1")
    assert [(m.name, m.route_m) for m in marks] == [("JC-7", 2060.0)]
    session = TraceSession(a=paired.a_to_b, b=paired.b_to_a, paired=paired)
    hand = session.fault_handoff(None, marks)
    assert hand.distance_m == pytest.approx(5000.0, abs=2.0)
    name, otdr_m, route_m = hand.landmarks[0]
    assert name == "JC-7" and otdr_m == pytest.approx(2100.0, abs=2.0) and route_m == 2060.0
