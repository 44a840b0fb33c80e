"""The standard OTDR record (SR-4731 issue 2, GR-196 Appendix A): reader and writer.

Built from the published structure as we remember it; no other reader's code was used or looked
at. What rests on memory (check each against the standard before relying on it for foreign
files; our writer and reader agree with each other, and the tests prove that):

- The file is a sequence of blocks. The first, ``Map``, starts with its name (NUL-terminated),
  a revision (uint16, 200 for issue 2), its own size (uint32) and the number of blocks
  including itself (int16), then per block its name (NUL-terminated), revision (uint16) and
  size in bytes (uint32). The blocks follow in that order, each starting with its own name.
  An issue 1 record has no names at the block starts and starts with the revision (100).
- All numbers are little-endian; strings are NUL-terminated; fixed-length codes are not.
- ``GenParams``: language (2 chars), cable ID, fibre ID, fibre type (int16, e.g. 652),
  nominal wavelength (int16, nm), originating and terminating locations, cable code, current
  data flag (2 chars), user offset (int32), user offset distance (int32), operator, comment.
- ``SupParams``: supplier, mainframe ID and serial, optical module ID and serial, software
  revision, other (all strings).
- ``FxdParams``: date/time (uint32, Unix seconds), distance units (2 chars), actual wavelength
  (int16, 0.1 nm), acquisition offset (int32), acquisition offset distance (int32), number of
  pulse widths (int16, N), then N pulse widths (int16, ns), N data spacings (int32, the time
  for 10 000 points in 100 ps units), N point counts (int32); group index (int32, ×100 000),
  backscatter coefficient (uint16, −0.1 dB units), number of averages (int32), averaging time
  (uint16, 0.1 s), acquisition range (int32), its distance (int32), front-panel offset (int32),
  noise floor level (uint16), its scale (int16), power offset of the first point (uint16),
  loss threshold (uint16, 0.001 dB), reflectance threshold (uint16, −0.001 dB), end-of-fibre
  threshold (uint16, 0.001 dB), trace type (2 chars), window coordinates (4 × int32).
- Times (data spacing, acquisition offset, event times) are taken as round-trip times, so a
  distance is c·t/(2·n). This is the part we are least sure of.
- ``KeyEvents``: count (int16), then per event: number (int16), time (int32, 100 ps), lead-in
  attenuation (int16, 0.001 dB/km), loss (int16, 0.001 dB), reflectance (int32, 0.001 dB),
  code (6 chars: reflective 0/1/2, found F / manual M / end E, then four more), loss technique
  (2 chars, "LS" least squares, "2P" two-point), five marker times (int32), comment (string);
  then end-to-end loss (int32, 0.001 dB), two markers (int32), ORL (uint16, 0.001 dB), two
  markers (int32).
- ``DataPts``: number of points (int32), number of scale factors (int16), then per scale:
  points (int32) and scale (int16, 1000 = 1.0), followed by the points as uint16, each the
  level in 0.001 dB below the trace's reference (so level = −value × 0.001 × scale).
- ``Cksum``: a CRC-16 (polynomial 0x1021, initial value 0xFFFF, not reflected: the CCITT
  form) of every byte of the file before the checksum value, stored as uint16.
"""

from __future__ import annotations

import binascii
import math
import struct
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from fieldkit.calc.otdr import C_M_PER_S
from fieldkit.traces.model import InstrumentEvent, Trace, TraceFileError

MAP = "Map"
REVISION = 200
#: The blocks our writer produces, in order.
BLOCKS = ("GenParams", "SupParams", "FxdParams", "KeyEvents", "DataPts", "Cksum")
#: Refuse anything bigger than this before parsing (a real trace is well under a megabyte).
MAX_FILE_BYTES = 64 * 1024 * 1024


def crc16(data: bytes) -> int:
    """CRC-16 with polynomial 0x1021 and initial value 0xFFFF, not reflected (CCITT form).

    binascii's ``crc_hqx`` is this CRC computed in C: 288 files of 64 kB take milliseconds.
    """
    return binascii.crc_hqx(data, 0xFFFF)


def _time_to_m(time_100ps: float, group_index: float) -> float:
    return C_M_PER_S * time_100ps * 1e-10 / (2.0 * group_index)


def _m_to_time(distance_m: float, group_index: float) -> float:
    return distance_m * 2.0 * group_index / (C_M_PER_S * 1e-10)


# -- reading -----------------------------------------------------------------------------------


