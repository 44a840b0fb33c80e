"""Loss budget calculation: worked examples against published maxima, with the hand sums."""

from __future__ import annotations

import math

import pytest

from fieldkit.calc import budget as b
from fieldkit.calc import coupling
from fieldkit.calc.units import InputError
from fieldkit.presets import load_presets


@pytest.fixture(scope="module")
def lib():
    return load_presets()


def link(
    lib,
    fibre: str,
    length_m: float,
    connectors: int = 2,
    connector_db: float = 0.75,
    splices: int = 0,
    splice_db: float = 0.3,
    **kw,
) -> b.LinkDescription:
    return b.LinkDescription(
        segments=(b.Segment(lib.fibres[fibre], length_m),),
        connectors=b.Connections(connectors, connector_db),
        splices=(b.Splices(splices, splice_db),) if splices else (),
        **kw,
    )


def test_tia_multimode_channel_om3_300m(lib):
    # ANSI/TIA-568.3-D (2016) Table 1: OM3 cable 3.0 dB/km at 850 nm, 1.5 dB/km at 1300 nm;
    # §7.3.4: 0.75 dB per mated connector pair (from memory).
    # 850 nm:  0.300 km × 3.0 dB/km = 0.900 dB; 2 × 0.75 dB = 1.500 dB; total 2.400 dB
    # 1300 nm: 0.300 km × 1.5 dB/km = 0.450 dB; 2 × 0.75 dB = 1.500 dB; total 1.950 dB
    result = b.compute_budget(link(lib, "OM3", 300.0))
    assert [w.wavelength_nm for w in result.wavelengths] == [850.0, 1300.0]
    assert result.at(850).loss_db == pytest.approx(2.400, abs=1e-9)
    assert result.at(1300).loss_db == pytest.approx(1.950, abs=1e-9)


def test_a_pon_span_with_every_kind_of_item_by_hand(lib):
    # Each line and the total worked out by hand, not as the sum of the lines the code made.
    # ITU-T G.652 (11/2016) G.652.D cable (from memory): 0.4 dB/km at 1310, 0.3 at 1550 nm;
    # ANSI/TIA-568.3-D (from memory): 0.75 dB per mated pair, 0.3 dB per splice; 1x8 splitter:
    # 10·log10(8) = 9.0309 dB ideal + 1.5 dB excess (typed here) = 10.5309 dB.
    # 1310 nm: 20 × 0.4 = 8.0; 4 × 0.75 = 3.0; 10 × 0.3 = 3.0; 10.5309 -> 24.5309 dB
    # 1550 nm: 20 × 0.3 = 6.0; 3.0; 3.0; 10.5309 -> 22.5309 dB; with the 3 dB margin 25.5309
    # typical at 1310 nm (common practice): 20 × 0.35 = 7.0; 4 × 0.3 = 1.2; 10 × 0.05 = 0.5;
    # 9.0309 + 0.8 = 9.8309 -> 18.5309 dB
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["G.652.D"], 20_000.0),),
        connectors=b.Connections(4, 0.75, 0.3),
        splices=(b.Splices(10, 0.3, 0.05),),
        components=(b.splitter(8, excess_max_db=1.5, excess_typical_db=0.8),),
        margin_db=3.0,
    )
    result = b.compute_budget(spec)
    at_1310 = {i.kind: i.loss_db for i in result.at(1310).items}
    assert at_1310 == {
        "fibre": pytest.approx(8.0, abs=1e-9),
        "connectors": pytest.approx(3.0, abs=1e-9),
        "splices": pytest.approx(3.0, abs=1e-9),
        "component": pytest.approx(10.5309, abs=1e-4),
    }
    assert result.at(1310).loss_db == pytest.approx(24.5309, abs=1e-4)
    assert result.at(1310).typical_loss_db == pytest.approx(18.5309, abs=1e-4)
    assert result.at(1550).loss_db == pytest.approx(22.5309, abs=1e-4)
    assert result.at(1550).loss_with_margin_db == pytest.approx(25.5309, abs=1e-4)


