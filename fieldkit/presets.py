"""Shipped and user presets: fibre types, connections, splices, components, applications,
transceivers and cable constructions, each value with the standard it comes from.

Preset files are TOML. Each file holds arrays of tables named after the kind, so one file may hold
several kinds::

    [[fibres]]
    name = "OM3"
    family = "multimode"
    attenuation_max_db_per_km = { 850 = 3.0, 1300 = 1.5 }
    source = "ANSI/TIA-568.3-D (2016) Table 1 (from memory)"

The shipped files live in the top-level ``presets/`` folder (in a wheel, ``fieldkit/_presets``).
Files in ``<config>/presets/*.toml`` extend them; an entry with the name of a shipped one replaces
it. A bad file or entry adds one message to :attr:`PresetLibrary.problems`, naming the file, the
entry and the problem, and everything else still loads.
"""

from __future__ import annotations

import math
import tomllib
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

from fieldkit.calc.fibre import Fibre, check_wavelength_nm, rayleigh_scaled_db_per_km
from fieldkit.calc.units import InputError, format_number, parse_number

KINDS: tuple[str, ...] = (
    "fibres",
    "connectors",
    "splices",
    "components",
    "applications",
    "transceivers",
    "cables",
    "colour_sequences",
    "splice_plans",
    "reflectance",
)

COMPONENT_KINDS = ("splitter", "wdm", "filter", "attenuator", "other")
SPLICE_METHODS = ("fusion", "mechanical")


@dataclass(frozen=True)
class FibrePreset(Fibre):
    """A fibre type from a preset file (see :class:`fieldkit.calc.fibre.Fibre`)."""

    origin: str = ""


@dataclass(frozen=True)
class ConnectorPreset:
    """A mated connector pair grade: loss per mated pair in dB."""

    name: str
    loss_max_db: float
    loss_typical_db: float | None
    source: str
    origin: str = ""


@dataclass(frozen=True)
class SplicePreset:
    """A splice grade: loss per splice in dB, by method (fusion or mechanical)."""

    name: str
    method: str
    loss_max_db: float
    loss_typical_db: float | None
    source: str
    origin: str = ""


@dataclass(frozen=True)
class ComponentPreset:
    """A passive component. Splitters hold their excess loss by output count (over 10·log10 N);
    other kinds hold their insertion loss."""

    name: str
    kind: str
    loss_max_db: float | None
    loss_typical_db: float | None
    excess_max_db: Mapping[int, float]
    excess_typical_db: Mapping[int, float]
    inputs: int
    source: str
    origin: str = ""


@dataclass(frozen=True)
class ApplicationFibreLimit:
    """An application's limits on one fibre type: maximum channel insertion loss and reach."""

    loss_max_db: float
    reach_m: float
    loss_min_db: float | None = None


@dataclass(frozen=True)
class ApplicationPreset:
    """An application (Ethernet PHY, PON class) with its limits per fibre type or family."""

    name: str
    kind: str
    wavelengths_nm: tuple[float, ...]
    limits: Mapping[str, ApplicationFibreLimit]
    source: str
    origin: str = ""

    line_rate_gbd: float | None = None

    def row_key(self, fibre_name: str, family: str | None) -> str | None:
        """The key of the row for one fibre: by its name, else by its family, else None."""
        keys = {k.lower(): k for k in self.limits}
        return keys.get(fibre_name.lower()) or (keys.get(family.lower()) if family else None)

    def has_row_for(self, fibre_names: tuple[str, ...], family: str | None) -> bool:
        """True when every fibre of a link has a row (by name or by family)."""
        return all(self.row_key(name, family) is not None for name in fibre_names or ("",))

    def limit_for(
        self, fibres: Sequence[Fibre] | tuple[str, ...], family: str | None
    ) -> tuple[str, ApplicationFibreLimit]:
        """The row a link is judged on: the row of the lowest-grade fibre present.

        Each fibre is looked up by name, then by family ("singlemode", "multimode"). A link that
        mixes fibre types is judged on one row of the standard, never on a mix of rows (the
        smallest loss of one and the shortest reach of another belongs to no row). The lowest
        grade is the fibre with the lowest modal bandwidth at the application's first wavelength
        when every multimode fibre present has one; otherwise the row with the shortest reach
        (reach falls with the grade in every application table), then the lowest loss.

        Raises
        ------
        InputError
            When the application has no row for a fibre of the link.
        """
        found: list[tuple[str, ApplicationFibreLimit, float | None]] = []
        items: list[tuple[str, Fibre | None]] = [
            (f, None) if isinstance(f, str) else (f.name, f) for f in fibres
        ] or [("", None)]
        nm = self.wavelengths_nm[0]
        for name, fibre in items:
            key = self.row_key(name, family)
            if key is None and len(self.limits) == 1 and not name:
                key = next(iter(self.limits))
            if key is None:
                have = ", ".join(self.limits)
                what = name or "of unknown type"
                hint = ""
                if fibre is not None and fibre.below_cutoff(nm):
                    hint = (
                        f"; {fibre.name} is single-mode and {format_number(nm)} nm is below its "
                        "cable cut-off, where it carries a few modes: a multimode application "
                        "does not run on it"
                    )
                raise InputError(
                    f"application {self.name}: no limits for fibre {what} "
                    f"(it has limits for {have}){hint}"
                )
            bandwidth = None if fibre is None else fibre.modal_bandwidth(nm)
            found.append((key, self.limits[key], bandwidth))
        if len(found) > 1 and all(bw is not None for _, _, bw in found):
            key, limit, _ = min(found, key=lambda f: (f[2], f[1].reach_m, f[1].loss_max_db))
        else:
            key, limit, _ = min(found, key=lambda f: (f[1].reach_m, f[1].loss_max_db))
        return key, limit


