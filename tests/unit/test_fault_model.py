"""The fault workspace's form without a terminal: typed fields to the calculation's input (the
same as ``fieldkit locate`` builds from the same text), field problems, the lines shown."""

from __future__ import annotations

from typing import Any

import pytest

from fieldkit.calc.locate import (
    DEFAULT_GROUP_INDEX_UNCERTAINTY,
    DEFAULT_OFFSET_M,
    DEFAULT_SAMPLE_SPACING_M,
    DEFAULT_SCALE_ERROR_PERCENT,
    TYPED_HELIX_UNCERTAINTY_PERCENT,
)
from fieldkit.calc.units import format_number
from fieldkit.cli import build_parser
from fieldkit.commands import locate as locate_cmd
from fieldkit.tui.fault_model import HELIX_NOT_GIVEN_NOTE, NOT_GIVEN, FaultForm, build_input

#: The uncertainty fields as the workspace starts (its own defaults, the CLI's defaults).
START = {
    "offset": f"{DEFAULT_OFFSET_M:g} m",
    "scale": f"{DEFAULT_SCALE_ERROR_PERCENT:g}",
    "sampling": f"{DEFAULT_SAMPLE_SPACING_M:g} m",
    "ior-u": f"{DEFAULT_GROUP_INDEX_UNCERTAINTY:g}",
    "helix-u": format_number(TYPED_HELIX_UNCERTAINTY_PERCENT),
    "landmark-u": "0 m",
    "marking-unit": "m",
    "marking-direction": "up",
}


def _typed(**fields: str) -> dict[str, Any]:
    return {**START, **{k.replace("_", "-"): v for k, v in fields.items()}}


def _cli_input(*argv: str) -> Any:
    args = build_parser().parse_args(["locate", *argv])
    inp, _inputs, _notes = locate_cmd.build_input(args)
    return inp


@pytest.mark.parametrize(
    ("argv", "typed"),
    [
        # issue 13 item 7's repro: no helix, no landmark
        (
            ("--distance", "3.412 km", "--ior-set", "1.468"),
            {"distance": "3.412 km", "ior_set": "1.468"},
        ),
        (("--distance", "2040 m", "--ior", "1.4677"), {"distance": "2040 m", "ior": "1.4677"}),
        # a typed helix takes the same ± (0.5 points, common practice) on both faces
        (
            ("--distance", "2040 m", "--ior", "1.4677", "--helix", "2"),
            {"distance": "2040 m", "ior": "1.4677", "helix": "2"},
        ),
        (("--time", "10 us", "--ior", "1.5"), {"time": "10 µs", "ior": "1.5"}),
    ],
)
def test_the_workspace_builds_what_the_cli_builds(argv: tuple[str, ...], typed: dict) -> None:
    built = build_input(_typed(**typed))
    assert built.problem is None
    assert built.inp == _cli_input(*argv)


def test_no_helix_runs_from_the_fibre_distance_down_and_says_so() -> None:
    form = FaultForm()
    form.update(_typed(distance="3.412 km", ior_set="1.468"), [], [])
    assert form.location is not None
    p = form.location.position
    # The cable is at most as long as its fibre: the range tops out at the fibre distance
    # (within the fibre's own ±) and runs down to 3412 / 1.03 = 3312.6 m (3 % helix, common
    # practice), the estimate at 3412 / 1.015 = 3361.6 m between.
    assert p.route_distance_m == pytest.approx(3412 / 1.015, abs=0.05)
    assert p.high_m <= 3412.0 + p.fibre_uncertainty_m
    assert p.low_m <= 3412 / 1.03
    assert any("No helix given" in w for w in form.location.warnings)
    assert form.cable_fill(NOT_GIVEN)[2] == HELIX_NOT_GIVEN_NOTE
    shown = form.shown("m")
    # the digits follow the ± (about 50 m: one significant digit, the tens; common practice)
    assert shown.summary.startswith("Fault 3360 m ± 50 m")
    assert "route    3360 m ± 50 m" in shown.result
    assert shown.fault is not None and shown.fault.high_m == p.high_m


def test_nothing_typed_asks_for_the_reading() -> None:
    built = build_input(_typed())
    assert built.inp is None
    assert built.problem == "Type the OTDR distance (or the round-trip time)."
    assert not any(built.errors.values())


def test_a_bad_field_is_named_and_stops_the_result() -> None:
    built = build_input(_typed(distance="-3 dBm"))
    assert "optical power" in built.errors["distance"]
    assert built.problem is not None and built.problem.startswith("Fix the field marked in red")
    # a bare number asks for a unit, as the CLI does
    built = build_input(_typed(distance="3.412"))
    assert "3.412 needs a unit" in built.errors["distance"] and built.inp is None
    built = build_input(_typed(distance="1000 m", ior="1.46x"))
    assert built.errors["ior"].startswith("group index")
    assert built.inp is None


