"""A written link description resolved against the presets into the
:class:`fieldkit.calc.budget.LinkDescription` the calculation takes.

The written form is a plain dict, the same for a TOML or JSON file, the command line and the
budget workspace, and it is what a job keeps as the budget's ``description``::

    label = "Hut 3 to cabinet 12"
    wavelengths = [1310, 1550]            # optional: the fibre family's defaults otherwise
    margin = "3 dB"                       # design margin (repairs, ageing)
    application = "10GBASE-LR"            # optional
    transceiver = "10GBASE-LR"            # optional: a preset name, or a table of tx_min ... levels

    [[segments]]
    fibre = "OS2"             # a preset, or attenuation = "0.35 dB/km", or per wavelength
    length = "12.4 km"        # attenuation = { 1310 = "0.35 dB/km", 1550 = "0.21 dB/km" }

    [connectors]
    count = 4                             # every mated pair, including the two end connections
    grade = "TIA-568.3-D"                 # or loss = "0.5 dB"

    [[splices]]
    count = 6
    grade = "fusion"                      # or method = "mechanical" and loss = "0.2 dB"

    [[components]]
    splitter = "1x32"                     # or preset = "CWDM mux or demux", or
                                          # kind = "attenuator" / "other" with loss = "5 dB"

Every problem raises :class:`InputError` naming the place ("segment 2: length: ...").
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from fieldkit.calc import budget as b
from fieldkit.calc.fibre import Fibre, lookup
from fieldkit.calc.units import InputError, format_number
from fieldkit.inputs import (
    attenuation_db_per_km,
    bit_rate_gbd,
    item_count,
    length_m,
    level_dbm,
    loss_db,
    spectral_width_nm,
    wavelength_list,
    wavelength_nm,
)
from fieldkit.inputs import splitter as parse_splitter
from fieldkit.presets import ComponentPreset, PresetLibrary

DEFAULT_CONNECTOR_GRADE = "TIA-568.3-D"
DEFAULT_SPLICE_GRADE = "fusion"
#: Without a count, a link has its two end connections (at the patch panels or outlets).
DEFAULT_CONNECTORS = 2

_TOP_KEYS = {
    "label",
    "segments",
    "connectors",
    "splices",
    "components",
    "margin",
    "margin_db",
    "wavelengths",
    "wavelengths_nm",
    "application",
    "transceiver",
    "bit_rate",
    "spectral_width",
    "notes",
    # written by jobs.budget_records.record_description for the meter; ignored on reading
    "connector_count",
    "connector_loss_db",
    "length_m",
}


@dataclass(frozen=True)
class ResolvedBudget:
    """A link description with its presets resolved, ready to compute."""

    link: b.LinkDescription
    application: b.ApplicationLimits | None = None
    transceiver: b.Transceiver | None = None
    spec: dict[str, Any] = field(default_factory=dict)

    bit_rate_gbd: float | None = None
    spectral_width_nm: float | None = None

    def line_rate(self) -> tuple[float | None, tuple[float, ...] | None]:
        """The bit rate the checks beyond loss use, and the wavelengths it applies at: as typed
        (at every wavelength), else the transceiver's (at its wavelength), else the
        application's (at its wavelengths)."""
        if self.bit_rate_gbd is not None:
            return self.bit_rate_gbd, None
        tx, app = self.transceiver, self.application
        if tx is not None and tx.line_rate_gbd is not None:
            return tx.line_rate_gbd, None if tx.wavelength_nm is None else (tx.wavelength_nm,)
        if app is not None and app.line_rate_gbd is not None:
            return app.line_rate_gbd, app.wavelengths_nm
        return None, None

    def evaluate(self) -> b.BudgetReport:
        """The budget, the checks asked for and the checks beyond loss."""
        from fieldkit.calc.checks import check_beyond_loss

        result = b.compute_budget(self.link)
        app = None if self.application is None else b.check_application(result, self.application)
        tx = None if self.transceiver is None else b.check_transceiver(result, self.transceiver)
        rate, rate_wavelengths = self.line_rate()
        checks = check_beyond_loss(
            self.link,
            tuple(w.wavelength_nm for w in result.wavelengths),
            bit_rate_gbd=rate,
            rate_wavelengths_nm=rate_wavelengths,
            spectral_width_nm=self.spectral_width_nm,
            dispersion_tolerance_ps_nm=None
            if self.transceiver is None
            else self.transceiver.dispersion_tolerance_ps_nm,
            tolerance_wavelength_nm=None
            if self.transceiver is None
            else self.transceiver.wavelength_nm,
        )
        return b.BudgetReport(
            result=result,
            application=app,
            transceiver=tx,
            extra={"label": self.link.label},
            checks=checks,
        )