@dataclass(frozen=True)
class TransceiverLevels:
    """Transmitter launch power and receiver range in dBm (average power)."""

    tx_min_dbm: float
    tx_max_dbm: float
    rx_sensitivity_dbm: float
    rx_overload_dbm: float


@dataclass(frozen=True)
class TransceiverPreset:
    """A transceiver class: transmitter launch power and receiver range, in dBm."""

    name: str
    wavelength_nm: float | None
    tx_min_dbm: float
    tx_max_dbm: float
    rx_sensitivity_dbm: float
    rx_overload_dbm: float
    source: str
    origin: str = ""
    by_family: Mapping[str, TransceiverLevels] = field(default_factory=dict)
    dispersion_tolerance_ps_nm: float | None = None
    line_rate_gbd: float | None = None

    def levels_for(self, family: str | None) -> tuple[TransceiverLevels, str | None]:
        """The levels on a fibre family, and the family they are for (None: the default
        levels). A transceiver whose launch power differs by fibre family (1000BASE-LX into
        multimode or single-mode fibre) holds the other family's levels in ``by_family``."""
        if family is not None and family in self.by_family:
            return self.by_family[family], family
        return (
            TransceiverLevels(
                self.tx_min_dbm, self.tx_max_dbm, self.rx_sensitivity_dbm, self.rx_overload_dbm
            ),
            None,
        )


@dataclass(frozen=True)
class CablePreset:
    """A cable construction: how much longer the fibre is than the sheath (helix / excess
    fibre length), in percent of the sheath length, with its uncertainty."""

    name: str
    construction: str
    helix_percent: float
    helix_uncertainty_percent: float
    source: str
    origin: str = ""


@dataclass(frozen=True)
class ColourSequencePreset:
    """A fibre and tube colour code: the colours of positions 1..n in order, and the tracer
    marked on repeats (see :class:`fieldkit.calc.splicing.ColourSequence`)."""

    name: str
    colours: tuple[str, ...]
    tracer_colour: str
    tracer_on_tracer: str
    source: str
    origin: str = ""


@dataclass(frozen=True)
class SplicePlanPreset:
    """A splice plan as text (``straight``; ``1-12 > 25-36``; ``drop 13-24 > D``;
    ``park 25-36``), read by :func:`fieldkit.inputs.splice_plan`."""

    name: str
    plan: str
    source: str
    origin: str = ""


@dataclass(frozen=True)
class ReflectancePreset:
    """A single-mode reflectance limit: the highest discrete reflectance allowed for one event
    (dB, negative), and the lowest optical return loss of the whole path (dB, positive) where
    the standard sets one. For OTDR trace analysis and acceptance."""

    name: str
    reflectance_max_db: float
    orl_min_db: float | None
    source: str
    origin: str = ""


