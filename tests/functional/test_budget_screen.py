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
from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

SIZES = [(80, 24), (44, 22)]


def text_of(app, selector: str) -> str:
    # No-break spaces keep indents and units together on screen; the words are the same.
    return str(app.screen.query_one(selector, Static).render()).replace("\u00a0", " ")


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
        assert "1310 nm  max 6.30 dB" in out and "1550 nm  max 6.30 dB" in out
        assert "OS2 12 km × 0.4 dB/km" in out
        assert "1310 nm 6.30 dB" in text_of(app, "#budget-summary")
        sources = text_of(app, "#sources-out")
        assert "ISO/IEC 11801-1" in sources and "ANSI/TIA-568.3-D" in sources


@pytest.mark.parametrize("size", SIZES)
async def test_bad_length_is_explained_beside_the_field_and_kept(tmp_path: Path, size):
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        await pilot.press(*"12 parsec")
        await pilot.pause()
        error = app.screen.query_one("#item-value-error", Static)
        assert error.display and "unknown unit 'parsec'" in str(error.render())
        assert app.screen.query_one("#item-value", Input).value == "12 parsec"
        assert app.screen.report is None
        assert "item 1: length" in text_of(app, "#budget-problem")
        for _ in range(6):
            await pilot.press("backspace")
        await pilot.press("k", "m")
        await pilot.pause()
        assert not error.display
        assert app.screen.report is not None


async def test_add_splitter_and_splices_by_keys(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press(*"12 km")
        app.screen.query_one("#add-kind", Select).value = "splitter"
        await pilot.pause()
        await pilot.press("ctrl+a")  # a 1x32 splitter after the fibre
        await pilot.pause()
        items = app.screen.query_one("#items", OptionList)
        assert items.option_count == 3
        assert app.screen.items[1].kind == "splitter"
        # 1x32 ideal 10·log10(32) = 15.0515 dB + 2.1 dB preset excess = 17.1515 dB;
        # 4.80 + 17.15 + 1.50 = 23.45 dB
        assert app.screen.report.result.at(1310).loss_db == pytest.approx(23.4515, abs=1e-4)
        app.screen.query_one("#add-kind", Select).value = "splices"
        await pilot.pause()
        await pilot.press("ctrl+a")
        await pilot.pause()
        assert app.screen.focused is app.screen.query_one("#item-value", Input)
        await pilot.press("6")
        await pilot.pause()
        # 6 fusion splices at the TIA-568.3-D 0.3 dB maximum = 1.80 dB -> 25.25 dB
        assert app.screen.report.result.at(1310).loss_db == pytest.approx(25.2515, abs=1e-4)
        assert "6 splices, fusion" in str(items.get_option_at_index(2).prompt)


async def test_remove_and_reorder(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press(*"1 km")
        screen = app.screen
        screen.query_one("#add-kind", Select).value = "attenuator"
        await pilot.pause()
        await pilot.press("ctrl+a", *"5 dB")
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "attenuator", "connectors"]
        await pilot.press("ctrl+down")
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "connectors", "attenuator"]
        await pilot.press("ctrl+up")
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "attenuator", "connectors"]
        # 0.4 + 5 + 1.5 = 6.9 dB
        assert screen.report.result.at(1310).loss_db == pytest.approx(6.9, abs=1e-9)
        await pilot.press("ctrl+x")
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "connectors"]
        assert screen.report.result.at(1310).loss_db == pytest.approx(1.9, abs=1e-9)
        screen.current = 0
        await pilot.press("ctrl+x")  # the only fibre segment stays
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "connectors"]


