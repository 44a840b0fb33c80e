"""The user's settings (theme, name on records, the report's letterhead and test equipment),
kept as a small JSON file in the config folder.

The report settings: ``contractor`` (the company name on every report), ``crew`` (the crew's
name, e.g. "Splice crew 2"), ``csv_style`` (``comma``: RFC 4180 with a decimal point;
``semicolon``: ``;`` between cells and a decimal comma, for spreadsheets in locales that use
one) and ``equipment``: the meters, light sources and OTDRs the crew tests with, each with its
id and calibration date, printed in the report's test-equipment block.

Stored values are checked when read as well as when set: a hand-edited file with a bad date or
a stray type loses that entry in the report (and ``fieldkit settings show`` says so), never
the start.
"""

from __future__ import annotations

import unicodedata
from dataclasses import dataclass
from datetime import date
from pathlib import Path
from typing import Any

from fieldkit.settings_file import FILE_NAME as FILE_NAME
from fieldkit.settings_file import load as load
from fieldkit.settings_file import save as save

#: The kinds of test equipment a report lists, in the order it lists them.
EQUIPMENT_KINDS = ("meter", "source", "otdr")
EQUIPMENT_WORDS = {"meter": "power meter", "source": "light source", "otdr": "OTDR"}
CSV_STYLES = ("comma", "semicolon")
#: The longest contractor, crew, id or description kept (a report line, not an essay).
MAX_TEXT = 200
#: More than this many pieces of equipment is a typing accident, not a crew's kit.
MAX_EQUIPMENT = 50


class SettingsError(ValueError):
    """A setting refused: one line naming the problem (the CLI exits 2 with it)."""


# -- the report's settings -----------------------------------------------------------------------
@dataclass(frozen=True)
class Equipment:
    """One piece of test equipment: a power meter, a light source or an OTDR.

    ``calibrated``: the date of its last calibration; ``due``: when the next one is due (None:
    not recorded). Dates are calendar dates, as written on a calibration certificate.
    """

    kind: str
    id: str
    calibrated: date
    due: date | None = None
    description: str = ""

    def as_dict(self) -> dict[str, str]:
        out = {"kind": self.kind, "id": self.id, "calibrated": self.calibrated.isoformat()}
        if self.due is not None:
            out["due"] = self.due.isoformat()
        if self.description:
            out["description"] = self.description
        return out


@dataclass(frozen=True)
class ReportSettings:
    """What a report takes from the settings."""

    contractor: str = ""
    crew: str = ""
    csv_style: str = "comma"
    equipment: tuple[Equipment, ...] = ()
    #: Stored entries that could not be read, one line each (shown by ``settings show``).
    problems: tuple[str, ...] = ()


def clean_text(text: str, what: str, *, allow_empty: bool = True) -> str:
    """``text`` stripped, or :class:`SettingsError`: no control characters, at most
    :data:`MAX_TEXT` characters."""
    if not isinstance(text, str):
        raise SettingsError(f"{what}: must be text")
    for ch in text:
        if unicodedata.category(ch) in ("Cc", "Cs") or ch in "\u2028\u2029":
            raise SettingsError(
                f"{what}: holds a control character (U+{ord(ch):04X}); type plain text"
            )
    text = text.strip()
    if len(text) > MAX_TEXT:
        raise SettingsError(f"{what}: {len(text)} characters is too long (at most {MAX_TEXT})")
    if not text and not allow_empty:
        raise SettingsError(f"{what}: give a value")
    return text


def parse_date(text: str, what: str) -> date:
    """A calendar date written YYYY-MM-DD, or :class:`SettingsError` naming the problem."""
    if not isinstance(text, str):
        raise SettingsError(f"{what}: must be a date written YYYY-MM-DD")
    value = text.strip()
    if len(value) != 10 or value[4] != "-" or value[7] != "-":
        raise SettingsError(f"{what}: {value!r} is not a date written YYYY-MM-DD")
    try:
        return date.fromisoformat(value)
    except ValueError:
        raise SettingsError(f"{what}: {value!r} is not a calendar date") from None


