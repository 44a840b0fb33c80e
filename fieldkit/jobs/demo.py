"""An invented scenario for ``fieldkit demo``: a day's fibre work in the fictional town of
Wrenfield. Every place, person and customer here is made up.

Four jobs: a single-mode backbone with a budget, one-cord references, results at 1310 and
1550 nm (one fibre failing, a 1550 nm reference that drifted so later results are in doubt) and
splices; a multimode fit-out finished and passing; a reservoir feed with a located fault, the
repair splices and a retest with one fibre failing and one negative-loss reading; and a survey
with a link not yet tested.

Budgets are computed by fieldkit's own budget calculation from the shipped presets, so the
demo reads like real work and agrees with the budget workspace; the readings are invented.

The jobs have fixed ids, so regenerating the demo replaces its own files and nothing else.
"""

from __future__ import annotations

from collections.abc import Callable
from datetime import datetime, time, timedelta

from fieldkit.jobs.models import (
    FLAG_NEGATIVE_LOSS,
    FLAG_REFERENCE_IN_DOUBT,
    BudgetRecord,
    FaultRecord,
    Job,
    Link,
    LossResult,
    Note,
    ReferenceRecord,
)
from fieldkit.jobs.splices import Closure, Splice, SpliceCable, SpliceLimit, Tray

_TIA_FUSION = SpliceLimit(
    method="fusion",
    preset="fusion",
    loss_max_db=0.3,
    source="ANSI/TIA-568.3-D (2016) §7.3.5, 0.3 dB per splice (from memory)",
)

#: at(hours): a time that many hours after the start of the demo day.
_At = Callable[[float], datetime]

DEMO_IDS = ("de30000000000001", "de30000000000002", "de30000000000003", "de30000000000004")


def _budget(
    at: datetime,
    by: str,
    length_m: float,
    connectors: int,
    splices: int,
    margin_db: float,
    fibre: str,
) -> BudgetRecord:
    """A budget computed the way the budget workspace computes it, from the shipped presets,
    so a demo budget opened in the workspace shows the same numbers."""
    from fieldkit.jobs.budget_records import budget_record
    from fieldkit.linkspec import resolve
    from fieldkit.presets import load_presets

    spec: dict[str, object] = {
        "segments": [{"fibre": fibre, "length_m": length_m}],
        "connectors": {"count": connectors},
        "margin_db": margin_db,
    }
    if splices:
        spec["splices"] = [{"count": splices}]
    resolved = resolve(spec, load_presets(None))
    record = budget_record(resolved, resolved.evaluate(), by=by)
    record.computed_at = at
    return record


def build(day_start: datetime) -> list[Job]:
    """The demo jobs, timed on the local day beginning at ``day_start`` (timezone-aware)."""

    def at(hours: float) -> datetime:
        return day_start + timedelta(hours=hours)

    jobs = [_backbone(at), _fit_out(at), _reservoir(at), _survey(at)]
    for job, job_id in zip(jobs, DEMO_IDS, strict=True):
        job.id = job_id
    return jobs


