"""The budget workspace: build a link item by item and read its loss at each wavelength.

The link is a list of items (fibre segments in order from end A, mated connector pairs, splices,
splitters and other components). Pick one in the list to edit it below; the totals, the
breakdown and the application and transceiver checks update on every keystroke. The same
written description goes through :mod:`fieldkit.linkspec` as ``fieldkit budget`` uses, so the
screen and the CLI always agree.
"""

from __future__ import annotations

import re
from typing import Any

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Button, Input, Label, OptionList, Select, Static

from fieldkit import safety
from fieldkit.calc.units import InputError
from fieldkit.tui import keys
from fieldkit.tui.typed import fieldkit_app
from fieldkit.tui.widgets.key_footer import KeyFooter
from fieldkit.tui.widgets.quantity_field import QUANTITY_CHARS
from fieldkit.tui.widgets.workspace_bar import WorkspaceBar

TYPED = "__typed__"
#: The second item field also takes ``1310=0.35 dB/km; 1550=0.22 dB/km`` and names.
EXTRA_CHARS = QUANTITY_CHARS[:-2] + "=;:()]*"

#: Item kinds: what the list shows and what each field of the editor means for it.
KINDS: dict[str, dict[str, str]] = {
    "fibre": {
        "title": "Fibre",
        "preset": "Fibre",
        "value": "Length",
        "extra": "dB/km",
        "value_hint": "1.2 km, 3900 ft",
        "extra_hint": "0.35 dB/km or 1310=0.35 dB/km; 1550=0.22 dB/km",
    },
    "connectors": {
        "title": "Connectors",
        "preset": "Grade",
        "value": "Pairs",
        "extra": "Each",
        "value_hint": "mated pairs incl. both ends",
        "extra_hint": "0.5 dB",
    },
    "splices": {
        "title": "Splices",
        "preset": "Grade",
        "value": "Count",
        "extra": "Each",
        "value_hint": "6",
        "extra_hint": "0.1 dB",
    },
    "splitter": {
        "title": "Splitter",
        "preset": "Preset",
        "value": "Split",
        "extra": "Excess",
        "value_hint": "1x32",
        "extra_hint": "2.0 dB",
    },
    "component": {
        "title": "Component",
        "preset": "Preset",
        "value": "Count",
        "extra": "",
        "value_hint": "1",
        "extra_hint": "",
    },
    "attenuator": {
        "title": "Attenuator",
        "preset": "",
        "value": "Loss",
        "extra": "",
        "value_hint": "5 dB",
        "extra_hint": "",
    },
    "other": {
        "title": "Other loss",
        "preset": "",
        "value": "Loss",
        "extra": "Name",
        "value_hint": "0.5 dB",
        "extra_hint": "patch cord, closure ...",
    },
}
ADD_KINDS = ("fibre", "splices", "splitter", "component", "attenuator", "other", "connectors")


def _keep_indent(line: str) -> str:
    """Leading spaces as no-break spaces, so the text layout keeps the indent."""
    stripped = line.lstrip(" ")
    return "\u00a0" * (len(line) - len(stripped)) + stripped


def attenuation_entry(text: str) -> Any:
    """A typed attenuation as the link description takes it (see
    :func:`fieldkit.inputs.attenuation_entry`: the CLI's rule too)."""
    from fieldkit.inputs import attenuation_entry as entry

    return entry(text)


def item_entry(item: dict[str, str]) -> tuple[str, Any]:
    """Where an item goes in the link description, and its entry there."""
    kind, preset, value, extra = (
        item["kind"],
        item.get("preset") or "",
        item.get("value", ""),
        item.get("extra", ""),
    )
    if kind == "fibre":
        seg: dict[str, Any] = {"length": value}
        if preset == TYPED:
            seg["attenuation"] = attenuation_entry(extra)
        else:
            seg["fibre"] = preset
        return "segments", seg
    if kind in ("connectors", "splices"):
        entry: dict[str, Any] = {"count": value or ("2" if kind == "connectors" else "0")}
        if preset == TYPED:
            entry["loss"] = extra
            if kind == "splices":
                entry["method"] = "fusion"
        else:
            entry["grade"] = preset
        return kind, entry
    if kind == "splitter":
        split: dict[str, Any] = {"splitter": value}
        if preset == TYPED:
            split["excess"] = extra
        elif preset:
            split["preset"] = preset
        return "components", split
    if kind == "component":
        return "components", {"preset": preset, "count": value or "1"}
    if kind == "attenuator":
        return "components", {"kind": "attenuator", "loss": value}
    return "components", {"kind": "other", "name": extra.strip() or "other loss", "loss": value}


