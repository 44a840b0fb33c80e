"""Written link descriptions (files, CLI, workspace) resolved into the budget's link."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit import linkspec
from fieldkit.calc.units import InputError
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
    assert linkspec.length_m(text) == pytest.approx(metres, abs=1e-9)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("500", "needs a unit"),
        ("-3 km", "negative"),
        ("5 dB", "a length"),
        ("NaN km", "NaN"),
        ("", "empty"),
        ("1e12 km", "longer than any fibre link"),
    ],
)
def test_bad_lengths(text, message):
    with pytest.raises(InputError, match=message):
        linkspec.length_m(text)


def test_attenuation_needs_a_length_unit_and_converts():
    # 0.1 dB/kft = 0.1 / 0.3048 dB/km = 0.328084 dB/km (international foot)
    assert linkspec.attenuation_db_per_km("0.1 dB/kft") == pytest.approx(0.1 / 0.3048, abs=1e-12)
    with pytest.raises(InputError, match="no length unit"):
        linkspec.attenuation_db_per_km("0.35")
    with pytest.raises(InputError, match="no length unit"):
        linkspec.attenuation_db_per_km("0.35 dB")


def test_decimal_comma_loss_is_read_as_a_decimal():
    assert linkspec.loss_db("0,5 dB") == pytest.approx(0.5, abs=1e-12)


def test_wavelength_lists_never_read_a_comma_as_a_decimal():
    assert linkspec.wavelength_list("1310,1550") == [1310.0, 1550.0]
    with pytest.raises(InputError, match="not an optical wavelength"):
        linkspec.wavelength_list("1310,5")


def test_splitter_text():
    assert linkspec.parse_splitter("1x32") == (1, 32)
    assert linkspec.parse_splitter("2 × 8") == (2, 8)
    for bad in ("3x8", "1x", "x32", "1x1"):
        with pytest.raises(InputError):
            linkspec.parse_splitter(bad)


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
    record = linkspec.budget_record(resolved, resolved.evaluate(), by="ana")
    assert record.description["connector_loss_db"] == 0.75
    again = linkspec.resolve(record.description, lib)
    assert again.evaluate().result.at(1310).loss_db == pytest.approx(7.0, abs=1e-9)


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=24))
def test_typed_values_either_parse_to_finite_numbers_or_say_why(text):
    for parse in (
        linkspec.length_m,
        linkspec.loss_db,
        linkspec.attenuation_db_per_km,
        linkspec.level_dbm,
    ):
        try:
            value = parse(text, "x") if parse is linkspec.level_dbm else parse(text)
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
            "--fiber",
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


def test_mixed_fibre_types_take_the_strictest_application_limits(lib):
    # 10GBASE-SR (IEEE 802.3 Clause 52, from memory): OM3 300 m / 2.6 dB, OM4 400 m / 2.9 dB.
    # A link of OM3 and OM4 is held to OM3's 300 m and 2.6 dB.
    resolved = linkspec.resolve(
        {
            "segments": [{"fibre": "OM4", "length": "100 m"}, {"fibre": "OM3", "length": "50 m"}],
            "application": "10GBASE-SR",
        },
        lib,
    )
    assert resolved.application.fibre == "OM4+OM3"
    assert resolved.application.loss_max_db == 2.6
    assert resolved.application.reach_m == 300.0


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
