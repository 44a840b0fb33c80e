"""The budget workspace: build a link item by item and read its loss at each wavelength.

Layout and wiring only: the items, the settings and what they give live in
:mod:`fieldkit.tui.budget_model` (tested without a terminal); the lines shown come from
:mod:`fieldkit.text.budget`, the ones ``fieldkit budget`` prints. Pick an item in the list to
edit it below; the totals, the breakdown and the checks update on every keystroke.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Button, Input, Label, OptionList, Select, Static

from fieldkit import safety
from fieldkit.text import budget as lines
from fieldkit.text.layout import fit
from fieldkit.tui import keys
from fieldkit.tui.budget_model import (
    ADD_KINDS,
    DEFAULT_ADD_KIND,
    KINDS,
    SETTING_FIELDS,
    TYPED,
    BudgetModel,
    Item,
    Outcome,
    extra_shown,
    item_errors,
    item_text,
    items_from_spec,
)
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

#: The second item field also takes ``1310=0.35 dB/km; 1550=0.22 dB/km`` and names.
EXTRA_CHARS = QUANTITY_CHARS[:-2] + "=;:()]*"
_OUTPUTS = (
    "#budget-out",
    "#sources-out",
    "#application-out",
    "#transceiver-out",
    "#checks-out",
    "#fibre-data-out",
)


def _shown(text: str, width: int | None) -> Text:
    """Lines as a panel ``width`` wide shows them: wrapped here (under their own text, never
    between a number and its unit), so the panel has nothing left to wrap; indents kept."""
    return Text(fit(text, width))


class ItemField(Input):
    """An item's text field: Up and Down edit the previous and next item of the link without
    leaving the field (the arrows of the key table's "previous" and "next")."""

    BINDINGS = [
        Binding(keys.key_of("previous").key, "screen.pick_item(-1)", show=False),
        Binding(keys.key_of("next").key, "screen.pick_item(1)", show=False),
    ]


class BudgetScreen(Screen[None]):
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
        self._loading = False

    # The last result, as tests and the save read it.
    @property
    def report(self) -> Any:
        return self.outcome.report

    @property
    def resolved(self) -> Any:
        return self.outcome.resolved

    @property
    def problem(self) -> str | None:
        return self.outcome.message

    @property
    def items(self) -> list[Item]:
        return self.model.items

    @property
    def current(self) -> int:
        return self.model.current

    @current.setter
    def current(self, index: int) -> None:
        self.model.current = index

    # -- layout --------------------------------------------------------------------------
    @staticmethod
    def _field(
        label: str,
        field_id: str,
        placeholder: str,
        *,
        label_id: str | None = None,
        tooltip: str | None = None,
    ) -> ComposeResult:
        with Vertical(id=f"{field_id}-field", classes="bf-field"):
            with Horizontal(classes="bf-row"):
                yield Label(label, classes="bf-label", id=label_id)
                field = ItemField if field_id.startswith("item-") else Input
                yield field(
                    placeholder=placeholder,
                    type="text",
                    restrict=EXTRA_CHARS if field_id == "item-extra" else QUANTITY_CHARS,
                    compact=True,
                    id=field_id,
                    tooltip=tooltip,
                )
            yield Static("", classes="field-error", id=f"{field_id}-error", markup=False)

    def compose(self) -> ComposeResult:
        yield WorkspaceBar()
        with VerticalScroll(id="budget-body"):
            # Save and open first: not under the results, the sources and the caution.
            with Horizontal(id="job-buttons"):
                yield Button(
                    f"Save to job {keys.hint('save')}",
                    id="save",
                    compact=True,
                    tooltip=keys.tip("budget", "save"),
                )
                yield Button(
                    f"Open saved {keys.hint('open')}",
                    id="open",
                    compact=True,
                    tooltip=keys.tip("budget", "open"),
                )
                yield Button(
                    f"New {keys.hint('new')}",
                    id="new",
                    compact=True,
                    tooltip=keys.tip("budget", "new"),
                )
            yield Static("", id="budget-saved", classes="field-note", markup=False)
            with Vertical(classes="two-col"):
                with Vertical(classes="col"):
                    with Vertical(id="link-panel", classes="panel") as panel:
                        panel.border_title = "Link, end A to end B"
                        yield OptionList(id="items")
                        with Horizontal(id="item-buttons"):
                            yield Button(
                                f"Add… {keys.hint('add')}",
                                id="add",
                                compact=True,
                                tooltip=keys.tip("budget", "add"),
                            )
                            yield Button(
                                "Remove",
                                id="remove",
                                compact=True,
                                tooltip=keys.tip("budget", "remove"),
                            )
                            yield Button(
                                "↑", id="up", compact=True, tooltip=keys.tip("budget", "move_up")
                            )
                            yield Button(
                                "↓",
                                id="down",
                                compact=True,
                                tooltip=keys.tip("budget", "move_down"),
                            )
                    with Vertical(id="item-panel", classes="panel") as panel:
                        panel.border_title = "Item"
                        with Horizontal(id="item-preset-row", classes="bf-row"):
                            yield Label("Fibre", classes="bf-label", id="item-preset-label")
                            yield Select(
                                [],
                                allow_blank=True,
                                compact=True,
                                id="item-preset",
                                prompt="choose",
                            )
                        yield from self._field(
                            "Length", "item-value", "", label_id="item-value-label"
                        )
                        yield from self._field(
                            "dB/km", "item-extra", "", label_id="item-extra-label"
                        )
                    yield Static("", id="budget-summary", markup=False)
                    with Vertical(id="settings-panel", classes="panel") as panel:
                        panel.border_title = "Wavelengths and checks"
                        yield from self._field(
                            "Wavelengths",
                            "wavelengths",
                            "e.g. 1310, 1550",
                            tooltip="in nm, e.g. 1310, 1550 (empty: 850/1300 "
                            "multimode, 1310/1550 single-mode)",
                        )
                        yield from self._field(
                            "Margin",
                            "margin",
                            "e.g. 3 dB; empty: none",
                            tooltip="repairs and ageing, shown beside the link loss, not in it "
                            "(empty: no margin)",
                        )
                        yield from self._field(
                            "Bit rate",
                            "bit-rate",
                            "e.g. 10.3125 GBd",
                            tooltip="line rate in GBd for the dispersion and modal-bandwidth "
                            "checks (blank: the transceiver's or the application's)",
                        )
                        yield from self._field(
                            "Spectrum",
                            "spectral-width",
                            "e.g. 0.1 nm RMS",
                            tooltip="the source's RMS spectral width in nm, for the dispersion "
                            "check when no transceiver tolerance is known",
                        )
                        with Horizontal(classes="bf-row"):
                            yield Label("Application", classes="bf-label")
                            yield Select(
                                [],
                                allow_blank=True,
                                compact=True,
                                id="application",
                                prompt="no application check",
                            )
                        with Horizontal(classes="bf-row"):
                            yield Label("Transceiver", classes="bf-label")
                            yield Select(
                                [],
                                allow_blank=True,
                                compact=True,
                                id="transceiver",
                                prompt="no transceiver check",
                            )
                        with Vertical(id="tx-levels"):
                            yield from self._field("Tx min", "tx-min", "e.g. −8.2 dBm")
                            yield from self._field("Tx max", "tx-max", "e.g. 0.5 dBm")
                            yield from self._field("Rx sens", "rx-sens", "e.g. −14.4 dBm")
                            yield from self._field("Rx overload", "rx-over", "e.g. 0.5 dBm")
                with Vertical(classes="col"):
                    with Vertical(id="result-panel", classes="panel") as panel:
                        panel.border_title = "Budget"
                        yield Static("", id="budget-problem", classes="field-error", markup=False)
                        yield Static("", id="budget-waiting", classes="field-note")
                        yield Static("", id="budget-out", classes="result", markup=False)
                    with Vertical(id="application-panel", classes="panel") as panel:
                        panel.border_title = "Application"
                        yield Static("", id="application-out", classes="result", markup=False)
                    with Vertical(id="transceiver-panel", classes="panel") as panel:
                        panel.border_title = "Transceiver"
                        yield Static("", id="transceiver-out", classes="result", markup=False)
                    with Vertical(id="checks-panel", classes="panel") as panel:
                        panel.border_title = "Beyond loss"
                        yield Static("", id="checks-out", classes="result", markup=False)
                    with Vertical(id="fibre-data-panel", classes="panel") as panel:
                        panel.border_title = "Fibre data"
                        yield Static("", id="fibre-data-out", classes="result", markup=False)
                    with Vertical(id="sources-panel", classes="panel") as panel:
                        panel.border_title = "Values used"
                        yield Static("", id="sources-out", classes="result", markup=False)
                    yield Static(safety.INVISIBLE_LIGHT, classes="caution", id="budget-caution")
        yield KeyFooter()

    def on_mount(self) -> None:
        self.model.config_dir = fieldkit_app(self).config_dir
        lib = self.model.library
        self.query_one("#transceiver", Select).set_options(
            [(n, n) for n in lib.transceivers] + [("typed levels", TYPED)]
        )
        self.query_one("#tx-levels").display = False
        for error in self.query(".field-error"):
            error.display = False
        self._say("")
        if lib.problems:
            self.notify(
                "Preset problems: " + "; ".join(lib.problems), severity="warning", timeout=10
            )
        self._refresh_list()
        self._load_item()
        self.recompute()
        self._mark_clean()

    # -- the item list -------------------------------------------------------------------
    def _refresh_list(self) -> None:
        items = self.query_one("#items", OptionList)
        items.set_options([item_text(i + 1, it) for i, it in enumerate(self.model.items)])
        if self.model.items:
            items.highlighted = min(self.model.current, len(self.model.items) - 1)

    def _update_list_line(self) -> None:
        item = self.model.item
        if item is not None:
            self.query_one("#items", OptionList).replace_option_prompt_at_index(
                self.model.current, item_text(self.model.current + 1, item)
            )

    def _load_item(self) -> None:
        """Show the picked item in the editor."""
        panel = self.query_one("#item-panel")
        item = self.model.item
        panel.display = item is not None
        if item is None:
            return
        kind = KINDS[item.kind]
        panel.border_title = f"Item {self.model.current + 1}: {kind.title}"
        preset = self.query_one("#item-preset", Select)
        self.query_one("#item-preset-row").display = bool(kind.preset)
        if kind.preset:
            self.query_one("#item-preset-label", Label).update(kind.preset)
            options = self.model.preset_options(item.kind)
            preset.set_options(options)
            if item.preset in [v for _, v in options]:
                preset.value = item.preset
        self.query_one("#item-value-label", Label).update(kind.value)
        value = self.query_one("#item-value", Input)
        value.placeholder = kind.value_hint
        value.value = item.value
        self._show_extra()
        extra = self.query_one("#item-extra", Input)
        extra.placeholder = kind.extra_hint
        extra.tooltip = kind.extra_tip or None
        extra.value = item.extra

    def _show_extra(self) -> None:
        item = self.model.item
        if item is not None:
            self.query_one("#item-extra-field").display = extra_shown(item)
            self.query_one("#item-extra-label", Label).update(KINDS[item.kind].extra)

    @on(OptionList.OptionHighlighted, "#items")
    def _picked(self, event: OptionList.OptionHighlighted) -> None:
        index = event.option_index
        if 0 <= index < len(self.model.items) and self.model.pick(index):
            self._load_item()
            self._check_item_fields()
            self._show_fibre_data()

    @on(OptionList.OptionSelected, "#items")
    def _item_chosen(self, event: OptionList.OptionSelected) -> None:
        # Enter (or a click) on an item: edit it.
        self.query_one("#item-value", Input).focus()

    @on(Select.Changed, "#item-preset")
    def _preset_changed(self, event: Select.Changed) -> None:
        item = self.model.item
        if item is None or event.value is Select.NULL:
            return
        if event.value not in [v for _, v in self.model.preset_options(item.kind)]:
            return
        if item.preset != event.value:
            item.preset = str(event.value)
            self._show_extra()
            self._update_list_line()
            self.recompute()

    @on(Input.Changed, "#item-value, #item-extra")
    def _item_typed(self, event: Input.Changed) -> None:
        item = self.model.item
        if item is None:
            return
        key = "value" if event.input.id == "item-value" else "extra"
        if getattr(item, key) != event.value:
            setattr(item, key, event.value)
            self._update_list_line()
        self._check_item_fields()
        self.recompute()

    def _check_item_fields(self) -> None:
        """Show the problem of the picked item's own fields beside them."""
        item = self.model.item
        if item is not None:
            value_error, extra_error = item_errors(item)
            self._error("item-value", value_error)
            self._error("item-extra", extra_error)

    def _error(self, field_id: str, message: str) -> None:
        error = self.query_one(f"#{field_id}-error", Static)
        error.update(message)
        error.display = bool(message)

    # -- item actions --------------------------------------------------------------------
    def action_add_item(self) -> None:
        """Ask which kind to add: the chooser opens at the same kind every time."""
        from fieldkit.tui.widgets.choice_dialog import ChoiceDialog

        where = f"after item {self.model.current + 1}" if self.model.items else "to the link"
        self.app.push_screen(
            ChoiceDialog(
                f"Add an item {where}",
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
        self._refresh_list()
        self._load_item()
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
        self._refresh_list()
        self._load_item()
        self.recompute()

    def action_move_item(self, step: int) -> None:
        if self.model.move(step):
            self._refresh_list()
            self.recompute()

    def action_focus_items(self) -> None:
        self.query_one("#items", OptionList).focus()

    def action_pick_item(self, step: int) -> None:
        """Up/Down in an item's fields: edit the previous/next item, staying in the field."""
        if self.model.pick(self.model.current + step):
            self.query_one("#items", OptionList).highlighted = self.model.current
            self._load_item()
            self._check_item_fields()
            self._show_fibre_data()

    @on(Button.Pressed)
    def _button(self, event: Button.Pressed) -> None:
        actions = {
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

    # -- settings ------------------------------------------------------------------------
    @on(Input.Changed, ", ".join(f"#{f}" for f in SETTING_FIELDS))
    def _setting_typed(self, event: Input.Changed) -> None:
        self.model.fields[event.input.id or ""] = event.value
        self.recompute()

    @on(Select.Changed, "#application, #transceiver")
    def _check_changed(self, event: Select.Changed) -> None:
        value = None if event.value is Select.NULL else str(event.value)
        setattr(self.model, event.select.id or "", value)
        self.query_one("#tx-levels").display = self.model.transceiver == TYPED
        self.recompute()

    # -- the result ----------------------------------------------------------------------
    def recompute(self) -> None:
        self._order_applications()
        if self.model.unsaved_edits:
            # A "saved" or "opened" line says nothing about what was typed since.
            self._say("")
        self.outcome = outcome = self.model.evaluate()
        for field_id, message in outcome.field_errors.items():
            self._error(field_id, message)
        problem = self.query_one("#budget-problem", Static)
        waiting = self.query_one("#budget-waiting", Static)
        summary = self.query_one("#budget-summary", Static)
        problem.display = outcome.problem is not None
        waiting.display = outcome.prompt is not None
        if outcome.report is None:
            # Say what to type (calmly) or what is wrong; keep every field as it is.
            waiting.update(outcome.prompt or "")
            problem.update(outcome.problem or "")
            for out_id in _OUTPUTS:
                self.query_one(out_id, Static).update("")
            summary.update(outcome.message or "")
            summary.set_class(outcome.prompt is not None, "-waiting")
            summary.set_class(outcome.problem is not None, "-problem")
            return
        self._show(outcome)

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

    def _put(self, selector: str, text: str) -> Static:
        """Show ``text`` in a result Static, wrapped to its width here (see :func:`_shown`)."""
        out = self.query_one(selector, Static)
        out.update(_shown(text, out.content_size.width or None))
        return out

    def _show(self, outcome: Outcome) -> None:
        report = outcome.report
        assert report is not None
        width = self.query_one("#budget-out", Static).content_size.width or None
        self._put("#budget-out", "\n".join(lines.breakdown_lines(report, width)))
        summary = self._put("#budget-summary", lines.summary_text(report))
        summary.set_class(False, "-waiting").set_class(False, "-problem")
        self._put("#sources-out", "\n".join(lines.source_lines(report)))
        app = report.application
        self._put(
            "#application-out",
            "Pick an application to check."
            if app is None
            else "\n".join(lines.application_lines(app)),
        )
        tx = report.transceiver
        self._put(
            "#transceiver-out",
            (outcome.tx_problem or "Pick a transceiver to check.")
            if tx is None
            else "\n".join(lines.transceiver_lines(tx)),
        )
        checks = [] if report.checks is None else lines.check_lines(report.checks)
        self._put("#checks-out", "\n".join(checks) or "Nothing to check beyond loss for this link.")
        self._show_fibre_data()

    def _show_fibre_data(self) -> None:
        """The fibre data of the picked fibre item (else the first) at each wavelength."""
        self._put("#fibre-data-out", "\n".join(self.model.fibre_data_lines(self.outcome)))

    def on_resize(self) -> None:
        # The breakdown wraps to its panel's width: draw it again once the layout has settled.
        self.call_after_refresh(self._reshow)

    def _reshow(self) -> None:
        if self.outcome.report is not None:
            self._show(self.outcome)

    def _say(self, text: str) -> None:
        """The line under Save and Open: what was saved or opened (hidden when empty)."""
        saved = self.query_one("#budget-saved", Static)
        saved.update(text)
        saved.display = bool(text)

    # -- unsaved edits -------------------------------------------------------------------
    @property
    def unsaved_edits(self) -> bool:
        """True when the budget was changed since it was last saved, opened or started."""
        return self.model.unsaved_edits

    def _mark_clean(self) -> None:
        self.model.mark_clean()

    # -- new, and going to the result ----------------------------------------------------
    def action_new_budget(self) -> None:
        """An empty budget; asks first when this one has changes not saved."""
        from fieldkit.tui.widgets.dialogs import AskDialog

        if self.unsaved_edits:
            self.app.push_screen(
                AskDialog(
                    "The budget has unsaved changes",
                    ["A new budget replaces what is on screen: its items and settings."],
                    [("save", "Save first"), ("discard", "Discard and start new")],
                ),
                self._new_answered,
            )
            return
        self._start_new()

    def _new_answered(self, answer: tuple[str, str] | None) -> None:
        if answer is None:
            return
        if answer[0] == "save":
            self.action_save()
        else:
            self._start_new()

    def _start_new(self) -> None:
        self.load([], {})
        self._mark_clean()
        self._say("A new, empty budget.")
        self.query_one("#item-value", Input).focus()

    def action_focus_result(self) -> None:
        self.query_one("#result-panel").scroll_visible(top=True, animate=False)

    # -- opening a saved budget ---------------------------------------------------------
    def action_open_saved(self) -> None:
        from fieldkit.tui.widgets.dialogs import AskDialog

        if self.unsaved_edits:
            self.app.push_screen(
                AskDialog(
                    "The budget has unsaved changes",
                    ["Opening a saved budget replaces what is on screen."],
                    [("save", "Save first"), ("discard", "Discard and open")],
                ),
                self._open_answered,
            )
            return
        self._pick_to_open()

    def _open_answered(self, answer: tuple[str, str] | None) -> None:
        if answer is None:
            return
        if answer[0] == "save":
            self.action_save()
        else:
            self._pick_to_open()

    def _pick_to_open(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        self.app.push_screen(
            JobLinkPicker(job_id=self._job_id, title="Open the budget saved on a link"),
            self._open_from,
        )

    def _open_from(self, choice: tuple[str, str] | None) -> None:
        from fieldkit.jobs.store import StoreError

        if choice is None:
            return
        job_id, link_id = choice
        try:
            link = fieldkit_app(self).store.load(job_id).link(link_id)
        except (StoreError, KeyError) as exc:
            message = str(exc.args[0]) if isinstance(exc, KeyError) and exc.args else str(exc)
            self.notify(f"Not opened: {message}", severity="error")
            return
        if link.budget is None or not link.budget.description.get("segments"):
            self.notify(f"Link {link.label} has no saved budget to open.", severity="warning")
            return
        items, fields = items_from_spec(link.budget.description)
        if not any(i.kind == "fibre" for i in items):
            self.notify(f"The budget on {link.label} has no fibre segment.", severity="warning")
            return
        self.load(items, fields)
        self._job_id = job_id
        self._mark_clean()
        self._say(f"Opened the budget saved on link {link.label}.")

    def load(self, items: list[Item], fields: dict[str, str]) -> None:
        """Replace the link and the settings (typed text is kept as typed); no items: a new
        budget."""
        if items:
            warnings = self.model.load(items, fields)
        else:
            self.model.new()
            warnings = []
        for warning in warnings:
            self.notify(warning, severity="warning")
        for field_id in SETTING_FIELDS:
            self.query_one(f"#{field_id}", Input).value = self.model.fields[field_id]
        for select_id in ("application", "transceiver"):
            select = self.query_one(f"#{select_id}", Select)
            wanted = getattr(self.model, select_id)
            if wanted is None:
                select.clear()
            else:
                if select_id == "application":
                    self._order_applications()
                select.value = wanted
        self._refresh_list()
        self._load_item()
        self.recompute()

    # -- saving --------------------------------------------------------------------------
    def action_save(self) -> None:
        from fieldkit.tui.widgets.job_link_picker import JobLinkPicker

        if self.report is None:
            self.notify(self.problem or "No budget to save yet.", severity="warning")
            return
        resolved, report = self.resolved, self.report
        self.app.push_screen(
            JobLinkPicker(job_id=self._job_id),
            lambda choice: self._save_to(choice, resolved, report),
        )

    def _save_to(self, choice: tuple[str, str] | None, resolved: Any, report: Any) -> None:
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.saves import save_budget
        from fieldkit.jobs.budget_records import budget_record
        from fieldkit.jobs.store import StoreError

        if choice is None:
            return
        job_id, link_id = choice
        record = budget_record(resolved, report, by=fieldkit_app(self).operator)
        try:
            saved = save_budget(
                fieldkit_app(self).store,
                job_id,
                link_id,
                record,
                length_m=resolved.link.length_m,
                fibre_type=", ".join(resolved.link.fibre_names),
            )
        except (StoreError, ActionError) as exc:
            self.notify(f"Not saved: {exc}", severity="error")
            self._say(f"Not saved: {exc}")
            return
        self._job_id = job_id
        self._mark_clean()
        text = f"Budget saved onto job {saved.job_name}, link {saved.link_label}."
        self._say(text)
        self.notify(text)
