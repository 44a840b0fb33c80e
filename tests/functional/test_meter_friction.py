"""The meter's friction points from trying it as a test technician (issue 14), each driven
through Pilot at the size where it showed: 80x24 and a phone terminal at 44x22.

Losses worked by hand: loss = reference − reading (dBm), the power-meter method of
TIA-526-14 / IEC 61280-4-1 (from memory).
"""

from __future__ import annotations

from pathlib import Path

from textual.widgets import Input, Static

from fieldkit.tui.app import make_app
from fieldkit.tui.screens.meter import MeterScreen
from fieldkit.tui.widgets.readings_grid import ReadingsGrid


def _app(dirs: dict[str, Path]):  # noqa: ANN202 - the app factory's app
    return make_app(data_dir=dirs["data"], config_dir=dirs["config"], start_mode="meter")


def _message(screen: MeterScreen) -> str:
    return str(screen.query_one("#entry-message", Static).render())


def _cursor_in_view(grid: ReadingsGrid) -> bool:
    row = grid.cursor_coordinate.row
    top = int(grid.scroll_y)
    return top <= row < top + grid.scrollable_content_region.height - 1  # less the header


async def _ready(pilot: object, screen: MeterScreen, fibres: int = 24) -> None:
    screen.query_one("#fibres", Input).value = str(fibres)
    screen.query_one("#wavelengths", Input).value = "1310"
    await pilot.pause()  # type: ignore[attr-defined]
    screen.query_one("#reference", Input).value = "-7.0"
    await pilot.pause()  # type: ignore[attr-defined]
    screen.query_one("#reading", Input).focus()
    await pilot.pause()  # type: ignore[attr-defined]


async def test_focus_opens_on_the_reference_then_enter_goes_to_the_reading(
    isolated_dirs: dict[str, Path],
) -> None:
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        # No reference yet: the first thing typed is the reference level.
        assert screen.focused is screen.query_one("#reference")
        await pilot.press(*"-7.2", "enter")
        assert screen.focused is screen.query_one("#reading")
        await pilot.press(*"-8.0", "enter")  # the reading goes in at once
        assert screen.session.cells[(1, 1310.0, "A->B")].loss_db == -7.2 - -8.0


async def test_alt_keys_reach_the_set_up_fields_from_the_reading(
    isolated_dirs: dict[str, Path],
) -> None:
    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        await _ready(pilot, screen)
        reading = screen.query_one("#reading", Input)
        await pilot.press(*"-7.5")  # a reading half typed stays where it is
        for key, field_id in (
            ("alt+w", "wavelengths"),
            ("alt+f", "fibres"),
            ("alt+r", "reference"),
        ):
            await pilot.press(key)
            await pilot.pause()
            assert screen.focused is screen.query_one(f"#{field_id}"), key
            assert screen.query_one(f"#{field_id}").region.height == 1  # shown, not folded
            await pilot.press("enter")  # back to the reading
            assert screen.focused is reading
        assert reading.value == "-7.5"
        assert screen.query_one("#wavelengths", Input).value == "1310"  # no letter typed in


async def test_more_fibre_rows_at_44x22_while_typing(isolated_dirs: dict[str, Path]) -> None:
    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        await _ready(pilot, screen)
        grid = screen.query_one(ReadingsGrid)
        assert grid.scrollable_content_region.height - 1 > 6  # fibre rows below the header
        # The set-up is one line meanwhile, and says what is set.
        line = screen.query_one("#setup-line", Static)
        assert line.region.height == 1 and "one-cord 1310 nm, 24 fibres" in str(line.render())
        assert screen.query_one("#method").region.height == 0
        await pilot.click("#setup-line")  # a click opens it again, at the reference
        await pilot.pause()
        assert screen.focused is screen.query_one("#reference")
        assert screen.query_one("#method").region.height == 1


async def test_a_negative_loss_stays_until_it_is_retested(isolated_dirs: dict[str, Path]) -> None:
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        await _ready(pilot, screen)
        await pilot.press(*"-6.8", "enter")  # -7.0 − (-6.8) = -0.20 dB
        assert "negative" in _message(screen)
        await pilot.press(*"-8.0", "enter", *"-8.1", "enter")  # the next fibres
        await pilot.pause()
        lines = _message(screen).splitlines()
        assert lines[0].startswith("⚠ fibre 1 1310 A→B: −0.20 dB, negative")  # the one minus
        assert lines[1].startswith("fibre 3 1310 A→B: 1.10 dB")  # the latest reading too
        await pilot.press("pageup", *"-7.9", "enter")  # fibre 1 retested: 0.90 dB
        await pilot.pause()
        assert "negative" not in _message(screen)
        assert _message(screen).startswith("fibre 1 1310 A→B: 0.90 dB")


