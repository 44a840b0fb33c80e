"""Where fieldkit keeps its files. Nothing is created at import time."""

from __future__ import annotations

import os
from pathlib import Path

APP_NAME = "fieldkit"


def data_dir(override: str | os.PathLike[str] | None = None) -> Path:
    """The data folder: ``override``, else ``$FIELDKIT_DATA_DIR``, else the platformdirs one."""
    if override:
        return Path(override).expanduser()
    env = os.environ.get("FIELDKIT_DATA_DIR")
    if env:
        return Path(env).expanduser()
    import platformdirs

    return platformdirs.user_data_path(APP_NAME, appauthor=False)


def config_dir(override: str | os.PathLike[str] | None = None) -> Path:
    """The config folder: ``override``, else ``$FIELDKIT_CONFIG_DIR``, else the platformdirs one."""
    if override:
        return Path(override).expanduser()
    env = os.environ.get("FIELDKIT_CONFIG_DIR")
    if env:
        return Path(env).expanduser()
    import platformdirs

    return platformdirs.user_config_path(APP_NAME, appauthor=False)


def jobs_dir(data: Path) -> Path:
    """The folder of job files inside a data folder."""
    return data / "jobs"


def user_presets_dir(config: Path) -> Path:
    """The folder of the user's own preset files inside a config folder."""
    return config / "presets"