def test_a_group_index_below_one_is_refused_by_the_calculation() -> None:
    form = FaultForm()
    form.update(_typed(distance="1000 m", ior="0.9"), [], [])
    assert form.location is None and form.problem is not None and "below 1" in form.problem
    assert form.shown("m").problem


def test_distance_and_time_together_are_refused() -> None:
    built = build_input(_typed(distance="1000 m", time="10 µs"))
    assert built.inp is None and built.problem is not None and "not both" in built.problem


def test_round_trip_time() -> None:
    form = FaultForm()
    form.update(_typed(time="10 µs", ior="1.5", helix="0"), [], [])
    # c·t/2n = 299 792 458 × 10e-6 / 3 = 999.3082 m (c exact, BIPM SI)
    assert form.location is not None
    assert form.location.position.fibre_distance_m == pytest.approx(999.3082, abs=1e-4)


def test_marking_two_ended_and_unit() -> None:
    form = FaultForm()
    typed = _typed(
        distance="3412 m",
        ior="1.4677",
        helix="0",
        marking="10000",
        marking_direction="down",
        from_b="1590",
        total="5000",
    )
    form.update(typed, [], [])
    result = form.shown("m").result
    # no helix: marking 10 000 − 3412 = 6588 (counting down, metres)
    assert "marking  6588 m" in result
    # 3412 + 1590 − 5000 = 2 m within the two readings' ±
    assert "consistent" in result and "NOT consistent" not in result
    # 3412 m / 0.3048 = 11194 ft (international foot) ± about 60 ft: shown to the tens
    assert "route    11190 ft ± 60 ft" in form.shown("ft").result
    assert "fibre    11194 ft ± 9 ft" in form.shown("ft").result
    # half a two-ended check is a note, not a stop
    built = form.update({**typed, "total": ""}, [], [])
    assert built.inp is not None and form.location is not None
    assert form.problem == "The two-ended check needs both the distance from B and the total."
    assert form.shown("m").result.endswith(form.problem)


def test_landmarks_interpolate_and_slack_shortens_the_route() -> None:
    form = FaultForm()
    landmarks = [
        {"name": "closure 6", "otdr": 2000.0, "route": 1950.0},
        {"name": "closure 7", "otdr": 3400.0, "route": 3330.0},
    ]
    form.update(_typed(distance="2800 m", ior="1.4677"), landmarks, [])
    # 1950 + 800 × 1380 / 1400 = 2738.5714 m (interpolation between the two)
    assert form.location.position.route_distance_m == pytest.approx(2738.5714, abs=1e-3)
    shown = form.shown("m", landmarks)
    assert "between landmarks closure 6–closure 7" in shown.result
    assert [p.name for p in shown.points] == ["closure 6", "closure 7"]
    slack = [{"position": 800.0, "length": 25.0, "label": ""}]
    form.update(_typed(distance="2040 m", ior="1.4677", helix="2"), [], slack)
    # 2040 / 1.02 = 2000 m sheath; the 25 m loop at 800 m: route 1975 m
    assert form.location.position.route_distance_m == pytest.approx(1975.0, abs=1e-9)
    assert form.shown("m", [], slack).points[0].name == "25.0 m"


def test_a_cable_preset_fills_its_helix_and_names_its_source() -> None:
    form = FaultForm()
    name = next(iter(form.library.cables))
    cable = form.library.cables[name]
    helix, helix_u, note, tooltip = form.cable_fill(name)
    assert helix == f"{cable.helix_percent:g}" and helix_u == f"{cable.helix_uncertainty_percent:g}"
    assert "Typical" in note and tooltip == cable.source
    # and the workspace then builds what `locate --cable` builds
    built = build_input(_typed(distance="2040 m", ior="1.4677", helix=helix, helix_u=helix_u))
    assert built.inp == _cli_input("--distance", "2040 m", "--ior", "1.4677", "--cable", name)


def test_the_fibre_preset_fills_the_group_index() -> None:
    form = FaultForm()
    choices, default = form.fibre_choices()
    assert default == "G.652.D" and choices[0][1] == "__typed__"
    assert 1550.0 in (form.wavelengths("G.652.D") or [])
    # G.652.D at 1550 nm: 1.4677 (the preset's typical value)
    assert form.group_index_text("G.652.D", 1550.0) == "1.4677"
    assert form.wavelengths("__typed__") is None


