"""The preset values still resting on recalled sources: every shipped entry whose source says
"(from memory)", with how many numbers it holds.

This list is the measure of what is left to check against the documents. Checking an entry
against its standard (and dropping "(from memory)" from its source) must remove it here; adding
a recalled value must add it here. Either way the change is visible in review, and the share
of checked values is ``1 − FROM_MEMORY_VALUES / TOTAL_VALUES``.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import fields, is_dataclass
from typing import Any

from fieldkit.presets import KINDS, load_presets

#: (kind, name): the numbers the entry holds, every one of them counted as recalled.
FROM_MEMORY: dict[tuple[str, str], int] = {
    ("fibres", "OM1"): 12,
    ("fibres", "62.5/160"): 12,
    ("fibres", "50/400"): 12,
    ("fibres", "OM2"): 12,
    ("fibres", "OM3"): 12,
    ("fibres", "OM4"): 12,
    ("fibres", "OM5"): 16,
    ("fibres", "OS1a"): 19,
    ("fibres", "OS2"): 33,
    ("fibres", "SM outside plant"): 16,
    ("fibres", "SM inside plant"): 16,
    ("fibres", "G.652.D"): 38,
    ("fibres", "G.657.A1"): 36,
    ("fibres", "G.657.A2"): 36,
    ("connectors", "TIA-568.3-D"): 2,
    ("connectors", "ISO/IEC 11801-1"): 2,
    ("connectors", "ISO/IEC 14763-3 reference to standard, multimode"): 1,
    ("connectors", "ISO/IEC 14763-3 reference to standard, single-mode"): 1,
    ("connectors", "IEC 61753-1 Grade B"): 2,
    ("connectors", "IEC 61753-1 Grade C"): 2,
    ("connectors", "IEC 61753-1 Grade D"): 2,
    ("splices", "fusion"): 2,
    ("splices", "mechanical"): 2,
    ("applications", "1000BASE-SX"): 16,
    ("applications", "1000BASE-LX"): 18,
    ("applications", "10GBASE-SR"): 16,
    ("applications", "10GBASE-LR"): 4,
    ("applications", "10GBASE-ER"): 4,
    ("applications", "25GBASE-LR"): 4,
    ("applications", "25GBASE-SR"): 7,
    ("applications", "40GBASE-SR4"): 7,
    ("applications", "40GBASE-LR4"): 3,
    ("applications", "100GBASE-SR4"): 7,
    ("applications", "100GBASE-LR4"): 3,
    ("applications", "100GBASE-ER4"): 3,
    ("applications", "400GBASE-DR4"): 3,
    ("applications", "400GBASE-FR4"): 3,
    ("applications", "400GBASE-LR4-6"): 3,
    ("applications", "GPON Class B+"): 5,
    ("applications", "GPON Class C+"): 5,
    ("applications", "XGS-PON N1"): 5,
    ("applications", "XGS-PON N2"): 5,
    ("applications", "XGS-PON E1"): 5,
    ("applications", "10G-EPON PR30"): 5,
    ("applications", "NG-PON2 N1"): 5,
    ("applications", "NG-PON2 N2"): 5,
    ("applications", "NG-PON2 E1"): 5,
    ("applications", "NG-PON2 E2"): 5,
    ("transceivers", "1000BASE-LX"): 10,
    ("transceivers", "10GBASE-SR"): 6,
    ("transceivers", "10GBASE-LR"): 6,
    ("transceivers", "GPON B+ downstream"): 5,
    ("transceivers", "GPON C+ downstream"): 5,
    ("reflectance", "IEC 61753-1 return loss grade 1"): 1,
    ("reflectance", "IEC 61753-1 return loss grade 2"): 1,
    ("reflectance", "IEC 61753-1 return loss grade 3"): 1,
    ("reflectance", "GPON ODN"): 2,
    ("reflectance", "10GBASE-LR channel"): 1,
}

#: Every number in the shipped presets (limits, levels, attenuation, indices, geometry, ...).
TOTAL_VALUES = 561
FROM_MEMORY_VALUES = 487


def _numbers(value: Any) -> int:
    if isinstance(value, bool) or value is None:
        return 0
    if isinstance(value, (int, float)):
        return 1
    if isinstance(value, Mapping):
        return sum(_numbers(v) for v in value.values())
    if isinstance(value, (list, tuple)):
        return sum(_numbers(v) for v in value)
    if is_dataclass(value) and not isinstance(value, type):
        return sum(_numbers(getattr(value, f.name)) for f in fields(value) if f.name != "origin")
    return 0


def test_the_from_memory_list_is_the_shipped_presets_list():
    lib = load_presets()
    found = {
        (kind, name): _numbers(preset)
        for kind in KINDS
        for name, preset in lib.of_kind(kind).items()
        if "(from memory)" in preset.source
    }
    assert found == FROM_MEMORY


def test_the_counts_add_up():
    lib = load_presets()
    total = sum(_numbers(p) for kind in KINDS for p in lib.of_kind(kind).values())
    assert total == TOTAL_VALUES
    assert sum(FROM_MEMORY.values()) == FROM_MEMORY_VALUES


def test_every_other_entry_says_where_its_values_come_from():
    # an entry not recalled names common practice or a document with its edition or date
    lib = load_presets()
    for kind in KINDS:
        for name, p in lib.of_kind(kind).items():
            if (kind, name) in FROM_MEMORY or _numbers(p) == 0:
                continue  # recalled and listed above, or no figure to source (a plan's text)
            assert "common practice" in p.source or any(ch.isdigit() for ch in p.source), (
                f"{kind} {name}: source names neither a document nor common practice"
            )