@dataclass
class PresetLibrary:
    """Every loaded preset, by kind and name, and the problems met while loading."""

    fibres: dict[str, FibrePreset] = field(default_factory=dict)
    connectors: dict[str, ConnectorPreset] = field(default_factory=dict)
    splices: dict[str, SplicePreset] = field(default_factory=dict)
    components: dict[str, ComponentPreset] = field(default_factory=dict)
    applications: dict[str, ApplicationPreset] = field(default_factory=dict)
    transceivers: dict[str, TransceiverPreset] = field(default_factory=dict)
    cables: dict[str, CablePreset] = field(default_factory=dict)
    colour_sequences: dict[str, ColourSequencePreset] = field(default_factory=dict)
    splice_plans: dict[str, SplicePlanPreset] = field(default_factory=dict)
    reflectance: dict[str, ReflectancePreset] = field(default_factory=dict)
    problems: list[str] = field(default_factory=list)

    def of_kind(self, kind: str) -> dict[str, Any]:
        if kind not in KINDS:
            raise InputError(f"unknown preset kind '{kind}' (kinds: {', '.join(KINDS)})")
        table: dict[str, Any] = getattr(self, kind)
        return table

    def find(self, kind: str, name: str) -> Any:
        """The preset of ``kind`` called ``name`` (case and spacing forgiven).

        Raises
        ------
        InputError
            Naming the unknown preset and the ones that exist.
        """
        table = self.of_kind(kind)
        if name in table:
            return table[name]
        wanted = _fold(name)
        for key, value in table.items():
            if _fold(key) == wanted:
                return value
        singular = {
            "fibres": "fibre",
            "colour_sequences": "colour sequence",
            "reflectance": "reflectance limit",
        }.get(kind, kind[:-1].replace("_", " "))
        have = ", ".join(table) or "none"
        raise InputError(f"unknown {singular} '{name}' (known: {have})")

    def applications_by_fit(
        self, fibre_names: tuple[str, ...], family: str | None
    ) -> tuple[list[str], list[str]]:
        """Application names with a row for every fibre of the link first, then the others
        (which need an explicit choice: their check says which fibre has no row)."""
        fits: list[str] = []
        others: list[str] = []
        for name, app in self.applications.items():
            known = bool(fibre_names) or family is not None
            (fits if known and app.has_row_for(fibre_names, family) else others).append(name)
        return fits, others


def _fold(name: str) -> str:
    return "".join(ch for ch in name.lower() if ch.isalnum() or ch == "+")


# -- locating and caching ----------------------------------------------------------------------


def shipped_dir() -> Path:
    """The folder of shipped presets: ``fieldkit/_presets`` in a wheel, else ``presets/`` beside
    the package (editable install)."""
    package = Path(__file__).resolve().parent
    bundled = package / "_presets"
    if bundled.is_dir():
        return bundled
    return package.parent / "presets"


def user_dir(config_dir: Path) -> Path:
    from fieldkit.locations import user_presets_dir

    return user_presets_dir(config_dir)


def _fingerprint(folder: Path) -> tuple[tuple[str, int, int], ...]:
    try:
        files = sorted(folder.glob("*.toml"))
    except OSError:
        return ()
    out = []
    for path in files:
        try:
            st = path.stat()
        except OSError:
            continue
        out.append((path.name, st.st_mtime_ns, st.st_size))
    return tuple(out)


def load_presets(config_dir: Path | None = None) -> PresetLibrary:
    """The shipped presets, extended and overridden by the user's in ``<config_dir>/presets``.

    Cached per config folder; a changed, added or removed preset file is read again on the next
    call. Never raises for a bad file: see :attr:`PresetLibrary.problems`.
    """
    shipped = shipped_dir()
    user = user_dir(Path(config_dir)) if config_dir is not None else None
    key = (
        str(shipped),
        _fingerprint(shipped),
        str(user) if user else "",
        _fingerprint(user) if user else (),
    )
    return _load_cached(key)


@lru_cache(maxsize=16)
def _load_cached(key: tuple[Any, ...]) -> PresetLibrary:
    shipped, _, user, _ = key
    library = PresetLibrary()
    shipped_path = Path(shipped)
    for path in sorted(shipped_path.glob("*.toml")):
        _load_file(library, path, f"presets/{path.name}")
    if not library.fibres and not library.problems:
        library.problems.append(f"{shipped_path}: no shipped preset files found")
    if user:
        user_path = Path(user)
        if user_path.is_dir():
            for path in sorted(user_path.glob("*.toml")):
                _load_file(library, path, str(path))
    return library


def load_file(path: Path) -> PresetLibrary:
    """The presets of one file only (for checking a file before copying it into place)."""
    library = PresetLibrary()
    _load_file(library, Path(path), str(path))
    return library


