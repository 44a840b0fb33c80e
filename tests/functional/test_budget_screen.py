"""The budget workspace driven by keys and mouse at 80x24 and 44x22."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import Input, OptionList, Select, Static

from fieldkit import locations
from fieldkit.jobs.models import Job
from fieldkit.jobs.store import JobStore
from fieldkit.tui.app import make_app
from fieldkit.tui.screens.budget import BudgetScreen
from fieldkit.tui.widgets.dialogs import AskDialog
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

SIZES = [(80, 24), (44, 22)]


def flat(text: str) -> str:
    """Text as words: the panels wrap lines to their width (and keep indents with no-break
    spaces), so the tests read the words in order, not the line breaks."""
    return " ".join(text.replace("\u00a0", " ").split())


def text_of(app, selector: str) -> str:
    return flat(str(app.screen.query_one(selector, Static).render()))


def make(tmp_path: Path):
    return make_app(data_dir=tmp_path / "d", config_dir=tmp_path / "c", start_mode="budget")


@pytest.mark.parametrize("size", SIZES)
async def test_typing_a_length_shows_the_budget(tmp_path: Path, size):
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, BudgetScreen)
        assert screen.has_class("-wide" if size[0] >= 72 else "-narrow")
        assert screen.focused is screen.query_one("#item-value", Input)
        await pilot.press(*"12 km")
        await pilot.pause()
        # OS2 (ISO/IEC 11801-1, 0.4 dB/km, from memory): 12 × 0.4 = 4.80 dB, plus the two end
        # connections at the TIA-568.3-D 0.75 dB: 1.50 dB -> 6.30 dB at 1310 and 1550 nm
        out = text_of(app, "#budget-out")
        assert "1310 nm max 6.30 dB" in out and "1550 nm max 6.30 dB" in out
        assert "OS2 12 km × 0.4 dB/km" in out
        assert "1310 nm 6.30 dB" in text_of(app, "#budget-summary")
        sources = text_of(app, "#sources-out")
        assert "ISO/IEC 11801-1" in sources and "ANSI/TIA-568.3-D" in sources
        # Friction (issue 14, splicer): "0.30 / dB" wrapped at 80 columns. With 6 splices added
        # (Ctrl+A, 2, 6), every line is wrapped here to its panel, under its own text, never
        # between a number and its unit.
        await pilot.press("ctrl+a", "2", "6")
        await pilot.pause()
        for out_id in ("#budget-out", "#budget-summary", "#sources-out", "#checks-out"):
            out = screen.query_one(out_id, Static)
            lines = str(out.render()).replace("\u00a0", " ").split("\n")
            assert all(len(line) <= out.content_size.width for line in lines), out_id
            assert not any(line.lstrip().startswith(("dB", "nm", "km")) for line in lines), out_id
        # 6 fusion splices × 0.30 dB = 1.80 dB (TIA-568.3-D, from memory), its unit beside it
        assert "1.80 6 fusion splices × 0.30 dB" in text_of(app, "#budget-out")


async def test_bad_length_is_explained_beside_the_field_and_kept(tmp_path: Path):
    size = (44, 22)
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press(*"12 parsec")
        await pilot.pause()
        error = app.screen.query_one("#item-value-error", Static)
        assert error.display and "unknown unit 'parsec'" in str(error.render())
        assert app.screen.query_one("#item-value", Input).value == "12 parsec"
        assert app.screen.report is None
        assert "item 1 (fibre): length" in text_of(app, "#budget-summary")
        app.screen.query_one("#item-value", Input).value = "12 km"
        await pilot.pause()
        assert not error.display
        assert app.screen.report is not None


async def test_add_opens_the_kind_chooser_at_the_same_kind_every_time(tmp_path: Path):
    # Friction (issue 14, splicer): the kind selector was 6 Shift+Tabs from Length and opened at
    # the last kind used, so a WDM coupler went in for a splitter. Ctrl+A opens the chooser from
    # the Length field, always at Fibre; a digit or the arrows and Enter pick.
    from fieldkit.tui.widgets.choice_dialog import ChoiceDialog

    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"12 km", "ctrl+a")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        chooser = app.screen.query_one(OptionList)
        assert chooser.highlighted == 0 and "Fibre" in str(chooser.get_option_at_index(0).prompt)
        await pilot.press("3")  # Splitter: a 1x32 after the fibre
        await pilot.pause()
        assert app.screen is screen
        assert [i.kind for i in screen.model.items] == ["fibre", "splitter", "connectors"]
        assert screen.focused is screen.query_one("#item-value", Input)
        # 1x32 ideal 10·log10(32) = 15.0515 dB + 2.1 dB preset excess = 17.1515 dB;
        # 4.80 + 17.15 + 1.50 = 23.45 dB
        assert screen.report.result.at(1310).loss_db == pytest.approx(23.4515, abs=1e-4)
        await pilot.press("ctrl+a")
        await pilot.pause()
        chooser = app.screen.query_one(OptionList)
        assert chooser.highlighted == 0  # at Fibre again, not at the splitter used last
        await pilot.press("down", "enter")  # Splices
        await pilot.pause()
        await pilot.press("6")
        await pilot.pause()
        # 6 fusion splices at the TIA-568.3-D 0.3 dB maximum (from memory) = 1.80 dB -> 25.25 dB
        assert screen.report.result.at(1310).loss_db == pytest.approx(25.2515, abs=1e-4)
        items = screen.query_one("#items", OptionList)
        assert "6 splices, fusion" in str(items.get_option_at_index(2).prompt)
        await pilot.press("ctrl+a", "escape")  # Esc adds nothing
        await pilot.pause()
        assert app.screen is screen and len(screen.model.items) == 4


async def test_remove_and_reorder(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press(*"1 km")
        screen = app.screen
        await pilot.press("ctrl+a", "5")  # Attenuator
        await pilot.pause()
        await pilot.press(*"5 dB")
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "attenuator", "connectors"]
        await pilot.press("ctrl+down")
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "connectors", "attenuator"]
        await pilot.press("ctrl+up")
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "attenuator", "connectors"]
        # 0.4 + 5 + 1.5 = 6.9 dB
        assert screen.report.result.at(1310).loss_db == pytest.approx(6.9, abs=1e-9)
        await pilot.press("ctrl+x")
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "connectors"]
        assert screen.report.result.at(1310).loss_db == pytest.approx(1.9, abs=1e-9)
        screen.model.current = 0
        await pilot.press("ctrl+x")  # the only fibre segment stays
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "connectors"]


async def test_typed_attenuation_per_wavelength(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#item-preset", Select).value = "__typed__"
        await pilot.pause()
        assert screen.query_one("#item-extra-field").display
        await pilot.press(*"10 km")
        screen.query_one("#item-extra", Input).value = "1310=0.33 dB/km; 1550=0.19 dB/km"
        await pilot.pause()
        # 10 × 0.33 + 1.5 = 4.80 dB at 1310 nm (the model's tests check each wavelength)
        assert screen.report.result.at(1310).loss_db == pytest.approx(4.8, abs=1e-9)
        screen.query_one("#item-extra", Input).value = "0.33"
        await pilot.pause()
        error = screen.query_one("#item-extra-error", Static)
        assert error.display and "no length unit" in str(error.render())


async def test_application_and_transceiver_panels(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"8 km")
        screen.query_one("#application", Select).value = "10GBASE-LR"
        await pilot.pause()
        # IEEE 802.3 Clause 52 (from memory): 6.2 dB; 3.2 + 1.5 = 4.7 dB, headroom +1.50 dB
        out = text_of(app, "#application-out")
        assert "10GBASE-LR on singlemode: PASS" in out and "+1.50 dB" in out
        screen.query_one("#transceiver", Select).value = "__typed__"
        await pilot.pause()
        assert screen.query_one("#tx-levels").display
        for field_id, value in (
            ("tx-min", "-8.2"),
            ("tx-max", "0.5"),
            ("rx-sens", "-14.4"),
            ("rx-over", "0.5"),
        ):
            screen.query_one(f"#{field_id}", Input).value = value
        await pilot.pause()
        # margin −8.2 − 4.7 + 14.4 = 1.5 dB
        assert screen.report.transceiver.margin_db == pytest.approx(1.5, abs=1e-9)
        assert "no attenuator needed" in text_of(app, "#transceiver-out")
        screen.query_one("#tx-max", Input).value = "NaN"
        await pilot.pause()
        assert "not a number" in str(screen.query_one("#tx-max-error", Static).render())
        assert screen.report is not None  # the budget stays; only the check waits
        assert screen.report.transceiver is None
        assert "Type the four levels" in text_of(app, "#transceiver-out")
        assert screen.query_one("#tx-max", Input).value == "NaN"  # kept as typed


async def test_save_onto_a_job_link(tmp_path: Path):
    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Harbour Road duct")

    def one_link(j: Job) -> None:
        j.add_link("HR-01")

    store.update(job.id, one_link)
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press(*"10 km")
        await pilot.pause()
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)
        await pilot.press("enter")  # the job
        await pilot.press("enter")  # its first link
        await pilot.pause()
        assert isinstance(app.screen, BudgetScreen)
        assert "saved onto job Harbour Road duct, link HR-01" in text_of(app, "#budget-saved")
    saved = store.load(job.id).links[0]
    assert saved.budget is not None
    # 10 × 0.4 + 1.5 = 5.5 dB at 1310 nm
    assert saved.budget.at_wavelength(1310).loss_db == pytest.approx(5.5, abs=1e-9)
    assert saved.budget.description["connector_loss_db"] == 0.75
    assert saved.length_m == pytest.approx(10_000.0)


async def test_open_a_budget_saved_from_the_cli(tmp_path: Path):
    # A budget saved by `fieldkit budget ... --job --link` opens in the workspace, items and all.
    import argparse

    from fieldkit.commands import budget as budget_cmd

    store = JobStore(locations.jobs_dir(tmp_path / "d"))
    job = store.create("Station Road")
    parser = argparse.ArgumentParser()
    budget_cmd.add_link_options(parser, fibre_alias=True)
    for flag in ("--application", "--transceiver", "--wavelength"):
        parser.add_argument(flag)
    args = parser.parse_args(
        [
            "--fibre-type",
            "G.652.D",
            "--length",
            "12 km",
            "--splices",
            "4",
            "--splitter",
            "1x16",
            "--margin",
            "2",
            "--application",
            "GPON Class B+",
        ]
    )
    args.config_dir = str(tmp_path / "c")
    from fieldkit.jobs import budget_records

    resolved = budget_cmd.resolved_from_args(args)
    record = budget_records.budget_record(resolved, resolved.evaluate())

    def put(j: Job) -> None:
        j.add_link("SR-3").budget = record

    store.update(job.id, put)
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen, JobLinkPicker)
        await pilot.press("enter", "enter")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, BudgetScreen)
        assert [i.kind for i in screen.model.items] == [
            "fibre",
            "splitter",
            "splices",
            "connectors",
        ]
        assert screen.query_one("#margin", Input).value == "2"
        assert screen.query_one("#application", Select).value == "GPON Class B+"
        # the same numbers as when it was saved
        saved = record.at_wavelength(1310).loss_db
        assert screen.report.result.at(1310).loss_db == pytest.approx(saved, abs=1e-9)
        assert "Opened the budget saved on link SR-3" in text_of(app, "#budget-saved")


@pytest.mark.parametrize("size", SIZES)
async def test_mouse_picks_an_item_and_removes_it(tmp_path: Path, size):
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"5 km")
        await pilot.click("#add")
        await pilot.pause()
        # the sixth kind, Other loss, on the list's sixth row (y = 5): no empty first row
        # above "1 Fibre" (review C43: the focused list's frame drew one)
        await pilot.click("#choice-list", offset=(4, 5))
        await pilot.pause()
        screen.query_one("#item-value", Input).value = "0.5 dB"
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "other", "connectors"]
        await pilot.click("#items", offset=(3, 2))  # the third line: the connectors
        await pilot.pause()
        assert screen.model.current == 2
        assert screen.query_one("#item-value", Input).value == "2"
        await pilot.click("#remove")
        await pilot.pause()
        assert [i.kind for i in screen.model.items] == ["fibre", "other"]
        # 5 × 0.4 + 0.5 = 2.5 dB, no connections left
        assert screen.report.result.at(1310).loss_db == pytest.approx(2.5, abs=1e-9)


async def test_empty_start_asks_calmly_for_the_length(tmp_path: Path):
    size = (80, 24)
    # Nothing typed yet is not an error: the workspace asks for the first missing value in a
    # muted note, not in the red error style, and the list names what is missing.
    app = make(tmp_path)
    async with app.run_test(size=size, notifications=True) as pilot:
        await pilot.pause()
        screen = app.screen
        problem = screen.query_one("#budget-problem", Static)
        waiting = screen.query_one("#budget-waiting", Static)
        summary = screen.query_one("#budget-summary", Static)
        # Review C36: the prompt is said once, on the summary line under the items, not again
        # in the result panel; no column of empty result panels before there is a budget.
        assert "Type the length of item 1 (Fibre)" in str(summary.render())
        assert not problem.display and not waiting.display
        assert not screen.query_one("#result-panel").display
        assert not screen.query_one("#checks-panel").display
        shown = [str(s.render()) for s in screen.query(Static) if s.region.height]
        assert sum("Type the length" in text for text in shown) == 1
        assert summary.has_class("-waiting") and not summary.has_class("-problem")
        assert not screen.query_one("#item-value-error", Static).display
        items = screen.query_one("#items", OptionList)
        assert str(items.get_option_at_index(0).prompt) == "1. Fibre OS2, length not typed"
        assert summary.styles.color != problem.styles.color
        await pilot.press("ctrl+s")  # nothing to save yet: a warning naming it, not a picker
        await pilot.pause()
        assert isinstance(app.screen, BudgetScreen)
        assert any("length" in n.message for n in app._notifications)
        # Wrong text is still an error, in the error style.
        length = screen.query_one("#item-value", Input)
        length.value = "12 parsec"
        await pilot.pause()
        assert summary.has_class("-problem") and "item 1 (fibre): length" in str(summary.render())
        # A typed attenuation with no coefficient yet is also only a prompt.
        length.value = "12 km"
        screen.query_one("#item-preset", Select).value = "__typed__"
        await pilot.pause()
        assert "Type the attenuation of item 1 (Fibre)" in str(summary.render())


@pytest.mark.parametrize("size", SIZES)
async def test_labels_buttons_and_kind_names_fit_and_save_sits_at_the_top(tmp_path: Path, size):
    # Labels are whole words and not cut; the item buttons fit their row; every kind reads in
    # full in the chooser. Friction (issue 14, splicer): Save/Open sat about 30 lines down,
    # under the sources and the eye-safety paragraph: they are the first row, in view.
    from fieldkit.tui.budget_model import ADD_KINDS, KINDS

    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        labels = [str(lbl.render()) for lbl in screen.query("#settings-panel Label")]
        assert "Application" in labels and "Transceiver" in labels
        assert not any(lbl.endswith(".") for lbl in labels)
        for lbl in screen.query("#settings-panel Label"):
            if lbl.region.height:  # the ones on screen now are not cut off
                assert lbl.size.width >= len(str(lbl.render()))
        buttons = {b.id: str(b.label) for b in screen.query("#item-buttons Button")}
        assert buttons["remove"] == "Remove" and buttons["add"].startswith("Add")
        row = screen.query_one("#item-buttons").region
        for button in screen.query("#item-buttons Button"):
            assert row.contains_region(button.region), button.id
        bar = screen.query_one("#job-buttons").region
        assert bar.y < screen.query_one("#link-panel").region.y
        assert bar.y < screen.query_one("#budget-caution").region.y
        for button_id in ("save", "open", "new"):
            button = screen.query_one(f"#{button_id}").region
            assert button.height == 1 and button.right <= size[0] and button.bottom < size[1] - 1
        await pilot.press("ctrl+a")
        await pilot.pause()
        chooser = app.screen.query_one(OptionList)
        shown = [str(chooser.get_option_at_index(i).prompt) for i in range(chooser.option_count)]
        assert [p.split(maxsplit=1)[1] for p in shown] == [KINDS[k].title for k in ADD_KINDS]
        assert chooser.content_region.width >= max(len(p) for p in shown)


async def test_enter_moves_to_the_next_field(tmp_path: Path):
    size = (44, 22)
    # Enter after the length goes on to the wavelengths and the margin, as in Convert and Fault.
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"12 km", "enter")
        await pilot.pause()
        assert screen.query_one("#item-value", Input).value == "12 km"
        assert screen.focused is screen.query_one("#wavelengths", Input)
        await pilot.press(*"1310", "enter", "3")
        await pilot.pause()
        assert screen.focused is screen.query_one("#margin", Input)
        # 12 km × 0.4 dB/km + 2 × 0.75 dB = 6.30 dB at 1310 nm only (as in the first test)
        assert "1310 nm 6.30 dB (+3.00 dB margin)" in text_of(app, "#budget-summary")


async def test_the_workspace_shows_the_checks_beyond_loss_and_the_fibre_data(tmp_path: Path):
    # The same lines the CLI prints: the budget workspace and `fieldkit budget` share
    # fieldkit.text.budget. OS2 (G.652.D fibre) 40 km at 1550 nm, 0.1 nm at 10 GBd:
    # 40 × 18.0097 = 720.4 ps/nm (ITU-T G.652 D(λ) with λ0 1300 nm, S0 0.092, from memory),
    # spread 72.0 ps against a quarter bit of 25 ps: OVER.
    from fieldkit.text.budget import check_lines

    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"40 km")
        for field_id, value in (
            ("wavelengths", "1550"),
            ("bit-rate", "10"),
            ("spectral-width", "0.1"),
        ):
            screen.query_one(f"#{field_id}", Input).value = value
        await pilot.pause()
        out = text_of(app, "#checks-out")
        assert out == flat("\n".join(check_lines(screen.report.checks)))
        # review A10: the worst |D|·L, labelled so; no "0.0 ps/nm to" from S0 = 0
        assert "Dispersion at 1550 nm: worst |D|·L 720.4 ps/nm over 40 km: OVER" in out
        assert "0.0 ps/nm" not in out
        assert "spread 72.0 ps" in out
        data = text_of(app, "#fibre-data-out")
        assert "OS2 at 1550 nm (singlemode)" in data and "V = π·d·NA/λ" in data
        # applications with a single-mode row are offered first, the others marked
        options = [str(p) for p, _ in screen.query_one("#application", Select)._options][1:]
        first_other = next(i for i, p in enumerate(options) if "no single-mode row" in p)
        assert all("no single-mode row" in p for p in options[first_other:])
        assert "10GBASE-LR" in options[:first_other]
        assert any(p.startswith("10GBASE-SR (no single-mode row)") for p in options)


async def test_the_items_are_reached_from_the_length_without_shift_tab(tmp_path: Path):
    # Friction (issue 14, splicer): 10 Shift+Tabs from Length to the item list. Up and Down in
    # the item's field edit the previous and next item; Ctrl+B goes to the list itself.
    app = make(tmp_path)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        length = screen.query_one("#item-value", Input)
        await pilot.press(*"12 km", "down")
        await pilot.pause()
        assert (
            screen.model.current == 1 and screen.focused is length
        )  # the connectors, still typing
        assert length.value == "2"
        assert screen.query_one("#items", OptionList).highlighted == 1
        await pilot.press("up")
        await pilot.pause()
        assert screen.model.current == 0 and length.value == "12 km"
        await pilot.press("ctrl+b")
        await pilot.pause()
        assert screen.focused is screen.query_one("#items", OptionList)
        await pilot.press("down", "enter")  # pick the connectors, back to its field
        await pilot.pause()
        assert screen.model.current == 1 and screen.focused is length


async def test_new_asks_before_dropping_unsaved_items(tmp_path: Path):
    # Friction (issue 14, splicer): no "new / clear". Ctrl+N starts an empty budget; with
    # changes not saved it asks first, and cancelling keeps every item as typed.
    app = make(tmp_path)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"12 km", "ctrl+a", "2", "6")
        await pilot.pause()
        assert screen.unsaved_edits and len(screen.model.items) == 3
        await pilot.press("ctrl+n")
        await pilot.pause()
        assert isinstance(app.screen, AskDialog)
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen is screen and [i.value for i in screen.model.items] == ["12 km", "6", "2"]
        await pilot.press("ctrl+n")
        await pilot.pause()
        await pilot.click("#ask-discard")
        await pilot.pause()
        assert app.screen is screen
        assert [(i.kind, i.value) for i in screen.model.items] == [
            ("fibre", ""),
            ("connectors", "2"),
        ]
        assert not screen.unsaved_edits
        assert screen.focused is screen.query_one("#item-value", Input)
        await pilot.press("ctrl+n")  # nothing to lose now: no question
        await pilot.pause()
        assert app.screen is screen


async def test_hints_read_as_examples_never_as_values(tmp_path: Path):
    # Friction (issue 14, splicer): the splice Count hint "6" meant 0 and the Margin hint
    # "design margin, 3 dB" meant none. Every hint is an example ("e.g. ..."), says what an
    # empty field means where that is not nothing, and is drawn dim and italic.
    app = make(tmp_path)
    async with app.run_test(size=(44, 22)) as pilot:
        await pilot.pause()
        screen = app.screen
        margin = screen.query_one("#margin", Input)
        assert margin.placeholder == "e.g. 3 dB; empty: none"
        await pilot.press("ctrl+a", "2")  # splices
        await pilot.pause()
        count = screen.query_one("#item-value", Input)
        assert count.value == "" and count.placeholder == "e.g. 6 (empty: none)"
        shown = [i for i in screen.query(Input) if i.display and i.placeholder]
        assert shown and all(i.placeholder.startswith("e.g. ") for i in shown)
        style = margin.get_component_rich_style("input--placeholder")
        assert style.italic and style.dim


async def test_focus_opens_on_the_length_each_time(tmp_path: Path):
    # Each workspace opens where the user types first: the fibre length here.
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert app.screen.focused is app.screen.query_one("#item-value", Input)
        await pilot.press("f2")
        await pilot.pause()
        await pilot.press("f3")
        await pilot.pause()
        assert app.screen.focused is app.screen.query_one("#item-value", Input)


@pytest.mark.parametrize("size", SIZES)
async def test_the_invisible_light_caution_is_in_view_short_and_whole(tmp_path: Path, size):
    # Review B16: at 80x24 the full caution was cut after "Light in fibre at 850, 1300, 1310,"
    # and at 44x22 it was not on screen. It sits above the keys, one line with "more", whole;
    # the full wording on Enter (and on hover).
    from fieldkit import safety

    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"12 km")
        await pilot.pause()
        caution = screen.query_one("#budget-caution", Static)
        region = caution.region
        assert region.height == 1 and region.bottom <= size[1] - 1  # above the footer
        assert screen.get_widget_at(1, region.y)[0] is caution
        words = text_of(app, "#budget-caution")
        short = safety.INVISIBLE_LIGHT_SHORT if size[0] >= 80 else safety.INVISIBLE_LIGHT_NARROW
        assert words.startswith(f"⚠ {short}") and words.endswith("more")
        assert "…" not in words.removesuffix("… more")
        assert safety.INVISIBLE_LIGHT in str(caution.tooltip)
        caution.focus()
        await pilot.press("enter")
        await pilot.pause()
        assert flat(safety.INVISIBLE_LIGHT) in text_of(app, "#budget-caution")


async def test_labels_say_what_the_fields_are(tmp_path: Path):
    # Review A15 and C32: the rate is a line rate in GBd (said so, with the bit-rate relation in
    # the tooltip), "Spectral width" whole (not "Spectrum"), and the checks' panel is named for
    # what it holds (not "Beyond loss").
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        labels = {str(lbl.render()): lbl for lbl in screen.query("#settings-panel Label")}
        assert "Line rate" in labels and "Bit rate" not in labels
        assert "GBd" in str(screen.query_one("#bit-rate", Input).tooltip)
        assert "Gb/s" in str(screen.query_one("#bit-rate", Input).tooltip)
        spectral = labels["Spectral width"]
        assert spectral.size.width >= len("Spectral width") and spectral.size.height == 1
        assert "Spectrum" not in labels
        await pilot.press(*"12 km")
        await pilot.pause()
        assert screen.query_one("#checks-panel").border_title == "Dispersion and bandwidth"


async def test_a_split_typed_with_a_colon_is_kept_and_a_refused_count_is_marked(tmp_path: Path):
    # Review F3: the Split field dropped ":" ("1:64" became "164", refused), and the list
    # showed refused text as if it were taken ("3. 6.5 splices, fusion").
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"2 km", "ctrl+a", "3")  # a splitter after the fibre: Split "1x32"
        await pilot.pause()
        split = screen.query_one("#item-value", Input)
        split.value = ""
        await pilot.press(*"1:64")
        await pilot.pause()
        items = screen.query_one("#items", OptionList)
        assert split.value == "1:64"
        assert str(items.get_option_at_index(1).prompt) == "2. Splitter 1:64"
        assert screen.report is not None
        await pilot.press("ctrl+a", "2", *"6.5")  # splices after the splitter: count "6.5"
        await pilot.pause()
        assert screen.query_one("#item-value", Input).value == "6.5"
        assert str(items.get_option_at_index(2).prompt) == "3. Splices, count not valid, fusion"
        assert "item 3 (splices): count 6.5 is not a whole number" in text_of(
            app, "#budget-summary"
        )
