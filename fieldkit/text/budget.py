"""The budget's result as lines of text: ``fieldkit budget`` prints them and the budget workspace
shows them, so the two always say the same thing.

Numbers: losses to 0.01 dB, levels to 0.01 dBm, headroom with its sign; negative numbers take the
typographic minus (U+2212) and positive headroom a plus sign, names such as ``10GBASE-LR`` keep
their hyphen. Lines are short (the workspace shows them in a column of about 38 characters at 80
columns; the CLI prints the same lines).
"""

from __future__ import annotations

from typing import Any

from fieldkit.calc.budget import (
    ApplicationCheck,
    BudgetReport,
    TransceiverCheck,
)
from fieldkit.calc.checks import FibreData, LinkChecks
from fieldkit.calc.units import format_number
from fieldkit.text.layout import wrap
from fieldkit.text.numbers import MINUS, minus

#: The word of each application verdict.
VERDICT_WORD = {"pass": "PASS", "no-margin": "FITS, NO MARGIN", "fail": "FAIL"}
#: The sentence a "no-margin" verdict adds.
NO_MARGIN_TEXT = "fits the limits, but not with the design margin"


def db(x: float | None) -> str:
    """A loss or margin: ``6.30 dB``; ``—`` when there is none."""
    return "—" if x is None else minus(f"{x:.2f} dB")


def signed_db(x: float) -> str:
    """A headroom: ``+1.50 dB`` or ``−2.30 dB``."""
    return minus(f"{x:+.2f} dB")


def dbm(x: float) -> str:
    return minus(f"{x:+.2f} dBm")


def nm(x: float) -> str:
    return f"{format_number(x)} nm"


def length(x_m: float) -> str:
    """``12.4 km`` from 1000 m up, else ``350 m``."""
    return f"{format_number(x_m / 1000.0)} km" if abs(x_m) >= 1000 else f"{format_number(x_m)} m"


def signed_length(x_m: float) -> str:
    sign = "+" if x_m >= 0 else MINUS
    return sign + length(abs(x_m))


def verdict_word(verdict: str) -> str:
    return VERDICT_WORD.get(verdict, verdict.upper())


def _ok(flag: bool | None, bad: str) -> str:
    return "n/a" if flag is None else ("ok" if flag else bad)


# -- the loss budget ---------------------------------------------------------------------------


def breakdown_lines(report: BudgetReport, width: int | None = None) -> list[str]:
    """Per wavelength: the maximum and typical totals, the total with the margin, the items.

    With a ``width`` (a workspace panel), longer lines wrap under their own text (an item's
    name under the name, not under its loss), never between a number and its unit.
    """
    r = report.result
    lines: list[str] = []
    for n in r.notes:
        lines += wrap(f"Note: {n}", width, 2)
    for w in r.wavelengths:
        typical = "—" if w.typical_loss_db is None else f"{w.typical_loss_db:.2f}"
        lines += wrap(f"{nm(w.wavelength_nm)}  max {db(w.loss_db)}  typ {typical} dB", width, 2)
        if r.margin_db:
            lines += wrap(f"  with {db(r.margin_db)} margin: {db(w.loss_with_margin_db)}", width, 4)
        for item in w.items:
            lines += wrap(f"  {item.loss_db:6.2f}  {item.name}", width, 10)
    lines.append(f"Fibre length {length(r.length_m)}")
    return lines


def summary_text(report: BudgetReport) -> str:
    """The short result under the link: totals, the checks' verdicts."""
    r = report.result
    text = (
        "Budget: "
        + ", ".join(f"{nm(w.wavelength_nm)} {db(w.loss_db)}" for w in r.wavelengths)
        + (f" (+{db(r.margin_db)} margin)" if r.margin_db else "")
    )
    app = report.application
    if app is not None:
        text += f"\n{app.name}: {verdict_word(app.verdict)}"
    tx = report.transceiver
    if tx is not None:
        text += f"\n{tx.name}: {'PASS' if tx.passed else 'FAIL'}"
        if tx.overload and tx.attenuator_db is not None:
            text += f", add {format_number(tx.attenuator_db)} dB attenuator"
    return text


def source_lines(report: BudgetReport) -> list[str]:
    """Each value used, once, with where it comes from."""
    sources: dict[str, None] = {}
    for w in report.result.wavelengths:
        for item in w.items:
            sources.setdefault(f"• {item.name.split(' × ')[0]}: {item.source}", None)
    return list(sources)


