"""Job records: every record survives a JSON round trip; bad values are refused by name."""

from __future__ import annotations

import math
from datetime import UTC, datetime

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from pydantic import ValidationError

from fieldkit.jobs.models import (
    JOB_ID_RE,
    BudgetItem,
    BudgetRecord,
    BudgetWavelength,
    FaultRecord,
    Job,
    Link,
    LossResult,
    Note,
    ReferenceRecord,
    new_id,
    result_in_doubt,
)
from fieldkit.jobs.splices import Closure, Splice, SpliceCable, Tray

finite = st.floats(min_value=-1e6, max_value=1e6, allow_nan=False, allow_infinity=False)
positive = st.floats(min_value=0.001, max_value=1e5, allow_nan=False, allow_infinity=False)
moments = st.datetimes(
    min_value=datetime(2000, 1, 1), max_value=datetime(2100, 1, 1), timezones=st.just(UTC)
)
words = st.text(max_size=40)
methods = st.sampled_from(["one-cord", "two-cord", "three-cord"])

notes = st.builds(Note, at=moments, by=words, text=st.text(min_size=1, max_size=80))
references = st.builds(
    ReferenceRecord,
    source_id=words,
    meter_id=words,
    wavelength_nm=positive,
    level_dbm=finite,
    method=methods,
    cords=st.lists(words, max_size=3),
    launch_condition=st.none() | words,
    by=words,
    at=moments,
    kind=st.sampled_from(["initial", "recheck"]),
    drift_db=st.none() | finite,
    in_doubt_since=st.none() | moments,
)
results = st.builds(
    LossResult,
    fibre=st.integers(1, 864),
    wavelength_nm=positive,
    direction=st.sampled_from(["A->B", "B->A"]),
    reading_dbm=st.none() | finite,
    loss_db=finite,
    reference_id=st.none() | st.just(new_id()),
    method=methods,
    limit_db=st.none() | finite,
    passed=st.none() | st.booleans(),
    flags=st.lists(st.sampled_from(["negative-loss", "reference-in-doubt"]), max_size=2),
    by=words,
    at=moments,
)
budgets = st.builds(
    BudgetRecord,
    computed_at=moments,
    by=words,
    description=st.dictionaries(st.text(max_size=8), finite | words, max_size=3),
    wavelengths=st.lists(
        st.builds(
            BudgetWavelength,
            wavelength_nm=positive,
            loss_db=finite,
            typical_loss_db=st.none() | finite,
            items=st.lists(
                st.builds(BudgetItem, name=words, loss_db=finite, source=words), max_size=3
            ),
        ),
        max_size=3,
    ),
    margin_db=finite,
    application=st.none() | st.dictionaries(st.text(max_size=8), finite, max_size=2),
    transceiver=st.none() | st.dictionaries(st.text(max_size=8), finite, max_size=2),
)
small_db = st.none() | st.floats(-5, 20, allow_nan=False)
splices = st.builds(
    Closure,
    name=st.text(min_size=1, max_size=20),
    route_distance_m=st.none() | positive,
    landmark=words,
    cables=st.lists(
        st.builds(
            SpliceCable,
            name=st.text(min_size=1, max_size=8),
            fibre_count=st.none() | st.integers(1, 864),
            per_tube=st.none() | st.integers(1, 24),
            by=words,
            at=moments,
        ),
        max_size=2,
    ),
    trays=st.lists(
        st.builds(Tray, number=st.integers(1, 99), capacity=st.integers(1, 99)), max_size=2
    ),
    splices=st.lists(
        st.builds(
            Splice,
            cable_a=st.text(min_size=1, max_size=8),
            fibre_a=st.integers(1, 864),
            cable_b=st.text(min_size=1, max_size=8),
            fibre_b=st.integers(1, 864),
            method=st.sampled_from(["fusion", "mechanical"]),
            estimate_db=small_db,
            loss_ab_db=small_db,
            loss_ba_db=small_db,
            by=words,
            at=moments,
        ),
        max_size=3,
    ),
    by=words,
    at=moments,
)
faults = st.builds(
    FaultRecord,
    by=words,
    at=moments,
    inputs=st.dictionaries(st.text(max_size=8), finite | words, max_size=3),
    fibre_distance_m=finite,
    sheath_distance_m=finite,
    route_distance_m=finite,
    low_m=finite,
    high_m=finite,
    nearest_landmark=st.none() | words,
    offset_from_landmark_m=st.none() | finite,
    marking=st.none() | words,
    notes=words,
)
links = st.builds(
    Link,
    label=st.text(min_size=1, max_size=20),
    end_a=words,
    end_b=words,
    fibre_type=words,
    length_m=st.none() | positive,
    fibre_count=st.none() | st.integers(1, 864),
    budget=st.none() | budgets,
    references=st.lists(references, max_size=2),
    results=st.lists(results, max_size=3),
    closures=st.lists(splices, max_size=2),
    faults=st.lists(faults, max_size=1),
)
jobs = st.builds(
    Job,
    name=st.text(min_size=1, max_size=40),
    customer=words,
    site=words,
    crew=st.lists(words, max_size=3),
    created_at=moments,
    updated_at=moments,
    status=st.sampled_from(["open", "done"]),
    notes=st.lists(notes, max_size=3),
    links=st.lists(links, max_size=2),
    revision=st.integers(0, 10_000),
)