# -- value helpers -----------------------------------------------------------------------------


def _table(value: Any, what: str) -> Mapping[str, Any]:
    if not isinstance(value, Mapping):
        raise InputError(f"{what}: must be a table (object)")
    return value


def _only(table: Mapping[str, Any], allowed: set[str], what: str) -> None:
    unknown = sorted(set(table) - allowed)
    if unknown:
        raise InputError(
            f"{what}: unknown field(s) {', '.join(unknown)} (known: {', '.join(sorted(allowed))})"
        )


def _pick(table: Mapping[str, Any], text_key: str, number_key: str) -> tuple[str, Any] | None:
    if text_key in table and number_key in table:
        raise InputError(f"give '{text_key}' or '{number_key}', not both")
    if text_key in table:
        return text_key, table[text_key]
    if number_key in table:
        return number_key, table[number_key]
    return None


def _loss_field(table: Mapping[str, Any], what: str) -> float | None:
    picked = _pick(table, "loss", "loss_db")
    if picked is None:
        return None
    key, value = picked
    if key == "loss_db" and (isinstance(value, bool) or not isinstance(value, (int, float))):
        raise InputError(f"{what}: loss_db must be a number of dB")
    return loss_db(value, f"{what}: loss")


# -- resolution --------------------------------------------------------------------------------


def resolve(spec: Mapping[str, Any], library: PresetLibrary) -> ResolvedBudget:
    """The resolved link of a written description.

    Raises
    ------
    InputError
        Naming the part of the description and the problem.
    """
    spec = _table(spec, "link")
    _only(spec, _TOP_KEYS, "link")
    raw_segments = spec.get("segments")
    if not isinstance(raw_segments, list) or not raw_segments:
        raise InputError("link: 'segments' must list one or more fibre segments")
    segments = tuple(_segment(raw, library, i) for i, raw in enumerate(raw_segments, start=1))
    connectors = _connectors(spec.get("connectors"), library)
    splices = _splices(spec.get("splices", []), library)
    components = _components(spec.get("components", []), library)
    margin = 0.0
    picked = _pick(spec, "margin", "margin_db")
    if picked is not None:
        margin = loss_db(picked[1], "design margin")
    raw_nm = spec.get("wavelengths", spec.get("wavelengths_nm", []))
    if not isinstance(raw_nm, list):
        raw_nm = [raw_nm]
    wavelengths = tuple(dict.fromkeys(wavelength_list(raw_nm)))
    label = spec.get("label", "")
    if not isinstance(label, str):
        raise InputError("link: 'label' must be text")
    link = b.LinkDescription(
        segments=segments,
        connectors=connectors,
        splices=splices,
        components=components,
        margin_db=margin,
        wavelengths_nm=wavelengths,
        label=label.strip(),
    )
    application = None
    if spec.get("application"):
        application = application_limits(library, spec["application"], link)
    transceiver = None
    if spec.get("transceiver"):
        transceiver = _transceiver(spec["transceiver"], library, link.family)
    if not wavelengths:
        link = _add_check_wavelengths(link, application, transceiver)
    rate = None if spec.get("bit_rate") in (None, "") else bit_rate_gbd(spec["bit_rate"])
    width = (
        None
        if spec.get("spectral_width") in (None, "")
        else spectral_width_nm(spec["spectral_width"])
    )
    return ResolvedBudget(link, application, transceiver, dict(spec), rate, width)


def _segment(raw: Any, library: PresetLibrary, index: int) -> b.Segment:
    what = f"segment {index}"
    table = _table(raw, what)
    _only(table, {"fibre", "fiber", "attenuation", "length", "length_m", "label"}, what)
    picked = _pick(table, "length", "length_m")
    if picked is None:
        raise InputError(f'{what}: no length; give length = "500 m" or "12.4 km"')
    key, value = picked
    if key == "length_m":
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(f"{what}: length_m must be a number of metres")
        metres = length_m(f"{value!r} m", f"{what}: length")
    else:
        metres = length_m(value, f"{what}: length")
    name = table.get("fibre", table.get("fiber"))
    att = table.get("attenuation")
    if name is not None and att is not None:
        raise InputError(f"{what}: give a fibre type or an attenuation, not both")
    label = str(table.get("label", "") or "")
    if name is not None:
        if not isinstance(name, str):
            raise InputError(f"{what}: fibre must be a preset name")
        fibre: Fibre = library.find("fibres", name)
    elif att is not None:
        fibre = custom_fibre(att, f"{what}: attenuation")
    else:
        raise InputError(f"{what}: give a fibre type (e.g. OS2) or an attenuation (0.35 dB/km)")
    return b.Segment(fibre=fibre, length_m=metres, label=label)


