"""Every test runs with its own empty data and config folders, never the developer's."""

from __future__ import annotations

from pathlib import Path

import pytest


@pytest.fixture(autouse=True)
def isolated_dirs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> dict[str, Path]:
    data = tmp_path / "data"
    config = tmp_path / "config"
    home = tmp_path / "home"
    home.mkdir()
    monkeypatch.setenv("FIELDKIT_DATA_DIR", str(data))
    monkeypatch.setenv("FIELDKIT_CONFIG_DIR", str(config))
    monkeypatch.setenv("HOME", str(home))
    monkeypatch.setenv("XDG_DATA_HOME", str(home / ".local" / "share"))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(home / ".config"))
    monkeypatch.delenv("FIELDKIT_OPERATOR", raising=False)
    return {"data": data, "config": config, "home": home}


def pytest_configure(config: pytest.Config) -> None:
    """No Textual animations in tests: a page scroll or a smooth move lands at once, so a Pilot
    test reads where things end without waiting out the animation (the Help tests, which
    page through the whole page, took 35 s with them and 15 s without). Textual reads
    $TEXTUAL_ANIMATIONS when it is first imported (a pytest plugin imports it before this
    runs), so its constant is set too; every app takes it as its ``animation_level``."""
    import os

    import textual.constants

    os.environ.setdefault("TEXTUAL_ANIMATIONS", "none")
    textual.constants.TEXTUAL_ANIMATIONS = "none"  # type: ignore[misc]

    # Pilot waits end when the app has handled a key, not after 20 ms idle sleeps.
    import pilot_settle

    pilot_settle.install()
