"""The layer that changes jobs (fieldkit.actions): each problem of the job-record issue."""

from __future__ import annotations

import json
import os
from datetime import UTC, datetime, timedelta
from pathlib import Path

import pytest

from fieldkit.actions import export as export_actions
from fieldkit.actions import jobs as job_actions
from fieldkit.actions import meter as meter_actions
from fieldkit.actions.errors import ActionError
from fieldkit.actions.operator import ENV, resolve_operator, save_operator
from fieldkit.calc.reference import Method
from fieldkit.jobs.counting import Count, Tally, cell_count, fibre_count, open_items
from fieldkit.jobs.migrations import migrate
from fieldkit.jobs.models import SCHEMA_VERSION, Job
from fieldkit.jobs.reports import job_summary
from fieldkit.jobs.store import JobStore
from fieldkit.reports import export

T0 = datetime(2026, 3, 14, 9, 0, tzinfo=UTC)


@pytest.fixture
def store(tmp_path: Path) -> JobStore:
    return JobStore(tmp_path / "data" / "jobs")


def _job(store: JobStore, name: str = "Station Road") -> Job:
    return job_actions.create_job(store, name, by="A. Tech").job


# -- export never lands on a job ---------------------------------------------------------------
def test_export_refuses_the_jobs_own_file_and_anything_in_the_data_folder(
    store: JobStore,
) -> None:
    job = _job(store)
    job_file = store.path_of(job.id)
    before = job_file.read_bytes()
    for target in (
        job_file,
        job_file.with_name(job_file.name + ".bak"),
        store.jobs_dir.parent / "r.html",
    ):
        with pytest.raises(ActionError, match="inside the data folder"):
            export_actions.export_job(store, job.id, "html", str(target))
    assert job_file.read_bytes() == before


def test_export_refuses_a_symlink_or_hard_link_onto_a_job_file(
    store: JobStore, tmp_path: Path
) -> None:
    job = _job(store)
    job_file = store.path_of(job.id)
    before = job_file.read_bytes()
    outside = tmp_path / "out"
    outside.mkdir()
    (outside / "report.html").symlink_to(job_file)
    with pytest.raises(ActionError, match="symbolic link"):
        export_actions.export_job(store, job.id, "html", str(outside / "report.html"))
    # A symlinked folder that leads into the data folder resolves there.
    (outside / "via").symlink_to(store.jobs_dir)
    with pytest.raises(ActionError, match="inside the data folder"):
        export_actions.export_job(store, job.id, "html", str(outside / "via" / f"{job.id}.json"))
    os.link(job_file, outside / "hard.json")
    with pytest.raises(ActionError, match="is a job file"):
        export_actions.export_job(store, job.id, "json", str(outside / "hard.json"))
    assert job_file.read_bytes() == before


def test_export_refuses_a_fifo_a_folder_and_a_missing_folder(
    store: JobStore, tmp_path: Path
) -> None:
    job = _job(store)
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    with pytest.raises(ActionError, match="not a plain file"):
        export_actions.export_job(store, job.id, "csv", str(fifo))
    with pytest.raises(ActionError, match="is a folder"):
        export_actions.export_job(store, job.id, "csv", str(tmp_path))
    with pytest.raises(ActionError, match="does not exist"):
        export_actions.export_job(store, job.id, "csv", str(tmp_path / "nope" / "r.csv"))
    assert not (tmp_path / "nope").exists()


def test_export_to_dash_writes_nothing_and_returns_the_text(store: JobStore) -> None:
    job = _job(store)
    done = export_actions.export_job(store, job.id, "md", "-")
    assert done.path is None and done.text.startswith("# ")


# -- history, not overwrite ------------------------------------------------------------------
def _reading(store: JobStore, job: Job, fibre: int, reference: float, reading: float) -> None:
    meter_actions.record_readings(
        store,
        job.id,
        "Trunk",
        fibre=fibre,
        wavelength_nm=1550,
        method=Method.ONE_CORD,
        references_dbm={"A->B": reference},
        readings_dbm={"A->B": reading},
        limit_db=2.0,
        details=meter_actions.ReferenceDetails(by="A. Tech"),
    )


def test_a_retest_keeps_the_failed_result_in_the_file_and_the_export(store: JobStore) -> None:
    job = _job(store)
    # The repro: fibre 5 at -16.1 dBm against -7.2 dBm is 8.90 dB (FAIL against 2.0);
    # a new reference -7.35 and -14.9 dBm... here against a 2.0 dB limit both fail, so the
    # retest uses -9.0 dBm: -7.35 - (-9.0) = 1.65 dB, a pass.
    _reading(store, job, 5, -7.2, -16.1)
    _reading(store, job, 5, -7.35, -9.0)
    link = store.load(job.id).links[0]
    first, retest = link.results
    assert first.loss_db == pytest.approx(8.9, abs=1e-9) and first.passed is False
    assert first.superseded_by == retest.id and retest.current and retest.passed
    (row,) = job_summary(store.load(job.id))
    assert (row.tested, row.passed, row.failed) == (1, 1, 0)  # only the retest counts
    csv_text = export(store.load(job.id), "csv")
    assert "fail" in csv_text and retest.id in csv_text  # the superseded fail names its retest
    md = export(store.load(job.id), "md")
    assert "FAIL, superseded" in md and "1 earlier result was superseded by a retest" in md


