"""``fieldkit convert`` and ``fieldkit levels`` as a user runs them (in-process: cli_runner.py)."""

from __future__ import annotations

import json
import subprocess

import cli_runner
import pytest


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return cli_runner.run(*args)


@pytest.mark.parametrize(
    ("args", "value", "unit", "tol"),
    [
        # 10^(-0.35) mW = 446.684 µW (ITU-R V.574 definition of dBm, by hand)
        (("convert", "-3.5 dBm", "--to", "uW"), 446.6835922, "µW", 1e-6),
        # 0.35 × 0.3048 (international foot) = 0.10668 dB/kft
        (("convert", "0.35 dB/km", "--to", "dB/kft"), 0.10668, "dB/kft", 1e-12),
        # 299792458 / 1550e-9 / 1e12 (c exact, BIPM)
        (("convert", "1550 nm", "--to", "THz"), 193.414489, "THz", 1e-6),
        (("convert", "250 µW", "--to", "dBm"), -6.0205999, "dBm", 1e-6),
        (("convert", "−7,5 dBm", "--to", "dBm"), -7.5, "dBm", 0),
    ],
)
def test_convert_json(args: tuple[str, ...], value: float, unit: str, tol: float) -> None:
    result = run(*args, "--json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["value"] == pytest.approx(value, abs=tol)
    assert data["unit"] == unit


def test_convert_text_and_all_units() -> None:
    result = run("convert", "-3.5 dBm", "--to", "uW")
    assert result.returncode == 0
    # 10^(-0.35) mW = 446.6836 µW (by hand), at the 6 significant figures the workspace shows
    assert result.stdout.strip() == "446.684 µW"
    result = run("convert", "0 dBm", "--json")
    data = json.loads(result.stdout)
    units = [row["unit"] for row in data["values"]]
    assert units == ["dBm", "dBW", "W", "mW", "µW", "nW"]
    assert data["values"][3]["value"] == pytest.approx(1.0)


def test_grid_channel() -> None:
    result = run("convert", "1550.12 nm", "--grid", "--json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    # G.694.1: 193.4 THz = 193.1 + 3 × 0.1 THz
    assert data["dwdm"][0] == pytest.approx(
        {
            "spacing_ghz": 100.0,
            "n": 3,
            "frequency_thz": 193.4,
            "wavelength_nm": 1550.116,
            "offset_ghz": -0.48,
        },
        abs=0.01,
    )
    assert data["cwdm"]["wavelength_nm"] == 1551.0  # G.694.2
    text = run("convert", "193.1 THz", "--grid").stdout
    assert "n=+0 193.100 THz" in text  # G.694.1: n counts from 193.1 THz


@pytest.mark.parametrize(
    ("args", "phrase"),
    [
        (("convert", "5 km", "--to", "dBm"), "length is not an optical power"),
        (("convert", "nan", "--to", "dBm"), "NaN"),
        (("convert", "", "--to", "dBm"), "empty"),
        (("convert", "0 mW", "--to", "dBm"), "logarithm"),
        (("convert", "2 MW", "--to", "dBm"), "mW"),
        (("convert", "1,234 dBm"), "ambiguous"),
        (("convert", "-3 dBm", "--to", "parsec"), "unknown unit"),
        (("convert", "-3 dBm", "--grid"), "not a wavelength"),
        (("levels", "-3"), "two or more levels"),
        (("levels", "3 km", "-3"), "length"),
        (("convert",), "required"),
    ],
)
def test_bad_input_exit_2_one_line(args: tuple[str, ...], phrase: str) -> None:
    result = run(*args)
    assert result.returncode == 2
    assert phrase in result.stderr
    assert "Traceback" not in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1


def test_levels() -> None:
    data = json.loads(run("levels", "-3.2 dBm", "--loss", "4.5", "--json").stdout)
    assert data["level_dbm"] == pytest.approx(-7.7, abs=1e-12)
    # two equal levels: +10·log10(2) = +3.0103 dB
    data = json.loads(run("levels", "-3", "-3 dBm", "--json").stdout)
    assert data["sum_dbm"] == pytest.approx(0.0103, abs=1e-4)
    assert data["difference_db"] == 0


def test_version() -> None:
    from fieldkit import __version__

    result = run("--version")
    assert result.returncode == 0
    assert result.stdout.strip() == f"fieldkit {__version__}"