#: What a count means when it is left empty (the link description's own defaults).
_EMPTY_COUNT = {"connectors": "2", "splices": "0", "component": "1"}
#: What each item's second field is called in a prompt.
_EXTRA_WORD = {
    "fibre": "attenuation",
    "connectors": "loss each",
    "splices": "loss each",
    "splitter": "excess loss",
}


def missing_entry(items: list[dict[str, str]]) -> str | None:
    """A calm prompt for the first item still waiting for a value, or None when every item has
    what the budget needs. Nothing typed yet is not an error: wrong text is."""
    for index, item in enumerate(items, start=1):
        kind = item["kind"]
        title = KINDS[kind]["title"]
        if not item.get("value", "").strip() and kind not in _EMPTY_COUNT:
            return (
                f"Type the {KINDS[kind]['value'].lower()} of item {index} ({title}) to see "
                "the budget."
            )
        if (
            item.get("preset") == TYPED
            and kind in _EXTRA_WORD
            and not item.get("extra", "").strip()
        ):
            return f"Type the {_EXTRA_WORD[kind]} of item {index} ({title}) to see the budget."
    return None


def item_text(index: int, item: dict[str, str]) -> str:
    """One line of the item list."""
    kind = item["kind"]
    preset = item.get("preset") or ""
    value = (
        item.get("value", "").strip()
        or _EMPTY_COUNT.get(kind, "")
        or f"{KINDS[kind]['value'].lower()} not typed"
    )
    extra = item.get("extra", "").strip()
    if kind == "fibre":
        what = f"typed {extra or 'dB/km not typed'}" if preset == TYPED else preset
        return f"{index}. Fibre {what}, {value}"
    if kind == "connectors":
        each = extra if preset == TYPED else preset
        return f"{index}. {value} mated pairs, {each}"
    if kind == "splices":
        each = extra if preset == TYPED else preset
        return f"{index}. {value} splices, {each}"
    if kind == "splitter":
        return f"{index}. Splitter {value}" + (f", excess {extra}" if preset == TYPED else "")
    if kind == "component":
        return f"{index}. {value} × {preset}"
    if kind == "attenuator":
        return f"{index}. Attenuator {value}"
    return (
        f"{index}. {extra or 'Other loss'}{',' if not item.get('value', '').strip() else ''} "
        f"{value}"
    )


def spec_from_items(items: list[dict[str, str]], settings: dict[str, Any]) -> dict[str, Any]:
    """The written link description of the workspace's items and settings."""
    spec: dict[str, Any] = {"segments": [], "splices": [], "components": []}
    connectors = 0
    for item in items:
        where, entry = item_entry(item)
        if where == "connectors":
            connectors += 1
            spec["connectors"] = entry
        else:
            spec[where].append(entry)
    if connectors == 0:
        spec["connectors"] = {"count": 0, "loss": "0 dB"}
    spec.update({k: v for k, v in settings.items() if v not in (None, "", [])})
    return spec


def _text(value: Any, unit: str = "") -> str:
    if isinstance(value, bool) or value is None:
        return ""
    if isinstance(value, (int, float)):
        return f"{value:g}{' ' + unit if unit else ''}"
    return str(value)


