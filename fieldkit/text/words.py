"""Small wording helpers shared by the CLI, the reports and the workspaces (no records here, so
the job list can use them before the records are imported)."""

from __future__ import annotations

from collections.abc import Sequence
from datetime import UTC, datetime


def counted(count: int, one: str, many: str | None = None) -> str:
    """``count`` with the noun in the form that agrees: "1 failed result", "2 failed results".

    ``many`` is the plural when it is not ``one`` + "s".
    """
    return f"{count} {one if count == 1 else (many or one + 's')}"


def fmt_time(moment: datetime | None) -> str:
    """A stored time as the reports and the workspaces print it: UTC, to the minute."""
    if moment is None:
        return ""
    return moment.astimezone(UTC).strftime("%Y-%m-%d %H:%M UTC")


#: How many preset problems a warning names; the rest are counted.
PRESET_PROBLEMS_SHOWN = 3


def preset_problems(problems: Sequence[str], lead: str = "Preset problems") -> str | None:
    """The presets' problems (files or entries skipped) as one line, for the workspaces and the
    CLI alike: the first :data:`PRESET_PROBLEMS_SHOWN`, each on one line, how many more, and
    where the whole list is. None when the presets read cleanly."""
    if not problems:
        return None
    shown = "; ".join(" ".join(p.split()) for p in problems[:PRESET_PROBLEMS_SHOWN])
    rest = len(problems) - PRESET_PROBLEMS_SHOWN
    more = f" (and {rest} more)" if rest > 0 else ""
    return f"{lead}: {shown}{more}; 'fieldkit presets' lists them"
