"""The budget workspace's state as a plain model: the link's items, the typed settings, and what
they give. No Textual here; the screen lays it out and wires keys and fields to it.

The link is a list of :class:`Item` (fibre segments in order from end A, mated connector pairs,
splices, splitters and other components), each holding its text as typed. :meth:`BudgetModel.
evaluate` turns the items and settings into the written link description that ``fieldkit
budget`` reads (:mod:`fieldkit.linkspec`), so the workspace and the CLI always agree, and says
what to show: the report, a calm prompt for what is still missing, or the problem with what was
typed, with each field's own problem for beside it. :func:`items_from_spec` goes back from a
description saved on a job.
"""

from __future__ import annotations

import json
import re
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from fieldkit import inputs, linkspec
from fieldkit.calc.budget import BudgetReport
from fieldkit.calc.checks import fibre_data
from fieldkit.calc.units import InputError
from fieldkit.linkspec.resolve import ResolvedBudget
from fieldkit.presets import PresetLibrary, load_presets
from fieldkit.text import budget as lines
from fieldkit.text.budget import fibre_data_lines
from fieldkit.text.words import preset_problems
from fieldkit.tui.form_fields import Notice

if TYPE_CHECKING:
    from fieldkit.jobs.store import JobStore

TYPED = "__typed__"
__all__ = [
    "ADD_KINDS",
    "DEFAULT_ADD_KIND",
    "KINDS",
    "LEVEL_FIELDS",
    "SETTINGS",
    "SETTING_FIELDS",
    "TYPED",
    "BudgetModel",
    "Item",
    "Kind",
    "Notice",
    "Outcome",
    "extra_shown",
    "item_entry",
    "item_errors",
    "item_problem",
    "item_text",
    "items_from_spec",
    "missing_entry",
    "spec_from_items",
    "starting_items",
]


@dataclass(frozen=True, slots=True)
class Kind:
    """What the item list calls a kind of item and what each editor field means for it."""

    title: str
    preset: str  # the label of the preset choice ("" when the kind has none)
    value: str  # the label of the first field
    extra: str  # the label of the second field ("" when the kind has none)
    value_hint: str  # the placeholder of the first field: an example, never a value
    extra_hint: str
    extra_tip: str = ""  # the second field's tooltip: the longer forms it takes


#: Item kinds. Hints are examples ("e.g. 6") and say what an empty field means where it means
#: something, so a hint never reads as a value.
KINDS: dict[str, Kind] = {
    "fibre": Kind(
        "Fibre",
        "Fibre",
        "Length",
        "dB/km",
        "e.g. 1.2 km, 3900 ft",
        "e.g. 0.35 dB/km",
        "one value, or per wavelength: 1310=0.35 dB/km; 1550=0.22 dB/km",
    ),
    "connectors": Kind(
        "Mated connector pairs",
        "Grade",
        "Pairs",
        "Each",
        "e.g. 4 (both ends)",
        "e.g. 0.5 dB",
    ),
    "splices": Kind("Splices", "Grade", "Count", "Each", "e.g. 6 (empty: none)", "e.g. 0.1 dB"),
    "splitter": Kind("Splitter", "Preset", "Split", "Excess", "e.g. 1x32", "e.g. 2.0 dB"),
    "component": Kind("Component", "Preset", "Count", "", "e.g. 2 (empty: 1)", ""),
    "attenuator": Kind("Attenuator", "", "Loss", "", "e.g. 5 dB", ""),
    "other": Kind("Other loss", "", "Loss", "Name", "e.g. 0.5 dB", "e.g. patch cord, closure"),
}
#: The kinds offered by Add, in the order the chooser lists them.
ADD_KINDS = ("fibre", "splices", "splitter", "component", "attenuator", "other", "connectors")
#: The kind the add chooser opens at, every time: the first in its list, so the same keys always
#: add the same kind (opening at the last kind used put a WDM coupler in for a splitter).
DEFAULT_ADD_KIND = ADD_KINDS[0]

