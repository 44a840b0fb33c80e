"""A computed budget as a job keeps it: the :class:`~fieldkit.jobs.models.BudgetRecord` built
from the written link description, the resolved link and the report. The CLI and the budget
workspace save the same record through this one function."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any, Protocol

from fieldkit.calc.budget import BudgetReport, LinkDescription
from fieldkit.calc.checks import BANDWIDTH_FORMULA, DISPERSION_FORMULA, LinkChecks
from fieldkit.jobs.models import (
    BudgetCheck,
    BudgetItem,
    BudgetRecord,
    BudgetWavelength,
    CheckVerdict,
)


class ResolvedLink(Protocol):
    """What a record needs of a resolved budget (:class:`fieldkit.linkspec.ResolvedBudget`)."""

    @property
    def spec(self) -> Mapping[str, Any]: ...

    @property
    def link(self) -> LinkDescription: ...


def record_description(resolved: ResolvedLink) -> dict[str, Any]:
    """The description a job keeps: the link as written, plus the resolved connector figures
    the meter workspace reads (``connector_count``, ``connector_loss_db`` per mated pair)."""
    description = dict(resolved.spec)
    connectors = resolved.link.connectors
    description["connector_count"] = 0 if connectors is None else connectors.count
    if connectors is not None:
        description["connector_loss_db"] = connectors.loss_max_db
    description["length_m"] = resolved.link.length_m
    return description


def _verdict(passed: bool | None) -> CheckVerdict:
    return "no limit" if passed is None else ("pass" if passed else "fail")


def _unknown(fibres: tuple[str, ...], what: str) -> str:
    return f"; no {what} data for {', '.join(fibres)} (not counted)" if fibres else ""


def check_rows(checks: LinkChecks | None) -> list[BudgetCheck]:
    """The checks beyond loss as the rows a job keeps (:class:`BudgetCheck`): per wavelength
    the accumulated dispersion against a receiver's tolerance and, where a spectral width and
    bit rate are known, the pulse spread against a quarter bit; the link against its
    modal-bandwidth reach; each wavelength below a single-mode fibre's cable cut-off."""
    if checks is None:
        return []
    rows: list[BudgetCheck] = []
    for c in checks.cutoff:
        rows.append(
            BudgetCheck(
                kind="cut-off",
                wavelength_nm=c.wavelength_nm,
                value=c.wavelength_nm,
                unit="nm",
                limit=c.cable_cutoff_nm,
                verdict="warning",
                detail=f"{c.fibre} at {c.wavelength_nm:g} nm is below its cable cut-off "
                f"({c.cable_cutoff_nm:g} nm): it carries a few modes there, not one",
                source=f"{c.fibre} preset cable cut-off",
            )
        )
    for d in checks.dispersion:
        rows.append(
            BudgetCheck(
                kind="dispersion",
                wavelength_nm=d.wavelength_nm,
                value=round(d.worst_ps_nm, 1),  # the digits the detail shows
                unit="ps/nm",
                limit=d.tolerance_ps_nm,
                verdict=_verdict(d.tolerance_pass),
                detail=f"{d.words()} over {d.length_m:.0f} m of fibre"
                + (
                    f", receiver tolerates {d.tolerance_ps_nm:g} ps/nm"
                    if d.tolerance_ps_nm is not None
                    else ", no receiver tolerance given"
                )
                + _unknown(d.unknown_fibres, "dispersion"),
                source=DISPERSION_FORMULA,
            )
        )
        if d.spread_ps is not None and d.spread_limit_ps is not None:
            rows.append(
                BudgetCheck(
                    kind="dispersion spread",
                    wavelength_nm=d.wavelength_nm,
                    value=d.spread_ps,
                    unit="ps",
                    limit=d.spread_limit_ps,
                    verdict=_verdict(d.spread_pass),
                    detail=f"pulse spread {d.spread_ps:.1f} ps with a "
                    f"{d.spectral_width_nm or 0:g} nm source at {d.bit_rate_gbd or 0:g} GBd, "
                    "limit a quarter bit",
                    source=DISPERSION_FORMULA,
                )
            )
    for bw in checks.bandwidth:
        reach = bw.reach_m
        if reach is not None and not math.isfinite(reach):
            reach = None  # no bandwidth data: nothing to judge against
        bl = bw.bandwidth_length_mhz_km
        rows.append(
            BudgetCheck(
                kind="modal bandwidth",
                wavelength_nm=bw.wavelength_nm,
                value=bw.length_m,
                unit="m",
                limit=reach,
                verdict=_verdict(bw.passed),
                detail=(f"{bl:.0f} MHz·km" if math.isfinite(bl) else "no bandwidth data")
                + f" over {bw.length_m:.0f} m"
                + (
                    f"; reach {reach:.0f} m at {bw.bit_rate_gbd or 0:g} GBd (an estimate)"
                    if reach is not None
                    else "; no bit rate given, reach not judged"
                )
                + _unknown(bw.unknown_fibres, "bandwidth"),
                source=BANDWIDTH_FORMULA,
            )
        )
    return rows


def budget_record(resolved: ResolvedLink, report: BudgetReport, by: str = "") -> BudgetRecord:
    """The :class:`BudgetRecord` of a computed budget."""
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
        checks=check_rows(report.checks),
    )
