"""The splice log of a link: closures, the cables entering them, trays, splices and plans.

Stored on :class:`fieldkit.jobs.models.Link` as ``closures`` (schema 3; older files carried a flat
``splices`` list that :mod:`fieldkit.jobs.migrations` moves into one closure). Every record says
who and when. A re-splice is appended with ``replaces`` naming the splice it supersedes; the
newest splice of a fibre counts, the earlier ones stay in the file and the exports.

A splice is judged on the bidirectional OTDR average (ITU-T G.650.3, Appendix I, from memory)
against the link's splice limit (:class:`SpliceLimit`, copied from a splice preset when the first
splice is recorded, so the record names the figure it was judged by). One direction alone is not
acceptance-grade; the splicing machine's estimate is recorded but never judged.

The sentences here (verdicts, teaching warnings) are shared by the CLI, the workspace and the
reports, so all three say the same thing.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from pydantic import AwareDatetime, Field

from fieldkit.calc import splicing
from fieldkit.jobs.base import Record, _Id, now

SpliceMethod = Literal["fusion", "mechanical"]
SPLICE_METHODS: tuple[str, ...] = ("fusion", "mechanical")

#: The largest cables made hold 6912 fibres (common practice).
MAX_FIBRES = 6912


class SpliceLimit(Record):
    """The largest splice loss accepted on a link for one method, and where it comes from."""

    id: str = _Id
    method: SpliceMethod = "fusion"
    preset: str = Field(default="", max_length=200)
    loss_max_db: float = Field(ge=0, le=5)
    source: str = Field(default="", max_length=2000)
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)


class SpliceCable(Record):
    """A cable entering a closure: its name there, fibre count and colour code."""

    id: str = _Id
    name: str = Field(min_length=1, max_length=64)
    #: None: not recorded (a file from before closures were kept).
    fibre_count: int | None = Field(default=None, ge=1, le=MAX_FIBRES)
    #: Fibres per tube or per ribbon; None: not recorded (colours cannot be named).
    per_tube: int | None = Field(default=12, ge=1, le=MAX_FIBRES)
    colour_sequence: str = Field(default="TIA-598", min_length=1, max_length=200)
    #: The colours of that sequence, copied from its preset so the file reads on its own.
    colours: list[str] = Field(default_factory=lambda: list(splicing.TIA_598_COLOURS))
    tracer_colour: str = Field(default="black", max_length=40)
    tracer_on_tracer: str = Field(default="yellow", max_length=40)
    #: A fibre preset name (G.652.D, G.657.A2, ...), for the mismatch warning; "" unknown.
    fibre_type: str = Field(default="", max_length=200)
    #: The fibre type's mode-field diameters (from its preset), for the mismatch warning.
    mfd_1310_um: float | None = Field(default=None, gt=0, le=100)
    mfd_1550_um: float | None = Field(default=None, gt=0, le=100)
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)

    def mfd_um(self, wavelength_nm: float | None) -> float | None:
        """The mode-field diameter nearest the wavelength (1550 nm when none is given)."""
        if wavelength_nm is not None and wavelength_nm < 1430:
            return self.mfd_1310_um
        return self.mfd_1550_um

    def sequence(self) -> splicing.ColourSequence:
        return splicing.ColourSequence(
            self.colour_sequence, tuple(self.colours), self.tracer_colour, self.tracer_on_tracer
        )

    def position(self, fibre: int) -> splicing.FibrePosition | None:
        """The fibre's tube and colours, or None when the tube size is not recorded."""
        if self.per_tube is None or not self.colours:
            return None
        return splicing.fibre_position(fibre, self.per_tube, self.sequence())


class Tray(Record):
    """A splice tray of a closure: its number and how many splices it holds."""

    id: str = _Id
    number: int = Field(ge=1, le=1000)
    capacity: int = Field(ge=1, le=1000)
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)


