"""The demo scenario's budgets come from the real calculation and the shipped presets."""

from __future__ import annotations

from datetime import UTC, datetime

import pytest

from fieldkit.jobs.demo import build


def test_demo_budgets_match_a_hand_computation() -> None:
    jobs = {job.name: job for job in build(datetime(2026, 3, 2, 7, 0, tzinfo=UTC))}
    backbone = jobs["Library to Town Hall backbone"].links[0].budget
    assert backbone is not None
    # OS2 1.84 km × 0.4 dB/km (ISO/IEC 11801-1 OS2, from memory) + 2 mated pairs × 0.75 dB
    # + 4 splices × 0.3 dB (TIA-568.3-D maxima, from memory) = 0.736 + 1.5 + 1.2 = 3.436 dB
    for wavelength_nm in (1310.0, 1550.0):
        row = backbone.at_wavelength(wavelength_nm)
        assert row is not None
        assert row.loss_db == pytest.approx(3.436, abs=1e-9)
        assert sum(item.loss_db for item in row.items) == pytest.approx(row.loss_db, abs=1e-9)
    fit_out = jobs["Old Mill business park: unit 3 fit-out"].links[0].budget
    assert fit_out is not None
    # OM3 0.12 km × 3.0 dB/km at 850 nm (TIA-568.3-D, from memory) + 2 × 0.75 dB = 1.86 dB
    row = fit_out.at_wavelength(850.0)
    assert row is not None and row.loss_db == pytest.approx(1.86, abs=1e-9)
