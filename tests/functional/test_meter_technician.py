"""The meter workspace used as a test technician uses it: a 24-fibre cable at two wavelengths,
both directions, at 80x24 and on a phone terminal at 44x22."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input, Label, Static

from fieldkit import safety
from fieldkit.tui import keys
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.meter import KEYS_HINT, KEYS_HINT_NARROW, MeterScreen
from fieldkit.tui.widgets.readings_grid import GridColumn, ReadingsGrid

SIZES = [(80, 24), (44, 22)]


def _text(screen: MeterScreen, selector: str) -> str:
    return str(screen.query_one(selector).render())


def _app(dirs: dict[str, Path]):  # noqa: ANN202 - the app factory's app
    return make_app(data_dir=dirs["data"], config_dir=dirs["config"], start_mode="meter")


@pytest.mark.parametrize("size", SIZES)
async def test_setup_labels_say_what_they_mean(
    isolated_dirs: dict[str, Path], size: tuple[int, int]
) -> None:
    async with _app(isolated_dirs).run_test(size=size) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        labels = [str(label.render()) for label in screen.query(".meter-label").results(Label)]
        assert labels[:6] == ["Method", "Wavelength", "Fibres", "Directions", "Ref 1310", "Limit"]
        # The directions number says what it means beside it, whole.
        meaning = screen.query_one("#directions-meaning", Label)
        assert str(meaning.render()) == "A→B"
        assert meaning.region.width >= len("both") and meaning.region.right <= size[0]
        screen.query_one("#directions", Input).value = "2"
        await pilot.pause()
        assert str(meaning.render()) == "both"
        assert [c.heading for c in screen.query_one(ReadingsGrid).columns_shown][:3] == [
            "1310 A→B",
            "1310 B→A",
            "1310 avg",
        ]
        screen.query_one("#directions", Input).value = "3"
        await pilot.pause()
        assert str(meaning.render()) == "?"
        error = screen.query_one("#directions-error", Static)
        assert error.display and "1 (A->B only) or 2 (both directions)" in str(error.render())
        # No job chosen yet is the normal start, not an error.
        summary = _text(screen, "#meter-summary")
        assert (
            f"{keys.display('save')}: choose a job to save into" in summary
            and "Not saved" not in summary
        )


@pytest.mark.parametrize("size", SIZES)
async def test_invisible_light_caution_beside_the_reference_prompt(
    isolated_dirs: dict[str, Path], size: tuple[int, int]
) -> None:
    async with _app(isolated_dirs).run_test(size=size) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        note = screen.query_one("#reference-note", Static)
        lines = str(note.render()).splitlines()
        # Shown (not folded away under Reference details) while no reference is set, and whole
        # on its own line: the note's region is wide enough for it.
        caution = next(line for line in lines if safety.INVISIBLE_LIGHT_SHORT in line)
        assert len(caution) <= note.content_region.width
        assert note.region.height >= 2 and note.region.bottom <= size[1] - 1
        screen.query_one("#reference", Input).value = "-7.1"
        await pilot.pause()
        # Review A3: readings mean live cords all session; the caution stays once a
        # reference is set, first in the note (never the row cut off), and whole.
        lines = str(note.render()).splitlines()
        assert lines[0] == f"⚠ {safety.INVISIBLE_LIGHT_SHORT}"
        assert len(lines[0]) <= note.content_region.width
        assert note.region.height >= 2


async def test_phone_terminal_grid_has_the_rows(isolated_dirs: dict[str, Path]) -> None:
    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        grid = screen.query_one(ReadingsGrid)
        message = screen.query_one("#entry-message", Static)
        # The key hint is one line that fits: 44 columns less the padding.
        assert str(message.render()) == KEYS_HINT_NARROW
        assert message.region.height == 1 and len(KEYS_HINT_NARROW) <= message.region.width - 2
        # Header + 6 fibres before a reference is set (it was header + 5); the same once the
        # reference prompt gives way to the method note (the invisible-light caution stays
        # above it: review A3).
        assert grid.region.height >= 7
        screen.query_one("#reference", Input).value = "-7.1"
        await pilot.pause()
        assert "one-cord: 2 of 2 end connections counted" in _text(screen, "#reference-note")
        assert grid.region.height >= 7
        # A verdict fits the one line: "fibre 1 1310 A→B: 0.40 dB (no limit)".
        screen.query_one("#limit", Input).value = "1.5"
        screen.query_one("#reading", Input).focus()
        await pilot.press(*"-7.5", "enter")
        await pilot.pause()
        verdict = str(message.render())
        assert verdict == "fibre 1 1310 A→B: 0.40 dB pass +1.10"  # 1.5 − (−7.1 − −7.5)
        assert len(verdict) <= message.region.width - 2
        # A negative loss is an error: two rows, so the advice is read whole.
        await pilot.press(*"-6.9", "enter")
        await pilot.pause()
        assert message.has_class("field-error") and message.region.height == 2
        assert "bad reference" in str(message.render())


async def test_wide_hint_unchanged(isolated_dirs: dict[str, Path]) -> None:
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert _text(pilot.app.screen, "#entry-message") == KEYS_HINT


async def test_every_hint_key_and_a_click_at_44_columns(isolated_dirs: dict[str, Path]) -> None:
    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        screen.query_one("#fibres", Input).value = "24"
        screen.query_one("#directions", Input).value = "2"
        await pilot.pause()
        screen.query_one("#reference", Input).value = "-7.0"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        where = screen.query_one("#entry-where", Label)
        await pilot.press(*"-7.3", "enter")  # Enter: next fibre
        assert "fibre 2 1310 A→B" in str(where.render())
        await pilot.press("pagedown")
        assert "fibre 14 1310 A→B" in str(where.render())
        await pilot.press("pageup", "down", "down", "up")
        assert "fibre 3 1310 A→B" in str(where.render())
        await pilot.press("up", "up")  # correct fibre 1: the new reading replaces the old
        await pilot.press(*"-7.6", "enter")
        cell = screen.session.cells[(1, 1310.0, "A->B")]
        assert cell.loss_db == pytest.approx(0.6, abs=1e-9)  # -7.0 − (-7.6)
        await pilot.press("up", "ctrl+x")  # Ctrl+X removes fibre 1's reading
        assert (1, 1310.0, "A->B") not in screen.session.cells
        assert "reading removed" in _text(screen, "#entry-message")
        await pilot.press("ctrl+right")  # next column: 1310 B→A, its own reference
        assert "fibre 1 1310 B→A" in str(where.render())
        assert str(screen.query_one("#reference-box Label", Label).render()) == "Ref 1310 ←"
        assert screen.query_one("#reference", Input).value == ""
        await pilot.press("ctrl+left")
        assert "fibre 1 1310 A→B" in str(where.render())
        # A click on a cell goes there: row 3 below the two-line header is fibre 3; the fibre
        # column is 7 cells wide and 1310 A→B the next 11, so x=20 is in 1310 B→A.
        await pilot.click("#readings", offset=(20, 4))
        await pilot.pause()
        assert "fibre 3 1310 B→A" in str(where.render())
        assert screen.focused is screen.query_one("#reading")
        grid = screen.query_one(ReadingsGrid)
        assert grid.cursor_coordinate.row == 2
        assert grid.columns_shown[grid.cursor_coordinate.column - 1] == GridColumn(1310.0, "B->A")


async def test_worst_fibres_of_both_wavelengths_show_at_44_columns(
    isolated_dirs: dict[str, Path],
) -> None:
    # The summary's lines are built and checked on the model (tests/unit/test_meter_session.py);
    # here: its five rows at 44x22 show the save line and both wavelengths' counts.
    from fieldkit.actions.meter import ReferenceDetails

    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        screen.query_one("#fibres", Input).value = "24"
        await pilot.pause()
        session = screen.session
        for column in session.measured_columns:
            session.column_index = session.measured_columns.index(column)
            session.set_reference("-7.0")
            for fibre in range(1, 25):
                session.fibre = fibre
                # Losses 0.10 .. 2.40 dB; a negative one (fibre 24 at 1550) counts as bad ref.
                loss = -0.2 if (column.wavelength_nm, fibre) == (1550, 24) else fibre / 10
                session.enter(f"{-7.0 - loss:.2f}", ReferenceDetails())
        screen._show_summary()  # noqa: SLF001 - what the summary timer runs
        await pilot.pause()
        summary = screen.query_one("#meter-summary", Static)
        lines = str(summary.render()).splitlines()
        visible = lines[: summary.region.height]
        assert all(len(line) <= summary.content_region.width for line in visible), visible
        # The save line first, then both wavelengths' counts and worst fibre (with units;
        # the negative reading, a reference problem, not among the worst: review A11).
        assert "choose a job" in visible[0]
        assert visible[1] == "1310 (no limit) 24/24: 24 no limit"
        assert visible[2] == "  worst: fibre 24 2.40 dB"
        assert visible[3] == "1550 nm (no limit): 24/24"
        assert visible[4] == "  1 reference problem, 23 no limit"
        assert "worst: fibre 23 2.30 dB" in lines[5]


async def test_job_budget_limit_and_replace_hint_fit_44_columns(
    isolated_dirs: dict[str, Path],
) -> None:
    from fieldkit.jobs.models import BudgetItem, BudgetRecord, BudgetWavelength
    from fieldkit.jobs.store import JobStore

    store = JobStore(isolated_dirs["data"] / "jobs")
    job = store.create("Fit-out", site="Unit 3")
    link_id = "L1"

    def add_link(j: object) -> None:
        link = j.add_link("B1 to B2", fibre_count=12)  # type: ignore[attr-defined]
        nonlocal link_id
        link_id = link.id
        # A saved budget: 4.60 dB at 1310 nm counting 4 mated pairs at 0.75 dB.
        link.budget = BudgetRecord(
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

    store.update(job.id, add_link)
    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        screen.attach(job.id, link_id)
        await pilot.pause()
        summary = _text(screen, "#meter-summary")
        assert "Saving into B1 to B2" in summary and "saved -" not in summary
        screen.query_one("#method", Input).value = "two-cord"
        await pilot.pause()
        # Two-cord keeps 1 of the 2 end connections: 4.60 − 0.75 = 3.85 dB.
        limit = screen.query_one("#limit", Input)
        assert limit.placeholder == "3.85 dB"
        assert len(limit.placeholder) < limit.content_region.width
        screen.query_one("#reference", Input).value = "-7.20"
        await pilot.pause()
        note = screen.query_one("#reference-note", Static)
        lines = str(note.render()).splitlines()
        assert lines == [
            f"⚠ {safety.INVISIBLE_LIGHT_SHORT}",  # all session (review A3)
            "two-cord: 1 of 2 end connections counted",
            "limit 3.85 dB: budget less 1 connection",
        ]
        assert note.region.height == 3
        assert all(len(line) <= note.content_region.width for line in lines)
        reading = screen.query_one("#reading", Input)
        reading.focus()
        await pilot.press(*"-8.40", "enter", "up")
        await pilot.pause()
        assert reading.placeholder == "now −8.40 dBm"  # typing replaces it; the one minus
        assert len(reading.placeholder) < reading.content_region.width


@pytest.mark.parametrize("size", SIZES)
async def test_recheck_dialog_carries_the_caution(
    isolated_dirs: dict[str, Path], size: tuple[int, int]
) -> None:
    from fieldkit.tui.widgets.recheck_dialog import RecheckDialog

    async with _app(isolated_dirs).run_test(size=size) as pilot:
        await pilot.pause()
        pilot.app.screen.query_one("#reference", Input).value = "-7.1"
        await pilot.pause()
        await pilot.press("ctrl+r")
        await pilot.pause()
        dialog = pilot.app.screen
        assert isinstance(dialog, RecheckDialog)
        caution = dialog.query_one("#rc-caution", Static)
        assert safety.INVISIBLE_LIGHT_SHORT in str(caution.render())
        region = caution.region
        assert region.height >= 1 and region.right <= size[0] and region.bottom < size[1]
        for button in ("#rc-ok", "#rc-cancel"):
            assert dialog.query_one(button).region.bottom <= size[1], button


async def test_a_corrected_reading_is_drawn_in_its_row(isolated_dirs: dict[str, Path]) -> None:
    # The grid redraws only the row of a changed cell: what it draws must be the new value.
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        screen.query_one("#reference", Input).value = "-7.0"
        await pilot.pause()
        screen.query_one("#reading", Input).focus()
        await pilot.press(*"-8.0", "enter", *"-8.5", "enter", "up", "up")
        await pilot.press(*"-7.6", "enter")  # fibre 1 again: -7.0 − (-7.6) = 0.60 dB
        await pilot.pause()
        grid = screen.query_one(ReadingsGrid)
        rows = [grid.render_line(y).text for y in range(2, 4)]  # below the two-line header
        assert "loss dB" in grid.render_line(1).text  # the cells' unit (review F1 #3)
        assert "0.60" in rows[0] and "1.00" not in rows[0]
        assert "1.50" in rows[1]  # -7.0 − (-8.5)