# -- parsing and validation --------------------------------------------------------------------


class _EntryError(Exception):
    pass


def _load_file(library: PresetLibrary, path: Path, label: str) -> None:
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8-sig"))  # an editor's BOM is fine
    except OSError as exc:
        library.problems.append(f"{label}: cannot be read ({exc.strerror or exc})")
        return
    except UnicodeDecodeError:
        library.problems.append(f"{label}: is not UTF-8 text")
        return
    except tomllib.TOMLDecodeError as exc:
        library.problems.append(f"{label}: is not valid TOML ({exc})")
        return
    except RecursionError:
        library.problems.append(f"{label}: is not valid TOML (nested too deeply)")
        return
    for kind, entries in data.items():
        if kind not in _PARSERS:
            library.problems.append(
                f"{label}: unknown section '{kind}' (sections: {', '.join(KINDS)})"
            )
            continue
        if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
            library.problems.append(f"{label}: '{kind}' must be an array of tables ([[{kind}]])")
            continue
        parser, allowed = _PARSERS[kind]
        table = library.of_kind(kind)
        for index, entry in enumerate(entries, start=1):
            name = entry.get("name")
            entry_label = f"'{name}'" if isinstance(name, str) and name.strip() else f"#{index}"
            try:
                if not isinstance(name, str) or not name.strip():
                    raise _EntryError("'name' is missing or not text")
                unknown = sorted(set(entry) - allowed)
                if unknown:
                    raise _EntryError(f"unknown field(s) {', '.join(unknown)}")
                preset = parser(entry, label)
            except _EntryError as exc:
                library.problems.append(f"{label}: {kind} entry {entry_label}: {exc}")
                continue
            table[preset.name] = preset


def _text(entry: Mapping[str, Any], key: str, *, required: bool = True, default: str = "") -> str:
    value = entry.get(key)
    if value is None:
        if required:
            raise _EntryError(f"'{key}' is missing")
        return default
    if not isinstance(value, str) or (required and not value.strip()):
        raise _EntryError(f"'{key}' must be text")
    return value.strip()


