"""Link descriptions as people write them (preset names, values with units) turned into the
resolved :class:`fieldkit.calc.budget.LinkDescription` the calculation takes.

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

import json
import math
import re
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from fieldkit.calc import budget as b
from fieldkit.calc.fibre import Fibre, lookup
from fieldkit.calc.units import InputError, Kind, format_number, parse, parse_number
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
    "notes",
    # written by record_description for the meter workspace; ignored on reading
    "connector_count",
    "connector_loss_db",
    "length_m",
}
_SPLITTER = re.compile(r"^\s*([12])\s*[x×X:]\s*(\d+)\s*$")


@dataclass(frozen=True)
class ResolvedBudget:
    """A link description with its presets resolved, ready to compute."""

    link: b.LinkDescription
    application: b.ApplicationLimits | None = None
    transceiver: b.Transceiver | None = None
    spec: dict[str, Any] = field(default_factory=dict)

    def evaluate(self) -> b.BudgetReport:
        """The budget and the checks asked for."""
        result = b.compute_budget(self.link)
        app = None if self.application is None else b.check_application(result, self.application)
        tx = None if self.transceiver is None else b.check_transceiver(result, self.transceiver)
        return b.BudgetReport(
            result=result, application=app, transceiver=tx, extra={"label": self.link.label}
        )


# -- reading a file ----------------------------------------------------------------------------


def load_spec_file(path: Path) -> dict[str, Any]:
    """The link description in a TOML or JSON file (by suffix; other names try both).

    Raises
    ------
    InputError
        For a missing, unreadable or malformed file.
    """
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8-sig")  # an editor's byte-order mark is fine
    except FileNotFoundError:
        raise InputError(f"link file {path}: not found") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"link file {path}: cannot be read ({exc})") from None
    suffix = path.suffix.lower()
    data: Any
    if suffix == ".json" or (suffix != ".toml" and text.lstrip().startswith("{")):
        try:
            data = json.loads(text, parse_constant=_refuse_constant)
        except ValueError as exc:
            raise InputError(f"link file {path}: not valid JSON ({exc})") from None
        except RecursionError:
            raise InputError(f"link file {path}: not valid JSON (nested too deeply)") from None
    else:
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise InputError(f"link file {path}: not valid TOML ({exc})") from None
        except RecursionError:
            raise InputError(f"link file {path}: not valid TOML (nested too deeply)") from None
    if not isinstance(data, dict):
        raise InputError(f"link file {path}: must hold one table (object) describing the link")
    return data


def _refuse_constant(name: str) -> Any:
    raise ValueError(f"{name} is not a number")


# -- value helpers -----------------------------------------------------------------------------


def _text_or_number(value: Any, what: str) -> str:
    if isinstance(value, bool) or value is None:
        raise InputError(f"{what}: {value!r} is not a value")
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise InputError(f"{what}: {value} is not a finite number")
        return repr(value)
    if isinstance(value, str):
        return value
    raise InputError(f"{what}: {value!r} is not a value")


def length_m(value: Any, what: str = "length") -> float:
    """A length typed with its unit ("12.4 km", "3900 ft"), in m; negative refused."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        _text_or_number(value, what)  # NaN and infinity are refused as such
        raise InputError(f"{what}: {format_number(float(value))} needs a unit (m, km, ft, kft, mi)")
    metres = parse(_text_or_number(value, what), Kind.LENGTH, what=what).to("m")
    if metres < 0:
        raise InputError(f"{what}: {format_number(metres)} m is negative")
    if not math.isfinite(metres) or metres > b.MAX_LENGTH_M:
        raise InputError(f"{what}: {value} is longer than any fibre link; check the unit")
    return metres


def loss_db(value: Any, what: str = "loss") -> float:
    """A loss in dB (a bare number is dB); negative refused."""
    db = parse(_text_or_number(value, what), Kind.RATIO, default_unit="dB", what=what).to("dB")
    if db < 0:
        raise InputError(f"{what}: {format_number(db)} dB is negative; a loss is 0 or more")
    if db > b.MAX_LOSS_DB:
        raise InputError(
            f"{what}: {format_number(db)} dB is more than fieldkit accepts "
            f"({format_number(b.MAX_LOSS_DB)} dB); check the unit"
        )
    return db


def attenuation_db_per_km(value: Any, what: str = "attenuation") -> float:
    """An attenuation coefficient with its length unit ("0.35 dB/km", "0.1 dB/kft")."""
    text = _text_or_number(value, what)
    try:
        coef = parse(text, Kind.ATTENUATION, what=what).to("dB/km")
    except InputError as exc:
        if re.fullmatch(r"\s*[-+]?[\d.,]+\s*(dB)?\s*", text, flags=re.IGNORECASE):
            raise InputError(
                f"{what}: '{text.strip()}' has no length unit; type it as dB/km, dB/kft, dB/mi "
                "or dB/m"
            ) from None
        raise exc
    if coef < 0:
        raise InputError(f"{what}: {format_number(coef)} dB/km is negative")
    if coef > 1000:
        raise InputError(
            f"{what}: {format_number(coef)} dB/km is more than any fibre; check the unit"
        )
    return coef