class _Cursor:
    """Little-endian fields from one block; running past its end is a damaged-file error."""

    def __init__(self, data: bytes, start: int, end: int, block: str, source: str) -> None:
        self.data, self.pos, self.end, self.block, self.source = data, start, end, block, source

    def _fail(self) -> TraceFileError:
        return TraceFileError(
            f"{self.source}: damaged OTDR record: the {self.block} block ends early"
        )

    def take(self, fmt: str) -> tuple[int | float, ...]:
        size = struct.calcsize("<" + fmt)
        if self.pos + size > self.end:
            raise self._fail()
        values = struct.unpack_from("<" + fmt, self.data, self.pos)
        self.pos += size
        return values

    def num(self, fmt: str) -> int:
        return int(self.take(fmt)[0])

    def chars(self, n: int) -> str:
        if self.pos + n > self.end:
            raise self._fail()
        raw = self.data[self.pos : self.pos + n]
        self.pos += n
        return raw.decode("latin-1")

    def string(self) -> str:
        stop = self.data.find(b"\0", self.pos, self.end)
        if stop < 0:
            raise self._fail()
        raw = self.data[self.pos : stop]
        self.pos = stop + 1
        return raw.decode("utf-8", errors="replace")


@dataclass(frozen=True, slots=True)
class _Entry:
    name: str
    revision: int
    size: int
    offset: int


def _read_map(data: bytes, source: str) -> list[_Entry]:
    if len(data) < 12:
        raise TraceFileError(f"{source}: too short to be an OTDR record ({len(data)} bytes)")
    if not data.startswith(b"Map\0"):
        first = struct.unpack_from("<H", data, 0)[0]
        if 100 <= first < 200:
            raise TraceFileError(
                f"{source}: an SR-4731 issue 1 record; only issue 2 records are read"
            )
        raise TraceFileError(f"{source}: not an OTDR record (no map block at the start)")
    cur = _Cursor(data, 4, len(data), "Map", source)
    revision = cur.num("H")
    map_size = cur.num("I")
    count = cur.num("h")
    if revision < 200 or revision >= 300:
        raise TraceFileError(f"{source}: map revision {revision} is not issue 2 (200-299)")
    if not 2 <= count <= 64 or map_size > len(data) or map_size < cur.pos:
        raise TraceFileError(f"{source}: damaged OTDR record: the map block does not add up")
    cur.end = map_size
    entries: list[_Entry] = []
    offset = map_size
    for _ in range(count - 1):
        name = cur.string()
        rev = cur.num("H")
        size = cur.num("I")
        entries.append(_Entry(name, rev, size, offset))
        offset += size
    if offset > len(data):
        raise TraceFileError(
            f"{source}: truncated OTDR record: the map lists {offset} bytes, the file has "
            f"{len(data)}"
        )
    return entries


