"""One rule for how preset problems are shown: Budget, Fault and the CLI's warning all print
text.words.preset_problems (common practice: a warning names the first few problems, counts the
rest and says where the whole list is, so one broken file cannot fill the screen)."""

from __future__ import annotations

from pathlib import Path

from fieldkit.text.words import PRESET_PROBLEMS_SHOWN, preset_problems
from fieldkit.tui.budget_model import BudgetModel
from fieldkit.tui.fault_model import FaultForm


def test_clean_presets_say_nothing() -> None:
    assert preset_problems([]) is None


def test_three_problems_are_named_and_the_rest_counted() -> None:
    assert PRESET_PROBLEMS_SHOWN == 3
    three = ["a.toml: bad", "b.toml: bad", "c.toml: bad"]
    line = preset_problems(three)
    assert (
        line
        == "Preset problems: a.toml: bad; b.toml: bad; c.toml: bad; 'fieldkit presets' lists them"
    )
    five = preset_problems([*three, "d.toml: bad", "e.toml: bad"])
    assert five is not None and "d.toml" not in five and "(and 2 more)" in five


def test_each_problem_stays_on_one_line() -> None:
    line = preset_problems(["x.toml: is not valid TOML (Expected '='\n  at line 3)"])
    assert line is not None and "\n" not in line and "(Expected '=' at line 3)" in line


def test_budget_and_fault_show_the_same_line(tmp_path: Path) -> None:
    config = tmp_path / "config"
    presets = config / "presets"
    presets.mkdir(parents=True)
    for n in range(5):  # five broken user files: five problems
        (presets / f"mine{n}.toml").write_text("[[fibres]\n", encoding="utf-8")
    budget = BudgetModel(config_dir=config).preset_warning()
    fault = FaultForm(config_dir=config).preset_warning()
    assert budget is not None and budget == fault
    assert "(and 2 more)" in budget
