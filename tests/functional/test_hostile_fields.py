"""Hostile values typed into the workspaces' fields: the app keeps running and says why.

Each value is set as a user could type or paste it (a field's ``restrict`` pattern is honoured,
so only what the keyboard can put there is tried). Every value in every field at once, then
each field alone with one of them: the workspace's wiring survives and nothing typed is lost.
Every value in every field one at a time, the others as they start, goes through the same
parsers and models the workspaces call, at unit speed: tests/unit/test_hostile_field_values.py.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from hostile_values import HOSTILE
from textual.widgets import Input, Static

from fieldkit.tui.app import make_app

SIZES = [(80, 24), (44, 22)]


def _typeable(field: Input, text: str) -> str | None:
    if field.restrict and not re.fullmatch(field.restrict, text):
        return None
    return text[: field.max_length] if field.max_length else text


@pytest.mark.parametrize("mode", ["convert", "budget", "fault", "jobs"])
async def test_no_typed_value_stops_the_workspace(tmp_path: Path, mode: str) -> None:
    # one size: the fields and their parsing do not change with the layout
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode=mode)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        fields = list(screen.query(Input))
        assert fields, f"{mode} has no fields"
        # each value in every field it can be typed into, all at once
        for text in HOSTILE:
            typed = {}
            for field in fields:
                value = _typeable(field, text)
                if value is not None:
                    field.value = typed[field] = value
            await pilot.pause()
            assert app.is_running and app.screen is screen, text
            for field, value in typed.items():
                assert field.value == value, (field.id, text)  # nothing typed is lost
        for field in fields:
            field.value = ""
        await pilot.pause()
        # then each field alone, the others empty, with one of the values (taken in turn)
        tried = set()
        for n, field in enumerate(fields):
            for text in HOSTILE[n % len(HOSTILE) :] + HOSTILE[: n % len(HOSTILE)]:
                value = _typeable(field, text)
                if value is not None:
                    break
            else:
                continue
            field.value = value
            tried.add(text)
            await pilot.pause()
            assert app.is_running and app.screen is screen, (field.id, text)
            assert field.value == value
            field.value = ""
        await pilot.pause()
        assert app.is_running and app.screen is screen
        assert len(tried) >= min(len(fields), 4)  # not one value everywhere


#: (field, typed, what the workspace says)
UNCONVERTIBLE = [
    # 10^(1e308/10) mW does not fit in a float: refused beside the field, not a crash
    ("value", "1e308 dBm", "too large"),
    ("value", "4000 dBm", "too large"),
    # 10^(-4000/10) mW = 1e-400 mW is below the smallest float (IEEE 754, from memory)
    ("value", "-4000 dBm", "below any measurable level"),
    # 1e-320 is a subnormal float: refused as typed rather than computed with lost digits
    ("grid-in", "1e-320 nm", "too close to zero"),
]


@pytest.mark.parametrize("size", SIZES)
async def test_convert_explains_values_it_cannot_convert(
    tmp_path: Path, size: tuple[int, int]
) -> None:
    # one start per size; each value typed into a field left empty by the one before
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        for input_id, text, words in UNCONVERTIBLE:
            field = app.screen.query_one(f"#{input_id}", Input)
            field.value = text
            await pilot.pause()
            container = app.screen.query_one(f"#{input_id}-field")
            errors = container.query(".field-error").results(Static)
            shown = " ".join(str(s.render()) for s in errors)
            shown += " ".join(str(s.render()) for s in app.screen.query(".result").results(Static))
            assert words in shown, (text, shown)
            assert field.value == text
            field.value = ""
            await pilot.pause()
            assert words not in " ".join(str(s.render()) for s in errors)  # and clears


async def test_meter_reference_and_reading_refuse_powers_below_any_float(tmp_path: Path) -> None:
    # 1e-300 pW is 1e-309 mW, a subnormal float; -4000 dBm is 1e-400 mW (IEEE 754, from memory)
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="meter")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        for field_id in ("reference", "reading", "source-level"):
            field = screen.query_one(f"#{field_id}", Input)
            for text in ("1e-320 pW", "-4000 dBm", "1e-300 pW"):
                typed = _typeable(field, text)
                if typed is None:
                    continue
                field.value = typed
                await pilot.pause()
                if field_id == "reading":
                    await pilot.press("enter")
                    await pilot.pause()
                assert app.is_running and app.screen is screen, (field_id, text)
