"""The Traces workspace on the demo's own traces (fieldkit.traces.demo: fibres 6 and 7 of link
LIB-TH-01, both ends at 1550 nm) with the demo jobs in the store: which link Ctrl+S offers,
the caution, the digits and the limits line. Review items A5, A12, B17, B23, C29, C37, C38.
"""

from __future__ import annotations

import textwrap
from pathlib import Path
from typing import Any

import pytest
from textual.widgets import DataTable, Input, OptionList, Static

from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.ids import now
from fieldkit.jobs.store import JobStore
from fieldkit.locations import jobs_dir
from fieldkit.traces.demo import demo_trace_files
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.traces import TracesScreen
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

BACKBONE = "de30000000000001"  # the demo job holding link LIB-TH-01


def _demo(tmp_path: Path, folder_name: str = "LIB-TH-01") -> tuple[Any, Path]:
    data = tmp_path / "d"
    store = JobStore(jobs_dir(data))
    for job in build(local_day_start(now())):
        store.save(job)
    folder = tmp_path / "traces" / folder_name
    folder.mkdir(parents=True)
    for name, blob in demo_trace_files().items():
        (folder / name).write_bytes(blob)
    app = make_app(data_dir=data, config_dir=tmp_path / "c", start_mode="traces")
    return app, folder


async def _open(pilot: Any, path: str) -> TracesScreen:
    screen = pilot.app.screen
    assert isinstance(screen, TracesScreen)
    field = screen.query_one("#traces-a", Input)
    field.focus()
    field.value = path
    await pilot.press("enter")
    for _ in range(50):
        await pilot.pause(0.05)
        if screen.session.folder is not None or screen.session.a is not None:
            break
    await pilot.pause()
    return screen


async def _save_traces(pilot: Any) -> None:
    """Ctrl+S, then "the traces" (the first choice) in what goes onto the link."""
    await pilot.press("ctrl+s")
    await pilot.pause()
    await pilot.press("enter")
    await pilot.pause(0.2)


def _picked(app: Any) -> tuple[str | None, str | None]:
    picker = app.screen
    assert isinstance(picker, JobLinkPicker)
    jobs = picker.query_one("#jlp-jobs", OptionList)
    links = picker.query_one("#jlp-links", OptionList)
    job = jobs.get_option_at_index(jobs.highlighted).id if jobs.highlighted is not None else None
    link = (
        links.get_option_at_index(links.highlighted).id if links.highlighted is not None else None
    )
    return job, link


async def test_save_picker_offers_the_link_the_folder_names(tmp_path: Path) -> None:
    """A5: folder LIB-TH-01 (the demo's backbone link) -> Ctrl+S offers that job and link,
    not the newest job (Station Road)."""
    app, folder = _demo(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await _open(pilot, str(folder))
        await _save_traces(pilot)
        job = app.store.load(BACKBONE)
        assert _picked(app) == (BACKBONE, job.link_by_label("LIB-TH-01").id)


async def test_save_picker_picks_nothing_when_nothing_names_a_link(tmp_path: Path) -> None:
    """A5: traces naming no link and no link used before: no job picked, Enter saves nowhere."""
    app, folder = _demo(tmp_path, "unsorted")
    for path in folder.iterdir():  # a record without a cable id instead
        path.unlink()
    fibre = SynthFibre(length_m=3000.0, spacing_m=1.0, events=(SynthEvent(1200.0, 0.2),))
    (folder / "trace.sor").write_bytes(write_sor(synth_trace(fibre, seed=3)))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await _open(pilot, str(folder / "trace.sor"))
        assert screen.session.a is not None
        await _save_traces(pilot)
        assert _picked(app) == (None, None)
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)  # still asking