def _number(value: Any, key: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise _EntryError(f"'{key}' must be a number, not {value!r}")
    number = float(value)
    if not math.isfinite(number):
        raise _EntryError(f"'{key}' must be a finite number, not {value!r}")
    return number


def _num(
    entry: Mapping[str, Any],
    key: str,
    *,
    required: bool = True,
    low: float | None = None,
    high: float | None = None,
    positive: bool = False,
) -> float | None:
    if key not in entry:
        if required:
            raise _EntryError(f"'{key}' is missing")
        return None
    number = _number(entry[key], key)
    if positive and number <= 0:
        raise _EntryError(f"'{key}' must be above zero, not {number:g}")
    if low is not None and number < low:
        raise _EntryError(f"'{key}' must be at least {low:g}, not {number:g}")
    if high is not None and number > high:
        raise _EntryError(f"'{key}' must be at most {high:g}, not {number:g}")
    return number


def _req(entry: Mapping[str, Any], key: str, **kw: Any) -> float:
    value = _num(entry, key, required=True, **kw)
    assert value is not None
    return value


def _wavelength_key(key: str, table: str) -> float:
    try:
        nm = parse_number(str(key), what=table)
    except InputError as exc:
        raise _EntryError(f"'{table}': key '{key}' is not a wavelength in nm") from exc
    try:
        return check_wavelength_nm(nm, f"'{table}'")
    except InputError as exc:
        raise _EntryError(str(exc)) from None


def _by_wavelength(
    entry: Mapping[str, Any], key: str, *, low: float, high: float, required: bool = False
) -> dict[float, float]:
    raw = entry.get(key)
    if raw is None:
        if required:
            raise _EntryError(f"'{key}' is missing")
        return {}
    if not isinstance(raw, dict) or (required and not raw):
        raise _EntryError(f"'{key}' must be a table of wavelength = value, e.g. {{ 1310 = 0.4 }}")
    out: dict[float, float] = {}
    for k, v in raw.items():
        nm = _wavelength_key(k, key)
        value = _number(v, f"{key}.{k}")
        if not low <= value <= high:
            raise _EntryError(f"'{key}' at {nm:g} nm: {value:g} is outside {low:g}–{high:g}")
        out[nm] = value
    return out


def _by_ports(entry: Mapping[str, Any], key: str) -> dict[int, float]:
    raw = entry.get(key)
    if raw is None:
        return {}
    if not isinstance(raw, dict):
        raise _EntryError(f"'{key}' must be a table of output count = dB, e.g. {{ 32 = 2.0 }}")
    out: dict[int, float] = {}
    for k, v in raw.items():
        try:
            n = int(str(k))
        except ValueError as exc:
            raise _EntryError(f"'{key}': key '{k}' is not an output count") from exc
        if n < 2:
            raise _EntryError(f"'{key}': a splitter has at least 2 outputs, not {n}")
        value = _number(v, f"{key}.{k}")
        if not 0 <= value <= 10:
            raise _EntryError(f"'{key}' for {n} outputs: {value:g} dB is outside 0–10 dB")
        out[n] = value
    return out


def _fibre(entry: Mapping[str, Any], origin: str) -> FibrePreset:
    family = _text(entry, "family")
    if family not in ("multimode", "singlemode"):
        raise _EntryError(f"'family' must be multimode or singlemode, not '{family}'")
    att_max = _by_wavelength(entry, "attenuation_max_db_per_km", low=0.0, high=20.0, required=True)
    att_typ = _by_wavelength(entry, "attenuation_typical_db_per_km", low=0.0, high=20.0)
    for nm, typ in att_typ.items():
        if nm in att_max and typ > att_max[nm]:
            raise _EntryError(
                f"typical attenuation {typ:g} dB/km at {nm:g} nm is above the maximum "
                f"{att_max[nm]:g} dB/km"
            )
    group = _by_wavelength(entry, "group_index", low=1.0, high=2.0)
    mfd = _by_wavelength(entry, "mode_field_diameter_um", low=1.0, high=20.0)
    core = _num(entry, "core_diameter_um", required=False, positive=True, high=1000.0)
    na = _num(entry, "numerical_aperture", required=False, positive=True, high=1.0)
    if family == "multimode" and (core is None or na is None):
        raise _EntryError("a multimode fibre needs 'core_diameter_um' and 'numerical_aperture'")
    raw_defaults = entry.get("default_wavelengths_nm", [])
    if not isinstance(raw_defaults, list):
        raise _EntryError("'default_wavelengths_nm' must be a list of wavelengths")
    defaults = tuple(_number(x, "default_wavelengths_nm") for x in raw_defaults)
    for nm in defaults:
        if not any(abs(nm - have) <= 0.5 for have in att_max):
            raise _EntryError(f"default wavelength {nm:g} nm has no maximum attenuation")
    bandwidth = _by_wavelength(entry, "modal_bandwidth_mhz_km", low=1.0, high=1e6)
    if bandwidth and family != "multimode":
        raise _EntryError("'modal_bandwidth_mhz_km' is for multimode fibre")
    cutoff = _num(entry, "cable_cutoff_nm", required=False, low=200.0, high=2000.0)
    slope = _num(entry, "dispersion_slope_ps_nm2_km", required=False, positive=True, high=1.0)
    raw_zero = entry.get("zero_dispersion_nm")
    zero: tuple[float, float] | None = None
    if raw_zero is not None:
        if not isinstance(raw_zero, list) or len(raw_zero) != 2:
            raise _EntryError("'zero_dispersion_nm' must be [lowest, highest] in nm")
        lo, hi = (_number(x, "zero_dispersion_nm") for x in raw_zero)
        if not 200.0 <= lo <= hi <= 2000.0:
            raise _EntryError("'zero_dispersion_nm' must be [lowest, highest], 200–2000 nm")
        zero = (lo, hi)
    if (zero is None) != (slope is None):
        raise _EntryError("give 'zero_dispersion_nm' and 'dispersion_slope_ps_nm2_km' together")
    estimated = _estimated(entry, att_max, att_typ)
    return FibrePreset(
        name=_text(entry, "name"),
        family=family,  # type: ignore[arg-type]
        attenuation_max=att_max,
        attenuation_typical=att_typ,
        group_indices=group,
        core_diameter_um=core,
        numerical_aperture=na,
        mfd_um=mfd,
        source=_text(entry, "source"),
        standard=_text(entry, "standard", required=False),
        default_wavelengths_nm=defaults,
        modal_bandwidth_mhz_km=bandwidth,
        cable_cutoff_nm=cutoff,
        zero_dispersion_nm=zero,
        dispersion_slope_ps_nm2_km=slope,
        estimated_nm=estimated,
        origin=origin,
    )


def _estimated(
    entry: Mapping[str, Any], att_max: dict[float, float], att_typ: dict[float, float]
) -> tuple[float, ...]:
    """Wavelengths listed in ``attenuation_estimated_nm``: each gets a maximum scaled from the
    nearest tabulated one as Rayleigh scattering scales (and a typical value likewise, unless one
    is given). The tables are filled in place."""
    raw = entry.get("attenuation_estimated_nm", [])
    if not isinstance(raw, list):
        raise _EntryError("'attenuation_estimated_nm' must be a list of wavelengths")
    out: list[float] = []
    for x in raw:
        nm = _number(x, "attenuation_estimated_nm")
        if not 200 <= nm <= 2000:
            raise _EntryError(f"'attenuation_estimated_nm': {nm:g} nm is not an optical wavelength")
        if any(abs(nm - have) <= 0.5 for have in att_max):
            raise _EntryError(
                f"'attenuation_estimated_nm': {nm:g} nm already has a maximum attenuation"
            )
        if not att_max:
            raise _EntryError("'attenuation_estimated_nm' needs a tabulated maximum to scale")
        base = min(att_max, key=lambda have: abs(have - nm))
        att_max[nm] = rayleigh_scaled_db_per_km(att_max[base], base, nm)
        if nm not in att_typ and base in att_typ:
            att_typ[nm] = rayleigh_scaled_db_per_km(att_typ[base], base, nm)
        out.append(nm)
    return tuple(out)


def _typical_not_above(max_db: float | None, typ_db: float | None) -> None:
    if max_db is not None and typ_db is not None and typ_db > max_db:
        raise _EntryError(f"typical loss {typ_db:g} dB is above the maximum {max_db:g} dB")


def _connector(entry: Mapping[str, Any], origin: str) -> ConnectorPreset:
    loss_max = _req(entry, "loss_max_db", low=0.0, high=10.0)
    loss_typ = _num(entry, "loss_typical_db", required=False, low=0.0, high=10.0)
    _typical_not_above(loss_max, loss_typ)
    return ConnectorPreset(_text(entry, "name"), loss_max, loss_typ, _text(entry, "source"), origin)


def _splice(entry: Mapping[str, Any], origin: str) -> SplicePreset:
    method = _text(entry, "method")
    if method not in SPLICE_METHODS:
        raise _EntryError(f"'method' must be fusion or mechanical, not '{method}'")
    loss_max = _req(entry, "loss_max_db", low=0.0, high=5.0)
    loss_typ = _num(entry, "loss_typical_db", required=False, low=0.0, high=5.0)
    _typical_not_above(loss_max, loss_typ)
    return SplicePreset(
        _text(entry, "name"), method, loss_max, loss_typ, _text(entry, "source"), origin
    )


def _component(entry: Mapping[str, Any], origin: str) -> ComponentPreset:
    kind = _text(entry, "kind")
    if kind not in COMPONENT_KINDS:
        raise _EntryError(f"'kind' must be one of {', '.join(COMPONENT_KINDS)}, not '{kind}'")
    loss_max = _num(entry, "loss_max_db", required=False, low=0.0, high=60.0)
    loss_typ = _num(entry, "loss_typical_db", required=False, low=0.0, high=60.0)
    _typical_not_above(loss_max, loss_typ)
    excess_max = _by_ports(entry, "excess_max_db")
    excess_typ = _by_ports(entry, "excess_typical_db")
    for n, typ in excess_typ.items():
        if n in excess_max and typ > excess_max[n]:
            raise _EntryError(f"typical excess {typ:g} dB for {n} outputs is above the maximum")
    inputs = int(_num(entry, "inputs", required=False, low=1, high=2) or 1)
    if kind == "splitter":
        if not excess_max:
            raise _EntryError("a splitter needs 'excess_max_db' by output count")
    elif loss_max is None:
        raise _EntryError("'loss_max_db' is missing")
    return ComponentPreset(
        _text(entry, "name"),
        kind,
        loss_max,
        loss_typ,
        excess_max,
        excess_typ,
        inputs,
        _text(entry, "source"),
        origin,
    )


def _application(entry: Mapping[str, Any], origin: str) -> ApplicationPreset:
    raw_nm = entry.get("wavelengths_nm")
    if not isinstance(raw_nm, list) or not raw_nm:
        raise _EntryError("'wavelengths_nm' must be a list of one or more wavelengths")
    wavelengths = tuple(_number(x, "wavelengths_nm") for x in raw_nm)
    raw_limits = entry.get("limits")
    if not isinstance(raw_limits, dict) or not raw_limits:
        raise _EntryError("'limits' must be a table of fibre type = { loss_max_db, reach_m }")
    limits: dict[str, ApplicationFibreLimit] = {}
    for fibre, raw in raw_limits.items():
        if not isinstance(raw, dict):
            raise _EntryError(f"limits for '{fibre}' must be a table {{ loss_max_db, reach_m }}")
        unknown = sorted(set(raw) - {"loss_max_db", "reach_m", "loss_min_db"})
        if unknown:
            raise _EntryError(f"limits for '{fibre}': unknown field(s) {', '.join(unknown)}")
        try:
            loss_max = _req(raw, "loss_max_db", low=0.0, high=60.0)
            reach = _req(raw, "reach_m", positive=True, high=1e6)
            loss_min = _num(raw, "loss_min_db", required=False, low=0.0, high=60.0)
        except _EntryError as exc:
            raise _EntryError(f"limits for '{fibre}': {exc}") from None
        if loss_min is not None and loss_min > loss_max:
            raise _EntryError(f"limits for '{fibre}': loss_min_db is above loss_max_db")
        limits[fibre] = ApplicationFibreLimit(loss_max, reach, loss_min)
    return ApplicationPreset(
        _text(entry, "name"),
        _text(entry, "kind", required=False, default="application"),
        wavelengths,
        limits,
        _text(entry, "source"),
        origin,
        line_rate_gbd=_num(entry, "line_rate_gbd", required=False, positive=True, high=1e4),
    )


def _levels(entry: Mapping[str, Any], base: TransceiverLevels | None = None) -> TransceiverLevels:
    def get(key: str, low: float, fallback: float | None) -> float:
        if key not in entry and fallback is not None:
            return fallback
        return _req(entry, key, low=low, high=30.0)

    levels = TransceiverLevels(
        get("tx_min_dbm", -60.0, None if base is None else base.tx_min_dbm),
        get("tx_max_dbm", -60.0, None if base is None else base.tx_max_dbm),
        get("rx_sensitivity_dbm", -80.0, None if base is None else base.rx_sensitivity_dbm),
        get("rx_overload_dbm", -80.0, None if base is None else base.rx_overload_dbm),
    )
    if levels.tx_min_dbm > levels.tx_max_dbm:
        raise _EntryError("'tx_min_dbm' is above 'tx_max_dbm'")
    if levels.rx_sensitivity_dbm >= levels.rx_overload_dbm:
        raise _EntryError("'rx_sensitivity_dbm' must be below 'rx_overload_dbm'")
    return levels


def _transceiver(entry: Mapping[str, Any], origin: str) -> TransceiverPreset:
    levels = _levels(entry)
    wavelength = _num(entry, "wavelength_nm", required=False, low=200.0, high=2000.0)
    raw_family = entry.get("by_family", {})
    if not isinstance(raw_family, dict):
        raise _EntryError("'by_family' must be a table of family = { tx_min_dbm, ... }")
    by_family: dict[str, TransceiverLevels] = {}
    for family, raw in raw_family.items():
        if family not in ("multimode", "singlemode") or not isinstance(raw, dict):
            raise _EntryError(
                f"'by_family': '{family}' must be multimode or singlemode with a table of levels"
            )
        unknown = sorted(set(raw) - set(_TX_LEVELS))
        if unknown:
            raise _EntryError(f"'by_family.{family}': unknown field(s) {', '.join(unknown)}")
        try:
            by_family[family] = _levels(raw, levels)
        except _EntryError as exc:
            raise _EntryError(f"'by_family.{family}': {exc}") from None
    return TransceiverPreset(
        _text(entry, "name"),
        wavelength,
        levels.tx_min_dbm,
        levels.tx_max_dbm,
        levels.rx_sensitivity_dbm,
        levels.rx_overload_dbm,
        _text(entry, "source"),
        origin,
        by_family=by_family,
        dispersion_tolerance_ps_nm=_num(
            entry, "dispersion_tolerance_ps_nm", required=False, positive=True, high=1e6
        ),
        line_rate_gbd=_num(entry, "line_rate_gbd", required=False, positive=True, high=1e4),
    )


_TX_LEVELS = ("tx_min_dbm", "tx_max_dbm", "rx_sensitivity_dbm", "rx_overload_dbm")


def _cable(entry: Mapping[str, Any], origin: str) -> CablePreset:
    return CablePreset(
        name=_text(entry, "name"),
        construction=_text(entry, "construction"),
        helix_percent=_req(entry, "helix_percent", low=0.0, high=20.0),
        helix_uncertainty_percent=_req(entry, "helix_uncertainty_percent", low=0.0, high=20.0),
        source=_text(entry, "source"),
        origin=origin,
    )


def _colour_sequence(entry: Mapping[str, Any], origin: str) -> ColourSequencePreset:
    colours = entry.get("colours")
    if (
        not isinstance(colours, list)
        or not 2 <= len(colours) <= 48
        or not all(isinstance(c, str) and c.strip() for c in colours)
    ):
        raise _EntryError("'colours' must be a list of 2 to 48 colour words")
    words = tuple(c.strip().lower() for c in colours)
    if len(set(words)) != len(words):
        raise _EntryError("'colours' names a colour twice")
    return ColourSequencePreset(
        _text(entry, "name"),
        words,
        _text(entry, "tracer_colour", required=False, default="black").lower(),
        _text(entry, "tracer_on_tracer", required=False, default="yellow").lower(),
        _text(entry, "source"),
        origin,
    )


def _splice_plan(entry: Mapping[str, Any], origin: str) -> SplicePlanPreset:
    from fieldkit.inputs import splice_plan

    plan = _text(entry, "plan")
    try:
        # Checked with placeholder cables; "straight" takes the count when applied.
        splice_plan(plan, "A", "B", count_a=1, what="plan")
    except InputError as exc:
        raise _EntryError(str(exc)) from None
    return SplicePlanPreset(_text(entry, "name"), plan, _text(entry, "source"), origin)


def _reflectance(entry: Mapping[str, Any], origin: str) -> ReflectancePreset:
    return ReflectancePreset(
        name=_text(entry, "name"),
        reflectance_max_db=_req(entry, "reflectance_max_db", low=-100.0, high=0.0),
        orl_min_db=_num(entry, "orl_min_db", required=False, low=0.0, high=100.0),
        source=_text(entry, "source"),
        origin=origin,
    )


_PARSERS: dict[str, tuple[Callable[[Mapping[str, Any], str], Any], set[str]]] = {
    "fibres": (
        _fibre,
        {
            "name",
            "family",
            "standard",
            "source",
            "default_wavelengths_nm",
            "core_diameter_um",
            "numerical_aperture",
            "attenuation_max_db_per_km",
            "attenuation_typical_db_per_km",
            "group_index",
            "mode_field_diameter_um",
            "modal_bandwidth_mhz_km",
            "cable_cutoff_nm",
            "zero_dispersion_nm",
            "dispersion_slope_ps_nm2_km",
            "attenuation_estimated_nm",
            "notes",
        },
    ),
    "connectors": (_connector, {"name", "loss_max_db", "loss_typical_db", "source", "notes"}),
    "splices": (_splice, {"name", "method", "loss_max_db", "loss_typical_db", "source", "notes"}),
    "components": (
        _component,
        {
            "name",
            "kind",
            "loss_max_db",
            "loss_typical_db",
            "excess_max_db",
            "excess_typical_db",
            "inputs",
            "source",
            "notes",
        },
    ),
    "applications": (
        _application,
        {"name", "kind", "wavelengths_nm", "limits", "line_rate_gbd", "source", "notes"},
    ),
    "transceivers": (
        _transceiver,
        {
            "name",
            "wavelength_nm",
            "tx_min_dbm",
            "tx_max_dbm",
            "rx_sensitivity_dbm",
            "rx_overload_dbm",
            "by_family",
            "dispersion_tolerance_ps_nm",
            "line_rate_gbd",
            "source",
            "notes",
        },
    ),
    "cables": (
        _cable,
        {"name", "construction", "helix_percent", "helix_uncertainty_percent", "source", "notes"},
    ),
    "colour_sequences": (
        _colour_sequence,
        {"name", "colours", "tracer_colour", "tracer_on_tracer", "source", "notes"},
    ),
    "splice_plans": (_splice_plan, {"name", "plan", "source", "notes"}),
    "reflectance": (
        _reflectance,
        {"name", "reflectance_max_db", "orl_min_db", "source", "notes"},
    ),
}
