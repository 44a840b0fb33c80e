"""The shipped presets travel in the wheel (as fieldkit/_presets) and load from it."""

from __future__ import annotations

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]


def test_presets_load_from_an_installed_wheel(tmp_path):
    wheel_dir = tmp_path / "wheel"
    build = subprocess.run(
        [
            sys.executable,
            "-m",
            "pip",
            "wheel",
            "--no-deps",
            "--no-build-isolation",
            "-q",
            "-w",
            str(wheel_dir),
            str(ROOT),
        ],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert build.returncode == 0, build.stderr
    wheel = next(wheel_dir.glob("fieldkit-*.whl"))
    with zipfile.ZipFile(wheel) as archive:
        assert "fieldkit/_presets/fibres.toml" in archive.namelist()
    venv = tmp_path / "venv"
    subprocess.run(
        [sys.executable, "-m", "venv", "--system-site-packages", "--without-pip", str(venv)],
        check=True,
        timeout=60,
    )
    python = venv / "bin" / "python"
    target = tmp_path / "site"
    with zipfile.ZipFile(wheel) as archive:
        archive.extractall(target)  # a wheel is a zip laid out for site-packages
    code = (
        "import sys; sys.path.insert(0, sys.argv[1]); "
        "import fieldkit.presets as p; lib = p.load_presets(); "
        "print(p.shipped_dir()); print(lib.fibres['G.652.D'].group_index(1310)); "
        "print(len(lib.problems))"
    )
    run = subprocess.run(
        [str(python), "-c", code, str(target)],
        capture_output=True,
        text=True,
        timeout=60,
        cwd=tmp_path,
    )
    assert run.returncode == 0, run.stderr
    folder, index, problems = run.stdout.split()
    assert folder == str(target / "fieldkit" / "_presets")
    assert float(index) == pytest.approx(1.467, abs=0.001)  # typical G.652 value (from memory)
    assert problems == "0"
