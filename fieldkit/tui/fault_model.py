"""The fault workspace's form as a plain model: the typed fields and rows to a
:class:`~fieldkit.calc.locate.LocateInput`, the located fault to the lines shown. No Textual here;
the screen lays the fields out and wires them to it.

The same typed inputs give the same input as ``fieldkit locate`` (a test compares them): no
helix until one is chosen or typed (the range then runs from the fibre distance down to the
shortest plausible cable), the typed-helix uncertainty of the CLI, the same OTDR distance rule
(a bare number asks for a unit). The result lines are :mod:`fieldkit.text.locate`'s, the ones
the CLI prints; the route diagram's are :mod:`fieldkit.text.route`'s.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any, Literal

from fieldkit.actions.saves import fault_inputs
from fieldkit.calc.locate import (
    DEFAULT_GROUP_INDEX_UNCERTAINTY,
    DEFAULT_OFFSET_M,
    DEFAULT_SAMPLE_SPACING_M,
    DEFAULT_SCALE_ERROR_PERCENT,
    OUTPUT_UNITS,
    TYPED_HELIX_UNCERTAINTY_PERCENT,
    UNKNOWN_HELIX_ESTIMATE_PERCENT,
    UNKNOWN_HELIX_MAX_PERCENT,
    ErrorTerms,
    Landmark,
    LocateInput,
    Location,
    Marking,
    SlackLoop,
    TwoEnded,
    format_distance,
    locate,
)
from fieldkit.calc.units import InputError, Kind, format_number, parse
from fieldkit.inputs import otdr_distance_m
from fieldkit.presets import PresetLibrary, load_presets
from fieldkit.text.locate import distance_text, result_lines, summary_line
from fieldkit.text.route import FaultMark, RoutePoint
from fieldkit.text.words import counted, preset_problems
from fieldkit.tui.form_fields import Column, Notice, field_name, plain_number

if TYPE_CHECKING:
    from fieldkit.jobs.store import JobStore

TYPED = "__typed__"
#: The cable choice that gives no helix: the calculation's own assumption, shown as such.
NOT_GIVEN = "__not_given__"


@dataclass(frozen=True, slots=True)
class Field:
    """A typed field of the form: its label, how its text is read, its hint (an example, never
    a value), the text it starts with and its tooltip."""

    label: str
    kind: Literal["quantity", "number"]
    expect: Kind | None = None
    default_unit: str | None = None
    check: Callable[[str, str], object] | None = None
    hint: str = ""
    start: str = ""
    tip: str | None = None


#: The typed fields, by key (the screen's ids are ``fault-<key>``), in the order they are laid
#: out: the first field with a problem is the one a message names.
FIELDS: dict[str, Field] = {
    "distance": Field(
        "Distance",
        "quantity",
        Kind.LENGTH,
        check=otdr_distance_m,
        hint="e.g. 3.412 km",
        tip="The event's distance as the OTDR shows it, with its unit (km or m, as shown)",
    ),
    "time": Field(
        "or time",
        "quantity",
        Kind.TIME,
        hint="e.g. 34.1 µs",
        tip="The round-trip time instead of a distance",
    ),
    "ior-set": Field(
        "OTDR index",
        "number",
        hint="e.g. 1.4680 (as set)",
        tip="The index set on the OTDR (its group index setting); empty if it was set to the "
        "fibre's",
    ),
    "ior": Field(
        "Group index",
        "number",
        hint="e.g. 1.4677",
        tip="The fibre's own group index (filled from the preset; type the cable's if you have it)",
    ),
    "helix": Field(
        "Helix %",
        "number",
        hint="e.g. 1.5",
        tip="Helix / excess fibre length: how much longer the fibre is than the sheath "
        "(empty: not given)",
    ),
    "marking": Field("At start", "number", hint="e.g. 12345 (optional)"),
    "from-b": Field(
        "From end B", "quantity", Kind.LENGTH, "m", hint="e.g. 1590 m", tip="Same set-up, from B"
    ),
    "total": Field(
        "Total", "quantity", Kind.LENGTH, "m", hint="e.g. 5000 m", tip="End to end, same set-up"
    ),
    "offset": Field(
        "Offset", "quantity", Kind.LENGTH, "m", hint="e.g. 1 m", start=f"{DEFAULT_OFFSET_M:g} m"
    ),
    "scale": Field("Scale %", "number", hint="e.g. 0.01", start=f"{DEFAULT_SCALE_ERROR_PERCENT:g}"),
    "sampling": Field(
        "Sampling",
        "quantity",
        Kind.LENGTH,
        "m",
        hint="e.g. 1 m",
        start=f"{DEFAULT_SAMPLE_SPACING_M:g} m",
    ),
    "ior-u": Field(
        "Index ±", "number", hint="e.g. 0.001", start=f"{DEFAULT_GROUP_INDEX_UNCERTAINTY:g}"
    ),
    "helix-u": Field(
        "Helix ± %", "number", hint="e.g. 0.5", start=format_number(TYPED_HELIX_UNCERTAINTY_PERCENT)
    ),
    "landmark-u": Field(
        "Landmark ±",
        "quantity",
        Kind.LENGTH,
        "m",
        hint="e.g. 5 m",
        start="0 m",
        tip="From the route records",
    ),
}

LANDMARK_COLUMNS = (
    Column("name", "Name", "text", "closure 7"),
    Column("otdr", "OTDR distance", "length", "3.400 km"),
    Column("route", "Route distance", "length", "3330 m"),
)
SLACK_COLUMNS = (
    Column("position", "Route position", "length", "1200 m"),
    Column("length", "Cable length", "length", "20 m"),
    Column("label", "Label", "text", "coil at HH 4"),
)

LANDMARKS_EMPTY = (
    "None yet: closures, handholes, building entries with OTDR and route distance. Enter adds; "
    "pick a row to edit; Delete removes."
)
SLACK_EMPTY = "None yet: each loop's route position and cable length. Enter adds."

#: What New empties: the reading, the marking and the two-ended check (and the rows); the
#: fibre, cable and uncertainty settings stay.
NEW_CLEARS = ("distance", "time", "ior-set", "marking", "from-b", "total")

#: The note under the cable choice when no helix is given: the assumption, shown.
HELIX_NOT_GIVEN_NOTE = (
    f"Helix not given: estimate {format_number(UNKNOWN_HELIX_ESTIMATE_PERCENT)} %, "
    f"range 0–{format_number(UNKNOWN_HELIX_MAX_PERCENT)} % (fibre distance down to "
    "the shortest plausible cable)."
)


def read_field(key: str, text: str) -> float | None:
    """A field's text in SI units (metres, seconds) or as a number; None when empty. Raises
    InputError naming the field as labelled."""
    spec = FIELDS[key]
    if not text.strip():
        return None
    if spec.kind == "number":
        return plain_number(text, spec.label)
    what = field_name(spec.label)
    if spec.check is not None:
        spec.check(text, what)
    value = parse(text, spec.expect, default_unit=spec.default_unit, what=what)
    return value.to("s") if value.kind is Kind.TIME else value.to("m")


@dataclass
class Built:
    """The form read: the calculation's input (None when not usable), why not, each field's
    problem by key ("" for none), and a note that does not stop the result."""

    inp: LocateInput | None = None
    problem: str | None = None
    errors: dict[str, str] = field(default_factory=dict)
    note: str | None = None


def build_input(
    typed: Mapping[str, Any],
    landmarks: Sequence[Mapping[str, Any]] = (),
    slack: Sequence[Mapping[str, Any]] = (),
) -> Built:
    """The calculation's input from the typed fields (by key, text as typed; select values for
    ``marking-unit`` and ``marking-direction``) and the parsed landmark and slack rows."""
    built = Built(errors=dict.fromkeys(FIELDS, ""))
    values: dict[str, float | None] = {}
    for key in FIELDS:
        try:
            values[key] = read_field(key, str(typed.get(key) or ""))
        except InputError as exc:
            values[key] = None
            built.errors[key] = str(exc)
    first_error = next((e for e in built.errors.values() if e), "")
    fix = f"Fix the field marked in red: {first_error}" if first_error else None
    distance, time = values["distance"], values["time"]
    if distance is None and time is None:
        built.problem = fix or "Type the OTDR distance (or the round-trip time)."
        return built
    if distance is not None and time is not None:
        built.problem = "Give the OTDR distance or the round-trip time, not both."
        return built
    if fix:
        built.problem = fix
        return built
    marking = None
    if values["marking"] is not None:
        marking = Marking(
            values["marking"],
            str(typed.get("marking-unit") or "m"),  # type: ignore[arg-type]
            str(typed.get("marking-direction") or "up"),  # type: ignore[arg-type]
        )
    from_b, total = values["from-b"], values["total"]
    two = TwoEnded(from_b, total) if from_b is not None and total is not None else None
    if (from_b is None) != (total is None):
        built.note = "The two-ended check needs both the distance from B and the total."
    defaults = ErrorTerms()

    def given(key: str, default: float) -> float:
        value = values[key]
        return default if value is None else value

    helix = values["helix"]
    errors = ErrorTerms(
        offset_m=given("offset", defaults.offset_m),
        scale_error_percent=given("scale", defaults.scale_error_percent),
        sample_spacing_m=given("sampling", defaults.sample_spacing_m),
        group_index_uncertainty=given("ior-u", defaults.group_index_uncertainty),
        # As on the command line: a typed helix without its ± takes the typed-helix default;
        # no helix, no ± (the unknown helix has its own range in the calculation).
        helix_uncertainty_percent=(
            given("helix-u", TYPED_HELIX_UNCERTAINTY_PERCENT) if helix is not None else 0.0
        ),
        landmark_route_uncertainty_m=given("landmark-u", 0.0),
    )
    built.inp = LocateInput(
        otdr_distance_m=distance,
        round_trip_time_s=time,
        index_set=values["ior-set"],
        group_index=values["ior"],
        helix_percent=helix,
        slack=tuple(SlackLoop(v["position"], v["length"], v["label"]) for v in slack),
        landmarks=tuple(Landmark(v["name"], v["otdr"], v["route"]) for v in landmarks),
        marking=marking,
        two_ended=two,
        errors=errors,
    )
    return built


@dataclass
class Shown:
    """What the result panel, the summary line and the route diagram show."""

    result: str
    warnings: list[str]
    summary: str
    problem: bool
    points: list[RoutePoint]
    fault: FaultMark | None


def route_points(
    landmarks: Sequence[Mapping[str, Any]], slack: Sequence[Mapping[str, Any]], unit: str
) -> list[RoutePoint]:
    """The landmarks and slack loops as points of the route diagram."""
    points = [RoutePoint("landmark", v["name"], v["route"]) for v in landmarks]
    for v in slack:
        label = v["label"] or format_distance(v["length"], unit)
        points.append(RoutePoint("slack", label, v["position"]))
    return points


@dataclass
class FaultForm:
    """The form's state between keystrokes: the last reading, its result and the clean mark."""

    config_dir: Path | None = None
    location: Location | None = None
    inputs: dict[str, Any] = field(default_factory=dict)
    problem: str | None = None
    errors: dict[str, str] = field(default_factory=dict)
    _clean: str | None = None
    _typed: dict[str, Any] = field(default_factory=dict)
    _clear_asked: bool = False
    #: The landmark rows the last hand-off put in (as it put them): rows still equal to one of
    #: these belong to that trace, not to the user, and the next hand-off replaces them.
    _handed: list[dict[str, str]] = field(default_factory=list)

    def may_clear(self, anything_typed: bool) -> bool:
        """Ctrl+N: True when the reading and the rows may be emptied now. With something
        typed the first press only asks (False); the next one clears."""
        if anything_typed and not self._clear_asked:
            self._clear_asked = True
            return False
        self._clear_asked = False
        return True

    @property
    def library(self) -> PresetLibrary:
        return load_presets(self.config_dir)

    # -- presets ----------------------------------------------------------------------------
    def fibre_choices(self) -> tuple[list[tuple[str, str]], str]:
        """The fibre choices (those with group indices, after "index typed") and the default."""
        fibres = [f for f in self.library.fibres.values() if f.group_indices]
        default = next(
            (f.name for f in fibres if f.name == "G.652.D"), fibres[0].name if fibres else TYPED
        )
        return [("index typed", TYPED)] + [(f.name, f.name) for f in fibres], default

    def cable_choices(self) -> list[tuple[str, str]]:
        return [("helix not given", NOT_GIVEN), ("helix typed", TYPED)] + [
            (c.name, c.name) for c in self.library.cables.values()
        ]

    def wavelengths(self, fibre: str) -> list[float] | None:
        """The wavelengths a fibre preset has a group index at; None for a typed index."""
        preset = self.library.fibres.get(fibre)
        return None if preset is None else sorted(preset.group_indices)

    def wavelength_choice(
        self, fibre: str, current: object
    ) -> tuple[list[tuple[str, float]], float] | None:
        """The wavelength select's options and value for fibre preset ``fibre``: the value
        shown stays when the fibre has it, else 1550 nm, else the longest; None for a typed
        index or a preset without group indices (the select then stays as it is)."""
        wavelengths = self.wavelengths(fibre)
        if not wavelengths:
            return None
        if isinstance(current, (int, float)) and current in wavelengths:
            value = float(current)
        else:
            value = 1550.0 if 1550.0 in wavelengths else wavelengths[-1]
        return [(f"{w:g} nm", w) for w in wavelengths], value

    def preset_warning(self) -> str | None:
        """What is wrong with the shipped or the user's presets, in one line (None: nothing;
        the one rule, :func:`fieldkit.text.words.preset_problems`)."""
        return preset_problems(self.library.problems)

    @staticmethod
    def handoff_rows(landmarks: Sequence[tuple[str, float, float]]) -> list[dict[str, str]]:
        """Landmarks handed off (name, OTDR distance m, route distance m) as the landmark
        list's rows, distances to 0.1 m."""
        return [
            {"name": name, "otdr": f"{otdr:.1f} m", "route": f"{route:.1f} m"}
            for name, otdr, route in landmarks
        ]

    def merge_handoff(
        self, rows: Sequence[dict[str, str]], landmarks: Sequence[tuple[str, float, float]]
    ) -> tuple[list[dict[str, str]], str]:
        """The landmark list after a hand-off from Traces, and one line saying what happened.

        Rows the user typed (or edited) all stay, first, as they are. The link's closures the
        trace found (:meth:`handoff_rows`) follow, except one named like a typed row: the typed
        row wins and the line gives the trace's reading of it. Rows an earlier hand-off put in
        and nobody changed belong to that trace's set-up, so these new ones replace them.
        """
        typed = [dict(r) for r in rows if dict(r) not in self._handed]
        replaced = len(rows) - len(typed)
        taken = {r.get("name", "").strip().casefold() for r in typed}
        new, kept = [], []
        for row in self.handoff_rows(landmarks):
            if row["name"].strip().casefold() in taken:
                kept.append(f"{row['name']} as typed (the trace reads {row['otdr']})")
            else:
                new.append(row)
        self._handed = [dict(r) for r in new]
        said = []
        if new:
            said.append(f"{counted(len(new), 'closure')} of the link as landmarks")
        if kept:
            said.append("kept " + ", ".join(kept))
        if replaced:
            said.append(f"{counted(replaced, 'landmark')} of the previous trace replaced")
        if typed and new:
            said.append(f"{counted(len(typed), 'typed landmark')} kept")
        return typed + new, ("Landmarks: " + "; ".join(said) + ".") if said else ""

    def group_index_text(self, fibre: str, wavelength_nm: float) -> str | None:
        """The preset's group index at a wavelength, as the field shows it."""
        preset = self.library.fibres.get(fibre)
        if preset is None or wavelength_nm <= 0:
            return None
        try:
            return f"{preset.group_index(wavelength_nm):.4f}"
        except InputError:
            return None

    def cable_fill(self, cable: str) -> tuple[str | None, str | None, str, str | None]:
        """What choosing a cable fills: (helix text, its ± text, the note, the note's tooltip);
        None leaves a field as it is."""
        if cable == NOT_GIVEN:
            return "", None, HELIX_NOT_GIVEN_NOTE, None
        preset = self.library.cables.get(cable)
        if preset is None:
            return None, None, "Typed helix; give its ± under Uncertainty.", None
        return (
            f"{preset.helix_percent:g}",
            f"{preset.helix_uncertainty_percent:g}",
            "Typical for this construction; the cable's data sheet is better.",
            preset.source,
        )

    # -- computing --------------------------------------------------------------------------
    def update(
        self,
        typed: Mapping[str, Any],
        landmarks: Sequence[Mapping[str, Any]],
        slack: Sequence[Mapping[str, Any]],
    ) -> Built:
        """Read the form and locate the fault; ``typed`` is every field and choice as typed."""
        self._typed = dict(typed)
        if self._clean is None:
            self._clean = self.fingerprint()  # the start is nothing to lose
        built = build_input(typed, landmarks, slack)
        self.errors = built.errors
        self.location, self.problem = None, built.problem or built.note
        if built.inp is not None:
            try:
                self.location = locate(built.inp)
                self.inputs = fault_inputs(built.inp, self._typed)
            except InputError as exc:
                self.problem = str(exc)
        return built

    def shown(
        self,
        unit: str,
        landmarks: Sequence[Mapping[str, Any]] = (),
        slack: Sequence[Mapping[str, Any]] = (),
    ) -> Shown:
        """The result as the workspace shows it, in ``unit`` (m when it is none of ours)."""
        unit = unit if unit in OUTPUT_UNITS else "m"
        points = route_points(landmarks, slack, unit)
        if self.location is None:
            # Said once, on the summary line (always in view), not again in the result panel.
            return Shown("", [], self.problem or "", True, points, None)
        lines = result_lines(self.location, unit)
        if self.problem:
            lines.append(self.problem)
        p = self.location.position
        return Shown(
            "\n".join(lines),
            [f"⚠ {w}" for w in self.location.warnings],
            summary_line(self.location, unit),
            False,
            points,
            FaultMark(p.route_distance_m, p.low_m, p.high_m, p.uncertainty_m),
        )

    # -- a job's link ---------------------------------------------------------------------
    def save(self, store: JobStore, job_id: str, link_id: str, *, by: str, unit: str) -> Notice:
        """Save the located fault onto a job's link through the layer that changes jobs."""
        from fieldkit.actions.errors import ActionError
        from fieldkit.actions.saves import fault_record, save_fault
        from fieldkit.jobs.store import StoreError

        if self.location is None:
            return Notice(self.problem or "Nothing located yet to save.", "warning", ok=False)
        record = fault_record(self.location, dict(self.inputs), by=by)
        p = self.location.position
        try:
            saved = save_fault(store, job_id, link_id, record)
        except (StoreError, ActionError) as exc:
            return Notice(f"Not saved: {exc}", "error", ok=False)
        self.mark_clean()
        return Notice(
            f"Saved onto {saved.job_name} / {saved.link_label}: "
            f"{distance_text(record.route_distance_m, p.uncertainty_m, unit)} on the route."
        )

    # -- unsaved edits ----------------------------------------------------------------------
    def fingerprint(self) -> str:
        return json.dumps(self._typed, sort_keys=True, default=str)

    def mark_clean(self) -> None:
        self._clean = self.fingerprint()

    @property
    def changed(self) -> bool:
        """True when the form differs from what was last saved (or the start)."""
        return self._clean is not None and self._clean != self.fingerprint()

    @property
    def unsaved_edits(self) -> bool:
        """True when a located fault was changed since it was last saved (or the start)."""
        return self.location is not None and self.changed