#: What a count means when it is left empty (the link description's own defaults).
EMPTY_COUNT = {"connectors": "2", "splices": "0", "component": "1"}
#: What each item's first field is called in a problem and in the list ("length not valid").
_VALUE_WORD = {
    "fibre": "length",
    "connectors": "count",
    "splices": "count",
    "splitter": "split",
    "component": "count",
    "attenuator": "loss",
    "other": "loss",
}
#: What each item's second field is called in a prompt.
_EXTRA_WORD = {
    "fibre": "attenuation",
    "connectors": "loss each",
    "splices": "loss each",
    "splitter": "excess loss",
    "other": "name",
}
#: The typed settings fields, by the screen's field ids.
SETTING_FIELDS = (
    "wavelengths",
    "margin",
    "bit-rate",
    "spectral-width",
    "tx-min",
    "tx-max",
    "rx-sens",
    "rx-over",
)
_LEVEL_KEYS = (
    ("tx-min", "tx_min_dbm", "Tx minimum"),
    ("tx-max", "tx_max_dbm", "Tx maximum"),
    ("rx-sens", "rx_sensitivity_dbm", "Rx sensitivity"),
    ("rx-over", "rx_overload_dbm", "Rx overload"),
)

#: The settings fields as the workspace lays them out: label, id, hint (an example, never a
#: value; it says what empty means), tooltip.
SETTINGS = (
    (
        "Wavelengths",
        "wavelengths",
        "e.g. 1310, 1550",
        "in nm (empty: 850/1300 multimode, 1310/1550 single-mode)",
    ),
    (
        "Margin",
        "margin",
        "e.g. 3 dB; empty: none",
        "repairs and ageing, shown beside the link loss, not in it (empty: no margin)",
    ),
    (
        "Line rate",
        "bit-rate",
        "e.g. 10.3125 GBd",
        "line rate in GBd (symbols per second on the fibre, coding included: 10GBASE-LR's "
        "10 Gb/s of data run at 10.3125 GBd; for a two-level signal, the bit rate on the line) "
        "for the dispersion and modal-bandwidth checks (empty: the transceiver's or the "
        "application's)",
    ),
    (
        "Spectral width",
        "spectral-width",
        "e.g. 0.1 nm RMS",
        "the source's RMS spectral width in nm, for the dispersion check when no transceiver "
        "tolerance is known",
    ),
)
#: The typed transceiver levels: label, id, hint.
LEVEL_FIELDS = (
    ("Tx min", "tx-min", "e.g. −8.2 dBm"),
    ("Tx max", "tx-max", "e.g. 0.5 dBm"),
    ("Rx sens", "rx-sens", "e.g. −14.4 dBm"),
    ("Rx overload", "rx-over", "e.g. 0.5 dBm"),
)


@dataclass(slots=True)
class Item:
    """One item of the link, as typed: its kind, its preset (or ``TYPED``) and two fields."""

    kind: str
    preset: str = ""
    value: str = ""
    extra: str = ""


def starting_items() -> list[Item]:
    """A new budget: one single-mode fibre segment and the two end connections."""
    return [Item("fibre", "OS2"), Item("connectors", "TIA-568.3-D", "2")]


# -- items <-> the written link description ----------------------------------------------------


def item_entry(item: Item) -> tuple[str, Any]:
    """Where an item goes in the link description, and its entry there."""
    kind, preset, value, extra = item.kind, item.preset, item.value, item.extra
    if kind == "fibre":
        seg: dict[str, Any] = {"length": value}
        if preset == TYPED:
            seg["attenuation"] = inputs.attenuation_entry(extra)
        else:
            seg["fibre"] = preset
        return "segments", seg
    if kind in ("connectors", "splices"):
        entry: dict[str, Any] = {"count": value or EMPTY_COUNT[kind]}
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


def spec_from_items(items: list[Item], settings: dict[str, Any]) -> dict[str, Any]:
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


def _fibre_item(seg: dict[str, Any]) -> Item:
    length = _text(seg.get("length")) or _text(seg.get("length_m"), "m")
    att = seg.get("attenuation")
    if att is not None:
        extra = (
            "; ".join(f"{k}={v}" for k, v in att.items()) if isinstance(att, dict) else _text(att)
        )
        return Item("fibre", TYPED, length, extra)
    return Item("fibre", _text(seg.get("fibre") or seg.get("fiber")), length)


