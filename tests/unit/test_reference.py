"""Reference methods, insertion loss, verdicts, drift and plausibility (fieldkit.calc.reference)."""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import UTC, datetime, timedelta

import pytest

from fieldkit.calc import reference as ref
from fieldkit.calc.reference import Method, Status
from fieldkit.calc.units import InputError

# -- methods -----------------------------------------------------------------------------------


# IEC 61280-4-1 (multimode) and IEC 61280-4-2 (single-mode), reference methods (from memory):
# one-cord reference includes both end connections, two-cord one, three-cord neither.
# TIA-526-14-B / TIA-526-7 (from memory): Method B = one jumper, Method A = two jumpers,
# Method C = three jumpers.
@pytest.mark.parametrize(
    ("method", "end_connections", "tia_letter"),
    [
        (Method.ONE_CORD, 2, "B"),
        (Method.TWO_CORD, 1, "A"),
        (Method.THREE_CORD, 0, "C"),
    ],
)
def test_end_connections_per_method(method: Method, end_connections: int, tia_letter: str) -> None:
    assert method.end_connections == end_connections
    assert method.tia_letter == tia_letter
    assert ref.parse_method(f"Method {tia_letter}") is method


@pytest.mark.parametrize(
    ("text", "method"),
    [
        ("one-cord", Method.ONE_CORD),
        ("1-cord", Method.ONE_CORD),
        ("1 jumper", Method.ONE_CORD),
        ("One Cord Reference", Method.ONE_CORD),
        ("b", Method.ONE_CORD),
        ("TIA B", Method.ONE_CORD),
        ("two-cord", Method.TWO_CORD),
        ("2 jumpers", Method.TWO_CORD),
        ("method a", Method.TWO_CORD),
        ("three-cord", Method.THREE_CORD),
        ("3-cord", Method.THREE_CORD),
        ("tia method c", Method.THREE_CORD),
    ],
)
def test_method_names_and_aliases(text: str, method: Method) -> None:
    assert ref.parse_method(text) is method


@pytest.mark.parametrize("text", ["", "four-cord", "D", "cord", "1"])
def test_unknown_method_is_refused_with_the_accepted_names(text: str) -> None:
    with pytest.raises(InputError, match="one-cord, two-cord or three-cord"):
        ref.parse_method(text)


# -- arithmetic against the dBm definition -----------------------------------------------------


# ITU-R V.574-5: L[dBm] = 10·log10(P / 1 mW); a ratio in dB is 10·log10(P1/P2).
@pytest.mark.parametrize(
    ("text", "expected_dbm"),
    [
        ("0", 0.0),  # bare number: dBm
        ("-7.5", -7.5),
        ("−7,5 dBm", -7.5),  # Unicode minus, decimal comma
        ("1 mW", 0.0),  # ITU-R V.574: 0 dBm = 1 mW
        ("100 µW", -10.0),  # 10·log10(0.1) = -10
        ("1 uW", -30.0),  # 10·log10(0.001) = -30
        ("10 nW", -50.0),  # 10·log10(1e-5) = -50
        ("-37.5 dBW", -7.5),  # dBm = dBW + 30
    ],
)
def test_levels_typed_in_any_power_unit(text: str, expected_dbm: float) -> None:
    assert ref.level_dbm(text) == pytest.approx(expected_dbm, abs=1e-9)


@pytest.mark.parametrize("text", ["5 km", "0 mW", "-1 uW", "abc", "nan", "3 dB"])
def test_bad_levels_are_refused(text: str) -> None:
    with pytest.raises(InputError, match="reading"):
        ref.level_dbm(text, what="reading")


def test_insertion_loss_is_reference_minus_reading() -> None:
    # Hand computation: reference 0.5 mW, reading 10 µW.
    # Ratio 0.5 mW / 0.01 mW = 50; 10·log10(50) = 16.98970 dB (ITU-R V.574 ratio in dB).
    reference_dbm = ref.level_dbm("0.5 mW")
    reading_dbm = ref.level_dbm("10 uW")
    assert reference_dbm == pytest.approx(-3.010300, abs=1e-6)
    assert reading_dbm == pytest.approx(-20.0, abs=1e-9)
    assert ref.insertion_loss_db(reference_dbm, reading_dbm) == pytest.approx(
        10 * math.log10(50), abs=1e-9
    )
    assert ref.insertion_loss_db(reference_dbm, reading_dbm) == pytest.approx(16.98970, abs=1e-5)
    # dBm straight: -7.20 − (-9.65) = 2.45 dB.
    assert ref.insertion_loss_db(-7.20, -9.65) == pytest.approx(2.45, abs=1e-9)