def custom_fibre(att: Any, what: str = "attenuation") -> Fibre:
    """A fibre of typed attenuation: one coefficient for every wavelength asked (a wavelength of
    0 stands for "any"), or a table of wavelength = coefficient."""
    if isinstance(att, Mapping):
        table = {
            wavelength_nm(k, f"{what} wavelength"): attenuation_db_per_km(v, what)
            for k, v in att.items()
        }
        if not table:
            raise InputError(f"{what}: the table is empty")
        text = ", ".join(
            f"{format_number(v)} dB/km at {format_number(k)} nm" for k, v in sorted(table.items())
        )
        return Fibre(
            name="typed fibre",
            family=None,
            attenuation_max=table,
            attenuation_typical=table,
            source=f"typed attenuation: {text}",
        )
    coef = attenuation_db_per_km(att, what)
    return _AnyWavelengthFibre(
        name="typed fibre",
        family=None,
        attenuation_max={},
        attenuation_typical={},
        coefficient_db_per_km=coef,
        source=f"typed attenuation {format_number(coef)} dB/km",
    )


@dataclass(frozen=True)
class _AnyWavelengthFibre(Fibre):
    """A typed coefficient the user applies at every wavelength of the budget."""

    coefficient_db_per_km: float = 0.0

    def attenuation_db_per_km(self, wavelength_nm: float, grade: Any = "max") -> float:
        return self.coefficient_db_per_km

    def has_typical(self, wavelength_nm: float) -> bool:
        return True

    def test_wavelengths_nm(self) -> tuple[float, ...]:
        return ()


def _connectors(raw: Any, library: PresetLibrary) -> b.Connections | None:
    if raw is None:
        preset = library.find("connectors", DEFAULT_CONNECTOR_GRADE)
        return b.Connections(
            DEFAULT_CONNECTORS,
            preset.loss_max_db,
            preset.loss_typical_db,
            preset.name,
            f"{preset.name}: {preset.source}",
        )
    what = "connectors"
    table = _table(raw, what)
    _only(table, {"count", "grade", "loss", "loss_db"}, what)
    n = item_count(table.get("count", DEFAULT_CONNECTORS), "mated connector pairs")
    typed = _loss_field(table, what)
    if typed is not None:
        if "grade" in table:
            raise InputError("connectors: give a grade or a loss, not both")
        return b.Connections(n, typed, typed, "typed", f"typed {format_number(typed)} dB per pair")
    grade = table.get("grade", DEFAULT_CONNECTOR_GRADE)
    if not isinstance(grade, str):
        raise InputError("connectors: grade must be a preset name")
    preset = library.find("connectors", grade)
    return b.Connections(
        n,
        preset.loss_max_db,
        preset.loss_typical_db,
        preset.name,
        f"{preset.name}: {preset.source}",
    )


def _splices(raw: Any, library: PresetLibrary) -> tuple[b.Splices, ...]:
    if isinstance(raw, Mapping):
        raw = [raw]
    if not isinstance(raw, list):
        raise InputError("splices: must be a list of tables")
    out = []
    for index, item in enumerate(raw, start=1):
        what = f"splices {index}"
        table = _table(item, what)
        _only(table, {"count", "grade", "method", "loss", "loss_db"}, what)
        n = item_count(table.get("count", 0), f"{what}: count")
        typed = _loss_field(table, what)
        if typed is not None:
            if "grade" in table:
                raise InputError(f"{what}: give a grade or a loss, not both")
            method = table.get("method", "fusion")
            if method not in ("fusion", "mechanical"):
                raise InputError(f"{what}: method must be fusion or mechanical, not {method!r}")
            out.append(
                b.Splices(
                    n, typed, typed, method, "typed", f"typed {format_number(typed)} dB per splice"
                )
            )
            continue
        grade = table.get("grade", table.get("method", DEFAULT_SPLICE_GRADE))
        if not isinstance(grade, str):
            raise InputError(f"{what}: grade must be a preset name")
        preset = library.find("splices", grade)
        out.append(
            b.Splices(
                n,
                preset.loss_max_db,
                preset.loss_typical_db,
                preset.method,
                preset.name,
                f"{preset.name}: {preset.source}",
            )
        )
    return tuple(out)