def _component_item(comp: dict[str, Any]) -> Item:
    count = _text(comp.get("count")) or "1"
    loss = _text(comp.get("loss")) or _text(comp.get("loss_db"), "dB")
    if "splitter" in comp:
        excess = _text(comp.get("excess"))
        preset = (
            TYPED
            if excess
            else _text(comp.get("preset")) or f"{str(comp['splitter'])[:1]}xN splitter"
        )
        return Item("splitter", preset, _text(comp["splitter"]), excess)
    if comp.get("preset") and not loss:
        return Item("component", _text(comp["preset"]), count)
    if comp.get("kind") == "attenuator":
        return Item("attenuator", "", loss)
    return Item("other", "", loss, _text(comp.get("name")))


def items_from_spec(spec: dict[str, Any]) -> tuple[list[Item], dict[str, str]]:
    """The workspace's items and settings fields of a written link description (the reverse
    of :func:`spec_from_items`, for a budget saved on a job)."""
    items = [_fibre_item(seg) for seg in spec.get("segments") or [] if isinstance(seg, dict)]
    items += [_component_item(c) for c in spec.get("components") or [] if isinstance(c, dict)]
    splices = spec.get("splices") or []
    for sp in [splices] if isinstance(splices, dict) else splices:
        if not isinstance(sp, dict):
            continue
        loss = _text(sp.get("loss")) or _text(sp.get("loss_db"), "dB")
        grade = TYPED if loss else _text(sp.get("grade") or sp.get("method") or "fusion")
        items.append(Item("splices", grade, _text(sp.get("count")) or "0", loss))
    conn = spec.get("connectors")
    if isinstance(conn, dict):
        loss = _text(conn.get("loss")) or _text(conn.get("loss_db"), "dB")
        count = _text(conn.get("count")) or "2"
        if not (count == "0" and loss in ("0 dB", "0")):
            grade = TYPED if loss else _text(conn.get("grade") or "TIA-568.3-D")
            items.append(Item("connectors", grade, count, loss))
    else:
        items.append(Item("connectors", "TIA-568.3-D", "2"))
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
        for field_id, key, _ in _LEVEL_KEYS:
            settings[field_id] = _text(tx.get(key), "dBm")
    return items, settings


# -- what the list and the prompts say ----------------------------------------------------------


def missing_entry(items: list[Item]) -> str | None:
    """A calm prompt for the first item still waiting for a value, or None when every item has
    what the budget needs. Nothing typed yet is not an error: wrong text is."""
    for index, item in enumerate(items, start=1):
        kind = KINDS[item.kind]
        if not item.value.strip() and item.kind not in EMPTY_COUNT:
            return (
                f"Type the {kind.value.lower()} of item {index} ({kind.title}) to see the budget."
            )
        if item.preset == TYPED and item.kind in _EXTRA_WORD and not item.extra.strip():
            return (
                f"Type the {_EXTRA_WORD[item.kind]} of item {index} ({kind.title}) to see "
                "the budget."
            )
    return None


def item_text(index: int, item: Item) -> str:
    """One line of the item list. A field whose text is refused says so ("length not valid"),
    never shows that text as if it were taken; the text stays in its field as typed."""
    kind, preset = item.kind, item.preset
    value_error, extra_error = item_errors(item)
    if value_error:
        value = f"{_VALUE_WORD[kind]} not valid"
    else:
        value = (
            item.value.strip()
            or EMPTY_COUNT.get(kind, "")
            or f"{KINDS[kind].value.lower()} not typed"
        )
    extra = f"{_EXTRA_WORD[kind]} not valid" if extra_error else item.extra.strip()
    if kind == "fibre":
        what = f"typed {extra or 'dB/km not typed'}" if preset == TYPED else preset
        return f"{index}. Fibre {what}, {value}"
    if kind in ("connectors", "splices"):
        each = extra if preset == TYPED else preset
        if value_error:
            return f"{index}. {KINDS[kind].title}, {value}, {each}"
        # "connector pairs": the short form of "mated connector pairs" that fits the list
        return (
            f"{index}. {value} {'connector pairs' if kind == 'connectors' else 'splices'}, {each}"
        )
    if kind == "splitter":
        split = f", {value}" if value_error else f" {value}"
        return f"{index}. Splitter{split}" + (f", excess {extra}" if preset == TYPED else "")
    if kind == "component":
        return f"{index}. {preset}, {value}" if value_error else f"{index}. {value} × {preset}"
    if kind == "attenuator":
        return f"{index}. Attenuator{',' if value_error else ''} {value}"
    typed = item.value.strip() and not value_error
    return f"{index}. {extra or 'Other loss'}{'' if typed else ','} {value}"


