"""The budget workspace: build a link item by item and read its loss at each wavelength.

Layout and wiring only: the items, the settings, what they give, and opening and saving on a
job's link live in :mod:`fieldkit.tui.budget_model` (tested without a terminal); the lines
shown come from :mod:`fieldkit.text.budget`, the ones ``fieldkit budget`` prints. Pick an item
in the list to edit it below (Up/Down in its field go to the next one); the totals, the
breakdown and the checks update on every keystroke.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import Button, Input, OptionList, Select

from fieldkit import safety
from fieldkit.tui import keys
from fieldkit.tui.budget_model import (
    ADD_KINDS,
    DEFAULT_ADD_KIND,
    KINDS,
    LEVEL_FIELDS,
    SETTING_FIELDS,
    SETTINGS,
    BudgetModel,
    Notice,
    Outcome,
)
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.caution import Caution
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.link_items import LinkItems, choice_row, field_row
from fieldkit.tui.widgets.result_lines import ResultLines
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar
from fieldkit.tui.workspaces import WorkspaceScreen

#: The result panels after the budget itself: id, title.
_PANELS = (
    ("application", "Application"),
    ("transceiver", "Transceiver"),
    ("checks", "Dispersion and bandwidth"),
    ("fibre-data", "Fibre data"),
    ("sources", "Values used"),
)
_OUTPUTS = ("#budget-out", *(f"#{p}-out" for p, _ in _PANELS))


def _button(label: str, button_id: str, use: str) -> Button:
    return Button(label, id=button_id, compact=True, tooltip=keys.tip("budget", use))


class BudgetScreen(WorkspaceScreen):
    """Build a link, read its budget per wavelength, check an application or a transceiver."""

    CSS_PATH = "budget.tcss"
    AUTO_FOCUS = "#item-value"
    BINDINGS = keys.bindings("budget")

    def __init__(self) -> None:
        super().__init__()
        self.model = BudgetModel()
        self.outcome = Outcome()
        self._job_id: str | None = None  # the job last opened or saved to, picked first next time
        self._application_choices: list[tuple[str, str]] = []

    # The last result and the items, as the tests and the save read them.
    @property
    def report(self) -> Any:
        return self.outcome.report

    @property
    def resolved(self) -> Any:
        return self.outcome.resolved

    @property
    def unsaved_edits(self) -> bool:
        """True when the budget was changed since it was last saved, opened or started."""
        return self.model.unsaved_edits

    # -- layout -----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with VerticalScroll(id="budget-body"):
            # Save and open first: not under the results, the sources and the caution.
            with Horizontal(id="job-buttons"):
                yield _button(f"Save to job {keys.hint('save')}", "save", "save")
                yield _button(f"Open saved {keys.hint('open')}", "open", "open")
                yield _button(f"New {keys.hint('new')}", "new", "new")
            yield ResultLines(id="budget-saved", classes="field-note")
            with Vertical(classes="two-col"):
                with Vertical(classes="col"):
                    yield LinkItems(self.model)
                    yield ResultLines(id="budget-summary")
                    with Vertical(id="settings-panel", classes="panel") as panel:
                        panel.border_title = "Wavelengths and checks"
                        for label, field_id, hint, tooltip in SETTINGS:
                            yield from field_row(label, field_id, hint, tooltip)
                        yield from choice_row("Application", "application", "no application check")
                        yield from choice_row("Transceiver", "transceiver", "no transceiver check")
                        with Vertical(id="tx-levels"):
                            for label, field_id, hint in LEVEL_FIELDS:
                                yield from field_row(label, field_id, hint)
                with Vertical(classes="col"):
                    with Vertical(id="result-panel", classes="panel") as panel:
                        panel.border_title = "Budget"
                        yield ResultLines(id="budget-problem", classes="field-error")
                        yield ResultLines(id="budget-waiting", classes="field-note")
                        yield ResultLines(id="budget-out", classes="result")
                    for panel_id, title in _PANELS:
                        with Vertical(id=f"{panel_id}-panel", classes="panel") as panel:
                            panel.border_title = title
                            yield ResultLines(id=f"{panel_id}-out", classes="result")
        # Outside the scrolling body, above the keys: short and whole at 80x24, in view at 44x22
        # (one line with "more"; the full caution on Enter, a click and hover).
        yield Caution(
            safety.INVISIBLE_LIGHT,
            (safety.INVISIBLE_LIGHT_SHORT, safety.INVISIBLE_LIGHT_NARROW),
            id="budget-caution",
        )
        yield KeyFooter()

    def on_mount(self) -> None:
        self.model.config_dir = fieldkit_app(self).config_dir
        self.query_one("#transceiver", Select).set_options(self.model.transceiver_choices())
        self.query_one("#tx-levels").display = False
        for error in self.query(".field-error"):
            error.display = False
        self._say("")
        if warning := self.model.preset_warning():
            self.notify(warning, severity="warning", timeout=10)
        self.query_one(LinkItems).show()
        self.recompute()
        self.model.mark_clean()

    # -- the items --------------------------------------------------------------------------
    @on(LinkItems.Changed)
    def _item_changed(self) -> None:
        self.recompute()

    @on(LinkItems.Picked)
    def _item_picked(self) -> None:
        self._put("#fibre-data-out", "\n".join(self.model.fibre_data_lines(self.outcome)))

    def _error(self, field_id: str, message: str) -> None:
        error = self.query_one(f"#{field_id}-error", ResultLines)
        error.show_lines(message)
        error.display = bool(message)

    # -- item actions -----------------------------------------------------------------------
    def action_add_item(self) -> None:
        """Ask which kind to add: the chooser opens at the same kind every time."""
        from fieldkit.tui.widgets.choice_dialog import ChoiceDialog

        self.app.push_screen(
            ChoiceDialog(
                self.model.add_title(),
                [(KINDS[k].title, k) for k in ADD_KINDS],
                start=DEFAULT_ADD_KIND,
                note="Arrows and Enter, or a digit; Esc adds nothing.",
            ),
            self._add_kind,
        )

    def _add_kind(self, kind: str | None) -> None:
        if kind is None:
            return
        refusal = self.model.add(kind)
        self.query_one(LinkItems).show()
        if refusal:
            self.notify(refusal, severity="warning")
            return
        self.query_one("#item-value", Input).focus()
        self.recompute()

    def action_remove_item(self) -> None:
        refusal = self.model.remove()
        if refusal:
            self.notify(refusal, severity="warning")
            return
        self.query_one(LinkItems).show()
        self.recompute()

    def action_move_item(self, step: int) -> None:
        if self.model.move(step):
            self.query_one(LinkItems).show()
            self.recompute()

    def action_focus_items(self) -> None:
        self.query_one("#items", OptionList).focus()

    @on(Button.Pressed)
    def _button(self, event: Button.Pressed) -> None:
        actions: dict[str, Callable[[], None]] = {
            "add": self.action_add_item,
            "remove": self.action_remove_item,
            "up": lambda: self.action_move_item(-1),
            "down": lambda: self.action_move_item(1),
            "save": self.action_save,
            "open": self.action_open_saved,
            "new": self.action_new_budget,
        }
        action = actions.get(event.button.id or "")
        if action is not None:
            action()

    @on(Input.Submitted)
    def _next_field(self, event: Input.Submitted) -> None:
        # Enter moves on, as in the other workspaces: no reach for Tab with gloves on.
        event.stop()
        self.focus_next()

    # -- settings ---------------------------------------------------------------------------
    @on(Input.Changed, ", ".join(f"#{f}" for f in SETTING_FIELDS))
    def _setting_typed(self, event: Input.Changed) -> None:
        self.model.fields[event.input.id or ""] = event.value
        self.recompute()

    @on(Select.Changed, "#application, #transceiver")
    def _check_changed(self, event: Select.Changed) -> None:
        value = None if event.value is Select.NULL else str(event.value)
        self.model.choose(event.select.id or "", value)
        self.query_one("#tx-levels").display = self.model.typed_levels
        self.recompute()

    # -- the result -------------------------------------------------------------------------
    def recompute(self) -> None:
        self._order_applications()
        if self.model.unsaved_edits:
            self._say("")  # a "saved" or "opened" line says nothing about what was typed since
        self.outcome = outcome = self.model.evaluate()
        for field_id, message in outcome.field_errors.items():
            self._error(field_id, message)
        problem = self.query_one("#budget-problem", ResultLines)
        waiting = self.query_one("#budget-waiting", ResultLines)
        # What to type, or what is wrong, is said once: on the summary line under the items.
        problem.display = waiting.display = False
        self._panels_shown(outcome.report is not None)
        if outcome.report is not None:
            self._show(outcome)
            return
        # Say what to type (calmly) or what is wrong; keep every field as it is.
        waiting.show_lines(outcome.prompt or "")
        problem.show_lines(outcome.problem or "")
        for out_id in _OUTPUTS:
            self.query_one(out_id, ResultLines).show_lines("")
        summary = self.query_one("#budget-summary", ResultLines)
        summary.show_lines(outcome.message or "")
        summary.set_class(outcome.prompt is not None, "-waiting")
        summary.set_class(outcome.problem is not None, "-problem")

    def _panels_shown(self, shown: bool) -> None:
        """The result panels only once there is a budget: no column of empty frames."""
        for panel_id in ("result", *(p for p, _ in _PANELS)):
            self.query_one(f"#{panel_id}-panel").display = shown

    #: Below this many rows the caution folds to one line, so the budget shows.
    SCARCE_ROWS = 40

    def _order_applications(self) -> None:
        choices = self.model.application_choices()
        if choices == self._application_choices:
            return
        self._application_choices = choices
        select = self.query_one("#application", Select)
        current = select.value
        select.set_options(choices)
        if current is not Select.NULL and current in [v for _, v in choices]:
            select.value = current

    def _put(self, selector: str, text: str) -> None:
        self.query_one(selector, ResultLines).show_fitted(text)

    def _show(self, outcome: Outcome) -> None:
        width = self.query_one("#budget-out", ResultLines).content_size.width or None
        for panel_id, text in self.model.result_texts(outcome, width).items():
            self._put(f"#{panel_id}-out" if panel_id != "summary" else "#budget-summary", text)
        summary = self.query_one("#budget-summary", ResultLines)
        summary.set_class(False, "-waiting").set_class(False, "-problem")

    def on_resize(self) -> None:
        self.query_one("#budget-caution", Caution).fit(self.size.height < self.SCARCE_ROWS)
        # The lines wrap to their panels: draw them again once the layout has settled.
        self.call_after_refresh(self._redraw)

    def _redraw(self) -> None:
        if self.outcome.report is not None:
            self._show(self.outcome)

    def _say(self, text: str) -> None:
        """The line under Save and Open: what was saved or opened (hidden when empty)."""
        saved = self.query_one("#budget-saved", ResultLines)
        saved.show_lines(text)
        saved.display = bool(text)

    def _notice(self, notice: Notice) -> bool:
        for warning in notice.warnings:
            self.notify(warning, severity="warning")
        if notice.ok:
            self._sync()
            self._say(notice.text)
        else:
            self.notify(notice.text, severity=notice.severity)
            if notice.severity == "error":
                self._say(notice.text)
        return notice.ok

    def _sync(self) -> None:
        """Show what the model holds now (after new or open); typed text as typed."""
        for field_id in SETTING_FIELDS:
            self.query_one(f"#{field_id}", Input).value = self.model.fields[field_id]
        self._order_applications()
        for select_id in ("application", "transceiver"):
            select = self.query_one(f"#{select_id}", Select)
            wanted = getattr(self.model, select_id)
            if wanted is None:
                select.clear()
            else:
                select.value = wanted
        self.query_one(LinkItems).show()
        self.recompute()

    # -- new, open, save (each asks before dropping unsaved edits) --------------------------
    def _unless_unsaved(self, what: str, answer: str, go: Callable[[], None]) -> None:
        from fieldkit.tui.widgets.dialogs import AskDialog

        if not self.unsaved_edits:
            go()
            return

        def answered(choice: tuple[str, str] | None) -> None:
            if choice is not None:
                (self.action_save if choice[0] == "save" else go)()

        self.app.push_screen(AskDialog(*self.model.unsaved_question(what, answer)), answered)

    def action_new_budget(self) -> None:
        """An empty budget; asks first when this one has changes not saved."""
        self._unless_unsaved("A new budget", "Discard and start new", self._start_new)

    def _start_new(self) -> None:
        self.model.new()
        self._notice(Notice("A new, empty budget."))
        self.model.mark_clean()
        self.query_one("#item-value", Input).focus()

    def action_focus_result(self) -> None:
        self.query_one("#result-panel").scroll_visible(top=True, animate=False)

    def action_open_saved(self) -> None:
        self._unless_unsaved("Opening a saved budget", "Discard and open", self._pick_to_open)

    def _pick_to_open(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        def chosen(choice: tuple[str, str] | None) -> None:
            if choice is not None:
                if self._notice(self.model.open_saved(fieldkit_app(self).store, *choice)):
                    self._job_id = choice[0]
                    self.model.mark_clean()

        picker = JobLinkPicker(
            job_id=self._job_id, title="Open the budget saved on a link", confirm="Open"
        )
        self.app.push_screen(picker, chosen)

    def action_save(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        if self.report is None:
            self.notify(self.outcome.message or "No budget to save yet.", severity="warning")
            return
        resolved, report = self.resolved, self.report
        self.app.push_screen(
            JobLinkPicker(job_id=self._job_id),
            lambda choice: self._save_to(choice, resolved, report),
        )

    def _save_to(self, choice: tuple[str, str] | None, resolved: Any, report: Any) -> None:
        if choice is None:
            return
        app = fieldkit_app(self)
        notice = self.model.save(app.store, *choice, resolved, report, by=app.operator)
        if notice.ok:
            self._job_id = choice[0]
            self._say(notice.text)
            self.notify(notice.text)
        else:
            self._notice(notice)
