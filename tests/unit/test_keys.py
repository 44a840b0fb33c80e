"""The key table: one meaning per key, the README generated from it, screens bound from it."""

from __future__ import annotations

import importlib
from pathlib import Path

from textual.binding import Binding
from textual.widgets import Input

from fieldkit.tui import keys
from fieldkit.tui.workspaces import WORKSPACES

README = Path(__file__).resolve().parents[2] / "README.md"
SCREEN_MODULES = (
    "fieldkit.tui.screens.convert",
    "fieldkit.tui.screens.budget",
    "fieldkit.tui.screens.meter",
    "fieldkit.tui.screens.fault",
    "fieldkit.tui.screens.jobs",
    "fieldkit.tui.screens.jobs_today",
    "fieldkit.tui.screens.splices",
    "fieldkit.tui.screens.traces",
)


def test_readme_key_tables_are_the_generated_ones() -> None:
    # If this fails: python -m fieldkit.tui.keys README.md
    text = README.read_text(encoding="utf-8")
    assert keys.readme_with_tables(text) == text
    block = text.split(keys.README_START)[1].split(keys.README_END)[0]
    assert "| ^S | save onto a job's link |" in block
    assert "| F3 | Budget |" in block


def test_one_key_one_name_and_no_key_twice() -> None:
    table = (*keys.COMMON, *keys.LOCAL)
    names = [k.name for k in table]
    assert len(names) == len(set(names))
    bound = [k.key for k in table]
    assert len(bound) == len(set(bound)), "a key listed with two meanings"
    places = list(keys.PLACES.values())
    assert len(places) == len(set(places))
    assert not set(places) & set(bound), "a function key is a place, never an action"


def test_every_workspace_has_its_function_key_and_reserved_ones_are_free() -> None:
    modes = {ws.mode for ws in WORKSPACES}
    assert modes <= set(keys.PLACES)
    assert {ws.key for ws in WORKSPACES} == {keys.PLACES[m] for m in modes}
    # Kept for the workspaces being built (splice log, traces, fibre data).
    for reserved in ("splices", "traces", "fibre"):
        assert reserved in keys.PLACES


def test_uses_name_keys_of_the_table_once_per_workspace() -> None:
    for mode, uses in keys.USES.items():
        names = [u.name for u in uses]
        assert len(names) == len(set(names)), mode
        for use in uses:
            keys.key_of(use.name)  # KeyError if a use names a key the table does not have


def test_screens_bind_only_table_keys_with_the_table_meaning() -> None:
    # A hand-written Ctrl or function key in a screen would give a key a second meaning.
    by_key = {k.key: k.name for k in (*keys.COMMON, *keys.LOCAL)}
    for module_name in SCREEN_MODULES:
        module = importlib.import_module(module_name)
        for value in vars(module).values():
            bindings = getattr(value, "BINDINGS", None)
            if not isinstance(value, type) or value.__module__ != module_name or not bindings:
                continue
            for binding in bindings:
                assert isinstance(binding, Binding)
                for key in binding.key.split(","):
                    if key.startswith("ctrl+") or (key[:1] == "f" and key[1:].isdigit()):
                        assert key in by_key, (module_name, key)
                        assert binding.id in (
                            "app.quit",
                            f"{binding.id.split('.')[0]}.{by_key[key]}",
                        ), (module_name, key, binding.id)


def test_ctrl_keys_that_text_fields_also_bind_act_first() -> None:
    # Ctrl+A, Ctrl+X ... are Input keys too; without priority a focused field would take them.
    field_keys = {k for b in Input.BINDINGS if isinstance(b, Binding) for k in b.key.split(",")}
    for mode in keys.USES:
        for binding in keys.bindings(mode):
            assert isinstance(binding, Binding)
            if binding.key in field_keys and binding.key.startswith("ctrl+"):
                assert binding.priority, (mode, binding.key)


def test_quit_is_the_first_binding_of_every_screen() -> None:
    for mode in keys.USES:
        first = keys.bindings(mode)[0]
        assert isinstance(first, Binding)
        assert (first.key, first.action) == ("ctrl+q", "app.quit")


def test_key_names_read_as_people_write_them() -> None:
    # One style everywhere (review C34): ^ for Ctrl, as the footer shows it.
    assert keys.display("ctrl+n") == "^N"
    assert keys.display("save") == "^S"
    assert keys.display("pagedown") == "PgDn"
    assert keys.display("ctrl+up") == "^↑"
    assert keys.display("alt+r") == "Alt+R"
    assert keys.display("f7") == "F7"
    assert keys.display("escape") == "Esc"
    assert keys.hint("save") == "^S"
    assert keys.tip("budget", "save") == "Save this budget onto a job's link (^S)"


def test_help_lists_only_keys_in_use() -> None:
    text = keys.help_markdown()
    # Ctrl+E (edit) is kept for the job editor being built: not shown until a workspace uses it.
    used = {u.name for uses in keys.USES.values() for u in uses}
    assert ("- **^E Edit**" in text) == ("edit" in used)
    assert "- **^Q Quit**" in text