def item_problem(index: int, item: Item, message: str) -> str:
    """A field's problem as the budget line says it, numbered as the list numbers the item:
    ``item 3 (splices): count 6.5 is not a whole number``."""
    place = f"item {index} ({KINDS[item.kind].title.lower()})"
    word, sep, rest = message.partition(": ")
    if not sep:
        return f"{place}: {message}"
    # "count: 6.5 is ..." reads "count 6.5 is ..."; "length: unknown unit" keeps its colon.
    joined = " " if rest[:1].isdigit() or rest[:1] in "'\"+-.\u2212" else ": "
    return f"{place}: {word}{joined}{rest}"


def item_errors(item: Item) -> tuple[str, str]:
    """The problems of an item's own two fields ("" where there is none), for beside them."""
    value, extra = item.value, item.extra
    value_error = extra_error = ""
    try:
        if not value.strip():
            pass
        elif item.kind == "fibre":
            inputs.length_m(value, "length")
        elif item.kind in ("connectors", "splices", "component"):
            inputs.item_count(value, _VALUE_WORD[item.kind])
        elif item.kind == "splitter":
            inputs.splitter(value, _VALUE_WORD[item.kind])
        else:
            inputs.loss_db(value, "loss")
    except InputError as exc:
        value_error = str(exc)
    try:
        if item.preset == TYPED and extra.strip():
            if item.kind == "fibre":
                linkspec.custom_fibre(inputs.attenuation_entry(extra))
            else:
                inputs.loss_db(extra, _EXTRA_WORD[item.kind])
    except InputError as exc:
        extra_error = str(exc)
    return value_error, extra_error


def extra_shown(item: Item) -> bool:
    """Whether the item's second field is asked for (a typed loss, a name)."""
    return bool(KINDS[item.kind].extra) and (item.kind == "other" or item.preset == TYPED)


# -- the result ---------------------------------------------------------------------------------


#: The items behind each numbered place of the link description.
_PLACE_KINDS = {
    "segment": ("fibre",),
    "component": ("splitter", "component", "attenuator", "other"),
    "splices": ("splices",),
}


@dataclass
class Outcome:
    """What the workspace shows after a change: exactly one of a report, a prompt (nothing
    wrong, something still to type) or a problem (something typed is wrong)."""

    report: BudgetReport | None = None
    resolved: ResolvedBudget | None = None
    prompt: str | None = None
    problem: str | None = None
    #: Each settings field's problem, by field id ("" for none): every field is listed.
    field_errors: dict[str, str] = field(default_factory=dict)
    #: Why the transceiver check waits (its levels not typed, or wrong), None when it does not.
    tx_problem: str | None = None

    @property
    def message(self) -> str | None:
        return self.prompt or self.problem