class Splice(Record):
    """One splice: fibre ``fibre_a`` of cable ``cable_a`` joined to ``fibre_b`` of ``cable_b``.

    ``loss_ab_db`` / ``loss_ba_db`` are the one-way OTDR values from end A and from end B of
    the link. ``average_only_db`` holds a bidirectional value recorded without its two one-way
    values (older files). ``replaces`` is the id of the splice of the same fibre this re-splice
    supersedes.
    """

    id: str = _Id
    cable_a: str = Field(min_length=1, max_length=64)
    fibre_a: int = Field(ge=1, le=MAX_FIBRES)
    cable_b: str = Field(min_length=1, max_length=64)
    fibre_b: int = Field(ge=1, le=MAX_FIBRES)
    tray: int | None = Field(default=None, ge=1, le=1000)
    slot: int | None = Field(default=None, ge=1, le=1000)
    method: SpliceMethod = "fusion"
    estimate_db: float | None = Field(default=None, ge=-5, le=20)
    loss_ab_db: float | None = Field(default=None, ge=-5, le=20)
    loss_ba_db: float | None = Field(default=None, ge=-5, le=20)
    average_only_db: float | None = Field(default=None, ge=-5, le=20)
    wavelength_nm: float | None = Field(default=None, gt=0)
    replaces: str | None = None
    notes: str = Field(default="", max_length=2000)
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)

    @property
    def average_db(self) -> float | None:
        """The bidirectional average, or None with fewer than two directions."""
        if self.loss_ab_db is not None and self.loss_ba_db is not None:
            return splicing.bidirectional_average_db(self.loss_ab_db, self.loss_ba_db)
        return self.average_only_db


class PlanRow(Record):
    """A row of a closure's splice plan (see :class:`fieldkit.calc.splicing.PlanRange`)."""

    cable_a: str = Field(min_length=1, max_length=64)
    first_a: int = Field(ge=1, le=MAX_FIBRES)
    last_a: int = Field(ge=1, le=MAX_FIBRES)
    cable_b: str | None = Field(default=None, min_length=1, max_length=64)
    first_b: int | None = Field(default=None, ge=1, le=MAX_FIBRES)

    def as_range(self) -> splicing.PlanRange:
        return splicing.PlanRange(
            self.cable_a, self.first_a, self.last_a, self.cable_b, self.first_b
        )


class Closure(Record):
    """A splice closure (or handhole, building entry) on a link."""

    id: str = _Id
    name: str = Field(min_length=1, max_length=200)
    route_distance_m: float | None = Field(default=None, ge=0)
    landmark: str = Field(default="", max_length=200)
    notes: str = Field(default="", max_length=20_000)
    cables: list[SpliceCable] = Field(default_factory=list)
    trays: list[Tray] = Field(default_factory=list)
    splices: list[Splice] = Field(default_factory=list)
    plan: list[PlanRow] = Field(default_factory=list)
    #: The preset or text the plan came from ("straight", a preset name, or "typed").
    plan_source: str = Field(default="", max_length=2000)
    by: str = Field(default="", max_length=200)
    at: AwareDatetime = Field(default_factory=now)

    def cable(self, name: str) -> SpliceCable | None:
        wanted = name.strip().casefold()
        for item in self.cables:
            if item.name.strip().casefold() == wanted:
                return item
        return None

    def tray_of(self, number: int) -> Tray | None:
        for tray in self.trays:
            if tray.number == number:
                return tray
        return None

    def current_splices(self) -> list[Splice]:
        """The splices that count: each fibre's newest, in fibre order (re-splices supersede)."""
        replaced = {s.replaces for s in self.splices if s.replaces}
        live = [s for s in self.splices if s.id not in replaced]
        return sorted(live, key=lambda s: (s.cable_a.casefold(), s.fibre_a, s.at))

    def superseded(self) -> list[Splice]:
        replaced = {s.replaces for s in self.splices if s.replaces}
        return [s for s in self.splices if s.id in replaced]

    def current_for(self, cable: str, fibre: int) -> Splice | None:
        """The splice that counts for ``fibre`` of ``cable`` (on either side), if any."""
        key = cable.strip().casefold()
        for s in self.current_splices():
            if (s.cable_a.casefold() == key and s.fibre_a == fibre) or (
                s.cable_b.casefold() == key and s.fibre_b == fibre
            ):
                return s
        return None

    def plan_ranges(self) -> list[splicing.PlanRange]:
        return [row.as_range() for row in self.plan]

    def next_place(self, tray: int | None = None) -> tuple[int, int] | None:
        """The first free (tray, slot): in ``tray`` if given, else the lowest tray with room."""
        used: dict[int, set[int]] = {}
        for s in self.current_splices():
            if s.tray is not None and s.slot is not None:
                used.setdefault(s.tray, set()).add(s.slot)
        for item in sorted(self.trays, key=lambda t: t.number):
            if tray is not None and item.number != tray:
                continue
            taken = used.get(item.number, set())
            for slot in range(1, item.capacity + 1):
                if slot not in taken:
                    return (item.number, slot)
        return None


