"""The Traces workspace's session, at unit speed: what goes into a job (one trace, a pair, a
folder's fibres), what the save dialog says, the views it cycles and the folder's table."""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldkit.calc.units import InputError
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.session import TraceSession
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

# a 3 km fibre with one 0.2 dB splice at 1200 m (the physical model, synthetic.py)
FIBRE = SynthFibre(length_m=3000.0, events=(SynthEvent(1200.0, 0.2),), fibre_id="")


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("cable")
    for number in (1, 2):
        (out / f"F00{number}_1550_AB.sor").write_bytes(
            write_sor(synth_trace(FIBRE, seed=number, source=f"F00{number}_1550_AB.sor"))
        )
    # fibre 3 traced from end B only
    (out / "F003_1550_BA.sor").write_bytes(write_sor(synth_trace(FIBRE.reversed(), seed=7)))
    (out / "F001_1550_BA.sor").write_bytes(write_sor(synth_trace(FIBRE.reversed(), seed=9)))
    return out


def test_a_pair_goes_in_as_one_averaged_fibre(folder: Path) -> None:
    s = TraceSession()
    s.open(str(folder / "F001_1550_AB.sor"), str(folder / "F001_1550_BA.sor"))
    assert s.fibre_number() == 1  # from the file name
    [ft] = s.fibres(1)
    assert ft.paired is s.paired and ft.key == (1, 1550.0, "A<->B")
    lines = s.save_lines(set())
    assert lines[0] == "this fibre, both directions averaged: F001_1550_AB.sor, F001_1550_BA.sor"
    assert lines[1].startswith("judged by limits (")
    assert len(lines) == 2  # nothing saved before: nothing superseded
    assert "1 earlier save(s)" in s.save_lines({(1, 1550.0, "A<->B")})[-1]
    with pytest.raises(TraceFileError, match="fibre number"):
        s.fibres(None)


def test_a_folder_goes_in_fibre_by_fibre_each_direction_kept(folder: Path) -> None:
    s = TraceSession()
    s.open_folder(str(folder))
    assert s.whole_folder and s.folder_counts() == "4 files, 3 fibres, 0 failed"
    keys = [ft.key for ft in s.fibres(None)]
    assert keys == [(1, 1550.0, "A<->B"), (2, 1550.0, "A->B"), (3, 1550.0, "B->A")]
    lines = s.save_lines(set())
    assert lines[0].startswith("every fibre of the folder: 3")
    # all at 1550 nm: judged by G.652.D's 0.3 dB/km there (verdicts.py, from memory)
    assert lines[1].endswith("0.30 dB/km")
    assert "shipped defaults, G.652.D" in lines[1]  # said plainly: no link judged (review C38)
    # a fibre opened from the folder's table keeps its direction: fibre 3 is B->A
    s.open_row(s.folder.rows[2])  # type: ignore[union-attr]
    assert not s.whole_folder and s.fibres(3)[0].key == (3, 1550.0, "B->A")
    assert s.close_fibre() and s.whole_folder


def test_a_folder_fibre_without_a_number_is_refused_before_anything_is_saved(
    folder: Path, tmp_path: Path
) -> None:
    (tmp_path / "spare_AB.sor").write_bytes((folder / "F002_1550_AB.sor").read_bytes())
    s = TraceSession()
    s.open_folder(str(tmp_path))
    with pytest.raises(InputError, match="no fibre number"):
        s.fibres(None)


def test_views_cycle_through_both_directions(folder: Path) -> None:
    s = TraceSession()
    assert s.cycle_view() is None  # nothing open
    s.open(str(folder / "F001_1550_AB.sor"), str(folder / "F001_1550_BA.sor"))
    seen = [s.cycle_view() for _ in range(4)]
    # the writer here records no instrument events, so only the two directions alternate
    assert seen[:2] == ["B→A: our events", "A→B: our events"]
    assert seen[2:] == seen[:2]


def test_the_folders_table_has_one_row_per_fibre(folder: Path) -> None:
    s = TraceSession()
    s.open_folder(str(folder))
    wide, narrow = s.folder_rows(True), s.folder_rows(False)
    assert [r[0] for r in wide] == ["1", "2", "3"]
    assert len(wide[0]) == len(s.folder_columns(True)) and len(narrow[0]) == 4
    assert wide[0][2] == "A→B+B→A" and wide[2][2] == "B→A"
    # the worst event of fibre 2 is the 0.2 dB splice (one way, within 0.03 dB at this noise)
    assert float(wide[1][4]) == pytest.approx(0.2, abs=0.03)