# -- the checks --------------------------------------------------------------------------------


def application_lines(app: ApplicationCheck) -> list[str]:
    """The application check: verdict, the row used, loss, margin, length, class minimum."""
    lines = [f"{app.name} on {app.fibre}: {verdict_word(app.verdict)}"]
    if app.row_reason:
        lines.append(f"judged on {app.row_reason}")
    lines.append(
        f"loss {db(app.loss_db)} of {db(app.loss_max_db)} at {nm(app.wavelength_nm)}: "
        f"headroom {signed_db(app.loss_headroom_db)} {_ok(app.loss_pass, 'OVER')}"
    )
    if app.margin_db:
        lines.append(
            f"after the {db(app.margin_db)} design margin: "
            f"{signed_db(app.margin_headroom_db)} {_ok(app.margin_pass, 'SHORT')}"
        )
    lines.append(
        f"length {length(app.length_m)} of {length(app.reach_m)}: headroom "
        f"{signed_length(app.length_headroom_m)} {_ok(app.length_pass, 'OVER')}"
    )
    if app.loss_min_db is not None:
        lines.append(
            f"lowest plausible {db(app.link_loss_min_db)}, class minimum "
            f"{db(app.loss_min_db)} {_ok(app.min_pass, 'UNDER')}"
        )
    if app.verdict == "no-margin":
        lines.append(NO_MARGIN_TEXT)
    return lines


def transceiver_lines(tx: TransceiverCheck) -> list[str]:
    """The transceiver check: verdict, power budget, margin, received range, attenuator."""
    where = "" if tx.wavelength_nm is None else f" at {nm(tx.wavelength_nm)}"
    lines = [f"{tx.name}{where}: {'PASS' if tx.passed else 'FAIL'}"]
    if tx.family is not None:
        lines.append(f"levels for {tx.family} fibre")
    lines += [
        f"power budget {db(tx.power_budget_db)}",
        f"margin {signed_db(tx.margin_db)} (needs {db(tx.required_margin_db)}) "
        f"{_ok(tx.margin_pass, 'SHORT')}",
        f"received {dbm(tx.received_min_dbm)} to {dbm(tx.received_max_dbm)}",
    ]
    if not tx.overload:
        lines.append("no attenuator needed")
    elif tx.attenuator_fits and tx.attenuator_db is not None:
        lines.append(
            f"overload: add {format_number(tx.attenuator_db)} dB attenuator (fits "
            f"{tx.attenuator_min_db:.2f}–{tx.attenuator_max_db:.2f} dB)"
        )
    else:
        lines.append(
            minus(
                f"overload: needs ≥ {tx.attenuator_min_db:.2f} dB but the margin allows "
                f"{tx.attenuator_max_db:.2f} dB: no attenuator fits"
            )
        )
    return lines


def _ps(x: float) -> str:
    return minus(f"{x:.1f} ps/nm")


def check_lines(checks: LinkChecks) -> list[str]:
    """The checks beyond loss: dispersion, modal bandwidth, cut-off, each with its formula."""
    lines: list[str] = []
    for c in checks.cutoff:
        lines.append(
            f"CUT-OFF: {c.fibre} at {nm(c.wavelength_nm)} is below its cable cut-off "
            f"({nm(c.cable_cutoff_nm)}): it carries a few modes there, not one"
        )
    for d in checks.dispersion:
        judged = "" if d.passed is None else f": {'ok' if d.passed else 'OVER'}"
        lines.append(
            f"Dispersion at {nm(d.wavelength_nm)}: {d.words()} over {length(d.length_m)}{judged}"
        )
        if d.tolerance_ps_nm is not None:
            lines.append(
                f"  receiver tolerates {_ps(d.tolerance_ps_nm)}: {_ok(d.tolerance_pass, 'OVER')}"
            )
        if d.spread_ps is not None and d.spread_limit_ps is not None:
            lines.append(
                f"  spread {d.spread_ps:.1f} ps with {format_number(d.spectral_width_nm or 0)} "
                f"nm at {format_number(d.bit_rate_gbd or 0)} GBd, limit "
                f"{d.spread_limit_ps:.1f} ps (¼ bit): {_ok(d.spread_pass, 'OVER')}"
            )
        elif d.tolerance_ps_nm is None:
            lines.append("  give a dispersion tolerance, or a spectral width and line rate")
        if d.unknown_fibres:
            lines.append(f"  no dispersion data: {', '.join(d.unknown_fibres)} (not counted)")
    if checks.dispersion:
        lines.append(
            "  formula: ITU-T G.652 D(λ) = S0/4·(λ − λ0⁴/λ³), λ0 over its range, S0 at its "
            "maximum (G.652 gives no minimum S0, so no lowest value where D has one sign)"
        )
    for bw in checks.bandwidth:
        text = (
            f"Modal bandwidth at {nm(bw.wavelength_nm)}: "
            f"{format_number(round(bw.bandwidth_length_mhz_km, 1))} MHz·km over "
            f"{length(bw.length_m)}"
        )
        reach = bw.reach_m
        if reach is not None:
            text += (
                f"; reach {length(round(reach))} at {format_number(bw.bit_rate_gbd or 0)} GBd: "
                f"{_ok(bw.passed, 'OVER')}"
            )
        lines.append(text)
        if bw.unknown_fibres:
            lines.append(f"  no bandwidth data: {', '.join(bw.unknown_fibres)} (not counted)")
    if checks.bandwidth:
        lines.append("  formula: BL = L / Σ(Lᵢ/BLᵢ); reach = BL / (0.6 × line rate), an estimate")
    return lines


