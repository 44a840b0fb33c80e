"""One size and shape policy for every save, read and import: text lengths, nesting depth, file
size and number of records; strict types; no repeated JSON keys; deterministic ids on import.

The limits are fieldkit's own (jobs/models.py); the tests shrink the file and record limits so
that they run in milliseconds, and check the rule itself: nothing acknowledged is refused later.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from fieldkit.jobs import handoff, jobfile
from fieldkit.jobs import store as store_module
from fieldkit.jobs.handoff import import_jobs, read_handoff
from fieldkit.jobs.models import MAX_NESTING_DEPTH, MAX_NOTE_TEXT, Job, LossResult
from fieldkit.jobs.reports import HANDOFF_FORMAT, to_handoff
from fieldkit.jobs.store import JobStore, StoreError


@pytest.fixture
def store(tmp_path: Path) -> JobStore:
    return JobStore(tmp_path / "jobs")


def _handoff(tmp_path: Path, jobs: list[dict[str, Any]], name: str = "h.json") -> Path:
    path = tmp_path / name
    path.write_text(json.dumps({"format": HANDOFF_FORMAT, "handoff_version": 1, "jobs": jobs}))
    return path


def _job_dict(**changes: Any) -> dict[str, Any]:
    job = Job(name="Station Road")
    link = job.add_link("L1")
    link.results.append(LossResult(fibre=1, wavelength_nm=1310, loss_db=0.4))
    data = json.loads(job.model_dump_json())
    data.update(changes)
    return data


# -- text lengths --------------------------------------------------------------------------


def test_an_over_long_note_is_refused_before_anything_is_written(store: JobStore) -> None:
    job = store.create("Station Road")
    before = store.path_of(job.id).read_bytes()
    with pytest.raises(StoreError, match="at most 20000 characters"):
        store.update(job.id, lambda j: j.add_note("x" * (MAX_NOTE_TEXT + 1)) and None)
    assert store.path_of(job.id).read_bytes() == before


def test_an_over_long_text_set_without_validation_is_refused_at_save(store: JobStore) -> None:
    job = store.create("Station Road")

    def sneak(j: Job) -> None:
        j.crew.append("y" * (MAX_NOTE_TEXT + 1))  # lists are not validated on assignment

    with pytest.raises(StoreError, match="not saved"):
        store.update(job.id, sneak)
    assert store.load(job.id).crew == []


# -- file size: nothing acknowledged is refused on read -------------------------------------


def test_a_save_that_would_pass_the_read_limit_is_refused_and_all_acknowledged_saves_read_back(
    store: JobStore, monkeypatch: pytest.MonkeyPatch
) -> None:
    limit = 16 * 1024
    monkeypatch.setattr(jobfile, "MAX_FILE_BYTES", limit)
    monkeypatch.setattr(store_module, "MAX_FILE_BYTES", limit)
    job = store.create("Station Road")
    acknowledged = []
    refused = None
    for n in range(500):
        try:
            store.update(job.id, lambda j, n=n: j.add_note(f"note {n} " + "z" * 200) and None)
        except StoreError as exc:
            refused = str(exc)
            break
        acknowledged.append(f"note {n} ")
    assert refused is not None and "larger than the 16 KiB a job file may be" in refused
    fresh = JobStore(store.jobs_dir)
    notes = [note.text for note in fresh.load(job.id).notes]
    assert all(any(n.startswith(a) for n in notes) for a in acknowledged)
    assert fresh.problems == []


def test_a_job_past_the_record_limit_is_refused_at_save_and_at_import(
    store: JobStore, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(jobfile, "MAX_RECORDS_PER_JOB", 20)
    job = store.create("Station Road")
    with pytest.raises(StoreError, match="more than the 20 a job may hold"):
        store.update(job.id, lambda j: [j.add_note(f"n{i}") for i in range(30)] and None)
    many = _job_dict(notes=[{"text": f"n{i}", "at": "2026-03-14T07:00:00Z"} for i in range(30)])
    with pytest.raises(StoreError, match="more than the 20 a job may hold.*nothing imported"):
        read_handoff(_handoff(tmp_path, [many]))


def test_a_file_past_the_record_limit_opens_read_only(
    store: JobStore, monkeypatch: pytest.MonkeyPatch
) -> None:
    job = store.create("Station Road")
    store.update(job.id, lambda j: [j.add_note(f"n{i}") for i in range(30)] and None)
    monkeypatch.setattr(jobfile, "MAX_RECORDS_PER_JOB", 20)  # a later, stricter fieldkit
    loaded = store.load(job.id)
    assert loaded.read_only and "more than the 20" in loaded.read_only
    assert len(loaded.notes) == 30  # nothing lost


# -- nesting -------------------------------------------------------------------------------


def _nested(depth: int) -> Any:
    value: Any = 1.0
    for _ in range(depth):
        value = {"k": [value]}
    return value


@pytest.mark.parametrize("depth", [MAX_NESTING_DEPTH + 1, 400, 990, 5000, 100_000])
def test_deep_nesting_in_free_form_parts_is_refused_on_import(tmp_path: Path, depth: int) -> None:
    data = _job_dict()
    data["links"][0]["faults"] = [
        {
            "fibre_distance_m": 1.0,
            "sheath_distance_m": 1.0,
            "route_distance_m": 1.0,
            "low_m": 0.0,
            "high_m": 2.0,
            "inputs": {"deep": "HOLE"},
        }
    ]
    # written by hand: json.dumps itself refuses to write nesting this deep
    text = json.dumps({"format": HANDOFF_FORMAT, "handoff_version": 1, "jobs": [data]})
    text = text.replace('"HOLE"', '{"k": [' * depth + "1.0" + "]}" * depth)
    path = tmp_path / "deep.json"
    path.write_text(text)
    with pytest.raises(StoreError, match="nested.*nothing imported"):
        read_handoff(path)


def test_a_deeply_nested_job_file_is_quarantined_not_listed(store: JobStore) -> None:
    job = store.create("Station Road")
    data = json.loads(store.path_of(job.id).read_text())
    data["links"] = [
        {
            "id": "l1",
            "label": "L1",
            "budget": {"description": _nested(450)},
        }
    ]
    store.path_of(job.id).write_text(json.dumps(data))
    with pytest.raises(StoreError, match="nested"):
        store.load(job.id)
    assert store.list() == []


# -- strict types, repeated keys --------------------------------------------------------------


@pytest.mark.parametrize(
    ("where", "value", "field"),
    [
        ("revision", "7", "revision"),
        ("result.fibre", "3", "fibre"),
        ("result.passed", "yes", "passed"),
        ("note.at", 0, "at"),
        ("result.loss_db", "0.4", "loss_db"),
    ],
)
def test_import_refuses_coercions(tmp_path: Path, where: str, value: Any, field: str) -> None:
    data = _job_dict()
    data["notes"] = [{"id": "n1", "text": "hello", "at": "2026-03-14T07:00:00Z"}]
    if where == "revision":
        data["revision"] = value
    elif where.startswith("result."):
        data["links"][0]["results"][0][where.split(".")[1]] = value
    else:
        data["notes"][0]["at"] = value
    with pytest.raises(StoreError, match=f"{field}.*nothing imported"):
        read_handoff(_handoff(tmp_path, [data]))


def test_a_repeated_key_in_a_job_file_is_quarantined_with_the_reason(store: JobStore) -> None:
    job = store.create("Station Road")
    path = store.path_of(job.id)
    text = path.read_text()
    path.write_text(text.replace('"name": "Station Road"', '"name": "A", "name": "B"', 1))
    with pytest.raises(StoreError, match="'name' twice"):
        store.load(job.id)


def test_a_repeated_key_in_a_handoff_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "h.json"
    path.write_text('{"format": "x", "format": "' + HANDOFF_FORMAT + '", "jobs": []}')
    with pytest.raises(StoreError, match="'format' twice.*nothing imported"):
        read_handoff(path)


def test_a_trailing_newline_in_an_imported_job_id_is_refused(tmp_path: Path) -> None:
    data = _job_dict()
    data["id"] += "\n"
    with pytest.raises(StoreError, match="not a fieldkit job id"):
        read_handoff(_handoff(tmp_path, [data]))


# -- deterministic ids ---------------------------------------------------------------------


def _without_record_ids(data: dict[str, Any]) -> dict[str, Any]:
    data = json.loads(json.dumps(data))
    for note in data["notes"]:
        note.pop("id")
    for link in data["links"]:
        link.pop("id")
        for result in link["results"]:
            result.pop("id")
    return data


def test_records_without_ids_merge_on_a_second_and_third_import(
    store: JobStore, tmp_path: Path
) -> None:
    job = Job(name="Station Road")
    job.add_note("Duct proven to chamber 4", by="A. Tech")
    job.add_note("Duct proven to chamber 4", by="A. Tech")  # the same words twice, both kept
    link = job.add_link("L1")
    for fibre in (1, 2):
        link.results.append(LossResult(fibre=fibre, wavelength_nm=1310, loss_db=0.4))
    data = _without_record_ids(json.loads(job.model_dump_json()))
    data["notes"][1]["at"] = data["notes"][0]["at"]
    path = _handoff(tmp_path, [data])
    for _ in range(3):
        import_jobs(store, read_handoff(path))
    merged = store.load(job.id)
    assert len(merged.notes) == 2
    assert len(merged.links) == 1 and len(merged.links[0].results) == 2
    ids = [n.id for n in merged.notes] + [r.id for r in merged.links[0].results]
    assert len(set(ids)) == len(ids)


def test_a_later_handoff_with_more_results_merges_into_the_same_link(
    store: JobStore, tmp_path: Path
) -> None:
    job = Job(name="Station Road")
    link = job.add_link("L1")
    link.results.append(LossResult(fibre=1, wavelength_nm=1310, loss_db=0.4))
    first = _without_record_ids(json.loads(job.model_dump_json()))
    import_jobs(store, read_handoff(_handoff(tmp_path, [first], "a.json")))
    link.results.append(LossResult(fibre=2, wavelength_nm=1310, loss_db=0.5))
    second = _without_record_ids(json.loads(job.model_dump_json()))
    import_jobs(store, read_handoff(_handoff(tmp_path, [second], "b.json")))
    merged = store.load(job.id)
    assert len(merged.links) == 1
    assert sorted(r.fibre for r in merged.links[0].results) == [1, 2]


def test_content_ids_fit_the_record_id_rule() -> None:
    data = handoff.assign_content_ids({"id": "1a2b3c4d5e6f", "notes": [{"text": "x"}]})
    import re

    from fieldkit.jobs.base import RECORD_ID_RE

    assert re.fullmatch(RECORD_ID_RE.strip("^$"), data["notes"][0]["id"])


# -- progress ------------------------------------------------------------------------------


def test_import_reports_progress_while_reading_and_merging(store: JobStore, tmp_path: Path) -> None:
    jobs = [Job(name=f"Job {i}") for i in range(5)]
    path = tmp_path / "h.json"
    path.write_text(to_handoff(jobs))
    seen: list[tuple[int, int]] = []
    imported = read_handoff(path, lambda done, total: seen.append((done, total)))
    assert seen[-1] == (5, 5)
    seen.clear()
    import_jobs(store, imported, lambda done, total: seen.append((done, total)))
    assert seen[-1] == (5, 5) and [d for d, _ in seen] == sorted(d for d, _ in seen)