def wavelength_nm(value: Any, what: str = "wavelength") -> float:
    """A wavelength in nm (a bare number is nm)."""
    nm = parse(_text_or_number(value, what), Kind.LENGTH, default_unit="nm", what=what).to("nm")
    if not 200.0 <= nm <= 2000.0:
        raise InputError(
            f"{what}: {format_number(nm)} nm is not an optical wavelength (200–2000 nm)"
        )
    return nm


def wavelength_list(value: Any, what: str = "wavelength") -> list[float]:
    """Wavelengths typed as one value or a list ("1310, 1550", "1310 1550 nm").

    Commas separate wavelengths here: "1310,1550" is two wavelengths, never 1310.155 nm.
    """
    if isinstance(value, (list, tuple)):
        return [nm for v in value for nm in wavelength_list(v, what)]
    if isinstance(value, str):
        parts = [p for p in re.split(r"[,;\s]+(?!nm\b)", value.strip()) if p]
        if not parts:
            raise InputError(f"{what}: empty; type a wavelength in nm, e.g. 1310")
        return [wavelength_nm(p, what) for p in parts]
    return [wavelength_nm(value, what)]


def count(value: Any, what: str) -> int:
    """A whole number of things, 0 or more."""
    if isinstance(value, bool):
        raise InputError(f"{what}: {value!r} is not a number")
    number = value if isinstance(value, int) else parse_number(_text_or_number(value, what), what)
    if isinstance(number, float):
        if not number.is_integer():
            raise InputError(f"{what}: {format_number(number)} is not a whole number")
        number = int(number)
    if number < 0:
        raise InputError(f"{what}: {number} is negative")
    if number > 10_000:
        shown = str(number) if number < 10**12 else f"a {len(str(number))}-digit number"
        raise InputError(f"{what}: {shown} is more than fieldkit will count (10000)")
    return int(number)


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
        transceiver = _transceiver(spec["transceiver"], library)
    if not wavelengths:
        link = _add_check_wavelengths(link, application, transceiver)
    return ResolvedBudget(link, application, transceiver, dict(spec))


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
    n = count(table.get("count", DEFAULT_CONNECTORS), "mated connector pairs")
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
        n = count(table.get("count", 0), f"{what}: count")
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


def parse_splitter(text: Any, what: str = "splitter") -> tuple[int, int]:
    """``"1x32"`` → (1, 32); 1xN and 2xN with N ≥ 2."""
    if not isinstance(text, str):
        raise InputError(f"{what}: write the split as 1xN or 2xN, e.g. 1x32")
    match = _SPLITTER.match(text)
    if not match:
        raise InputError(f"{what}: '{text}' is not 1xN or 2xN (e.g. 1x32)")
    inputs, outputs = int(match.group(1)), int(match.group(2))
    if outputs < 2:
        raise InputError(f"{what}: {text} has fewer than 2 outputs")
    if outputs > 1024:
        raise InputError(f"{what}: {outputs} outputs is more than a passive splitter has")
    return inputs, outputs


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
        n = count(table.get("count", 1), f"{what}: count")
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
    fibre_names = tuple(s.fibre.name for s in link.segments if s.fibre.family is not None)
    key, limit = preset.limit_for(fibre_names, link.family)
    return b.ApplicationLimits(
        name=preset.name,
        fibre=key,
        loss_max_db=limit.loss_max_db,
        reach_m=limit.reach_m,
        wavelengths_nm=preset.wavelengths_nm,
        loss_min_db=limit.loss_min_db,
        source=preset.source,
    )


_TX_FIELDS = ("tx_min_dbm", "tx_max_dbm", "rx_sensitivity_dbm", "rx_overload_dbm")


def level_dbm(value: Any, what: str) -> float:
    """A level typed in dBm or dBW or a linear power; a bare number is dBm."""
    return parse(_text_or_number(value, what), Kind.POWER, default_unit="dBm", what=what).to("dBm")


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


def transceiver_preset(library: PresetLibrary, name: str) -> b.Transceiver:
    p = library.find("transceivers", name)
    return b.Transceiver(
        p.tx_min_dbm,
        p.tx_max_dbm,
        p.rx_sensitivity_dbm,
        p.rx_overload_dbm,
        name=p.name,
        wavelength_nm=p.wavelength_nm,
        source=p.source,
    )


def _transceiver(raw: Any, library: PresetLibrary) -> b.Transceiver:
    if isinstance(raw, str):
        return transceiver_preset(library, raw)
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


# -- what a job keeps, and the text the CLI prints ---------------------------------------------


