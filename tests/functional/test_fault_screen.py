"""The fault workspace driven by keyboard and mouse at 80×24 and 44×22."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from textual.widgets import Input, OptionList, Select, Static

from fieldkit import locations, safety
from fieldkit.jobs.models import Job
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import FieldkitApp, make_app
from fieldkit.tui.screens.fault import FaultScreen, PointList
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker
from fieldkit.tui.widgets.route_diagram import RouteDiagram

SIZES = [(80, 24), (44, 22)]


def _app(tmp_path: Path) -> FieldkitApp:
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="fault")


def _text(screen: Any, selector: str) -> str:
    """A Static's words in order: the panels wrap lines to their width themselves."""
    return " ".join(str(screen.query_one(selector, Static).render()).replace("\u00a0", " ").split())


async def _show(pilot: Any, screen: Any, selector: str) -> None:
    widget = screen.query_one(selector)
    screen.query_one("#fault-body").scroll_to_widget(widget, animate=False)
    await pilot.pause()


@pytest.mark.parametrize("size", SIZES)
async def test_typing_a_distance_gives_a_range_and_the_cautions(
    tmp_path: Path, size: tuple[int, int]
) -> None:
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, FaultScreen)
        assert screen.focused is screen.query_one("#fault-distance", Input)
        await pilot.press(*"2040 m")
        await pilot.pause()
        # defaults: G.652.D at 1550 nm (1.4677, the preset's typical value), no helix given, as
        # on the command line: the estimate takes 1.5 %, the middle of 0–3 % (common practice):
        # sheath = route = 2040 / 1.015 = 2009.8522 m, range up to the fibre's 2040 m
        assert "Helix not given" in _text(screen, "#fault-cable-note")
        assert screen.form.location is not None
        assert screen.form.location.position.route_distance_m == pytest.approx(2009.8522, abs=1e-3)
        # Digits follow the ± (review C28): ± 30.2 m is shown to one significant digit, 30 m,
        # and the route to the same place, 2010 m (common practice for quoting a ±).
        assert "Fault 2010 m ± 30 m" in _text(screen, "#fault-summary")
        assert "route 2010 m ± 30 m" in _text(screen, "#fault-result")
        assert "2009.9" not in _text(screen, "#fault-result")
        p = screen.form.location.position  # the range tops out at the fibre distance, within its ±
        assert p.high_m <= 2040.0 + p.fibre_uncertainty_m
        assert any("the estimate takes 1.5 %" in w for w in screen.form.location.warnings)
        diagram = screen.query_one("#fault-diagram", RouteDiagram)
        lines = diagram.lines()
        assert lines[0].startswith("├") and "X" in lines[0]
        assert all(len(line) <= diagram.content_size.width for line in lines)
        # the key line of the fault is whole at both sizes: its window goes on under it, named
        # as in the result (review C30: one name, "search from … to …"), rounded outwards to
        # the ±'s place: 1979.6 -> 1970, 2040.1 -> 2050
        assert "search from 1970 to 2050 m" in _text(screen, "#fault-result")
        assert "fault, search from 1970 to 2050 m" in " ".join(line.strip() for line in lines)
        assert not any("…" in line for line in lines)
        # Review A2: the digging caution stays in view under the result's title line (the
        # summary), never pushed below the screen by the result and the route, at both sizes.
        caution = screen.query_one("#fault-cautions", Static)
        summary = screen.query_one("#fault-summary", Static)
        assert caution.region.height == 1 and caution.region.y == summary.region.bottom
        assert caution.region.bottom <= size[1] - 1  # above the footer
        assert screen.screen.get_widget_at(1, caution.region.y)[0] is caution
        # folded to one line with "more", never gone; the full wording on hover and on Enter;
        # plain wording (review C42), the longest that fits
        shown = _text(screen, "#fault-cautions")
        assert shown.startswith(
            f"⚠ {safety.DIGGING_SHORT if size[0] >= 80 else safety.DIGGING_NARROW}"
        )
        assert shown.endswith("more") and "…" not in shown.removesuffix("… more")
        assert safety.DIGGING in str(caution.tooltip)
        # Review A13: the visual fault locator's caution is in the workspace too, after the
        # result, whole, the full one on hover.
        locator = screen.query_one("#fault-locator-caution", Static)
        assert safety.FAULT_LOCATOR in str(locator.tooltip)
        await _show(pilot, screen, "#fault-locator-caution")
        words = _text(screen, "#fault-locator-caution")
        assert words.endswith("more") and "…" not in words.removesuffix("… more")
        assert "locator" in words and "look into" in words
        result = screen.query_one("#fault-result-panel").region
        assert result.y < locator.region.y  # the result comes first
        caution.focus()
        await pilot.press("enter")
        await pilot.pause()
        cautions = _text(screen, "#fault-cautions")
        assert " ".join(safety.DIGGING.split()) in cautions
        assert " ".join(safety.DEFER.split()) in cautions
        assert caution.region.height > 1


