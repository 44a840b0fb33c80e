"""What the Jobs workspace prints from a job record (fieldkit.tui.jobs_view). No Textual here."""

from __future__ import annotations

import time
from collections.abc import Iterator
from datetime import UTC, datetime

import pytest

from fieldkit.jobs.models import Job, Note
from fieldkit.text.layout import NBSP
from fieldkit.tui import jobs_view


@pytest.fixture(autouse=True)
def utc(monkeypatch: pytest.MonkeyPatch) -> Iterator[None]:
    """Times are shown in the local zone: UTC here."""
    monkeypatch.setenv("TZ", "UTC")
    time.tzset()
    yield
    monkeypatch.undo()
    time.tzset()


def test_a_note_says_when_and_who_in_one_run_of_text() -> None:
    # Split in two runs, the space after "UTC" began the second one and was dropped where the
    # picture is drawn run by run ("15:36 UTCPriya Nair" in the snapshot's PNG).
    job = Job(
        id="0" * 16,
        name="job",
        notes=[Note(at=datetime(2026, 3, 10, 15, 36, tzinfo=UTC), by="Priya Nair", text="ok")],
    )
    text = jobs_view.notes_text(job).text  # type: ignore[union-attr]
    line = text.plain.split("\n")[2].replace(NBSP, " ")
    assert line == "2026-03-10 15:36 UTC Priya Nair"
    start = text.plain.index("2026")
    (run,) = [s for s in text.spans if s.start <= start < s.end]
    assert text.plain[run.start : run.end].endswith("Priya Nair")


def test_a_note_without_a_name_is_its_time_alone() -> None:
    job = Job(
        id="0" * 16,
        name="job",
        notes=[Note(at=datetime(2026, 3, 10, 15, 36, tzinfo=UTC), text="ok")],
    )
    line = jobs_view.notes_text(job).text.plain.split("\n")[2]  # type: ignore[union-attr]
    assert line.replace(NBSP, " ") == "2026-03-10 15:36 UTC"