def record_description(resolved: ResolvedBudget) -> dict[str, Any]:
    """The description a job keeps: the link as written, plus the resolved connector figures
    the meter workspace reads (``connector_count``, ``connector_loss_db`` per mated pair)."""
    description = dict(resolved.spec)
    connectors = resolved.link.connectors
    description["connector_count"] = 0 if connectors is None else connectors.count
    if connectors is not None:
        description["connector_loss_db"] = connectors.loss_max_db
    description["length_m"] = resolved.link.length_m
    return description


def budget_record(resolved: ResolvedBudget, report: b.BudgetReport, by: str = "") -> Any:
    """A :class:`fieldkit.jobs.models.BudgetRecord` of a computed budget."""
    from fieldkit.jobs.models import BudgetItem, BudgetRecord, BudgetWavelength

    rows = [
        BudgetWavelength(
            wavelength_nm=w.wavelength_nm,
            loss_db=w.loss_db,
            typical_loss_db=w.typical_loss_db,
            items=[BudgetItem(name=i.name, loss_db=i.loss_db, source=i.source) for i in w.items],
        )
        for w in report.result.wavelengths
    ]
    return BudgetRecord(
        by=by,
        description=record_description(resolved),
        wavelengths=rows,
        margin_db=report.result.margin_db,
        application=None if report.application is None else report.application.as_dict(),
        transceiver=None if report.transceiver is None else report.transceiver.as_dict(),
    )


def _db(x: float | None) -> str:
    return "—" if x is None else f"{x:.2f} dB".replace("-", "\u2212")


def _pass(flag: bool | None) -> str:
    return "n/a" if flag is None else ("PASS" if flag else "FAIL")


def report_lines(report: b.BudgetReport) -> list[str]:
    """The budget as plain text lines (the CLI's output; the workspace shows the same)."""
    r = report.result
    lines: list[str] = []
    label = report.extra.get("label")
    if label:
        lines.append(str(label))
    length = (
        f"{format_number(r.length_m / 1000.0)} km"
        if r.length_m >= 1000
        else f"{format_number(r.length_m)} m"
    )
    lines.append(f"Fibre length {length}; design margin {_db(r.margin_db)}")
    for w in r.wavelengths:
        lines.append("")
        lines.append(
            f"At {format_number(w.wavelength_nm)} nm: maximum {_db(w.loss_db)}, "
            f"typical {_db(w.typical_loss_db)}, with margin {_db(w.loss_with_margin_db)}"
        )
        for item in w.items:
            typ = "" if item.typical_loss_db is None else f" (typical {_db(item.typical_loss_db)})"
            lines.append(f"  {item.loss_db:7.2f} dB  {item.name}{typ}")
        lines.append(f"  {w.loss_db:7.2f} dB  total")
    for note in r.notes:
        lines.append(f"Note: {note}")
    app = report.application
    if app is not None:
        lines.append("")
        lines.append(f"Application {app.name} on {app.fibre}: {_pass(app.passed)}")
        lines.append(
            f"  loss {_db(app.loss_db)} at {format_number(app.wavelength_nm)} nm, "
            f"limit {_db(app.loss_max_db)}, headroom {_db(app.loss_headroom_db)}: "
            f"{_pass(app.loss_pass)}"
        )
        lines.append(f"  after the design margin headroom {_db(app.margin_headroom_db)}")
        lines.append(
            f"  length {format_number(app.length_m)} m, reach "
            f"{format_number(app.reach_m)} m, headroom "
            f"{format_number(app.length_headroom_m)} m: {_pass(app.length_pass)}"
        )
        if app.loss_min_db is not None:
            lines.append(
                f"  lowest plausible loss {_db(app.link_loss_min_db)}, class minimum "
                f"{_db(app.loss_min_db)}: {_pass(app.min_pass)}"
            )
    tx = report.transceiver
    if tx is not None:
        lines.append("")
        where = "" if tx.wavelength_nm is None else f" at {format_number(tx.wavelength_nm)} nm"
        lines.append(f"Transceiver {tx.name}{where}: {_pass(tx.passed)}")
        lines.append(
            f"  power budget {_db(tx.power_budget_db)}; margin after the maximum loss "
            f"{_db(tx.margin_db)} (needs {_db(tx.required_margin_db)}): "
            f"{_pass(tx.margin_pass)}"
        )
        if tx.overload:
            if tx.attenuator_fits and tx.attenuator_db is not None:
                lines.append(
                    f"  receiver overload: add an attenuator of "
                    f"{_db(tx.attenuator_db)} (fits from {_db(tx.attenuator_min_db)} "
                    f"to {_db(tx.attenuator_max_db)})"
                )
            else:
                lines.append(
                    f"  receiver overload: needs at least {_db(tx.attenuator_min_db)}, "
                    f"but more than {_db(tx.attenuator_max_db)} loses the margin; "
                    "no attenuator fits"
                )
        else:
            lines.append("  no attenuator needed")
    return lines