async def test_bad_input_is_shown_beside_the_field_and_kept(tmp_path: Path) -> None:
    size = (44, 22)
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"-3 dBm")
        await pilot.pause()
        field = screen.query_one("#fault-distance-field")
        error = field.query_one(".field-error", Static)
        assert error.display and "optical power" in str(error.render())
        assert screen.query_one("#fault-distance", Input).value == "-3 dBm"
        assert screen.form.location is None
        assert "Fix the field" in _text(screen, "#fault-summary")
        # a bare number is refused beside the field, asking for a unit (as the CLI does)
        screen.query_one("#fault-distance", Input).value = "3.412"
        await pilot.pause()
        assert "3.412 needs a unit" in str(error.render()) and screen.form.location is None
        assert screen.query_one("#fault-distance", Input).value == "3.412"


async def test_landmarks_added_edited_and_removed_by_keys(tmp_path: Path) -> None:
    size = (44, 22)
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#fault-distance", Input).value = "2800 m"
        for key, text in (("name", "closure 6"), ("otdr", "2000"), ("route", "1950")):
            screen.query_one(f"#fault-landmarks-{key}", Input).value = text
        screen.query_one("#fault-landmarks-route", Input).focus()
        await pilot.press("enter")
        # Review C32: the columns say what they are, whole ("OTDR distance", not "OTDR dist")
        labels = [lbl for lbl in screen.query("#fault-landmarks Label.pl-label")]
        assert [str(lbl.render()) for lbl in labels] == ["Name", "OTDR distance", "Route distance"]
        assert all(lbl.content_size.width >= len(str(lbl.render())) for lbl in labels)
        assert all(lbl.size.height == 1 for lbl in labels)
        # Friction (issue 14, fault): focus stayed in "Route distance", so the next name landed
        # there. Enter adds the row and takes the focus back to the name for the next one.
        assert screen.focused is screen.query_one("#fault-landmarks-name", Input)
        await pilot.press(*"closure 7", "tab", *"3.4 km", "tab", *"3330", "enter")
        await pilot.pause()
        landmarks = screen.query_one("#fault-landmarks", PointList)
        assert [row["name"] for row in landmarks.rows] == ["closure 6", "closure 7"]
        # 1950 + 800 × 1380 / 1400 = 2738.5714 m (interpolation between the two)
        p = screen.form.location.position
        assert p.route_distance_m == pytest.approx(2738.5714, abs=1e-3)
        assert "between landmarks closure 6–closure 7" in _text(screen, "#fault-result")
        # the rows' hints are examples ("e.g. ..."), not rows that look entered
        name = screen.query_one("#fault-landmarks-name", Input)
        assert name.placeholder.startswith("e.g. ") and not name.value
        style = name.get_component_rich_style("input--placeholder")
        assert style.italic and style.dim
        assert any("closure 7" in line for line in screen.query_one(RouteDiagram).lines())
        # edit the second: pick it in the list, change its route distance, Enter
        options = landmarks.query_one(OptionList)
        options.focus()
        await pilot.press("down", "down", "enter")
        await pilot.pause()
        route = screen.query_one("#fault-landmarks-route", Input)
        assert route.value == "3330"
        route.value = "3350"
        route.focus()
        await pilot.press("enter")
        await pilot.pause()
        # 1950 + 800 × 1400 / 1400 = 2750 m
        assert screen.form.location.position.route_distance_m == pytest.approx(2750.0, abs=1e-6)
        # remove the first with Delete on the list
        options.focus()
        await pilot.press("home", "delete")
        await pilot.pause()
        assert [row["name"] for row in landmarks.rows] == ["closure 7"]