def test_bidirectional_average() -> None:
    # Hand computation: (2.40 + 2.60) / 2 = 2.50 dB.
    assert ref.bidirectional_average_db(2.40, 2.60) == pytest.approx(2.50, abs=1e-12)
    verdict = ref.judge_fibre({"A->B": 2.40, "B->A": 2.60}, 3.0)
    assert verdict.average_db == pytest.approx(2.50, abs=1e-12)
    assert verdict.margin_db == pytest.approx(0.40, abs=1e-9)  # worst direction: 3.0 − 2.6


# -- limits ------------------------------------------------------------------------------------


# Hand computation: a budget of 3.75 dB counting both end connections at 0.75 dB each
# (TIA-568.3-D: 0.75 dB max per mated pair, from memory). One-cord keeps both: 3.75 dB;
# two-cord drops one: 3.00 dB; three-cord drops both: 2.25 dB.
@pytest.mark.parametrize(
    ("method", "limit_db"),
    [(Method.ONE_CORD, 3.75), (Method.TWO_CORD, 3.00), (Method.THREE_CORD, 2.25)],
)
def test_budget_limit_counts_the_end_connections_of_the_method(
    method: Method, limit_db: float
) -> None:
    assert ref.method_limit_db(3.75, 0.75, method) == pytest.approx(limit_db, abs=1e-9)


def test_budget_limit_refuses_a_budget_without_the_end_connections() -> None:
    with pytest.raises(InputError, match="includes 2"):
        ref.method_limit_db(3.0, 0.75, Method.ONE_CORD, end_connections_in_budget=1)
    with pytest.raises(InputError, match="negative"):
        ref.method_limit_db(1.0, 0.75, Method.THREE_CORD)


def test_typed_limits() -> None:
    assert ref.loss_limit_db("3.5") == pytest.approx(3.5, abs=1e-12)
    assert ref.loss_limit_db("2,5 dB") == pytest.approx(2.5, abs=1e-12)
    for bad in ("-1", "3 dBm", "x"):
        with pytest.raises(InputError, match="limit"):
            ref.loss_limit_db(bad)


def test_pass_and_fail_with_margin() -> None:
    good = ref.judge(2.1, 3.0)
    assert good.status is Status.PASS and good.passed is True
    assert good.margin_db == pytest.approx(0.9, abs=1e-9)  # 3.0 − 2.1
    bad = ref.judge(3.4, 3.0)
    assert bad.status is Status.FAIL and bad.passed is False
    assert bad.margin_db == pytest.approx(-0.4, abs=1e-9)  # 3.0 − 3.4
    at_limit = ref.judge(3.0, 3.0)
    assert at_limit.passed is True
    unjudged = ref.judge(2.0, None)
    assert unjudged.status is Status.NO_LIMIT and unjudged.passed is None


def test_negative_loss_is_a_reference_problem_never_a_pass() -> None:
    verdict = ref.judge(-0.3, 3.0)
    assert verdict.status is Status.REFERENCE_PROBLEM
    assert verdict.passed is None and verdict.margin_db is None
    assert ref.NEGATIVE_LOSS in verdict.flags
    assert "reference" in verdict.warnings[0] and "Clean" in verdict.warnings[0]
    fibre = ref.judge_fibre({"A->B": 1.2, "B->A": -0.1}, 3.0)
    assert fibre.status is Status.REFERENCE_PROBLEM and fibre.passed is None


def test_one_failing_direction_fails_the_fibre() -> None:
    fibre = ref.judge_fibre({"A->B": 2.9, "B->A": 3.2}, 3.0)
    assert fibre.status is Status.FAIL
    assert fibre.average_db == pytest.approx(3.05, abs=1e-9)


def test_directions_far_apart_warn() -> None:
    # DIRECTION_SPREAD_DB = 0.5 dB (common practice): 1.0 vs 1.8 differ by 0.8 dB.
    assert any(
        "differ by 0.80 dB" in w for w in ref.judge_fibre({"A->B": 1.0, "B->A": 1.8}, 3.0).warnings
    )
    assert not ref.judge_fibre({"A->B": 1.0, "B->A": 1.3}, 3.0).warnings


def test_bad_direction_is_refused() -> None:
    with pytest.raises(InputError, match="direction"):
        ref.judge_fibre({"A-B": 1.0}, None)


# -- drift ---------------------------------------------------------------------------------------


