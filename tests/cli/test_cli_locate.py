"""``fieldkit locate`` run as a user runs it (in-process, see cli_runner.py)."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import cli_runner
import pytest

from fieldkit import safety


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return cli_runner.run("locate", *args)


def run_json(*args: str) -> dict:
    result = run(*args, "--json")
    assert result.returncode == 0, result.stderr
    data: dict = json.loads(result.stdout)
    return data


def test_json_has_the_contract_keys() -> None:
    data = run_json("--distance", "3412 m", "--ior", "1.4677", "--helix", "0")
    for key in (
        "fiber_distance_m",
        "sheath_distance_m",
        "route_distance_m",
        "uncertainty_m",
        "nearest_landmark",
        "marking",
        "low_m",
        "high_m",
        "warnings",
        "cautions",
    ):
        assert key in data
    assert data["cautions"] == [safety.DIGGING, safety.DEFER]


def test_time_of_flight() -> None:
    # d = c·t/2n = 299 792 458 × 10 µs / (2 × 1.5) = 999.30819 m (c exact, BIPM SI)
    data = run_json("--time", "10 us", "--ior", "1.5")
    assert data["fiber_distance_m"] == pytest.approx(999.308193, abs=1e-5)


def test_rescale_helix_and_fibre_preset() -> None:
    # shown 3.412 km with the OTDR at 1.4700; the G.652.D preset's 1.4677 at 1550 nm (typical,
    # from memory in the preset): 3412 × 1.47 / 1.4677 = 3417.3469 m of fibre;
    # helix 1.5 %: sheath 3417.3469 / 1.015 = 3366.8442 m
    data = run_json(
        "--distance",
        "3.412 km",
        "--ior-set",
        "1.47",
        "--fibre-type",
        "G.652.D",
        "--wavelength",
        "1550",
        "--helix",
        "1.5",
    )
    assert data["group_index"] == pytest.approx(1.4677, abs=1e-9)
    assert data["fiber_distance_m"] == pytest.approx(3417.3469, abs=1e-3)
    assert data["sheath_distance_m"] == pytest.approx(3366.8442, abs=1e-3)
    assert data["low_m"] < data["route_distance_m"] < data["high_m"]


def test_cable_preset_gives_helix_and_its_uncertainty() -> None:
    data = run_json("--distance", "1000 m", "--ior", "1.468", "--cable", "drop cable")
    # drop cable preset: 0.1 ± 0.1 % (common practice): sheath 1000 / 1.001 = 999.0010 m
    assert data["helix_percent"] == pytest.approx(0.1, abs=1e-12)
    assert data["sheath_distance_m"] == pytest.approx(999.0010, abs=1e-3)
    assert any(t["name"] == "helix" for t in data["terms"])


def test_landmarks_slack_and_marking() -> None:
    # fault 2800 m between closure 6 (2000 m OTDR / 1950 m route) and closure 7 (3400 / 3330),
    # a 20 m loop at 2500 m: fibre per sheath 1400 / (3350 − 1950) = 1; sheath 1950 + 800 =
    # 2750 m; route 2750 − 20 = 2730 m. Closure 6 is 2730 − 1950 = 780 m back, closure 7
    # 3330 − 2730 = 600 m ahead: the nearest is 600 m before closure 7.
    # marking 10 000 m counting down: 10 000 − 2750 = 7250
    data = run_json(
        "--distance",
        "2800 m",
        "--ior",
        "1.4677",
        "--landmark",
        "closure 6:2000:1950",
        "--landmark",
        "closure 7:3.4 km:3330",
        "--slack",
        "2500:20",
        "--marking-start",
        "10000",
        "--marking-direction",
        "down",
    )
    assert data["route_distance_m"] == pytest.approx(2730.0, abs=1e-6)
    assert data["basis"] == "interpolated"
    assert data["nearest_landmark"] == "closure 7"
    assert data["offset_from_landmark_m"] == pytest.approx(-600.0, abs=1e-6)
    assert data["from_landmark"] == "600.0 m before closure 7"
    assert data["marking"]["value"] == pytest.approx(7250.0, abs=1e-6)


def test_two_ended_check() -> None:
    # 3412 + 1590 − 5000 = 2 m, within ±2 m (four 1 m terms, root-sum-square)
    data = run_json(
        "--distance",
        "3412 m",
        "--ior",
        "1.4677",
        "--helix",
        "0",
        "--from-b",
        "1590",
        "--total",
        "5000",
    )
    two = data["two_ended"]
    assert two["discrepancy_m"] == pytest.approx(2.0, abs=1e-9)
    assert two["consistent"] is True
    assert "route_distance_m" in two["combined"]


def test_text_output_in_feet_shows_range_and_cautions() -> None:
    result = run("--distance", "3048 m", "--ior", "1.468", "--helix", "0", "--unit", "ft")
    assert result.returncode == 0, result.stderr
    # 3048 m / 0.3048 m per ft = 10 000 ft (international foot, NIST SP 811)
    assert "10000 ft" in result.stdout
    assert "search   from " in result.stdout  # the workspace's own result lines
    assert "route    10000 ft" in result.stdout
    assert safety.DIGGING in result.stdout
    assert safety.DEFER in result.stdout


def test_list_cables() -> None:
    result = run("--list-cables")
    assert result.returncode == 0
    assert "stranded loose tube" in result.stdout


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("--distance", "-5", "--ior", "1.468"), "negative"),
        # a bare number is refused: OTDRs show km or m by range, 3.412 could be either
        (("--distance", "3.412", "--ior", "1.468"), "3.412 needs a unit"),
        (("--time=-2 us", "--ior", "1.468"), "more than zero"),
        (("--distance", "100 m", "--ior", "0.9"), "below 1"),
        (("--distance", "100 m", "--ior", "NaN"), "not a number"),
        (("--distance", "-3 dBm", "--ior", "1.468"), "optical power"),
        (("--distance", "100 m"), "group index"),
        (("--ior", "1.468"), "either --distance or --time"),
        (("--distance", "100 m", "--ior", "1.468", "--landmark", "x:3"), "NAME:OTDR_DISTANCE"),
        (("--distance", "100 m", "--ior", "1.468", "--from-b", "50"), "both --from-b and --total"),
        (
            ("--distance", "100 m", "--fibre-type", "OS2", "--wavelength", "850"),
            "no group index at 850",
        ),
        (("--distance", "100 m", "--ior", "1.468", "--cable", "none such"), "unknown cable"),
    ],
)
def test_bad_input_exits_2_with_one_line(args: tuple[str, ...], message: str) -> None:
    result = run(*args)
    assert result.returncode == 2
    assert message in result.stderr
    assert result.stderr.count("\n") == 1
    assert "Traceback" not in result.stderr


def test_saving_onto_a_job_link(tmp_path: Path) -> None:
    from fieldkit.jobs.store import JobStore

    data_dir = tmp_path / "d"
    store = JobStore(data_dir / "jobs")
    job = store.create("Cut on Main St", by="tester")
    data = run_json(
        "--distance",
        "2040 m",
        "--ior",
        "1.468",
        "--helix",
        "2",
        "--job",
        job.id[:8],
        "--link",
        "Span 4",
        "--by",
        "ana",
        "--data-dir",
        str(data_dir),
    )
    saved = data["saved"]
    assert saved["link_label"] == "Span 4"
    loaded = store.load(job.id)
    fault = loaded.link(saved["link_id"]).faults[0]
    # 2040 / 1.02 = 2000 m of sheath = route
    assert fault.route_distance_m == pytest.approx(2000.0, abs=1e-9)
    assert fault.by == "ana"
    assert fault.low_m < 2000.0 < fault.high_m
    assert fault.inputs["typed"]["distance"] == "2040 m"


def test_a_saved_fault_shows_in_the_job_export(tmp_path: Path) -> None:
    from fieldkit.jobs.store import JobStore

    data_dir = tmp_path / "d"
    job = JobStore(data_dir / "jobs").create("Reservoir feed")
    saved = run(
        "--distance",
        "2040 m",
        "--ior",
        "1.468",
        "--helix",
        "2",
        "--job",
        job.id,
        "--link",
        "Feed 1",
        "--data-dir",
        str(data_dir),
    )
    assert saved.returncode == 0, saved.stderr
    assert "Saved onto job" in saved.stdout
    export = subprocess.run(
        [
            sys.executable,
            "-m",
            "fieldkit",
            "jobs",
            "export",
            job.id,
            "--format",
            "md",
            "--data-dir",
            str(data_dir),
        ],
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert export.returncode == 0, export.stderr
    assert "Feed 1: located faults" in export.stdout
    # 2040 / 1.02 = 2000 m of route
    assert "| 2000.0 |" in export.stdout


def test_help_says_the_distance_needs_a_unit_as_the_refusal_does() -> None:
    # Review A7: the help said "a bare number is metres" while --distance 2040 is refused
    # (issue 13 item 8: an OTDR shows km or m by range, so 2040 alone is ambiguous).
    help_text = " ".join(run("--help").stdout.split())
    assert "a bare number is metres" not in help_text
    assert "--distance needs a unit" in help_text
    refused = run("--distance", "2040", "--ior", "1.4677")
    assert refused.returncode != 0 and "needs a unit" in refused.stderr


def test_text_digits_follow_the_uncertainty() -> None:
    # Review C28: "2009.9 m ± 30.2 m" claims a tenth of a metre of a ± 30 m reading. No helix
    # given: route 2040 / 1.015 = 2009.85 m, ± about 30 m (the unknown helix, 0–3 %): the ± to
    # one significant digit and the route to the same place (common practice).
    result = run("--distance", "2040 m", "--ior", "1.4677")
    assert result.returncode == 0, result.stderr
    assert "route    2010 m ± 30 m" in result.stdout
    assert "search   from 1970 to 2050 m" in result.stdout
    # no slack loop: the sheath is the route, said once, with why
    assert "sheath   same as route (no slack loop before it)" in result.stdout
    assert "2009.9" not in result.stdout
