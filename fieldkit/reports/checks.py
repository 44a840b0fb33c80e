"""A stored application or transceiver check, written as sentences and a table.

The budget workspace and ``fieldkit budget --job`` store the checks as plain dicts (the
``as_dict`` of :class:`fieldkit.calc.budget.ApplicationCheck` and ``TransceiverCheck``). A file
may be old, hand-edited or imported, so every figure is read by name and type; one that is
missing or of the wrong type is left out, never shown as raw data. Figures the report does not
know are listed by name, one per row. Sources go to the appendix (returned separately).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from fieldkit.jobs.reports import fmt_db, fmt_m, fmt_nm
from fieldkit.reports.document import Paragraph, Table

APPLICATION_KNOWN = {
    "name",
    "fibre",
    "row_reason",
    "pass",
    "verdict",
    "wavelength_nm",
    "loss_db",
    "loss_max_db",
    "loss_headroom_db",
    "loss_pass",
    "margin_db",
    "margin_headroom_db",
    "margin_pass",
    "length_m",
    "reach_m",
    "length_headroom_m",
    "length_pass",
    "loss_min_db",
    "link_loss_min_db",
    "min_pass",
    "per_wavelength",
    "source",
}
TRANSCEIVER_KNOWN = {
    "name",
    "pass",
    "wavelength_nm",
    "levels_for",
    "power_budget_db",
    "loss_max_db",
    "loss_min_db",
    "margin_db",
    "required_margin_db",
    "margin_pass",
    "received_min_dbm",
    "received_max_dbm",
    "attenuator_needed",
    "attenuator_min_db",
    "attenuator_max_db",
    "attenuator_db",
    "attenuator_fits",
    "source",
    "verdict",
}


@dataclass
class CheckText:
    """The blocks of a check, and its source for the appendix."""

    blocks: list[Paragraph | Table] = field(default_factory=list)
    source: str = ""


def _num(data: dict[str, Any], key: str) -> float | None:
    value = data.get(key)
    if isinstance(value, bool) or not isinstance(value, int | float):
        return None
    return float(value)


def _flag(data: dict[str, Any], key: str) -> bool | None:
    value = data.get(key)
    return value if isinstance(value, bool) else None


def _text(data: dict[str, Any], key: str) -> str:
    value = data.get(key)
    return value.strip() if isinstance(value, str) else ""


def _signed(value: float | None) -> str:
    return "" if value is None else ("+" if value >= 0 else "") + fmt_db(value)


def _ok(flag: bool | None, bad: str = "over") -> str:
    return "" if flag is None else ("within" if flag else bad)


def plain_value(value: Any) -> str:
    """A figure the report does not know, as words: numbers to 4 significant figures, yes/no,
    a list as its items separated by ';' (never JSON)."""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int | float):
        return f"{value:.4g}"
    if value is None:
        return "not given"
    if isinstance(value, dict):
        return "; ".join(f"{k.replace('_', ' ')} {plain_value(v)}" for k, v in value.items())
    if isinstance(value, list):
        return "; ".join(plain_value(v) for v in value)
    return str(value)


def _others(data: dict[str, Any], known: set[str]) -> Table | None:
    rows = [(str(k), v) for k, v in data.items() if k not in known]
    if not rows:
        return None
    table = Table(["Further figure", "Value"], caption="Further figures as stored")
    for k, v in rows:
        table.add([k.replace("_", " "), plain_value(v)])
    return table


def application_text(data: dict[str, Any]) -> CheckText:
    """``Application 10GBASE-LR (singlemode): FAIL. The highest link loss, ...``."""
    out = CheckText(source=_text(data, "source"))
    name = _text(data, "name") or "application"
    fibre = _text(data, "fibre")
    verdict = _text(data, "verdict")
    passed = _flag(data, "pass")
    word = {"pass": "PASS", "fail": "FAIL", "no-margin": "FITS, NO MARGIN"}.get(
        verdict, "PASS" if passed else "FAIL" if passed is False else "not judged"
    )
    head = f"Application {name}" + (f" ({fibre})" if fibre else "") + f": {word}."
    sentences = [head]
    loss, loss_max = _num(data, "loss_db"), _num(data, "loss_max_db")
    room, nm = _num(data, "loss_headroom_db"), _num(data, "wavelength_nm")
    if loss is not None and loss_max is not None:
        at = f" at {fmt_nm(nm)} nm" if nm is not None else ""
        if room is None:
            room = loss_max - loss
        if room >= 0:
            sentences.append(
                f"The highest link loss, {fmt_db(loss)} dB{at}, is within the channel's maximum "
                f"of {fmt_db(loss_max)} dB with {fmt_db(room)} dB to spare."
            )
        else:
            sentences.append(
                f"The highest link loss, {fmt_db(loss)} dB{at}, is over the channel's maximum "
                f"of {fmt_db(loss_max)} dB by {fmt_db(-room)} dB."
            )
    margin, margin_room = _num(data, "margin_db"), _num(data, "margin_headroom_db")
    if margin is not None and margin_room is not None and margin > 0:
        if margin_room >= 0:
            sentences.append(f"The design margin of {fmt_db(margin)} dB fits as well.")
        else:
            sentences.append(
                f"With the design margin of {fmt_db(margin)} dB on top it is "
                f"{fmt_db(-margin_room)} dB over."
            )
    length, reach = _num(data, "length_m"), _num(data, "reach_m")
    if length is not None and reach is not None:
        within = length <= reach
        sentences.append(
            f"The length, {fmt_m(length)} m, is {'within' if within else 'beyond'} the "
            f"reach of {fmt_m(reach)} m."
        )
    low, low_min = _num(data, "link_loss_min_db"), _num(data, "loss_min_db")
    if low_min is not None and low is not None:
        ok = low >= low_min
        sentences.append(
            f"The lowest plausible link loss, {fmt_db(low)} dB, is "
            f"{'at or above' if ok else 'below'} the class minimum of {fmt_db(low_min)} dB."
        )
    reason = _text(data, "row_reason")
    if reason:
        sentences.append(f"Limits chosen: {reason}.")
    out.blocks.append(Paragraph(" ".join(sentences)))

    table = Table(
        ["Check", "Link", "Limit", "Headroom", "Result"],
        numeric={1, 2, 3},
        caption=f"Application {name}: the checks",
    )
    if loss is not None and loss_max is not None:
        table.add(
            [
                "Loss (highest, dB)",
                fmt_db(loss),
                fmt_db(loss_max),
                _signed(room),
                _ok(_flag(data, "loss_pass")) or _ok(room is not None and room >= 0),
            ],
            "fail" if _flag(data, "loss_pass") is False else "",
        )
    if margin is not None and margin_room is not None and loss is not None:
        table.add(
            [
                f"Loss + design margin {fmt_db(margin)} dB",
                fmt_db(loss + margin),
                fmt_db(loss_max),
                _signed(margin_room),
                _ok(_flag(data, "margin_pass")),
            ],
            "doubt" if _flag(data, "margin_pass") is False else "",
        )
    if length is not None and reach is not None:
        headroom = _num(data, "length_headroom_m")
        table.add(
            [
                "Length (m)",
                fmt_m(length),
                fmt_m(reach),
                "" if headroom is None else ("+" if headroom >= 0 else "") + fmt_m(headroom),
                _ok(_flag(data, "length_pass"), "beyond"),
            ],
            "fail" if _flag(data, "length_pass") is False else "",
        )
    if low_min is not None and low is not None:
        table.add(
            [
                "Lowest loss vs class minimum (dB)",
                fmt_db(low),
                fmt_db(low_min),
                _signed(low - low_min),
                _ok(_flag(data, "min_pass"), "below"),
            ],
            "fail" if _flag(data, "min_pass") is False else "",
        )
    per = data.get("per_wavelength")
    # one wavelength: its row is the "highest" row already
    if isinstance(per, list) and len(per) > 1:
        for row in per:
            if not isinstance(row, dict):
                continue
            w, wl, wr = _num(row, "wavelength_nm"), _num(row, "loss_db"), _num(row, "headroom_db")
            if w is None or wl is None:
                continue
            table.add(
                [
                    f"Loss at {fmt_nm(w)} nm (dB)",
                    fmt_db(wl),
                    fmt_db(loss_max),
                    _signed(wr),
                    "" if wr is None else _ok(wr >= 0),
                ],
                "fail" if wr is not None and wr < 0 else "",
            )
    if table.rows:
        out.blocks.append(table)
    others = _others(data, APPLICATION_KNOWN)
    if others is not None:
        out.blocks.append(others)
    return out


def transceiver_text(data: dict[str, Any]) -> CheckText:
    """``Transceiver LR optics at 1310 nm: PASS. ...`` and a table of its levels."""
    out = CheckText(source=_text(data, "source"))
    name = _text(data, "name") or "transceiver"
    nm = _num(data, "wavelength_nm")
    family = _text(data, "levels_for")
    passed = _flag(data, "pass")
    word = "PASS" if passed else "FAIL" if passed is False else "not judged"
    at = f" at {fmt_nm(nm)} nm" if nm is not None else ""
    sentences = [
        f"Transceiver {name}{at}" + (f" ({family} levels)" if family else "") + f": {word}."
    ]
    budget = _num(data, "power_budget_db")
    loss_max = _num(data, "loss_max_db")
    margin, required = _num(data, "margin_db"), _num(data, "required_margin_db")
    if budget is not None and loss_max is not None and margin is not None:
        enough = required is None or margin >= required
        need = f" the design margin of {fmt_db(required)} dB" if required is not None else ""
        sentences.append(
            f"Its power budget of {fmt_db(budget)} dB, less the highest link loss of "
            f"{fmt_db(loss_max)} dB, leaves {fmt_db(margin)} dB"
            + (f", {'at least' if enough else 'less than'}{need}." if need else ".")
        )
    rx_lo, rx_hi = _num(data, "received_min_dbm"), _num(data, "received_max_dbm")
    if rx_lo is not None and rx_hi is not None:
        sentences.append(f"The receiver gets between {fmt_db(rx_lo)} dBm and {fmt_db(rx_hi)} dBm.")
    needed = _flag(data, "attenuator_needed")
    att, att_lo, att_hi = (
        _num(data, "attenuator_db"),
        _num(data, "attenuator_min_db"),
        _num(data, "attenuator_max_db"),
    )
    if needed is False:
        sentences.append("No attenuator is needed.")
    elif needed:
        if _flag(data, "attenuator_fits") and att is not None:
            window = (
                f" (anything from {fmt_db(att_lo)} to {fmt_db(att_hi)} dB fits)"
                if att_lo is not None and att_hi is not None
                else ""
            )
            sentences.append(
                f"The strongest signal overloads the receiver: fit a {fmt_db(att)} dB "
                f"attenuator{window}."
            )
        else:
            sentences.append(
                "The strongest signal overloads the receiver and no attenuator fits: one large "
                "enough to stop the overload leaves too little light at the weakest case."
            )
    out.blocks.append(Paragraph(" ".join(sentences)))
    # one row: the levels read across, so the check takes two lines of a page, not ten
    cells: list[tuple[str, str]] = []
    for label, key, unit in (
        ("Power budget", "power_budget_db", "dB"),
        ("Highest loss", "loss_max_db", "dB"),
        ("Lowest loss", "loss_min_db", "dB"),
        ("Margin left", "margin_db", "dB"),
        ("Design margin", "required_margin_db", "dB"),
        ("Weakest Rx", "received_min_dbm", "dBm"),
        ("Strongest Rx", "received_max_dbm", "dBm"),
        ("Attenuator", "attenuator_db", "dB"),
    ):
        value = _num(data, key)
        if value is None or (key.startswith("attenuator") and not needed):
            continue
        cells.append((f"{label} {unit}", fmt_db(value)))
    table = Table(
        [c[0] for c in cells],
        numeric=set(range(len(cells))),
        caption=f"Transceiver {name}: the levels",
    )
    if cells:
        table.add([c[1] for c in cells])
    if table.rows:
        out.blocks.append(table)
    others = _others(data, TRANSCEIVER_KNOWN)
    if others is not None:
        out.blocks.append(others)
    return out
