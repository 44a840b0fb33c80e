"""The trace plot's plain parts (drawing, zoom, pan, jumps) and the Traces workspace's session."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from fieldkit.traces.model import TraceFileError
from fieldkit.traces.session import Closure, TraceSession
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace
from fieldkit.tui.widgets.trace_plot import Mark, PlotView, braille_rows


def test_braille_draws_a_falling_line_corner_to_corner():
    x = np.linspace(0.0, 10.0, 200)
    rows = braille_rows(x, -x, 10, 3, (0.0, 10.0), (-10.0, 0.0))
    assert len(rows) == 3 and all(len(r) == 10 for r in rows)
    # top-left and bottom-right cells hold dots, the opposite corners none (U+2800 is blank)
    assert rows[0][0] != "\u2800" and rows[-1][-1] != "\u2800"
    assert rows[0][-1] == "\u2800" and rows[-1][0] == "\u2800"


def test_braille_keeps_a_one_sample_spike():
    x = np.arange(1000, dtype=float)
    y = np.zeros(1000)
    y[500] = 10.0  # one sample in 1000, 20 dot columns: must still reach the top row
    rows = braille_rows(x, y, 10, 2, (0.0, 999.0), (0.0, 10.0))
    assert any(ch != "\u2800" for ch in rows[0])


MARKS = [Mark(1, 1000.0, "splice"), Mark(2, 2500.0, "reflective"), Mark(3, 4000.0, "end")]


def test_view_starts_on_the_fibre_and_zooms_around_the_cursor():
    v = PlotView.of(0.0, 6000.0, MARKS)
    # the end at 4000 m and a little past it, to a round figure (review C37): 4200 m
    assert v.end_m == pytest.approx(4200.0)
    v.set_cursor(2000.0)
    v.zoom(0.5)
    assert v.span_m == pytest.approx(4200.0 / 2)
    assert v.start_m < 2000.0 < v.end_m
    v.pan(10.0)  # far past the end: clamped to the trace
    assert v.end_m == pytest.approx(6000.0)
    v.reset()
    assert v.start_m == 0.0


def test_jumps_walk_the_events_and_stop_at_the_ends():
    v = PlotView.of(0.0, 6000.0, MARKS)
    assert v.jump(1) is MARKS[0]
    assert v.jump(1) is MARKS[1] and v.cursor_m == 2500.0
    v.jump(1)
    assert v.jump(1) is MARKS[2]
    assert v.jump(-1) is MARKS[1]


FIBRE = SynthFibre(
    length_m=4000.0, spacing_m=1.0, dynamic_range_db=18.0, events=(SynthEvent(1500.0, 0.25),)
)


@pytest.fixture
def files(tmp_path: Path) -> tuple[str, str]:
    ab, ba = tmp_path / "F1_AB.sor", tmp_path / "F1_BA.sor"
    ab.write_bytes(write_sor(synth_trace(FIBRE, seed=1)))
    ba.write_bytes(write_sor(synth_trace(FIBRE.reversed(), seed=2)))
    return str(ab), str(ba)


def test_session_opens_a_pair_and_hands_the_break_to_fault(files):
    s = TraceSession()
    assert "pair: 4000" in s.open(*files)
    assert [r[2] for r in s.rows(wide=True)] == ["splice/bend", "end"]  # no closure known
    hand = s.fault_handoff(None, [Closure("closure 3", 1480.0)])
    assert hand.distance_m == pytest.approx(4000.0, abs=2.0)
    assert hand.group_index == pytest.approx(1.4677)  # the trace's: the G.652.D 1550 nm preset
    # the closure at 1480 m of route matches the splice found at 1500 m: a 1.4 % helix, inside
    # the 0-3 % a cable has (common practice; fieldkit.traces.closures)
    assert hand.landmarks[0][0] == "closure 3"
    assert hand.landmarks[0][1] == pytest.approx(1500.0, abs=2.0)
    assert "break" in hand.note


def test_session_shows_the_other_direction_in_its_own_frame(files):
    s = TraceSession()
    s.open(*files)
    assert s.toggle_direction() == "showing B→A"
    splice = s.marks()[0]
    assert splice.distance_m == pytest.approx(4000.0 - 1500.0, abs=3.0)


def test_session_keeps_its_state_when_a_file_is_bad(files, tmp_path: Path):
    s = TraceSession()
    s.open(files[0])
    (tmp_path / "bad.sor").write_bytes(b"nonsense")
    with pytest.raises(TraceFileError):
        s.open(files[0], str(tmp_path / "bad.sor"))
    assert s.a is not None and s.paired is None
    with pytest.raises(TraceFileError, match="type the path"):
        s.open("  ")