def test_g652d_outside_plant_span(lib):
    # ITU-T G.652 (11/2016) G.652.D cable maxima: 0.4 dB/km at 1310 nm, 0.3 dB/km at 1550 nm;
    # TIA-568.3-D: 0.75 dB per mated pair, 0.3 dB per splice (from memory).
    # 1310 nm: 20 km × 0.4 = 8.0; 4 × 0.75 = 3.0; 10 × 0.3 = 3.0 -> 14.0 dB
    # 1550 nm: 20 km × 0.3 = 6.0; 3.0; 3.0 -> 12.0 dB
    result = b.compute_budget(link(lib, "G.652.D", 20_000.0, connectors=4, splices=10))
    assert result.at(1310).loss_db == pytest.approx(14.0, abs=1e-9)
    assert result.at(1550).loss_db == pytest.approx(12.0, abs=1e-9)


def test_typical_total_uses_typical_values(lib):
    # Typical (common practice, see presets/fibres.toml and connections.toml): OS2 0.35 dB/km
    # at 1310 nm, 0.3 dB per mated pair, 0.05 dB per fusion splice.
    # 10 km × 0.35 = 3.5; 2 × 0.3 = 0.6; 4 × 0.05 = 0.2 -> 4.3 dB
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OS2"], 10_000.0),),
        connectors=b.Connections(2, 0.75, 0.3),
        splices=(b.Splices(4, 0.3, 0.05),),
    )
    row = b.compute_budget(spec).at(1310)
    assert row.typical_loss_db == pytest.approx(4.3, abs=1e-9)
    assert row.loss_db == pytest.approx(4.0 + 1.5 + 1.2, abs=1e-9)


def test_typical_missing_when_an_item_has_none(lib):
    row = b.compute_budget(link(lib, "OS2", 1000.0)).at(1310)  # connector typical not given
    assert row.typical_loss_db is None


@pytest.mark.parametrize(
    ("outputs", "ideal_db"),
    [
        # 10·log10(N) by hand: log10(2) = 0.30103, log10(32) = 5 × 0.30103 = 1.50515
        (2, 3.0103),
        (4, 6.0206),
        (8, 9.0309),
        (16, 12.0412),
        (32, 15.0515),
        (64, 18.0618),
    ],
)
def test_splitter_ideal_loss(outputs, ideal_db):
    assert coupling.splitter_ideal_loss_db(outputs) == pytest.approx(ideal_db, abs=1e-4)
    part = b.splitter(outputs, excess_max_db=1.0)
    assert part.loss_max_db == pytest.approx(ideal_db + 1.0, abs=1e-4)
    assert part.loss_min_db == pytest.approx(ideal_db, abs=1e-4)


def test_splitter_refuses_one_output():
    with pytest.raises(InputError, match="2 or more"):
        coupling.splitter_ideal_loss_db(1)


def test_core_and_na_mismatch_from_larger_to_smaller():
    # −10·log10((50/62.5)²) = −20·log10(0.8) = 20 × 0.096910 = 1.93820 dB
    assert coupling.core_diameter_mismatch_loss_db(62.5, 50.0) == pytest.approx(1.93820, abs=1e-5)
    # −10·log10((0.2/0.275)²) = 20·log10(1.375) = 20 × 0.138303 = 2.76605 dB
    assert coupling.na_mismatch_loss_db(0.275, 0.200) == pytest.approx(2.76605, abs=1e-5)
    # smaller into larger: no loss
    assert coupling.core_diameter_mismatch_loss_db(50.0, 62.5) == 0.0
    assert coupling.na_mismatch_loss_db(0.2, 0.275) == 0.0


def test_mfd_mismatch_gaussian_overlap():
    # 9.2 and 8.6 µm (G.652.D and G.657.A2 typical MFD at 1310 nm):
    # 2·9.2·8.6 = 158.24; 9.2² + 8.6² = 84.64 + 73.96 = 158.60; ratio 0.9977301;
    # squared 0.9954653; −10·log10(0.9954653) = 0.019738 dB
    assert coupling.mfd_mismatch_loss_db(9.2, 8.6) == pytest.approx(0.019738, abs=2e-6)
    assert coupling.mfd_mismatch_loss_db(8.6, 9.2) == pytest.approx(0.019738, abs=2e-6)
    # 9 and 11 µm: 2·9·11 = 198; 81 + 121 = 202; (198/202)² = 0.960788; loss 0.17372 dB
    assert coupling.mfd_mismatch_loss_db(9.0, 11.0) == pytest.approx(0.17372, abs=2e-5)
    assert coupling.mfd_mismatch_loss_db(9.2, 9.2) == 0.0