def items_from_spec(spec: dict[str, Any]) -> tuple[list[dict[str, str]], dict[str, str]]:
    """The workspace's items and settings fields of a written link description (the reverse
    of :func:`spec_from_items`, for a budget saved on a job)."""
    items: list[dict[str, str]] = []
    for seg in spec.get("segments") or []:
        if not isinstance(seg, dict):
            continue
        length = _text(seg.get("length")) or _text(seg.get("length_m"), "m")
        att = seg.get("attenuation")
        if att is not None:
            extra = (
                "; ".join(f"{k}={v}" for k, v in att.items())
                if isinstance(att, dict)
                else _text(att)
            )
            items.append({"kind": "fibre", "preset": TYPED, "value": length, "extra": extra})
        else:
            items.append(
                {
                    "kind": "fibre",
                    "preset": _text(seg.get("fibre") or seg.get("fiber")),
                    "value": length,
                    "extra": "",
                }
            )
    for kind in ("components",):
        for comp in spec.get(kind) or []:
            if not isinstance(comp, dict):
                continue
            count = _text(comp.get("count")) or "1"
            loss = _text(comp.get("loss")) or _text(comp.get("loss_db"), "dB")
            if "splitter" in comp:
                excess = _text(comp.get("excess"))
                items.append(
                    {
                        "kind": "splitter",
                        "preset": TYPED
                        if excess
                        else _text(comp.get("preset")) or f"{str(comp['splitter'])[:1]}xN splitter",
                        "value": _text(comp["splitter"]),
                        "extra": excess,
                    }
                )
            elif comp.get("preset") and not loss:
                items.append(
                    {
                        "kind": "component",
                        "preset": _text(comp["preset"]),
                        "value": count,
                        "extra": "",
                    }
                )
            elif comp.get("kind") == "attenuator":
                items.append({"kind": "attenuator", "preset": "", "value": loss, "extra": ""})
            else:
                items.append(
                    {"kind": "other", "preset": "", "value": loss, "extra": _text(comp.get("name"))}
                )
    splices = spec.get("splices") or []
    for sp in [splices] if isinstance(splices, dict) else splices:
        if not isinstance(sp, dict):
            continue
        loss = _text(sp.get("loss")) or _text(sp.get("loss_db"), "dB")
        items.append(
            {
                "kind": "splices",
                "preset": TYPED if loss else _text(sp.get("grade") or sp.get("method") or "fusion"),
                "value": _text(sp.get("count")) or "0",
                "extra": loss,
            }
        )
    conn = spec.get("connectors")
    if isinstance(conn, dict):
        loss = _text(conn.get("loss")) or _text(conn.get("loss_db"), "dB")
        count = _text(conn.get("count")) or "2"
        if not (count == "0" and loss in ("0 dB", "0")):
            items.append(
                {
                    "kind": "connectors",
                    "preset": TYPED if loss else _text(conn.get("grade") or "TIA-568.3-D"),
                    "value": count,
                    "extra": loss,
                }
            )
    else:
        items.append({"kind": "connectors", "preset": "TIA-568.3-D", "value": "2", "extra": ""})
    raw_nm = spec.get("wavelengths", spec.get("wavelengths_nm", []))
    wavelengths = ", ".join(_text(v) for v in (raw_nm if isinstance(raw_nm, list) else [raw_nm]))
    margin = _text(spec.get("margin")) or _text(spec.get("margin_db"), "dB")
    settings = {
        "wavelengths": wavelengths,
        "margin": "" if margin in ("0 dB", "0") else margin,
        "application": _text(spec.get("application")),
        "bit-rate": _text(spec.get("bit_rate")),
        "spectral-width": _text(spec.get("spectral_width")),
    }
    tx = spec.get("transceiver")
    if isinstance(tx, str):
        settings["transceiver"] = tx
    elif isinstance(tx, dict):
        settings["transceiver"] = TYPED
        for field_id, key in (
            ("tx-min", "tx_min_dbm"),
            ("tx-max", "tx_max_dbm"),
            ("rx-sens", "rx_sensitivity_dbm"),
            ("rx-over", "rx_overload_dbm"),
        ):
            settings[field_id] = _text(tx.get(key), "dBm")
    return items, settings


def _starting_items() -> list[dict[str, str]]:
    """A new budget: one single-mode fibre segment and the two end connections."""
    return [
        {"kind": "fibre", "preset": "OS2", "value": "", "extra": ""},
        {"kind": "connectors", "preset": "TIA-568.3-D", "value": "2", "extra": ""},
    ]


_SETTING_FIELDS = (
    "wavelengths",
    "margin",
    "bit-rate",
    "spectral-width",
    "tx-min",
    "tx-max",
    "rx-sens",
    "rx-over",
)