def read_sor(data: bytes, source: str, *, check_checksum: bool = True) -> Trace:
    """A :class:`Trace` from the bytes of an SR-4731 issue 2 record.

    Raises
    ------
    TraceFileError
        A truncated, damaged or foreign file, or one whose checksum does not match; one line
        naming ``source`` and the problem.
    """
    if len(data) > MAX_FILE_BYTES:
        raise TraceFileError(f"{source}: {len(data)} bytes is too large for an OTDR record")
    entries = _read_map(data, source)
    blocks = {e.name: e for e in entries}
    for needed in ("FxdParams", "DataPts"):
        if needed not in blocks:
            raise TraceFileError(f"{source}: OTDR record without a {needed} block")

    def cursor(name: str) -> _Cursor:
        e = blocks[name]
        cur = _Cursor(data, e.offset, e.offset + e.size, name, source)
        if cur.string() != name:
            raise TraceFileError(
                f"{source}: damaged OTDR record: the {name} block does not start with its name"
            )
        return cur

    if check_checksum and "Cksum" in blocks:
        cur = cursor("Cksum")
        value_at = cur.pos
        stored = cur.num("H")
        if crc16(data[:value_at]) != stored:
            raise TraceFileError(
                f"{source}: the OTDR record's checksum does not match: the file is damaged "
                "(--no-checksum reads it anyway)"
            )

    gen: dict[str, str | int] = {}
    if "GenParams" in blocks:
        cur = cursor("GenParams")
        cur.chars(2)
        gen["cable"] = cur.string()
        gen["fibre"] = cur.string()
        cur.num("h")
        gen["nominal_nm"] = cur.num("h")
        gen["origin"] = cur.string()
        gen["destination"] = cur.string()

    cur = cursor("FxdParams")
    stamp = cur.num("I")
    cur.chars(2)
    actual_wl = cur.num("h") / 10.0
    acq_offset = cur.num("i")
    cur.num("i")
    n_pulses = cur.num("h")
    if not 1 <= n_pulses <= 16:
        raise TraceFileError(f"{source}: damaged OTDR record: {n_pulses} pulse widths")
    pulses = [cur.num("h") for _ in range(n_pulses)]
    spacings = [cur.num("i") for _ in range(n_pulses)]
    [cur.num("i") for _ in range(n_pulses)]
    index_raw = cur.num("i")
    backscatter_raw = cur.num("H")
    group_index = index_raw / 100_000.0
    if not 1.0 < group_index < 2.0:
        raise TraceFileError(
            f"{source}: group index {group_index:g} in the record is not plausible"
        )
    if spacings[0] <= 0:
        raise TraceFileError(f"{source}: the record's data spacing is not positive")
    spacing_m = _time_to_m(spacings[0] / 10_000.0, group_index)
    start_m = _time_to_m(acq_offset, group_index)

    cur = cursor("DataPts")
    n_points = cur.num("i")
    n_scales = cur.num("h")
    if n_scales < 1 or n_points < 2:
        raise TraceFileError(f"{source}: the record holds no data points")
    count = cur.num("i")
    scale = cur.num("h") / 1000.0
    if count != n_points or scale <= 0:
        raise TraceFileError(f"{source}: damaged OTDR record: the data point counts disagree")
    if cur.pos + 2 * count > cur.end:
        raise TraceFileError(
            f"{source}: truncated OTDR record: {count} data points listed, fewer stored"
        )
    raw = np.frombuffer(data, dtype="<u2", count=count, offset=cur.pos)
    level = raw.astype(np.float64) * (-0.001 * scale)

    events: list[InstrumentEvent] = []
    if "KeyEvents" in blocks:
        events = _read_events(cursor("KeyEvents"), group_index)

    wavelength = actual_wl if actual_wl > 0 else float(gen.get("nominal_nm", 0) or 0) or None
    return Trace(
        level_db=level,
        spacing_m=spacing_m,
        source=source,
        file_format="SR-4731",
        start_m=start_m,
        wavelength_nm=wavelength,
        pulse_width_ns=float(pulses[0]) if pulses[0] > 0 else None,
        group_index=group_index,
        backscatter_db=-backscatter_raw / 10.0 if backscatter_raw else None,
        fibre_id=str(gen.get("fibre", "")),
        cable_id=str(gen.get("cable", "")),
        origin=str(gen.get("origin", "")),
        destination=str(gen.get("destination", "")),
        acquired_unix_s=stamp or None,
        instrument_events=tuple(events),
    )


def _read_events(cur: _Cursor, group_index: float) -> list[InstrumentEvent]:
    count = cur.num("h")
    if not 0 <= count <= 1000:
        raise TraceFileError(f"{cur.source}: damaged OTDR record: {count} key events")
    events = []
    for _ in range(count):
        number = cur.num("h")
        time = cur.num("i")
        cur.num("h")
        loss = cur.num("h") / 1000.0
        refl = cur.num("i") / 1000.0
        code = cur.chars(6)
        cur.chars(2)
        cur.take("5i")
        comment = cur.string()
        reflective = code[:1] in ("1", "2")
        is_end = len(code) > 1 and code[1] == "E"
        events.append(
            InstrumentEvent(
                number=number,
                distance_m=_time_to_m(time, group_index),
                loss_db=None if is_end else loss,
                reflectance_db=refl if reflective and refl != 0 else None,
                code=code,
                comment=comment,
            )
        )
    return events


# -- writing -----------------------------------------------------------------------------------


class _Writer:
    def __init__(self) -> None:
        self.parts: list[bytes] = []

    def string(self, text: str) -> None:
        raw = text.encode("utf-8")
        if b"\0" in raw:
            raise ValueError("a string in an OTDR record cannot hold NUL")
        self.parts.append(raw + b"\0")

    def chars(self, text: str, n: int) -> None:
        raw = text.encode("ascii")
        if len(raw) != n:
            raise ValueError(f"{text!r} must be {n} characters")
        self.parts.append(raw)

    def pack(self, fmt: str, *values: int) -> None:
        self.parts.append(struct.pack("<" + fmt, *values))

    def data(self) -> bytes:
        return b"".join(self.parts)