def test_mixed_multimode_segments_add_a_mismatch_line(lib):
    # OM1 (62.5 µm, NA 0.275) next to OM3 (50 µm, NA 0.200): worse direction OM1 -> OM3,
    # 1.93820 + 2.76605 = 4.70425 dB, its own line; the best direction is 0 dB.
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OM1"], 100.0), b.Segment(lib.fibres["OM3"], 200.0))
    )
    row = b.compute_budget(spec).at(850)
    joints = [i for i in row.items if i.kind == "mismatch"]
    assert len(joints) == 1
    assert joints[0].loss_db == pytest.approx(4.70425, abs=1e-5)
    assert joints[0].loss_min_db == 0.0
    assert "OM1 → OM3" in joints[0].source


def test_mismatch_counts_each_joint_in_the_direction_the_light_travels(lib):
    # OM1 patch cord | OM3 trunk | OM1 patch cord. Light from end A crosses OM1 -> OM3 (larger
    # into smaller: 1.93820 + 2.76605 = 4.70425 dB) and then OM3 -> OM1 (smaller into larger:
    # 0 dB); from end B the same two joints the other way round: 0 + 4.70425 dB. Either way the
    # link loses 4.70425 dB to mismatch, never both joints' worse directions (9.4085 dB).
    # Formulas: Keiser, "Optical Fiber Communications", 4th ed., §5.4 (from memory).
    spec = b.LinkDescription(
        segments=(
            b.Segment(lib.fibres["OM1"], 2.0),
            b.Segment(lib.fibres["OM3"], 300.0),
            b.Segment(lib.fibres["OM1"], 2.0),
        )
    )
    row = b.compute_budget(spec).at(850)
    joints = [i for i in row.items if i.kind == "mismatch"]
    assert len(joints) == 2
    assert math.fsum(j.loss_db for j in joints) == pytest.approx(4.70425, abs=1e-5)
    assert math.fsum(j.loss_min_db for j in joints) == pytest.approx(4.70425, abs=1e-5)
    # 850 nm total (no connectors given): fibre 0.004 km × 3.5 dB/km (OM1) + 0.300 km × 3.0
    # dB/km (OM3) = 0.914 dB, plus 4.70425 dB mismatch = 5.61825 dB
    assert row.loss_db == pytest.approx(0.914 + 4.70425, abs=1e-5)


def test_mixed_singlemode_segments_use_mfd_per_wavelength(lib):
    # presets: G.652.D MFD 9.2 µm at 1310 nm, 10.4 at 1550; G.657.A2 8.6 and 9.6 µm (typical).
    # 1310: 0.019738 dB (as above). 1550: 2·10.4·9.6 = 199.68; 108.16 + 92.16 = 200.32;
    # 199.68/200.32 = 1 − 0.64/200.32 = 0.9968051; squared 0.9936204; −10·log10 = 0.027795 dB
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["G.652.D"], 1000.0), b.Segment(lib.fibres["G.657.A2"], 50.0))
    )
    result = b.compute_budget(spec)
    at = {
        w.wavelength_nm: [i for i in w.items if i.kind == "mismatch"][0].loss_db
        for w in result.wavelengths
    }
    assert at[1310.0] == pytest.approx(0.019738, abs=2e-6)
    assert at[1550.0] == pytest.approx(0.027795, abs=2e-6)


