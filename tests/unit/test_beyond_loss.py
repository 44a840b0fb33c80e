"""Checks beyond loss: chromatic dispersion, modal bandwidth, cut-off, and the fibre data view,
against hand computations and a textbook example."""

from __future__ import annotations

import math

import pytest

from fieldkit import linkspec
from fieldkit.calc import budget as b
from fieldkit.calc import waveguide as wg
from fieldkit.calc.checks import check_beyond_loss, fibre_data
from fieldkit.calc.fibre import Fibre
from fieldkit.presets import load_presets
from fieldkit.text.budget import check_lines, fibre_data_lines


@pytest.fixture(scope="module")
def lib():
    return load_presets()


# -- chromatic dispersion ----------------------------------------------------------------------


def test_g652_dispersion_at_1550_nm_over_40_km_by_hand(lib):
    # ITU-T G.652 (11/2016), from memory: D(λ) = S0/4 · (λ − λ0⁴/λ³), λ0 1300–1324 nm,
    # S0 ≤ 0.092 ps/(nm²·km). At 1550 nm the largest D has λ0 = 1300 nm:
    #   1300⁴ = 2.8561e12; 1550³ = 3.723875e9; 1300⁴/1550³ = 766.970 nm;
    #   D = 0.092/4 × (1550 − 766.970) = 0.023 × 783.030 = 18.0097 ps/(nm·km).
    # With λ0 = 1324 nm: 1324⁴ = 3.07295e12; / 3.723875e9 = 825.20 nm; 0.023 × 724.80 =
    # 16.670 ps/(nm·km). Over 40 km: up to 720.39 ps/nm (S0 may be anything up to 0.092, so
    # the low end is 0).
    assert wg.g652_dispersion_ps_nm_km(1550, 1300, 0.092) == pytest.approx(18.0097, abs=1e-4)
    assert wg.g652_dispersion_ps_nm_km(1550, 1324, 0.092) == pytest.approx(16.670, abs=1e-3)
    link = b.LinkDescription(
        segments=(b.Segment(lib.fibres["G.652.D"], 40_000.0),), wavelengths_nm=(1550.0,)
    )
    (check,) = check_beyond_loss(link, (1550.0,)).dispersion
    assert check.high_ps_nm == pytest.approx(720.39, abs=0.01)
    assert check.low_ps_nm == 0.0
    assert check.worst_ps_nm == pytest.approx(720.39, abs=0.01)


def test_dispersion_against_a_receivers_tolerance(lib):
    # "generic 1550 nm 80 km" tolerates 1600 ps/nm (common practice): 40 km (720.39 ps/nm)
    # fits, 100 km (100 × 18.0097 = 1800.97 ps/nm) does not.
    for km, ok in ((40, True), (100, False)):
        report = linkspec.resolve(
            {
                "segments": [{"fibre": "G.652.D", "length": f"{km} km"}],
                "wavelengths": [1550],
                "transceiver": "generic 1550 nm 80 km",
            },
            lib,
        ).evaluate()
        (check,) = report.checks.dispersion
        assert check.tolerance_ps_nm == 1600.0
        assert check.tolerance_pass is ok
        assert check.passed is ok


def test_dispersion_from_a_spectral_width_and_bit_rate(lib):
    # Quarter-bit rule B·|D|·L·σλ ≤ 1/4 (Agrawal, Fiber-Optic Communication Systems, §5.2.2,
    # from memory). 40 km at 1550 nm: 720.39 ps/nm × 0.1 nm = 72.04 ps of spread; at 10 GBd a
    # bit is 100 ps, a quarter 25 ps: over. At 1 GBd (250 ps limit) it fits.
    # Dispersion-limited length at 10 GBd: 0.25 / (10e9 × 18.0097e-12 × 0.1) = 13.88 km.
    spec = {
        "segments": [{"fibre": "G.652.D", "length": "40 km"}],
        "wavelengths": [1550],
        "spectral_width": "0.1 nm",
        "bit_rate": "10",
    }
    (check,) = linkspec.resolve(spec, lib).evaluate().checks.dispersion
    assert check.spread_ps == pytest.approx(72.04, abs=0.01)
    assert check.spread_limit_ps == pytest.approx(25.0, abs=1e-9)
    assert check.spread_pass is False
    spec["bit_rate"] = "1 GBd"
    (check,) = linkspec.resolve(spec, lib).evaluate().checks.dispersion
    assert check.spread_pass is True
    assert wg.dispersion_limited_length_km(18.0097, 0.1, 10.0) == pytest.approx(13.88, abs=0.01)


# -- modal bandwidth ---------------------------------------------------------------------------


