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
from abc import ABC, abstractmethod
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Annotated, Any, Literal, overload

from pydantic import (
    AfterValidator,
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    ValidationError,
    ValidationInfo,
    model_validator,
)

from fieldkit.calc.fibre import Fibre, check_wavelength_nm, lookup, rayleigh_scaled_db_per_km
from fieldkit.calc.units import InputError, format_number, parse_number
from fieldkit.fsutil import read_regular

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


#: Any one preset.
Preset = (
    FibrePreset
    | ConnectorPreset
    | SplicePreset
    | ComponentPreset
    | ApplicationPreset
    | TransceiverPreset
    | CablePreset
    | ColourSequencePreset
    | SplicePlanPreset
    | ReflectancePreset
)


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
        """The table of one kind, by name (for listing every kind alike)."""
        if kind not in KINDS:
            raise InputError(f"unknown preset kind '{kind}' (kinds: {', '.join(KINDS)})")
        table: dict[str, Any] = getattr(self, kind)
        return table

    @overload
    def find(self, kind: Literal["fibres"], name: str) -> FibrePreset: ...
    @overload
    def find(self, kind: Literal["connectors"], name: str) -> ConnectorPreset: ...
    @overload
    def find(self, kind: Literal["splices"], name: str) -> SplicePreset: ...
    @overload
    def find(self, kind: Literal["components"], name: str) -> ComponentPreset: ...
    @overload
    def find(self, kind: Literal["applications"], name: str) -> ApplicationPreset: ...
    @overload
    def find(self, kind: Literal["transceivers"], name: str) -> TransceiverPreset: ...
    @overload
    def find(self, kind: Literal["cables"], name: str) -> CablePreset: ...
    @overload
    def find(self, kind: Literal["colour_sequences"], name: str) -> ColourSequencePreset: ...
    @overload
    def find(self, kind: Literal["splice_plans"], name: str) -> SplicePlanPreset: ...
    @overload
    def find(self, kind: Literal["reflectance"], name: str) -> ReflectancePreset: ...
    def find(self, kind: str, name: str) -> Preset:
        """The preset of ``kind`` called ``name`` (case and spacing forgiven), typed by kind.

        Raises
        ------
        InputError
            Naming the unknown preset and the ones that exist.
        """
        table: Mapping[str, Preset] = self.of_kind(kind)
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


#: Largest preset file read (the shipped ones are a few KiB each).
MAX_PRESET_FILE_BYTES = 1024 * 1024


# -- the preset file format: one pydantic model per kind of entry ------------------------------
#
# The models check one entry of a file (types, ranges, the fields each kind allows) and turn it
# into the typed preset the rest of fieldkit uses. A problem becomes one line naming the file,
# the entry and the field (see _problem_text).


class _EntryError(ValueError):
    pass


def _reject_bool_and_nan(value: Any) -> Any:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise _EntryError(f"must be a number, not {value!r}")
    if not math.isfinite(value):
        raise _EntryError(f"must be a finite number, not {value!r}")
    return float(value)


def _range(low: float | None = None, high: float | None = None, positive: bool = False) -> Any:
    def check(number: float) -> float:
        if positive and number <= 0:
            raise _EntryError(f"must be above zero, not {number:g}")
        if low is not None and number < low:
            raise _EntryError(f"must be at least {low:g}, not {number:g}")
        if high is not None and number > high:
            raise _EntryError(f"must be at most {high:g}, not {number:g}")
        return number

    return AfterValidator(check)


Number = Annotated[float, BeforeValidator(_reject_bool_and_nan)]
LossDb = Annotated[Number, _range(0.0, 10.0)]
SpliceDb = Annotated[Number, _range(0.0, 5.0)]
ComponentDb = Annotated[Number, _range(0.0, 60.0)]
Wavelength = Annotated[Number, _range(200.0, 2000.0)]


def _text_field(value: Any) -> str:
    if not isinstance(value, str) or not value.strip():
        raise _EntryError("must be text")
    return value.strip()


Text = Annotated[str, BeforeValidator(_text_field)]


def _optional_text(value: Any) -> str:
    if not isinstance(value, str):
        raise _EntryError("must be text")
    return value.strip()