def _backbone(at: _At) -> Job:
    ana, tomas = "Ana Ruiz", "Tomas Hale"
    link = Link(
        label="LIB-TH-01",
        end_a="Library comms room",
        end_b="Town Hall basement",
        fibre_type="OS2",
        length_m=1840.0,
        fibre_count=12,
    )
    link.budget = _budget(at(7.5), ana, 1840.0, 2, 4, 0.5, "OS2")
    ref1310 = ReferenceRecord(
        source_id="SRC-2",
        meter_id="PM-4",
        wavelength_nm=1310.0,
        level_dbm=-7.02,
        method="one-cord",
        cords=["TRC-11"],
        by=tomas,
        at=at(8.0),
    )
    ref1550 = ReferenceRecord(
        source_id="SRC-2",
        meter_id="PM-4",
        wavelength_nm=1550.0,
        level_dbm=-7.10,
        method="one-cord",
        cords=["TRC-11"],
        by=tomas,
        at=at(8.0),
        in_doubt_since=at(10.0),
    )
    recheck = ReferenceRecord(
        source_id="SRC-2",
        meter_id="PM-4",
        wavelength_nm=1550.0,
        level_dbm=-7.45,
        method="one-cord",
        cords=["TRC-11"],
        by=tomas,
        at=at(12.5),
        kind="recheck",
        drift_db=-0.35,
    )
    link.references = [ref1310, ref1550, recheck]
    losses_1310 = [1.62, 1.71, 1.58, 1.66, 1.80, 1.69, 1.74, 1.63, 1.59, 1.77, 1.68, 1.72]
    losses_1550 = [1.41, 1.49, 1.38, 1.45, 1.57, 1.47, 3.91, 1.40, 1.36, 1.52, 1.44, 1.50]
    for wavelength_nm, losses, ref, start in (
        (1310.0, losses_1310, ref1310, 8.25),
        (1550.0, losses_1550, ref1550, 9.25),
    ):
        budget_row = link.budget.at_wavelength(wavelength_nm)
        assert budget_row is not None
        limit_db = round(budget_row.loss_db, 2)
        for fibre, loss_db in enumerate(losses, start=1):
            when = at(start + fibre * 0.1)
            flags = (
                [FLAG_REFERENCE_IN_DOUBT]
                if (ref.in_doubt_since and when >= ref.in_doubt_since)
                else []
            )
            link.results.append(
                LossResult(
                    fibre=fibre,
                    wavelength_nm=wavelength_nm,
                    direction="A->B",
                    reading_dbm=round(ref.level_dbm - loss_db, 2),
                    loss_db=loss_db,
                    reference_id=ref.id,
                    method="one-cord",
                    limit_db=limit_db,
                    passed=loss_db <= limit_db,
                    flags=flags,
                    by=tomas,
                    at=when,
                )
            )
    link.splice_limits = [_TIA_FUSION.model_copy(update={"by": ana, "at": at(7.0)})]
    cables = [
        SpliceCable(name="Library", fibre_count=12, fibre_type="G.652.D", by=ana, at=at(7.0)),
        SpliceCable(name="Town Hall", fibre_count=12, fibre_type="G.657.A2", by=ana, at=at(7.0)),
    ]
    link.closures = [
        Closure(
            name="JC-3 Market Street",
            route_distance_m=1150.0,
            landmark="chamber JC-3 by the market cross",
            cables=cables,
            trays=[Tray(number=1, capacity=12, by=ana, at=at(7.0))],
            splices=[
                Splice(
                    cable_a="Library",
                    fibre_a=f,
                    cable_b="Town Hall",
                    fibre_b=f,
                    tray=1,
                    slot=f,
                    estimate_db=est,
                    loss_ab_db=ab,
                    loss_ba_db=ba,
                    wavelength_nm=1550.0,
                    by=ana,
                    at=at(7.0 + f * 0.02),
                )
                for f, est, ab, ba in zip(
                    range(1, 13),
                    [0.02, 0.03, 0.01, 0.02, 0.04, 0.02, 0.19, 0.03, 0.02, 0.01, 0.03, 0.02],
                    [-0.04, 0.01, -0.06, 0.00, 0.02, -0.03, 0.21, -0.01, 0.00, -0.05, 0.02, -0.02],
                    [0.10, 0.07, 0.10, 0.06, 0.08, 0.09, 0.47, 0.09, 0.06, 0.09, 0.06, 0.08],
                    strict=True,
                )
            ],
            by=ana,
            at=at(7.0),
        )
    ]
    return Job(
        name="Library to Town Hall backbone",
        customer="Wrenfield Town Council",
        site="Wrenfield town centre",
        crew=[ana, tomas],
        created_at=at(7.0),
        updated_at=at(12.6),
        notes=[
            Note(
                at=at(7.1),
                by=ana,
                text="Cable pulled through the Market Street ducts; "
                "closure at the bank corner re-used.",
            ),
            Note(
                at=at(11.2),
                by=tomas,
                text="Fibre 7 high at 1550 nm only: looks like a "
                "macrobend near the Town Hall tray. Check the tray before re-splicing.",
            ),
            Note(
                at=at(12.6),
                by=tomas,
                text="1550 nm re-check drifted 0.35 dB: results after "
                "10:00 at 1550 nm to be retested tomorrow with a fresh reference.",
            ),
        ],
        links=[link],
    )


