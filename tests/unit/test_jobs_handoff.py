"""Hand-off import: merged by id without duplicates, conflicts reported, hostile files refused
with nothing written."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit.jobs.handoff import import_jobs, merge_job, read_handoff
from fieldkit.jobs.models import Job, LossResult
from fieldkit.jobs.reports import to_handoff
from fieldkit.jobs.store import JobStore, StoreError

GOLDEN = Path(__file__).parent.parent / "golden"


def sample() -> Job:
    return Job.model_validate_json((GOLDEN / "sample_job.json").read_text(encoding="utf-8"))


@pytest.fixture
def store(tmp_path: Path) -> JobStore:
    return JobStore(tmp_path / "laptop-b" / "jobs")


def _write(tmp_path: Path, jobs: list[Job], name: str = "handoff.json") -> Path:
    path = tmp_path / name
    path.write_text(to_handoff(jobs), encoding="utf-8")
    return path


def test_import_twice_adds_once(tmp_path: Path, store: JobStore) -> None:
    path = _write(tmp_path, [sample()])
    first = import_jobs(store, read_handoff(path))
    second = import_jobs(store, read_handoff(path))
    assert first.added_jobs == [sample().id] and first.conflicts == []
    assert second.unchanged_jobs == [sample().id] and second.added_records == 0
    loaded = store.load(sample().id)
    assert sum(len(link.results) for link in loaded.links) == 30
    assert loaded.revision == 1  # written once, in this store's own revision count


def test_new_entries_from_the_other_laptop_merge_in(tmp_path: Path, store: JobStore) -> None:
    import_jobs(store, read_handoff(_write(tmp_path, [sample()])))
    store.update(sample().id, lambda j: j.add_note("local note") and None)
    theirs = sample()
    theirs.add_note("their note")
    theirs.links[0].results.append(
        LossResult(fibre=7, wavelength_nm=1550.0, loss_db=1.45, limit_db=3.25, passed=True)
    )
    report = import_jobs(store, read_handoff(_write(tmp_path, [theirs])))
    assert report.merged_jobs == [sample().id]
    assert report.added_records == 2 and report.conflicts == []
    merged = store.load(sample().id)
    texts = [n.text for n in merged.notes]
    assert "local note" in texts and "their note" in texts
    assert len(merged.links[0].results) == 25


def test_conflicting_edits_are_reported_and_local_kept(tmp_path: Path, store: JobStore) -> None:
    import_jobs(store, read_handoff(_write(tmp_path, [sample()])))
    theirs = sample()
    theirs.name = "Renamed elsewhere"
    theirs.notes[0].text = "edited elsewhere"
    report = import_jobs(store, read_handoff(_write(tmp_path, [theirs])))
    assert len(report.conflicts) == 2
    assert any("name kept" in c for c in report.conflicts)
    assert any("note r0001 differs" in c for c in report.conflicts)
    local = store.load(sample().id)
    assert local.name == sample().name and local.notes[0].text == sample().notes[0].text


def test_a_single_job_file_imports_too(tmp_path: Path, store: JobStore) -> None:
    path = tmp_path / "one.json"
    path.write_text(sample().model_dump_json(), encoding="utf-8")
    assert import_jobs(store, read_handoff(path)).added_jobs == [sample().id]


def _hostile(tmp_path: Path, data: object, name: str = "bad.json") -> Path:
    path = tmp_path / name
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


def _handoff_with(job: dict) -> dict:
    return {
        "format": "fieldkit-jobs-handoff",
        "handoff_version": 1,
        "schema_version": 2,
        "jobs": [job],
    }


@pytest.mark.parametrize("job_id", ["../../outside", "/etc/passwd", "ABCDEF012345", "", 17])
def test_path_trick_ids_are_refused(tmp_path: Path, store: JobStore, job_id: object) -> None:
    data = sample().model_dump(mode="json")
    data["id"] = job_id
    with pytest.raises(StoreError, match="not a fieldkit job id.*nothing imported"):
        read_handoff(_hostile(tmp_path, _handoff_with(data)))
    assert not store.jobs_dir.exists()


def test_wrong_types_are_refused_naming_the_field(tmp_path: Path) -> None:
    data = sample().model_dump(mode="json")
    data["links"][0]["results"][0]["loss_db"] = "lots"
    with pytest.raises(StoreError, match=r"links\.0\.results\.0\.loss_db"):
        read_handoff(_hostile(tmp_path, _handoff_with(data)))


def test_one_bad_job_refuses_the_whole_file(tmp_path: Path, store: JobStore) -> None:
    good = sample().model_dump(mode="json")
    bad = dict(good, id="abcdefabcdef01", status="maybe")
    path = _hostile(tmp_path, {"format": "fieldkit-jobs-handoff", "jobs": [good, bad]})
    with pytest.raises(StoreError, match="status"):
        read_handoff(path)
    assert store.list() == []


def test_huge_file_is_refused_before_reading(tmp_path: Path) -> None:
    path = tmp_path / "huge.json"
    with open(path, "wb") as handle:
        handle.truncate(25 * 1024 * 1024)  # sparse: 25 MB of zeros
    with pytest.raises(StoreError, match="larger than the 20 MiB import limit"):
        read_handoff(path)


@pytest.mark.parametrize(
    "text, message",
    [
        ("not json at all", "not valid JSON"),
        ("[1, 2, 3]", "neither a fieldkit hand-off nor a job file"),
        ('{"format": "fieldkit-jobs-handoff", "jobs": 5}', "no list of jobs"),
    ],
)
def test_files_that_are_not_handoffs(tmp_path: Path, text: str, message: str) -> None:
    path = tmp_path / "x.json"
    path.write_text(text)
    with pytest.raises(StoreError, match=message):
        read_handoff(path)


def test_duplicate_job_in_one_file_is_refused(tmp_path: Path) -> None:
    with pytest.raises(StoreError, match="appears twice"):
        read_handoff(_write(tmp_path, [sample(), sample()]))


@settings(max_examples=60, deadline=None)
@given(st.data())
def test_merge_gives_the_union_of_records_without_duplicates(data: st.DataObject) -> None:
    full = sample()
    ids = [r.id for r in full.links[0].results]
    mine_ids = set(data.draw(st.lists(st.sampled_from(ids), unique=True)))
    theirs_ids = set(data.draw(st.lists(st.sampled_from(ids), unique=True)))
    mine, theirs = sample(), sample()
    mine.links[0].results = [r for r in mine.links[0].results if r.id in mine_ids]
    theirs.links[0].results = [r for r in theirs.links[0].results if r.id in theirs_ids]
    added, conflicts = merge_job(mine, theirs)
    merged = [r.id for r in mine.links[0].results]
    assert sorted(merged) == sorted(mine_ids | theirs_ids)  # each once
    assert added == len(theirs_ids - mine_ids) and conflicts == []
    assert merge_job(mine, theirs) == (0, [])  # merging again changes nothing