def closure_landmarks(closures: list[Closure]) -> list[tuple[str, float]]:
    """``(name, route distance m)`` of every placed closure, in route order (fault landmarks)."""
    return sorted(
        ((c.name, c.route_distance_m) for c in closures if c.route_distance_m is not None),
        key=lambda item: item[1],
    )


# -- judging -----------------------------------------------------------------------------------
Verdict = Literal["pass", "fail", "one direction", "estimate only", "not measured", "no limit"]


@dataclass(frozen=True, slots=True)
class Judgement:
    """What a splice's numbers say: the average, pass or fail, and the warnings that teach."""

    average_db: float | None
    passed: bool | None
    verdict: Verdict
    limit: SpliceLimit | None
    warnings: list[str] = field(default_factory=list)
    #: The fibre-type mismatch sentence, when the two fibres differ (also in ``warnings``).
    mismatch: str | None = None

    def warnings_without_mismatch(self) -> list[str]:
        return [w for w in self.warnings if w != self.mismatch]


def current_limit(limits: list[SpliceLimit], method: str) -> SpliceLimit | None:
    """The newest limit set for ``method`` (a new limit supersedes; the old ones stay)."""
    mine = [item for item in limits if item.method == method]
    return max(mine, key=lambda item: item.at) if mine else None


#: Usual causes of a high fusion splice (common practice).
HIGH_LOSS_CAUSES = (
    "a poor cleave (angle over about 1°, a chip or lip), dirt on the fibre or in the V-grooves, "
    "core offset or a worn electrode; clean, re-cleave and re-splice"
)
GAINER = (
    "one direction reads a gain: normal where the two fibres' mode field diameters differ; "
    "the bidirectional average is what counts"
)
ONE_DIRECTION = (
    "one direction only: not acceptance-grade; measure from the other end and average "
    "(ITU-T G.650.3 App. I)"
)
ESTIMATE_ONLY = "the splicer's estimate is not an acceptance value; measure with an OTDR both ways"


def judge(
    splice: Splice,
    limits: list[SpliceLimit],
    *,
    mfd_a_um: float | None = None,
    mfd_b_um: float | None = None,
    type_a: str = "",
    type_b: str = "",
) -> Judgement:
    """Judge a splice on its bidirectional average against the link's limit for its method.

    With the two fibres' mode-field diameters (at the measuring wavelength) and different types,
    a warning gives the one-way skew each direction is expected to show
    (:func:`fieldkit.calc.splicing.one_way_skew_db`).
    """
    limit = current_limit(limits, splice.method)
    average = splice.average_db
    warnings: list[str] = []
    mismatch = None
    one_way = [v for v in (splice.loss_ab_db, splice.loss_ba_db) if v is not None]
    if any(v < 0 for v in one_way):
        warnings.append(GAINER)
    if (
        mfd_a_um
        and mfd_b_um
        and type_a
        and type_b
        and type_a.casefold() != type_b.casefold()
        and abs(mfd_a_um - mfd_b_um) > 1e-9
    ):
        skew = splicing.one_way_skew_db(mfd_a_um, mfd_b_um)
        mismatch = (
            f"{type_a} to {type_b}: mode field {mfd_a_um:g} µm to {mfd_b_um:g} µm, so A→B is "
            f"expected to read {_signed(skew)} dB and B→A {_signed(-skew)} dB off the true loss "
            "(Gaussian mode field); judge the average"
        )
        warnings.append(mismatch)
    if average is None:
        if one_way:
            verdict: Verdict = "one direction"
            warnings.append(ONE_DIRECTION)
        elif splice.estimate_db is not None:
            verdict = "estimate only"
            warnings.append(ESTIMATE_ONLY)
        else:
            verdict = "not measured"
        return Judgement(None, None, verdict, limit, warnings, mismatch)
    if limit is None:
        return Judgement(average, None, "no limit", None, warnings, mismatch)
    passed = average <= limit.loss_max_db + 1e-9
    if not passed:
        warnings.append(
            f"over the {limit.loss_max_db:.2f} dB limit: re-splice. Usual causes (common "
            f"practice): {HIGH_LOSS_CAUSES}"
        )
    return Judgement(average, passed, "pass" if passed else "fail", limit, warnings, mismatch)