@pytest.mark.parametrize("size", [(80, 24), (72, 24), (44, 22)], ids=["80x24", "72x24", "44x22"])
async def test_the_otdr_caution_is_shown_whole(tmp_path: Path, size: tuple[int, int]) -> None:
    """B17: the caution's words all fit its lines (at 80x24 it lost its last word, "port.")."""
    app, folder = _demo(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = await _open(pilot, str(folder))
        caution = screen.query_one("#traces-caution", Static)
        text = str(caution.render())
        lines = textwrap.wrap(text, caution.content_size.width)
        assert len(lines) <= caution.content_size.height, lines
        assert "invisible" in text.lower() and "live fibre" in text.lower()


async def _open_fibre_7(pilot: Any, folder: Path) -> TracesScreen:
    screen = await _open(pilot, str(folder))
    await pilot.press("down", "enter")  # the folder's second row: fibre 7
    await pilot.pause()
    assert screen.session.paired is not None
    return screen


@pytest.mark.parametrize("size", [(80, 24), (44, 22)], ids=["80x24", "44x22"])
async def test_fibre_7_reads_as_the_splice_log_and_says_its_limits(
    tmp_path: Path, size: tuple[int, int]
) -> None:
    """C29, A12, C38 on the demo's fibre 7: the JC-3 loss to 2 decimals as the splice log and
    the report give it (0.21 dB from A, 0.47 dB from B, 0.34 dB averaged: fieldkit.traces.demo,
    ITU-T G.650.3 averaging), the limit "0.30 dB"; the events are splices or bends (no closure
    is known without a link) judged by the splice maximum, and the limits are said to be the
    shipped defaults until a job's link is chosen (Ctrl+S)."""
    app, folder = _demo(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = await _open_fibre_7(pilot, folder)
        table = screen.query_one("#traces-table", DataTable)
        first = [str(c) for c in table.get_row_at(0)]
        if screen.wide:
            assert first[2:6] == ["splice/bend", "0.21", "0.47", "0.34"]
        else:
            assert first[2:4] == ["splice/bend", "0.34"]
        note = str(screen.query_one("#traces-note", Static).render())
        assert "splice max 0.30 dB" in note and "splice or bend" in note
        assert "Shipped" in note and "G.652.D" in note and "^S" in note
        await _save_traces(pilot)  # LIB-TH-01 offered; its presets judge from now on
        await pilot.press("enter", "enter")  # the job, its link
        await pilot.pause(0.2)
        await pilot.press("escape")  # nothing saved
        await pilot.pause()
        note = str(screen.query_one("#traces-note", Static).render())
        assert "Shipped" not in note and "the link's fusion splice limit" in note
        # the link's closure JC-3 (route 1150 m, fieldkit.jobs.demo) is at event 1 (1162 m):
        # a splice there; the loss at 1815 m matches no closure: still a splice or a bend
        kinds = [str(table.get_row_at(k)[2]) for k in range(2)]
        assert kinds == ["splice", "splice/bend"]
        assert "at closure JC-3 Market Street" in note and "splice or bend" not in note


async def test_the_distance_axis_ends_on_a_round_figure_past_the_fibre_end(tmp_path: Path) -> None:
    """C37: fibre 7 ends at 1840 m (fieldkit.traces.demo): the axis ends at 2000 m, a round
    figure a little past the end (was 1997 m, the end x 1.08 + 10 m)."""
    from fieldkit.tui.widgets.trace_plot import TracePlot

    app, folder = _demo(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await _open_fibre_7(pilot, folder)
        plot = screen.query_one("#traces-plot", TracePlot)
        axis = str(plot.render()).splitlines()[-2]
        assert axis.split()[0] == "0" and axis.rstrip().endswith("2000 m"), axis
        assert plot.view is not None and 1840.0 < plot.view.end_m


async def test_a_long_folder_path_shows_its_end_and_marks_the_cut_start(tmp_path: Path) -> None:
    """B23: the field too narrow for the path shows its end (LIB-TH-01) and, once the folder
    is open (the table has the focus), "…" where its start is cut, not a cut '/tmp' that reads
    as another absolute path."""
    app, folder = _demo(tmp_path)
    deep = tmp_path / "a-long-folder-name-for-the-field" / "of-the-crew" / "traces"
    deep.mkdir(parents=True)
    (deep / "LIB-TH-01").symlink_to(folder, target_is_directory=True)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await _open(pilot, str(deep / "LIB-TH-01"))
        field = screen.query_one("#traces-a", Input)
        assert not field.has_focus and len(field.value) > field.content_size.width
        shown = "".join(s.text for s in field.render_line(0)).rstrip()
        assert shown.startswith("…") and shown.endswith("LIB-TH-01"), shown
        assert field.value == str(deep / "LIB-TH-01")  # the typed path stays as typed


async def test_negative_levels_take_the_typographic_minus(tmp_path: Path) -> None:
    """C26: the project's policy (README, "The command line": results print negative numbers
    with U+2212): the level axis and the cursor readout of fibre 7, the limits line."""
    from fieldkit.tui.widgets.trace_plot import TracePlot

    app, folder = _demo(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = await _open_fibre_7(pilot, folder)
        drawn = str(screen.query_one("#traces-plot", TracePlot).render())
        assert "\u221213.4 dB" in drawn and "-13" not in drawn
        assert "reflectance \u2212" in screen.session.limits_summary()  # -45 dB (IEC 61753-1)
