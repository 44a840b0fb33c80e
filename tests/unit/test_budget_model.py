"""The budget workspace's model without a terminal: items to the link description and back,
prompts and problems, adding, removing and moving items, unsaved edits."""

from __future__ import annotations

import pytest

from fieldkit import linkspec
from fieldkit.presets import load_presets
from fieldkit.tui.budget_model import (
    TYPED,
    BudgetModel,
    Item,
    item_errors,
    item_text,
    items_from_spec,
    missing_entry,
    spec_from_items,
)


def test_workspace_items_round_trip_through_the_saved_description() -> None:
    items = [
        Item("fibre", TYPED, "3 km", "1310=0.33 dB/km; 1550=0.19 dB/km"),
        Item("attenuator", "", "5 dB"),
        Item("other", "", "0.4 dB", "closure"),
        Item("component", "CWDM mux or demux", "2"),
        Item("splitter", TYPED, "2x8", "1.2 dB"),
        Item("splices", TYPED, "3", "0.08 dB"),
        Item("connectors", TYPED, "4", "0.5 dB"),
    ]
    spec = spec_from_items(items, {"margin": "1 dB"})
    again, fields = items_from_spec(spec)
    assert again == items
    assert fields["margin"] == "1 dB"
    # 1310 nm: 3 × 0.33 = 0.99; 5; 0.4; 2 × 2.5 (CWDM preset, common practice) = 5;
    # 2x8: 10·log10(8) = 9.0309 + 1.2 = 10.2309; 3 × 0.08 = 0.24; 4 × 0.5 = 2 -> 23.8609 dB
    report = linkspec.resolve(spec, load_presets()).evaluate()
    assert report.result.at(1310).loss_db == pytest.approx(23.8609, abs=1e-4)


def _model(**fields: str) -> BudgetModel:
    model = BudgetModel()
    model.fields.update(fields)
    return model


def test_a_length_gives_the_budget_at_both_wavelengths() -> None:
    model = _model()
    model.items[0].value = "12 km"
    outcome = model.evaluate()
    assert outcome.problem is None and outcome.prompt is None and outcome.report is not None
    # OS2 (ISO/IEC 11801-1, 0.4 dB/km, from memory): 12 × 0.4 = 4.80 dB, plus the two end
    # connections at the TIA-568.3-D 0.75 dB (from memory): 1.50 dB -> 6.30 dB
    for nm in (1310, 1550):
        assert outcome.report.result.at(nm).loss_db == pytest.approx(6.3, abs=1e-9)


def test_nothing_typed_is_a_prompt_and_wrong_text_a_problem() -> None:
    model = _model()
    outcome = model.evaluate()
    assert outcome.report is None and outcome.problem is None
    assert outcome.prompt == "Type the length of item 1 (Fibre) to see the budget."
    assert item_text(1, model.items[0]) == "1. Fibre OS2, length not typed"
    model.items[0].value = "12 parsec"
    outcome = model.evaluate()
    assert outcome.prompt is None and outcome.problem is not None
    # the list's number and kind, not "segment 1"
    assert outcome.problem == "item 1 (fibre): length: unknown unit 'parsec'"
    assert "unknown unit 'parsec'" in item_errors(model.items[0])[0]
    model.items[0].value = "12 km"
    model.items[0].preset = TYPED
    assert missing_entry(model.items) == "Type the attenuation of item 1 (Fibre) to see the budget."


def test_a_problem_in_a_second_segment_names_its_list_item() -> None:
    model = _model()
    model.items[0].value = "1 km"
    model.add("splices")
    model.current = 1
    model.add("fibre")
    model.items[2].value = "6"
    assert model.evaluate().problem == "item 3 (fibre): length 6 needs a unit (m, km, ft, kft, mi)"


def test_adding_a_splitter_and_splices() -> None:
    model = _model()
    model.items[0].value = "12 km"
    assert model.add("splitter") is None
    assert [i.kind for i in model.items] == ["fibre", "splitter", "connectors"]
    assert model.current == 1 and model.items[1].value == "1x32"
    # 1x32 ideal 10·log10(32) = 15.0515 dB + 2.1 dB preset excess = 17.1515 dB;
    # 4.80 + 17.15 + 1.50 = 23.45 dB
    assert model.evaluate().report.result.at(1310).loss_db == pytest.approx(23.4515, abs=1e-4)
    model.add("splices")
    assert model.current == 2 and model.items[2].preset == "fusion"
    model.items[2].value = "6"
    # 6 fusion splices at the TIA-568.3-D 0.3 dB maximum (from memory) = 1.80 dB -> 25.25 dB
    assert model.evaluate().report.result.at(1310).loss_db == pytest.approx(25.2515, abs=1e-4)
    assert item_text(3, model.items[2]) == "3. 6 splices, fusion"


