"""A modest fuzz run in the suite: mutated job files and hand-offs, and arbitrary typed text.

Whatever the bytes, reading a job or a hand-off raises only StoreError, and anything it accepts
saves, reads back and exports in every format without an error and without a raw control
character. tests/fuzz/fuzz_inputs.py runs the same checks on far more inputs.
"""

from __future__ import annotations

import json
import re
from pathlib import Path
from typing import Any

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fieldkit.jobs.handoff import read_handoff
from fieldkit.jobs.models import Job, LossResult
from fieldkit.jobs.store import JobStore, StoreError, parse_job
from fieldkit.reports import EXPORT_FORMATS, export

_RAW = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")


def _seed() -> bytes:
    job = Job(name="Station Road", customer="Town", site="Depot")
    job.add_note("Duct proven", by="A. Tech")
    link = job.add_link("L1", end_a="A", end_b="B")
    link.results.append(LossResult(fibre=1, wavelength_nm=1310, loss_db=0.4, flags=["x"]))
    return job.model_dump_json(indent=1).encode()


SEED = _seed()
SEED_DICT = json.loads(SEED)

_JSON_VALUES = st.recursive(
    st.none()
    | st.booleans()
    | st.integers(min_value=-(2**70), max_value=2**70)
    | st.floats()
    | st.text(max_size=30),
    lambda inner: (
        st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner, max_size=4)
    ),
    max_leaves=12,
)


@st.composite
def mutated_bytes(draw: st.DrawFn) -> bytes:
    data = bytearray(SEED)
    for _ in range(draw(st.integers(min_value=1, max_value=8))):
        op = draw(st.sampled_from(["flip", "cut", "insert", "delete"]))
        at = draw(st.integers(min_value=0, max_value=max(0, len(data) - 1)))
        if op == "flip" and data:
            data[at] ^= 1 << draw(st.integers(min_value=0, max_value=7))
        elif op == "cut":
            del data[at:]
        elif op == "insert":
            data[at:at] = draw(st.binary(min_size=1, max_size=8))
        elif op == "delete" and data:
            del data[at : at + draw(st.integers(min_value=1, max_value=16))]
    return bytes(data)


def _paths(value: Any, prefix: tuple[Any, ...] = ()) -> list[tuple[Any, ...]]:
    out = [prefix]
    if isinstance(value, dict):
        for key, item in value.items():
            out += _paths(item, (*prefix, key))
    elif isinstance(value, list):
        for i, item in enumerate(value):
            out += _paths(item, (*prefix, i))
    return out


_PATHS = [p for p in _paths(SEED_DICT) if p]


@st.composite
def mutated_dicts(draw: st.DrawFn) -> dict[str, Any]:
    data = json.loads(SEED)
    for _ in range(draw(st.integers(min_value=1, max_value=3))):
        path = draw(st.sampled_from(_PATHS))
        target: Any = data
        try:
            for key in path[:-1]:
                target = target[key]
            target[path[-1]] = draw(_JSON_VALUES)
        except (KeyError, IndexError, TypeError):
            continue
    return data


def _accepted_job_survives_everything(job: Job, tmp_path: Path) -> None:
    for fmt in EXPORT_FORMATS:
        text = export(job, fmt)
        assert not _RAW.search(text.replace("\r\n", "\n").replace("\t", " ")), fmt
    store = JobStore(tmp_path / "jobs")
    job.revision = 0
    try:
        saved = store.save(job)
    except StoreError:
        return  # refused before anything was acknowledged
    assert store.load(saved.id).model_dump() == saved.model_dump()


_SETTINGS = settings(
    max_examples=50,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)


@_SETTINGS
@given(mutated_bytes())
def test_mutated_job_bytes_raise_only_store_error(tmp_path: Path, raw: bytes) -> None:
    try:
        job = parse_job(raw, expected_id=SEED_DICT["id"])
    except StoreError as exc:
        assert str(exc) and "\n" not in str(exc)
        return
    _accepted_job_survives_everything(job, tmp_path / "a")


@_SETTINGS
@given(mutated_dicts())
def test_mutated_job_values_raise_only_store_error(tmp_path: Path, data: dict[str, Any]) -> None:
    try:
        raw = json.dumps(data, allow_nan=True).encode()
    except (ValueError, RecursionError):
        return
    try:
        job = parse_job(raw)
    except StoreError as exc:
        assert str(exc)
        return
    _accepted_job_survives_everything(job, tmp_path / "b")


@_SETTINGS
@given(st.lists(mutated_dicts(), min_size=1, max_size=3))
def test_mutated_handoffs_raise_only_store_error(
    tmp_path: Path, jobs: list[dict[str, Any]]
) -> None:
    path = tmp_path / "h.json"
    try:
        path.write_text(
            json.dumps({"format": "fieldkit-jobs-handoff", "handoff_version": 1, "jobs": jobs})
        )
    except (ValueError, RecursionError):
        return
    try:
        read_handoff(path)
    except StoreError as exc:
        assert str(exc).endswith("nothing imported") or "appears twice" in str(exc)