def splitter_component(
    library: PresetLibrary,
    split: str,
    *,
    preset_name: str | None = None,
    excess: Any = None,
    n: int = 1,
    what: str = "splitter",
) -> b.Component:
    """A splitter from its split ("1x32"), with excess loss from the preset or typed."""
    inputs, outputs = parse_splitter(split, what)
    if excess is not None:
        ex = loss_db(excess, f"{what}: excess loss")
        return b.splitter(
            outputs,
            inputs=inputs,
            excess_max_db=ex,
            excess_typical_db=ex,
            source="typed excess loss",
            count=n,
        )
    name = preset_name or f"{inputs}xN splitter"
    preset: ComponentPreset = library.find("components", name)
    if preset.kind != "splitter":
        raise InputError(f"{what}: preset '{preset.name}' is a {preset.kind}, not a splitter")
    if preset.inputs != inputs:
        raise InputError(f"{what}: preset '{preset.name}' is a {preset.inputs}xN splitter")
    if outputs not in preset.excess_max_db:
        have = ", ".join(f"{inputs}x{k}" for k in sorted(preset.excess_max_db))
        raise InputError(
            f"{what}: preset '{preset.name}' has no excess loss for "
            f"{inputs}x{outputs} (it has {have}); give the excess loss"
        )
    return b.splitter(
        outputs,
        inputs=inputs,
        excess_max_db=preset.excess_max_db[outputs],
        excess_typical_db=preset.excess_typical_db.get(outputs),
        source=f"{preset.name}: {preset.source}",
        count=n,
    )


def _components(raw: Any, library: PresetLibrary) -> tuple[b.Component, ...]:
    if isinstance(raw, Mapping):
        raw = [raw]
    if not isinstance(raw, list):
        raise InputError("components: must be a list of tables")
    out = []
    for index, item in enumerate(raw, start=1):
        what = f"component {index}"
        table = _table(item, what)
        _only(
            table,
            {"splitter", "preset", "kind", "name", "loss", "loss_db", "excess", "count"},
            what,
        )
        n = item_count(table.get("count", 1), f"{what}: count")
        if "splitter" in table:
            out.append(
                splitter_component(
                    library,
                    table["splitter"],
                    preset_name=table.get("preset"),
                    excess=table.get("excess"),
                    n=n,
                    what=what,
                )
            )
            continue
        typed = _loss_field(table, what)
        if "preset" in table and typed is None:
            preset: ComponentPreset = library.find("components", str(table["preset"]))
            if preset.kind == "splitter":
                raise InputError(
                    f"{what}: preset '{preset.name}' is a splitter; give splitter = \"1xN\""
                )
            assert preset.loss_max_db is not None
            out.append(
                b.Component(
                    name=preset.name,
                    kind=preset.kind,
                    loss_max_db=preset.loss_max_db,
                    loss_typical_db=preset.loss_typical_db,
                    loss_min_db=0.0,
                    count=n,
                    source=f"{preset.name}: {preset.source}",
                )
            )
            continue
        kind = table.get("kind", "other")
        if kind not in ("attenuator", "wdm", "filter", "other"):
            raise InputError(
                f"{what}: kind must be attenuator, wdm, filter or other "
                f'(or give splitter = "1xN"), not {kind!r}'
            )
        if typed is None:
            raise InputError(f'{what}: give its loss (e.g. loss = "0.5 dB") or a preset')
        if kind == "attenuator":
            out.append(b.attenuator(typed, count=n))
            continue
        name = str(table.get("name") or table.get("preset") or kind)
        out.append(
            b.Component(
                name=name,
                kind=kind,
                loss_max_db=typed,
                loss_typical_db=typed,
                loss_min_db=0.0,
                count=n,
                source=f"typed {format_number(typed)} dB",
            )
        )
    return tuple(out)


