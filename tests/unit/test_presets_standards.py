"""Shipped preset values against the published tables and physics they cite.

Each expected value here is written out from the standard (or the physics) named beside it, not
read from the preset files, so a slipped digit in presets/*.toml fails a test. Values recalled
without the document at hand say "(from memory)".
"""

from __future__ import annotations

import itertools

import pytest

from fieldkit.calc import budget as b
from fieldkit.calc.coupling import splitter_ideal_loss_db
from fieldkit.calc.optics import SPEED_OF_LIGHT_M_PER_S
from fieldkit.presets import load_presets


@pytest.fixture(scope="module")
def lib():
    return load_presets()


# -- applications: channel insertion loss and reach -------------------------------------------


@pytest.mark.parametrize(
    ("app", "fibre", "loss_max_db", "reach_m"),
    [
        # IEEE Std 802.3-2018 Clause 38 (1000BASE-SX operating range and channel insertion loss,
        # from memory): 62.5 µm 200 MHz·km 275 m / 2.53 dB; 50 µm 500 MHz·km 550 m / 3.43 dB
        ("1000BASE-SX", "OM1", 2.53, 275),
        ("1000BASE-SX", "OM2", 3.43, 550),
        ("1000BASE-SX", "OM3", 3.43, 550),  # no higher-bandwidth row in Clause 38: OM2 figures
        # Clause 38 1000BASE-LX (from memory): multimode 550 m / 2.35 dB, single-mode 5 km / 4.57 dB
        ("1000BASE-LX", "OM2", 2.35, 550),
        ("1000BASE-LX", "singlemode", 4.57, 5000),
        # Clause 52 10GBASE-S (from memory): 200 MHz·km 33 m / 1.6 dB; 500 MHz·km 82 m / 1.8 dB;
        # 2000 MHz·km (OM3) 300 m / 2.6 dB. OM4 (4700 MHz·km) 400 m / 2.9 dB: the figure the
        # ISO/IEC 11801-1 application tables give (from memory; whether Clause 52 itself lists
        # OM4 is not settled)
        ("10GBASE-SR", "OM1", 1.6, 33),
        ("10GBASE-SR", "OM2", 1.8, 82),
        ("10GBASE-SR", "OM3", 2.6, 300),
        ("10GBASE-SR", "OM4", 2.9, 400),
        # Clause 52 10GBASE-L (from memory): 10 km, 6.2 dB
        ("10GBASE-LR", "singlemode", 6.2, 10_000),
        # Clause 112 25GBASE-SR (from memory): OM3 70 m / 1.8 dB, OM4 100 m / 1.9 dB
        ("25GBASE-SR", "OM3", 1.8, 70),
        ("25GBASE-SR", "OM4", 1.9, 100),
        # Clause 86 40GBASE-SR4 (from memory): OM3 100 m / 1.9 dB, OM4 150 m / 1.5 dB
        ("40GBASE-SR4", "OM3", 1.9, 100),
        ("40GBASE-SR4", "OM4", 1.5, 150),
        # Clause 87 40GBASE-LR4 (from memory): 10 km, 6.7 dB
        ("40GBASE-LR4", "singlemode", 6.7, 10_000),
        # Clause 95 100GBASE-SR4 (from memory): OM3 70 m / 1.8 dB, OM4 100 m / 1.9 dB
        ("100GBASE-SR4", "OM3", 1.8, 70),
        ("100GBASE-SR4", "OM4", 1.9, 100),
        # Clause 88 100GBASE-LR4 (from memory): 10 km, 6.3 dB
        ("100GBASE-LR4", "singlemode", 6.3, 10_000),
    ],
)
def test_ethernet_channel_insertion_loss_and_reach(lib, app, fibre, loss_max_db, reach_m):
    limit = lib.applications[app].limits[fibre]
    assert limit.loss_max_db == pytest.approx(loss_max_db, abs=1e-9)
    assert limit.reach_m == pytest.approx(reach_m, abs=1e-9)
    assert limit.loss_min_db is None


