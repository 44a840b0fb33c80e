"""``fieldkit demo`` writes its data, then the entry point starts the UI on it (commands never
import the UI: see the layer contract in pyproject.toml)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import cli_runner
import pytest

import fieldkit.tui.app as tui_app


def test_demo_starts_the_ui_on_the_demo_folder(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    started: list[dict[str, Any]] = []

    class FakeApp:
        def run(self) -> None:
            started.append({"ran": True})

    def fake_make_app(**kwargs: Any) -> FakeApp:
        started.append(kwargs)
        return FakeApp()

    monkeypatch.setattr(tui_app, "make_app", fake_make_app)
    result = cli_runner.run("demo", "--data-dir", str(tmp_path / "demo-data"))
    assert result.returncode == 0, result.stderr
    assert started[0]["data_dir"] == tmp_path / "demo-data"
    assert started[0]["start_mode"] == "jobs"
    assert started[1] == {"ran": True}


def test_demo_with_no_ui_prints_the_folder_and_starts_nothing(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(tui_app, "make_app", lambda **kwargs: pytest.fail("UI started"))
    result = cli_runner.run("demo", "--no-ui", "--data-dir", str(tmp_path / "d"))
    assert result.returncode == 0, result.stderr
    assert result.stdout.strip() == str(tmp_path / "d")
