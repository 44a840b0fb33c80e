"""The shell's review fixes (2026-12-02): the demo asks who is working on a first start and a
blank name is not kept; keys typed into a dialog just pushed are not lost; text typed on a
dialog's list goes to its text field; the export file's suffix follows the format."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from textual.widgets import Input, Static

from fieldkit import cli
from fieldkit.tui.app import FieldkitApp, make_app
from fieldkit.tui.widgets.dialogs import NameDialog


def test_demo_starts_the_ui_as_a_start_by_a_person(
    isolated_dirs: dict[str, Path], monkeypatch: pytest.MonkeyPatch
) -> None:
    # Review 2026-12-02: `fieldkit demo` started the app without welcome, so it never asked
    # "Who is working?" and every record saved was stamped "by": "".
    import fieldkit.tui.app as app_module

    started: list[dict[str, Any]] = []

    class _NoRun:
        def run(self) -> None:
            pass

    def fake_make_app(**kwargs: Any) -> _NoRun:
        started.append(kwargs)
        return _NoRun()

    monkeypatch.setattr(app_module, "make_app", fake_make_app)
    assert cli.main(["demo", "--data-dir", str(isolated_dirs["data"] / "demo")]) == 0
    assert len(started) == 1
    assert started[0]["welcome"] is True
    assert started[0]["start_mode"] == "jobs"


def _demo_start(isolated_dirs: dict[str, Path]) -> FieldkitApp:
    """A person's start (``welcome``) on a demo folder, on the Jobs workspace."""
    from fieldkit.commands.demo import write_demo

    data = isolated_dirs["data"] / "demo"
    write_demo(data)
    return make_app(
        data_dir=data, config_dir=isolated_dirs["config"], start_mode="jobs", welcome=True
    )


async def test_demo_folder_first_start_asks_the_name_and_refuses_a_blank_one(
    isolated_dirs: dict[str, Path],
) -> None:
    app = _demo_start(isolated_dirs)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, NameDialog)
        await pilot.press("enter")  # blank: not kept, the dialog says why
        assert isinstance(app.screen, NameDialog)
        assert "name is needed" in str(app.screen.query_one("#name-error", Static).render())
        # No name known: Escape does not leave it without one (no Cancel button either).
        await pilot.press("escape")
        assert isinstance(app.screen, NameDialog)
        assert not app.screen.query("#name-cancel")
        await pilot.press(*"Ana Ruiz", "enter")
        assert not isinstance(app.screen, NameDialog)
        assert app.operator == "Ana Ruiz"


async def test_a_name_from_the_environment_is_not_asked_again(
    isolated_dirs: dict[str, Path], monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("FIELDKIT_OPERATOR", "Shared Laptop")
    app = _demo_start(isolated_dirs)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert not isinstance(app.screen, NameDialog)
        assert app.operator == "Shared Laptop"


async def test_a_blank_answer_earlier_is_asked_again(isolated_dirs: dict[str, Path]) -> None:
    # A settings file from before the fix holds a blank name: no name is known, so it asks.
    from fieldkit import settings

    settings.save(isolated_dirs["config"], operator="")
    app = make_app(data_dir=isolated_dirs["data"], config_dir=isolated_dirs["config"], welcome=True)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, NameDialog)
        assert isinstance(app.screen.query_one("#name-value", Input), Input)


@pytest.mark.parametrize("size", [(80, 24), (44, 22)], ids=["80x24", "44x22"])
async def test_end_of_day_separators_stand_between_counts(tmp_path: Path, size) -> None:
    # Review 2026-12-02: a wrap left the separator at a line's end ("5 in doubt ·"). The dot
    # stands between two counts with a space each side, never last on a line.
    import re

    from test_counts_on_screen import _demo, shown_lines

    from fieldkit.tui.screens.jobs_today import EndOfDayScreen

    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+g")
        day = app.screen
        assert isinstance(day, EndOfDayScreen)
        lines = shown_lines(day.query_one("#eod-totals"))
        flat = " ".join(line.strip() for line in lines)
        assert "70 pass · 2 fail · 1 reference problem · 5 in doubt · 0 no limit" in flat
        assert not any(line.rstrip().endswith("·") for line in lines), lines
        assert not re.search(r"\S·|·\S|·  ", flat), flat


async def _export_dialog(tmp_path: Path, pilot: Any, app: Any) -> Any:
    from fieldkit.tui.widgets.export_dialog import ExportDialog

    await pilot.pause()
    await pilot.press("ctrl+w")
    assert isinstance(app.screen, ExportDialog)
    return app.screen