def fibre_data_lines(data: FibreData) -> list[str]:
    """A fibre as a waveguide at one wavelength, each figure with its formula."""
    lines = [f"{data.fibre} at {nm(data.wavelength_nm)} ({data.family or 'typed'})"]
    if data.numerical_aperture is not None and data.acceptance_half_angle_deg is not None:
        lines.append(
            f"NA {format_number(data.numerical_aperture)}; acceptance half-angle "
            f"{data.acceptance_half_angle_deg:.1f}° (θ = asin NA)"
        )
    if data.v_number is not None and data.guided_modes is not None:
        profile = "graded index, V²/4" if data.graded_index else "step index, V²/2"
        modes = (
            "1 (single-mode, V < 2.405)"
            if data.v_number < 2.405
            else f"about {data.guided_modes:.0f} ({profile})"
        )
        lines.append(f"V {data.v_number:.2f} (V = π·d·NA/λ); modes {modes}")
    if data.cutoff_nm is not None:
        lines.append(f"single-mode above {data.cutoff_nm:.0f} nm (λc = π·d·NA/2.405)")
    if data.cable_cutoff_nm is not None:
        lines.append(f"cable cut-off ≤ {nm(data.cable_cutoff_nm)} (standard)")
    if data.mode_field_diameter_um is not None:
        lines.append(f"mode-field diameter {format_number(data.mode_field_diameter_um)} µm")
    low, high = data.dispersion_low_ps_nm_km, data.dispersion_high_ps_nm_km
    if low is not None and high is not None:
        # A range only where D can be either sign; elsewhere G.652 bounds only |D| (S0 has a
        # maximum, no minimum): the other end, 0 from S0 = 0, is no real fibre's.
        shown = (
            f"{low:.2f} to {high:.2f}"
            if low < 0 < high
            else f"|D| up to {max(abs(low), abs(high)):.2f}"
        )
        lines.append(minus(f"dispersion {shown} ps/(nm·km) (G.652 D(λ))"))
    if data.modal_bandwidth_mhz_km is not None:
        lines.append(f"modal bandwidth {format_number(data.modal_bandwidth_mhz_km)} MHz·km")
    if len(lines) == 1:
        lines.append("no core, NA, MFD or dispersion presets for this fibre")
    return lines


# -- the whole report, as the CLI prints it ----------------------------------------------------


def report_lines(report: BudgetReport, extra: dict[str, Any] | None = None) -> list[str]:
    """The budget, its notes and its checks: what ``fieldkit budget`` prints."""
    r = report.result
    lines: list[str] = []
    label = report.extra.get("label")
    if label:
        lines.append(str(label))
    lines.append(f"Fibre length {length(r.length_m)}; design margin {db(r.margin_db)}")
    lines.append("")
    lines += breakdown_lines(report)[:-1]  # the length is in the first line already
    if report.application is not None:
        lines.append("")
        lines.append("Application " + "\n  ".join(application_lines(report.application)))
    if report.transceiver is not None:
        lines.append("")
        lines.append("Transceiver " + "\n  ".join(transceiver_lines(report.transceiver)))
    if report.checks is not None:
        beyond = check_lines(report.checks)
        if beyond:
            lines.append("")
            lines.append("Dispersion and bandwidth:")
            lines += [f"  {line}" for line in beyond]
    return "\n".join(lines).split("\n")
