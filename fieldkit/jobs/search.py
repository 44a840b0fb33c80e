"""Finding jobs in the list: words, a status, a day."""

from __future__ import annotations

import re
from datetime import date, datetime

from fieldkit.jobs.index import JobSummary


def filter_summaries(
    summaries: list[JobSummary],
    text: str = "",
    status: str | None = None,
    on_date: date | None = None,
) -> list[JobSummary]:
    """The summaries matching every given filter.

    ``text``: every word must appear in the id, name, customer, site, crew or a link label
    (case ignored); a word written YYYY-MM-DD is a date instead. ``status``: "open" or "done".
    ``on_date``: created or updated on that local date.
    """
    words = []
    for word in text.casefold().split():
        day = _as_date(word)
        if day is None:
            words.append(word)
        elif on_date is None:
            on_date = day
        elif on_date != day:
            return []
    out = summaries
    if status:
        out = [s for s in out if s.status == status]
    if on_date is not None:
        out = [
            s
            for s in out
            if local_date(s.created_at) == on_date or local_date(s.updated_at) == on_date
        ]
    for word in words:
        out = [s for s in out if word in s.search_text]
    return out


_DATE_RE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


def _as_date(word: str) -> date | None:
    if not _DATE_RE.match(word):
        return None
    try:
        return date.fromisoformat(word)
    except ValueError:
        return None


def local_date(moment: datetime) -> date:
    """The date of a stored (UTC) time in this computer's time zone."""
    return moment.astimezone().date()