class BudgetScreen(Screen[None]):
    """Build a link, read its budget per wavelength, check an application or a transceiver."""

    CSS_PATH = "budget.tcss"
    AUTO_FOCUS = "#item-value"
    BINDINGS = keys.bindings("budget")

    def __init__(self) -> None:
        super().__init__()
        self.items: list[dict[str, str]] = _starting_items()
        self._clear_asked = False
        self.current = 0
        self.report: Any = None
        self.resolved: Any = None
        self.problem: str | None = None
        self._tx_problem: str | None = None
        self._job_id: str | None = None  # the job last opened or saved to, picked first next time
        self._check_options: dict[str, list[str]] = {"application": [], "transceiver": []}

    # -- presets -------------------------------------------------------------------------
    @property
    def library(self) -> Any:
        from fieldkit.presets import load_presets

        return load_presets(self.app.config_dir)  # type: ignore[attr-defined]

    def _preset_options(self, kind: str) -> list[tuple[str, str]]:
        lib = self.library
        if kind == "fibre":
            return [(n, n) for n in lib.fibres] + [("typed attenuation", TYPED)]
        if kind == "connectors":
            return [(f"{n} ({p.loss_max_db:g} dB)", n) for n, p in lib.connectors.items()] + [
                ("typed loss", TYPED)
            ]
        if kind == "splices":
            return [(f"{n} ({p.loss_max_db:g} dB)", n) for n, p in lib.splices.items()] + [
                ("typed loss", TYPED)
            ]
        if kind == "splitter":
            return [(n, n) for n, p in lib.components.items() if p.kind == "splitter"] + [
                ("typed excess", TYPED)
            ]
        if kind == "component":
            return [(n, n) for n, p in lib.components.items() if p.kind != "splitter"]
        return []

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
                yield Input(
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
            with Vertical(classes="two-col"):
                with Vertical(classes="col"):
                    with Vertical(id="link-panel", classes="panel") as panel:
                        panel.border_title = "Link, end A to end B"
                        yield OptionList(id="items")
                        with Horizontal(id="item-buttons"):
                            yield Select(
                                [(KINDS[k]["title"], k) for k in ADD_KINDS],
                                value="fibre",
                                allow_blank=False,
                                compact=True,
                                id="add-kind",
                                tooltip="Kind of item to add",
                            )
                            yield Button(
                                "Add", id="add", compact=True, tooltip=keys.tip("budget", "add")
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
                            "Length", "item-value", "1.2 km", label_id="item-value-label"
                        )
                        yield from self._field(
                            "dB/km", "item-extra", "0.35 dB/km", label_id="item-extra-label"
                        )
                    yield Static("", id="budget-summary", markup=False)
                    with Vertical(id="settings-panel", classes="panel") as panel:
                        panel.border_title = "Wavelengths and checks"
                        yield from self._field(
                            "Wavelengths",
                            "wavelengths",
                            "default by fibre family",
                            tooltip="e.g. 1310, 1550 (blank: 850/1300 "
                            "multimode, 1310/1550 single-mode)",
                        )
                        yield from self._field(
                            "Margin",
                            "margin",
                            "design margin, 3 dB",
                            tooltip="repairs and ageing; shown beside the link loss, not in it",
                        )
                        yield from self._field(
                            "Bit rate",
                            "bit-rate",
                            "GBd, for dispersion",
                            tooltip="line rate in GBd for the dispersion and modal-bandwidth "
                            "checks (blank: the transceiver's or the application's)",
                        )
                        yield from self._field(
                            "Spectrum",
                            "spectral-width",
                            "RMS width, nm",
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
                            yield from self._field("Tx min", "tx-min", "-8.2 dBm")
                            yield from self._field("Tx max", "tx-max", "0.5 dBm")
                            yield from self._field("Rx sens", "rx-sens", "-14.4 dBm")
                            yield from self._field("Rx overload", "rx-over", "0.5 dBm")
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
                    yield Static("", id="budget-saved", classes="field-note", markup=False)
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
                    yield Static(safety.INVISIBLE_LIGHT, classes="caution", id="budget-caution")
        yield KeyFooter()

    def on_mount(self) -> None:
        lib = self.library
        self._check_options = {
            "application": list(lib.applications),
            "transceiver": [*lib.transceivers, TYPED],
        }
        self._application_order: tuple[str, ...] = ()
        self._order_applications()
        self.query_one("#transceiver", Select).set_options(
            [(n, n) for n in lib.transceivers] + [("typed levels", TYPED)]
        )
        self.query_one("#tx-levels").display = False
        for error in self.query(".field-error"):
            error.display = False
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
        items.set_options([item_text(i + 1, it) for i, it in enumerate(self.items)])
        if self.items:
            items.highlighted = min(self.current, len(self.items) - 1)

    def _update_list_line(self) -> None:
        items = self.query_one("#items", OptionList)
        if 0 <= self.current < len(self.items):
            items.replace_option_prompt_at_index(
                self.current, item_text(self.current + 1, self.items[self.current])
            )

    def _load_item(self) -> None:
        """Show the picked item in the editor."""
        panel = self.query_one("#item-panel")
        if not self.items:
            panel.display = False
            return
        panel.display = True
        item = self.items[self.current]
        kind = KINDS[item["kind"]]
        panel.border_title = f"Item {self.current + 1}: {kind['title']}"
        preset_row = self.query_one("#item-preset-row")
        preset = self.query_one("#item-preset", Select)
        if kind["preset"]:
            preset_row.display = True
            self.query_one("#item-preset-label", Label).update(kind["preset"])
            options = self._preset_options(item["kind"])
            preset.set_options(options)
            values = [v for _, v in options]
            if item.get("preset") in values:
                preset.value = item["preset"]
        else:
            preset_row.display = False
        self.query_one("#item-value-label", Label).update(kind["value"])
        value = self.query_one("#item-value", Input)
        value.placeholder = kind["value_hint"]
        value.value = item.get("value", "")
        self._show_extra()
        extra = self.query_one("#item-extra", Input)
        extra.placeholder = kind["extra_hint"]
        extra.value = item.get("extra", "")

    def _show_extra(self) -> None:
        item = self.items[self.current]
        kind = KINDS[item["kind"]]
        typed = item.get("preset") == TYPED
        wanted = bool(kind["extra"]) and (item["kind"] == "other" or typed)
        self.query_one("#item-extra-field").display = wanted
        self.query_one("#item-extra-label", Label).update(kind["extra"])

    @on(OptionList.OptionHighlighted, "#items")
    def _picked(self, event: OptionList.OptionHighlighted) -> None:
        index = event.option_index
        if index != self.current and 0 <= index < len(self.items):
            self.current = index
            self._load_item()
            self._check_item_fields()
            self._show_fibre_data()

    @on(OptionList.OptionSelected, "#items")
    def _item_chosen(self, event: OptionList.OptionSelected) -> None:
        # Enter (or a click) on an item: edit it.
        self.query_one("#item-value", Input).focus()

    @on(Select.Changed, "#item-preset")
    def _preset_changed(self, event: Select.Changed) -> None:
        if not self.items or event.value is Select.NULL:
            return
        item = self.items[self.current]
        if event.value not in [v for _, v in self._preset_options(item["kind"])]:
            return
        if item.get("preset") != event.value:
            item["preset"] = str(event.value)
            self._show_extra()
            self._update_list_line()
            self.recompute()

    @on(Input.Changed, "#item-value, #item-extra")
    def _item_typed(self, event: Input.Changed) -> None:
        if not self.items:
            return
        key = "value" if event.input.id == "item-value" else "extra"
        item = self.items[self.current]
        if item.get(key, "") != event.value:
            item[key] = event.value
            self._update_list_line()
        self._check_item_fields()
        self.recompute()

    def _check_item_fields(self) -> None:
        """Show the problem of the picked item's own fields beside them."""
        from fieldkit import inputs, linkspec

        if not self.items:
            return
        item = self.items[self.current]
        value, extra = item.get("value", ""), item.get("extra", "")
        value_error = extra_error = ""
        try:
            kind = item["kind"]
            if kind == "fibre":
                if value.strip():
                    inputs.length_m(value, "length")
            elif kind in ("connectors", "splices", "component"):
                if value.strip():
                    inputs.item_count(value, KINDS[kind]["value"].lower())
            elif kind == "splitter":
                if value.strip():
                    inputs.splitter(value)
            elif value.strip():
                inputs.loss_db(value, "loss")
        except InputError as exc:
            value_error = str(exc)
        try:
            if item.get("preset") == TYPED and extra.strip():
                if item["kind"] == "fibre":
                    entry = attenuation_entry(extra)
                    linkspec.custom_fibre(entry)
                else:
                    inputs.loss_db(extra, KINDS[item["kind"]]["extra"].lower())
        except InputError as exc:
            extra_error = str(exc)
        self._error("item-value", value_error)
        self._error("item-extra", extra_error)

    def _error(self, field_id: str, message: str) -> None:
        error = self.query_one(f"#{field_id}-error", Static)
        error.update(message)
        error.display = bool(message)

    # -- item actions --------------------------------------------------------------------
    def action_add_item(self) -> None:
        kind = str(self.query_one("#add-kind", Select).value)
        if kind == "connectors" and any(i["kind"] == "connectors" for i in self.items):
            self.notify(
                "The link has one connectors line: edit its number of mated pairs.",
                severity="warning",
            )
            self.current = next(i for i, it in enumerate(self.items) if it["kind"] == "connectors")
            self._refresh_list()
            self._load_item()
            return
        options = self._preset_options(kind)
        preset = ""
        if kind == "splices":
            preset = "fusion" if "fusion" in self.library.splices else options[0][1]
        elif kind == "connectors":
            preset = "TIA-568.3-D" if "TIA-568.3-D" in self.library.connectors else options[0][1]
        elif kind == "fibre" and self.items:
            fibres = [i.get("preset", "") for i in self.items if i["kind"] == "fibre"]
            preset = fibres[-1] if fibres else options[0][1]
        elif options:
            preset = options[0][1]
        defaults = {"splitter": "1x32", "component": "1", "connectors": "2"}
        item = {"kind": kind, "preset": preset, "value": defaults.get(kind, ""), "extra": ""}
        at = self.current + 1 if self.items else 0
        self.items.insert(at, item)
        self.current = at
        self._refresh_list()
        self._load_item()
        self.query_one("#item-value", Input).focus()
        self.recompute()

    def action_remove_item(self) -> None:
        if not self.items:
            return
        if (
            sum(1 for i in self.items if i["kind"] == "fibre") == 1
            and self.items[self.current]["kind"] == "fibre"
        ):
            self.notify("A link needs at least one fibre segment.", severity="warning")
            return
        del self.items[self.current]
        self.current = max(0, min(self.current, len(self.items) - 1))
        self._refresh_list()
        self._load_item()
        self.recompute()

    def action_move_item(self, step: int) -> None:
        target = self.current + step
        if not self.items or not 0 <= target < len(self.items):
            return
        self.items[self.current], self.items[target] = self.items[target], self.items[self.current]
        self.current = target
        self._refresh_list()
        self.recompute()

    @on(Button.Pressed)
    def _button(self, event: Button.Pressed) -> None:
        actions = {
            "add": self.action_add_item,
            "remove": self.action_remove_item,
            "up": lambda: self.action_move_item(-1),
            "down": lambda: self.action_move_item(1),
            "save": self.action_save,
            "open": self.action_open_saved,
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
    @on(
        Input.Changed,
        "#wavelengths, #margin, #bit-rate, #spectral-width, #tx-min, #tx-max, #rx-sens, #rx-over",
    )
    def _setting_typed(self, event: Input.Changed) -> None:
        self.recompute()

    @on(Select.Changed, "#application, #transceiver")
    def _check_changed(self, event: Select.Changed) -> None:
        self.query_one("#tx-levels").display = self.query_one("#transceiver", Select).value == TYPED
        self.recompute()

    def _settings(self) -> dict[str, Any]:
        """The typed settings, each checked beside its field; problems raise InputError."""
        from fieldkit import inputs

        out: dict[str, Any] = {}
        problems: list[str] = []
        self._tx_problem = None
        text = self.query_one("#wavelengths", Input).value
        try:
            out["wavelengths"] = inputs.wavelength_list(text) if text.strip() else []
            self._error("wavelengths", "")
        except InputError as exc:
            self._error("wavelengths", str(exc))
            problems.append(str(exc))
        margin = self.query_one("#margin", Input).value
        try:
            out["margin"] = (
                f"{inputs.loss_db(margin, 'design margin')} dB" if margin.strip() else ""
            )
            self._error("margin", "")
        except InputError as exc:
            self._error("margin", str(exc))
            problems.append(str(exc))
        for field_id, key, parser in (
            ("bit-rate", "bit_rate", inputs.bit_rate_gbd),
            ("spectral-width", "spectral_width", inputs.spectral_width_nm),
        ):
            typed = self.query_one(f"#{field_id}", Input).value
            try:
                if typed.strip():
                    parser(typed)
                    out[key] = typed.strip()
                self._error(field_id, "")
            except InputError as exc:
                self._error(field_id, str(exc))
                problems.append(str(exc))
        application = self.query_one("#application", Select).value
        if application is not Select.NULL:
            out["application"] = application
        transceiver = self.query_one("#transceiver", Select).value
        if transceiver == TYPED:
            levels: dict[str, Any] = {}
            level_problems: list[str] = []
            untyped: list[str] = []
            for field_id, key, what in (
                ("tx-min", "tx_min_dbm", "Tx minimum"),
                ("tx-max", "tx_max_dbm", "Tx maximum"),
                ("rx-sens", "rx_sensitivity_dbm", "Rx sensitivity"),
                ("rx-over", "rx_overload_dbm", "Rx overload"),
            ):
                typed = self.query_one(f"#{field_id}", Input).value
                if not typed.strip():
                    untyped.append(what)
                    self._error(field_id, "")
                    continue
                try:
                    levels[key] = inputs.level_dbm(typed, what)
                    self._error(field_id, "")
                except InputError as exc:
                    self._error(field_id, str(exc))
                    level_problems.append(str(exc))
            if level_problems or untyped:
                # The budget still shows; only the transceiver check waits for its levels:
                # wrong text is named, levels not typed yet are asked for.
                self._tx_problem = (
                    f"Type the four levels to check: {level_problems[0]}"
                    if level_problems
                    else "Type " + ", ".join(untyped) + " to check the transceiver."
                )
            else:
                levels["name"] = "typed levels"
                out["transceiver"] = levels
        elif transceiver is not Select.NULL:
            out["transceiver"] = transceiver
        if problems:
            raise InputError(problems[0])
        return out

    # -- the result ----------------------------------------------------------------------
    def recompute(self) -> None:
        from fieldkit import linkspec

        self._order_applications()
        if getattr(self, "_clean_print", None) is None:
            self.mark_clean()  # the first result: the blank start is nothing to lose
        elif self.unsaved_edits:
            # A "saved" or "opened" line says nothing about what was typed since.
            self.query_one("#budget-saved", Static).update("")
        problem = self.query_one("#budget-problem", Static)
        waiting = self.query_one("#budget-waiting", Static)
        waiting.display = False
        try:
            settings = self._settings()
            prompt = missing_entry(self.items)
            if prompt is not None:
                # Not an error yet: say what to type, calmly, and show no result.
                self.report = self.resolved = None
                self.problem = prompt
                problem.display = False
                waiting.update(prompt)
                waiting.display = True
                for out_id in (
                    "#budget-out",
                    "#sources-out",
                    "#application-out",
                    "#transceiver-out",
                    "#checks-out",
                    "#fibre-data-out",
                ):
                    self.query_one(out_id, Static).update("")
                summary = self.query_one("#budget-summary", Static)
                summary.update(prompt)
                summary.set_class(True, "-waiting").set_class(False, "-problem")
                return
            spec = spec_from_items(self.items, settings)
            resolved = linkspec.resolve(spec, self.library)
            report = resolved.evaluate()
        except (InputError, ValueError, ArithmeticError) as exc:
            # A problem in what was typed: say so and keep every field as it is.
            self.report = self.resolved = None
            self.problem = str(exc)
            problem.update(self._explain(str(exc)))
            problem.display = True
            self.query_one("#budget-out", Static).update("")
            self.query_one("#sources-out", Static).update("")
            summary = self.query_one("#budget-summary", Static)
            summary.update(self._explain(str(exc)))
            summary.set_class(False, "-waiting").set_class(True, "-problem")
            for out_id in (
                "#application-out",
                "#transceiver-out",
                "#checks-out",
                "#fibre-data-out",
            ):
                self.query_one(out_id, Static).update("")
            return
        self.report, self.resolved, self.problem = report, resolved, None
        problem.display = False
        self._show(report)

    def _order_applications(self) -> None:
        """Applications with a row for the link's fibre first; the others after, marked, so
        choosing one is a deliberate act (its check then names the missing row)."""
        lib = self.library
        names = tuple(
            dict.fromkeys(
                it.get("preset", "")
                for it in self.items
                if it["kind"] == "fibre" and it.get("preset") in lib.fibres
            )
        )
        families = {lib.fibres[n].family for n in names}
        family = next(iter(families)) if len(families) == 1 else None
        fits, others = lib.applications_by_fit(names, family)
        order = (*fits, "|", *others)
        if order == self._application_order:
            return
        self._application_order = order
        word = {"singlemode": "single-mode", "multimode": "multimode"}.get(family or "", "")
        mark = f" (no {word} row)" if word else ""
        select = self.query_one("#application", Select)
        current = select.value
        select.set_options([(n, n) for n in fits] + [(f"{n}{mark}", n) for n in others])
        if current is not Select.NULL and current in (*fits, *others):
            select.value = current

    def _explain(self, message: str) -> str:
        # The description numbers segments; tell the user which list item that is.
        match = re.match(r"segment (\d+): (.*)", message)
        if match:
            n = int(match.group(1))
            fibres = [i for i, it in enumerate(self.items) if it["kind"] == "fibre"]
            if 0 < n <= len(fibres):
                return f"item {fibres[n - 1] + 1}: {match.group(2)}"
        return message

    def _show(self, report: Any) -> None:
        from fieldkit.text import budget as lines

        self.query_one("#budget-out", Static).update(
            Text("\n".join(_keep_indent(line) for line in lines.breakdown_lines(report)))
        )
        summary_out = self.query_one("#budget-summary", Static)
        summary_out.update(lines.summary_text(report))
        summary_out.set_class(False, "-waiting").set_class(False, "-problem")
        self.query_one("#sources-out", Static).update("\n".join(lines.source_lines(report)))
        app = report.application
        self.query_one("#application-out", Static).update(
            "Pick an application to check."
            if app is None
            else "\n".join(lines.application_lines(app))
        )
        tx = report.transceiver
        out = self.query_one("#transceiver-out", Static)
        if tx is None:
            out.update(self._tx_problem or "Pick a transceiver to check.")
        else:
            out.update("\n".join(lines.transceiver_lines(tx)))
        checks = [] if report.checks is None else lines.check_lines(report.checks)
        self.query_one("#checks-out", Static).update(
            "\n".join(checks) or "Nothing to check beyond loss for this link."
        )
        self._show_fibre_data()

    def _show_fibre_data(self) -> None:
        """The fibre data of the picked fibre item (else the first) at the first wavelength."""
        from fieldkit.calc.checks import fibre_data
        from fieldkit.text.budget import fibre_data_lines

        out = self.query_one("#fibre-data-out", Static)
        if self.resolved is None or self.report is None:
            out.update("")
            return
        fibre_items = [i for i, it in enumerate(self.items) if it["kind"] == "fibre"]
        index = fibre_items.index(self.current) if self.current in fibre_items else 0
        segments = self.resolved.link.segments
        fibre = segments[min(index, len(segments) - 1)].fibre
        rows = [
            line
            for w in self.report.result.wavelengths
            for line in fibre_data_lines(fibre_data(fibre, w.wavelength_nm))
        ]
        out.update("\n".join(rows))

    # -- unsaved edits -------------------------------------------------------------------
    def _fingerprint(self) -> str:
        import json

        fields = {
            field_id: self.query_one(f"#{field_id}", Input).value for field_id in _SETTING_FIELDS
        }
        selects = {
            select_id: str(self.query_one(f"#{select_id}", Select).value)
            for select_id in ("application", "transceiver")
        }
        return json.dumps([self.items, fields, selects], sort_keys=True, default=str)

    def mark_clean(self) -> None:
        """What is on screen now is saved (or opened, or the blank start)."""
        self._clean_print = self._fingerprint()

    @property
    def unsaved_edits(self) -> bool:
        """True when the budget was changed since it was last saved, opened or started."""
        clean = getattr(self, "_clean_print", None)
        return clean is not None and clean != self._fingerprint()

    # -- new, and going to the result ----------------------------------------------------
    def _mark_clean(self) -> None:
        self.mark_clean()
        self._clear_asked = False

    def action_new_budget(self) -> None:
        """An empty budget; unsaved changes are cleared only on a second Ctrl+N."""
        saved = self.query_one("#budget-saved", Static)
        if self.unsaved_edits and not getattr(self, "_clear_asked", False):
            self._clear_asked = True
            saved.update(
                f"This budget has changes not saved: {keys.hint('new')} again clears them, "
                f"{keys.hint('save')} saves them."
            )
            return
        self.load(_starting_items(), {})
        self.query_one("#add-kind", Select).value = "fibre"
        self._mark_clean()
        saved.update("A new, empty budget.")
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
        if not any(i["kind"] == "fibre" for i in items):
            self.notify(f"The budget on {link.label} has no fibre segment.", severity="warning")
            return
        self.load(items, fields)
        self._job_id = job_id
        self._mark_clean()
        self.query_one("#budget-saved", Static).update(
            f"Opened the budget saved on link {link.label}."
        )

    def load(self, items: list[dict[str, str]], fields: dict[str, str]) -> None:
        """Replace the link and the settings (typed text is kept as typed)."""
        self.items = items
        self.current = 0
        for field_id in _SETTING_FIELDS:
            self.query_one(f"#{field_id}", Input).value = fields.get(field_id, "")
        for select_id in ("application", "transceiver"):
            select = self.query_one(f"#{select_id}", Select)
            wanted = fields.get(select_id) or ""
            if wanted and wanted in self._check_options[select_id]:
                select.value = wanted
            else:
                select.clear()
                if wanted:
                    self.notify(
                        f"{select_id}: '{wanted}' is not among the presets now", severity="warning"
                    )
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
            self.query_one("#budget-saved", Static).update(f"Not saved: {exc}")
            return
        self._job_id = job_id
        self._mark_clean()
        text = f"Budget saved onto job {saved.job_name}, link {saved.link_label}."
        self.query_one("#budget-saved", Static).update(text)
        self.notify(text)
