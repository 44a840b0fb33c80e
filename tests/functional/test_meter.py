"""The meter workspace driven through Pilot: a whole cable typed in, saved into the job."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest
from textual import events
from textual.widgets import Input, Static

from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.meter import MeterScreen
from fieldkit.tui.widgets.readings_grid import ReadingsGrid


def _job_with_link(data: Path, fibres: int = 144) -> tuple[JobStore, str, str]:
    store = JobStore(data / "jobs")
    job = store.create("Campus backbone")
    made: list[str] = []

    def add(job_: object) -> None:
        made.clear()
        made.append(job_.add_link("B1 to B2", fibre_count=fibres).id)  # type: ignore[attr-defined]

    store.update(job.id, add)
    return store, job.id, made[0]


def _send(app: object, *keys: str) -> None:
    """Queue key events without waiting after each (a fast typist typing ahead)."""
    for key in keys:
        name = {"-": "minus", ".": "full_stop"}.get(key, key)
        app.post_message(events.Key(name, key if len(key) == 1 else None))  # type: ignore[attr-defined]


async def _settle(pilot: object, screen: MeterScreen) -> None:
    """Every key handled, the save worker done with what is queued, the summary shown."""
    await pilot.pause()  # type: ignore[attr-defined]
    await screen.saves_settled()
    await pilot.pause()  # type: ignore[attr-defined]
    assert not screen.unsaved, "the readings were not saved"


def _reading(fibre: int, wavelength_nm: int) -> str:
    # Readings chosen so the losses are known by hand: loss = reference − reading.
    if (fibre, wavelength_nm) == (7, 1310):
        return "-7.05"  # -7.20 − (-7.05) = -0.15 dB: a reference problem
    if (fibre, wavelength_nm) == (100, 1550):
        return "-10.50"  # -7.00 − (-10.50) = 3.50 dB: fails 2.0 dB
    base = -8.0 if wavelength_nm == 1310 else -7.5
    return f"{base - (fibre % 10) / 10:.2f}"


async def test_a_144_fibre_cable_at_two_wavelengths_lands_in_the_job_and_its_csv(
    isolated_dirs: dict[str, Path],
) -> None:
    # The typing path once, at 80x24; the summary's wording at 44 columns is checked on the
    # model (tests/unit/test_meter_session.py).
    size = (80, 24)
    store, job_id, link_id = _job_with_link(isolated_dirs["data"])
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, MeterScreen)
        # Choose the job and its link with the picker (Ctrl+O), by keyboard.
        await pilot.press("ctrl+o")
        await pilot.pause()
        await pilot.press("enter")  # the job
        await pilot.pause()
        await pilot.press("enter")  # its link
        await pilot.pause()
        assert app.screen is screen
        assert screen.query_one("#fibres", Input).value == "144"  # from the link
        # References and limits for both columns, typed into the fields.
        screen.query_one("#reference", Input).focus()
        await pilot.press(*"-7.20")
        screen.query_one("#limit", Input).focus()
        await pilot.press(*"2.0")
        await pilot.press("ctrl+right")
        screen.query_one("#reference", Input).focus()
        await pilot.press(*"-7.00")
        screen.query_one("#limit", Input).focus()
        await pilot.press(*"2,0")  # a decimal comma is a decimal point here
        await pilot.press("ctrl+left")
        screen.query_one("#reading", Input).focus()
        await pilot.pause()

        keystrokes_beyond_digits = 0
        for wavelength_nm in (1310, 1550):
            for fibre in range(1, 145):
                _send(app, *_reading(fibre, wavelength_nm), "enter")
                keystrokes_beyond_digits += 1
            await pilot.pause()
        await _settle(pilot, screen)
        assert keystrokes_beyond_digits == 288  # one Enter per reading, nothing else

        summary = str(screen.query_one("#meter-summary", Static).render())
        # Every count (they add up to 144) and the limit with its unit (review A1, A11).
        flat = " ".join(summary.split())
        assert (
            "1310 nm limit 2.00 dB: 144/144, 143 pass, 0 fail, 1 reference problem, "
            "0 in doubt, 0 no limit" in flat
        ), flat
        assert "1550 nm limit 2.00 dB: 144/144, 143 pass, 1 fail, 0 reference problems" in flat
        assert "worst: fibre 100 3.50 dB" in flat

    job = store.load(job_id)
    link = job.link(link_id)
    assert len(link.results) == 288
    levels = {r.id: r.level_dbm for r in link.references}
    assert sorted(levels.values()) == [-7.2, -7.0]
    by_cell = {(r.fibre, round(r.wavelength_nm), r.direction): r for r in link.results}
    assert len(by_cell) == 288
    for (fibre, wavelength_nm, _), result in by_cell.items():
        reading_dbm = float(_reading(fibre, wavelength_nm))
        assert result.reading_dbm == pytest.approx(reading_dbm, abs=1e-9)
        assert result.loss_db == pytest.approx(levels[result.reference_id] - reading_dbm, abs=1e-9)
        assert result.limit_db == pytest.approx(2.0, abs=1e-12)
        assert result.method == "one-cord"
    # Fibre 3 at 1310 nm: -7.20 − (-8.30) = 1.10 dB, a pass.
    assert by_cell[(3, 1310, "A->B")].loss_db == pytest.approx(1.10, abs=1e-9)
    assert by_cell[(3, 1310, "A->B")].passed is True
    negative = by_cell[(7, 1310, "A->B")]
    assert negative.loss_db == pytest.approx(-0.15, abs=1e-9)
    assert negative.passed is None and "negative-loss" in negative.flags
    failing = by_cell[(100, 1550, "A->B")]
    assert failing.loss_db == pytest.approx(3.50, abs=1e-9) and failing.passed is False

    from fieldkit.reports import to_csv

    rows = list(csv.DictReader(io.StringIO(to_csv(job))))
    assert len(rows) == 288
    header = rows[0].keys()
    fibre_key = next(k for k in header if k.lower().startswith("fibre"))
    wavelength_key = next(k for k in header if "wavelength" in k.lower())
    loss_key = next(k for k in header if k.lower().startswith("loss"))
    row = next(r for r in rows if r[fibre_key] == "100" and r[wavelength_key].startswith("1550"))
    assert float(row[loss_key]) == pytest.approx(3.50, abs=0.005)
    flagged = next(r for r in rows if r[fibre_key] == "7" and r[wavelength_key].startswith("1310"))
    assert "negative-loss" in ";".join(flagged.values())


async def test_bad_reading_and_missing_reference_keep_the_text(
    isolated_dirs: dict[str, Path],
) -> None:
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        reading = screen.query_one("#reading", Input)
        reading.focus()
        await pilot.press(*"-8.5", "enter")
        message = screen.query_one("#entry-message", Static)
        assert "Set the reference" in str(message.render())
        assert reading.value == "-8.5"  # kept
        screen.query_one("#reference", Input).value = "-7.2"
        await pilot.pause()
        reading.focus()
        reading.value = ""
        await pilot.press(*"5 km", "enter")
        assert "length" in str(message.render()) and message.has_class("field-error")
        assert reading.value == "5 km"
        reading.value = ""
        await pilot.press(*"50 uW", "enter")  # ITU-R V.574: 50 µW = -13.0103 dBm
        assert "5.81 dB" in str(message.render())  # -7.2 − (-13.0103) = 5.8103 dB
        assert reading.value == ""
        # A reference the field cannot read is not used for readings.
        screen.query_one("#reference", Input).value = "-7.2 dbx"
        await pilot.pause()
        reading.focus()
        await pilot.press(*"-8", "enter")
        assert "Set the reference" in str(message.render()) and reading.value == "-8"
        # Typical single-mode source -7 dBm (common practice): -13 dBm is 6.0 dB below it.
        screen.query_one("#reference", Input).value = "-13"
        await pilot.pause()
        note = str(screen.query_one("#reference-note", Static).render())
        assert "6.0 dB below" in note and "clean" in note
        # The method field refuses nonsense beside itself.
        screen.query_one("#method", Input).value = "four-cord"
        await pilot.pause()
        error = screen.query_one("#method-error", Static)
        assert error.display and "three-cord" in str(error.render())


async def test_corrections_and_clearing_reach_the_job(isolated_dirs: dict[str, Path]) -> None:
    store, job_id, link_id = _job_with_link(isolated_dirs["data"], fibres=12)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, MeterScreen)
        screen.attach(job_id, link_id)
        screen.query_one("#wavelengths", Input).value = "1310"
        await pilot.pause()
        screen.query_one("#reference", Input).value = "-7.0"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        for text in ("-8.0", "-8.1", "-8.2"):
            await pilot.press(*text, "enter")
        await pilot.press("up", "up")  # back to fibre 2
        await pilot.press(*"-7.9", "enter")  # corrected: 0.90 dB
        await pilot.press("up", "ctrl+x")  # fibre 2 again: remove its reading
        await _settle(pilot, screen)
        link = store.load(job_id).link(link_id)
        current = sorted((r.fibre, round(r.loss_db, 6)) for r in link.results if r.current)
        assert current == [(1, 1.0), (3, 1.2)]
        # History, not overwrite: fibre 2's first reading (1.1 dB) and its correction (0.9 dB)
        # stay in the file, superseded (the correction by the clearing).
        assert sorted(round(r.loss_db, 6) for r in link.results if r.fibre == 2) == [0.9, 1.1]
        assert all(not r.current for r in link.results if r.fibre == 2)
        # A click on a cell moves the entry there, ready to type. The grid's header is its
        # first two lines (head, unit) and the fibre column 7 cells wide, so (10, 10) is fibre 9
        # at 1310 nm.
        await pilot.click("#readings", offset=(10, 10))
        await pilot.pause()
        assert "fibre 9 1310" in str(screen.query_one("#entry-where").render())
        assert screen.focused is screen.query_one("#reading")
        await pilot.press(*"-8.5", "enter")
        await _settle(pilot, screen)
        link = store.load(job_id).link(link_id)
        assert {r.fibre for r in link.results if r.current} == {1, 3, 9}


async def test_recheck_beyond_tolerance_marks_results_in_doubt(
    isolated_dirs: dict[str, Path],
) -> None:
    store, job_id, link_id = _job_with_link(isolated_dirs["data"], fibres=4)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, MeterScreen)
        screen.attach(job_id, link_id)
        screen.query_one("#wavelengths", Input).value = "1550"
        await pilot.pause()
        screen.query_one("#reference", Input).value = "-7.00"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        for text in ("-8.0", "-8.1"):
            await pilot.press(*text, "enter")
        await pilot.press("ctrl+r")
        await pilot.pause()
        # Single-mode tolerance 0.1 dB (common practice); -7.25 − (-7.00) = -0.25 dB.
        await pilot.press(*"-7.25")
        await pilot.pause()
        assert "beyond" in str(app.screen.query_one("#rc-out").render())
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen is screen
        assert "in doubt" in str(screen.query_one("#entry-message").render())
        await _settle(pilot, screen)
        summary = str(screen.query_one("#meter-summary").render())
        assert "DRIFTED" in summary
    link = store.load(job_id).link(link_id)
    assert all("reference-in-doubt" in r.flags for r in link.results)
    initial = next(r for r in link.references if r.kind == "initial")
    recheck = next(r for r in link.references if r.kind == "recheck")
    assert initial.in_doubt_since is not None
    assert recheck.drift_db == pytest.approx(-0.25, abs=1e-9)


@pytest.mark.parametrize("size", [(80, 24), (44, 22)])
async def test_everything_fits_the_screen(
    isolated_dirs: dict[str, Path], size: tuple[int, int]
) -> None:
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        width, height = size
        for selector in (
            "#method",
            "#wavelengths",
            "#fibres",
            "#directions",
            "#reference",
            "#limit",
            "#reading",
            "#readings",
            "#meter-summary",
        ):
            region = screen.query_one(selector).region
            assert region.width > 0 and region.height > 0, selector
            assert region.right <= width and region.bottom <= height - 1, selector
        assert screen.query_one("#readings").region.height >= 4
        assert screen.has_class("-wide" if width >= 72 else "-narrow")


async def test_budget_limit_by_method_and_both_directions(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.jobs.models import BudgetItem, BudgetRecord, BudgetWavelength

    store, job_id, link_id = _job_with_link(isolated_dirs["data"], fibres=6)

    def budget(job: object) -> None:
        # A saved budget: 4.60 dB at 1310 nm counting 4 mated pairs at 0.75 dB (as the budget
        # command records them).
        job.link(link_id).budget = BudgetRecord(  # type: ignore[attr-defined]
            description={"connector_count": 4, "connector_loss_db": 0.75},
            wavelengths=[
                BudgetWavelength(
                    wavelength_nm=1310,
                    loss_db=4.60,
                    items=[
                        BudgetItem(name="fibre", loss_db=1.60),
                        BudgetItem(name="4 mated connector pairs", loss_db=3.00),
                    ],
                )
            ],
        )

    store.update(job_id, budget)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, MeterScreen)
        screen.attach(job_id, link_id)
        screen.query_one("#wavelengths", Input).value = "1310"
        screen.query_one("#directions", Input).value = "2"
        screen.query_one("#method", Input).value = "Method A"  # TIA letter for two-cord
        await pilot.pause()
        # Two-cord keeps 1 of the 2 end connections: 4.60 − 0.75 = 3.85 dB.
        assert screen.query_one("#limit", Input).placeholder == "3.85 budget"
        screen.query_one("#reference", Input).value = "-7.20"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        await pilot.press(*"-8.40", "enter", *"-11.30", "enter")  # A->B: 1.20, 4.10 dB
        await pilot.press("ctrl+right")
        screen.query_one("#reference", Input).value = "-6.90"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        await pilot.press("pageup")  # back to fibre 1 of the B->A column
        await pilot.press(*"-8.20", "enter", *"-10.40", "enter")  # B->A: 1.30, 3.50 dB
        await _settle(pilot, screen)
        grid = screen.query_one(ReadingsGrid)
        assert [c.heading for c in grid.columns_shown] == ["1310 A→B", "1310 B→A", "1310 avg"]
        # Averages: (1.20 + 1.30) / 2 = 1.25 dB; (4.10 + 3.50) / 2 = 3.80 dB. Fibre 2's A->B
        # 4.10 dB is over 3.85 dB, so the fibre fails although its average is within.
        assert grid.get_cell_at((0, 3)).plain.strip() == "1.25"
        assert grid.get_cell_at((1, 1)).plain.strip() == "4.10✗"
        assert grid.get_cell_at((1, 3)).plain.strip() == "3.80✗"
        summary = str(screen.query_one("#meter-summary").render())
        assert "1310 nm limit 3.85 dB: 2/6, 1 pass, 1 fail, 0 reference problems" in summary
    link = store.load(job_id).link(link_id)
    assert {r.method for r in link.results} == {"two-cord"}
    assert all(r.limit_db == pytest.approx(3.85, abs=1e-9) for r in link.results)
    assert sorted(r.level_dbm for r in link.references) == [-7.2, -6.9]
    assert sorted((r.fibre, r.direction, r.passed) for r in link.results) == [
        (1, "A->B", True),
        (1, "B->A", True),
        (2, "A->B", False),
        (2, "B->A", True),
    ]


async def test_readings_typed_just_before_quitting_are_saved(
    isolated_dirs: dict[str, Path],
) -> None:
    store, job_id, link_id = _job_with_link(isolated_dirs["data"], fibres=24)
    app = make_app(
        data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], start_mode="meter"
    )
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, MeterScreen)
        screen.attach(job_id, link_id)
        screen.query_one("#reference", Input).value = "-7.0"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        await pilot.pause()
        for fibre in range(1, 21):
            _send(app, *f"-8.{fibre % 10}", "enter")
        await pilot.pause()
        await pilot.press("ctrl+q")  # straight away, saves still running or queued
    assert len(store.load(job_id).link(link_id).results) == 20