def test_drift_is_recheck_minus_initial() -> None:
    # Common practice tolerance: 0.1 dB single-mode (1310 nm), 0.2 dB multimode (850 nm).
    assert ref.default_drift_tolerance_db(1310) == pytest.approx(0.1, abs=1e-12)
    assert ref.default_drift_tolerance_db(1550) == pytest.approx(0.1, abs=1e-12)
    assert ref.default_drift_tolerance_db(850) == pytest.approx(0.2, abs=1e-12)
    assert ref.default_drift_tolerance_db(1300) == pytest.approx(0.2, abs=1e-12)
    # Hand computation: -7.35 − (-7.20) = -0.15 dB: beyond 0.1 dB, within 0.2 dB.
    drift = ref.reference_drift(-7.20, -7.35, 0.1)
    assert drift.drift_db == pytest.approx(-0.15, abs=1e-9)
    assert not drift.within and "in doubt" in drift.message
    assert ref.reference_drift(-7.20, -7.35, 0.2).within
    # Exactly at the tolerance counts as within (-7.0 → -7.1 is 0.0999… in floating point).
    assert ref.reference_drift(-7.0, -7.1, 0.1).within
    assert ref.reference_drift(-7.0, -6.85, 0.1).drift_db == pytest.approx(0.15, abs=1e-9)
    with pytest.raises(InputError, match="tolerance"):
        ref.reference_drift(-7.0, -7.0, -0.1)


@dataclass
class _Result:
    id: str
    reference_id: str | None
    at: datetime


def test_results_since_the_last_good_reference_are_in_doubt() -> None:
    t0 = datetime(2026, 3, 1, 8, 0, tzinfo=UTC)
    results = [
        _Result("early", "R1", t0 + timedelta(minutes=5)),  # before the last good check
        _Result("late", "R1", t0 + timedelta(hours=2)),
        _Result("other", "R2", t0 + timedelta(hours=2)),  # another reference
        _Result("none", None, t0 + timedelta(hours=2)),
    ]
    last_good = t0 + timedelta(hours=1)
    assert ref.results_in_doubt(results, ["R1"], last_good) == ["late"]
    assert ref.results_in_doubt(results, ["R1"], t0) == ["early", "late"]


# -- plausibility ----------------------------------------------------------------------------


def test_reference_far_below_the_source_warns_with_what_to_check() -> None:
    # Typical single-mode laser source -7 dBm (common practice); -12.4 dBm is 5.4 dB below.
    warnings = ref.reference_warnings(-12.4, wavelength_nm=1310)
    assert len(warnings) == 1
    assert "5.4 dB below" in warnings[0]
    for what in ("clean", "inspect", "meter port", "reseat", "replace the cord"):
        assert what in warnings[0]
    # -8.0 dBm is 1 dB below: plausible.
    assert ref.reference_warnings(-8.0, wavelength_nm=1550) == []
    # An edited source figure: 0 dBm source, -4 dBm reference is 4 dB below.
    assert ref.reference_warnings(-4.0, source_dbm=0.0, wavelength_nm=1310)
    assert not ref.reference_warnings(-4.0, source_dbm=-3.0, wavelength_nm=1310)


def test_multimode_reference_asks_for_the_launch_condition() -> None:
    # Typical multimode LED source -20 dBm (common practice): -20.5 dBm is plausible.
    warnings = ref.reference_warnings(-20.5, wavelength_nm=850)
    assert len(warnings) == 1 and "encircled-flux" in warnings[0]
    assert ref.reference_warnings(-20.5, wavelength_nm=850, launch_condition="encircled flux") == []


# -- summary ---------------------------------------------------------------------------------


def test_summary_counts_and_worst_fibre() -> None:
    readings = [
        (1, 1310.0, "A->B", 1.0),
        (1, 1310.0, "B->A", 1.2),
        (2, 1310.0, "A->B", 3.4),  # fails 3.0
        (3, 1310.0, "A->B", -0.2),  # reference problem
        (1, 1550.0, "A->B", 0.8),
    ]
    by_wavelength = ref.summarise(readings, {1310.0: 3.0, 1550.0: None})
    s1310, s1550 = by_wavelength
    assert (s1310.fibres, s1310.passed, s1310.failed, s1310.reference_problems) == (3, 1, 1, 1)
    assert s1310.worst_fibre == 2 and s1310.worst_loss_db == pytest.approx(3.4, abs=1e-12)
    assert [f for f, _ in s1310.worst] == [2, 1, 3]
    assert s1550.no_limit == 1 and s1550.worst_fibre == 1
