"""The calculation core imports without the UI, and nothing is created at import time."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path


def test_calc_and_jobs_import_without_textual(tmp_path: Path) -> None:
    code = (
        "import importlib, json, pkgutil, sys\n"
        "import fieldkit.calc\n"
        "for m in pkgutil.iter_modules(fieldkit.calc.__path__):\n"
        "    importlib.import_module('fieldkit.calc.' + m.name)\n"
        "try:\n"
        "    import fieldkit.jobs\n"
        "    for m in pkgutil.iter_modules(fieldkit.jobs.__path__):\n"
        "        importlib.import_module('fieldkit.jobs.' + m.name)\n"
        "except ModuleNotFoundError:\n"
        "    pass\n"
        "print(json.dumps({'textual': 'textual' in sys.modules, 'pint': 'pint' in sys.modules}))\n"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, cwd=tmp_path, timeout=60
    )
    assert result.returncode == 0, result.stderr
    loaded = json.loads(result.stdout)
    assert loaded["textual"] is False
    assert loaded["pint"] is False  # the registry is built lazily, on first use


def test_importing_the_app_creates_no_folders(tmp_path: Path) -> None:
    env_dirs = {
        "FIELDKIT_DATA_DIR": str(tmp_path / "d"),
        "FIELDKIT_CONFIG_DIR": str(tmp_path / "c"),
    }
    code = "import fieldkit.cli, fieldkit.tui.app; fieldkit.cli.build_parser()"
    import os

    result = subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        env={**os.environ, **env_dirs},
        timeout=60,
    )
    assert result.returncode == 0, result.stderr
    assert not (tmp_path / "d").exists()
    assert not (tmp_path / "c").exists()


def test_presets_help_lists_every_kind() -> None:
    from fieldkit.cli import build_parser
    from fieldkit.presets import KINDS

    parser = build_parser()
    action = next(a for a in parser._subparsers._actions if a.dest == "command")  # type: ignore[union-attr]
    description = action.choices["presets"].description
    assert all(kind in description for kind in KINDS)


def test_cli_start_does_not_load_presets_or_jobs() -> None:
    code = (
        "import sys, fieldkit.cli; fieldkit.cli.build_parser(); "
        "print(sorted(m for m in ('fieldkit.presets', 'fieldkit.jobs.store', 'pydantic', 'pint') "
        "if m in sys.modules))"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=60
    )
    assert result.returncode == 0, result.stderr
    assert result.stdout.strip() == "[]"