def test_gpon_feeder_and_bend_insensitive_drop_at_1490_nm(lib):
    # OS2 feeder (G.652.D fibre, typical MFD 10.0 µm at 1490 nm) into a G.657.A2 drop (typical
    # 9.3 µm), presets (from memory). Gaussian overlap (Marcuse 1977, from memory):
    # 2·10·9.3 = 186; 10² + 9.3² = 186.49; 186/186.49 = 0.9973725; squared 0.9947519;
    # −10·log10(0.9947519) = 0.022852 dB
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OS2"], 8000.0), b.Segment(lib.fibres["G.657.A2"], 150.0)),
        wavelengths_nm=(1490.0,),
    )
    row = b.compute_budget(spec).at(1490)
    joints = [i for i in row.items if i.kind == "mismatch"]
    assert len(joints) == 1
    assert joints[0].loss_db == pytest.approx(0.022852, abs=2e-6)


def test_a_joint_without_mode_field_values_is_noted_not_refused(lib):
    # Neither G.652.D nor G.657.A2 has a mode-field diameter at 1383 nm in the presets: the
    # budget still comes out (fibre only: 1 km × 0.4 + 0.05 km × 0.4 = 0.42 dB, ITU-T G.652
    # (11/2016) 1383 nm cable maximum, from memory) and a note says no mismatch was counted.
    spec = b.LinkDescription(
        segments=(
            b.Segment(lib.fibres["G.652.D"], 1000.0),
            b.Segment(lib.fibres["G.657.A2"], 50.0),
        ),
        wavelengths_nm=(1383.0,),
    )
    result = b.compute_budget(spec)
    assert result.at(1383).loss_db == pytest.approx(0.42, abs=1e-9)
    assert not [i for i in result.at(1383).items if i.kind == "mismatch"]
    assert any("no mode-field mismatch counted at 1383 nm" in n for n in result.notes)


def test_multimode_and_singlemode_cannot_be_joined(lib):
    with pytest.raises(InputError, match="multimode and single-mode"):
        b.LinkDescription(
            segments=(b.Segment(lib.fibres["OM4"], 10.0), b.Segment(lib.fibres["OS2"], 10.0))
        )


def test_wavelength_without_a_value_is_named(lib):
    spec = link(lib, "OM3", 100.0, wavelengths_nm=(1550.0,))
    with pytest.raises(InputError, match=r"OM3: no maximum attenuation at 1550 nm .*850 nm, 1300"):
        b.compute_budget(spec)


def test_negative_length_refused(lib):
    with pytest.raises(InputError, match="below 0"):
        b.Segment(lib.fibres["OS2"], -1.0)


def test_ieee_10gbase_lr_fits_10km(lib):
    # IEEE Std 802.3-2018 Clause 52: 10GBASE-LR 10 km, channel insertion loss 6.2 dB (from memory).
    # OS2 10 km × 0.4 dB/km = 4.0 dB + 2 × 0.75 dB = 5.5 dB -> headroom 6.2 − 5.5 = 0.7 dB
    result = b.compute_budget(link(lib, "OS2", 10_000.0))
    limits = b.ApplicationLimits("10GBASE-LR", "singlemode", 6.2, 10_000.0, (1310.0,))
    check = b.check_application(result, limits)
    assert check.loss_pass and check.length_pass and check.passed
    assert check.loss_headroom_db == pytest.approx(0.7, abs=1e-9)
    assert check.length_headroom_m == pytest.approx(0.0, abs=1e-9)


def test_ieee_10gbase_sr_length_and_loss_judged_separately(lib):
    # IEEE Std 802.3-2018 Clause 52: 10GBASE-SR on OM3 300 m, 2.6 dB (from memory).
    # 350 m: 0.35 km × 3.0 = 1.05 dB + 1.5 dB = 2.55 dB <= 2.6 dB (loss passes, 0.05 dB spare)
    # but 350 m > 300 m (length fails by 50 m)
    result = b.compute_budget(link(lib, "OM3", 350.0))
    limits = b.ApplicationLimits("10GBASE-SR", "OM3", 2.6, 300.0, (850.0,))
    check = b.check_application(result, limits)
    assert check.loss_pass is True
    assert check.loss_headroom_db == pytest.approx(0.05, abs=1e-9)
    assert check.length_pass is False
    assert check.length_headroom_m == pytest.approx(-50.0, abs=1e-9)
    assert check.passed is False