def test_clearing_a_reading_supersedes_it_and_keeps_it(store: JobStore) -> None:
    job = _job(store)
    _reading(store, job, 1, -7.2, -8.0)
    link_id = store.load(job.id).links[0].id
    meter_actions.apply_changes(
        store, job.id, link_id, [meter_actions.ClearReading(1, 1550, "A->B", by="B. Tech")]
    )
    (result,) = store.load(job.id).links[0].results
    assert not result.current and result.superseded_note == "cleared by B. Tech"
    assert job_summary(store.load(job.id)) == []


def test_an_old_file_migrates_with_earlier_duplicates_superseded() -> None:
    old = {
        "schema_version": 2,
        "id": "a1b2c3d4e5f60718",
        "revision": 3,
        "name": "Old job",
        "links": [
            {
                "id": "L1",
                "label": "Trunk",
                "results": [
                    {
                        "id": "r1",
                        "fibre": 5,
                        "wavelength_nm": 1550,
                        "loss_db": 8.9,
                        "passed": False,
                        "at": "2026-03-14T09:00:00Z",
                    },
                    {
                        "id": "r2",
                        "fibre": 5,
                        "wavelength_nm": 1550,
                        "loss_db": 1.5,
                        "passed": True,
                        "at": "2026-03-14T10:00:00Z",
                    },
                    {
                        "id": "r3",
                        "fibre": 6,
                        "wavelength_nm": 1550,
                        "loss_db": 1.0,
                        "at": "2026-03-14T09:30:00Z",
                    },
                ],
            }
        ],
    }
    data = migrate(json.loads(json.dumps(old)))
    assert data["schema_version"] == SCHEMA_VERSION == 5
    job = Job.model_validate(data)
    r1, r2, r3 = job.links[0].results
    assert (r1.superseded_by, r2.current, r3.current) == ("r2", True, True)
    assert job.links[0].cable_id == "" and job.events == []


# -- one counting rule -----------------------------------------------------------------------
def test_one_counting_rule_for_a_fail_and_a_negative_loss_on_one_fibre() -> None:
    # The example: A->B 3.0 dB against 2.0 dB fails; B->A -0.2 dB is a reference
    # problem. The fibre counts once: as failed (a fail against a trusted reference stands).
    a = cell_count(3.0, 2.0)
    b = cell_count(-0.2, 2.0)
    assert (a, b) == (Count.FAIL, Count.REFERENCE_PROBLEM)
    assert fibre_count([a, b]) is Count.FAIL
    tally = Tally()
    tally.add(fibre_count([a, b]))
    assert tally.words(short=True) == "0 pass, 1 fail, 0 bad references, 0 in doubt, 0 no limit"
    assert fibre_count([cell_count(1.0, 2.0), cell_count(-0.1, 2.0)]) is Count.REFERENCE_PROBLEM
    assert cell_count(1.0, 2.0, in_doubt=True) is Count.IN_DOUBT
    assert cell_count(1.0, None) is Count.NO_LIMIT


def test_a_reference_problem_is_counted_and_listed_as_an_open_item(store: JobStore) -> None:
    job = _job(store)
    # The repro: reference -7.2, reading -6.8: -0.4 dB, a negative loss.
    meter_actions.record_readings(
        store,
        job.id,
        "L",
        fibre=3,
        wavelength_nm=1310,
        method=Method.ONE_CORD,
        references_dbm={"A->B": -7.2},
        readings_dbm={"A->B": -6.8},
        limit_db=None,
    )
    saved = store.load(job.id)
    (row,) = job_summary(saved)
    assert (row.reference_problems, row.no_limit) == (1, 0)
    assert open_items(saved) == [
        "L: fibre 3 at 1310 nm A→B: reference problem, clean and re-reference"
    ]


# -- the job as the starting point ---------------------------------------------------------------
def test_jobs_made_together_differ_in_their_first_8_characters(store: JobStore) -> None:
    ids = [job_actions.create_job(store, f"job {n}").job.id for n in range(20)]
    assert len({job_id[:8] for job_id in ids}) == 20


def test_a_duplicate_job_name_is_warned_about_and_both_are_kept(store: JobStore) -> None:
    _job(store, "Mill Lane")
    second = job_actions.create_job(store, "  mill  lane ")
    assert second.warnings and "already named" in second.warnings[0]
    assert len(store.list()) == 2


