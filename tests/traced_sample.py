"""A job with hand-made OTDR trace records on a link (schema 5), for the tests of what
``fieldkit jobs show`` and the Jobs workspace say about kept traces."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta
from pathlib import Path

from fieldkit.jobs.models import Job, TraceEventRow, TraceRecord
from fieldkit.jobs.store import JobStore

T0 = datetime(2026, 3, 10, 9, 0, tzinfo=UTC)


def ev(number: int, at: float, kind: str, verdict: str = "pass", **kw: float) -> TraceEventRow:
    return TraceEventRow(number=number, distance_m=at, kind=kind, verdict=verdict, **kw)  # type: ignore[arg-type]


def traced_records() -> list[TraceRecord]:
    """Hand-made records of link FEED (the numbers are the test's own, chosen so each rule
    decides something):

    - 1550 nm, fibre 1, both directions: a connector at 35 m (one way A->B 0.90 dB, the other
      way -0.50 dB, averaged 0.20 dB: the one-way figure is not the loss, ITU-T G.650.3), a splice
      at 2100 m of 0.35 dB averaged that fails its 0.30 dB limit, the end;
    - an earlier save of that fibre at 1550 nm, superseded, with a 2.00 dB failing splice that
      must count for nothing but history;
    - 1550 nm, fibre 2, both directions: a 0.05 dB splice, a connector reflecting -42 dB, the end;
    - 1310 nm, fibre 1, A->B only: a 0.12 dB splice, the end.
    """
    old = TraceRecord(
        at=T0,
        fibre=1,
        wavelength_nm=1550,
        direction="A<->B",
        events=[ev(1, 2100, "splice", "fail", average_db=2.0, limit_db=0.3)],
    )
    new = TraceRecord(
        at=T0 + timedelta(hours=1),
        fibre=1,
        wavelength_nm=1550,
        direction="A<->B",
        events=[
            ev(
                1,
                35,
                "reflective",
                loss_ab_db=0.9,
                loss_ba_db=-0.5,
                average_db=0.2,
                reflectance_db=-48.0,
            ),
            ev(
                2,
                2100,
                "splice",
                "fail",
                loss_ab_db=0.3,
                loss_ba_db=0.4,
                average_db=0.35,
                limit_db=0.3,
            ),
            ev(3, 8000, "end", "no limit"),
        ],
    )
    old.superseded_at, old.superseded_by = new.at, new.id
    two = TraceRecord(
        at=T0 + timedelta(hours=1),
        fibre=2,
        wavelength_nm=1550,
        direction="A<->B",
        events=[
            ev(1, 35, "reflective", average_db=0.1, reflectance_db=-42.0),
            ev(2, 2100, "splice", average_db=0.05),
            ev(3, 8000, "end", "no limit"),
        ],
    )
    one_way = TraceRecord(
        at=T0 + timedelta(hours=2),
        fibre=1,
        wavelength_nm=1310,
        direction="A->B",
        events=[ev(1, 2100, "splice", loss_db=0.12), ev(2, 8000, "end", "no limit")],
    )
    return [old, new, two, one_way]


def traced_job(data: Path) -> str:
    """The job "Mill Lane feeder" with link FEED holding :func:`traced_records` and an
    untraced link SPARE, saved under ``data`` (its jobs folder ``data/jobs``); its id."""
    store = JobStore(data / "jobs")
    job_id = store.create("Mill Lane feeder").id

    def add(job: Job) -> None:
        job.add_link("FEED").traces.extend(traced_records())
        job.add_link("SPARE")

    store.update(job_id, add)
    return job_id
