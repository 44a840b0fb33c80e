"""Open a trace file of either kind: the standard record or a text trace, by its content."""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path

from fieldkit.traces.model import Trace, TraceFileError
from fieldkit.traces.sor import MAX_FILE_BYTES, read_sor
from fieldkit.traces.textfile import read_text

#: File name endings a folder scan picks up.
TRACE_SUFFIXES = (".sor", ".csv", ".txt", ".tsv", ".dat")


@dataclass(frozen=True, slots=True)
class ReadOptions:
    """What to assume for text traces, and whether to check the record's checksum."""

    distance_unit: str | None = None
    wavelength_nm: float | None = None
    pulse_width_ns: float | None = None
    group_index: float | None = None
    check_checksum: bool = True


def read_trace(path: Path, options: ReadOptions | None = None) -> Trace:
    """The trace in ``path``; a standard record when it starts with its map block.

    Raises
    ------
    TraceFileError
        One line naming the file and the problem (missing, unreadable, truncated, corrupt,
        foreign). Nothing is written.
    """
    opts = options or ReadOptions()
    name = path.name
    try:
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise TraceFileError(f"{name}: {size} bytes is too large for a trace file")
        data = path.read_bytes()
    except FileNotFoundError:
        raise TraceFileError(f"{name}: no such file") from None
    except IsADirectoryError:
        raise TraceFileError(f"{name}: is a folder, not a trace file") from None
    except OSError as exc:
        raise TraceFileError(f"{name}: cannot read: {exc.strerror or exc}") from None
    return read_trace_bytes(data, name, opts)


def read_trace_bytes(data: bytes, name: str, options: ReadOptions | None = None) -> Trace:
    """The trace held in ``data`` (see :func:`read_trace`)."""
    opts = options or ReadOptions()
    if data.startswith(b"Map\0") or name.lower().endswith(".sor"):
        trace = read_sor(data, name, check_checksum=opts.check_checksum)
        if trace.wavelength_nm is None and opts.wavelength_nm is not None:
            trace = replace(trace, wavelength_nm=opts.wavelength_nm)
        return trace
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise TraceFileError(f"{name}: neither an OTDR record nor a UTF-8 text trace") from None
    return read_text(
        text,
        name,
        distance_unit=opts.distance_unit,
        wavelength_nm=opts.wavelength_nm,
        pulse_width_ns=opts.pulse_width_ns,
        group_index=opts.group_index,
    )