async def test_export_suffix_follows_the_format_and_a_mismatch_is_refused(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # Review 2026-12-02: format JSON with File /tmp/x.csv wrote JSON into x.csv without a word.
    from test_counts_on_screen import _demo
    from textual.widgets import OptionList

    from fieldkit.jobs.reports import EXPORT_FORMATS

    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    (tmp_path / "home").mkdir(exist_ok=True)
    _demo(tmp_path / "d")
    out = tmp_path / "out"
    out.mkdir()
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        dialog = await _export_dialog(tmp_path, pilot, app)
        field = dialog.query_one("#export-path", Input)
        formats = dialog.query_one("#export-format", OptionList)
        field.value = str(out / "x.csv")
        # Choosing JSON on the list renames the typed file's suffix.
        formats.highlighted = EXPORT_FORMATS.index("json")
        await pilot.pause()
        assert field.value == str(out / "x.json")
        # A name typed afterwards that does not match is refused, with the reason.
        field.value = str(out / "x.csv")
        await pilot.click("#export-write")
        assert app.screen is dialog
        error = str(dialog.query_one("#export-error", Static).render())
        assert "ends .csv" in error and "JSON" in error, error
        assert not (out / "x.csv").exists()
        # Named to match, it is written as JSON.
        field.value = str(out / "x.json")
        await pilot.click("#export-write")
        assert app.screen is not dialog
    assert (out / "x.json").read_text(encoding="utf-8").lstrip().startswith("{")


async def test_typing_on_the_export_format_list_goes_to_the_file_field(tmp_path: Path) -> None:
    # Review 2026-12-02: a path typed with the format list focused was dropped.
    from test_counts_on_screen import _demo
    from textual.widgets import OptionList

    _demo(tmp_path / "d")
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="jobs")
    async with app.run_test(size=(80, 24)) as pilot:
        dialog = await _export_dialog(tmp_path, pilot, app)
        formats = dialog.query_one("#export-format", OptionList)
        field = dialog.query_one("#export-path", Input)
        assert dialog.focused is formats
        before_format = formats.highlighted
        field.value = ""
        await pilot.press(*"/tmp/r")
        assert field.value == "/tmp/r"
        assert dialog.focused is field
        assert formats.highlighted == before_format


async def test_typing_on_the_pickers_link_list_makes_a_new_link(tmp_path: Path) -> None:
    # Review 2026-12-02: a new link label typed with the Link list focused was dropped.
    from textual.widgets import OptionList

    from fieldkit import locations
    from fieldkit.jobs.store import JobStore
    from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Harbour Road duct")
    store.update(job.id, lambda j: j.add_link("HR-01"))
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    chosen: list[tuple[str, str] | None] = []
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.push_screen(JobLinkPicker(), chosen.append)
        await pilot.pause()
        await pilot.press("enter")  # the job: focus moves to its links
        picker = app.screen
        assert isinstance(picker.focused, OptionList) and picker.focused.id == "jlp-links"
        await pilot.press(*"HR-02", "enter")
    saved = store.load(job.id)
    assert [link.label for link in saved.links] == ["HR-01", "HR-02"]
    assert chosen == [(job.id, saved.links[1].id)]


async def test_a_key_typed_before_a_pushed_dialog_has_its_focus_goes_to_it(
    tmp_path: Path,
) -> None:
    # Review 2026-12-02: Fault, Ctrl+S then Down at once: the Down was lost (the picker's
    # list was not focused yet) and the save went onto the wrong job. Here the Down reaches
    # the app in the same turn as the push, before the dialog has mounted and set its focus.
    from textual import events
    from textual.widgets import OptionList

    from fieldkit import locations
    from fieldkit.jobs.store import JobStore
    from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    for name in ("Mill Lane", "Harbour Road"):
        job = store.create(name)
        store.update(job.id, lambda j: j.add_link("L-1"))
    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        picker = JobLinkPicker()
        app.push_screen(picker)
        await app.on_event(events.Key("down", None))
        await pilot.pause()
        assert app.screen is picker
        jobs = picker.query_one("#jlp-jobs", OptionList)
        assert picker.focused is jobs
        # the list starts on the first job (see _reload_jobs); the Down: the second
        assert jobs.highlighted == 1


async def test_keys_typed_ahead_into_a_pushed_dialog_keep_their_order(tmp_path: Path) -> None:
    from textual import events

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        dialog = NameDialog("Who is working?", "note", "")
        app.push_screen(dialog)
        for key, char in (("A", "A"), ("n", "n"), ("a", "a")):
            await app.on_event(events.Key(key, char))
        await pilot.pause()
        assert dialog.query_one("#name-value", Input).value == "Ana"


async def test_every_footer_word_is_capitalised_the_palette_too(tmp_path: Path) -> None:
    # Review 2026-12-02: the footer mixed "^P palette" with "Quit", "Save".
    from textual.widgets._footer import FooterKey

    app = make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="convert")
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        footer_keys = list(app.screen.query(FooterKey))
        palette = [k for k in footer_keys if k.has_class("-command-palette")]
        assert [k.description for k in palette] == ["Palette"]
        assert all(k.description[:1].isupper() for k in footer_keys), [
            k.description for k in footer_keys
        ]
