"""The job store: create, list, load, resolve, save with a revision check, update, quarantine,
newer files read-only, the list index, and the migration of an older file."""

from __future__ import annotations

import json
import os
import shutil
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit.jobs.migrations import migrate
from fieldkit.jobs.models import SCHEMA_VERSION, Job, LossResult
from fieldkit.jobs.store import (
    ConflictError,
    JobStore,
    ReadOnlyError,
    StoreError,
    filter_summaries,
    parse_job,
)

GOLDEN = Path(__file__).parent.parent / "golden"


@pytest.fixture
def store(tmp_path: Path) -> JobStore:
    return JobStore(tmp_path / "jobs")


def test_nothing_is_created_until_the_first_write(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    assert store.list() == []
    assert not (tmp_path / "jobs").exists()


def test_create_then_load_and_list(store: JobStore) -> None:
    job = store.create(
        "  Quay Street  ", site="Quay", customer="Harbour board", crew=["Ana", " ", "Bo"], by="Ana"
    )
    assert job.revision == 1
    loaded = store.load(job.id)
    assert (loaded.name, loaded.site, loaded.crew) == ("Quay Street", "Quay", ["Ana", "Bo"])
    assert loaded.notes[0].by == "Ana"
    [summary] = store.list()
    assert (summary.id, summary.name, summary.note_count) == (job.id, "Quay Street", 1)
    assert (store.jobs_dir / f"{job.id}.json").is_file()


def test_create_refuses_an_empty_name(store: JobStore) -> None:
    with pytest.raises(StoreError, match="needs a name"):
        store.create("   ")


def test_save_of_a_stale_copy_is_a_conflict_and_writes_nothing(store: JobStore) -> None:
    job = store.create("Conflict")
    first, second = store.load(job.id), store.load(job.id)
    first.add_note("from the first copy")
    store.save(first)
    second.add_note("from the second copy")
    with pytest.raises(ConflictError, match="changed by another program"):
        store.save(second)
    assert [n.text for n in store.load(job.id).notes] == ["from the first copy"]


def test_update_reloads_so_two_copies_keep_both_entries(store: JobStore) -> None:
    job = store.create("Two copies")
    store.update(job.id, lambda j: j.add_note("one") and None)
    store.update(job.id, lambda j: j.add_note("two") and None)
    saved = store.load(job.id)
    assert [n.text for n in saved.notes] == ["one", "two"]
    assert saved.revision == 3


def test_update_that_raises_leaves_the_file_untouched(store: JobStore) -> None:
    job = store.create("Untouched")
    before = store.path_of(job.id).read_bytes()

    def broken(j: Job) -> None:
        j.add_note("half done")
        raise RuntimeError("stop")

    with pytest.raises(RuntimeError):
        store.update(job.id, broken)
    assert store.path_of(job.id).read_bytes() == before


def test_a_value_set_without_validation_is_refused_at_save(store: JobStore) -> None:
    job = store.create("Bad assignment")

    def nan_result(j: Job) -> None:
        link = j.add_link("L1")
        result = LossResult(fibre=1, wavelength_nm=1310.0, loss_db=1.0)
        result.loss_db = float("nan")  # pydantic does not validate assignment
        link.results.append(result)

    with pytest.raises(StoreError, match="not saved"):
        store.update(job.id, nan_result)
    assert store.load(job.id).links == []


def test_save_keeps_the_previous_version_as_backup(store: JobStore) -> None:
    job = store.create("Backup")
    store.update(job.id, lambda j: j.add_note("second") and None)
    backup = store.path_of(job.id).with_name(f"{job.id}.json.bak")
    assert json.loads(backup.read_text())["revision"] == 1


def test_resolve_prefixes(store: JobStore) -> None:
    a = store.create("A")
    assert store.resolve(a.id[:14].upper()) == a.id
    with pytest.raises(StoreError, match="not a job id"):
        store.resolve("../x")
    with pytest.raises(StoreError, match="no job"):
        store.resolve("ffffffffffff")


def test_resolve_ambiguous_prefix(store: JobStore) -> None:
    for suffix in ("01", "02"):
        store.save(Job(id="abcabcabcabc00" + suffix, name=suffix))
    with pytest.raises(StoreError, match="matches 2 jobs"):
        store.resolve("abcabc")


@pytest.mark.parametrize("bad", ["../../etc/passwd", "ABCDEF0123456", "", "a" * 33])
def test_load_refuses_ids_that_are_not_generated(store: JobStore, bad: str) -> None:
    with pytest.raises(StoreError, match="not a job id"):
        store.load(bad)


def test_broken_file_is_quarantined_with_its_reason_and_others_stay(store: JobStore) -> None:
    good = store.create("Good")
    bad = store.create("Bad")
    store.path_of(bad.id).write_text('{"schema_version": 2, "id": "' + bad.id + '", "na')
    store.path_of(bad.id).with_name(f"{bad.id}.json.bak").unlink(missing_ok=True)
    assert [s.id for s in store.list()] == [good.id]
    [moved] = store.quarantined()
    assert moved.path.name.startswith(f"{bad.id}.json.")
    assert "not valid JSON" in moved.reason
    assert not store.path_of(bad.id).exists()
    assert any("moved to" in p for p in store.problems)


def test_quarantine_restores_a_valid_backup(store: JobStore) -> None:
    job = store.create("Has backup")
    store.update(job.id, lambda j: j.add_note("kept") and None)
    store.path_of(job.id).write_bytes(b"\x00\x00 torn")
    with pytest.raises(StoreError, match="restored from its backup"):
        store.load(job.id)
    assert store.load(job.id).revision == 1  # the backup: the version before the last save
    assert len(store.quarantined()) == 1


def test_quarantine_never_overwrites_an_earlier_quarantined_file(store: JobStore) -> None:
    job = store.create("Twice")
    path = store.path_of(job.id)
    for text in ("first broken", "second broken"):
        path.with_name(f"{job.id}.json.bak").unlink(missing_ok=True)
        path.write_text(text)
        with pytest.raises(StoreError):
            store.load(job.id)
    kept = sorted(f.path.read_text() for f in store.quarantined())
    assert kept == ["first broken", "second broken"]


def test_file_holding_another_id_is_quarantined(store: JobStore) -> None:
    job = store.create("Renamed")
    other = "0" * 16
    os.rename(store.path_of(job.id), store.jobs_dir / f"{other}.json")
    assert store.list() == []
    assert "holds job id" in store.quarantined()[0].reason


def test_newer_schema_opens_read_only_and_refuses_save(store: JobStore) -> None:
    job = store.create("From the future")
    data = json.loads(store.path_of(job.id).read_text())
    data["schema_version"] = SCHEMA_VERSION + 1
    store.path_of(job.id).write_text(json.dumps(data))
    loaded = store.load(job.id)
    assert loaded.read_only and "newer fieldkit" in loaded.read_only
    with pytest.raises(ReadOnlyError):
        store.save(loaded)
    with pytest.raises(ReadOnlyError):
        store.update(job.id, lambda j: None)
    assert store.quarantined() == []


def test_newer_schema_with_unknown_fields_is_listed_not_quarantined(store: JobStore) -> None:
    job = store.create("Unknown fields")
    data = json.loads(store.path_of(job.id).read_text())
    data["schema_version"] = SCHEMA_VERSION + 3
    data["hologram"] = {"x": 1}
    store.path_of(job.id).write_text(json.dumps(data))
    [summary] = store.list()
    assert summary.read_only and "newer" in summary.read_only
    with pytest.raises(StoreError, match="newer fieldkit"):
        store.load(job.id)
    assert store.path_of(job.id).exists() and store.quarantined() == []


def test_migration_of_a_version_1_file(store: JobStore) -> None:
    store.jobs_dir.mkdir(parents=True)
    shutil.copy(GOLDEN / "job_schema_v1.json", store.jobs_dir / "0123456789abcdef.json")
    job = store.load("0123456789abcdef")
    assert job.schema_version == SCHEMA_VERSION
    assert job.crew == ["Ana Ruiz", "Tomas Hale"]
    assert job.notes[0].by == "Ana Ruiz"
    assert [r.direction for r in job.links[0].results] == ["A->B", "B->A"]
    assert job.links[0].faults == [] and job.revision == 0
    saved = store.save(job)  # written in the current layout from now on
    assert json.loads(store.path_of(job.id).read_text())["schema_version"] == SCHEMA_VERSION
    assert saved.revision == 1


def test_migrate_refuses_a_file_without_version() -> None:
    with pytest.raises(ValueError, match="schema_version"):
        migrate({"id": "x"})


def test_index_is_used_and_refreshed_when_a_file_changes(store: JobStore) -> None:
    job = store.create("Indexed")
    store.list()
    index = json.loads(store.index_path.read_text())
    assert job.id in index["entries"]
    # The index alone answers when nothing changed: a forged name in it shows up.
    index["entries"][job.id][3][1] = "from the index"
    store.index_path.write_text(json.dumps(index))
    assert store.list()[0].name == "from the index"
    # A saved change makes the entry stale: the file is read again.
    store.update(job.id, lambda j: setattr(j, "name", "Renamed") or None)
    assert store.list()[0].name == "Renamed"


def test_corrupt_index_is_ignored(store: JobStore) -> None:
    job = store.create("Index broken")
    store.list()
    store.index_path.write_text("{not json")
    assert [s.id for s in store.list()] == [job.id]


def test_filter_by_words_status_and_date(store: JobStore) -> None:
    a = store.create("Harbour duct", site="Pier 4", crew=["Ana"])
    b = store.create("Mill fit-out", site="Old Mill")
    store.update(b.id, lambda j: setattr(j, "status", "done") or None)
    rows = store.list()
    assert [s.id for s in filter_summaries(rows, "harbour ana")] == [a.id]
    assert [s.id for s in filter_summaries(rows, status="done")] == [b.id]
    assert filter_summaries(rows, "pier mill") == []
    today = rows[0].updated_at.astimezone().date()
    assert len(filter_summaries(rows, on_date=today)) == 2


def test_stale_temp_files_are_removed_at_the_next_save(store: JobStore) -> None:
    job = store.create("Temp")
    stale = store.jobs_dir / f".{job.id}.json.abc123.tmp"
    stale.write_text("half")
    store.update(job.id, lambda j: j.add_note("n") and None)
    assert not stale.exists()


def test_settled_folder_is_listed_from_the_index_alone(store: JobStore) -> None:
    job = store.create("Settled")
    store.list()  # makes the index folder (that changes the jobs folder's mtime once)
    past = store.jobs_dir.stat().st_mtime - 10
    os.utime(store.jobs_dir, (past, past))  # nothing renamed into the folder for 10 s
    store.list()
    index = json.loads(store.index_path.read_text())
    assert index["settled_folder_mtime_ns"] == store.jobs_dir.stat().st_mtime_ns
    index["entries"][job.id][3][1] = "only in the index"
    store.index_path.write_text(json.dumps(index))
    assert store.list()[0].name == "only in the index"  # no file was looked at
    assert store.list(rescan=True)[0].name == "only in the index"  # same file key: kept
    store.update(job.id, lambda j: setattr(j, "name", "Saved again") or None)
    assert store.list()[0].name == "Saved again"  # the save changed the folder: rescanned


def test_a_date_word_in_the_filter_filters_by_day(store: JobStore) -> None:
    job = store.create("Dated")
    rows = store.list()
    day = rows[0].updated_at.astimezone().date()
    assert [s.id for s in filter_summaries(rows, f"dated {day.isoformat()}")] == [job.id]
    assert filter_summaries(rows, "2001-01-01") == []
    assert filter_summaries(rows, "2026-13-45") == []  # not a date: an ordinary word


@settings(max_examples=200, deadline=None)
@given(st.binary(max_size=300) | st.text(max_size=300).map(str.encode))
def test_parse_job_refuses_any_garbage_with_a_store_error(raw: bytes) -> None:
    try:
        parse_job(raw)
    except StoreError as exc:
        assert str(exc)


@settings(max_examples=100, deadline=None)
@given(
    st.dictionaries(
        st.sampled_from(
            ["schema_version", "id", "name", "links", "notes", "crew", "status", "revision"]
        ),
        st.none() | st.integers() | st.text(max_size=5) | st.lists(st.integers(), max_size=2),
        max_size=8,
    )
)
def test_parse_job_refuses_wrong_shapes_with_a_store_error(data: dict) -> None:
    try:
        parse_job(json.dumps(data).encode())
    except StoreError as exc:
        assert str(exc)
