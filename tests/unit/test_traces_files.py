"""The standard record (our writer and reader agree, the checksum guards it) and text traces."""

from __future__ import annotations

import struct
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from fieldkit.traces.files import ReadOptions, read_trace, read_trace_bytes
from fieldkit.traces.model import InstrumentEvent, TraceFileError
from fieldkit.traces.sor import crc16, read_sor, write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace
from fieldkit.traces.textfile import read_text

FIBRE = SynthFibre(
    length_m=3000.0,
    spacing_m=0.5,
    events=(SynthEvent(1200.0, 0.2),),
    fibre_id="12",
    cable_id="Mill Lane feeder",
    origin="Exchange",
    destination="Cabinet 4",
)
EVENTS = (
    InstrumentEvent(1, 1200.0, 0.2, None, "0F9999", "splice at closure 3"),
    InstrumentEvent(2, 3000.0, None, -14.7, "1E9999"),
)


@pytest.fixture(scope="module")
def record() -> tuple[object, bytes]:
    trace = replace(synth_trace(FIBRE), acquired_unix_s=1_780_000_000)
    return trace, write_sor(trace, events=EVENTS)


def test_crc16_check_value():
    # CRC-16 with polynomial 0x1021, initial 0xFFFF, unreflected: the catalogued check value
    # of the ASCII digits "123456789" is 0x29B1 (from memory)
    assert crc16(b"123456789") == 0x29B1


def test_round_trip_keeps_levels_spacing_and_fields(record):
    trace, data = record
    back = read_sor(data, "x.sor")
    assert back.points == trace.points
    # levels are stored in 0.001 dB steps below the highest level: within half a step
    offset = float(trace.level_db.max())
    assert np.max(np.abs(back.level_db + offset - trace.level_db)) <= 0.0005 + 1e-9
    # the spacing is stored as a time for 10 000 points in 100 ps: relative error ~1e-6
    assert back.spacing_m == pytest.approx(0.5, rel=1e-5)
    assert back.wavelength_nm == 1550.0
    assert back.pulse_width_ns == 30.0
    assert back.group_index == pytest.approx(1.4677, abs=1e-5)  # the synthetic default
    assert back.backscatter_db == pytest.approx(-82.0)
    assert (back.fibre_id, back.cable_id, back.origin, back.destination) == (
        "12",
        "Mill Lane feeder",
        "Exchange",
        "Cabinet 4",
    )
    assert back.acquired_unix_s == 1_780_000_000


def test_round_trip_keeps_the_instruments_events_apart(record):
    _, data = record
    back = read_sor(data, "x.sor")
    assert [e.kind for e in back.instrument_events] == ["splice", "end"]
    first, end = back.instrument_events
    # event times are stored in 100 ps: 0.01 m of fibre
    assert first.distance_m == pytest.approx(1200.0, abs=0.02)
    assert first.loss_db == pytest.approx(0.2)
    assert first.comment == "splice at closure 3"
    assert end.reflectance_db == pytest.approx(-14.7)
    assert end.loss_db is None


def test_checksum_is_the_last_two_bytes(record):
    _, data = record
    assert struct.unpack("<H", data[-2:])[0] == crc16(data[:-2])


