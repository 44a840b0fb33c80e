"""The splice workspace's state as a plain model: which closure and fibre, what was typed,
and what Enter does. No Textual here; the screen lays it out and wires keys to it.

Fast entry: the fields Enter walks through are chosen once (``entry``): the estimate alone on a
splicing day, A→B and B→A on a testing day, or all three. Enter in the last of them records the
splice through :mod:`fieldkit.actions.splices`, clears the fields and moves to the next fibre
(the tray slot follows by itself), so a straight-through closure takes the digits and one key
per splice. Nothing typed is dropped: a bad value stays in its field with the reason beside it,
and a value that would replace a recorded one asks first (Enter again replaces, Esc keeps).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from fieldkit import inputs, safety
from fieldkit.actions import splices as act
from fieldkit.calc import splicing
from fieldkit.calc.units import InputError
from fieldkit.jobs.splices import (
    Closure,
    Judgement,
    SpliceCable,
    closure_summary,
    colour_words,
    fmt_loss,
    judge_in,
    splice_line,
    verdict_words,
)
from fieldkit.presets import PresetLibrary, load_presets

FIELDS: tuple[str, ...] = ("estimate", "ab", "ba")
LABELS = {"estimate": "Estimate dB", "ab": "A→B dB", "ba": "B→A dB"}
ENTRY_MODES: dict[str, tuple[str, ...]] = {
    "estimate": ("estimate",),
    "otdr": ("ab", "ba"),
    "all": ("estimate", "ab", "ba"),
}
_ARGS = {"estimate": "estimate_db", "ab": "loss_ab_db", "ba": "loss_ba_db"}

#: Colour words to terminal colours, for the optional swatch (the words always show too).
SWATCH = {
    "blue": "#1f5fd1",
    "orange": "#ff8c00",
    "green": "#1a9e3a",
    "brown": "#8b4a1c",
    "slate": "#6f7f8f",
    "white": "#f4f4f4",
    "red": "#d81e1e",
    "black": "#111111",
    "yellow": "#f2d400",
    "violet": "#8a2be2",
    "rose": "#ff7fb0",
    "aqua": "#18d6d6",
}

SAFETY_SHORT = safety.SPLICING_SHORT


@dataclass
class Step:
    """What the screen does after a key: focus a field, show a line, an error, a question."""

    focus: str | None = None
    message: str = ""
    warnings: list[str] = field(default_factory=list)
    error: tuple[str, str] | None = None
    question: str | None = None
    recorded: bool = False


@dataclass
class ClosureSetup:
    """The set-up form of a new closure, as typed."""

    name: str = ""
    route: str = ""
    cable_a: str = "A"
    count_a: str = "144"
    cable_b: str = "B"
    count_b: str = "144"
    per_tube: str = "12"
    trays: str = "12"
    capacity: str = "12"
    type_a: str = ""
    type_b: str = ""
    limit: str = ""
    plan: str = "straight"


class SpliceSession:
    """One closure of one link being spliced."""

    def __init__(self, store: Any, job_id: str, link: str, closure: str, by: str = "") -> None:
        self.store, self.job_id, self.link, self.closure_name, self.by = (
            store,
            job_id,
            link,
            closure,
            by,
        )
        self.entry: tuple[str, ...] = ENTRY_MODES["estimate"]
        self.pos = 0
        self.texts: dict[str, str] = dict.fromkeys(FIELDS, "")
        self.fibre = 1
        self.swatch = True
        self._confirm: tuple[int, tuple[str, ...]] | None = None
        self.closure: Closure = Closure(name=closure)
        self.limits: list[Any] = []
        self.job_name = ""
        self.link_label = link
        self.reload()
        first_free = self._first_unspliced()
        self.fibre = first_free if first_free is not None else 1

    # -- set-up ------------------------------------------------------------------------------
    @staticmethod
    def start(
        store: Any,
        job_id: str,
        link: str,
        form: ClosureSetup,
        by: str = "",
        library: PresetLibrary | None = None,
    ) -> str:
        """Create a closure from the set-up form; returns its name. Raises InputError naming
        the field. The plan may be typed or a splice-plan preset's name."""
        from fieldkit.calc.units import Kind, parse

        library = library or load_presets()
        name = form.name.strip()
        if not name:
            raise InputError("closure: give the closure a name")
        route = None
        if form.route.strip():
            route = parse(form.route, Kind.LENGTH, default_unit="m", what="route").to("m")
        count_a = inputs.count(form.count_a, "fibres A")
        count_b = inputs.count(form.count_b, "fibres B")
        per_tube = inputs.count(form.per_tube, "per tube")
        trays = inputs.count(form.trays, "trays", high=200) if form.trays.strip() else 0
        capacity = inputs.count(form.capacity, "tray size", high=1000) if trays else 0
        cables = [
            act.make_cable(
                form.cable_a or "A",
                fibre_count=count_a,
                per_tube=per_tube,
                fibre_type=form.type_a,
                library=library,
                by=by,
            ),
            act.make_cable(
                form.cable_b or "B",
                fibre_count=count_b,
                per_tube=per_tube,
                fibre_type=form.type_b,
                library=library,
                by=by,
            ),
        ]
        if cables[0].name.casefold() == cables[1].name.casefold():
            raise InputError("cable B: give it a name of its own")
        probe = Closure(name=name, cables=cables)
        plan = form.plan.strip()
        if plan.casefold() in {n.casefold() for n in library.splice_plans}:
            plan = library.find("splice_plans", plan).plan
        plan_rows = act.parse_plan_for(probe, plan) if plan else []
        limit = _limit(form.limit, library, by) if form.limit.strip() else None
        act.add_closure(store, job_id, link, name, route_distance_m=route, by=by)
        if limit is not None:
            act.set_splice_limit(store, job_id, link, limit)
        for cable in cables:
            act.add_cable(
                store, job_id, link, name, cable.name, fibre_count=cable.fibre_count,
                per_tube=cable.per_tube, fibre_type=cable.fibre_type, library=library, by=by,
            )  # fmt: skip
        if trays:
            act.add_trays(store, job_id, link, name, list(range(1, trays + 1)), capacity, by=by)
        if plan_rows:
            act.set_plan(store, job_id, link, name, form.plan, library=library)
        return name

    # -- reading the job -----------------------------------------------------------------------
    def reload(self) -> None:
        job = self.store.load(self.job_id)
        link = act.find_link(job, self.link)
        self.closure = act.find_closure(link, self.closure_name)
        self.limits = list(link.splice_limits)
        self.job_name, self.link_label = job.name, link.label

    @property
    def cable_a(self) -> SpliceCable | None:
        return self.closure.cables[0] if self.closure.cables else None

    @property
    def cable_b(self) -> SpliceCable | None:
        cables = self.closure.cables
        return cables[1] if len(cables) > 1 else (cables[0] if cables else None)

    @property
    def count(self) -> int | None:
        return self.cable_a.fibre_count if self.cable_a else None

    def _first_unspliced(self) -> int | None:
        a = self.cable_a
        if a is None:
            return None
        top = a.fibre_count or max((s.fibre_a for s in self.closure.splices), default=0) + 1
        for n in range(1, top + 1):
            if self.closure.current_for(a.name, n) is None:
                return n
        return None

    def target(self) -> tuple[str, int]:
        """Where the current fibre goes: the plan's cable and fibre, else B's same number."""
        a, b = self.cable_a, self.cable_b
        mapped = splicing.plan_target(self.closure.plan_ranges(), a.name, self.fibre) if a else None
        if mapped and mapped[0] is not None:
            return mapped[0], mapped[1]
        return (b.name if b else "B"), self.fibre

    def current(self) -> Any:
        return self.closure.current_for(self.cable_a.name, self.fibre) if self.cable_a else None

    # -- lines the screen shows ----------------------------------------------------------------
    def where_line(self, *, short: bool = False, width: int | None = None) -> str:
        """Job, link and closure; in ``width`` columns the job's name goes first, then the
        word "closure" and the route, so the closure's name stays whole; a name that still
        does not fit ends in "…" where it is cut (never cut silently)."""
        route = self.closure.route_distance_m
        place = f" · route {route:.0f} m" if route is not None else ""
        name = self.closure.name
        lines = [
            f"{self.link_label} · {name}{place}",
            f"{self.link_label} · {name}",
            name,
        ]
        if not short:
            lines[:0] = [
                f"{self.job_name} · {self.link_label} · closure {name}{place}",
                f"{self.link_label} · closure {name}{place}",
                f"{self.link_label} · closure {name}",
            ]
        if width is None:
            return lines[0]
        line = next((line for line in lines if len(line) <= width), lines[-1])
        return line if len(line) <= width else line[: max(1, width - 1)] + "…"

    def fibre_line(self) -> str:
        """``Fibre 14 of 144 → B 14 · tray 2 slot 2`` (or the splice already there)."""
        cable_b, fibre_b = self.target()
        total = f" of {self.count}" if self.count else ""
        existing = self.current()
        if existing is not None:
            where = f"tray {existing.tray} slot {existing.slot}" if existing.tray else "no tray"
            return (
                f"Fibre {self.fibre}{total} → {existing.cable_b} {existing.fibre_b} · {where} · "
                "spliced"
            )
        place = self.closure.next_place()
        if place:
            where = f"tray {place[0]} slot {place[1]}"
        else:
            where = "trays full" if self.closure.trays else "no trays"
        parked = self._parked()
        return f"Fibre {self.fibre}{total} → {cable_b} {fibre_b} · {where}" + (
            " · plan parks it" if parked else ""
        )

    def _parked(self) -> bool:
        a = self.cable_a
        mapped = splicing.plan_target(self.closure.plan_ranges(), a.name, self.fibre) if a else None
        return bool(mapped and mapped[0] is None)

    def colours(self) -> list[tuple[str, str]]:
        """``[("tube 2", "orange"), ("fibre 2", "orange with a black stripe")]`` (words)."""
        a = self.cable_a
        position = a.position(self.fibre) if a else None
        if position is None:
            return []
        return [
            (f"tube {position.tube}", colour_words(position.tube_colour)),
            (f"fibre {position.fibre_in_tube}", colour_words(position.fibre_colour)),
        ]

    def rows(self, *, short: bool = False) -> list[tuple[int, str, str]]:
        """The list of splices: (fibre, line, mark) with mark "fail", "warn" or ""."""
        out = []
        for s in self.closure.current_splices():
            j = judge_in(self.closure, s, self.limits)
            out.append((s.fibre_a, self._row(s, j, short), _mark(j)))
        return out

    def _row(self, s: Any, j: Judgement, short: bool) -> str:
        if short:
            verdict = _SHORT_VERDICT.get(j.verdict, verdict_words(j))
            return (
                f"{s.fibre_a:>4} {fmt_loss(s.estimate_db):>5} {fmt_loss(s.loss_ab_db):>5} "
                f"{fmt_loss(s.loss_ba_db):>5} {fmt_loss(j.average_db):>5} {verdict}"
            )
        return splice_line(self.closure, s, j, short=True)

    def summary(self) -> str:
        return closure_summary(self.closure, self.limits)

    # -- typing and Enter ----------------------------------------------------------------------
    def set_entry(self, mode: str) -> None:
        self.entry = ENTRY_MODES[mode]
        self.pos = 0

    @property
    def field(self) -> str:
        """The field the one entry line is taking now."""
        return self.entry[min(self.pos, len(self.entry) - 1)]

    def check(self, text: str) -> bool:
        """True when ``text`` may be taken (empty, or a loss in dB): the entry line empties."""
        if not text.strip():
            return True
        try:
            inputs.splice_loss_db(text, LABELS[self.field])
        except InputError:
            return False
        return True

    def enter_value(self, text: str) -> Step:
        """Enter on the one entry line: the text goes into the current field, then the next
        field of the entry takes the line, or the splice is recorded. An empty Enter while a
        question is open answers it (replace)."""
        if self._confirm is not None and not text.strip():
            step = self.record(focus=self.entry[0])
        else:
            self.type(self.field, text)
            step = self.enter(self.field)
        if step.focus in self.entry and not step.error:
            self.pos = self.entry.index(step.focus)
        return step

    def typed_line(self) -> str:
        """What is typed for this fibre so far: ``est 0.02 · A→B −0.05 · B→A _``."""
        parts = []
        for name in self.entry:
            text = self.texts[name].strip() or ("_" if name == self.field else "–")
            parts.append(f"{_short(_ARGS[name])} {text}")
        return " · ".join(parts)

    def type(self, name: str, text: str) -> None:
        if self.texts[name] != text:
            self.texts[name] = text
            self._confirm = None  # a changed value asks again

    def _values(self, names: tuple[str, ...]) -> dict[str, float | None]:
        out: dict[str, float | None] = {}
        for name in names:
            text = self.texts[name].strip()
            try:
                out[_ARGS[name]] = inputs.splice_loss_db(text, LABELS[name]) if text else None
            except InputError as exc:
                raise _FieldError(name, str(exc)) from None
        return out

    def enter(self, name: str) -> Step:
        """Enter in field ``name``: check it, then the next field of the entry, or record."""
        try:
            self._values((name,))
        except _FieldError as exc:
            return Step(focus=name, error=(exc.name, exc.message))
        order = self.entry if name in self.entry else (name,)
        position = order.index(name)
        if position + 1 < len(order):
            return Step(focus=order[position + 1])
        return self.record(focus=order[0])

    def record(self, *, focus: str | None = None, resplice: bool = False) -> Step:
        """Record the typed values for the current fibre and go on to the next."""
        focus = focus or self.entry[0]
        try:
            values = self._values(FIELDS)
        except _FieldError as exc:
            return Step(focus=exc.name, error=(exc.name, exc.message))
        existing = self.current()
        try:
            if existing is not None and not resplice:
                if all(v is None for v in values.values()):
                    self.move(1)
                    return Step(focus=focus, message=f"fibre {self.fibre - 1}: kept as recorded")
                key = (self.fibre, tuple(self.texts[n] for n in FIELDS))
                update = act.update_losses(
                    self.store, self.job_id, self.link, self.closure.id, existing.id,
                    estimate_db=values["estimate_db"], loss_ab_db=values["loss_ab_db"],
                    loss_ba_db=values["loss_ba_db"], overwrite=self._confirm == key,
                )  # fmt: skip
                if update.would_overwrite:
                    self._confirm = key
                    what = ", ".join(
                        f"{_short(f)} {fmt_loss(old)} → {fmt_loss(new)} dB"
                        for f, old, new in update.would_overwrite
                    )
                    return Step(
                        focus=focus,
                        question=f"fibre {self.fibre} already holds {what}: Enter replaces, "
                        "Esc keeps what is recorded",
                    )
                splice, judgement, notices = update.splice, update.judgement, []
                fresh = None
            else:
                target_cable, target_fibre = self.target()
                done = act.record_splice(
                    self.store, self.job_id, self.link, self.closure.id,
                    fibre_a=self.fibre, fibre_b=target_fibre, cable_b=target_cable,
                    resplice=resplice, by=self.by, estimate_db=values["estimate_db"],
                    loss_ab_db=values["loss_ab_db"], loss_ba_db=values["loss_ba_db"],
                )  # fmt: skip
                splice, judgement, notices = done.splice, done.judgement, done.notices
                fresh = (done.closure, done.limits)
        except act.AlreadySpliced as exc:
            return Step(focus=focus, error=(focus, str(exc)))
        except InputError as exc:
            return Step(focus=focus, error=(focus, str(exc)))
        self._confirm = None
        self.texts = dict.fromkeys(FIELDS, "")
        if fresh is not None:  # the closure as just saved: no second read of the file
            self.closure, self.limits = fresh
        else:
            self.reload()
        assert splice is not None and judgement is not None
        line = splice_line(self.closure, splice, judgement, short=True)
        done_fibre = self.fibre
        self.move(1)
        if self.count and done_fibre >= self.count:
            line += f" · all {self.count} fibres done" if self._first_unspliced() is None else ""
        return Step(
            focus=focus, message=line, warnings=[*notices, *judgement.warnings], recorded=True
        )

    def cancel_question(self) -> None:
        self._confirm = None

    def resplice(self) -> Step:
        """Re-splice the current fibre with what is typed (the earlier splice stays as
        history)."""
        if self.current() is None:
            return Step(error=(self.entry[0], f"fibre {self.fibre} has no splice to re-splice"))
        return self.record(resplice=True)

    def move(self, delta: int) -> None:
        top = self.count or 6912
        self.fibre = max(1, min(top, self.fibre + delta))
        self._confirm = None
        self.pos = 0

    def goto(self, fibre: int) -> None:
        self.fibre = fibre
        self.move(0)


