"""The splice log: records, judgement, plans, the actions that change it, and the migration."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from fieldkit.actions import splices as act
from fieldkit.calc.splicing import PlanRange
from fieldkit.calc.units import InputError
from fieldkit.inputs import plan_text, splice_loss_db, splice_plan
from fieldkit.jobs.migrations import MIGRATED_CLOSURE
from fieldkit.jobs.models import SCHEMA_VERSION
from fieldkit.jobs.splices import (
    GAINER,
    ONE_DIRECTION,
    Closure,
    Splice,
    SpliceCable,
    SpliceLimit,
    fibre_words,
    judge,
    judge_in,
)
from fieldkit.jobs.store import JobStore
from fieldkit.reports import to_csv, to_html, to_markdown

GOLDEN = Path(__file__).parent.parent / "golden"
# ANSI/TIA-568.3-D (2016): 0.3 dB per splice (from memory)
TIA = [SpliceLimit(method="fusion", preset="fusion", loss_max_db=0.3, source="TIA-568.3-D")]


def splice(**kw: object) -> Splice:
    return Splice(cable_a="A", fibre_a=1, cable_b="B", fibre_b=1, **kw)  # type: ignore[arg-type]


def test_gainer_averages_to_a_pass_and_is_explained() -> None:
    j = judge(splice(loss_ab_db=-0.05, loss_ba_db=0.25), TIA)
    # (−0.05 + 0.25) / 2 = 0.10 dB ≤ 0.30 dB
    assert j.average_db == pytest.approx(0.10, abs=1e-12)
    assert (j.passed, j.verdict) == (True, "pass")
    assert GAINER in j.warnings


def test_one_direction_is_not_acceptance_grade() -> None:
    j = judge(splice(loss_ab_db=0.05), TIA)
    assert (j.average_db, j.passed, j.verdict) == (None, None, "one direction")
    assert ONE_DIRECTION in j.warnings


def test_estimate_alone_is_not_judged() -> None:
    j = judge(splice(estimate_db=0.02), TIA)
    assert (j.passed, j.verdict) == (None, "estimate only")


def test_over_the_limit_says_resplice_and_why() -> None:
    j = judge(splice(loss_ab_db=0.40, loss_ba_db=0.50), TIA)
    # (0.40 + 0.50) / 2 = 0.45 dB > 0.30 dB
    assert (j.passed, j.verdict) == (False, "fail")
    assert any("re-splice" in w and "cleave" in w for w in j.warnings)


def test_a_tighter_limit_of_the_operator_judges() -> None:
    mine = SpliceLimit(method="fusion", loss_max_db=0.1, source="our own", at=TIA[0].at)
    newer = mine.model_copy(update={"at": TIA[0].at.replace(year=TIA[0].at.year + 1)})
    j = judge(splice(loss_ab_db=0.12, loss_ba_db=0.14), [*TIA, newer])
    assert (j.verdict, j.limit.loss_max_db if j.limit else None) == ("fail", 0.1)  # 0.13 > 0.1


def test_mismatched_fibre_types_give_the_expected_skew() -> None:
    closure = Closure(
        name="x",
        cables=[
            SpliceCable(name="A", fibre_count=12, fibre_type="G.652.D", mfd_1550_um=10.4),
            SpliceCable(name="B", fibre_count=12, fibre_type="G.657.A2", mfd_1550_um=9.6),
        ],
    )
    j = judge_in(closure, splice(loss_ab_db=-0.30, loss_ba_db=0.40), TIA)
    # 10·log10(9.6 / 10.4) = −0.348 dB: A→B reads 0.35 dB low, B→A 0.35 dB high
    assert j.mismatch is not None and "-0.35 dB" in j.mismatch and "+0.35 dB" in j.mismatch


def test_fibre_words_always_start_with_the_number() -> None:
    cable = SpliceCable(name="C1", fibre_count=144)
    assert fibre_words(cable, 14) == "14 (tube 2 orange, fibre orange)"
    assert fibre_words(cable, 144, short=True) == "144 aqua/aqua"
    assert fibre_words(SpliceCable(name="C", per_tube=24), 20).endswith(
        "fibre black with a yellow stripe)"
    )  # TIA-598: 13-24 black tracer, black marked yellow (from memory)
    assert fibre_words(SpliceCable(name="old", per_tube=None), 7) == "7"


@pytest.mark.parametrize(
    ("text", "rows"),
    [
        ("straight", [PlanRange("A", 1, 24, "B", 1)]),
        ("1-12 > 25-36", [PlanRange("A", 1, 12, "B", 25)]),
        ("1-12 → 25", [PlanRange("A", 1, 12, "B", 25)]),
        ("drop 13-24 > D", [PlanRange("A", 13, 24, "D", 1)]),
        ("1-12 -> 1-12; park 13-24", [PlanRange("A", 1, 12, "B", 1), PlanRange("A", 13, 24)]),
        ("C2:1-6 > A:7-12", [PlanRange("C2", 1, 6, "A", 7)]),
    ],
)
def test_plan_text_is_read(text: str, rows: list[PlanRange]) -> None:
    assert splice_plan(text, "A", "B", 24) == rows


def test_plan_text_round_trips() -> None:
    rows = splice_plan("1-12 > 25-36; drop 13-24 > D; park 25-36", "A", "B", 36)
    assert splice_plan(plan_text(rows, "A", "B"), "A", "B", 36) == rows


@pytest.mark.parametrize("bad", ["", "1-12 > 1-6", "12-1 > 1", "fibres", "1-12 > 2 > 3"])
def test_bad_plans_are_refused(bad: str) -> None:
    with pytest.raises(InputError):
        splice_plan(bad, "A", "B", 24)


def test_splice_loss_refuses_dbm() -> None:
    assert splice_loss_db("-0,05") == pytest.approx(-0.05)
    with pytest.raises(InputError, match="optical power"):
        splice_loss_db("0.3 dBm")


# -- actions through the store -----------------------------------------------------------------
@pytest.fixture
def logged(tmp_path: Path) -> tuple[JobStore, str]:
    store = JobStore(tmp_path / "jobs")
    job = store.create("Splice test")
    act.add_closure(store, job.id, "L1", "JC-1", route_distance_m=2100.0, by="Ana")
    for name in ("C1", "C2"):
        act.add_cable(store, job.id, "L1", "JC-1", name, fibre_count=24, by="Ana")
    act.add_trays(store, job.id, "L1", "JC-1", [1, 2], 12, by="Ana")
    return store, job.id


def test_next_splice_takes_the_next_slot_and_tray(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    places = []
    for fibre in range(1, 15):
        done = act.record_splice(
            store, job_id, "L1", "JC-1", fibre_a=fibre, estimate_db=0.02, by="Ana"
        )
        places.append((done.splice.tray, done.splice.slot))
    assert places[0] == (1, 1) and places[11] == (1, 12) and places[12] == (2, 1)
    job = store.load(job_id)
    link = job.links[0]
    assert link.splice_limits[0].loss_max_db == 0.3  # shipped 'fusion' preset, TIA-568.3-D
    assert {s.by for s in link.closures[0].splices} == {"Ana"}


def test_fibre_past_the_count_and_second_splice_are_refused(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    with pytest.raises(act.SpliceError, match="past cable C1's 24 fibres"):
        act.record_splice(store, job_id, "L1", "JC-1", fibre_a=25)
    act.record_splice(store, job_id, "L1", "JC-1", fibre_a=5, loss_ab_db=0.4, loss_ba_db=0.5)
    with pytest.raises(act.AlreadySpliced):
        act.record_splice(store, job_id, "L1", "JC-1", fibre_a=5)
    again = act.record_splice(
        store, job_id, "L1", "JC-1", fibre_a=5, loss_ab_db=0.04, loss_ba_db=0.06, resplice=True
    )
    closure = store.load(job_id).links[0].closures[0]
    assert len(closure.splices) == 2  # the first is kept as history
    assert [s.id for s in closure.current_splices()] == [again.splice.id]
    assert again.splice.replaces == closure.superseded()[0].id
    assert (again.splice.tray, again.splice.slot) == (1, 1)  # the re-splice keeps its place


def test_out_of_plan_splice_is_warned(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    act.set_plan(store, job_id, "L1", "JC-1", "1-12 > 13-24; 13-24 > 1-12")
    planned = act.record_splice(store, job_id, "L1", "JC-1", fibre_a=3)
    assert planned.splice.fibre_b == 15 and planned.notices == []  # 13 + (3 − 1) = 15
    off = act.record_splice(store, job_id, "L1", "JC-1", fibre_a=4, fibre_b=4)
    assert any("out of plan" in n and "fibre 16" in n for n in off.notices)


def test_plan_csv_round_trip(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    closure = act.set_plan(store, job_id, "L1", "JC-1", "1-12 > 13-24; park 13-24")
    text = act.plan_to_csv(closure)
    assert text.splitlines()[0] == "cable_a,first_a,last_a,cable_b,first_b"
    rows = act.plan_from_csv(closure, text)
    assert rows == [PlanRange("C1", 1, 12, "C2", 13), PlanRange("C1", 13, 24)]
    with pytest.raises(act.SpliceError, match="first row"):
        act.plan_from_csv(closure, "a,b\n1,2\n")


def test_plan_past_a_cable_is_refused(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    with pytest.raises(act.SpliceError, match="past cable C2"):
        act.set_plan(store, job_id, "L1", "JC-1", "1-12 > 20-31")


def test_otdr_losses_fill_and_ask_before_overwriting(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    act.record_splice(store, job_id, "L1", "JC-1", fibre_a=1, loss_ab_db=0.05)
    losses = [
        act.OtdrLoss(1, "A->B", 0.07),
        act.OtdrLoss(1, "B->A", 0.03),
        act.OtdrLoss(2, "A->B", 0.02),
    ]
    preview = act.record_otdr_losses(store, job_id, "L1", "JC-1", losses, dry_run=True)
    assert [(x.fibre, old) for x, old in preview.would_overwrite] == [(1, 0.05)]
    assert len(store.load(job_id).links[0].closures[0].splices) == 1  # nothing written
    fill = act.record_otdr_losses(store, job_id, "L1", "JC-1", losses)
    assert fill.created == [2] and len(fill.would_overwrite) == 1
    s1 = store.load(job_id).links[0].closures[0].current_for("C1", 1)
    assert s1 is not None and (s1.loss_ab_db, s1.loss_ba_db) == (0.05, 0.03)
    act.record_otdr_losses(store, job_id, "L1", "JC-1", losses, overwrite=True)
    s1 = store.load(job_id).links[0].closures[0].current_for("C1", 1)
    assert s1 is not None and s1.loss_ab_db == 0.07


def test_unknown_colour_sequence_and_fibre_type_are_refused(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    with pytest.raises(act.SpliceError, match="unknown colour sequence"):
        act.add_cable(store, job_id, "L1", "JC-1", "C3", fibre_count=12, colour_sequence="nope")
    with pytest.raises(act.SpliceError, match="fibre type"):
        act.add_cable(store, job_id, "L1", "JC-1", "C3", fibre_count=12, fibre_type="G.999")


def test_user_colour_sequence_preset_is_used(tmp_path: Path) -> None:
    from fieldkit.presets import load_presets

    folder = tmp_path / "cfg" / "presets"
    folder.mkdir(parents=True)
    (folder / "mine.toml").write_text(
        '[[colour_sequences]]\nname = "ours"\ncolours = ["red", "green", "blue", "white"]\n'
        'source = "our own cable"\n',
        encoding="utf-8",
    )
    library = load_presets(tmp_path / "cfg")
    assert library.problems == []
    cable = act.make_cable("X", fibre_count=16, per_tube=4, colour_sequence="ours", library=library)
    # 4 a tube: fibre 6 is tube 2 (green), fibre 2 (green)
    assert fibre_words(cable, 6) == "6 (tube 2 green, fibre green)"


def test_a_logged_closure_is_in_every_export(logged: tuple[JobStore, str]) -> None:
    store, job_id = logged
    act.record_splice(store, job_id, "L1", "JC-1", fibre_a=1, loss_ab_db=-0.05, loss_ba_db=0.25)
    act.record_splice(store, job_id, "L1", "JC-1", fibre_a=2, loss_ab_db=0.4, loss_ba_db=0.5)
    job = store.load(job_id)
    md = to_markdown(job)
    section = md[md.index("closure JC-1") :]
    assert section.index("| C1 2 blue/orange") < section.index("| C1 1 blue/blue")  # fail first
    assert "Tray map: tray 1 (2/12): C1 1-2; tray 2 (0/12): empty." in md
    assert "| 0.10 | pass |" in md  # (−0.05 + 0.25) / 2
    # a test report keeps its cautions short: the shards line, not the splicer's bench rules
    assert "glass shards" in md
    assert "FAIL" in to_html(job)
    csv_text = to_csv(job)
    assert f"closure,{job_id},L1,JC-1" in csv_text
    assert ",fail," in csv_text


def test_schema_2_file_migrates_its_splices(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    store.jobs_dir.mkdir(parents=True, exist_ok=True)
    raw = json.loads((GOLDEN / "job_schema_v2.json").read_text(encoding="utf-8"))
    assert raw["schema_version"] == 2 and raw["links"][0]["splices"][6]["loss_db"] == 0.19
    shutil.copy(GOLDEN / "job_schema_v2.json", store.jobs_dir / f"{raw['id']}.json")
    job = store.load(raw["id"])
    assert job.schema_version == SCHEMA_VERSION
    [closure] = job.links[0].closures
    assert closure.name == MIGRATED_CLOSURE and len(closure.splices) == 12
    fibre7 = closure.current_for("A", 7)
    assert fibre7 is not None and fibre7.estimate_db == 0.19 and fibre7.fibre_b == 7
    # an "OTDR bidirectional" value becomes the average, without inventing one-way values
    feed = job.links[1].closures[0].current_for("A", 5)
    assert feed is not None and (feed.loss_ab_db, feed.average_only_db) == (None, 0.21)


def test_repair_closure_goes_where_the_fault_was_located(tmp_path: Path) -> None:
    from fieldkit.jobs.models import FaultRecord

    store = JobStore(tmp_path / "jobs")
    job = store.create("Repair")

    def add(j: object) -> None:
        link = j.add_link("FEED")  # type: ignore[attr-defined]
        link.faults.append(
            FaultRecord(
                fibre_distance_m=2963.0,
                sheath_distance_m=2919.2,
                route_distance_m=2889.2,
                low_m=2876.0,
                high_m=2902.4,
                nearest_landmark="handhole HH-12",
                offset_from_landmark_m=14.2,
            )
        )

    store.update(job.id, add)
    closure = act.add_closure_at_fault(store, job.id, "FEED", "Repair 1", by="Jon")
    assert closure.route_distance_m == 2889.2 and "HH-12 + 14 m" in closure.landmark
    other = store.create("x")
    store.update(other.id, lambda j: j.add_link("FEED"))
    with pytest.raises(act.SpliceError, match="no located fault"):
        act.add_closure_at_fault(store, other.id, "FEED", "R")


def test_an_old_job_file_imports_and_two_laptops_merge_their_splices(tmp_path: Path) -> None:
    from fieldkit.jobs.handoff import merge_job, read_handoff

    jobs = read_handoff(GOLDEN / "job_schema_v2.json")  # a schema-2 job file, migrated on read
    [job] = jobs
    assert job.links[0].closures[0].name == MIGRATED_CLOSURE
    mine, theirs = job.model_copy(deep=True), job.model_copy(deep=True)
    closure = theirs.links[1].closures[0]
    extra = Splice(cable_a="A", fibre_a=7, cable_b="B", fibre_b=7, loss_ab_db=0.03, by="Jon")
    closure.splices.append(extra)
    added, conflicts = merge_job(mine, theirs)
    assert (added, conflicts) == (1, [])
    assert mine.links[1].closures[0].current_for("A", 7) == extra
    assert merge_job(mine, theirs) == (0, [])  # a second import adds nothing
