"""Hostile and broken job files: each is quarantined (with its reason) or refused with a
message, never overwritten, and every other job still opens."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from fieldkit.jobs.models import SCHEMA_VERSION
from fieldkit.jobs.store import JobStore, StoreError


def _good_jobs(store: JobStore, n: int = 3) -> dict[str, bytes]:
    out = {}
    for i in range(n):
        job = store.create(f"Intact {i}")
        out[job.id] = store.path_of(job.id).read_bytes()
    return out


def _broken(kind: str, job_id: str, valid: bytes) -> bytes | None:
    if kind == "truncated":
        return valid[: len(valid) // 2]
    if kind == "not json":
        return b"this is a shopping list, not a job"
    if kind == "binary":
        return bytes(range(256)) * 10
    if kind == "wrong types":
        data = json.loads(valid)
        data["links"] = [{"label": 5, "results": "many"}]
        return json.dumps(data).encode()
    if kind == "not an object":
        return b"[1, 2, 3]"
    if kind == "no version":
        data = json.loads(valid)
        del data["schema_version"]
        return json.dumps(data).encode()
    return None


KINDS = ["truncated", "not json", "binary", "wrong types", "not an object", "no version"]


@pytest.mark.parametrize("kind", KINDS)
def test_broken_file_is_quarantined_and_others_open(tmp_path: Path, kind: str) -> None:
    store = JobStore(tmp_path / "jobs")
    intact = _good_jobs(store)
    victim = store.create("Victim")
    valid = store.path_of(victim.id).read_bytes()
    broken = _broken(kind, victim.id, valid)
    assert broken is not None
    store.path_of(victim.id).write_bytes(broken)
    fresh = JobStore(tmp_path / "jobs")
    listed = {s.id for s in fresh.list()}
    assert set(intact) <= listed
    for job_id, content in intact.items():
        assert fresh.path_of(job_id).read_bytes() == content
        fresh.load(job_id)
    [moved] = fresh.quarantined()
    assert moved.path.read_bytes() == broken  # kept exactly as found
    assert moved.reason and moved.reason != "no reason recorded"
    # A victim with no earlier save has no backup: it is gone from the list, not invented.
    assert victim.id not in listed


def test_fifty_megabyte_file_is_refused_without_reading_it(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    intact = _good_jobs(store, 2)
    huge_id = "f" * 16
    with open(store.path_of(huge_id), "wb") as handle:
        handle.truncate(50 * 1024 * 1024)
    fresh = JobStore(tmp_path / "jobs")
    assert {s.id for s in fresh.list()} == set(intact)
    with pytest.raises(StoreError):
        fresh.load(huge_id)
    [moved] = fresh.quarantined()
    assert "larger than the 20 MiB limit" in moved.reason  # 20 × 1,048,576 bytes
    assert moved.path.stat().st_size == 50 * 1024 * 1024


def test_future_schema_is_read_only_and_untouched(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    intact = _good_jobs(store, 2)
    job = store.create("Future")
    data = json.loads(store.path_of(job.id).read_text())
    data["schema_version"] = SCHEMA_VERSION + 1
    data["links"] = [{"label": "X", "new_field_we_do_not_know": True}]
    raw = json.dumps(data).encode()
    store.path_of(job.id).write_bytes(raw)
    fresh = JobStore(tmp_path / "jobs")
    summaries = {s.id: s for s in fresh.list()}
    assert set(intact) < set(summaries)
    assert summaries[job.id].read_only
    with pytest.raises(StoreError, match="newer fieldkit"):
        fresh.update(job.id, lambda j: None)
    assert store.path_of(job.id).read_bytes() == raw
    assert fresh.quarantined() == []


def test_a_truncated_file_with_a_backup_comes_back(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    job = store.create("Recoverable")
    store.update(job.id, lambda j: j.add_note("second save") and None)
    valid = store.path_of(job.id).read_bytes()
    store.path_of(job.id).write_bytes(valid[:100])
    fresh = JobStore(tmp_path / "jobs")
    assert [s.id for s in fresh.list()] == [job.id]  # restored from the backup
    assert fresh.load(job.id).revision == 1
    assert "restored" in fresh.quarantined()[0].reason