def test_modal_bandwidth_reach_of_om3_at_10g(lib):
    # OM3 effective modal bandwidth 2000 MHz·km at 850 nm (ISO/IEC 11801-1, from memory);
    # 10GBASE-SR line rate 10.3125 GBd (IEEE 802.3 Clause 52, from memory). Reach estimate
    # 2000 / (0.6 × 10 312.5 MHz) km = 0.32323 km = 323.2 m: 300 m fits, 350 m does not.
    # At 1300 nm (overfilled 500 MHz·km) the application's rate does not apply: no verdict.
    assert wg.modal_bandwidth_reach_m(2000, 10.3125) == pytest.approx(323.23, abs=0.01)
    for metres, ok in ((300, True), (350, False)):
        report = linkspec.resolve(
            {"segments": [{"fibre": "OM3", "length": f"{metres} m"}], "application": "10GBASE-SR"},
            lib,
        ).evaluate()
        at = {c.wavelength_nm: c for c in report.checks.bandwidth}
        assert at[850.0].reach_m == pytest.approx(323.23, abs=0.01)
        assert at[850.0].passed is ok
        assert at[1300.0].passed is None
        assert at[850.0].link_bandwidth_mhz == pytest.approx(2000 / (metres / 1000), abs=1e-6)


def test_modal_bandwidth_of_mixed_segments_combines_as_lengths_over_bandwidths(lib):
    # OM4 100 m (4700 MHz·km) + OM3 200 m (2000 MHz·km) at 850 nm (ISO/IEC 11801-1, from
    # memory): Σ L/BL = 0.1/4700 + 0.2/2000 = 2.12766e-5 + 1.0e-4 = 1.212766e-4 km²/(MHz·km);
    # BL = 0.3 / 1.212766e-4 = 2473.68 MHz·km; link bandwidth 2473.68 / 0.3 = 8245.6 MHz.
    link = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OM4"], 100.0), b.Segment(lib.fibres["OM3"], 200.0))
    )
    (check,) = check_beyond_loss(link, (850.0,)).bandwidth
    assert check.bandwidth_length_mhz_km == pytest.approx(2473.68, abs=0.01)
    assert check.link_bandwidth_mhz == pytest.approx(8245.6, abs=0.1)


def test_pre_om_fibre_runs_out_of_bandwidth_first(lib):
    # 62.5/160 (160 MHz·km at 850 nm, from memory) at 1000BASE-SX's 1.25 GBd: reach estimate
    # 160 / (0.6 × 1250) km = 213.3 m, against the IEEE row's 220 m (from memory).
    assert wg.modal_bandwidth_reach_m(160, 1.25) == pytest.approx(213.33, abs=0.01)


# -- cut-off -----------------------------------------------------------------------------------


def test_single_mode_fibre_below_cut_off_is_flagged():
    # G.652 cable cut-off ≤ 1260 nm (ITU-T G.652 (11/2016), from memory): at 850 nm a
    # single-mode fibre carries a few modes. A fibre from a user preset with an 850 nm value
    # computes, and says so in the notes and the checks.
    fibre = Fibre(
        name="site SM",
        family="singlemode",
        attenuation_max={850.0: 2.0, 1310.0: 0.4},
        attenuation_typical={850.0: 1.8, 1310.0: 0.35},
        cable_cutoff_nm=1260.0,
    )
    link = b.LinkDescription(segments=(b.Segment(fibre, 100.0),), wavelengths_nm=(850.0, 1310.0))
    result = b.compute_budget(link)
    assert any("below its cable cut-off (1260 nm)" in n for n in result.notes)
    checks = check_beyond_loss(link, (850.0, 1310.0))
    assert [(c.fibre, c.wavelength_nm) for c in checks.cutoff] == [("site SM", 850.0)]
    assert checks.passed is False
    assert any("CUT-OFF: site SM at 850 nm" in line for line in check_lines(checks))


def test_a_shipped_single_mode_fibre_at_850_nm_is_refused_with_the_reason(lib):
    link = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OS2"], 100.0),), wavelengths_nm=(850.0,)
    )
    with pytest.raises(
        Exception, match=r"no maximum attenuation at 850 nm.*below its cable cut-off"
    ):
        b.compute_budget(link)


# -- the fibre data view -----------------------------------------------------------------------


