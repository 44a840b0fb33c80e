"""``fieldkit demo`` writes its data, then the entry point starts the UI on it (commands never
import the UI: see the layer contract in pyproject.toml)."""

from __future__ import annotations

import json
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


def test_the_demo_writes_trace_files_that_tell_its_story(tmp_path: Path) -> None:
    # the demo's fibre 7 fails at 1550 nm in the meter results and its JC-3 splice reads
    # 0.21 dB from A and 0.47 dB from B in the splice log: its trace pair must say the same,
    # and the backbone job's notes say where the files are
    from fieldkit.commands import demo
    from fieldkit.traces.demo import demo_trace_files

    assert tuple(demo_trace_files()) == demo.DEMO_TRACE_NAMES
    assert cli_runner.run("demo", "--no-ui", "--data-dir", str(tmp_path / "d")).returncode == 0
    folder = tmp_path / "d" / demo.TRACES_FOLDER
    assert sorted(p.name for p in folder.iterdir()) == sorted(demo.DEMO_TRACE_NAMES)
    shown = cli_runner.run(
        "trace", "pair", str(folder / "F07_1550_AB.sor"), str(folder / "F07_1550_BA.sor"), "--json"
    )
    assert shown.returncode == 0, shown.stderr
    events = json.loads(shown.stdout)["events"]
    splice = min(events, key=lambda e: abs(e["distance_m"] - 1162.0))
    # G.650.3 Appendix I: the average of the two one-way readings is the splice loss
    assert splice["loss_ab_db"] == pytest.approx(0.21, abs=0.03)
    assert splice["loss_ba_db"] == pytest.approx(0.47, abs=0.03)
    assert splice["average_db"] == pytest.approx(0.34, abs=0.02)
    note = cli_runner.run("jobs", "show", "de30000000000001", "--data-dir", str(tmp_path / "d"))
    assert "traces/LIB-TH-01" in note.stdout and str(tmp_path) not in note.stdout