async def test_the_cursor_row_stays_in_view_when_the_message_takes_two_rows(
    isolated_dirs: dict[str, Path],
) -> None:
    async with _app(isolated_dirs).run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        await _ready(pilot, screen)
        grid = screen.query_one(ReadingsGrid)
        rows = grid.scrollable_content_region.height - 1
        for fibre in range(1, rows):  # down to the last fibre row in view
            await pilot.press(*f"-7.{fibre % 9 + 1}", "enter")
        await pilot.pause()
        assert _cursor_in_view(grid)
        message = screen.query_one("#entry-message", Static)
        assert message.region.height == 1
        await pilot.press(*"-6.5", "enter")  # negative: the message takes two rows
        await pilot.pause()
        await pilot.pause()
        assert message.region.height == 2
        assert _cursor_in_view(grid), (grid.cursor_coordinate, grid.scroll_y)


async def test_a_drifted_recheck_keeps_the_fail_marks_and_says_bad_ref_in_words(
    isolated_dirs: dict[str, Path],
) -> None:
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        screen.query_one("#limit", Input).value = "1.5"
        await _ready(pilot, screen, fibres=4)
        # 0.50 dB pass, 2.50 dB fail (over 1.5), -0.20 dB a bad reference.
        await pilot.press(*"-7.5", "enter", *"-9.5", "enter", *"-6.8", "enter")
        await pilot.press("ctrl+r")
        await pilot.pause()
        await pilot.press(*"-7.25", "enter")  # drift -0.25 dB, beyond ±0.10 (common practice)
        await pilot.pause()
        grid = screen.query_one(ReadingsGrid)
        cells = [grid.get_cell_at((row, 1)).plain.strip() for row in range(3)]
        assert cells == ["0.50 ?", "2.50✗?", "−0.20!?"]
        await screen.saves_settled()
        summary = str(screen.query_one("#meter-summary", Static).render())
        assert "reference problem" in " ".join(summary.split()) and "ref?" not in summary


async def test_a_reading_typed_after_tab_from_the_limit_is_taken(
    isolated_dirs: dict[str, Path],
) -> None:
    # Review F1 #2: Tab from Limit landed on the folded "Reference details" title; the Enter
    # after "-8.1" opened it and the reading was lost without a word.
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        await pilot.press(*"-7.5", "tab")
        assert screen.focused is screen.query_one("#limit")
        await pilot.press(*"1.5", "tab")
        assert screen.focused is screen.query_one("#reading")
        await pilot.press(*"-8.1", "enter")
        cell = screen.session.cells[(1, 1310.0, "A->B")]
        assert cell.reading_dbm == -8.1 and screen.session.limit_db(1310.0) == 1.5
        assert screen.query_one("#meter-details").collapsed  # type: ignore[attr-defined]
        # Opened, Tab from Limit goes into the details' first field (not onto their title).
        screen.query_one("#meter-details").collapsed = False  # type: ignore[attr-defined]
        screen.query_one("#limit").focus()
        await pilot.press("tab")
        assert screen.focused is screen.query_one("#source")


async def test_a_typing_problem_goes_when_the_field_is_cleared(
    isolated_dirs: dict[str, Path],
) -> None:
    # Review F1 #5: "reading: 'abc' does not start with a number" stayed after the field was
    # cleared.
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        await _ready(pilot, screen)
        reading = screen.query_one("#reading", Input)
        reading.value = "abc"  # the field's restrict lets only a quantity's characters in
        await pilot.pause()
        assert "does not start with a number" in _message(screen)
        await pilot.press("ctrl+u")  # cleared: the problem is gone with the text
        assert reading.value == ""
        assert "does not start with a number" not in _message(screen)


async def test_the_note_stops_pointing_under_the_details_once_they_are_open(
    isolated_dirs: dict[str, Path],
) -> None:
    async with _app(isolated_dirs).run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = pilot.app.screen
        assert isinstance(screen, MeterScreen)
        note = screen.query_one("#reference-note", Static)
        assert "more under Reference details" in str(note.render())
        await pilot.click("#meter-details CollapsibleTitle")
        assert not screen.query_one("#meter-details").collapsed  # type: ignore[attr-defined]
        assert "more under Reference details" not in str(note.render())