def test_unsaved_edits_only_once_something_is_located() -> None:
    form = FaultForm()
    form.update(_typed(), [], [])
    assert not form.unsaved_edits
    form.update(_typed(distance="2040 m", ior="1.4677"), [], [])
    assert form.unsaved_edits
    form.mark_clean()
    assert not form.unsaved_edits


def test_the_workspace_models_import_without_textual() -> None:
    # A screen's state is a plain model: importing the models (and the line builders they
    # use) loads no UI toolkit, so their tests run at unit speed.
    import subprocess
    import sys

    code = (
        "import sys, fieldkit.tui.budget_model, fieldkit.tui.fault_model, "
        "fieldkit.tui.form_fields, fieldkit.text.route, fieldkit.text.layout; "
        "print('textual' in sys.modules)"
    )
    result = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=60
    )
    assert result.returncode == 0, result.stderr
    assert result.stdout.strip() == "False"


# -- what the screen asks the form (moved down from the screen) ------------------------------
def test_the_wavelength_choice_keeps_the_shown_one_else_1550_nm() -> None:
    """A fibre preset offers the wavelengths it has a group index at (presets/fibres); the one
    shown stays when the new fibre has it, else 1550 nm (the usual fault-finding wavelength,
    common practice), else the longest."""
    form = FaultForm()
    fibres, default = form.fibre_choices()
    wavelengths = form.wavelengths(default)
    assert wavelengths and 1550.0 in wavelengths and 1310.0 in wavelengths
    choice = form.wavelength_choice(default, 1310.0)
    assert choice is not None
    options, value = choice
    assert value == 1310.0 and options == [(f"{w:g} nm", w) for w in wavelengths]
    assert form.wavelength_choice(default, 850.0) == (options, 1550.0)  # not offered: 1550
    assert form.wavelength_choice(default, NOT_GIVEN) == (options, 1550.0)
    assert form.wavelength_choice(fibres[0][1], 1310.0) is None  # the index typed: no preset
    multimode = [n for _, n in fibres[1:] if 1550.0 not in (form.wavelengths(n) or [1550.0])]
    assert "OM3" in multimode  # 850 and 1300 nm only
    for name in multimode:  # no 1550 nm row: the longest it has
        longest = max(form.wavelengths(name) or [])
        assert form.wavelength_choice(name, 0.0) == (
            [(f"{w:g} nm", w) for w in sorted(form.wavelengths(name) or [])],
            longest,
        )


def test_new_asks_once_before_emptying_what_was_typed() -> None:
    form = FaultForm()
    assert form.may_clear(False)  # nothing typed: nothing to ask
    assert not form.may_clear(True)  # the first Ctrl+N only asks
    assert form.may_clear(True)  # the second empties
    assert not form.may_clear(True)  # and the next time asks again


def test_handed_off_landmarks_become_list_rows() -> None:
    rows = FaultForm.handoff_rows([("JC-3", 1500.04, 1480.0)])
    assert rows == [{"name": "JC-3", "otdr": "1500.0 m", "route": "1480.0 m"}]
    assert FaultForm().preset_warning() is None  # the shipped presets read cleanly


def test_a_handoff_keeps_typed_landmarks_and_replaces_only_its_own() -> None:
    """No data lost: rows the user typed stay; a closure named like a typed row keeps the typed
    row (the line gives the trace's reading); the next hand-off replaces the previous trace's
    untouched rows, since landmarks belong to one trace's set-up (common practice)."""
    form = FaultForm()
    typed = {"name": "jc-7", "otdr": "2.1 km", "route": "2060 m"}
    rows, said = form.merge_handoff([typed], [("JC-7", 2101.0, 2060.0), ("JC-9", 3300.0, 3240.0)])
    assert rows == [typed, {"name": "JC-9", "otdr": "3300.0 m", "route": "3240.0 m"}]
    assert "kept JC-7 as typed (the trace reads 2101.0 m)" in said
    assert "1 closure of the link as landmarks" in said
    # the next trace: its JC-9 replaces the last one's; the typed row still stays
    rows, said = form.merge_handoff(rows, [("JC-9", 3310.0, 3240.0)])
    assert rows == [typed, {"name": "JC-9", "otdr": "3310.0 m", "route": "3240.0 m"}]
    assert "1 landmark of the previous trace replaced" in said
    # a row the user edited after the hand-off is theirs now
    edited = {"name": "JC-9", "otdr": "3312 m", "route": "3240.0 m"}
    rows, said = form.merge_handoff([typed, edited], [])
    assert rows == [typed, edited] and said == ""