def judge_in(closure: Closure, splice: Splice, limits: list[SpliceLimit]) -> Judgement:
    """:func:`judge` with the fibre types and mode-field diameters of the splice's cables."""
    a, b = closure.cable(splice.cable_a), closure.cable(splice.cable_b)
    return judge(
        splice,
        limits,
        mfd_a_um=a.mfd_um(splice.wavelength_nm) if a else None,
        mfd_b_um=b.mfd_um(splice.wavelength_nm) if b else None,
        type_a=a.fibre_type if a else "",
        type_b=b.fibre_type if b else "",
    )


def _signed(value: float) -> str:
    text = f"{value:+.2f}"
    return "0.00" if text in ("+0.00", "-0.00") else text


# -- words -------------------------------------------------------------------------------------
def colour_words(colour: splicing.Colour) -> str:
    """``orange``, ``orange with a black stripe``, ``black with 2 yellow stripes``."""
    if not colour.tracers:
        return colour.colour
    marks = "a" if colour.tracers == 1 else str(colour.tracers)
    plural = "" if colour.tracers == 1 else "s"
    return f"{colour.colour} with {marks} {colour.tracer_colour} stripe{plural}"


def fibre_words(cable: SpliceCable | None, fibre: int, *, short: bool = False) -> str:
    """``14 (tube 2 orange, fibre orange)``; the number always comes first.

    ``short`` leaves out the words "tube" and "fibre": ``14 orange/orange``.
    """
    position = cable.position(fibre) if cable is not None else None
    if position is None:
        return str(fibre)
    tube, own = colour_words(position.tube_colour), colour_words(position.fibre_colour)
    if short:
        return f"{fibre} {tube}/{own}"
    return f"{fibre} (tube {position.tube} {tube}, fibre {own})"


def verdict_words(j: Judgement) -> str:
    if j.verdict == "pass":
        return "pass"
    if j.verdict == "fail":
        return "FAIL"
    return j.verdict


def tray_map(closure: Closure) -> list[str]:
    """One line per tray: ``tray 1 (12): 1-12 A→B`` listing the fibres of cable A in it."""
    lines = []
    by_tray: dict[int | None, list[Splice]] = {}
    for s in closure.current_splices():
        by_tray.setdefault(s.tray, []).append(s)
    numbers = sorted({t.number for t in closure.trays} | {n for n in by_tray if n is not None})
    for number in numbers:
        tray = closure.tray_of(number)
        used = sorted(by_tray.get(number, []), key=lambda s: (s.slot or 0, s.fibre_a))
        cap = f"{len(used)}/{tray.capacity}" if tray else f"{len(used)}"
        lines.append(f"tray {number} ({cap}): {_fibre_ranges(used)}")
    if by_tray.get(None):
        lines.append(f"no tray: {_fibre_ranges(by_tray[None])}")
    return lines