def application_limits(
    library: PresetLibrary, name: Any, link: b.LinkDescription
) -> b.ApplicationLimits:
    """The limits of application ``name`` on the link's fibre types."""
    if not isinstance(name, str):
        raise InputError("application: must be a preset name")
    preset = library.find("applications", name)
    fibres = tuple(
        {s.fibre.name: s.fibre for s in link.segments if s.fibre.family is not None}.values()
    )
    key, limit = preset.limit_for(fibres, link.family)
    names = [f.name for f in fibres]
    rows = {preset.row_key(f.name, link.family) for f in fibres}
    reason = ""
    if len(rows) > 1:
        reason = f"the {key} row, the lowest-grade fibre of {' + '.join(names)}"
    elif len(names) > 1:
        reason = f"the {key} row, which covers {' + '.join(names)}"
    return b.ApplicationLimits(
        name=preset.name,
        fibre=key,
        loss_max_db=limit.loss_max_db,
        reach_m=limit.reach_m,
        wavelengths_nm=preset.wavelengths_nm,
        loss_min_db=limit.loss_min_db,
        source=preset.source,
        line_rate_gbd=preset.line_rate_gbd,
        row_reason=reason,
    )


_TX_FIELDS = ("tx_min_dbm", "tx_max_dbm", "rx_sensitivity_dbm", "rx_overload_dbm")


def transceiver_from_levels(
    tx_min: Any,
    tx_max: Any,
    rx_sensitivity: Any,
    rx_overload: Any,
    name: str = "typed transceiver",
    wavelength: Any = None,
) -> b.Transceiver:
    """A transceiver from four typed levels (dBm)."""
    return b.Transceiver(
        tx_min_dbm=level_dbm(tx_min, "Tx minimum"),
        tx_max_dbm=level_dbm(tx_max, "Tx maximum"),
        rx_sensitivity_dbm=level_dbm(rx_sensitivity, "Rx sensitivity"),
        rx_overload_dbm=level_dbm(rx_overload, "Rx overload"),
        name=name,
        wavelength_nm=None if wavelength is None else wavelength_nm(wavelength),
        source="typed levels",
    )


def transceiver_preset(
    library: PresetLibrary, name: str, family: str | None = None
) -> b.Transceiver:
    """The transceiver preset ``name`` with its levels for the link's fibre ``family`` (the
    launch power of some classes differs between multimode and single-mode fibre)."""
    p = library.find("transceivers", name)
    levels, for_family = p.levels_for(family)
    return b.Transceiver(
        levels.tx_min_dbm,
        levels.tx_max_dbm,
        levels.rx_sensitivity_dbm,
        levels.rx_overload_dbm,
        name=p.name,
        wavelength_nm=p.wavelength_nm,
        source=p.source,
        family=for_family,
        dispersion_tolerance_ps_nm=p.dispersion_tolerance_ps_nm,
        line_rate_gbd=p.line_rate_gbd,
    )


def _transceiver(raw: Any, library: PresetLibrary, family: str | None = None) -> b.Transceiver:
    if isinstance(raw, str):
        return transceiver_preset(library, raw, family)
    table = _table(raw, "transceiver")
    _only(table, {*(_TX_FIELDS), "name", "wavelength"}, "transceiver")
    missing = [k for k in _TX_FIELDS if k not in table]
    if missing:
        raise InputError(f"transceiver: missing {', '.join(missing)}")
    tx_min, tx_max, rx_sens, rx_over = (table[k] for k in _TX_FIELDS)
    return transceiver_from_levels(
        tx_min,
        tx_max,
        rx_sens,
        rx_over,
        name=str(table.get("name", "typed transceiver")),
        wavelength=table.get("wavelength"),
    )


def _add_check_wavelengths(
    link: b.LinkDescription, app: b.ApplicationLimits | None, tx: b.Transceiver | None
) -> b.LinkDescription:
    """Default wavelengths plus those the checks need, snapped to the fibre's own table."""
    wanted: list[float] = list(link.budget_wavelengths_nm())
    needs: list[float] = list(app.wavelengths_nm) if app else []
    if tx is not None and tx.wavelength_nm is not None:
        needs.append(tx.wavelength_nm)
    fibre = link.segments[0].fibre
    for nm in needs:
        if any(abs(nm - have) <= b.WINDOW_MATCH_NM for have in wanted):
            continue
        if lookup(fibre.attenuation_max, nm) is not None:
            wanted.append(nm)
            continue
        near = [w for w in fibre.wavelengths_nm if abs(w - nm) <= b.WINDOW_MATCH_NM]
        wanted.append(min(near, key=lambda w: abs(w - nm)) if near else nm)
    if tuple(wanted) == link.budget_wavelengths_nm():
        return link
    from dataclasses import replace

    return replace(link, wavelengths_nm=tuple(sorted(dict.fromkeys(wanted))))