def test_an_empty_splice_count_means_none() -> None:
    model = _model()
    model.items[0].value = "1 km"
    model.add("splices")
    # 1 × 0.4 + 1.5 = 1.9 dB: an empty count adds nothing (the hint says "empty: none")
    assert model.evaluate().report.result.at(1310).loss_db == pytest.approx(1.9, abs=1e-9)
    assert item_text(2, model.items[1]) == "2. 0 splices, fusion"


def test_one_connectors_line_and_at_least_one_fibre() -> None:
    model = _model()
    model.items[0].value = "1 km"
    refusal = model.add("connectors")
    assert refusal is not None and "one line of mated connector pairs" in refusal
    assert len(model.items) == 2 and model.current == 1  # the existing line is picked
    model.current = 0
    assert model.remove() == "A link needs at least one fibre segment."
    assert len(model.items) == 2


def test_remove_and_reorder() -> None:
    model = _model()
    model.items[0].value = "1 km"
    model.add("attenuator")
    model.items[1].value = "5 dB"
    assert model.move(1) is True
    assert [i.kind for i in model.items] == ["fibre", "connectors", "attenuator"]
    assert model.move(1) is False  # already last
    model.move(-1)
    assert [i.kind for i in model.items] == ["fibre", "attenuator", "connectors"]
    # 0.4 + 5 + 1.5 = 6.9 dB
    assert model.evaluate().report.result.at(1310).loss_db == pytest.approx(6.9, abs=1e-9)
    assert model.remove() is None
    assert [i.kind for i in model.items] == ["fibre", "connectors"]
    # 0.4 + 1.5 = 1.9 dB
    assert model.evaluate().report.result.at(1310).loss_db == pytest.approx(1.9, abs=1e-9)


def test_a_second_fibre_type_adds_the_mode_field_mismatch() -> None:
    model = _model()
    model.items[0].preset = "G.652.D"
    model.items[0].value = "4 km"
    model.add("fibre")
    assert model.items[1].preset == "G.652.D"  # the last fibre used
    model.items[1].preset = "G.657.A2"
    model.items[1].value = "100 m"
    row = model.evaluate().report.result.at(1310)
    # MFD 9.2 / 8.6 µm (typical, presets): Gaussian overlap
    # −10·log10((2·w1·w2 / (w1² + w2²))²) = 0.019738 dB, its own line
    joint = [i for i in row.items if i.kind == "mismatch"]
    assert joint and joint[0].loss_db == pytest.approx(0.019738, abs=2e-6)
    # 4 × 0.4 + 0.1 × 0.4 + 0.019738 + 1.5 = 3.159738 dB
    assert row.loss_db == pytest.approx(3.159738, abs=1e-6)


def test_typed_attenuation_per_wavelength() -> None:
    model = _model()
    model.items[0].preset = TYPED
    model.items[0].value = "10 km"
    model.items[0].extra = "1310=0.33 dB/km; 1550=0.19 dB/km"
    result = model.evaluate().report.result
    # 10 × 0.33 + 1.5 = 4.80 dB; 10 × 0.19 + 1.5 = 3.40 dB
    assert result.at(1310).loss_db == pytest.approx(4.8, abs=1e-9)
    assert result.at(1550).loss_db == pytest.approx(3.4, abs=1e-9)
    model.items[0].extra = "0.33"
    assert "no length unit" in item_errors(model.items[0])[1]
    assert model.evaluate().report is None