def _wavelength_table(low: float, high: float) -> Any:
    def parse(raw: Any, info: ValidationInfo) -> dict[float, float]:
        key = info.field_name
        if not isinstance(raw, dict):
            raise _EntryError(
                f"'{key}' must be a table of wavelength = value, e.g. {{ 1310 = 0.4 }}"
            )
        out: dict[float, float] = {}
        for k, v in raw.items():
            try:
                nm = check_wavelength_nm(parse_number(str(k), what=str(key)), f"'{key}'")
            except InputError as exc:
                raise _EntryError(f"'{key}': key '{k}' is not a wavelength in nm ({exc})") from None
            try:
                value = _reject_bool_and_nan(v)
            except _EntryError as exc:
                raise _EntryError(f"'{key}.{k}' {exc}") from None
            if not low <= value <= high:
                raise _EntryError(f"'{key}' at {nm:g} nm: {value:g} is outside {low:g}–{high:g}")
            out[nm] = value
        return out

    return BeforeValidator(parse)


def _ports_table(raw: Any, info: ValidationInfo) -> dict[int, float]:
    key = info.field_name
    if not isinstance(raw, dict):
        raise _EntryError(f"'{key}' must be a table of output count = dB, e.g. {{ 32 = 2.0 }}")
    out: dict[int, float] = {}
    for k, v in raw.items():
        try:
            n = int(str(k))
        except ValueError:
            raise _EntryError(f"'{key}': key '{k}' is not an output count") from None
        if n < 2:
            raise _EntryError(f"'{key}': a splitter has at least 2 outputs, not {n}")
        value = _reject_bool_and_nan(v)
        if not 0 <= value <= 10:
            raise _EntryError(f"'{key}' for {n} outputs: {value:g} dB is outside 0–10 dB")
        out[n] = value
    return out


