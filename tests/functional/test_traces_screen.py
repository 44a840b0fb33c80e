"""The Traces workspace at 80×24 and 44×22: open a pair, jump to an event, send it to Fault."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import DataTable, Input, Static

from fieldkit import safety
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.fault import FaultScreen
from fieldkit.tui.screens.traces import TracesScreen
from fieldkit.tui.widgets.trace_plot import TracePlot

SIZES = [(80, 24), (44, 22)]
FIBRE = SynthFibre(
    length_m=4000.0,
    spacing_m=1.0,
    dynamic_range_db=18.0,
    events=(SynthEvent(1500.0, 0.25), SynthEvent(2600.0, 0.4, -48.0)),
)


@pytest.fixture(scope="module")
def pair_files(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    folder = tmp_path_factory.mktemp("pair")
    ab, ba = folder / "F001_1550_AB.sor", folder / "F001_1550_BA.sor"
    ab.write_bytes(write_sor(synth_trace(FIBRE, seed=1)))
    ba.write_bytes(write_sor(synth_trace(FIBRE.reversed(), seed=2)))
    return ab, ba


@pytest.mark.parametrize("size", SIZES)
async def test_open_a_pair_jump_to_an_event_and_send_it_to_fault(
    tmp_path: Path, size: tuple[int, int], pair_files: tuple[Path, Path]
) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, TracesScreen)
        screen.query_one("#traces-a", Input).value = str(pair_files[0])
        screen.query_one("#traces-b", Input).value = str(pair_files[1])
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert screen.session.paired is not None
        table = screen.query_one("#traces-table", DataTable)
        assert table.row_count == 3  # splice, connector, end
        # the caution is on screen at both sizes
        caution = str(screen.query_one("#traces-caution", Static).render())
        assert caution in (safety.OTDR_LIVE_FIBRE_MEDIUM, safety.OTDR_LIVE_FIBRE_SHORT)
        # the table opens on event 1; jump to the next event on the plot
        assert screen.session.selected == 1
        plot = screen.query_one("#traces-plot", TracePlot)
        plot.focus()
        await pilot.press("pagedown")
        await pilot.pause()
        assert screen.session.selected == 2
        assert plot.view is not None and plot.view.cursor_m == pytest.approx(2600.0, abs=2.0)
        assert "event 2 reflective" in plot.readout()
        assert table.cursor_row == 1
        # every drawn line fits the terminal
        assert all(len(line) <= size[0] for line in str(plot.render()).splitlines())
        await pilot.press("ctrl+g")
        await pilot.pause()
        fault = app.screen
        assert isinstance(fault, FaultScreen)
        distance = fault.query_one("#fault-distance", Input).value
        assert float(distance.removesuffix(" m")) == pytest.approx(2600.0, abs=2.0)
        # One group index (review: 1.4682 here against the Fault preset's 1.4677 turned an
        # event at 1815.0 m into "fibre 1816 m"): the trace's index is the G.652.D 1550 nm
        # preset's, so the Fault workspace's fibre distance is the distance on the trace.
        assert fault.query_one("#fault-ior-set", Input).value == "1.4677"
        assert fault.query_one("#fault-ior", Input).value == "1.4677"
        assert fault.form.location is not None
        fibre_m = fault.form.location.position.fibre_distance_m
        assert fibre_m == pytest.approx(float(distance.removesuffix(" m")), abs=1e-6)


async def test_mouse_click_moves_the_cursor_and_the_wheel_zooms(
    tmp_path: Path, pair_files: tuple[Path, Path]
) -> None:
    from textual import events

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#traces-a", Input).value = str(pair_files[0])
        await pilot.press("enter")
        await pilot.pause()
        plot = screen.query_one("#traces-plot", TracePlot)
        assert plot.view is not None
        span = plot.view.span_m
        # a click half-way across puts the cursor half-way along the view
        await pilot.click("#traces-plot", offset=(plot.size.width // 2, 2))
        await pilot.pause()
        middle = plot.view.start_m + span / 2
        assert plot.view.cursor_m == pytest.approx(middle, abs=span / plot.size.width * 2)
        plot.post_message(
            events.MouseScrollUp(plot, plot.size.width // 2, 2, 0, 0, 0, False, False, False)
        )
        await pilot.pause()
        assert plot.view.span_m == pytest.approx(span * 0.7)
        await pilot.press("home")  # the plot has focus after the click
        await pilot.pause()
        assert plot.view.span_m == pytest.approx(span)


async def test_a_folder_is_analysed_into_fibres_and_each_opens(
    tmp_path: Path, pair_files: tuple[Path, Path]
) -> None:
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, TracesScreen)
        screen.query_one("#traces-a", Input).value = str(pair_files[0].parent)
        await pilot.press("enter")
        await app.workers.wait_for_complete()
        await pilot.pause()
        table = screen.query_one("#traces-table", DataTable)
        assert table.row_count == 1  # one fibre, both directions
        assert "2 files, 1 fibre," in str(screen.query_one("#traces-status", Static).render())
        await pilot.press("enter")
        await pilot.pause()
        assert screen.session.paired is not None and table.row_count == 3
        await pilot.press("ctrl+y")  # the other direction drawn, same averaged table
        await pilot.pause()
        assert screen.session.shown == "BA" and table.row_count == 3
        await pilot.press("escape")
        await pilot.pause()
        assert screen.session.a is None and table.row_count == 1


async def test_fill_a_closures_splice_log_and_ask_before_overwriting(
    tmp_path: Path, pair_files: tuple[Path, Path]
) -> None:
    from fieldkit import locations
    from fieldkit.actions import splices as act
    from fieldkit.jobs.store import JobStore
    from fieldkit.tui.widgets.trace_dialogs import OverwriteDialog

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Mill Lane")
    act.add_closure(store, job.id, "L1", "JC-7", route_distance_m=1480.0, by="Ana")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#traces-a", Input).value = str(pair_files[0])
        screen.query_one("#traces-b", Input).value = str(pair_files[1])
        await pilot.press("enter")
        await pilot.pause()
        for _round in range(2):
            await pilot.press("ctrl+s")  # save onto a job's link: 2, the losses into a splice log
            await pilot.pause()
            await pilot.press("2")
            await pilot.pause()
            # the job: nothing names it, so it is picked by hand the first time (Down), then
            # offered as the last one used (Down stays on the only job)
            await pilot.press("down", "enter")
            await pilot.press("enter")  # its link
            await pilot.pause()
            await pilot.press("enter")  # closure JC-7, fibre 1 from the file name
            await pilot.pause()
            if _round == 0:
                status = str(screen.query_one("#traces-status", Static).render())
                assert "2 one-way losses written" in status
                closure = store.load(job.id).links[0].closures[0]
                splice = next(s for s in closure.splices if s.fibre_a == 1)
                # the splice at 1500 m is 0.25 dB from both ends (FIBRE above)
                assert splice.loss_ab_db == pytest.approx(0.25, abs=0.02)
                act.update_losses(
                    store, job.id, "L1", "JC-7", splice.id, loss_ab_db=0.9, overwrite=True
                )
        assert isinstance(app.screen, OverwriteDialog)
        await pilot.press("escape")  # keep what is recorded
        await pilot.pause()
        assert "Nothing written" in str(screen.query_one("#traces-status", Static).render())
        kept = next(s for s in store.load(job.id).links[0].closures[0].splices if s.fibre_a == 1)
        assert kept.loss_ab_db == 0.9


async def test_save_the_open_pair_onto_a_link_confirm_and_save_again(
    tmp_path: Path, pair_files: tuple[Path, Path]
) -> None:
    # pick the link, see what is kept, save; the second save supersedes the first (history)
    from fieldkit import locations
    from fieldkit.jobs.store import JobStore
    from fieldkit.tui.widgets.trace_dialogs import SaveTracesDialog

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Mill Lane")
    store.update(job.id, lambda j: j.add_link("L1") and None)
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, TracesScreen)
        screen.query_one("#traces-a", Input).value = str(pair_files[0])
        screen.query_one("#traces-b", Input).value = str(pair_files[1])
        await pilot.press("enter")
        await pilot.pause()
        opened = screen.session.paired
        assert opened is not None
        for number in (1, 2):
            await pilot.press("ctrl+s")
            await pilot.pause()
            await pilot.press("1")  # the traces themselves
            await pilot.pause()
            # the job: no file names it, so none is picked the first time (Down picks the
            # only one); then the last one used is offered
            await pilot.press("down", "enter")
            await pilot.press("enter")  # its link
            await pilot.pause()
            dialog = app.screen
            assert isinstance(dialog, SaveTracesDialog)
            what = str(dialog.query_one("#st-what", Static).render())
            assert "both directions averaged" in what and "F001_1550_AB.sor" in what
            assert "onto job Mill Lane, link L1" in str(dialog.query_one("#st-where").render())
            if number == 2:
                assert "1 earlier save(s) of the same stay, marked superseded" in what
            # the fibre comes from the file name (F001): Enter saves it
            assert dialog.query_one(".fibre-number", Input).value == "1"
            await pilot.press("enter")
            await app.workers.wait_for_complete()
            await pilot.pause()
            status = str(screen.query_one("#traces-status", Static).render())
            # the arrows as the workspace writes them (review C27)
            assert status.startswith("Saved 1 trace (fibre 1 A↔B 1550 nm) onto job Mill Lane")
            traces = store.load(job.id).links[0].traces
            assert len(traces) == number and traces[-1].current
        first, second = store.load(job.id).links[0].traces
        assert first.superseded_by == second.id  # the first stays, superseded
        # the splice at 1500 m is 0.25 dB from both ends (FIBRE above), kept averaged
        splice = min(second.events, key=lambda e: abs(e.distance_m - 1500.0))
        assert splice.average_db == pytest.approx(0.25, abs=0.02)
        # what was open is still open, and Esc in the dialog saves nothing
        assert screen.session.paired is not None
        await pilot.press("ctrl+s")
        await pilot.pause()
        await pilot.press("1")  # the traces themselves
        await pilot.pause()
        await pilot.press("enter", "enter")
        await pilot.pause()
        await pilot.press("escape")
        await pilot.pause()
        assert "Nothing saved" in str(screen.query_one("#traces-status", Static).render())
        assert len(store.load(job.id).links[0].traces) == 2
        assert screen.query_one("#traces-a", Input).value == str(pair_files[0])


async def test_save_a_whole_folder_at_44x22(tmp_path: Path, pair_files: tuple[Path, Path]) -> None:
    # the folder's table showing: every fibre is kept, no fibre number asked (the files give
    # theirs); the dialog and its Save button fit the small terminal
    from fieldkit import locations
    from fieldkit.jobs.store import JobStore
    from fieldkit.tui.widgets.trace_dialogs import SaveTracesDialog

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Mill Lane")
    store.update(job.id, lambda j: j.add_link("L1") and None)
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="traces")
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#traces-a", Input).value = str(pair_files[0].parent)
        await pilot.press("enter")
        await app.workers.wait_for_complete()
        await pilot.pause()
        await pilot.press("ctrl+s")
        await pilot.pause()
        await pilot.press("1")  # the traces themselves
        await pilot.pause()
        await pilot.press("down", "enter", "enter")  # nothing names the job: Down picks it
        await pilot.pause()
        dialog = app.screen
        assert isinstance(dialog, SaveTracesDialog) and not dialog.query(".fibre-number")
        assert "every fibre of the folder: 1" in str(dialog.query_one("#st-what").render())
        save = dialog.query_one("#st-save")
        assert save.region.bottom <= 22 and save.region.right <= 44 and save.has_focus
        await pilot.press("enter")
        await app.workers.wait_for_complete()
        await pilot.pause()
        [kept] = store.load(job.id).links[0].traces
        assert kept.fibre == 1 and kept.direction == "A<->B" and len(kept.curves) == 2
        assert "Saved 1 trace" in str(screen.query_one("#traces-status", Static).render())


async def test_sending_an_event_to_fault_brings_the_links_closures_and_keeps_typed_ones(
    tmp_path: Path,
) -> None:
    """Traces -> Fault: the closures of the link the traces name arrive as landmarks (a
    splicer expects the route's known points there); a landmark typed in Fault stays."""
    from fieldkit import locations
    from fieldkit.actions import splices as act
    from fieldkit.jobs.store import JobStore
    from fieldkit.tui.widgets.point_list import PointList

    ab, ba = tmp_path / "RT-9_F001_AB.sor", tmp_path / "RT-9_F001_BA.sor"  # they name link RT-9
    ab.write_bytes(write_sor(synth_trace(FIBRE, seed=1)))
    ba.write_bytes(write_sor(synth_trace(FIBRE.reversed(), seed=2)))
    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Mill Lane")
    store.update(job.id, lambda j: j.add_link("RT-9") and None)
    # the splice at 1500 m of fibre (FIBRE above) sits at closure JC-7, 1480 m along the route
    act.add_closure(store, job.id, "RT-9", "JC-7", route_distance_m=1480.0, by="Ana")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="fault")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        fault = app.screen
        assert isinstance(fault, FaultScreen)
        fault.query_one("#fault-landmarks-name", Input).value = "HH-2"
        fault.query_one("#fault-landmarks-otdr", Input).value = "820 m"
        fault.query_one("#fault-landmarks-route", Input).value = "805 m"
        fault.query_one("#fault-landmarks-route", Input).focus()
        await pilot.press("enter")  # adds the typed row
        await app.switch_mode("traces")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, TracesScreen)
        screen.query_one("#traces-a", Input).value = str(ab)
        screen.query_one("#traces-b", Input).value = str(ba)
        await pilot.press("enter")
        await pilot.pause()
        plot = screen.query_one("#traces-plot", TracePlot)
        plot.focus()
        await pilot.press("pagedown")  # event 2, the connector at 2600 m
        await pilot.press("ctrl+g")
        await pilot.pause()
        assert app.screen is fault
        rows = fault.query_one("#fault-landmarks", PointList).rows
        assert rows[0] == {"name": "HH-2", "otdr": "820 m", "route": "805 m"}  # typed: kept
        assert [r["name"] for r in rows] == ["HH-2", "JC-7"]
        assert float(rows[1]["otdr"].removesuffix(" m")) == pytest.approx(1500.0, abs=2.0)
        assert rows[1]["route"] == "1480.0 m"
