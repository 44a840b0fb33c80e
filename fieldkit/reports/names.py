"""Export file names from the job's name and date: ``backbone-repair_2026-03-14.html``.

A name is one file name, never a path: letters and digits (any script) are kept, every other
run of characters becomes one ``-``, a leading dot or dash is dropped (no hidden file, no
``..``, no option-looking name), names reserved on Windows get ``-job`` appended, and the stem
is cut to 60 characters. A name already taken in the folder gets ``-2``, ``-3`` ...
"""

from __future__ import annotations

import re
import unicodedata
from datetime import date
from pathlib import Path

#: Names Windows refuses for a file whatever the extension (a report may be copied there).
_RESERVED = (
    {"con", "prn", "aux", "nul"}
    | {f"com{i}" for i in range(1, 10)}
    | {f"lpt{i}" for i in range(1, 10)}
)
MAX_STEM = 60


def slug(text: str, fallback: str = "job") -> str:
    """``text`` as a safe piece of a file name (``Feed repair / Nord`` -> ``Feed-repair-Nord``)."""
    text = unicodedata.normalize("NFC", text)
    kept = "".join(ch if ch.isalnum() else "-" for ch in text)
    kept = re.sub(r"-{2,}", "-", kept).strip("-._ ")
    kept = kept[:MAX_STEM].rstrip("-")
    if not kept:
        return fallback
    if kept.casefold() in _RESERVED:
        kept += "-job"
    return kept


def file_name(stem: str, on: date | None, fmt: str) -> str:
    """``<slug>_<date>.<fmt>`` (no date part when ``on`` is None)."""
    suffix = {"csv": "csv", "md": "md", "html": "html", "json": "json"}[fmt]
    day = f"_{on.isoformat()}" if on is not None else ""
    return f"{slug(stem)}{day}.{suffix}"


def free_name(folder: Path, name: str) -> Path:
    """``folder / name``, or with ``-2``, ``-3`` ... before the suffix when that is taken."""
    target = folder / name
    if not target.exists() and not target.is_symlink():
        return target
    stem, dot, suffix = name.rpartition(".")
    for n in range(2, 10_000):
        candidate = folder / f"{stem}-{n}{dot}{suffix}"
        if not candidate.exists() and not candidate.is_symlink():
            return candidate
    raise FileExistsError(f"{folder}: too many files named like {name}")