class _Entry(BaseModel, ABC):
    """What every preset entry has: a name, the source of its values, optional notes."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    name: Text
    source: Text
    notes: Any = None

    @abstractmethod
    def preset(self, origin: str) -> Any:
        """The typed preset of this entry (each kind gives its own)."""


class FibreEntry(_Entry):
    family: Literal["multimode", "singlemode"]
    standard: Annotated[str, BeforeValidator(_optional_text)] = ""
    default_wavelengths_nm: list[Number] = Field(default_factory=list)
    core_diameter_um: Annotated[Number, _range(high=1000.0, positive=True)] | None = None
    numerical_aperture: Annotated[Number, _range(high=1.0, positive=True)] | None = None
    attenuation_max_db_per_km: Annotated[dict[float, float], _wavelength_table(0.0, 20.0)]
    attenuation_typical_db_per_km: Annotated[dict[float, float], _wavelength_table(0.0, 20.0)] = (
        Field(default_factory=dict)
    )
    group_index: Annotated[dict[float, float], _wavelength_table(1.0, 2.0)] = Field(
        default_factory=dict
    )
    mode_field_diameter_um: Annotated[dict[float, float], _wavelength_table(1.0, 20.0)] = Field(
        default_factory=dict
    )
    modal_bandwidth_mhz_km: Annotated[dict[float, float], _wavelength_table(1.0, 1e6)] = Field(
        default_factory=dict
    )
    cable_cutoff_nm: Wavelength | None = None
    zero_dispersion_nm: tuple[Wavelength, Wavelength] | None = None
    dispersion_slope_ps_nm2_km: Annotated[Number, _range(high=1.0, positive=True)] | None = None
    attenuation_estimated_nm: list[Wavelength] = Field(default_factory=list)

    @model_validator(mode="after")
    def _consistent(self) -> FibreEntry:
        if not self.attenuation_max_db_per_km:
            raise _EntryError("'attenuation_max_db_per_km' must not be empty")
        for nm, typ in self.attenuation_typical_db_per_km.items():
            top = self.attenuation_max_db_per_km.get(nm)
            if top is not None and typ > top:
                raise _EntryError(
                    f"typical attenuation {typ:g} dB/km at {nm:g} nm is above the maximum "
                    f"{top:g} dB/km"
                )
        if self.family == "multimode" and (
            self.core_diameter_um is None or self.numerical_aperture is None
        ):
            raise _EntryError("a multimode fibre needs 'core_diameter_um' and 'numerical_aperture'")
        if self.modal_bandwidth_mhz_km and self.family != "multimode":
            raise _EntryError("'modal_bandwidth_mhz_km' is for multimode fibre")
        if (self.zero_dispersion_nm is None) != (self.dispersion_slope_ps_nm2_km is None):
            raise _EntryError("give 'zero_dispersion_nm' and 'dispersion_slope_ps_nm2_km' together")
        if self.zero_dispersion_nm is not None and (
            self.zero_dispersion_nm[0] > self.zero_dispersion_nm[1]
        ):
            raise _EntryError("'zero_dispersion_nm' must be [lowest, highest]")
        for nm in self.default_wavelengths_nm:
            if lookup(self.attenuation_max_db_per_km, nm) is None:
                raise _EntryError(f"default wavelength {nm:g} nm has no maximum attenuation")
        for nm in self.attenuation_estimated_nm:
            if lookup(self.attenuation_max_db_per_km, nm) is not None:
                raise _EntryError(
                    f"'attenuation_estimated_nm': {nm:g} nm already has a maximum attenuation"
                )
        return self

    def preset(self, origin: str) -> FibrePreset:
        att_max = dict(self.attenuation_max_db_per_km)
        att_typ = dict(self.attenuation_typical_db_per_km)
        for nm in self.attenuation_estimated_nm:
            # No standard gives a value here: scale the nearest tabulated one as Rayleigh
            # scattering scales, and mark the wavelength so every budget says so.
            base = min(att_max, key=lambda have: abs(have - nm))
            att_max[nm] = rayleigh_scaled_db_per_km(att_max[base], base, nm)
            if nm not in att_typ and base in att_typ:
                att_typ[nm] = rayleigh_scaled_db_per_km(att_typ[base], base, nm)
        return FibrePreset(
            name=self.name,
            family=self.family,
            attenuation_max=att_max,
            attenuation_typical=att_typ,
            group_indices=dict(self.group_index),
            core_diameter_um=self.core_diameter_um,
            numerical_aperture=self.numerical_aperture,
            mfd_um=dict(self.mode_field_diameter_um),
            source=self.source,
            standard=self.standard,
            default_wavelengths_nm=tuple(self.default_wavelengths_nm),
            modal_bandwidth_mhz_km=dict(self.modal_bandwidth_mhz_km),
            cable_cutoff_nm=self.cable_cutoff_nm,
            zero_dispersion_nm=self.zero_dispersion_nm,
            dispersion_slope_ps_nm2_km=self.dispersion_slope_ps_nm2_km,
            estimated_nm=tuple(self.attenuation_estimated_nm),
            origin=origin,
        )


def _typical_not_above(max_db: float | None, typ_db: float | None) -> None:
    if max_db is not None and typ_db is not None and typ_db > max_db:
        raise _EntryError(f"typical loss {typ_db:g} dB is above the maximum {max_db:g} dB")


class ConnectorEntry(_Entry):
    loss_max_db: LossDb
    loss_typical_db: LossDb | None = None

    @model_validator(mode="after")
    def _consistent(self) -> ConnectorEntry:
        _typical_not_above(self.loss_max_db, self.loss_typical_db)
        return self

    def preset(self, origin: str) -> ConnectorPreset:
        return ConnectorPreset(
            self.name, self.loss_max_db, self.loss_typical_db, self.source, origin
        )


class SpliceEntry(_Entry):
    method: Annotated[str, BeforeValidator(_optional_text)]
    loss_max_db: SpliceDb
    loss_typical_db: SpliceDb | None = None

    @model_validator(mode="after")
    def _consistent(self) -> SpliceEntry:
        if self.method not in SPLICE_METHODS:
            raise _EntryError(f"'method' must be fusion or mechanical, not '{self.method}'")
        _typical_not_above(self.loss_max_db, self.loss_typical_db)
        return self

    def preset(self, origin: str) -> SplicePreset:
        return SplicePreset(
            self.name, self.method, self.loss_max_db, self.loss_typical_db, self.source, origin
        )


class ComponentEntry(_Entry):
    kind: Annotated[str, BeforeValidator(_optional_text)]
    loss_max_db: ComponentDb | None = None
    loss_typical_db: ComponentDb | None = None
    excess_max_db: Annotated[dict[int, float], BeforeValidator(_ports_table)] = Field(
        default_factory=dict
    )
    excess_typical_db: Annotated[dict[int, float], BeforeValidator(_ports_table)] = Field(
        default_factory=dict
    )
    inputs: Annotated[Number, _range(1.0, 2.0)] = 1.0

    @model_validator(mode="after")
    def _consistent(self) -> ComponentEntry:
        if self.kind not in COMPONENT_KINDS:
            raise _EntryError(
                f"'kind' must be one of {', '.join(COMPONENT_KINDS)}, not '{self.kind}'"
            )
        _typical_not_above(self.loss_max_db, self.loss_typical_db)
        for n, typ in self.excess_typical_db.items():
            if n in self.excess_max_db and typ > self.excess_max_db[n]:
                raise _EntryError(f"typical excess {typ:g} dB for {n} outputs is above the maximum")
        if self.kind == "splitter":
            if not self.excess_max_db:
                raise _EntryError("a splitter needs 'excess_max_db' by output count")
        elif self.loss_max_db is None:
            raise _EntryError("'loss_max_db' is missing")
        return self

    def preset(self, origin: str) -> ComponentPreset:
        return ComponentPreset(
            self.name,
            self.kind,
            self.loss_max_db,
            self.loss_typical_db,
            dict(self.excess_max_db),
            dict(self.excess_typical_db),
            int(self.inputs),
            self.source,
            origin,
        )


class LimitEntry(BaseModel):
    """An application's row for one fibre type or family."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    loss_max_db: ComponentDb
    reach_m: Annotated[Number, _range(high=1e6, positive=True)]
    loss_min_db: ComponentDb | None = None

    @model_validator(mode="after")
    def _consistent(self) -> LimitEntry:
        if self.loss_min_db is not None and self.loss_min_db > self.loss_max_db:
            raise _EntryError("loss_min_db is above loss_max_db")
        return self


