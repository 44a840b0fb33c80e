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


class JobFinder:
    """:func:`filter_summaries` over one listing, as a filter is typed into it.

    Answers are remembered by their text, status and day. A text that only adds to a
    remembered one (the next letter, another word) is looked for among that answer's jobs
    rather than the whole listing, and a text typed before (after a backspace) is answered
    from memory, so a keystroke costs what its answer holds, not what the folder holds.
    Date words are matched against times, not text, so a text with one is looked for in the
    whole listing.
    """

    #: How many answers are remembered (the texts of one search, typed and erased).
    REMEMBER = 24

    def __init__(self, summaries: list[JobSummary]) -> None:
        self.summaries = summaries
        self._answers: dict[tuple[str, str | None, date | None], list[JobSummary]] = {}

    def find(
        self, text: str = "", status: str | None = None, on_date: date | None = None
    ) -> list[JobSummary]:
        words = text.casefold().split()
        key = (" ".join(words), status, on_date)
        answer = self._answers.get(key)
        if answer is not None:
            return answer
        among = self.summaries
        if not any(_as_date(word) for word in words):
            # Every word of an earlier text is in this one, or begins one of its words: what
            # matches this text matched that one.
            longest = -1
            for (earlier, s, d), found in self._answers.items():
                if (
                    s == status
                    and d == on_date
                    and len(earlier) > longest
                    and key[0].startswith(earlier)
                    and not any(_as_date(word) for word in earlier.split())
                ):
                    among, longest = found, len(earlier)
        answer = filter_summaries(among, key[0], status, on_date)
        if len(self._answers) >= self.REMEMBER:
            del self._answers[next(iter(self._answers))]
        self._answers[key] = answer
        return answer