_SHORT_VERDICT = {
    "estimate only": "est only",
    "one direction": "one way",
    "not measured": "no loss",
}


def _limit(text: str, library: PresetLibrary, by: str) -> Any:
    """The fusion splice limit typed in the set-up: a splice preset's name, or a figure in dB."""
    from fieldkit.calc.reference import loss_limit_db
    from fieldkit.jobs.splices import SpliceLimit

    text = text.strip()
    if text.casefold() in {name.casefold() for name in library.splices}:
        return act.limit_from_preset("fusion", text, library, by=by)
    value = loss_limit_db(text, "limit")
    if value > 5:
        raise InputError(f"limit: {value:g} dB is not a splice limit (at most 5 dB)")
    return SpliceLimit(
        method="fusion", loss_max_db=value, source=f"typed by {by or 'the operator'}", by=by
    )


def _short(name: str) -> str:
    return {"estimate_db": "est", "loss_ab_db": "A→B", "loss_ba_db": "B→A"}[name]


def _mark(j: Judgement) -> str:
    if j.verdict == "fail":
        return "fail"
    return "warn" if j.verdict in ("one direction", "estimate only") else ""


class _FieldError(Exception):
    def __init__(self, name: str, message: str) -> None:
        super().__init__(message)
        self.name, self.message = name, message


def safety_lines() -> tuple[str, ...]:
    return safety.SPLICING