class ApplicationEntry(_Entry):
    kind: Annotated[str, BeforeValidator(_optional_text)] = "application"
    wavelengths_nm: Annotated[list[Number], Field(min_length=1)]
    limits: Annotated[dict[str, LimitEntry], Field(min_length=1)]
    line_rate_gbd: Annotated[Number, _range(high=1e4, positive=True)] | None = None

    def preset(self, origin: str) -> ApplicationPreset:
        return ApplicationPreset(
            self.name,
            self.kind,
            tuple(self.wavelengths_nm),
            {
                fibre: ApplicationFibreLimit(row.loss_max_db, row.reach_m, row.loss_min_db)
                for fibre, row in self.limits.items()
            },
            self.source,
            origin,
            line_rate_gbd=self.line_rate_gbd,
        )


LaunchDbm = Annotated[Number, _range(-60.0, 30.0)]
ReceiveDbm = Annotated[Number, _range(-80.0, 30.0)]


def _check_levels(levels: TransceiverLevels) -> TransceiverLevels:
    if levels.tx_min_dbm > levels.tx_max_dbm:
        raise _EntryError("'tx_min_dbm' is above 'tx_max_dbm'")
    if levels.rx_sensitivity_dbm >= levels.rx_overload_dbm:
        raise _EntryError("'rx_sensitivity_dbm' must be below 'rx_overload_dbm'")
    return levels


class FamilyLevelsEntry(BaseModel):
    """The levels that differ on one fibre family; the others are the entry's own."""

    model_config = ConfigDict(extra="forbid", frozen=True)

    tx_min_dbm: LaunchDbm | None = None
    tx_max_dbm: LaunchDbm | None = None
    rx_sensitivity_dbm: ReceiveDbm | None = None
    rx_overload_dbm: ReceiveDbm | None = None