async def test_mouse_add_and_second_fibre_mismatch(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        screen.query_one("#item-preset", Select).value = "G.652.D"
        await pilot.press(*"4 km")
        await pilot.pause()
        await pilot.click("#add")  # adds another fibre segment (the default kind)
        await pilot.pause()
        screen.query_one("#item-preset", Select).value = "G.657.A2"
        await pilot.pause()
        screen.query_one("#item-value", Input).value = "100 m"
        await pilot.pause()
        row = screen.report.result.at(1310)
        # MFD 9.2 / 8.6 µm (typical, presets): Gaussian overlap 0.019738 dB, its own line
        joint = [i for i in row.items if i.kind == "mismatch"]
        assert joint and joint[0].loss_db == pytest.approx(0.019738, abs=2e-6)
        # 4 × 0.4 + 0.1 × 0.4 + 0.019738 + 1.5 = 3.159738 dB
        assert row.loss_db == pytest.approx(3.159738, abs=1e-6)


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
        # 10 × 0.33 + 1.5 = 4.80 dB; 10 × 0.19 + 1.5 = 3.40 dB
        result = screen.report.result
        assert result.at(1310).loss_db == pytest.approx(4.8, abs=1e-9)
        assert result.at(1550).loss_db == pytest.approx(3.4, abs=1e-9)
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


async def test_margin_and_wavelengths_fields(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"2 km")
        screen.query_one("#wavelengths", Input).value = "1310, 1625"
        screen.query_one("#margin", Input).value = "3"
        await pilot.pause()
        result = screen.report.result
        assert [w.wavelength_nm for w in result.wavelengths] == [1310.0, 1625.0]
        # OS2 at 1625 nm (G.652.D range maximum, 0.4 dB/km): 0.8 + 1.5 = 2.3; + 3 dB margin
        assert result.at(1625).loss_with_margin_db == pytest.approx(5.3, abs=1e-9)
        screen.query_one("#wavelengths", Input).value = "1490, 2500"
        await pilot.pause()
        assert "outside the fibre bands" in str(
            screen.query_one("#wavelengths-error", Static).render()
        )


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


async def test_save_without_a_budget_warns(tmp_path: Path):
    app = make(tmp_path)
    async with app.run_test(size=(44, 22), notifications=True) as pilot:
        await pilot.pause()
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, BudgetScreen)
        assert any("length" in n.message for n in app._notifications)


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
        assert [i.kind for i in screen.items] == ["fibre", "splitter", "splices", "connectors"]
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
        screen.query_one("#add-kind", Select).value = "other"
        await pilot.pause()
        await pilot.click("#add")
        await pilot.pause()
        screen.query_one("#item-value", Input).value = "0.5 dB"
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "other", "connectors"]
        await pilot.click("#items", offset=(3, 2))  # the third line: the connectors
        await pilot.pause()
        assert screen.current == 2
        assert screen.query_one("#item-value", Input).value == "2"
        await pilot.click("#remove")
        await pilot.pause()
        assert [i.kind for i in screen.items] == ["fibre", "other"]
        # 5 × 0.4 + 0.5 = 2.5 dB, no connections left
        assert screen.report.result.at(1310).loss_db == pytest.approx(2.5, abs=1e-9)


@pytest.mark.parametrize("size", SIZES)
async def test_empty_start_asks_calmly_for_the_length(tmp_path: Path, size):
    # Nothing typed yet is not an error: the workspace asks for the first missing value in a
    # muted note, not in the red error style, and the list names what is missing.
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        problem = screen.query_one("#budget-problem", Static)
        waiting = screen.query_one("#budget-waiting", Static)
        assert not problem.display
        assert waiting.display and not waiting.has_class("field-error")
        assert "Type the length of item 1 (Fibre)" in str(waiting.render())
        summary = screen.query_one("#budget-summary", Static)
        assert summary.has_class("-waiting") and not summary.has_class("-problem")
        assert not screen.query_one("#item-value-error", Static).display
        items = screen.query_one("#items", OptionList)
        assert str(items.get_option_at_index(0).prompt) == "1. Fibre OS2, length not typed"
        assert summary.styles.color != problem.styles.color
        # Wrong text is still an error, in the error style.
        await pilot.press(*"12 parsec")
        await pilot.pause()
        assert problem.display and not waiting.display
        assert summary.has_class("-problem")
        # A typed attenuation with no coefficient yet is also only a prompt.
        for _ in range(6):
            await pilot.press("backspace")
        await pilot.press("k", "m")
        screen.query_one("#item-preset", Select).value = "__typed__"
        await pilot.pause()
        assert waiting.display and "Type the attenuation of item 1 (Fibre)" in str(waiting.render())
        await pilot.press("ctrl+s")  # nothing to save yet: a warning, not a picker
        await pilot.pause()
        assert isinstance(app.screen, BudgetScreen)