@settings(max_examples=60, deadline=None)
@given(jobs)
def test_job_round_trips_through_json(job: Job) -> None:
    assert Job.model_validate_json(job.model_dump_json()) == job


@pytest.mark.parametrize("strategy", [notes, references, results, budgets, splices, faults])
@settings(max_examples=30, deadline=None)
@given(data=st.data())
def test_every_record_round_trips(strategy: st.SearchStrategy, data: st.DataObject) -> None:
    record = data.draw(strategy)
    assert type(record).model_validate_json(record.model_dump_json()) == record


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf])
def test_non_finite_numbers_are_refused(bad: float) -> None:
    with pytest.raises(ValidationError, match="loss_db"):
        LossResult(fibre=1, wavelength_nm=1310.0, loss_db=bad)


def test_non_finite_inside_budget_description_is_refused() -> None:
    with pytest.raises(ValidationError, match="not finite"):
        BudgetRecord(description={"length_m": math.inf})


def test_unknown_fields_are_refused() -> None:
    with pytest.raises(ValidationError, match="extra"):
        Note.model_validate({"text": "x", "colour": "red"})


def test_naive_times_are_refused() -> None:
    with pytest.raises(ValidationError, match="timezone"):
        Note(text="x", at=datetime(2026, 1, 1, 9, 0))  # noqa: DTZ001


@pytest.mark.parametrize("bad_id", ["../etc/passwd", "ABC", "12345", "x" * 20, "a/b" * 6])
def test_job_ids_that_could_name_a_path_are_refused(bad_id: str) -> None:
    with pytest.raises(ValidationError, match="id"):
        Job(id=bad_id, name="x")


def test_generated_ids_match_the_pattern_and_sort_by_time() -> None:
    first, second = new_id(), new_id()
    assert JOB_ID_RE.match(first) and JOB_ID_RE.match(second)
    assert first[:11] <= second[:11]


def test_result_in_doubt_by_flag_or_by_reference_time() -> None:
    ref = ReferenceRecord(
        wavelength_nm=1550.0,
        level_dbm=-7.0,
        method="one-cord",
        at=datetime(2026, 1, 1, 8, tzinfo=UTC),
        in_doubt_since=datetime(2026, 1, 1, 10, tzinfo=UTC),
    )
    link = Link(label="L", references=[ref])
    before = LossResult(
        fibre=1,
        wavelength_nm=1550.0,
        loss_db=1.0,
        reference_id=ref.id,
        at=datetime(2026, 1, 1, 9, tzinfo=UTC),
    )
    after = LossResult(
        fibre=2,
        wavelength_nm=1550.0,
        loss_db=1.0,
        reference_id=ref.id,
        at=datetime(2026, 1, 1, 11, tzinfo=UTC),
    )
    flagged = LossResult(fibre=3, wavelength_nm=1550.0, loss_db=1.0, flags=["reference-in-doubt"])
    assert [result_in_doubt(link, r) for r in (before, after, flagged)] == [False, True, True]