@pytest.mark.parametrize(
    ("app", "loss_min_db", "loss_max_db", "wavelengths_nm"),
    [
        # ITU-T G.984.2 and its amendments, GPON optical classes (from memory): B+ 13–28 dB,
        # C+ 17–32 dB; upstream 1260–1360 nm (checked at 1310), downstream 1480–1500 nm (1490)
        ("GPON Class B+", 13, 28, (1310, 1490)),
        ("GPON Class C+", 17, 32, (1310, 1490)),
        # ITU-T G.9807.1 XGS-PON loss budgets (from memory): N1 14–29, N2 16–31, E1 18–33 dB;
        # upstream 1260–1280 nm (1270), downstream 1575–1581 nm (1577)
        ("XGS-PON N1", 14, 29, (1270, 1577)),
        ("XGS-PON N2", 16, 31, (1270, 1577)),
        ("XGS-PON E1", 18, 33, (1270, 1577)),
    ],
)
def test_pon_class_loss_ranges(lib, app, loss_min_db, loss_max_db, wavelengths_nm):
    preset = lib.applications[app]
    limit = preset.limits["singlemode"]
    assert limit.loss_min_db == pytest.approx(loss_min_db, abs=1e-9)
    assert limit.loss_max_db == pytest.approx(loss_max_db, abs=1e-9)
    # every one of these classes spans 15 dB between its minimum and maximum (same sources)
    assert limit.loss_max_db - limit.loss_min_db == pytest.approx(15.0, abs=1e-9)
    assert preset.wavelengths_nm == pytest.approx(wavelengths_nm, abs=1e-9)


# -- transceivers ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("name", "tx_min", "tx_max", "rx_sens", "rx_over"),
    [
        # IEEE Std 802.3-2018 Clause 38 1000BASE-SX (from memory): average launch −9.5 to 0 dBm,
        # receive sensitivity −17 dBm, average receive power max 0 dBm
        ("1000BASE-SX", -9.5, 0.0, -17.0, 0.0),
        # Clause 38 1000BASE-LX on single-mode (from memory): −11 to −3 dBm; −19 dBm; −3 dBm
        ("1000BASE-LX", -11.0, -3.0, -19.0, -3.0),
        # Clause 52 10GBASE-SR (from memory): average launch −7.3 to −1.0 dBm; average receive
        # power min −9.9 dBm, max −1.0 dBm
        ("10GBASE-SR", -7.3, -1.0, -9.9, -1.0),
        # Clause 52 10GBASE-LR (from memory): −8.2 to +0.5 dBm; −14.4 dBm; +0.5 dBm
        ("10GBASE-LR", -8.2, 0.5, -14.4, 0.5),
        # ITU-T G.984.2 class B+ (from memory): OLT mean launch +1.5 to +5 dBm; ONU sensitivity
        # −27 dBm, overload −8 dBm. Class C+: +3 to +7 dBm; −30 dBm; −8 dBm
        ("GPON B+ downstream", 1.5, 5.0, -27.0, -8.0),
        ("GPON C+ downstream", 3.0, 7.0, -30.0, -8.0),
    ],
)
def test_transceiver_levels(lib, name, tx_min, tx_max, rx_sens, rx_over):
    p = lib.transceivers[name]
    assert (p.tx_min_dbm, p.tx_max_dbm, p.rx_sensitivity_dbm, p.rx_overload_dbm) == (
        pytest.approx(tx_min, abs=1e-9),
        pytest.approx(tx_max, abs=1e-9),
        pytest.approx(rx_sens, abs=1e-9),
        pytest.approx(rx_over, abs=1e-9),
    )


@pytest.mark.parametrize(("phy", "fibre"), [("10GBASE-LR", "singlemode"), ("10GBASE-SR", "OM3")])
def test_ieee_minimum_receive_power_is_launch_less_channel_loss(lib, phy, fibre):
    # IEEE 802.3 Clause 52 sets the minimum average receive power at the minimum average launch
    # power less the channel insertion loss (from memory): −8.2 − 6.2 = −14.4 dBm (LR, 10 km);
    # −7.3 − 2.6 = −9.9 dBm (SR, OM3 300 m). The two shipped files must agree with each other.
    tx = lib.transceivers[phy]
    loss = lib.applications[phy].limits[fibre].loss_max_db
    assert tx.tx_min_dbm - tx.rx_sensitivity_dbm == pytest.approx(loss, abs=1e-9)


