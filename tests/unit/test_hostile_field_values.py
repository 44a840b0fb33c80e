"""Every hostile value (tests/hostile_values.py) in every typed field of the Fault and Budget
workspaces, one field at a time with the others as a user would have them, through the same
models the screens call on each keystroke (fieldkit/tui/fault_model.py: ``FaultForm.update`` and
``shown``; fieldkit/tui/budget_model.py: ``BudgetModel.evaluate`` and ``item_errors``): nothing
raises, and a value refused is refused with a message naming its field. The workspaces
themselves are driven with the same values in tests/functional/test_hostile_fields.py."""

from __future__ import annotations

from dataclasses import replace

import pytest
from hostile_values import HOSTILE

from fieldkit.calc.units import InputError
from fieldkit.tui.budget_model import KINDS, SETTING_FIELDS, TYPED, BudgetModel, Item, item_errors
from fieldkit.tui.fault_model import (
    FIELDS,
    LANDMARK_COLUMNS,
    SLACK_COLUMNS,
    FaultForm,
)
from fieldkit.tui.form_fields import field_name, parse_row

# -- Fault --------------------------------------------------------------------------------------
#: The form as it starts (each field's start text), with a reading and the fibre's group index
#: typed: the hints' own examples (fault_model.FIELDS), so the calculation is reached.
FAULT_START = {key: f.start for key, f in FIELDS.items() if f.start} | {
    "distance": "3.412 km",
    "ior": "1.4677",
}
#: A landmark and a slack loop as typed (the columns' examples) and as the lists hand them on.
LANDMARK_TYPED = {"name": "closure 7", "otdr": "3.400 km", "route": "3330 m"}
SLACK_TYPED = {"position": "1200 m", "length": "20 m", "label": "coil at HH 4"}
LANDMARK = parse_row(LANDMARK_COLUMNS, LANDMARK_TYPED)
SLACK = parse_row(SLACK_COLUMNS, SLACK_TYPED)


def test_the_fault_start_locates() -> None:
    form = FaultForm()
    form.update(FAULT_START, [LANDMARK], [SLACK])
    assert form.location is not None, form.problem  # else the values below reach nothing


@pytest.mark.parametrize("key", list(FIELDS))
def test_no_hostile_value_in_a_fault_field_raises(key: str) -> None:
    label = field_name(FIELDS[key].label)
    for text in HOSTILE:
        form = FaultForm()
        typed = FAULT_START | {key: text}
        if key == "time":
            typed.pop("distance")  # a distance or a time, not both
        built = form.update(typed, [LANDMARK], [SLACK])
        for unit in ("m", "km", "ft"):
            form.shown(unit, [LANDMARK], [SLACK])
        error = built.errors[key]
        assert not error or error.startswith(label), (key, text, error)
        if error:
            assert form.location is None and form.problem, (key, text)


@pytest.mark.parametrize(
    ("columns", "row", "which"),
    [(LANDMARK_COLUMNS, LANDMARK_TYPED, "landmark"), (SLACK_COLUMNS, SLACK_TYPED, "slack")],
)
def test_no_hostile_value_in_a_landmark_or_slack_row_raises(columns, row, which) -> None:
    for column in columns:
        for text in HOSTILE:
            try:
                parsed = parse_row(columns, row | {column.key: text})
            except InputError as exc:
                # a refused row names its column (the row stays in its fields to be fixed)
                assert str(exc).startswith(field_name(column.label)), (column.key, text, exc)
                continue
            form = FaultForm()
            rows = {"landmark": ([parsed], [SLACK]), "slack": ([LANDMARK], [parsed])}[which]
            form.update(FAULT_START, *rows)
            form.shown("m", *rows)


# -- Budget -------------------------------------------------------------------------------------
#: One item of each kind with both fields typed, from the hints' examples (budget_model.KINDS).
BUDGET_ITEMS = {
    "fibre": Item("fibre", TYPED, "1.2 km", "0.35 dB/km"),
    "connectors": Item("connectors", TYPED, "4", "0.5 dB"),
    "splices": Item("splices", TYPED, "6", "0.1 dB"),
    "splitter": Item("splitter", TYPED, "1x32", "2.0 dB"),
    "component": Item("component", "WDM coupler 1310/1550", "2"),  # a built-in preset
    "attenuator": Item("attenuator", "", "5 dB"),
    "other": Item("other", "", "0.5 dB", "patch cord"),
}
#: The settings as a user would type them (the hints' examples).
BUDGET_SETTINGS = {
    "wavelengths": "1310, 1550",
    "margin": "3 dB",
    "bit-rate": "10.3125",
    "spectral-width": "0.1",
    "tx-min": "-8.2 dBm",
    "tx-max": "0.5 dBm",
    "rx-sens": "-14.4 dBm",
    "rx-over": "0.5 dBm",
}


def _budget() -> BudgetModel:
    model = BudgetModel(items=[replace(i) for i in BUDGET_ITEMS.values()])
    model.fields.update(BUDGET_SETTINGS)
    model.transceiver = TYPED  # the four level fields count only for a typed transceiver
    return model


def test_the_budget_start_has_a_report() -> None:
    outcome = _budget().evaluate()
    assert outcome.report is not None and not outcome.tx_problem, outcome.problem
    assert set(BUDGET_SETTINGS) == set(SETTING_FIELDS)  # every settings field is tried
    assert set(BUDGET_ITEMS) == set(KINDS)  # and every kind of item


@pytest.mark.parametrize("field_id", SETTING_FIELDS)
def test_no_hostile_value_in_a_budget_setting_raises(field_id: str) -> None:
    for text in HOSTILE:
        model = _budget()
        model.fields[field_id] = text
        outcome = model.evaluate()
        error = outcome.field_errors.get(field_id, "")
        if error:  # refused: said beside the field, and the budget or its check waits
            assert outcome.report is None or outcome.tx_problem, (field_id, text)


ITEM_FIELDS = [
    (kind, which)
    for kind in BUDGET_ITEMS
    for which in ("value", "extra")
    if getattr(KINDS[kind], which)
]


@pytest.mark.parametrize(("kind", "which"), ITEM_FIELDS)
def test_no_hostile_value_in_a_budget_item_raises(kind: str, which: str) -> None:
    for text in HOSTILE:
        model = _budget()
        item = model.items[list(BUDGET_ITEMS).index(kind)]
        setattr(item, which, text)
        value_error, extra_error = item_errors(item)  # shown beside the item's fields
        outcome = model.evaluate()
        if value_error or extra_error:
            assert outcome.report is None and outcome.problem, (kind, which, text)