def test_edit_rename_links_and_their_fields(store: JobStore) -> None:
    job = _job(store)
    edited = job_actions.edit_job(store, job.id, name="Station Road spur", by="B. Lead")
    assert edited.job.name == "Station Road spur"
    assert edited.job.events[-1].by == "B. Lead" and "renamed" in edited.job.events[-1].what
    fields = job_actions.parse_link_text(
        label="Exchange to cab 4",
        end_a="Exchange ODF 2",
        end_b="Cabinet 4",
        fibre_type="OS2",
        fibre_count="48",
        cable_id="C-104",
        length="1.2 km",
    )
    _, link = job_actions.add_link(store, job.id, fields, by="B. Lead")
    assert (link.fibre_count, link.length_m, link.cable_id) == (48, pytest.approx(1200.0), "C-104")
    with pytest.raises(ActionError, match="already has a link"):
        job_actions.add_link(store, job.id, fields)
    _, link = job_actions.edit_link(
        store, job.id, link.id, job_actions.LinkFields(end_b="Cabinet 5"), by="B. Lead"
    )
    assert link.end_b == "Cabinet 5" and link.end_a == "Exchange ODF 2"
    with pytest.raises(ActionError, match="fibre count"):
        job_actions.parse_link_text(label="x", fibre_count="0")


def test_delete_moves_to_the_trash_and_restore_brings_it_back(store: JobStore) -> None:
    job = _job(store)
    where = job_actions.delete_job(store, job.id, by="B. Lead")
    assert where.parent == store.jobs_dir / "trash" and where.exists()
    assert store.list() == []
    restored = job_actions.restore_job(store, job.id[:8], by="B. Lead")
    assert restored.id == job.id and [s.id for s in store.list()] == [job.id]
    assert [e.what for e in restored.events[-2:]] == [
        "moved to the trash",
        "restored from the trash",
    ]


def test_done_with_open_items_lists_them_and_asks(store: JobStore) -> None:
    job = _job(store)
    _reading(store, job, 5, -7.2, -16.1)  # 8.9 dB, a fail
    with pytest.raises(job_actions.OpenItemsError) as refused:
        job_actions.mark_done(store, job.id, by="B. Lead")
    assert refused.value.items == ["Trunk: fibre 5 at 1550 nm A→B: failed, repair and retest"]
    assert store.load(job.id).status == "open"
    done = job_actions.mark_done(store, job.id, by="B. Lead", reason="repair booked", confirm=True)
    assert done.status == "done" and done.notes[-1].text == "Marked done: repair booked"
    assert "1 open item" in done.events[-1].what


# -- the operator --------------------------------------------------------------------------------
def test_the_operator_comes_from_by_then_the_environment_then_the_settings(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    config = tmp_path / "config"
    assert resolve_operator(None, config) == ""
    save_operator(config, "  Saved Name ")
    assert resolve_operator(None, config) == "Saved Name"
    monkeypatch.setenv(ENV, "Env Name")
    assert resolve_operator(None, config) == "Env Name"
    assert resolve_operator("Given", config) == "Given"
    with pytest.raises(ActionError, match="control character"):
        resolve_operator("a\x1b[31m", config)


def test_a_note_carries_its_author(store: JobStore) -> None:
    job = _job(store)
    _, note = job_actions.add_note(store, job.id, "Duct proven to chamber 4", by="A. Tech")
    assert note.by == "A. Tech"
    with pytest.raises(ActionError, match="empty"):
        job_actions.add_note(store, job.id, "   ")


def test_fault_inputs_have_one_name_whichever_face_typed_them() -> None:
    from fieldkit.actions.saves import typed_fields

    cli = {"distance": "3.412 km", "ior_set": "1.4680", "fiber": "OS2", "marking_start": "3330"}
    workspace = {
        "distance": "3.412 km",
        "ior-set": "1.4680",
        "fibre": "OS2",
        "marking": "3330",
        "unit": "m",  # the display unit is not an input
        "landmark-name": "draft",  # a row editor's unsaved draft is not an input either
    }
    assert (
        typed_fields(cli)
        == typed_fields(workspace)
        == {
            "distance": "3.412 km",
            "ior_set": "1.4680",
            "fibre": "OS2",
            "marking_start": "3330",
        }
    )


def test_budgets_keep_their_history(store: JobStore) -> None:
    from fieldkit.actions.saves import save_budget
    from fieldkit.jobs.models import BudgetRecord

    job = _job(store)
    save_budget(store, job.id, "Trunk", BudgetRecord(by="A"), create=True)
    saved = save_budget(store, job.id, "Trunk", BudgetRecord(by="B"))
    link = store.load(job.id).link(saved.link_id)
    assert link.budget is not None and link.budget.by == "B"
    assert [b.by for b in link.earlier_budgets] == ["A"]


def test_results_of_a_recheck_taken_after_the_drift_are_in_doubt(store: JobStore) -> None:
    job = _job(store)
    _reading(store, job, 1, -7.2, -8.0)
    outcome = meter_actions.record_reference(
        store,
        job.id,
        "Trunk",
        wavelength_nm=1550,
        level_dbm=-7.5,
        method=Method.ONE_CORD,
        recheck=True,
        at=datetime.now(UTC) + timedelta(seconds=1),
    )
    assert outcome.recheck is not None and not outcome.recheck.drift.within
    assert len(outcome.recheck.in_doubt_ids) == 1