def test_application_wavelength_window(lib):
    # 1000BASE-LX works at 1310 nm; a multimode budget at 1300 nm is in the same window.
    result = b.compute_budget(link(lib, "OM2", 500.0))
    limits = b.ApplicationLimits("1000BASE-LX", "OM2", 2.35, 550.0, (1310.0,))
    check = b.check_application(result, limits)
    assert check.wavelength_nm == 1300.0
    # 0.5 km × 1.5 = 0.75 dB + 1.5 dB = 2.25 dB; 2.35 − 2.25 = 0.10 dB headroom
    assert check.loss_headroom_db == pytest.approx(0.10, abs=1e-9)
    wrong = b.ApplicationLimits("x", "OM2", 2.0, 550.0, (1550.0,))
    with pytest.raises(InputError, match="add the wavelength 1550"):
        b.check_application(result, wrong)


def test_pon_class_minimum_loss(lib):
    # ITU-T G.984.2 Amd 1: class B+ 13–28 dB (from memory). A 1x8 splitter on 1 km has a
    # lowest plausible loss of 9.031 + 0.24 (1490 nm typical) = 9.27 dB < 13 dB: fails the minimum.
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OS2"], 1000.0),),
        connectors=b.Connections(2, 0.75),
        components=(b.splitter(8, excess_max_db=1.5),),
        wavelengths_nm=(1310.0, 1490.0),
    )
    result = b.compute_budget(spec)
    limits = b.ApplicationLimits(
        "GPON Class B+", "singlemode", 28.0, 20_000.0, (1310.0, 1490.0), loss_min_db=13.0
    )
    check = b.check_application(result, limits)
    assert check.loss_pass is True
    assert check.min_pass is False
    assert check.passed is False
    assert check.link_loss_min_db == pytest.approx(9.0309 + 0.24, abs=1e-4)


def test_transceiver_margin_10gbase_lr(lib):
    # IEEE 802.3 Clause 52 10GBASE-LR (from memory): Tx −8.2 to +0.5 dBm, Rx −14.4 dBm avg,
    # overload +0.5 dBm. Power budget −8.2 − (−14.4) = 6.2 dB. Link 5.5 dB max -> margin 0.7 dB.
    # Lowest plausible loss: 10 km × 0.35 (typical) = 3.5 dB; +0.5 − 3.5 = −3.0 dBm < +0.5: no
    # attenuator.
    result = b.compute_budget(link(lib, "OS2", 10_000.0))
    tx = b.Transceiver(-8.2, 0.5, -14.4, 0.5, wavelength_nm=1310.0)
    check = b.check_transceiver(result, tx)
    assert check.wavelength_nm == 1310.0
    assert check.power_budget_db == pytest.approx(6.2, abs=1e-9)
    assert check.margin_db == pytest.approx(0.7, abs=1e-9)
    assert check.margin_pass and not check.overload and check.attenuator_db is None


def test_transceiver_needs_an_attenuator_and_gets_one_that_fits(lib):
    # GPON B+ downstream (ITU-T G.984.2, from memory): Tx +1.5 to +5 dBm, Rx −27, overload −8.
    # 1 km OS2 + 1x8 splitter (excess 1.5) + 2 pairs, at 1490 nm:
    #   max loss  = 0.4 + 9.0309 + 1.5 + 1.5 = 12.4309 dB; margin = 1.5 − 12.4309 + 27 = 16.0691
    #   min loss  = 0.24 + 9.0309 = 9.2709 dB; received max = 5 − 9.2709 = −4.2709 dBm > −8
    #   attenuator at least −4.2709 − (−8) = 3.7291 dB, at most 16.0691 − 2 (margin) = 14.0691
    #   smallest stock value in [3.73, 14.07]: 5 dB
    spec = b.LinkDescription(
        segments=(b.Segment(lib.fibres["OS2"], 1000.0),),
        connectors=b.Connections(2, 0.75),
        components=(b.splitter(8, excess_max_db=1.5),),
        margin_db=2.0,
        wavelengths_nm=(1490.0,),
    )
    tx = b.Transceiver(1.5, 5.0, -27.0, -8.0, wavelength_nm=1490.0)
    check = b.check_transceiver(b.compute_budget(spec), tx)
    assert check.overload is True
    assert check.attenuator_min_db == pytest.approx(3.7291, abs=1e-4)
    assert check.attenuator_max_db == pytest.approx(14.0691, abs=1e-4)
    assert check.attenuator_db == 5.0
    assert check.passed