def _fit_out(at: _At) -> Job:
    priya = "Priya Nair"
    link = Link(
        label="MILL-U3",
        end_a="Old Mill MDF",
        end_b="Unit 3 rack",
        fibre_type="OM3",
        length_m=120.0,
        fibre_count=24,
    )
    link.budget = _budget(at(8.0), priya, 120.0, 2, 0, 0.0, "OM3")
    refs = {
        nm: ReferenceRecord(
            source_id="SRC-MM1",
            meter_id="PM-7",
            wavelength_nm=nm,
            level_dbm=level,
            method="two-cord",
            cords=["TRC-3", "TRC-4"],
            launch_condition="encircled flux (IEC 61280-4-1)",
            by=priya,
            at=at(8.5),
        )
        for nm, level in ((850.0, -20.15), (1300.0, -20.40))
    }
    link.references = list(refs.values())
    for nm, ref in refs.items():
        budget_row = link.budget.at_wavelength(nm)
        assert budget_row is not None
        # two-cord: one end connection of the two is in the measurement.
        limit_db = round(budget_row.loss_db - 0.75, 2)
        for fibre in range(1, 25):
            loss_db = round((0.55 if nm == 850.0 else 0.40) + (fibre % 5) * 0.04, 2)
            link.results.append(
                LossResult(
                    fibre=fibre,
                    wavelength_nm=nm,
                    direction="A->B",
                    reading_dbm=round(ref.level_dbm - loss_db, 2),
                    loss_db=loss_db,
                    reference_id=ref.id,
                    method="two-cord",
                    limit_db=limit_db,
                    passed=loss_db <= limit_db,
                    by=priya,
                    at=at(9.0 + fibre * 0.05),
                )
            )
    return Job(
        name="Old Mill business park: unit 3 fit-out",
        customer="Old Mill Estates (fictional)",
        site="Old Mill business park, Wrenfield",
        crew=[priya],
        status="done",
        created_at=at(8.0),
        updated_at=at(11.0),
        notes=[
            Note(
                at=at(10.9),
                by=priya,
                text="All 24 fibres pass at 850 and 1300 nm. Labels fitted both ends.",
            )
        ],
        links=[link],
    )


def _reservoir(at: _At) -> Job:
    jon, ana = "Jon Okafor", "Ana Ruiz"
    link = Link(
        label="RES-N-FEED",
        end_a="Pumping station",
        end_b="North Reservoir valve house",
        fibre_type="OS2",
        length_m=4200.0,
        fibre_count=6,
    )
    link.faults = [
        FaultRecord(
            by=jon,
            at=at(8.2),
            inputs={
                "otdr_distance_m": 2963.0,
                "group_index": 1.4677,  # the G.652.D 1550 nm preset (presets/fibres.toml)
                "helix_percent": 1.5,
                "slack_loops_m": [{"at_m": 1500.0, "length_m": 30.0}],
            },
            fibre_distance_m=2963.0,
            sheath_distance_m=2919.2,
            route_distance_m=2889.2,
            low_m=2876.0,
            high_m=2902.4,
            nearest_landmark="handhole HH-12 (route 2875 m)",
            offset_from_landmark_m=14.2,
            marking="sheath marking about 5841 m",
            notes="Digger strike reported by the farm contractor; marks requested.",
        )
    ]
    link.splice_limits = [_TIA_FUSION.model_copy(update={"by": ana, "at": at(13.0)})]
    link.closures = [
        Closure(
            name="Repair closure past HH-12",
            route_distance_m=2890.0,
            landmark="handhole HH-12 + 15 m",
            notes="New closure at the digger strike.",
            cables=[
                SpliceCable(name="to Works", fibre_count=6, per_tube=6, by=ana, at=at(13.0)),
                SpliceCable(name="to Reservoir", fibre_count=6, per_tube=6, by=ana, at=at(13.0)),
            ],
            trays=[Tray(number=1, capacity=12, by=ana, at=at(13.0))],
            splices=[
                Splice(
                    cable_a="to Works",
                    fibre_a=f,
                    cable_b="to Reservoir",
                    fibre_b=f,
                    tray=1,
                    slot=f,
                    loss_ab_db=ab,
                    loss_ba_db=ba,
                    wavelength_nm=1550.0,
                    by=ana,
                    at=at(13.0 + f * 0.05),
                )
                for f, ab, ba in zip(
                    range(1, 7),
                    [0.05, 0.07, 0.02, 0.04, 0.36, 0.03],
                    [0.03, 0.05, 0.04, 0.06, 0.40, 0.05],
                    strict=True,
                )
            ],
            by=ana,
            at=at(13.0),
        )
    ]
    ref = ReferenceRecord(
        source_id="SRC-2",
        meter_id="PM-4",
        wavelength_nm=1550.0,
        level_dbm=-6.95,
        method="one-cord",
        cords=["TRC-12"],
        by=jon,
        at=at(14.0),
    )
    link.references = [ref]
    # 4.2 km × 0.3 dB/km + 2 × 0.75 + (3 + 2 repair) splices × 0.3 = 1.26 + 1.5 + 1.5 = 4.26 dB
    limit_db = 4.26
    for fibre, loss_db in enumerate([2.41, 2.52, 2.38, 2.47, 4.63, -0.12], start=1):
        flags = [FLAG_NEGATIVE_LOSS] if loss_db < 0 else []
        link.results.append(
            LossResult(
                fibre=fibre,
                wavelength_nm=1550.0,
                direction="A->B",
                reading_dbm=round(ref.level_dbm - loss_db, 2),
                loss_db=loss_db,
                reference_id=ref.id,
                method="one-cord",
                limit_db=limit_db,
                passed=None if loss_db < 0 else loss_db <= limit_db,
                flags=flags,
                by=jon,
                at=at(14.2 + fibre * 0.1),
            )
        )
    return Job(
        name="North Reservoir feed repair",
        customer="Wrenfield Water (fictional)",
        site="North Reservoir road",
        crew=[jon, ana],
        created_at=at(7.8),
        updated_at=at(15.0),
        notes=[
            Note(
                at=at(8.3),
                by=jon,
                text="OTDR from the pumping station: break at 2963 m "
                "fibre distance. Search between HH-12 and the field gate.",
            ),
            Note(
                at=at(12.8),
                by=ana,
                text="Break found 15 m past HH-12. Two repair splices in a new closure.",
            ),
            Note(
                at=at(15.0),
                by=jon,
                text="Fibre 6 reads a gain: clean the cord and retest. "
                "Fibre 5 fails: re-splice at the new closure.",
            ),
        ],
        links=[link],
    )