def _fibre_ranges(splices: list[Splice]) -> str:
    if not splices:
        return "empty"
    parts = []
    for cable in dict.fromkeys(s.cable_a for s in splices):
        numbers = sorted(s.fibre_a for s in splices if s.cable_a == cable)
        runs: list[tuple[int, int]] = []
        for n in numbers:
            if runs and n == runs[-1][1] + 1:
                runs[-1] = (runs[-1][0], n)
            else:
                runs.append((n, n))
        text = ", ".join(f"{a}" if a == b else f"{a}-{b}" for a, b in runs)
        parts.append(f"{cable} {text}")
    return "; ".join(parts)


def closure_summary(closure: Closure, limits: list[SpliceLimit]) -> str:
    """``JC-3: 12 splices, 1 fail, 2 one direction; worst 0.34 dB (fibre 7)``."""
    current = closure.current_splices()
    if not current:
        return f"{closure.name}: no splices yet"
    judged = [(s, judge_in(closure, s, limits)) for s in current]
    counts: dict[str, int] = {}
    for _, j in judged:
        counts[j.verdict] = counts.get(j.verdict, 0) + 1
    noun = "splice" if len(current) == 1 else "splices"
    parts = [f"{len(current)} {noun}"]
    for key in ("fail", "one direction", "estimate only", "not measured", "no limit"):
        if counts.get(key):
            parts.append(f"{counts[key]} {key}")
    text = f"{closure.name}: " + ", ".join(parts)
    averaged = [(s, j.average_db) for s, j in judged if j.average_db is not None]
    if averaged:
        worst, value = max(averaged, key=lambda item: item[1] or 0.0)
        text += f"; worst {value:.2f} dB (fibre {worst.fibre_a})"
    return text


def fmt_loss(value: float | None) -> str:
    """A splice loss to 0.01 dB with a typographic minus for a gain, or a dash."""
    if value is None:
        return "–"
    text = f"{value:.2f}"
    return "0.00" if text == "-0.00" else text.replace("-", "−")


def splice_line(closure: Closure, splice: Splice, j: Judgement, *, short: bool = False) -> str:
    """One line a splicer reads: the fibres with their colours, where, losses and verdict.

    ``fibre 14 (tube 2 orange, fibre orange) → B 14, tray 1 slot 2: A→B 0.05, B→A 0.07,
    average 0.06 dB: pass (limit 0.30 dB)``; ``short`` drops the colours' nouns.
    """
    a = fibre_words(closure.cable(splice.cable_a), splice.fibre_a, short=short)
    b = fibre_words(closure.cable(splice.cable_b), splice.fibre_b, short=True)
    place = ""
    if splice.tray is not None:
        place = f", tray {splice.tray}" + (f" slot {splice.slot}" if splice.slot else "")
    losses = []
    if splice.estimate_db is not None:
        losses.append(f"est {fmt_loss(splice.estimate_db)}")
    if splice.loss_ab_db is not None or splice.loss_ba_db is not None:
        losses.append(f"A→B {fmt_loss(splice.loss_ab_db)}, B→A {fmt_loss(splice.loss_ba_db)}")
    if j.average_db is not None:
        losses.append(f"average {fmt_loss(j.average_db)}")
    measured = ", ".join(losses) + " dB" if losses else "no loss yet"
    limit = f" (limit {j.limit.loss_max_db:.2f} dB)" if j.limit and j.passed is not None else ""
    return (
        f"{splice.cable_a} {a} → {splice.cable_b} {b}{place}: {measured}: {verdict_words(j)}{limit}"
    )


def colour_record(cable: SpliceCable | None, fibre: int) -> dict[str, object]:
    """The colours of a fibre as plain data (the CLI's ``--json``): lower-case words."""
    position = cable.position(fibre) if cable is not None else None
    if position is None:
        return {"fibre": fibre}
    return position_record(position)


def position_record(position: splicing.FibrePosition) -> dict[str, object]:
    def marking(colour: splicing.Colour) -> str:
        return colour_words(colour).partition(" with ")[2]

    return {
        "fibre": position.fibre,
        "tube": position.tube,
        "tube_colour": position.tube_colour.colour,
        "tube_marking": marking(position.tube_colour),
        "fibre_in_tube": position.fibre_in_tube,
        "fibre_colour": position.fibre_colour.colour,
        "fibre_marking": marking(position.fibre_colour),
    }
