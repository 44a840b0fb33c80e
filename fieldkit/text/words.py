"""Small wording helpers shared by the CLI, the reports and the workspaces (no records here, so
the job list can use them before the records are imported)."""

from __future__ import annotations

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
