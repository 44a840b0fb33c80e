"""Both directions of one fibre: alignment, matching, averaging, gainers; a folder's table."""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldkit.traces.analysis import analyse_trace
from fieldkit.traces.folder import analyse_folder, direction_token, fibre_label
from fieldkit.traces.model import TraceFileError
from fieldkit.traces.pairing import pair
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace

# A fusion splice of 0.10 dB between fibres whose backscatter coefficient differs by 0.40 dB
# (a smaller mode-field diameter after it, e.g. G.652 to G.657): from A the display steps by
# 0.10 - 0.20 = -0.10 dB (a gainer), from B by 0.10 + 0.20 = 0.30 dB; the mean is 0.10 dB.
SPLICE_DB = 0.10
DELTA_B_DB = 0.40
FIBRE = SynthFibre(
    length_m=9000.0,
    spacing_m=1.0,
    dynamic_range_db=18.0,
    events=(
        SynthEvent(2500.0, 0.08),
        SynthEvent(5200.0, SPLICE_DB, None, backscatter_change_db=DELTA_B_DB),
    ),
)


@pytest.fixture(scope="module")
def paired():
    ab = analyse_trace(synth_trace(FIBRE, seed=11, source="ab"))
    ba = analyse_trace(synth_trace(FIBRE.reversed(), seed=12, source="ba"))
    return pair(ab, ba)


def test_gainer_from_one_end_averages_to_the_true_loss(paired):
    e = next(e for e in paired.events if abs(e.distance_m - 5200.0) < 3)
    assert e.loss_ab_db == pytest.approx(SPLICE_DB - DELTA_B_DB / 2, abs=0.02)
    assert e.loss_ba_db == pytest.approx(SPLICE_DB + DELTA_B_DB / 2, abs=0.02)
    assert e.average_db == pytest.approx(SPLICE_DB, abs=0.02)
    assert e.kind == "splice"
    assert "gainer A→B" in e.note
    assert e.verdict == "pass"


def test_distances_are_from_end_a_and_lengths_agree(paired):
    assert paired.length_m == pytest.approx(9000.0, abs=2.0)
    kinds = [(round(e.distance_m), e.kind) for e in paired.events]
    assert [k for _, k in kinds] == ["splice", "splice", "end"]
    assert paired.events[0].distance_m == pytest.approx(2500.0, abs=2.0)
    assert paired.events[0].average_db == pytest.approx(0.08, abs=0.02)
    assert paired.notes == ()


def test_json_shape(paired):
    data = paired.to_json()
    assert {"distance_m", "loss_ab_db", "loss_ba_db", "average_db"} <= set(data["events"][0])


def test_a_trace_without_an_end_cannot_be_paired():
    long = SynthFibre(length_m=20_000.0, spacing_m=2.0, points=4000, dynamic_range_db=20.0)
    a = analyse_trace(synth_trace(long, source="long"))
    b = analyse_trace(synth_trace(FIBRE, source="b"))
    with pytest.raises(TraceFileError, match="long: no end of fibre"):
        pair(a, b)


def test_different_wavelengths_are_refused():
    from dataclasses import replace

    a = analyse_trace(synth_trace(FIBRE, source="a"))
    b = analyse_trace(synth_trace(replace(FIBRE, wavelength_nm=1310.0), source="b"))
    with pytest.raises(TraceFileError, match="same wavelength"):
        pair(a, b)


@pytest.mark.parametrize(
    ("name", "fibre", "direction"),
    [
        ("F012_1550_AB.sor", "12", "AB"),
        ("cable-3 fibre 7 b-a.csv", "3", "BA"),
        ("1310_fibre005_AtoB.sor", "5", "AB"),
        ("trace.sor", "trace", None),
    ],
)
def test_file_names_give_fibre_and_direction(name, fibre, direction):
    from fieldkit.traces.synthetic import synth_trace as make

    trace = make(SynthFibre(length_m=100.0, spacing_m=1.0, fibre_id=""))
    assert fibre_label(trace, name) == fibre
    assert direction_token(name) == direction


def test_a_folder_becomes_one_row_per_fibre(tmp_path: Path):
    for number in (1, 2):
        for direction, f in (("AB", FIBRE), ("BA", FIBRE.reversed())):
            trace = synth_trace(f, seed=number * 10 + len(direction), source="x")
            (tmp_path / f"F{number:03d}_1550_{direction}.sor").write_bytes(write_sor(trace))
    (tmp_path / "F003_1550_AB.sor").write_bytes(b"Map\0broken")
    (tmp_path / "notes.md").write_text("not a trace")
    seen: list[tuple[int, int]] = []
    result = analyse_folder(tmp_path, progress=lambda done, total, _n: seen.append((done, total)))
    assert seen[-1] == (5, 5)
    assert [r.fibre for r in result.rows] == ["1", "2"]
    assert all(r.paired is not None for r in result.rows)
    assert result.rows[0].worst()[1] == pytest.approx(SPLICE_DB, abs=0.03)
    assert [n for n, _ in result.unread] == ["F003_1550_AB.sor"]