def test_application_and_typed_transceiver() -> None:
    model = _model()
    model.items[0].value = "8 km"
    model.application = "10GBASE-LR"
    report = model.evaluate().report
    # IEEE 802.3 Clause 52 (from memory): 6.2 dB; 3.2 + 1.5 = 4.7 dB, headroom +1.50 dB
    assert report.application.verdict == "pass"
    assert report.application.loss_headroom_db == pytest.approx(1.5, abs=1e-9)
    model.transceiver = TYPED
    outcome = model.evaluate()
    assert outcome.report is not None and outcome.report.transceiver is None
    assert outcome.tx_problem == (
        "Type Tx minimum, Tx maximum, Rx sensitivity, Rx overload to check the transceiver."
    )
    assert not any(outcome.field_errors.values())  # nothing typed is not an error
    model.fields.update({"tx-min": "-8.2", "tx-max": "0.5"})
    assert (
        model.evaluate().tx_problem == "Type Rx sensitivity, Rx overload to check the transceiver."
    )
    model.fields.update({"rx-sens": "-14.4", "rx-over": "0.5"})
    outcome = model.evaluate()
    # margin −8.2 − 4.7 + 14.4 = 1.5 dB
    assert outcome.report.transceiver.margin_db == pytest.approx(1.5, abs=1e-9)
    model.fields["tx-max"] = "NaN"
    outcome = model.evaluate()
    assert "not a number" in outcome.field_errors["tx-max"]
    assert outcome.report is not None and outcome.report.transceiver is None
    assert outcome.tx_problem is not None and outcome.tx_problem.startswith("Type the four levels")


def test_margin_and_wavelengths() -> None:
    model = _model(wavelengths="1310, 1625", margin="3")
    model.items[0].value = "2 km"
    result = model.evaluate().report.result
    assert [w.wavelength_nm for w in result.wavelengths] == [1310.0, 1625.0]
    # OS2 at 1625 nm (G.652.D range maximum, 0.4 dB/km, from memory): 0.8 + 1.5 = 2.3; + 3 dB
    assert result.at(1625).loss_with_margin_db == pytest.approx(5.3, abs=1e-9)
    model.fields["wavelengths"] = "1490, 2500"
    outcome = model.evaluate()
    assert outcome.report is None
    assert "outside the fibre bands" in outcome.field_errors["wavelengths"]
    model.fields["margin"] = ""
    model.fields["wavelengths"] = ""
    assert model.evaluate().report.result.margin_db == 0  # an empty margin is none


def test_unsaved_edits_follow_the_model() -> None:
    model = _model()
    model.mark_clean()
    assert not model.unsaved_edits
    model.items[0].value = "7.5 km"
    assert model.unsaved_edits
    model.items[0].value = ""
    assert not model.unsaved_edits
    model.application = "10GBASE-LR"
    assert model.unsaved_edits


def test_load_warns_of_presets_no_longer_there() -> None:
    model = _model()
    warnings = model.load([Item("fibre", "OS2", "1 km")], {"application": "No such PHY"})
    assert model.application is None
    assert warnings == ["application: 'No such PHY' is not among the presets now"]


def test_applications_with_a_row_for_the_fibre_come_first() -> None:
    choices = _model().application_choices()
    shown = [p for p, _ in choices]
    first_other = next(i for i, p in enumerate(shown) if "no single-mode row" in p)
    assert all("no single-mode row" in p for p in shown[first_other:])
    assert "10GBASE-LR" in shown[:first_other]
    assert "10GBASE-SR (no single-mode row)" in shown


# -- what the screen asks the model (moved down from the screen) -----------------------------
def test_result_panels_say_what_each_check_waits_for() -> None:
    """The panels' texts are the CLI's lines (fieldkit/text/budget.py); a check with nothing
    to show says what it waits for."""
    from fieldkit.text import budget as lines

    model = _model()
    assert model.result_texts(model.evaluate(), 60) == {}  # nothing typed: no budget
    model.items[0].value = "12 km"
    outcome = model.evaluate()
    assert outcome.report is not None
    texts = model.result_texts(outcome, 60)
    assert set(texts) == {
        "budget",
        "summary",
        "sources",
        "application",
        "transceiver",
        "checks",
        "fibre-data",
    }
    assert texts["budget"] == "\n".join(lines.breakdown_lines(outcome.report, 60))
    assert texts["summary"] == lines.summary_text(outcome.report)
    assert texts["application"] == "Pick an application to check."
    assert texts["transceiver"] == "Pick a transceiver to check."
    model.transceiver = TYPED  # levels not typed yet: the check says which
    outcome = model.evaluate()
    assert model.result_texts(outcome, 60)["transceiver"] == outcome.tx_problem
    model.choose("application", "10GBASE-LR")
    outcome = model.evaluate()
    assert outcome.report is not None and outcome.report.application is not None
    assert model.result_texts(outcome, None)["application"] == "\n".join(
        lines.application_lines(outcome.report.application)
    )