@pytest.mark.parametrize(
    ("transceiver", "pon_class"),
    [
        ("GPON B+ downstream", "GPON Class B+"),
        ("GPON C+ downstream", "GPON Class C+"),
    ],
)
def test_gpon_optics_work_across_their_whole_class(lib, transceiver, pon_class):
    # A G.984.2 class is defined so its optics work from the class minimum to the maximum loss:
    # B+: +1.5 − 28 = −26.5 dBm ≥ −27; +5 − 13 = −8 dBm ≤ −8 (overload).
    # C+: +3 − 32 = −29 dBm ≥ −30; +7 − 17 = −10 dBm ≤ −8.
    tx = lib.transceivers[transceiver]
    limit = lib.applications[pon_class].limits["singlemode"]
    assert tx.tx_min_dbm - limit.loss_max_db >= tx.rx_sensitivity_dbm
    assert limit.loss_min_db is not None
    assert tx.tx_max_dbm - limit.loss_min_db <= tx.rx_overload_dbm
    # and the transceiver check agrees: a link at exactly the class maximum loss has no
    # attenuator need and a margin of Tx(min) − loss − Rx ≥ 0
    link = b.LinkDescription(
        segments=(b.Segment(load_presets().fibres["OS2"], 0.0),),
        components=(
            b.Component("class maximum", "other", limit.loss_max_db, loss_min_db=limit.loss_min_db),
        ),
        wavelengths_nm=(1490.0,),
    )
    check = b.check_transceiver(
        b.compute_budget(link),
        b.Transceiver(
            tx.tx_min_dbm,
            tx.tx_max_dbm,
            tx.rx_sensitivity_dbm,
            tx.rx_overload_dbm,
            wavelength_nm=1490.0,
        ),
    )
    assert check.margin_pass and not check.overload


# -- connections and splices -------------------------------------------------------------------


@pytest.mark.parametrize(
    ("kind", "name", "loss_max_db"),
    [
        (
            "connectors",
            "TIA-568.3-D",
            0.75,
        ),  # ANSI/TIA-568.3-D: 0.75 dB per mated pair (from memory)
        ("connectors", "ISO/IEC 11801-1", 0.75),  # ISO/IEC 11801-1 / 14763-3 (from memory)
        # ISO/IEC 14763-3, reference-grade to standard-grade test limits (from memory)
        ("connectors", "ISO/IEC 14763-3 reference to standard, multimode", 0.3),
        ("connectors", "ISO/IEC 14763-3 reference to standard, single-mode", 0.5),
        # IEC 61753-1 / IEC 61755-1 random-mated grades, 97 % value (from memory)
        ("connectors", "IEC 61753-1 Grade B", 0.25),
        ("connectors", "IEC 61753-1 Grade C", 0.5),
        ("connectors", "IEC 61753-1 Grade D", 1.0),
        ("splices", "fusion", 0.3),  # ANSI/TIA-568.3-D: 0.3 dB per splice, any method (from memory)
        ("splices", "mechanical", 0.3),  # same clause (from memory)
    ],
)
def test_connection_and_splice_maxima(lib, kind, name, loss_max_db):
    assert lib.find(kind, name).loss_max_db == pytest.approx(loss_max_db, abs=1e-9)


@pytest.mark.parametrize(
    ("name", "mean_db"),
    [
        # IEC 61755-1 random-mated mean attenuation: grade B ≤ 0.12, C ≤ 0.25, D ≤ 0.5 dB
        # (from memory); the preset's typical value is that mean
        ("IEC 61753-1 Grade B", 0.12),
        ("IEC 61753-1 Grade C", 0.25),
        ("IEC 61753-1 Grade D", 0.5),
    ],
)
def test_iec_grade_means(lib, name, mean_db):
    assert lib.connectors[name].loss_typical_db == pytest.approx(mean_db, abs=1e-9)


