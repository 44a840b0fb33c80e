"""A handful of real subprocess runs: the console entry point, exit codes and streams as the
operating system sees them. Everything else runs in-process through ``cli_runner``."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest


def fieldkit(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "fieldkit", *args], capture_output=True, text=True, timeout=120
    )


def test_version_and_help_exit_zero() -> None:
    assert fieldkit("--version").stdout.startswith("fieldkit ")
    assert "COMMAND" in fieldkit("--help").stdout


def test_json_on_stdout_of_a_real_process() -> None:
    # ITU-R V.574: 0 dBm = 1 mW, so -3 dBm = 10^(-0.3) mW = 0.501187 mW (by hand)
    result = fieldkit("convert", "-3 dBm", "--to", "mW", "--json")
    assert result.returncode == 0, result.stderr
    assert json.loads(result.stdout)["value"] == pytest.approx(0.5011872, abs=1e-6)


def test_bad_input_exits_two_with_one_line_on_stderr() -> None:
    result = fieldkit("convert", "5 km", "--to", "mW")
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1


def test_jobs_round_trip_through_the_real_entry_point() -> None:
    made = fieldkit("jobs", "new", "Smoke test spur", "--json")
    assert made.returncode == 0, made.stderr
    listed = fieldkit("jobs", "list", "--json")
    assert listed.returncode == 0, listed.stderr
    assert "Smoke test spur" in listed.stdout