def test_choices_and_questions_the_screen_shows() -> None:
    model = _model()
    assert model.add_title() == "Add an item after item 1"
    model.items.clear()
    assert model.add_title() == "Add an item to the link"
    choices = model.transceiver_choices()
    assert choices[-1] == ("typed levels", TYPED) and len(choices) > 1
    assert not model.typed_levels
    model.choose("transceiver", TYPED)
    assert model.typed_levels
    with pytest.raises(ValueError, match="no such check"):
        model.choose("margin", "1")
    assert model.preset_warning() is None  # the shipped presets read cleanly
    title, asked, answers = BudgetModel.unsaved_question("A new budget", "Discard and start new")
    assert title == "The budget has unsaved changes" and asked[0].startswith("A new budget ")
    assert [key for key, _ in answers] == ["save", "discard"]


def _reviewed_link() -> BudgetModel:
    """The reviewer's link (F3 review): a fibre, a splitter and splices, each with text its
    field refuses."""
    model = _model()
    model.items = [
        Item("fibre", "OS2", "5 dBm"),
        Item("splitter", "1xN splitter", "164"),
        Item("splices", "fusion", "6.5"),
        Item("connectors", "TIA-568.3-D", "2"),
    ]
    return model


def test_the_list_says_an_item_is_refused_and_the_text_stays_typed() -> None:
    # Review F3: "5 dBm" showed as "1. Fibre OS2, 5 dBm", as if it had been taken.
    model = _reviewed_link()
    lines = [item_text(i, it) for i, it in enumerate(model.items, start=1)]
    assert lines == [
        "1. Fibre OS2, length not valid",
        "2. Splitter, split not valid",
        "3. Splices, count not valid, fusion",
        "4. 2 connector pairs, TIA-568.3-D",
    ]
    assert [it.value for it in model.items] == ["5 dBm", "164", "6.5", "2"]  # never dropped
    model.items[0].value = "5 km"
    assert item_text(1, model.items[0]) == "1. Fibre OS2, 5 km"
    other = Item("other", "", "0.5 dBm", "closure")
    assert item_text(5, other) == "5. closure, loss not valid"


def test_problems_number_items_as_the_list_does() -> None:
    # Review F3: item 2 was "component 1", item 3 "splices 1", beside "Item 3: Splices".
    model = _reviewed_link()
    model.items[0].value = "5 km"
    assert model.evaluate().problem == (
        "item 2 (splitter): split '164' is not 1xN or 2xN (e.g. 1x32 or 1:32)"
    )
    model.items[1].value = "1:64"
    assert model.evaluate().problem == "item 3 (splices): count 6.5 is not a whole number"
    model.items[2].value = "6"
    assert model.evaluate().report is not None
    # A problem only the link description finds (no preset excess for 1x3) is numbered the
    # same way, not "component 1".
    model.items[1].value = "1x3"
    problem = model.evaluate().problem or ""
    assert problem.startswith("item 2 (splitter): preset '1xN splitter' has no excess loss")


def test_a_split_typed_with_a_colon_is_the_same_ratio() -> None:
    model = _model()
    model.items[0].value = "2 km"
    model.add("splitter")
    totals = []
    for split in ("1x64", "1:64", "1×64"):
        model.items[1].value = split
        report = model.evaluate().report
        assert report is not None, split
        totals.append(report.result.at(1310).loss_db)
    assert totals[0] == totals[1] == totals[2]
    assert item_text(2, model.items[1]) == "2. Splitter 1×64"  # kept as typed


def test_connectors_are_named_mated_connector_pairs_everywhere() -> None:
    # Review F3: "Connectors" in the add dialog, "2 mated pairs" in the list and "2 mated
    # connector pairs" in the budget for one part: now "Mated connector pairs" (the dialog, the
    # item's panel), "connector pairs" (the list), "mated connector pairs" (the budget).
    from fieldkit.tui.budget_model import KINDS

    model = _model()
    model.items[0].value = "1 km"
    assert KINDS["connectors"].title == "Mated connector pairs"
    # the list's short form (the list is 35 columns wide at 80x24; the line stays one line)
    assert item_text(2, model.items[1]) == "2. 2 connector pairs, TIA-568.3-D"
    report = model.evaluate().report
    assert report is not None
    assert any(i.name.startswith("2 mated connector pairs") for i in report.result.at(1310).items)
    assert "mated connector pairs" in (model.add("connectors") or "")