# -- fibre -------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("fibre", "nm", "db_per_km"),
    [
        # ANSI/TIA-568.3-D (2016) Table 1, cabled fibre maxima (from memory)
        ("OM1", 850, 3.5),
        ("OM1", 1300, 1.5),
        ("OM2", 850, 3.0),
        ("OM2", 1300, 1.5),
        ("OM4", 850, 3.0),
        ("OM4", 1300, 1.5),
        ("OM5", 850, 3.0),
        ("OM5", 953, 2.3),
        ("OM5", 1300, 1.5),  # 953 nm: TIA-492AAAE
        ("SM inside plant", 1310, 1.0),
        ("SM inside plant", 1550, 1.0),
        ("SM outside plant", 1310, 0.5),
        ("SM outside plant", 1550, 0.5),
        # ISO/IEC 11801-1:2017 cabled fibre: OS1a 1.0 dB/km, OS2 0.4 dB/km at 1310/1383/1550 nm
        # (from memory)
        ("OS1a", 1310, 1.0),
        ("OS1a", 1383, 1.0),
        ("OS2", 1383, 0.4),
        ("OS2", 1550, 0.4),
        # ITU-T G.652 (11/2016) G.652.D cable: 0.4 dB/km 1310–1625 nm and at 1383 nm, 0.3 dB/km
        # in 1530–1565 nm (from memory); 1577 nm lies outside 1530–1565, so 0.4
        ("G.652.D", 1310, 0.4),
        ("G.652.D", 1383, 0.4),
        ("G.652.D", 1490, 0.4),
        ("G.652.D", 1550, 0.3),
        ("G.652.D", 1577, 0.4),
        # ITU-T G.657 (11/2016): category A cable attenuation as G.652.D (from memory)
        ("G.657.A1", 1310, 0.4),
        ("G.657.A1", 1550, 0.3),
        ("G.657.A2", 1310, 0.4),
        ("G.657.A2", 1550, 0.3),
    ],
)
def test_cabled_attenuation_maxima(lib, fibre, nm, db_per_km):
    assert lib.fibres[fibre].attenuation_db_per_km(nm, "max") == pytest.approx(db_per_km, abs=1e-12)


@pytest.mark.parametrize(
    ("fibre", "core_um", "na"),
    [
        # IEC 60793-2-10 (from memory): A1b 62.5 µm, NA 0.275 ± 0.015; A1a 50 µm, NA 0.200 ± 0.015
        ("OM1", 62.5, 0.275),
        ("OM2", 50.0, 0.200),
        ("OM3", 50.0, 0.200),
        ("OM4", 50.0, 0.200),
        ("OM5", 50.0, 0.200),
    ],
)
def test_multimode_geometry(lib, fibre, core_um, na):
    f = lib.fibres[fibre]
    assert f.core_diameter_um == pytest.approx(core_um, abs=1e-9)
    assert f.numerical_aperture == pytest.approx(na, abs=1e-9)


@pytest.mark.parametrize(
    ("fibre", "typical_um"),
    [
        # ITU-T G.652 / G.657 (11/2016): nominal MFD at 1310 nm 8.6–9.2 µm, tolerance ±0.4 µm
        # (from memory). The presets' typical values (from memory): G.652.D 9.2 µm (the top of
        # the nominal range), G.657.A1 8.8 µm, G.657.A2 8.6 µm (the bottom).
        ("G.652.D", 9.2),
        ("OS2", 9.2),
        ("G.657.A1", 8.8),
        ("G.657.A2", 8.6),
    ],
)
def test_mode_field_diameter_at_1310_in_the_nominal_range(lib, fibre, typical_um):
    mfd = lib.fibres[fibre].mode_field_diameter_um(1310)
    assert mfd == pytest.approx(typical_um, abs=1e-9)
    assert 8.6 <= mfd <= 9.2  # the nominal range, not nominal ± tolerance (8.2–9.6)