def test_a_changed_byte_fails_the_checksum(record):
    _, data = record
    damaged = bytearray(data)
    damaged[len(data) // 2] ^= 0x01
    with pytest.raises(TraceFileError, match="checksum does not match"):
        read_sor(bytes(damaged), "x.sor")
    # and reads anyway when asked
    read_sor(bytes(damaged), "x.sor", check_checksum=False)


@pytest.mark.parametrize("cut", [5, 40, 300, -100])
def test_truncated_records_get_one_clear_message(record, cut):
    _, data = record
    with pytest.raises(TraceFileError) as info:
        read_sor(data[:cut], "x.sor")
    message = str(info.value)
    assert message.startswith("x.sor: ") and "\n" not in message
    assert any(w in message for w in ("truncated", "too short", "ends early", "damaged"))


def test_foreign_and_issue_1_files(record):
    with pytest.raises(TraceFileError, match="not an OTDR record"):
        read_sor(b"PK\x03\x04" + bytes(100), "x.sor")
    with pytest.raises(TraceFileError, match="issue 1"):
        read_sor(struct.pack("<H", 100) + bytes(100), "x.sor")


def test_a_damaged_block_name(record):
    _, data = record
    at = data.index(b"FxdParams\0", data.index(b"FxdParams\0") + 1)  # the block, not the map
    damaged = data[:at] + b"Fxdxxxxxx\0" + data[at + 10 :]
    with pytest.raises(TraceFileError, match="FxdParams block does not start"):
        read_sor(damaged, "x.sor", check_checksum=False)


def test_files_are_told_apart_by_content(tmp_path: Path, record):
    _, data = record
    (tmp_path / "a.bin").write_bytes(data)
    assert read_trace(tmp_path / "a.bin").file_format == "SR-4731"
    with pytest.raises(TraceFileError, match="no such file"):
        read_trace(tmp_path / "missing.sor")
    with pytest.raises(TraceFileError, match="neither an OTDR record nor"):
        read_trace_bytes(b"\xff\xfe\x00garbage", "b.csv")


def _rows(n: int = 50, sep: str = ",", comma: bool = False) -> str:
    lines = []
    for k in range(n):
        d, lv = f"{k * 0.01:.3f}", f"{-0.35 * k * 0.01:.4f}"
        if comma:
            d, lv = d.replace(".", ","), lv.replace(".", ",")
        lines.append(f"{d}{sep}{lv}")
    return "\n".join(lines)


@pytest.mark.parametrize(
    ("header", "sep", "comma", "spacing"),
    [
        ("distance_km,level_db", ",", False, 10.0),
        ("distance_m;level_db", ";", True, 0.01),
        ("distance (km)\tlevel (dB)", "\t", True, 10.0),
        ("# a comment first\ndistance_ft,level_db", ",", False, 0.01 * 0.3048),
    ],
)
def test_text_headers_and_decimal_commas(header, sep, comma, spacing):
    trace = read_text(header + "\n" + _rows(sep=sep, comma=comma), "t.csv")
    assert trace.points == 50
    assert trace.spacing_m == pytest.approx(spacing, rel=1e-9)
    assert trace.level_db[10] == pytest.approx(-0.035)


def test_text_without_header_takes_the_unit_option():
    with pytest.raises(TraceFileError, match="distance unit is not named"):
        read_text(_rows(), "t.csv")
    assert read_text(_rows(), "t.csv", distance_unit="km").spacing_m == pytest.approx(10.0)


@pytest.mark.parametrize(
    ("text", "problem"),
    [
        ("distance_m,level_db\n" + _rows(10), "at least 40"),
        ("distance_m;level_db\n1.234,5;-1\n" + _rows(50, ";"), "both a point and a comma"),
        ("distance_m,level_db\n" + _rows(50) + "\n0.2,x", "not a number"),
        ("distance_m,level_db\n" + _rows(50) + "\n0.1,-1", "does not increase"),
        ("km,level\n" + _rows(50), "does not name a distance"),
        ("distance_m,level_db,extra\n" + _rows(50), "two columns"),
        ("distance_m,level_db\n" + _rows(50) + "\n0.6,nan", "not a number"),
    ],
)
def test_bad_text_traces_name_the_problem(text, problem):
    with pytest.raises(TraceFileError, match=problem):
        read_text(text, "t.csv")


def test_uneven_text_trace_is_resampled_and_says_so():
    lines = ["distance_m,level_db"] + [
        f"{k + (0.3 if k % 2 else 0)},{-0.001 * k}" for k in range(60)
    ]
    trace = read_text("\n".join(lines), "t.csv")
    assert trace.notes and "resampled" in trace.notes[0]


def test_read_options_fill_what_text_lacks():
    trace = read_trace_bytes(
        ("distance_m,level_db\n" + _rows()).encode(),
        "t.csv",
        ReadOptions(wavelength_nm=1310.0, pulse_width_ns=100.0),
    )
    assert trace.wavelength_nm == 1310.0 and trace.pulse_width_ns == 100.0