@dataclass
class BudgetModel:
    """The items, the picked one, the settings as typed, and the clean mark for unsaved edits."""

    config_dir: Path | None = None
    items: list[Item] = field(default_factory=starting_items)
    current: int = 0
    fields: dict[str, str] = field(default_factory=lambda: dict.fromkeys(SETTING_FIELDS, ""))
    application: str | None = None
    transceiver: str | None = None
    _clean: str | None = None

    @property
    def library(self) -> PresetLibrary:
        return load_presets(self.config_dir)

    @property
    def item(self) -> Item | None:
        return self.items[self.current] if 0 <= self.current < len(self.items) else None

    # -- presets ----------------------------------------------------------------------------
    def preset_options(self, kind: str) -> list[tuple[str, str]]:
        """The preset choices of a kind: (what the choice shows, its value)."""
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

    def application_choices(self) -> list[tuple[str, str]]:
        """Applications with a row for the link's fibre first; the others after, marked, so
        choosing one is a deliberate act (its check then names the missing row)."""
        lib = self.library
        names = tuple(
            dict.fromkeys(
                it.preset for it in self.items if it.kind == "fibre" and it.preset in lib.fibres
            )
        )
        families = {lib.fibres[n].family for n in names}
        family = next(iter(families)) if len(families) == 1 else None
        fits, others = lib.applications_by_fit(names, family)
        word = {"singlemode": "single-mode", "multimode": "multimode"}.get(family or "", "")
        mark = f" (no {word} row)" if word else ""
        return [(n, n) for n in fits] + [(f"{n}{mark}", n) for n in others]

    def transceiver_choices(self) -> list[tuple[str, str]]:
        """The transceiver presets, then levels typed by hand (:data:`TYPED`)."""
        return [(n, n) for n in self.library.transceivers] + [("typed levels", TYPED)]

    def preset_warning(self) -> str | None:
        """What is wrong with the shipped or the user's presets, in one line (None: nothing;
        the one rule, :func:`fieldkit.text.words.preset_problems`)."""
        return preset_problems(self.library.problems)

    def choose(self, check: str, value: str | None) -> None:
        """The application or transceiver (``check``) to check against; None: no check."""
        if check not in ("application", "transceiver"):
            raise ValueError(f"no such check: {check!r}")
        setattr(self, check, value)

    @property
    def typed_levels(self) -> bool:
        """True when the transceiver check takes levels typed by hand."""
        return self.transceiver == TYPED

    # -- item edits -------------------------------------------------------------------------
    def add(self, kind: str) -> str | None:
        """Add an item of ``kind`` after the picked one and pick it. Returns a refusal (a second
        connectors line: the existing one is picked instead), else None."""
        if kind == "connectors" and any(i.kind == "connectors" for i in self.items):
            self.current = next(i for i, it in enumerate(self.items) if it.kind == "connectors")
            return "The link has one line of mated connector pairs: edit its count."
        lib = self.library
        options = self.preset_options(kind)
        preset = ""
        if kind == "splices":
            preset = "fusion" if "fusion" in lib.splices else options[0][1]
        elif kind == "connectors":
            preset = "TIA-568.3-D" if "TIA-568.3-D" in lib.connectors else options[0][1]
        elif kind == "fibre" and self.items:
            fibres = [i.preset for i in self.items if i.kind == "fibre"]
            preset = fibres[-1] if fibres else options[0][1]
        elif options:
            preset = options[0][1]
        defaults = {"splitter": "1x32", "component": "1", "connectors": "2"}
        at = self.current + 1 if self.items else 0
        self.items.insert(at, Item(kind, preset, defaults.get(kind, "")))
        self.current = at
        return None

    def remove(self) -> str | None:
        """Remove the picked item. Returns a refusal (the only fibre segment stays), else None."""
        item = self.item
        if item is None:
            return None
        if item.kind == "fibre" and sum(1 for i in self.items if i.kind == "fibre") == 1:
            return "A link needs at least one fibre segment."
        del self.items[self.current]
        self.current = max(0, min(self.current, len(self.items) - 1))
        return None

    def move(self, step: int) -> bool:
        """Move the picked item ``step`` places (towards end B when positive)."""
        target = self.current + step
        if not self.items or not 0 <= target < len(self.items):
            return False
        self.items[self.current], self.items[target] = self.items[target], self.items[self.current]
        self.current = target
        return True

    def pick(self, index: int) -> bool:
        """Pick item ``index`` (kept within the list); True when the pick changed."""
        index = max(0, min(index, len(self.items) - 1))
        changed = index != self.current
        self.current = index
        return changed

    def load(self, items: list[Item], fields: dict[str, str]) -> list[str]:
        """Replace the link and the settings (typed text kept as typed). Returns a warning for
        each chosen application or transceiver not among the presets now (left unchosen)."""
        self.items = items
        self.current = 0
        self.fields = {f: fields.get(f, "") for f in SETTING_FIELDS}
        lib = self.library
        known = {"application": list(lib.applications), "transceiver": [*lib.transceivers, TYPED]}
        warnings: list[str] = []
        for what in ("application", "transceiver"):
            wanted = fields.get(what) or ""
            setattr(self, what, wanted if wanted in known[what] else None)
            if wanted and wanted not in known[what]:
                warnings.append(f"{what}: '{wanted}' is not among the presets now")
        return warnings

    def new(self) -> None:
        """An empty budget: the starting items and no settings."""
        self.load(starting_items(), {})

    # -- a job's link ---------------------------------------------------------------------
    def open_saved(self, store: JobStore, job_id: str, link_id: str) -> Notice:
        """Load the budget saved on a job's link (what is held now is replaced only when the
        saved one can be opened)."""
        from fieldkit.jobs.store import StoreError

        try:
            link = store.load(job_id).link(link_id)
        except (StoreError, KeyError) as exc:
            message = str(exc.args[0]) if isinstance(exc, KeyError) and exc.args else str(exc)
            return Notice(f"Not opened: {message}", "error", ok=False)
        if link.budget is None or not link.budget.description.get("segments"):
            return Notice(f"Link {link.label} has no saved budget to open.", "warning", ok=False)
        items, fields = items_from_spec(link.budget.description)
        if not any(i.kind == "fibre" for i in items):
            return Notice(f"The budget on {link.label} has no fibre segment.", "warning", ok=False)
        warnings = self.load(items, fields)
        self.mark_clean()
        return Notice(f"Opened the budget saved on link {link.label}.", warnings=tuple(warnings))

    def save(
        self,
        store: JobStore,
        job_id: str,
        link_id: str,
        resolved: ResolvedBudget,
        report: BudgetReport,
        *,
        by: str,
    ) -> Notice:
        """Save a budget onto a job's link through the layer that changes jobs."""
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.saves import save_budget
        from fieldkit.jobs.budget_records import budget_record
        from fieldkit.jobs.store import StoreError

        record = budget_record(resolved, report, by=by)
        try:
            saved = save_budget(
                store,
                job_id,
                link_id,
                record,
                length_m=resolved.link.length_m,
                fibre_type=", ".join(resolved.link.fibre_names),
            )
        except (StoreError, ActionError) as exc:
            return Notice(f"Not saved: {exc}", "error", ok=False)
        self.mark_clean()
        return Notice(f"Budget saved onto job {saved.job_name}, link {saved.link_label}.")

    # -- unsaved edits ----------------------------------------------------------------------
    @staticmethod
    def unsaved_question(what: str, answer: str) -> tuple[str, list[str], list[tuple[str, str]]]:
        """Asked before ``what`` drops unsaved edits: the title, the lines and the choices
        (``save``: save first; ``discard``: go on, its button saying ``answer``)."""
        return (
            "The budget has unsaved changes",
            [f"{what} replaces what is on screen: its items and settings."],
            [("save", "Save first"), ("discard", answer)],
        )

    def fingerprint(self) -> str:
        return json.dumps(
            [[asdict(i) for i in self.items], self.fields, self.application, self.transceiver],
            sort_keys=True,
        )

    def mark_clean(self) -> None:
        """What the model holds now is saved (or opened, or the blank start)."""
        self._clean = self.fingerprint()

    @property
    def unsaved_edits(self) -> bool:
        """True when the budget was changed since it was last saved, opened or started."""
        return self._clean is not None and self._clean != self.fingerprint()

    # -- evaluating -------------------------------------------------------------------------
    def settings(self, outcome: Outcome) -> dict[str, Any]:
        """The typed settings as the link description takes them; each field's problem goes in
        ``outcome.field_errors``; the first problem raises InputError."""
        out: dict[str, Any] = {}
        problems: list[str] = []
        errors = outcome.field_errors
        errors.update(dict.fromkeys(SETTING_FIELDS, ""))

        text = self.fields.get("wavelengths", "")
        try:
            out["wavelengths"] = inputs.wavelength_list(text) if text.strip() else []
        except InputError as exc:
            errors["wavelengths"] = str(exc)
            problems.append(str(exc))
        margin = self.fields.get("margin", "")
        try:
            out["margin"] = (
                f"{inputs.loss_db(margin, 'design margin')} dB" if margin.strip() else ""
            )
        except InputError as exc:
            errors["margin"] = str(exc)
            problems.append(str(exc))
        for field_id, key, parser in (
            ("bit-rate", "bit_rate", inputs.bit_rate_gbd),
            ("spectral-width", "spectral_width", inputs.spectral_width_nm),
        ):
            typed = self.fields.get(field_id, "")
            try:
                if typed.strip():
                    parser(typed)
                    out[key] = typed.strip()
            except InputError as exc:
                errors[field_id] = str(exc)
                problems.append(str(exc))
        if self.application is not None:
            out["application"] = self.application
        if self.transceiver == TYPED:
            levels: dict[str, Any] = {}
            level_problems: list[str] = []
            untyped: list[str] = []
            for field_id, key, what in _LEVEL_KEYS:
                typed = self.fields.get(field_id, "")
                if not typed.strip():
                    untyped.append(what)
                    continue
                try:
                    levels[key] = inputs.level_dbm(typed, what)
                except InputError as exc:
                    errors[field_id] = str(exc)
                    level_problems.append(str(exc))
            if level_problems or untyped:
                # The budget still shows; only the transceiver check waits for its levels:
                # wrong text is named, levels not typed yet are asked for.
                outcome.tx_problem = (
                    f"Type the four levels to check: {level_problems[0]}"
                    if level_problems
                    else "Type " + ", ".join(untyped) + " to check the transceiver."
                )
            else:
                levels["name"] = "typed levels"
                out["transceiver"] = levels
        elif self.transceiver is not None:
            out["transceiver"] = self.transceiver
        if problems:
            raise InputError(problems[0])
        return out

    def evaluate(self) -> Outcome:
        """The budget of what is typed now, or why there is none yet."""
        outcome = Outcome()
        try:
            settings = self.settings(outcome)
            for index, item in enumerate(self.items, start=1):
                # An item's own field first, numbered as the list numbers it.
                refused = next((e for e in item_errors(item) if e), "")
                if refused:
                    outcome.problem = item_problem(index, item, refused)
                    return outcome
            prompt = missing_entry(self.items)
            if prompt is not None:
                # Not an error yet: say what to type, calmly, and show no result.
                outcome.prompt = prompt
                return outcome
            resolved = linkspec.resolve(spec_from_items(self.items, settings), self.library)
            outcome.report = resolved.evaluate()
            outcome.resolved = resolved
        except (InputError, ValueError, ArithmeticError) as exc:
            outcome.problem = self.explain(str(exc))
        return outcome

    def explain(self, message: str) -> str:
        """A problem of the link description with its place there ("segment 2", "component 1",
        "splices 1", "connectors") as the list's item number and kind."""
        match = re.match(r"(segment|component|splices) (\d+): (.*)", message, re.DOTALL)
        if match:
            kinds = _PLACE_KINDS[match.group(1)]
            places = [i for i, it in enumerate(self.items) if it.kind in kinds]
            n = int(match.group(2))
            if 0 < n <= len(places):
                at = places[n - 1]
                return item_problem(at + 1, self.items[at], match.group(3))
        if message.startswith("connectors: "):
            line = next((i for i, it in enumerate(self.items) if it.kind == "connectors"), None)
            if line is not None:
                rest = message.removeprefix("connectors: ")
                return item_problem(line + 1, self.items[line], rest)
        return message

    def add_title(self) -> str:
        """The title of the dialog asking which kind of item to add, and where."""
        return f"Add an item {f'after item {self.current + 1}' if self.items else 'to the link'}"

    def result_texts(self, outcome: Outcome, width: int | None) -> dict[str, str]:
        """What each result panel shows, by panel id (the breakdown ``width`` columns wide,
        None: no limit), and the summary line under the items; each check says what it
        waits for while it has nothing to show. Empty while there is no budget."""
        report = outcome.report
        if report is None:
            return {}
        app, tx = report.application, report.transceiver
        checks = [] if report.checks is None else lines.check_lines(report.checks)
        return {
            "budget": "\n".join(lines.breakdown_lines(report, width)),
            "summary": lines.summary_text(report),
            "sources": "\n".join(lines.source_lines(report)),
            "application": "\n".join(lines.application_lines(app))
            if app
            else "Pick an application to check.",
            "transceiver": "\n".join(lines.transceiver_lines(tx))
            if tx
            else outcome.tx_problem or "Pick a transceiver to check.",
            "checks": "\n".join(checks) or "No dispersion or bandwidth to check for this link.",
            "fibre-data": "\n".join(self.fibre_data_lines(outcome)),
        }

    def fibre_data_lines(self, outcome: Outcome) -> list[str]:
        """The fibre data of the picked fibre item (else the first) at each wavelength."""
        if outcome.resolved is None or outcome.report is None:
            return []
        fibre_items = [i for i, it in enumerate(self.items) if it.kind == "fibre"]
        index = fibre_items.index(self.current) if self.current in fibre_items else 0
        segments = outcome.resolved.link.segments
        fibre = segments[min(index, len(segments) - 1)].fibre
        return [
            line
            for w in outcome.report.result.wavelengths
            for line in fibre_data_lines(fibre_data(fibre, w.wavelength_nm))
        ]
