"""Meter references and results on a job's link (fieldkit.actions.meter)."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta
from typing import TYPE_CHECKING, Any

import pytest

from fieldkit.actions import meter as meter_log
from fieldkit.calc.reference import Method
from fieldkit.calc.units import InputError
from fieldkit.jobs.models import BudgetItem, BudgetRecord, BudgetWavelength, Job, result_in_doubt

if TYPE_CHECKING:
    from fieldkit.jobs.models import Link, LossResult, ReferenceRecord

T0 = datetime(2026, 3, 2, 8, 0, tzinfo=UTC)


def _link() -> Link:
    return Job(name="j").add_link("L1")


def _put(link: Link, reference: ReferenceRecord, **cell: Any) -> LossResult:
    """``put_result`` of one A->B reading against ``reference``."""
    return meter_log.put_result(link, direction="A->B", reference=reference, **cell)


def test_two_directions_keep_their_own_references() -> None:
    link = _link()
    a = meter_log.reuse_or_add_reference(
        link, wavelength_nm=1310, level_dbm=-7.2, method=Method.ONE_CORD
    )
    b = meter_log.reuse_or_add_reference(
        link, wavelength_nm=1310, level_dbm=-6.9, method=Method.ONE_CORD
    )
    again_a = meter_log.reuse_or_add_reference(
        link, wavelength_nm=1310, level_dbm=-7.2, method=Method.ONE_CORD
    )
    assert a.id != b.id and again_a.id == a.id
    assert len(link.references) == 2
    # Another method is another reference.
    c = meter_log.reuse_or_add_reference(
        link, wavelength_nm=1310, level_dbm=-7.2, method=Method.TWO_CORD
    )
    assert c.id not in (a.id, b.id)


def test_put_result_computes_loss_flags_and_a_retest_supersedes_keeping_the_first() -> None:
    link = _link()
    reference = meter_log.add_reference(
        link, wavelength_nm=1550, level_dbm=-7.0, method=Method.ONE_CORD, at=T0
    )
    first = _put(
        link, reference, fibre=5, wavelength_nm=1550, reading_dbm=-9.0, limit_db=1.5, at=T0
    )
    # -7.0 − (-9.0) = 2.0 dB > 1.5 dB: fail.
    assert first.loss_db == pytest.approx(2.0, abs=1e-12) and first.passed is False
    fixed = _put(
        link, reference, fibre=5, wavelength_nm=1550, reading_dbm=-8.0, limit_db=1.5, at=T0
    )
    # History, not overwrite: both stay; the first is superseded by the retest.
    assert [r.id for r in link.results] == [first.id, fixed.id]
    assert first.superseded_by == fixed.id and first.superseded_at is not None
    assert first.passed is False and first.loss_db == pytest.approx(2.0, abs=1e-12)
    assert fixed.current and fixed.loss_db == pytest.approx(1.0, abs=1e-12) and fixed.passed
    negative = _put(
        link, reference, fibre=6, wavelength_nm=1550, reading_dbm=-6.8, limit_db=1.5, at=T0
    )
    assert negative.flags == ["negative-loss"] and negative.passed is None
    assert meter_log.clear_result(link, fibre=6, wavelength_nm=1550, direction="A->B", by="A")
    assert not meter_log.clear_result(link, fibre=6, wavelength_nm=1550, direction="A->B")
    # Cleared, not deleted: it stays in the file, superseded by nothing.
    assert negative in link.results and not negative.current
    assert negative.superseded_by is None and negative.superseded_note == "cleared by A"


def test_recheck_puts_results_since_the_last_good_check_in_doubt() -> None:
    link = _link()
    reference = meter_log.add_reference(
        link, wavelength_nm=1310, level_dbm=-7.0, method=Method.ONE_CORD, at=T0
    )
    early = _put(
        link,
        reference,
        fibre=1,
        wavelength_nm=1310,
        reading_dbm=-8.0,
        limit_db=None,
        at=T0 + timedelta(minutes=10),
    )
    good = meter_log.recheck_reference(
        link, wavelength_nm=1310, level_dbm=-7.05, at=T0 + timedelta(hours=1)
    )
    # -7.05 − (-7.00) = -0.05 dB, within 0.1 dB (single-mode, common practice).
    assert good.drift.within and good.in_doubt_ids == []
    late = _put(
        link,
        reference,
        fibre=2,
        wavelength_nm=1310,
        reading_dbm=-8.0,
        limit_db=None,
        at=T0 + timedelta(hours=2),
    )
    bad = meter_log.recheck_reference(
        link, wavelength_nm=1310, level_dbm=-7.3, at=T0 + timedelta(hours=3)
    )
    # -7.30 − (-7.00) = -0.30 dB: beyond; only the result after the good check is in doubt.
    assert bad.drift.drift_db == pytest.approx(-0.30, abs=1e-9) and not bad.drift.within
    assert bad.in_doubt_ids == [late.id]
    assert reference.in_doubt_since == T0 + timedelta(hours=1)
    assert not result_in_doubt(link, early) and result_in_doubt(link, late)
    # A reading taken after the bad recheck against the same reference is flagged at once.
    after = _put(
        link,
        reference,
        fibre=3,
        wavelength_nm=1310,
        reading_dbm=-8.0,
        limit_db=None,
        at=T0 + timedelta(hours=4),
    )
    assert "reference-in-doubt" in after.flags
    with pytest.raises(KeyError, match="no reference"):
        meter_log.recheck_reference(link, wavelength_nm=1550, level_dbm=-7.0)


def _budget(
    description: dict[str, object], items: list[tuple[str, float]], loss_db: float
) -> BudgetRecord:
    return BudgetRecord(
        description=description,
        wavelengths=[
            BudgetWavelength(
                wavelength_nm=1310,
                loss_db=loss_db,
                items=[BudgetItem(name=n, loss_db=v) for n, v in items],
            )
        ],
    )


@pytest.mark.parametrize(
    ("method", "limit_db"),
    # Hand computation: budget 5.50 dB with 4 pairs at 0.50 dB; two-cord drops one end
    # connection (5.00 dB), three-cord both (4.50 dB).
    [(Method.ONE_CORD, 5.50), (Method.TWO_CORD, 5.00), (Method.THREE_CORD, 4.50)],
)
def test_budget_limit_of_a_saved_budget(method: Method, limit_db: float) -> None:
    link = _link()
    link.budget = _budget(
        {"connector_count": 4, "connector_loss_db": 0.5},
        [("fibre", 3.5), ("4 mated connector pairs", 2.0)],
        5.5,
    )
    found = meter_log.budget_limit_db(link, 1310, method)
    assert found is not None and found[0] == pytest.approx(limit_db, abs=1e-9)
    # Without connector_loss_db: the connectors line divided by the count (2.0 / 4 = 0.5 dB).
    link.budget = _budget(
        {"connectors": 4}, [("fibre", 3.5), ("4 mated connector pairs", 2.0)], 5.5
    )
    found = meter_log.budget_limit_db(link, 1310, method)
    assert found is not None and found[0] == pytest.approx(limit_db, abs=1e-9)
    assert meter_log.budget_limit_db(link, 1550, method) is None


def test_budget_limit_without_the_end_connections_is_refused() -> None:
    link = _link()
    link.budget = _budget({"connector_count": 1, "connector_loss_db": 0.5}, [("fibre", 3.5)], 4.0)
    with pytest.raises(InputError, match="end connection"):
        meter_log.budget_limit_db(link, 1310, Method.ONE_CORD)
