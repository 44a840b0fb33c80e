"""Field rules the workspaces' forms share, without Textual: how a problem names a field, a bare
number as typed (an index, a percentage), and the rows of an editable list (landmarks, slack
loops). The widgets show them; the models (:mod:`fieldkit.tui.fault_model`) parse with them."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

from fieldkit.calc.units import Kind, normalise_text, parse, parse_number


def field_name(label: str) -> str:
    """A field's label as a problem message names it: the first word in lower case unless it
    is an abbreviation, so "Level A" reads "level A" and "OTDR dist" stays "OTDR dist"."""
    first, _, rest = label.partition(" ")
    if not (len(first) > 1 and first.isupper()):
        first = first[:1].lower() + first[1:]
    return f"{first} {rest}" if rest else first


def plain_number(text: str, label: str) -> float | None:
    """A bare number as typed (a trailing ``%`` allowed), None when empty; raises InputError
    naming the field by ``label``."""
    text = normalise_text(text)
    if text.endswith("%"):
        text = text[:-1]
    if not text.strip():
        return None
    return parse_number(text, field_name(label))


@dataclass(frozen=True)
class Notice:
    """What an open or a save says: the line to show, how loud, whether it was done, and
    warnings to give besides."""

    text: str
    severity: Literal["information", "warning", "error"] = "information"
    ok: bool = True
    warnings: tuple[str, ...] = ()


@dataclass(frozen=True, slots=True)
class Column:
    """A column of an editable list: its key, label, kind and example (shown as a hint)."""

    key: str
    label: str
    kind: Literal["text", "length"]
    example: str


def parse_row(columns: tuple[Column, ...], row: dict[str, str]) -> dict[str, Any]:
    """A row's values: text as typed (stripped), lengths in metres (a bare number is metres).
    Raises InputError naming the column."""
    out: dict[str, Any] = {}
    for column in columns:
        text = row.get(column.key, "")
        if column.kind == "length":
            out[column.key] = parse(
                text, Kind.LENGTH, default_unit="m", what=field_name(column.label)
            ).to("m")
        else:
            out[column.key] = text.strip()
    return out