def write_sor(
    trace: Trace,
    *,
    events: Sequence[InstrumentEvent] = (),
    supplier: str = "fieldkit",
    operator: str = "",
    comment: str = "",
    total_loss_db: float | None = None,
    orl_db: float | None = None,
) -> bytes:
    """An SR-4731 issue 2 record of ``trace`` (layout in the module docstring).

    The levels are stored as uint16 steps of 0.001 dB below the trace's highest level; levels
    more than 65.535 dB below it are stored at the bottom of the range. ``events`` go into the
    key-event block as the instrument's events.
    """
    n = trace.group_index or 1.4680
    wl = trace.wavelength_nm or 0.0
    pulse = int(round(trace.pulse_width_ns or 0))

    gen = _Writer()
    gen.string("GenParams")
    gen.chars("EN", 2)
    gen.string(trace.cable_id)
    gen.string(trace.fibre_id)
    gen.pack("h", 652)
    gen.pack("h", int(round(wl)))
    gen.string(trace.origin)
    gen.string(trace.destination)
    gen.string("")
    gen.chars("BC", 2)
    gen.pack("ii", 0, 0)
    gen.string(operator)
    gen.string(comment)

    sup = _Writer()
    sup.string("SupParams")
    for text in (supplier, "", "", "", "", "", ""):
        sup.string(text)

    spacing_time = _m_to_time(trace.spacing_m, n) * 10_000.0
    fxd = _Writer()
    fxd.string("FxdParams")
    fxd.pack("I", int(trace.acquired_unix_s or 0))
    fxd.chars("mt", 2)
    fxd.pack("h", int(round(wl * 10)))
    fxd.pack("ii", int(round(_m_to_time(trace.start_m, n))), 0)
    fxd.pack("h", 1)
    fxd.pack("h", pulse)
    fxd.pack("i", int(round(spacing_time)))
    fxd.pack("i", trace.points)
    fxd.pack("i", int(round(n * 100_000)))
    fxd.pack("H", int(round(-(trace.backscatter_db or 0.0) * 10)))
    fxd.pack("i", 0)  # averages
    fxd.pack("H", 0)  # averaging time
    fxd.pack("ii", int(round(_m_to_time(trace.range_m, n))), 0)
    fxd.pack("i", 0)  # front-panel offset
    fxd.pack("Hh", 0, 1000)  # noise floor level and scale
    fxd.pack("H", 0)  # power offset of the first point
    fxd.pack("HHH", 50, 65000, 3000)  # loss, reflectance (-65 dB), end thresholds (0.001 dB)
    fxd.chars("ST", 2)
    fxd.pack("iiii", 0, 0, 0, 0)

    key = _Writer()
    key.string("KeyEvents")
    key.pack("h", len(events))
    for e in events:
        key.pack("h", e.number)
        key.pack("i", int(round(_m_to_time(e.distance_m, n))))
        key.pack("h", 0)
        key.pack("h", _clip16(e.loss_db or 0.0))
        key.pack("i", int(round((e.reflectance_db or 0.0) * 1000)))
        key.chars((e.code + "999999")[:6], 6)
        key.chars("LS", 2)
        key.pack("5i", 0, 0, 0, 0, 0)
        key.string(e.comment)
    key.pack("i", int(round((total_loss_db or 0.0) * 1000)))
    key.pack("ii", 0, 0)
    key.pack("H", min(65535, max(0, int(round((orl_db or 0.0) * 1000)))))
    key.pack("ii", 0, 0)

    level = np.asarray(trace.level_db, dtype=np.float64)
    if not np.isfinite(level).all():
        raise ValueError("a trace level is not a finite number")
    steps = np.clip(np.round((float(level.max()) - level) * 1000.0), 0, 65535).astype("<u2")
    pts = _Writer()
    pts.string("DataPts")
    pts.pack("i", trace.points)
    pts.pack("h", 1)
    pts.pack("i", trace.points)
    pts.pack("h", 1000)
    pts.parts.append(steps.tobytes())

    bodies = [gen.data(), sup.data(), fxd.data(), key.data(), pts.data()]
    names = BLOCKS
    cksum_size = len(b"Cksum\0") + 2
    sizes = [len(b) for b in bodies] + [cksum_size]
    head = _Writer()
    head.string(MAP)
    entries = _Writer()
    for name, size in zip(names, sizes, strict=True):
        entries.string(name)
        entries.pack("H", REVISION)
        entries.pack("I", size)
    map_size = len(head.data()) + 2 + 4 + 2 + len(entries.data())
    head.pack("H", REVISION)
    head.pack("I", map_size)
    head.pack("h", len(names) + 1)
    out = head.data() + entries.data() + b"".join(bodies) + b"Cksum\0"
    return out + struct.pack("<H", crc16(out))


def _clip16(value_db: float) -> int:
    raw = int(round(value_db * 1000))
    if not -32768 <= raw <= 32767 or not math.isfinite(value_db):
        raise ValueError(f"an event loss of {value_db:g} dB does not fit the record")
    return raw