def _survey(at: _At) -> Job:
    return Job(
        name="Station Road duct survey",
        customer="Wrenfield Town Council",
        site="Station Road",
        crew=["Priya Nair"],
        created_at=at(15.5),
        updated_at=at(15.6),
        notes=[
            Note(
                at=at(15.6),
                by="Priya Nair",
                text="Duct proven to chamber SR-4; cable not yet pulled.",
            )
        ],
        links=[
            Link(
                label="SR-SPUR",
                end_a="Chamber SR-1",
                end_b="Chamber SR-4",
                fibre_type="OS2",
                length_m=640.0,
                fibre_count=24,
            )
        ],
    )


def local_day_start(moment: datetime) -> datetime:
    """Midnight of the local day of ``moment``, timezone-aware."""
    local = moment.astimezone()
    return datetime.combine(local.date(), time(0, 0), tzinfo=local.tzinfo)


#: The demo's last record is stamped at least this long before the moment it is written.
DEMO_SETTLED = timedelta(minutes=5)


def last_stamp(jobs: list[Job]) -> datetime:
    """The latest time stamped anywhere in ``jobs`` (a job, note, event or any link record)."""

    def stamps(value: object) -> list[datetime]:
        if isinstance(value, datetime):
            return [value]
        if isinstance(value, dict):
            return [t for item in value.values() for t in stamps(item)]
        if isinstance(value, list):
            return [t for item in value for t in stamps(item)]
        return []

    return max(t for job in jobs for t in stamps(job.model_dump()))


def build_for(moment: datetime) -> list[Job]:
    """The demo jobs as a day of work that is over by ``moment``: the local day of ``moment``
    when its last record (mid-afternoon) is already past, otherwise the day before. Whole
    days only, so the clock times the demo's notes mention ("results after 10:00") stay true,
    no record is stamped in the future and every record keeps its order.
    """
    start = local_day_start(moment)
    jobs = build(start)
    if last_stamp(jobs) > moment - DEMO_SETTLED:
        jobs = build(local_day_start(start - timedelta(hours=12)))
    return jobs