def test_transceiver_no_attenuator_fits():
    fibre = load_presets().fibres["OS2"]
    spec = b.LinkDescription(
        segments=(b.Segment(fibre, 100.0),),
        connectors=b.Connections(2, 5.0),
        wavelengths_nm=(1310.0,),
    )
    # max loss 0.04 + 10 = 10.04; min 0.035; Tx 0..+5, Rx −12 .. −3:
    # margin 0 − 10.04 + 12 = 1.96; needs 5 − 0.035 + 3 = 7.965 dB, allows only 1.96 dB
    check = b.check_transceiver(b.compute_budget(spec), b.Transceiver(0.0, 5.0, -12.0, -3.0))
    assert check.overload and not check.attenuator_fits and check.attenuator_db is None
    assert check.passed is False


def test_transceiver_wavelength_missing_from_the_budget_is_refused(lib):
    # A 1550 nm pair judged on a 1310 nm-only budget would take its lowest loss from the 1310 nm
    # fibre (typical OS2 0.35 dB/km, common practice) instead of 1550 nm (0.22 dB/km): 1.3 dB
    # too much over 10 km, enough to hide a receiver overload. Ask for the wavelength instead.
    result = b.compute_budget(link(lib, "OS2", 10_000.0, wavelengths_nm=(1310.0,)))
    tx = b.Transceiver(0.0, 5.0, -24.0, -7.0, name="1550 pair", wavelength_nm=1550.0)
    with pytest.raises(
        InputError,
        match="1550 pair: works at 1550 nm, but the budget has 1310 nm; add the wavelength 1550",
    ):
        b.check_transceiver(result, tx)
    # Without a wavelength the pair is judged at the budget's wavelengths, as before:
    # margin 0 − (4.0 + 1.5) + 24 = 18.5 dB
    check = b.check_transceiver(result, b.Transceiver(0.0, 5.0, -24.0, -7.0))
    assert check.wavelength_nm is None
    assert check.margin_db == pytest.approx(18.5, abs=1e-9)


def test_transceiver_levels_validated():
    with pytest.raises(InputError, match="above the Tx maximum"):
        b.Transceiver(0.0, -1.0, -20.0, -3.0)
    with pytest.raises(InputError, match="below the overload"):
        b.Transceiver(-5.0, 0.0, -3.0, -20.0)


@pytest.mark.parametrize(
    ("included", "expected_db"),
    [
        # OS2 10 km at 1310 nm: 4.0 dB fibre; 4 mated pairs × 0.75 dB, two of them the ends.
        # one-cord keeps both ends: 4.0 + 4 × 0.75 = 7.00; two-cord one: 4.0 + 3 × 0.75 = 6.25;
        # three-cord none: 4.0 + 2 × 0.75 = 5.50 (IEC 61280-4-2, from memory)
        (2, 7.00),
        (1, 6.25),
        (0, 5.50),
    ],
)
def test_method_limit_keeps_the_end_connections_the_method_includes(lib, included, expected_db):
    spec = link(lib, "OS2", 10_000.0, connectors=4)
    assert b.method_limit(spec, included).at(1310).loss_db == pytest.approx(expected_db, abs=1e-9)


def test_with_connectors_replaces_the_count(lib):
    spec = link(lib, "OS2", 1000.0, connectors=6)
    assert b.with_connectors(spec, 3).connector_count == 3
    # 1 km × 0.4 + 3 × 0.75 = 2.65 dB
    assert b.max_loss_db(b.with_connectors(spec, 3), 1310) == pytest.approx(2.65, abs=1e-9)
    with pytest.raises(InputError):
        b.with_connectors(spec, -1)
    with pytest.raises(InputError, match="at least 2"):
        b.method_limit(link(lib, "OS2", 1000.0, connectors=1), 0)