class TransceiverEntry(_Entry):
    wavelength_nm: Wavelength | None = None
    tx_min_dbm: LaunchDbm
    tx_max_dbm: LaunchDbm
    rx_sensitivity_dbm: ReceiveDbm
    rx_overload_dbm: ReceiveDbm
    by_family: dict[Literal["multimode", "singlemode"], FamilyLevelsEntry] = Field(
        default_factory=dict
    )
    dispersion_tolerance_ps_nm: Annotated[Number, _range(high=1e6, positive=True)] | None = None
    line_rate_gbd: Annotated[Number, _range(high=1e4, positive=True)] | None = None

    def levels(self) -> TransceiverLevels:
        return TransceiverLevels(
            self.tx_min_dbm, self.tx_max_dbm, self.rx_sensitivity_dbm, self.rx_overload_dbm
        )

    @model_validator(mode="after")
    def _consistent(self) -> TransceiverEntry:
        _check_levels(self.levels())
        for family in self.by_family:
            try:
                self._family_levels(family)
            except _EntryError as exc:
                raise _EntryError(f"'by_family.{family}': {exc}") from None
        return self

    def _family_levels(self, family: str) -> TransceiverLevels:
        over = self.by_family[family]  # type: ignore[index]
        base = self.levels()
        return _check_levels(
            TransceiverLevels(
                base.tx_min_dbm if over.tx_min_dbm is None else over.tx_min_dbm,
                base.tx_max_dbm if over.tx_max_dbm is None else over.tx_max_dbm,
                base.rx_sensitivity_dbm
                if over.rx_sensitivity_dbm is None
                else over.rx_sensitivity_dbm,
                base.rx_overload_dbm if over.rx_overload_dbm is None else over.rx_overload_dbm,
            )
        )

    def preset(self, origin: str) -> TransceiverPreset:
        return TransceiverPreset(
            self.name,
            self.wavelength_nm,
            self.tx_min_dbm,
            self.tx_max_dbm,
            self.rx_sensitivity_dbm,
            self.rx_overload_dbm,
            self.source,
            origin,
            by_family={f: self._family_levels(f) for f in self.by_family},
            dispersion_tolerance_ps_nm=self.dispersion_tolerance_ps_nm,
            line_rate_gbd=self.line_rate_gbd,
        )


Percent = Annotated[Number, _range(0.0, 20.0)]


class CableEntry(_Entry):
    construction: Text
    helix_percent: Percent
    helix_uncertainty_percent: Percent

    def preset(self, origin: str) -> CablePreset:
        return CablePreset(
            self.name,
            self.construction,
            self.helix_percent,
            self.helix_uncertainty_percent,
            self.source,
            origin,
        )


class ReflectanceEntry(_Entry):
    reflectance_max_db: Annotated[Number, _range(-100.0, 0.0)]
    orl_min_db: Annotated[Number, _range(0.0, 100.0)] | None = None

    def preset(self, origin: str) -> ReflectancePreset:
        return ReflectancePreset(
            self.name, self.reflectance_max_db, self.orl_min_db, self.source, origin
        )


class ColourSequenceEntry(_Entry):
    colours: list[Any]
    tracer_colour: Annotated[str, BeforeValidator(_optional_text)] = "black"
    tracer_on_tracer: Annotated[str, BeforeValidator(_optional_text)] = "yellow"

    @model_validator(mode="after")
    def _consistent(self) -> ColourSequenceEntry:
        colours = self.colours
        if not 2 <= len(colours) <= 48 or not all(
            isinstance(c, str) and c.strip() for c in colours
        ):
            raise _EntryError("'colours' must be a list of 2 to 48 colour words")
        words = [c.strip().lower() for c in colours]
        if len(set(words)) != len(words):
            raise _EntryError("'colours' names a colour twice")
        return self

    def preset(self, origin: str) -> ColourSequencePreset:
        return ColourSequencePreset(
            self.name,
            tuple(c.strip().lower() for c in self.colours),
            (self.tracer_colour or "black").lower(),
            (self.tracer_on_tracer or "yellow").lower(),
            self.source,
            origin,
        )