def test_v_number_and_modes_against_a_textbook_example():
    # G. Keiser, "Optical Fiber Communications", 4th ed., Example 2.7 (from memory): a
    # step-index fibre, 62.5 µm core, n1 = 1.480, Δ = 1.5 %, at 850 nm: V ≈ 59.2, M ≈ V²/2 ≈
    # 1752. By hand: NA = n1·√(2Δ) = 1.48 × √0.03 = 0.256344; V = π × 62.5 × 0.256344 / 0.85 =
    # 59.216; V²/2 = 1753.2.
    na = 1.48 * math.sqrt(2 * 0.015)
    v = wg.v_number(62.5, na, 850.0)
    assert v == pytest.approx(59.216, abs=1e-3)
    assert wg.guided_modes(v, graded_index=False) == pytest.approx(1753.2, abs=0.1)
    assert wg.guided_modes(v, graded_index=True) == pytest.approx(876.6, abs=0.1)


def test_fibre_data_of_om3_and_g652d(lib):
    # OM3: NA 0.200 (IEC 60793-2-10, from memory): acceptance half-angle asin(0.2) = 11.537°;
    # V at 850 nm = π × 50 × 0.2 / 0.85 = 36.960; graded index V²/4 = 341.5 modes.
    om3 = fibre_data(lib.fibres["OM3"], 850.0)
    assert om3.acceptance_half_angle_deg == pytest.approx(11.537, abs=1e-3)
    assert om3.v_number == pytest.approx(36.960, abs=1e-3)
    assert om3.guided_modes == pytest.approx(341.5, abs=0.1)
    assert om3.modal_bandwidth_mhz_km == 2000.0
    # G.652.D, typical step-index equivalent 8.2 µm and NA 0.12 (from memory): cut-off
    # π × 8.2 × 0.12 / 2.404826 = 1.28547 µm; V at 1310 nm = π × 8.2 × 0.12 / 1.31 = 2.3598 <
    # 2.405, one mode; dispersion at 1310 nm (1310³ = 2.248091e9) with λ0 1300: 0.023 ×
    # (1310 − 2.8561e12 / 2.248091e9) = 0.023 × (1310 − 1270.46) = 0.909 ps/(nm·km); with λ0
    # 1324 (1324⁴ = 3.072923e12): 0.023 × (1310 − 1366.90) = −1.309 ps/(nm·km).
    sm = fibre_data(lib.fibres["G.652.D"], 1310.0)
    assert sm.cutoff_nm == pytest.approx(1285.47, abs=0.01)
    assert sm.v_number == pytest.approx(2.3598, abs=1e-4)
    assert sm.guided_modes == 1.0
    assert sm.dispersion_high_ps_nm_km == pytest.approx(0.909, abs=1e-3)
    assert sm.dispersion_low_ps_nm_km == pytest.approx(-1.309, abs=1e-3)
    lines = fibre_data_lines(sm)
    assert "dispersion −1.31 to 0.91 ps/(nm·km) (G.652 D(λ))" in lines
    # at 1550 nm D has one sign: only its largest magnitude, 18.01 (review A10), no "0.00 to"
    far = fibre_data_lines(fibre_data(lib.fibres["G.652.D"], 1550.0))
    assert "dispersion |D| up to 18.01 ps/(nm·km) (G.652 D(λ))" in far
    assert any("V = π·d·NA/λ" in line for line in lines)
    assert any("λc = π·d·NA/2.405" in line for line in lines)


def test_dispersion_words_show_the_range_only_where_it_means_something(lib):
    # Review A10. At 1550 nm D has one sign over all of G.652's λ0 range (16.670 to 18.0097
    # ps/(nm·km) at S0 = 0.092, above): G.652 sets no minimum S0, so only the worst case means
    # anything: "worst |D|·L 720.4 ps/nm", no "0.0 to".
    def check_at(nm: float, km: float):
        link = b.LinkDescription(
            segments=(b.Segment(lib.fibres["G.652.D"], km * 1000.0),), wavelengths_nm=(nm,)
        )
        (check,) = check_beyond_loss(link, (nm,)).dispersion
        return check

    far = check_at(1550, 40)
    assert not far.either_sign
    assert far.words() == "worst |D|·L 720.4 ps/nm"
    # At 1310 nm (inside 1300–1324 nm) D can be either sign: with S0 = 0.092,
    # λ0 = 1300: 0.023 × (1310 − 1300⁴/1310³) = 0.023 × (1310 − 1270.52) = 0.908 ps/(nm·km);
    # λ0 = 1324: 0.023 × (1310 − 1324⁴/1310³) = 0.023 × (1310 − 1366.92) = −1.309 ps/(nm·km);
    # over 12 km: −15.7 to 10.9 ps/nm, real extremes; the worst |D|·L is 15.7, same digits.
    near = check_at(1310, 12)
    assert near.either_sign
    assert near.words() == "worst |D|·L 15.7 ps/nm (D·L −15.7 to 10.9 ps/nm)"
