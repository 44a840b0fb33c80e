"""Verdict limits of a trace from a job link's presets (fibre type, splice limit, the budget's
connector grade and application), typed values first, the shipped presets last; the same
analysis judged again against other limits.

The trace comes from the physical model (fieldkit.traces.synthetic): 1550 nm, 0.33 dB/km, a
connector of 0.50 dB loss and -40 dB reflectance at 1000 m, a fusion splice of 0.20 dB at
3000 m, an 8 km fibre. Measured values are checked within the analysis tolerances of
test_traces_analysis (loss within 0.02 dB, reflectance within 1 dB at this signal-to-noise).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldkit.actions import splices as act
from fieldkit.actions.traces import link_limits, trace_limits
from fieldkit.jobs.models import BudgetRecord
from fieldkit.jobs.store import JobStore
from fieldkit.presets import load_presets
from fieldkit.traces.analysis import Settings, analyse_trace, rejudge
from fieldkit.traces.lines import limits_lines
from fieldkit.traces.pairing import pair
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

FIBRE = SynthFibre(
    length_m=8000.0,
    attenuation_db_per_km=0.33,
    spacing_m=1.0,
    dynamic_range_db=20.0,
    events=(SynthEvent(1000.0, 0.50, -40.0), SynthEvent(3000.0, 0.20)),
)


@pytest.fixture(scope="module")
def library():
    return load_presets()


@pytest.fixture(scope="module")
def result():
    return analyse_trace(synth_trace(FIBRE, seed=5))


def _event(r, kind):
    return next(e for e in r.events if e.kind == kind)


@pytest.fixture
def job(tmp_path: Path):
    store = JobStore(tmp_path / "jobs")
    made = store.create("Limits test")
    limit = act.limit_from_preset("fusion", "fusion, outside-plant planning")  # 0.1 dB
    act.set_splice_limit(store, made.id, "L1", limit)

    def change(j):
        link = j.links[0]
        link.fibre_type = "OS2"
        link.budget = BudgetRecord(
            description={
                "application": "10GBASE-LR",
                "connectors": {"count": 2, "grade": "IEC 61753-1 Grade B"},
            }
        )

    store.update(made.id, change)
    return store, made.id


def test_the_model_is_measured_as_built(result):
    conn, splice = _event(result, "reflective"), _event(result, "splice")
    assert conn.distance_m == pytest.approx(1000.0, abs=2.0)  # within two samples
    assert conn.loss_db == pytest.approx(0.50, abs=0.02)
    assert conn.reflectance_db == pytest.approx(-40.0, abs=1.0)
    assert splice.loss_db == pytest.approx(0.20, abs=0.02)


def test_shipped_presets_judge_without_a_link(library, result):
    lim = trace_limits(library)
    r = rejudge(result, lim)
    # fusion preset 0.3 dB (TIA-568.3-D, from memory): 0.20 passes
    assert _event(r, "splice").verdict == "pass"
    # UPC default: IEC 61753-1 return loss grade 2, -45 dB (from memory): -40 dB fails
    assert r.limits.reflectance_limit_db == -45.0
    assert _event(r, "reflective").verdict == "fail"
    # G.652.D 0.3 dB/km at 1550 nm (ITU-T G.652, from memory): 0.33 dB/km fails
    assert r.limits.attenuation_here_db_per_km == 0.3
    assert {s.verdict for s in r.sections if s.to_m - s.from_m >= 500} == {"fail"}
    assert "G.652.D preset (default)" in r.limits.attenuation_source


def test_the_links_presets_give_the_limits(job, library, result):
    store, job_id = job
    lim = link_limits(store, library, job_id, "L1")
    r = rejudge(result, lim)
    assert lim.origin == "link 'L1' of job 'Limits test'"
    # the link's own fusion limit: "fusion, outside-plant planning" 0.1 dB: 0.20 fails
    assert lim.splice_max_db == 0.1 and "the link's fusion splice limit" in lim.splice_source
    assert _event(r, "splice").verdict == "fail"
    # the budget's connector grade IEC 61753-1 Grade B 0.25 dB (from memory): 0.50 fails;
    # its application 10GBASE-LR takes the "10GBASE-LR channel" preset, -26 dB (IEEE 802.3
    # Clause 52, from memory): -40 dB passes, so the loss alone fails it
    assert lim.connector_max_db == 0.25 and lim.reflectance_limit_db == -26.0
    conn = _event(r, "reflective")
    assert conn.verdict == "fail" and "loss" in conn.verdict_reason
    assert "reflectance" not in conn.verdict_reason
    # OS2 0.4 dB/km at 1550 nm (TIA-568.3-D, from memory): 0.33 dB/km passes
    assert r.limits.attenuation_here_db_per_km == 0.4
    assert {s.verdict for s in r.sections if s.to_m - s.from_m >= 500} == {"pass"}
    lines = "\n".join(limits_lines(r.limits, 1550))
    assert "link 'L1'" in lines and "OS2 preset (the link's fibre type)" in lines
    assert "10GBASE-LR channel preset (the link's application 10GBASE-LR)" in lines


def test_typed_values_beat_the_link(job, library):
    store, job_id = job
    lim = link_limits(
        store, library, job_id, "L1", splice_max_db=0.25, reflectance="GPON ODN", polish="APC"
    )
    assert (lim.splice_max_db, lim.splice_source) == (0.25, "typed")
    assert lim.reflectance_limit_db == -35.0 and lim.orl_min_db == 32.0  # GPON ODN preset
    assert lim.connector_max_db == 0.25  # not typed: still the link's grade


def test_a_mixed_link_takes_the_highest_maximum(library):
    from fieldkit.jobs.models import Link

    link = Link(
        label="mixed",
        budget=BudgetRecord(description={"segments": [{"fibre": "G.652.D"}, {"fibre": "OS2"}]}),
    )
    lim = trace_limits(library, link).for_wavelength(1550)
    assert lim.attenuation_here_db_per_km == 0.4  # max(G.652.D 0.3, OS2 0.4)
    assert lim.attenuation_source.startswith("G.652.D / OS2 preset")


def test_an_unknown_fibre_type_on_the_link_is_said_not_guessed(library):
    from fieldkit.jobs.models import Link

    lim = trace_limits(library, Link(label="x", fibre_type="glass?")).for_wavelength(1550)
    assert lim.attenuation_here_db_per_km == 0.3
    assert "'glass?' is no fibre preset" in lim.attenuation_source


def test_judging_again_equals_analysing_with_those_limits(job, library, result):
    store, job_id = job
    lim = link_limits(store, library, job_id, "L1")
    fresh = analyse_trace(result.trace, Settings(limits=lim))
    again = rejudge(result, lim)
    assert [(e.verdict, e.verdict_reason) for e in again.events] == [
        (e.verdict, e.verdict_reason) for e in fresh.events
    ]
    assert [s.verdict for s in again.sections] == [s.verdict for s in fresh.sections]


def test_a_pair_carries_the_limits(job, library, result):
    store, job_id = job
    lim = link_limits(store, library, job_id, "L1")
    b = analyse_trace(synth_trace(FIBRE.reversed(), seed=6))
    p = pair(rejudge(result, lim), rejudge(b, lim))
    assert p.to_json()["limits"]["splice_max_db"] == 0.1
    splice = next(e for e in p.events if e.kind == "splice")
    assert splice.average_db == pytest.approx(0.20, abs=0.02) and splice.verdict == "fail"


def test_the_workspace_session_judges_again_by_the_link(job, library, result):
    from fieldkit.traces.session import TraceSession

    store, job_id = job
    session = TraceSession(a=result)
    assert _event(session.a, "splice").verdict == "pass"  # built-in 0.3 dB
    session.set_limits(link_limits(store, library, job_id, "L1"))
    assert _event(session.a, "splice").verdict == "fail"  # the link's 0.1 dB
    assert session.limits_summary().startswith(
        "limits (link 'L1' of job 'Limits test'): splice 0.1"
    )