@pytest.mark.parametrize("size", SIZES)
async def test_check_labels_are_whole_words(tmp_path: Path, size):
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        labels = [str(lbl.render()) for lbl in app.screen.query("#settings-panel Label")]
        assert "Application" in labels and "Transceiver" in labels
        assert not any(lbl.endswith(".") for lbl in labels)
        for lbl in app.screen.query("#settings-panel Label"):
            if lbl.region.height:  # the ones on screen now are not cut off
                assert lbl.size.width >= len(str(lbl.render()))


@pytest.mark.parametrize("size", SIZES)
async def test_item_kind_names_and_buttons_fit(tmp_path: Path, size):
    # Every kind of item to add reads in full beside the buttons, at both sizes.
    from fieldkit.tui.budget_model import ADD_KINDS, KINDS

    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        kind = screen.query_one("#add-kind", Select)
        longest = max(len(KINDS[k].title) for k in ADD_KINDS)
        assert kind.content_region.width >= longest + 3  # the name, a space and the arrow
        labels = {b.id: str(b.label) for b in screen.query("#item-buttons Button")}
        assert labels["remove"] == "Remove"
        row = screen.query_one("#item-buttons").region
        for button in screen.query("#item-buttons Button"):
            assert row.contains_region(button.region), button.id


@pytest.mark.parametrize("size", SIZES)
async def test_enter_moves_to_the_next_field(tmp_path: Path, size):
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


@pytest.mark.parametrize("size", SIZES)
async def test_typed_transceiver_levels_are_asked_for_not_refused(tmp_path: Path, size):
    # Choosing "typed levels" leaves four empty fields: the panel asks for the ones missing,
    # no field shows an error, and the budget itself stays.
    app = make(tmp_path)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        screen = app.screen
        await pilot.press(*"8 km")
        screen.query_one("#transceiver", Select).value = "__typed__"
        await pilot.pause()
        out = text_of(app, "#transceiver-out")
        assert out == (
            "Type Tx minimum, Tx maximum, Rx sensitivity, Rx overload to check the transceiver."
        )
        for field_id in ("tx-min", "tx-max", "rx-sens", "rx-over"):
            assert not screen.query_one(f"#{field_id}-error", Static).display
        assert screen.report is not None
        screen.query_one("#tx-min", Input).value = "-8.2"
        screen.query_one("#tx-max", Input).value = "0.5"
        await pilot.pause()
        assert text_of(app, "#transceiver-out") == (
            "Type Rx sensitivity, Rx overload to check the transceiver."
        )


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
        assert out == "\n".join(check_lines(screen.report.checks))
        assert "Dispersion at 1550 nm: 0.0 ps/nm to 720.4 ps/nm over 40 km: OVER" in out
        assert "spread 72.0 ps" in out
        data = text_of(app, "#fibre-data-out")
        assert "OS2 at 1550 nm (singlemode)" in data and "V = π·d·NA/λ" in data
        # applications with a single-mode row are offered first, the others marked
        options = [str(p) for p, _ in screen.query_one("#application", Select)._options][1:]
        first_other = next(i for i, p in enumerate(options) if "no single-mode row" in p)
        assert all("no single-mode row" in p for p in options[first_other:])
        assert "10GBASE-LR" in options[:first_other]
        assert any(p.startswith("10GBASE-SR (no single-mode row)") for p in options)
