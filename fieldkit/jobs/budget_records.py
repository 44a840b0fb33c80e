"""A computed budget as a job keeps it: the :class:`~fieldkit.jobs.models.BudgetRecord` built
from the written link description, the resolved link and the report. The CLI and the budget
workspace save the same record through this one function."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, Protocol

from fieldkit.calc.budget import BudgetReport, LinkDescription
from fieldkit.jobs.models import BudgetItem, BudgetRecord, BudgetWavelength


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
    )
