"""Written link descriptions (files, CLI, workspace) resolved into the budget's link."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit import inputs, linkspec
from fieldkit.calc.units import InputError
from fieldkit.jobs import budget_records
from fieldkit.presets import load_presets


@pytest.fixture(scope="module")
def lib():
    return load_presets()


def test_defaults_two_end_connections_at_the_tia_maximum(lib):
    resolved = linkspec.resolve({"segments": [{"fibre": "OS2", "length": "1 km"}]}, lib)
    assert resolved.link.connector_count == 2
    assert resolved.link.connectors.loss_max_db == 0.75  # ANSI/TIA-568.3-D (from memory)


@pytest.mark.parametrize(
    ("text", "metres"),
    [
        ("12.4 km", 12_400.0),
        ("3900 ft", 3900 * 0.3048),
        ("1.2 kft", 1200 * 0.3048),
        ("2 mi", 2 * 1609.344),  # international mile = 1609.344 m exactly
    ],
)
def test_lengths_in_any_unit(text, metres):
    assert inputs.length_m(text) == pytest.approx(metres, abs=1e-9)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("500", "needs a unit"),
        ("-3 km", "negative"),
        ("5 dB", "a fibre length"),
        ("NaN km", "NaN"),
        ("", "empty"),
        ("1e12 km", "longer than any fibre link"),
    ],
)
def test_bad_lengths(text, message):
    with pytest.raises(InputError, match=message):
        inputs.length_m(text)


def test_attenuation_needs_a_length_unit_and_converts():
    # 0.1 dB/kft = 0.1 / 0.3048 dB/km = 0.328084 dB/km (international foot)
    assert inputs.attenuation_db_per_km("0.1 dB/kft") == pytest.approx(0.1 / 0.3048, abs=1e-12)
    with pytest.raises(InputError, match="no length unit"):
        inputs.attenuation_db_per_km("0.35")
    with pytest.raises(InputError, match="no length unit"):
        inputs.attenuation_db_per_km("0.35 dB")


def test_decimal_comma_loss_is_read_as_a_decimal():
    assert inputs.loss_db("0,5 dB") == pytest.approx(0.5, abs=1e-12)


def test_wavelength_lists_never_read_a_comma_as_a_decimal():
    assert inputs.wavelength_list("1310,1550") == [1310.0, 1550.0]
    with pytest.raises(InputError, match="outside the fibre bands"):
        inputs.wavelength_list("1310,5")


def test_splitter_text():
    assert inputs.splitter("1x32") == (1, 32)
    assert inputs.splitter("2 × 8") == (2, 8)
    for bad in ("3x8", "1x", "x32", "1x1"):
        with pytest.raises(InputError):
            inputs.splitter(bad)


def test_splitter_preset_without_that_split_asks_for_the_excess(lib):
    with pytest.raises(InputError, match=r"no excess loss for 1x128 .*give the excess"):
        linkspec.splitter_component(lib, "1x128")
    typed = linkspec.splitter_component(lib, "1x128", excess="3 dB")
    # 10·log10(128) = 7 × 3.0103 = 21.0721 dB + 3 dB
    assert typed.loss_max_db == pytest.approx(24.0721, abs=1e-4)


def test_unknown_fields_and_places_are_named(lib):
    with pytest.raises(InputError, match=r"segment 2: unknown field\(s\) lenght"):
        linkspec.resolve(
            {"segments": [{"fibre": "OS2", "length": "1 km"}, {"fibre": "OS2", "lenght": "1 km"}]},
            lib,
        )
    with pytest.raises(InputError, match="link: unknown field"):
        linkspec.resolve({"segments": [{"fibre": "OS2", "length": "1 km"}], "color": 3}, lib)
    with pytest.raises(InputError, match="splices 1: give a grade or a loss"):
        linkspec.resolve(
            {
                "segments": [{"fibre": "OS2", "length": "1 km"}],
                "splices": [{"count": 2, "grade": "fusion", "loss": "0.1 dB"}],
            },
            lib,
        )


def test_application_wavelengths_snap_to_the_fibre_window(lib):
    # 1000BASE-LX is specified at 1310 nm; on OM2 the budget's 1300 nm row is in that window,
    # so no extra wavelength is added.
    resolved = linkspec.resolve(
        {"segments": [{"fibre": "OM2", "length": "500 m"}], "application": "1000BASE-LX"}, lib
    )
    assert resolved.link.budget_wavelengths_nm() == (850.0, 1300.0)
    # XGS-PON works at 1270 and 1577 nm; G.652.D has values there, so they join the defaults.
    resolved = linkspec.resolve(
        {"segments": [{"fibre": "G.652.D", "length": "10 km"}], "application": "XGS-PON N1"}, lib
    )
    assert resolved.link.budget_wavelengths_nm() == (1270.0, 1310.0, 1550.0, 1577.0)


def test_application_on_a_fibre_it_has_no_limits_for(lib):
    with pytest.raises(InputError, match=r"10GBASE-LR: no limits for fibre OM3"):
        linkspec.resolve(
            {"segments": [{"fibre": "OM3", "length": "100 m"}], "application": "10GBASE-LR"}, lib
        )


def test_record_description_round_trips(lib):
    spec = {
        "segments": [{"fibre": "OS2", "length": "10 km"}],
        "connectors": {"count": 4},
        "margin": "2 dB",
    }
    resolved = linkspec.resolve(spec, lib)
    record = budget_records.budget_record(resolved, resolved.evaluate(), by="ana")
    assert record.description["connector_loss_db"] == 0.75
    again = linkspec.resolve(record.description, lib)
    assert again.evaluate().result.at(1310).loss_db == pytest.approx(7.0, abs=1e-9)


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=24))
def test_typed_values_either_parse_to_finite_numbers_or_say_why(text):
    for parse in (
        inputs.length_m,
        inputs.loss_db,
        inputs.attenuation_db_per_km,
        inputs.level_dbm,
    ):
        try:
            value = parse(text, "x") if parse is inputs.level_dbm else parse(text)
        except InputError as exc:
            assert str(exc)
        else:
            assert math.isfinite(value)


@settings(max_examples=100, deadline=None)
@given(
    st.dictionaries(
        st.sampled_from(["fibre", "length", "attenuation", "label", "x"]),
        st.one_of(st.text(max_size=10), st.integers(), st.floats(), st.none()),
        max_size=4,
    )
)
def test_arbitrary_segments_resolve_or_say_why(segment):
    try:
        resolved = linkspec.resolve({"segments": [segment]}, load_presets())
        report = resolved.evaluate()
    except InputError as exc:
        assert str(exc)
    else:
        assert all(math.isfinite(w.loss_db) for w in report.result.wavelengths)


def test_link_options_fit_beside_a_meter_command(isolated_dirs):
    import argparse

    from fieldkit.commands.budget import add_link_options, link_from_args, link_given

    parser = argparse.ArgumentParser()
    for flag in ("--fibre", "--link", "--job", "--wavelength", "--by", "--limit", "--method"):
        parser.add_argument(flag)  # what fieldkit loss has of its own
    add_link_options(parser)
    args = parser.parse_args(
        [
            "--fibre",
            "3",
            "--link",
            "span 1",
            "--wavelength",
            "1310",
            "--fibre-type",
            "OS2",
            "--length",
            "10 km",
            "--connectors",
            "4",
        ]
    )
    assert link_given(args)
    link = link_from_args(args)
    assert link.wavelengths_nm == (1310.0,)
    # 10 km × 0.4 dB/km + 4 × 0.75 dB = 7.0 dB; a two-cord limit keeps 3 pairs: 6.25 dB
    from fieldkit.calc.budget import method_limit

    assert method_limit(link, 1).at(1310).loss_db == pytest.approx(6.25, abs=1e-9)
    assert not link_given(parser.parse_args(["--fibre", "3"]))


def test_mixed_fibre_types_are_judged_on_the_lowest_grade_fibres_row(lib):
    # 10GBASE-SR (IEEE 802.3 Clause 52, from memory): OM3 300 m / 2.6 dB, OM4 400 m / 2.9 dB.
    # A link of OM4 and OM3 is judged on the OM3 row, and says so.
    resolved = linkspec.resolve(
        {
            "segments": [{"fibre": "OM4", "length": "100 m"}, {"fibre": "OM3", "length": "50 m"}],
            "application": "10GBASE-SR",
        },
        lib,
    )
    assert resolved.application.fibre == "OM3"
    assert resolved.application.loss_max_db == 2.6
    assert resolved.application.reach_m == 300.0
    assert resolved.application.row_reason == "the OM3 row, the lowest-grade fibre of OM4 + OM3"


def test_40gbase_sr4_on_om3_and_om4_takes_the_om3_row_whole(lib):
    # The repro of the issue: 40GBASE-SR4 (IEEE 802.3 Clause 86, from memory) OM3 100 m / 1.9 dB,
    # OM4 150 m / 1.5 dB. OM3 40 m + OM4 60 m with 1.80 dB of loss: the old mixed limit (1.5 dB
    # from the OM4 row with the 100 m of the OM3 row) failed it; the OM3 row passes it.
    # Loss by hand at 850 nm: 0.04 km × 3.0 + 0.06 km × 3.0 = 0.30 dB fibre (ANSI/TIA-568.3-D
    # 3.0 dB/km, from memory) + 2 mated pairs × 0.75 dB = 1.80 dB; OM3 | OM4 have the same core
    # and NA (50 µm, 0.200), so no mismatch line.
    report = linkspec.resolve(
        {
            "segments": [{"fibre": "OM3", "length": "40 m"}, {"fibre": "OM4", "length": "60 m"}],
            "wavelengths": [850],
            "application": "40GBASE-SR4",
        },
        lib,
    ).evaluate()
    app = report.application
    assert report.result.at(850).loss_db == pytest.approx(1.80, abs=1e-9)
    assert (app.fibre, app.loss_max_db, app.reach_m) == ("OM3", 1.9, 100.0)
    assert app.loss_headroom_db == pytest.approx(0.10, abs=1e-9)
    assert app.passed and app.verdict == "pass"


def test_pre_om_fibre_gets_its_own_shorter_row(lib):
    # IEEE 802.3 Clause 38 1000BASE-SX (from memory): 62.5 µm 160 MHz·km 220 m / 2.33 dB, where
    # OM1 (200 MHz·km) has 275 m / 2.53 dB. 250 m of 62.5/160: loss 0.25 × 3.5 + 1.5 = 2.375 dB,
    # over 2.33 dB, and 250 m > 220 m: fails, where the OM1 row would pass it on both counts.
    spec = {
        "segments": [{"fibre": "62.5/160", "length": "250 m"}],
        "wavelengths": [850],
        "application": "1000BASE-SX",
    }
    app = linkspec.resolve(spec, lib).evaluate().application
    assert (app.fibre, app.loss_max_db, app.reach_m) == ("62.5/160", 2.33, 220.0)
    assert app.loss_db == pytest.approx(2.375, abs=1e-9)
    assert app.verdict == "fail"
    spec["segments"] = [{"fibre": "OM1", "length": "250 m"}]
    assert linkspec.resolve(spec, lib).evaluate().application.verdict == "pass"


def test_fits_but_not_with_the_design_margin_is_its_own_verdict(lib):
    # 10GBASE-LR (IEEE 802.3 Clause 52, from memory): 6.2 dB, 10 km. OS2 10 km × 0.4 dB/km
    # (ISO/IEC 11801-1, from memory) + 2 × 0.75 dB = 5.5 dB: 0.7 dB headroom. With a 3 dB design
    # margin the headroom after the margin is 0.7 − 3 = −2.3 dB: fits, but not with the margin.
    spec = {
        "segments": [{"fibre": "OS2", "length": "10 km"}],
        "margin": "3 dB",
        "application": "10GBASE-LR",
    }
    app = linkspec.resolve(spec, lib).evaluate().application
    assert app.passed is True
    assert app.margin_headroom_db == pytest.approx(-2.3, abs=1e-9)
    assert app.verdict == "no-margin"
    assert app.as_dict()["verdict"] == "no-margin"
    spec["margin"] = "0.5 dB"  # 0.7 − 0.5 = 0.2 dB to spare
    assert linkspec.resolve(spec, lib).evaluate().application.verdict == "pass"


def test_gpon_c_plus_short_of_its_margin_is_not_a_plain_pass(lib):
    # GPON Class C+ (ITU-T G.984.2 Amd.2 (2008) Appendix V, from memory): 17–32 dB, 20 km.
    # 20 km G.652.D at 1310 nm: 20 × 0.4 = 8.0 dB; 1x64 splitter: 10·log10(64) = 18.0618 + 2.5
    # excess (common practice) = 20.5618 dB; 2 × 0.75 = 1.5 dB; 4 fusion splices × 0.3 = 1.2 dB:
    # total 31.2618 dB, headroom 32 − 31.2618 = 0.7382 dB; with a 3 dB margin −2.2618 dB.
    report = linkspec.resolve(
        {
            "segments": [{"fibre": "G.652.D", "length": "20 km"}],
            "splices": [{"count": 4, "grade": "fusion"}],
            "components": [{"splitter": "1x64"}],
            "margin": "3 dB",
            "application": "GPON Class C+",
        },
        lib,
    ).evaluate()
    app = report.application
    assert app.loss_db == pytest.approx(31.2618, abs=1e-4)
    assert app.margin_headroom_db == pytest.approx(-2.2618, abs=1e-4)
    assert app.verdict == "no-margin"


def test_1000base_lx_launches_less_into_multimode(lib):
    # IEEE 802.3 Clause 38 1000BASE-LX (from memory): minimum launch −11.5 dBm into multimode,
    # −11.0 dBm into single-mode; sensitivity −19 dBm. Power budget 7.5 dB on OM2, 8.0 on OS2.
    on_mm = linkspec.resolve(
        {"segments": [{"fibre": "OM2", "length": "500 m"}], "transceiver": "1000BASE-LX"}, lib
    )
    on_sm = linkspec.resolve(
        {"segments": [{"fibre": "OS2", "length": "5 km"}], "transceiver": "1000BASE-LX"}, lib
    )
    assert on_mm.transceiver.tx_min_dbm == -11.5
    assert on_mm.transceiver.family == "multimode"
    assert on_sm.transceiver.tx_min_dbm == -11.0
    assert on_mm.evaluate().transceiver.power_budget_db == pytest.approx(7.5, abs=1e-9)
    assert on_sm.evaluate().transceiver.power_budget_db == pytest.approx(8.0, abs=1e-9)


def test_applications_with_a_row_for_the_links_fibre_come_first(lib):
    fits, others = lib.applications_by_fit(("OS2",), "singlemode")
    assert "10GBASE-LR" in fits and "GPON Class B+" in fits
    assert "10GBASE-SR" in others and "40GBASE-SR4" in others
    assert "1000BASE-LX" in fits  # it has a single-mode row
    fits, others = lib.applications_by_fit(("OM4",), "multimode")
    assert "10GBASE-SR" in fits and "10GBASE-LR" in others


def test_a_multimode_application_on_single_mode_fibre_names_the_cut_off(lib):
    with pytest.raises(InputError, match=r"no limits for fibre OS2 .*below its cable cut-off"):
        linkspec.resolve(
            {"segments": [{"fibre": "OS2", "length": "1 km"}], "application": "10GBASE-SR"},
            lib,
        )


def test_xgs_pon_upstream_at_1270_nm_uses_a_marked_estimate(lib):
    # The repro: 15 km G.652.D + 200 m G.657.A2 + 1x32 splitter, XGS-PON N1 (ITU-T
    # G.9807.1, from memory: 14–29 dB). No standard gives a 1270 nm maximum; Rayleigh scaling
    # of the 0.4 dB/km 1310 nm maximum: 1310/1270 = 1.0314961, squared 1.0639843, squared
    # 1.1320626: 0.4528250 dB/km. At 1270 nm: 15.2 km × 0.452825 = 6.882940 dB; 1x32:
    # 15.051500 + 2.1 = 17.151500 dB (excess: common practice); 2 × 0.75 = 1.5 dB; G.652.D |
    # G.657.A2 MFD 9.0 / 8.4 µm at 1270 nm (typical, from memory): 2·9·8.4 = 151.2, 81 + 70.56
    # = 151.56, ratio 0.9976247, squared 0.9952550, −10·log10 = 0.020654 dB. Total 25.555094 dB
    # where the unscaled 0.4 dB/km (6.08 dB of fibre) said 24.752 dB.
    report = linkspec.resolve(
        {
            "segments": [
                {"fibre": "G.652.D", "length": "15 km"},
                {"fibre": "G.657.A2", "length": "200 m"},
            ],
            "components": [{"splitter": "1x32"}],
            "application": "XGS-PON N1",
        },
        lib,
    ).evaluate()
    row = report.result.at(1270)
    assert row.loss_db == pytest.approx(25.555094, abs=1e-5)
    fibre_items = [i for i in row.items if i.kind == "fibre"]
    assert all("(estimate)" in i.name for i in fibre_items)
    assert all("estimate" in i.source for i in fibre_items)
    assert any("1270 nm: 0.453 dB/km is an estimate" in n for n in report.result.notes)


def test_the_help_example_is_a_valid_link_file(lib):
    import textwrap
    import tomllib

    from fieldkit.commands.budget import _FILE_EXAMPLE

    body = textwrap.dedent(_FILE_EXAMPLE.split("\n", 1)[1])
    report = linkspec.resolve(tomllib.loads(body), lib).evaluate()
    # 1310 nm: 12.4 × 0.4 = 4.96; 4 × 0.75 = 3.0; 6 × 0.3 = 1.8; 1x32 15.0515 + 2.1 = 17.1515
    # total 26.9115 dB, within the GPON Class B+ 28 dB (ITU-T G.984.2 Amd 1, from memory)
    assert report.result.at(1310).loss_db == pytest.approx(26.9115, abs=1e-4)
    assert report.application is not None and report.application.loss_pass
