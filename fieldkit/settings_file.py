"""The settings file itself: read it whole, merge changes into it (``fieldkit.settings`` holds
what the settings mean and re-exports these).

Apart so that the UI reads the saved theme before its first frame without building the report
settings' record classes (a hundredth of the start-up).
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from fieldkit.fsutil import atomic_write_bytes, read_regular

FILE_NAME = "settings.json"


def load(config: Path) -> dict[str, Any]:
    """The saved settings; an unreadable file gives the defaults (it is left in place)."""
    try:
        # a regular file of at most 64 KiB: a FIFO or a device here must not hang the start
        data = json.loads(read_regular(config / FILE_NAME, 64 * 1024).decode("utf-8"))
    except (OSError, ValueError, RecursionError):
        return {}
    return data if isinstance(data, dict) else {}


def save(config: Path, **changes: Any) -> None:
    """Merge ``changes`` into the saved settings, atomically."""
    data = load(config)
    data.update(changes)
    atomic_write_bytes(config / FILE_NAME, json.dumps(data, indent=2).encode("utf-8"))
