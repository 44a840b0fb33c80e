"""Schema 5: traces kept on a link (history, size), budget checks kept with a budget, the
``fibre_distance_m`` rename, and the migration of a hand-written version-4 file."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from pydantic import ValidationError

from fieldkit import linkspec
from fieldkit.actions.traces import (
    TraceJobError,
    pair_record,
    save_traces,
    trace_record,
)
from fieldkit.jobs.budget_records import budget_record
from fieldkit.jobs.jobfile import check_before_save
from fieldkit.jobs.migrations import migrate
from fieldkit.jobs.models import (
    MAX_FILE_BYTES,
    MAX_TRACE_POINTS,
    SCHEMA_VERSION,
    Job,
    TraceCurve,
    TraceRecord,
    decode_points,
    encode_points,
    new_id,
)
from fieldkit.jobs.store import JobStore, ReadOnlyError, StoreError
from fieldkit.presets import load_presets
from fieldkit.traces.analysis import TraceResult, analyse_trace
from fieldkit.traces.pairing import PairResult, pair
from fieldkit.traces.svg import draw_trace
from fieldkit.traces.synthetic import example_fibre, synth_trace

GOLDEN = Path(__file__).resolve().parent.parent / "golden"


@pytest.fixture(scope="module")
def traced() -> tuple[TraceResult, TraceResult, PairResult]:
    # example_fibre: 8 km, a patch connector at 35 m (0.35 dB), fusion splices at 2100 and
    # 4650 m, a clean end (synthetic.py, the physical model)
    f = example_fibre(1, points=20_000)
    a = analyse_trace(synth_trace(f, seed=2, source="F001_1550_AB.sor"))
    b = analyse_trace(synth_trace(f.reversed(), seed=3, source="F001_1550_BA.sor"))
    return a, b, pair(a, b)


@pytest.fixture()
def store(tmp_path: Path) -> JobStore:
    return JobStore(tmp_path / "jobs")


# -- the version-4 file and newer files ---------------------------------------------------------


def test_a_version_4_file_loads_migrated(store: JobStore) -> None:
    raw = json.loads((GOLDEN / "job_schema_v4.json").read_text(encoding="utf-8"))
    assert raw["schema_version"] == 4 and "fiber_distance_m" in raw["links"][0]["faults"][0]
    store.jobs_dir.mkdir(parents=True)
    shutil.copy(GOLDEN / "job_schema_v4.json", store.jobs_dir / f"{raw['id']}.json")
    job = store.load(raw["id"])
    assert job.schema_version == SCHEMA_VERSION == 5 and job.read_only is None
    link = job.links[0]
    [fault] = link.faults
    assert fault.fibre_distance_m == 3412.0  # the old field's value, under its new name
    assert link.traces == [] and link.budget is not None and link.budget.checks == []
    # history kept by version 4 is untouched
    assert [r.current for r in link.results] == [False, True]
    assert len(link.earlier_budgets) == 1 and link.closures[0].splices[0].loss_ab_db == 0.05
    store.save(job)
    written = json.loads(store.path_of(job.id).read_text(encoding="utf-8"))
    assert written["schema_version"] == 5
    fault_out = written["links"][0]["faults"][0]
    assert "fibre_distance_m" in fault_out and "fiber_distance_m" not in fault_out


def test_migration_refuses_a_fault_with_both_spellings() -> None:
    raw = json.loads((GOLDEN / "job_schema_v4.json").read_text(encoding="utf-8"))
    raw["links"][0]["faults"][0]["fibre_distance_m"] = 1.0
    with pytest.raises(ValueError, match="both fiber_ and fibre_distance_m"):
        migrate(raw)


def test_a_version_6_file_opens_read_only(store: JobStore) -> None:
    job = store.create("From a later fieldkit")
    data = json.loads(store.path_of(job.id).read_text(encoding="utf-8"))
    data["schema_version"] = 6
    store.path_of(job.id).write_text(json.dumps(data), encoding="utf-8")
    loaded = store.load(job.id)
    assert loaded.read_only and "newer fieldkit" in loaded.read_only
    with pytest.raises(ReadOnlyError):
        store.save(loaded)
    # a version-6 file with fields this version does not know is listed, never quarantined
    data["links"] = [{"label": "L1", "traces": [{"fibre": 1, "hologram": True}]}]
    store.path_of(job.id).write_text(json.dumps(data), encoding="utf-8")
    [summary] = store.list()
    assert summary.read_only and "newer" in summary.read_only
    with pytest.raises(StoreError, match="newer fieldkit"):
        store.load(job.id)
    assert store.quarantined() == []


# -- trace records -----------------------------------------------------------------------------


def test_a_pair_record_keeps_the_event_table_and_the_curves(traced) -> None:
    a, b, p = traced
    rec = pair_record(p, fibre=1, by="Ana")
    assert rec.direction == "A<->B" and rec.sources == ["F001_1550_AB.sor", "F001_1550_BA.sor"]
    assert rec.wavelength_nm == 1550.0 and rec.length_m == pytest.approx(8000.0, abs=2.0)
    first = rec.events[0]
    # the patch connector: 0.35 dB at 35 m in the model; averaged over both ends (G.650.3)
    assert first.distance_m == pytest.approx(35.0, abs=2.0)
    assert first.average_db == pytest.approx(0.35, abs=0.05)
    assert first.loss_ab_db is not None and first.loss_ba_db is not None
    assert first.kind == "reflective" and first.limit_db == p.limits.connector_max_db
    assert rec.events[-1].kind == "end"
    assert {s.direction for s in rec.sections} == {"A->B", "B->A"}
    assert "limits at 1550 nm from" in rec.limits
    ab, ba = rec.curves
    assert (ab.direction, ba.direction) == ("A->B", "B->A")
    assert 0 < len(ab.pairs()) <= MAX_TRACE_POINTS and ab.decimated_from == a.trace.points
    # every kept point is a sample of the trace, rounded to 0.1 m and 0.01 dB
    t = a.trace
    for d, level in ab.pairs():
        k = int(round((d - t.start_m) / t.spacing_m))
        assert abs(float(t.distance_m[k]) - d) <= 0.05 + 1e-9
        assert abs(float(t.level_db[k]) - level) <= 0.005 + 1e-9
    # and the curve reaches past the end (the drawing's x range: 8 % and 10 m past it)
    assert ab.pairs()[-1][0] > 8000.0


def test_a_one_way_record_judges_one_way(traced) -> None:
    a, b, _p = traced
    rec = trace_record(b, fibre=1, direction="B->A")
    assert rec.direction == "B->A" and rec.sources == ["F001_1550_BA.sor"]
    assert all(e.average_db is None and e.loss_ab_db is None for e in rec.events)
    splices = [e for e in rec.events if e.kind == "splice"]
    assert splices and all(e.loss_db is not None for e in splices)
    assert rec.events[-1].cumulative_db == pytest.approx(b.events[-1].cumulative_loss_db)


def test_points_text_round_trips_to_a_tenth_of_a_metre_and_a_hundredth_of_a_db() -> None:
    text = encode_points([(0.0, -3.214), (1234.56, -12.345), (8000.04, -0.004)])
    assert text == "0,-3.21 1234.6,-12.35 8000,0"
    assert decode_points(text) == [(0.0, -3.21), (1234.6, -12.35), (8000.0, 0.0)]
    assert encode_points([(1.0, float("nan")), (2.0, -1.0)]) == "2,-1"


def test_a_record_refuses_paths_and_too_many_points() -> None:
    with pytest.raises(ValidationError, match="file name"):
        TraceRecord(fibre=1, sources=["../../etc/passwd"])
    with pytest.raises(ValidationError):
        TraceCurve(direction="A->B", source="a/b.sor")
    many = encode_points([(float(k), -1.0) for k in range(MAX_TRACE_POINTS + 1)])
    with pytest.raises(ValidationError, match="at most"):
        TraceCurve(direction="A->B", source="a.sor", points=many)
    with pytest.raises(ValidationError):
        TraceCurve(direction="A->B", source="a.sor", points="1,2;3,4")


def test_a_record_round_trips_through_the_store_and_a_retest_supersedes(
    store: JobStore, traced
) -> None:
    a, b, p = traced
    job = store.create("Traces")
    first = save_traces(store, job.id, "FEED", [pair_record(p, fibre=1)], by="Ana", create=True)
    assert first.superseded == 0 and first.link_label == "FEED"
    loaded = store.load(job.id)
    [kept] = loaded.links[0].traces
    assert kept.by == "Ana" and kept == first.records[0]  # every field back as saved
    # the retest of the same fibre, wavelength and direction supersedes; the first stays
    again = save_traces(store, job.id, "FEED", [pair_record(p, fibre=1)], by="Jon")
    assert again.superseded == 1 and "1 earlier kept as superseded" in again.summary()
    old, new = store.load(job.id).links[0].traces
    assert (old.id, new.id) == (kept.id, again.records[0].id)
    assert not old.current and old.superseded_by == new.id and new.current and new.by == "Jon"
    # another direction or fibre is no retest of it
    other = save_traces(
        store, job.id, "FEED", [trace_record(a, fibre=1), pair_record(p, fibre=2)], by="Jon"
    )
    assert other.superseded == 0
    assert [t.current for t in store.load(job.id).links[0].traces] == [False, True, True, True]


def test_save_refuses_no_records_a_repeat_and_an_unknown_link(store: JobStore, traced) -> None:
    _a, _b, p = traced
    job = store.create("Refusals")
    with pytest.raises(TraceJobError, match="no traces"):
        save_traces(store, job.id, "FEED", [])
    rec = pair_record(p, fibre=3)
    with pytest.raises(TraceJobError, match="given twice"):
        save_traces(store, job.id, "FEED", [rec, pair_record(p, fibre=3)], create=True)
    with pytest.raises(ValueError, match="no link 'NOPE'"):
        save_traces(store, job.id, "NOPE", [rec])
    assert store.load(job.id).links == []  # nothing written


def test_a_cable_of_traces_fits_the_size_policy_twice_over(traced) -> None:
    # 144 fibres at 1310 and 1550 nm, both directions averaged, then all retested (the first
    # round kept as history): 576 records must fit MAX_FILE_BYTES as the store writes it
    # (indented JSON), with room left for the rest of the job. One record of a real pair is
    # copied; its size is what counts.
    _a, _b, p = traced
    rec = pair_record(p, fibre=1, by="Ana Ruiz")
    job = Job(name="A 144-fibre cable")
    link = job.add_link("Trunk")
    for _round in range(2):
        for fibre in range(1, 145):
            for nm in (1310.0, 1550.0):
                update = {"id": new_id(), "fibre": fibre, "wavelength_nm": nm}
                link.traces.append(rec.model_copy(update=update))
    data = job.model_dump_json(indent=1).encode()
    check_before_save(job, data)  # the store's own check: no refusal
    assert len(data) < 0.6 * MAX_FILE_BYTES, f"{len(data) / 1e6:.1f} MB"


def test_a_stored_record_draws_without_the_raw_trace(traced) -> None:
    _a, _b, p = traced
    rec = TraceRecord.model_validate_json(pair_record(p, fibre=1).model_dump_json())
    svg = draw_trace(
        rec.curves[0].pairs(),
        [(e.number, e.distance_m, e.kind) for e in rec.events],
        length_m=rec.length_m,
    )
    assert svg.startswith("<svg") and svg.endswith("</svg>") and "<script" not in svg
    assert svg.count('stroke-dasharray="3,3"') == len(rec.events)  # one mark per event
    assert "<polyline" in svg


# -- budget checks kept with the budget --------------------------------------------------------


def test_a_saved_budget_keeps_its_dispersion_check() -> None:
    # ITU-T G.652 (from memory): at 1550 nm over 40 km of G.652.D the accumulated dispersion
    # is at most 0.092/4 × (1550 − 1300⁴/1550³) × 40 = 720.39 ps/nm (hand computation in
    # test_beyond_loss.py); "generic 1550 nm 80 km" tolerates 1600 ps/nm (common practice).
    spec = {
        "segments": [{"fibre": "G.652.D", "length": "40 km"}],
        "wavelengths": [1550],
        "transceiver": "generic 1550 nm 80 km",
    }
    resolved = linkspec.resolve(spec, load_presets())
    record = budget_record(resolved, resolved.evaluate())
    [row] = [c for c in record.checks if c.kind == "dispersion"]
    assert row.wavelength_nm == 1550.0 and row.unit == "ps/nm"
    assert row.value == pytest.approx(720.39, abs=0.01) and row.limit == 1600.0
    assert row.verdict == "pass" and "G.652" in row.source


def test_a_saved_budget_keeps_bandwidth_and_cut_off_rows() -> None:
    # 10GBASE-SR on OM3: reach 2000 / (0.6 × 10 312.5 MHz) = 323.2 m (test_beyond_loss.py,
    # ISO/IEC 11801-1 and IEEE 802.3 Clause 52, from memory): 350 m is over.
    resolved = linkspec.resolve(
        {"segments": [{"fibre": "OM3", "length": "350 m"}], "application": "10GBASE-SR"},
        load_presets(),
    )
    rows = budget_record(resolved, resolved.evaluate()).checks
    [at850] = [c for c in rows if c.kind == "modal bandwidth" and c.wavelength_nm == 850.0]
    assert at850.value == 350.0 and at850.limit == pytest.approx(323.23, abs=0.01)
    assert at850.verdict == "fail" and at850.unit == "m"


def test_two_laptops_hand_off_their_traces_and_the_latest_counts(traced) -> None:
    # merging is by id (jobs/handoff.py): each laptop's save of fibre 1 is kept; of two
    # current saves of the same fibre, wavelength and direction the later one counts
    from fieldkit.jobs.handoff import merge_job

    _a, _b, p = traced
    job = Job(name="Hand-off")
    job.add_link("FEED")
    mine, theirs = job.model_copy(deep=True), job.model_copy(deep=True)
    early = pair_record(p, fibre=1, by="Ana")
    late = pair_record(p, fibre=1, by="Jon").model_copy(
        update={"at": early.at.replace(year=early.at.year + 1)}
    )
    mine.links[0].traces.append(early)
    theirs.links[0].traces.append(late)
    added, conflicts = merge_job(mine, theirs)
    assert (added, conflicts) == (1, [])
    kept_early, kept_late = mine.links[0].traces
    assert kept_early.superseded_by == late.id and kept_late.current
    assert merge_job(mine, theirs) == (0, [])  # a second import adds nothing
