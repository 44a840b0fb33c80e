"""Meter lines: a grid cell's loss and mark, what a reading came to, the save line and the
summary (per wavelength the tally by the one counting rule and the worst fibres, then the
references in use). Width-aware; a negative number takes the one minus
(:func:`fieldkit.text.numbers.minus`).

Nothing here decides: the session (``fieldkit.tui.meter_session``) counts, judges and queues;
these functions only say it.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from datetime import datetime

from fieldkit import safety
from fieldkit.calc import reference as ref
from fieldkit.jobs.counting import Tally
from fieldkit.text.layout import together
from fieldkit.text.numbers import minus
from fieldkit.text.words import counted

#: The mark beside a loss and its colour, by verdict: the verdict reads without colour too.
MARKS: dict[ref.Status, tuple[str, str]] = {
    ref.Status.PASS: (" ", "green"),
    ref.Status.FAIL: ("✗", "bold red"),
    ref.Status.REFERENCE_PROBLEM: ("!", "bold yellow"),
    ref.Status.NO_LIMIT: (" ", ""),
}
#: Beside the verdict's mark when the reference of the reading drifted at its recheck.
DOUBT_MARK = "?"


def fit(width: int, *choices: str) -> str:
    """The first of ``choices`` no wider than ``width`` (0: no limit); else the last."""
    return next((c for c in choices if not width or len(c) <= width), choices[-1])


def cell_mark(loss_db: float, status: ref.Status, in_doubt: bool) -> tuple[str, str]:
    """A grid cell's text and style: the loss, the verdict's mark, and "?" when in doubt.

    In doubt keeps the verdict's mark beside the "?" (``3.50✗?``): a failing fibre measured
    against a drifted reference still shows that it failed.
    """
    mark, style = MARKS[status]
    if in_doubt:
        mark += DOUBT_MARK
        style = style if status in (ref.Status.FAIL, ref.Status.REFERENCE_PROBLEM) else "yellow"
    return minus(f"{loss_db:6.2f}{mark:<2}"), style


def verdict_words(fibre: int, heading: str, verdict: ref.Verdict, *, short: bool) -> str:
    """What the reading in column ``heading`` came to; ``short``: in one line of 42 columns
    (a phone terminal)."""
    return minus(_verdict(fibre, heading, verdict, short=short))


def _verdict(fibre: int, heading: str, verdict: ref.Verdict, *, short: bool) -> str:
    head = f"fibre {fibre} {heading}: {verdict.loss_db:.2f} dB"
    if verdict.status is ref.Status.REFERENCE_PROBLEM:
        if short:
            return f"{head} negative: bad reference? Clean, re-reference."
        return f"{head} — negative: a reference problem, not a good fibre. Clean, re-reference."
    if verdict.margin_db is None:
        return f"{head} (no limit)"
    word = "pass" if verdict.status is ref.Status.PASS else "FAIL"
    if short:
        return f"{head} {word} {verdict.margin_db:+.2f}"
    return f"{head} {word}, margin {verdict.margin_db:+.2f} dB"


def save_line(
    link_label: str | None,
    *,
    pending: int,
    error: str | None,
    saved_at: datetime | None,
    open_key: str,
) -> str:
    """Whether the readings are safe in a job: where they go, how many wait, the last save;
    ``link_label`` None: no job chosen yet."""
    if link_label is None:
        return f"{open_key}: choose a job to save into"
    if error:
        return f"NOT SAVED ({pending} waiting): {error}"
    where = f"Saving into {link_label}"
    if pending:
        return f"{where}: {pending} waiting"
    if saved_at is None:
        return where  # nothing new typed yet
    return f"{where}: saved {saved_at.strftime('%H:%M:%S')}"


@dataclass(frozen=True, slots=True)
class ReferenceShown:
    """A reference in use, as the summary lists it."""

    wavelength_nm: float
    direction: str
    level_dbm: float
    set_at: datetime
    in_doubt: bool


def summary_lines(
    *,
    width: int,
    save: str,
    wavelengths: Sequence[float],
    fibres: int,
    directions: Sequence[str],
    readings: Sequence[tuple[int, float, str, float]],
    limits_db: dict[float, float | None],
    tallies: dict[float, Tally],
    references: Sequence[ReferenceShown],
    at: datetime,
) -> list[str]:
    """The meter summary: the save line first, per wavelength the tally and the worst fibres,
    then the references in use. ``width``: the lines fit it (0: no limit).

    ``readings`` are (fibre, wavelength nm, direction, loss dB); ``tallies`` come from the one
    counting rule (:mod:`fieldkit.jobs.counting`).
    """
    lines: list[str] = []
    summaries = {
        s.wavelength_nm: s for s in ref.summarise(list(readings), limits_db, worst_count=3)
    }
    for w in wavelengths:
        s = summaries.get(w)
        limit = limits_db[w]
        limit_words = f"limit {limit:.2f} dB" if limit is not None else "(no limit)"
        if s is None:
            lines.append(f"{w:g} nm {limit_words}: no readings")
            continue
        tally = tallies[w]
        tested = f"{s.fibres}/{fibres}"
        # Every count, its number and words kept together; where the line is narrow the zero
        # counts go (what is left still adds up), and where it is narrower still the counts go
        # on a line of their own.
        every = ", ".join(together(words) for _, words in tally.parts())
        # One wording at every width (Jobs' words): "reference problem", not "bad reference"
        # at 44 columns only (review F1 #6).
        some = ", ".join(together(words) for _, words in tally.parts(zeros=False))
        one_line = fit(
            width,
            f"{w:g} nm {limit_words}: {tested}, {every}",
            f"{w:g} {limit_words} {tested}: {some}",
            "",
        )
        if one_line:
            lines.append(one_line)
        else:
            lines.append(f"{w:g} nm {limit_words}: {tested}")
            lines.append(f"  {some}")
        # A negative loss is a reference problem, not a low loss: never among the worst.
        worst = [f"fibre {f} {loss:.2f} dB" for f, loss in s.worst if loss >= 0]
        while len(worst) > 1 and width and len("  worst: " + ", ".join(worst)) > width:
            worst.pop()
        if worst:
            lines.append("  worst: " + ", ".join(together(x) for x in worst))
    # Whether the readings are safe in a job matters most: first, so a phone terminal's five
    # rows show it however many lines the counts take.
    lines.insert(0, save)
    refs = []
    for r in references:
        minutes = int((at - r.set_at).total_seconds() // 60)
        arrow = "" if len(directions) == 1 else (" →" if r.direction == "A->B" else " ←")
        doubt = " DRIFTED" if r.in_doubt else ""
        age = together(f"set {minutes} min ago")
        refs.append(f"  {r.wavelength_nm:g}{arrow} {r.level_dbm:.2f} dBm, {age}{doubt}")
    lines.append("References:" if refs else "References: none set")
    lines += refs
    return [minus(line) for line in lines]  # the one minus (text/numbers.py)


def set_reference_note(heading: str, *, narrow: bool, details_open: bool = False) -> str:
    """The note while column ``heading`` has no reference: set one, with the light caution
    (setting a reference means handling live cords); "more under Reference details" only
    while they are folded (open, the whole caution shows under them)."""
    if narrow:
        return f"Set Ref {heading}, then type readings.\n⚠ {safety.INVISIBLE_LIGHT_SHORT}"
    more = "" if details_open else " (more under Reference details)"
    return (
        f"Set the reference for {heading} (Ref), then type readings.\n"
        f"⚠ {safety.INVISIBLE_LIGHT_SHORT}{more}"
    )


def reference_note(
    method: ref.Method,
    *,
    narrow: bool,
    budget_limit_db: float | None,
    drifted: bool,
    warnings: Sequence[str],
) -> str:
    """The note under the set-up while a reference is set: the light caution first (readings
    mean live cords all session), a drift, the reference's warnings, then the method's end
    connections and a limit taken from the budget (``budget_limit_db``; None: typed or none)."""
    # The method's TIA letter is in the Method field's tooltip; a phone has one line here.
    name = method.value if narrow else method.label
    line = f"{name}: {method.end_connections} of 2 end connections counted"
    if budget_limit_db is not None:
        left_out = 2 - method.end_connections
        # On a phone terminal the limit goes on its own line (each fits 42 columns).
        line += "\n" if narrow else "; "
        line += f"limit {budget_limit_db:.2f} dB"
        if left_out:
            # "end" on a phone: the line above says which connections.
            what = "connection" if narrow else "end connection"
            line += f": budget less {counted(left_out, what)}"
        else:
            line += " from the budget"
    # A drifted reference and the warnings about this one come before the method, so they
    # are never the part cut off.
    lines = [f"⚠ {safety.INVISIBLE_LIGHT_SHORT}"]
    if drifted:
        lines.append("This reference drifted at its recheck: set a new one and retest.")
    lines += [f"⚠ {w}" for w in warnings]
    lines.append(line)
    return minus("\n".join(lines))


def recheck_words(heading: str, drift: ref.Drift, *, short: bool = False) -> str:
    """What a reference recheck found; ``short``: one line of 42 columns."""
    if short and not drift.within:
        return minus(
            f"{heading}: drift {drift.drift_db:+.2f} > ±{drift.tolerance_db:.2f} dB: retest"
        )
    return minus(f"{heading}: {drift.message}")
