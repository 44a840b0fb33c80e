"""Listing and finding jobs as the folder grows: a settled listing is given again until the
folder or its index changes, the index keeps the list's order, and the finder that narrows as
the filter is typed answers exactly as ``filter_summaries`` does."""

from __future__ import annotations

import json
import os
from datetime import date
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit.jobs import index as index_module
from fieldkit.jobs import store as store_module
from fieldkit.jobs.index import JobSummary
from fieldkit.jobs.search import JobFinder, filter_summaries
from fieldkit.jobs.store import JobStore


def _settle(store: JobStore) -> None:
    store.list()  # makes the index folder (that changes the jobs folder's mtime once)
    past = store.jobs_dir.stat().st_mtime - 10
    os.utime(store.jobs_dir, (past, past))  # nothing renamed into the folder for 10 s
    store.list()


@pytest.fixture
def store(tmp_path: Path) -> JobStore:
    store = JobStore(tmp_path / "jobs")
    for name in ("Station Road spur", "Mill Lane", "Wrenfield ring"):
        store.create(name)
    _settle(store)
    return store


def test_a_settled_listing_is_given_again_without_reading_the_index(
    store: JobStore, monkeypatch: pytest.MonkeyPatch
) -> None:
    reads = []
    real = store_module.read_index
    monkeypatch.setattr(store_module, "read_index", lambda path: reads.append(1) or real(path))
    first = store.list()
    again = store.list()
    assert reads == [] and [s.id for s in again] == [s.id for s in first]
    again.clear()  # each caller gets its own list
    assert len(store.list()) == 3


def test_a_save_or_a_rewritten_index_ends_the_remembered_listing(store: JobStore) -> None:
    job_id = store.list()[-1].id
    store.update(job_id, lambda j: setattr(j, "name", "Renamed") or None)
    assert store.list()[0].name == "Renamed"  # the newest update comes first
    _settle(store)
    data = json.loads(store.index_path.read_text())
    data["entries"][job_id][3][1] = "only in the index"
    store.index_path.write_text(json.dumps(data))  # another copy of fieldkit rewrote it
    assert store.list()[0].name == "only in the index"


def test_the_index_keeps_the_list_order_and_an_older_index_is_sorted(store: JobStore) -> None:
    listed = [s.id for s in store.list()]
    data = json.loads(store.index_path.read_text())
    assert list(data["entries"]) == listed and data["order"] == index_module.NEWEST_FIRST
    # An index written before the order was kept: the same listing, sorted on reading.
    data["entries"] = dict(reversed(data["entries"].items()))
    data["order"] = None
    store.index_path.write_text(json.dumps(data))
    assert [s.id for s in JobStore(store.jobs_dir).list()] == listed


def _summary(i: int, name: str, status: str, day: int) -> JobSummary:
    stamp = f"2026-03-{day:02d}T12:00:00.000000+00:00"
    return JobSummary(
        f"{i:016x}", name, "Town council", "Station Road", ["Ana"], status,
        stamp, stamp, 1, 1, 0, 0, 0, None, ["L1"],
    )  # fmt: skip


SUMMARIES = [
    _summary(i, name, ("open", "done")[i % 2], 1 + i % 3)
    for i, name in enumerate(
        ["Wrenfield ring", "Wren Street", "Mill Lane", "Station Road spur", "Wrenfield 12", "Ab"]
    )
]
TEXTS = st.lists(
    st.sampled_from(["w", "wr", "wren", "wren ", "wrenf", "wren 1", "1", "mill", "  ", "", "zz"])
    | st.sampled_from(["2026-03-01", "wren 2026-03-02", "2026-03-0", "station r", "ANA"]),
    max_size=12,
)


@settings(max_examples=150, deadline=None)
@given(TEXTS, st.sampled_from([None, "open", "done"]), st.sampled_from([None, date(2026, 3, 2)]))
def test_the_finder_answers_as_filter_summaries_while_typing(
    texts: list[str], status: str | None, on_date: date | None
) -> None:
    finder = JobFinder(SUMMARIES)
    for text in texts:
        expected = filter_summaries(SUMMARIES, text, status, on_date)
        assert finder.find(text, status, on_date) == expected, text


def test_the_finder_narrows_from_the_last_answer(monkeypatch: pytest.MonkeyPatch) -> None:
    finder = JobFinder(SUMMARIES)
    looked_at: list[int] = []
    real = filter_summaries

    def counting(summaries: list[JobSummary], *args: object) -> list[JobSummary]:
        looked_at.append(len(summaries))
        return real(summaries, *args)  # type: ignore[arg-type]

    monkeypatch.setattr("fieldkit.jobs.search.filter_summaries", counting)
    finder.find("w")
    finder.find("wren")
    finder.find("wrenf")
    finder.find("wren")  # a backspace: answered from memory
    # the whole list (6), then what "w" matched (all 6: "Town council" has a w), then only
    # what "wren" matched (3: Wrenfield ring, Wren Street, Wrenfield 12)
    assert looked_at == [6, 6, 3]