async def test_slack_loop_added_with_the_mouse(tmp_path: Path) -> None:
    size = (80, 24)
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"2040 m")
        screen.query_one("#fault-cable", Select).value = "__typed__"
        screen.query_one("#fault-helix", Input).value = "2"
        screen.query_one("#fault-slack-position", Input).value = "800"
        screen.query_one("#fault-slack-length", Input).value = "25 m"
        await _show(pilot, screen, "#fault-slack-add")
        await pilot.click("#fault-slack-add")
        await pilot.pause()
        # 2040 / 1.02 = 2000 m sheath; the 25 m loop at 800 m: route 1975 m
        assert screen.form.location.position.route_distance_m == pytest.approx(1975.0, abs=1e-9)
        assert any("∞" in line for line in screen.query_one(RouteDiagram).lines())
        await _show(pilot, screen, "#fault-slack-remove")
        screen.query_one("#fault-slack", PointList).query_one(OptionList).highlighted = 0
        await pilot.click("#fault-slack-remove")
        await pilot.pause()
        assert screen.form.location.position.route_distance_m == pytest.approx(2000.0, abs=1e-9)


async def test_save_onto_a_job_link(tmp_path: Path) -> None:
    size = (80, 24)
    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Cut at the bridge")

    def one_link(j: Job) -> None:
        j.add_link("Span 4")

    store.update(job.id, one_link)
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"2040 m")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)
        await pilot.press("enter", "enter")  # the job, then its link
        await pilot.pause()
        assert "Saved onto Cut at the bridge / Span 4" in _text(screen, "#fault-saved")
    faults = store.load(job.id).links[0].faults
    assert len(faults) == 1
    assert faults[0].route_distance_m == pytest.approx(2009.8522, abs=1e-3)
    assert faults[0].low_m < faults[0].route_distance_m < faults[0].high_m
    assert faults[0].inputs["typed"]["distance"] == "2040 m"


async def test_f5_opens_the_fault_workspace(tmp_path: Path) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("f5")
        await pilot.pause()
        assert isinstance(app.screen, FaultScreen)


async def test_clicking_a_landmark_row_opens_it_for_editing(tmp_path: Path) -> None:
    size = (44, 22)
    app = _app(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#fault-distance", Input).value = "2800 m"
        landmarks = screen.query_one("#fault-landmarks", PointList)
        landmarks.set_rows(
            [
                {"name": "closure 6", "otdr": "2000", "route": "1950"},
                {"name": "closure 7", "otdr": "3400", "route": "3330"},
            ]
        )
        await pilot.pause()
        await _show(pilot, screen, "#fault-landmarks-rows")
        await pilot.click("#fault-landmarks-rows", offset=(4, 1))  # the second row
        await pilot.pause()
        assert screen.query_one("#fault-landmarks-name", Input).value == "closure 7"
        assert str(screen.query_one("#fault-landmarks-add").label) == "Update"


async def test_focus_opens_on_the_otdr_distance_each_time(tmp_path: Path) -> None:
    # Each workspace opens where the user types first: the OTDR distance here, also after
    # going to another workspace and back.
    app = _app(tmp_path)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        distance = app.screen.query_one("#fault-distance", Input)
        assert app.screen.focused is distance
        await pilot.press("f3")
        await pilot.pause()
        await pilot.press("f5")
        await pilot.pause()
        assert app.screen.focused is distance