def _relative_group_delay_ps_per_km(nm: float, zero_nm: float, slope: float) -> float:
    # Three-term Sellmeier fit of single-mode group delay, as used for G.652 chromatic
    # dispersion (IEC 60793-1-42, from memory): tau = tau0 + (S0/8)·(λ − λ0²/λ)², in ps/km
    return slope / 8.0 * (nm - zero_nm**2 / nm) ** 2


@pytest.mark.parametrize(
    "fibre",
    ["OS1a", "OS2", "G.652.D", "G.657.A1", "G.657.A2", "SM outside plant", "SM inside plant"],
)
def test_single_mode_group_index_follows_g652_dispersion(lib, fibre):
    # n_g(λ) − n_g(1310) = c · Δτ, with Δτ from the fit above over the G.652 range of zero-
    # dispersion wavelength λ0 = 1300–1324 nm and slope S0 = 0.073–0.092 ps/(nm²·km)
    # (ITU-T G.652 (11/2016), from memory). E.g. 1550 nm, λ0 1313, S0 0.086:
    # (1550 − 1313²/1550)² × 0.086 / 8 = 437.8² × 0.01075 = 2060 ps/km; from 1310 nm
    # (0.4 ps/km) Δτ ≈ 2060 ps/km; c·Δτ = 299 792 458 × 2.060e-9 / 1000 = 0.00062.
    # The presets hold 4 decimals, so a rounding of 0.00005 is allowed either side.
    f = lib.fibres[fibre]
    base = f.group_index(1310)
    corners = list(itertools.product((1300.0, 1324.0), (0.073, 0.092)))
    for nm in sorted(f.group_indices):
        if nm == 1310:
            continue
        predicted = [
            SPEED_OF_LIGHT_M_PER_S
            * 1e-15
            * (
                _relative_group_delay_ps_per_km(nm, z, s)
                - _relative_group_delay_ps_per_km(1310, z, s)
            )
            for z, s in corners
        ]
        rise = f.group_index(nm) - base
        assert min(predicted) - 5e-5 <= rise <= max(predicted) + 5e-5, (
            f"{fibre}: n_g({nm:g}) − n_g(1310) = {rise:.5f}, G.652 dispersion gives "
            f"{min(predicted):.5f}–{max(predicted):.5f}"
        )


@pytest.mark.parametrize(
    ("fibre", "nm", "index"),
    [
        # typical published group indices (from memory): G.652.D 1.4670–1.4677 at 1310 nm and
        # 1.4677–1.4682 at 1550 nm; 50 µm graded index 1.482 at 850 nm, 1.477 at 1300 nm;
        # 62.5 µm 1.496 and 1.491
        ("G.652.D", 1310, 1.4673),
        ("G.652.D", 1550, 1.4680),
        ("OM3", 850, 1.482),
        ("OM3", 1300, 1.477),
        ("OM1", 850, 1.496),
        ("OM1", 1300, 1.491),
    ],
)
def test_group_index_within_the_published_spread(lib, fibre, nm, index):
    # ±0.0005 is about the spread between makers' data sheets: 3.4 m on a 10 km fault distance
    assert lib.fibres[fibre].group_index(nm) == pytest.approx(index, abs=5e-4)


# -- splitters ---------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("outputs", "insertion_loss_max_db"),
    [
        # planar 1xN splitter insertion-loss maxima quoted in the preset's source (from memory):
        # 1x2 3.9, 1x4 7.2, 1x8 10.5, 1x16 13.8, 1x32 17.1, 1x64 20.6 dB
        (2, 3.9),
        (4, 7.2),
        (8, 10.5),
        (16, 13.8),
        (32, 17.1),
        (64, 20.6),
    ],
)
def test_splitter_ideal_plus_excess_is_the_quoted_maximum(lib, outputs, insertion_loss_max_db):
    # e.g. 1x32: 10·log10(32) = 15.051 dB + excess 2.1 dB = 17.151 dB ≈ 17.1 dB
    excess = lib.components["1xN splitter"].excess_max_db[outputs]
    assert splitter_ideal_loss_db(outputs) + excess == pytest.approx(
        insertion_loss_max_db, abs=0.06
    )
