"""The budget workspace's link editor: the items as a list (end A to end B) and the picked
item's fields below it. It edits a :class:`~fieldkit.tui.budget_model.BudgetModel` and says so
with :class:`LinkItems.Changed` (an item's text or preset) and :class:`LinkItems.Picked`
(another item picked); the screen recomputes. Up and Down in an item's field pick the previous
and next item without leaving the field."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import Button, Input, Label, OptionList, Select

from fieldkit.tui import keys
from fieldkit.tui.budget_model import KINDS, BudgetModel, extra_shown, item_errors, item_text
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS
from fieldkit.tui.widgets.result_lines import ResultLines

__all__ = ["ItemField", "LinkItems", "choice_row", "field_row"]

#: The second item field also takes ``1310=0.35 dB/km; 1550=0.22 dB/km`` and names.
EXTRA_CHARS = QUANTITY_CHARS[:-2] + "=;:()]*"
#: The first item field also takes a split as 1:32 or 1×32 (:func:`fieldkit.inputs.splitter`).
VALUE_CHARS = QUANTITY_CHARS[:-2] + ":×]*"


class ItemField(Input):
    """An item's text field: Up and Down edit the previous and next item (the key table's
    "previous" and "next")."""

    BINDINGS = [
        Binding(keys.key_of("previous").key, "pick(-1)", show=False),
        Binding(keys.key_of("next").key, "pick(1)", show=False),
    ]

    def action_pick(self, step: int) -> None:
        for ancestor in self.ancestors:
            if isinstance(ancestor, LinkItems):
                ancestor.pick(ancestor.model.current + step)


def field_row(
    label: str, field_id: str, hint: str = "", tooltip: str | None = None
) -> ComposeResult:
    """A labelled text field of the budget with its error line below it (hidden when empty)."""
    with Vertical(id=f"{field_id}-field", classes="bf-field"):
        with Horizontal(classes="bf-row"):
            yield Label(label, classes="bf-label", id=f"{field_id}-label")
            yield (ItemField if field_id.startswith("item-") else Input)(
                placeholder=hint,
                type="text",
                restrict={"item-extra": EXTRA_CHARS, "item-value": VALUE_CHARS}.get(
                    field_id, QUANTITY_CHARS
                ),
                compact=True,
                id=field_id,
                tooltip=tooltip,
            )
        yield ResultLines(classes="field-error", id=f"{field_id}-error")


def choice_row(label: str, select_id: str, prompt: str) -> ComposeResult:
    """A labelled choice of the budget (no choice: ``prompt``)."""
    with Horizontal(classes="bf-row", id=f"{select_id}-row"):
        yield Label(label, classes="bf-label", id=f"{select_id}-label")
        yield Select([], allow_blank=True, compact=True, id=select_id, prompt=prompt)


def _button(label: str, button_id: str, use: str) -> Button:
    return Button(label, id=button_id, compact=True, tooltip=keys.tip("budget", use))


class LinkItems(Vertical):
    """The item list with its buttons, and the picked item's editor."""

    DEFAULT_CSS = "LinkItems { height: auto; }"

    class Changed(Message):
        """The picked item's text or preset changed."""

    class Picked(Message):
        """Another item was picked."""

    def __init__(self, model: BudgetModel) -> None:
        super().__init__(id="link-items")
        self.model = model

    def compose(self) -> ComposeResult:
        with Vertical(id="link-panel", classes="panel") as panel:
            panel.border_title = "Link, end A to end B"
            yield OptionList(id="items")
            with Horizontal(id="item-buttons"):
                yield _button(f"Add… {keys.hint('add')}", "add", "add")
                yield _button("Remove", "remove", "remove")
                yield _button("↑", "up", "move_up")
                yield _button("↓", "down", "move_down")
        with Vertical(id="item-panel", classes="panel"):
            yield from choice_row("Fibre", "item-preset", "choose")
            yield from field_row("Length", "item-value")
            yield from field_row("dB/km", "item-extra")

    def show(self) -> None:
        """Show the model's items and the picked one (after adding, removing, moving, open)."""
        items = self.query_one("#items", OptionList)
        items.set_options([item_text(i + 1, it) for i, it in enumerate(self.model.items)])
        if self.model.items:
            items.highlighted = min(self.model.current, len(self.model.items) - 1)
        self._load()

    def pick(self, index: int) -> None:
        if 0 <= index < len(self.model.items) and self.model.pick(index):
            self.query_one("#items", OptionList).highlighted = self.model.current
            self._load()
            self.check()
            self.post_message(self.Picked())

    def check(self) -> None:
        """Show the problem of the picked item's own fields beside them."""
        item = self.model.item
        if item is not None:
            for field_id, message in zip(
                ("item-value", "item-extra"), item_errors(item), strict=True
            ):
                error = self.query_one(f"#{field_id}-error", ResultLines)
                error.show_lines(message)
                error.display = bool(message)

    def _load(self) -> None:
        panel = self.query_one("#item-panel")
        item = self.model.item
        panel.display = item is not None
        if item is None:
            return
        kind = KINDS[item.kind]
        panel.border_title = f"Item {self.model.current + 1}: {kind.title}"
        self.query_one("#item-preset-row").display = bool(kind.preset)
        if kind.preset:
            self.query_one("#item-preset-label", Label).update(kind.preset)
            options = self.model.preset_options(item.kind)
            preset = self.query_one("#item-preset", Select)
            preset.set_options(options)
            if item.preset in [v for _, v in options]:
                preset.value = item.preset
        self.query_one("#item-value-label", Label).update(kind.value)
        self.query_one("#item-extra-label", Label).update(kind.extra)
        for field_id, hint, text in (
            ("item-value", kind.value_hint, item.value),
            ("item-extra", kind.extra_hint, item.extra),
        ):
            field = self.query_one(f"#{field_id}", Input)
            field.placeholder, field.value = hint, text
        self.query_one("#item-extra", Input).tooltip = kind.extra_tip or None
        self.query_one("#item-extra-field").display = extra_shown(item)

    def _line(self) -> None:
        item = self.model.item
        if item is not None:
            self.query_one("#items", OptionList).replace_option_prompt_at_index(
                self.model.current, item_text(self.model.current + 1, item)
            )

    @on(OptionList.OptionHighlighted, "#items")
    def _highlighted(self, event: OptionList.OptionHighlighted) -> None:
        event.stop()
        self.pick(event.option_index)

    @on(OptionList.OptionSelected, "#items")
    def _selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.query_one("#item-value", Input).focus()  # Enter (or a click) on an item: edit it

    @on(Select.Changed, "#item-preset")
    def _preset(self, event: Select.Changed) -> None:
        event.stop()
        item = self.model.item
        if item is None or event.value not in [v for _, v in self.model.preset_options(item.kind)]:
            return
        if item.preset != event.value:
            item.preset = str(event.value)
            self.query_one("#item-extra-field").display = extra_shown(item)
            self._line()
            self.post_message(self.Changed())

    @on(Input.Changed, "#item-value, #item-extra")
    def _typed(self, event: Input.Changed) -> None:
        event.stop()
        item = self.model.item
        if item is None:
            return
        key = "value" if event.input.id == "item-value" else "extra"
        if getattr(item, key) != event.value:
            setattr(item, key, event.value)
            self._line()
        self.check()
        self.post_message(self.Changed())