def make_equipment(
    kind: str,
    ident: str,
    calibrated: str,
    due: str | None = None,
    description: str = "",
    *,
    today: date | None = None,
) -> Equipment:
    """A checked :class:`Equipment`: a known kind, an id, a calibration date not in the future
    and a due date after it."""
    if kind not in EQUIPMENT_KINDS:
        raise SettingsError(f"kind: {kind!r} is not one of {', '.join(EQUIPMENT_KINDS)}")
    ident = clean_text(ident, "id", allow_empty=False)
    on = parse_date(calibrated, "calibrated")
    if today is not None and on > today:
        raise SettingsError(
            f"calibrated: {on.isoformat()} is in the future (today is {today.isoformat()})"
        )
    until = None if due in (None, "") else parse_date(str(due), "due")
    if until is not None and until <= on:
        raise SettingsError(
            f"due: {until.isoformat()} is not after the calibration date {on.isoformat()}"
        )
    return Equipment(kind, ident, on, until, clean_text(description, "description"))


def report_settings(config: Path | None) -> ReportSettings:
    """The report settings saved in ``config`` (defaults for None or an unreadable file)."""
    if config is None:
        return ReportSettings()
    data = load(config)
    problems: list[str] = []

    def text(key: str) -> str:
        try:
            return clean_text(data.get(key, ""), key)
        except SettingsError as exc:
            problems.append(f"{exc} (ignored)")
            return ""

    style = data.get("csv_style", "comma")
    if style not in CSV_STYLES:
        problems.append(f"csv_style: {style!r} is not one of {', '.join(CSV_STYLES)} (ignored)")
        style = "comma"
    kit: list[Equipment] = []
    stored = data.get("equipment", [])
    if not isinstance(stored, list):
        problems.append("equipment: not a list (ignored)")
        stored = []
    for n, entry in enumerate(stored[:MAX_EQUIPMENT], 1):
        try:
            if not isinstance(entry, dict):
                raise SettingsError("not an object")
            kit.append(
                make_equipment(
                    str(entry.get("kind", "")),
                    entry.get("id", ""),
                    entry.get("calibrated", ""),
                    entry.get("due"),
                    entry.get("description", ""),
                )
            )
        except SettingsError as exc:
            problems.append(f"equipment entry {n}: {exc} (ignored)")
    return ReportSettings(text("contractor"), text("crew"), style, tuple(kit), tuple(problems))


def set_report_text(config: Path, key: str, value: str) -> str:
    """Save ``contractor`` or ``crew`` (empty clears it); returns the value saved."""
    if key not in ("contractor", "crew"):
        raise SettingsError(f"{key}: not a report setting (contractor or crew)")
    clean = clean_text(value, key)
    save(config, **{key: clean})
    return clean


def set_csv_style(config: Path, style: str) -> str:
    if style not in CSV_STYLES:
        raise SettingsError(f"csv style: {style!r} is not one of {', '.join(CSV_STYLES)}")
    save(config, csv_style=style)
    return style


def _stored_equipment(config: Path) -> list[Any]:
    stored = load(config).get("equipment", [])
    return list(stored) if isinstance(stored, list) else []


def _stored_id(entry: Any) -> str:
    ident = entry.get("id", "") if isinstance(entry, dict) else ""
    return ident.strip().casefold() if isinstance(ident, str) else ""


def add_equipment(config: Path, item: Equipment) -> None:
    """Add ``item`` to the equipment list; an id already listed is refused (remove it first).
    Entries the report cannot read stay in the file as they were (nothing is dropped)."""
    stored = _stored_equipment(config)
    if any(_stored_id(e) == item.id.casefold() for e in stored):
        raise SettingsError(f"id: {item.id} is already listed; remove it first to replace it")
    if len(stored) >= MAX_EQUIPMENT:
        raise SettingsError(f"equipment: at most {MAX_EQUIPMENT} entries")
    save(config, equipment=[*stored, item.as_dict()])


def remove_equipment(config: Path, ident: str) -> str:
    """Remove the equipment with id ``ident`` (case ignored); returns the id as listed."""
    stored = _stored_equipment(config)
    wanted = ident.strip().casefold()
    keep = [e for e in stored if _stored_id(e) != wanted]
    if not wanted or len(keep) == len(stored):
        known = ", ".join(e["id"] for e in stored if _stored_id(e)) or "none"
        raise SettingsError(f"id: no equipment {ident.strip()!r} is listed (listed: {known})")
    gone = next(e for e in stored if _stored_id(e) == wanted)
    save(config, equipment=keep)
    return str(gone["id"]).strip()