class SplicePlanEntry(_Entry):
    plan: Text

    @model_validator(mode="after")
    def _consistent(self) -> SplicePlanEntry:
        from fieldkit.inputs import splice_plan

        try:
            # Checked with placeholder cables; "straight" takes the count when applied.
            splice_plan(self.plan, "A", "B", count_a=1, what="plan")
        except InputError as exc:
            raise _EntryError(str(exc)) from None
        return self

    def preset(self, origin: str) -> SplicePlanPreset:
        return SplicePlanPreset(self.name, self.plan, self.source, origin)


_ENTRY_MODELS: dict[str, type[_Entry]] = {
    "fibres": FibreEntry,
    "connectors": ConnectorEntry,
    "splices": SpliceEntry,
    "components": ComponentEntry,
    "applications": ApplicationEntry,
    "transceivers": TransceiverEntry,
    "cables": CableEntry,
    "colour_sequences": ColourSequenceEntry,
    "splice_plans": SplicePlanEntry,
    "reflectance": ReflectanceEntry,
}


def _problem_text(error: ValidationError) -> str:
    """The first problem of a validation error as one line: unknown fields together, a missing
    field by name, a row of an application table by its fibre."""
    errors = error.errors()
    unknown = [str(e["loc"][-1]) for e in errors if e["type"] == "extra_forbidden"]
    if unknown and all(len(e["loc"]) == 1 for e in errors if e["type"] == "extra_forbidden"):
        return f"unknown field(s) {', '.join(sorted(unknown))}"
    # the entry's own figures first, its source last (as a reader goes through the entry)
    first = sorted(errors, key=lambda e: e["loc"][:1] == ("source",))[0]
    loc = [str(part) for part in first["loc"]]
    where = ""
    if len(loc) >= 2 and loc[0] == "limits":
        where = f"limits for '{loc[1]}': "
        loc = loc[2:]
    elif len(loc) >= 2 and loc[0] == "by_family":
        where = f"'by_family.{loc[1]}': "
        loc = loc[2:]
    field = ".".join(loc)
    kind = first["type"]
    if kind == "missing":
        return f"{where}'{field}' is missing"
    if kind == "extra_forbidden":
        return f"{where}unknown field(s) {field}"
    ctx = first.get("ctx") or {}
    inner = ctx.get("error")
    if isinstance(inner, _EntryError):
        message = str(inner)
        if not field or message.startswith("'"):
            return f"{where}{message}"
        return f"{where}'{field}' {message}"
    if kind == "literal_error":
        return f"{where}'{field}' must be {ctx.get('expected', '')}, not {first['input']!r}"
    message = first["msg"].removeprefix("Value error, ")
    return f"{where}'{field}': {message}" if field else f"{where}{message}"


def parse_entry(kind: str, entry: Mapping[str, Any], origin: str) -> Any:
    """The typed preset of one entry of a preset file.

    Raises
    ------
    InputError
        One line naming the field and the problem.
    """
    model = _ENTRY_MODELS[kind]
    try:
        return model.model_validate(dict(entry)).preset(origin)
    except ValidationError as exc:
        raise InputError(_problem_text(exc)) from None


def _load_file(library: PresetLibrary, path: Path, label: str) -> None:
    try:
        # a regular file only, at most MAX_PRESET_FILE_BYTES: a FIFO or a link to /dev/zero
        # in the presets folder is reported, never read
        raw = read_regular(path, MAX_PRESET_FILE_BYTES)
        data = tomllib.loads(raw.decode("utf-8-sig"))  # an editor's BOM is fine
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
        if kind not in _ENTRY_MODELS:
            library.problems.append(
                f"{label}: unknown section '{kind}' (sections: {', '.join(KINDS)})"
            )
            continue
        if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
            library.problems.append(f"{label}: '{kind}' must be an array of tables ([[{kind}]])")
            continue
        table = library.of_kind(kind)
        for index, entry in enumerate(entries, start=1):
            name = entry.get("name")
            entry_label = f"'{name}'" if isinstance(name, str) and name.strip() else f"#{index}"
            if not isinstance(name, str) or not name.strip():
                library.problems.append(
                    f"{label}: {kind} entry {entry_label}: 'name' is missing or not text"
                )
                continue
            try:
                preset = parse_entry(kind, entry, label)
            except InputError as exc:
                library.problems.append(f"{label}: {kind} entry {entry_label}: {exc}")
                continue
            table[preset.name] = preset
