"""Shipped presets, user presets, and the messages for bad preset files."""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldkit.calc.units import InputError
from fieldkit.presets import KINDS, load_file, load_presets, shipped_dir


def write(config: Path, name: str, text: str) -> Path:
    folder = config / "presets"
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def test_shipped_presets_load_without_problems():
    lib = load_presets()
    assert lib.problems == []
    for kind in KINDS:
        assert lib.of_kind(kind), f"no shipped {kind}"


def test_every_shipped_entry_names_its_source():
    lib = load_presets()
    for kind in KINDS:
        for preset in lib.of_kind(kind).values():
            assert preset.source.strip(), f"{kind} {preset.name} has no source"


def test_required_fibre_types_are_shipped():
    lib = load_presets()
    for name in ("OM1", "OM2", "OM3", "OM4", "OM5", "OS1a", "OS2", "G.652.D", "G.657.A1"):
        assert name in lib.fibres


@pytest.mark.parametrize(
    ("fibre", "nm", "grade", "db_per_km"),
    [
        ("OM3", 850, "max", 3.0),  # ANSI/TIA-568.3-D (2016) Table 1 (from memory)
        ("OM3", 1300, "max", 1.5),  # ANSI/TIA-568.3-D (2016) Table 1 (from memory)
        ("OS2", 1310, "max", 0.4),  # ISO/IEC 11801-1:2017 OS2 (from memory)
        ("OS1a", 1550, "max", 1.0),  # ISO/IEC 11801-1:2017 OS1a (from memory)
        ("G.652.D", 1550, "max", 0.3),  # ITU-T G.652 (11/2016) G.652.D cable (from memory)
        ("G.652.D", 1625, "max", 0.4),  # ITU-T G.652 (11/2016) 1310–1625 nm maximum (from memory)
    ],
)
def test_attenuation_values(fibre, nm, grade, db_per_km):
    assert load_presets().fibres[fibre].attenuation_db_per_km(nm, grade) == pytest.approx(
        db_per_km, abs=1e-12
    )


@pytest.mark.parametrize(
    ("fibre", "nm", "index"),
    [
        # typical published group indices (from memory): ±0.0005 is the spread between makers'
        # data sheets, 3.4 m at 10 km (the old ±0.01 let 68 m at 10 km through)
        ("G.652.D", 1310, 1.4673),
        ("G.652.D", 1550, 1.4680),
        ("OM3", 850, 1.482),
        ("OM3", 1300, 1.477),
    ],
)
def test_group_index_typical_values(fibre, nm, index):
    assert load_presets().fibres[fibre].group_index(nm) == pytest.approx(index, abs=5e-4)


def test_group_index_missing_wavelength_names_the_fibre_and_what_it_has():
    fibre = load_presets().fibres["OM4"]
    with pytest.raises(InputError, match=r"OM4: no group index at 1550 nm .*850 nm, 1300 nm"):
        fibre.group_index(1550)


def test_typical_never_above_maximum_in_shipped_fibres():
    for fibre in load_presets().fibres.values():
        for nm, typical in fibre.attenuation_typical.items():
            assert typical <= fibre.attenuation_max[nm]


def test_find_forgives_case_and_spacing():
    lib = load_presets()
    assert lib.find("fibres", "g652d").name == "G.652.D"
    assert lib.find("applications", "gpon class b+").name == "GPON Class B+"
    with pytest.raises(InputError, match="unknown fibre 'OM9' .*OM1"):
        lib.find("fibres", "OM9")


def test_user_preset_extends_and_overrides(isolated_dirs):
    config = isolated_dirs["config"]
    write(
        config,
        "mine.toml",
        """
[[fibres]]
name = "OS2"
family = "singlemode"
attenuation_max_db_per_km = { 1310 = 0.35, 1550 = 0.25 }
source = "our cable's data sheet"

[[connectors]]
name = "site low-loss"
loss_max_db = 0.35
source = "our acceptance rule"
""",
    )
    lib = load_presets(config)
    assert lib.problems == []
    assert lib.fibres["OS2"].attenuation_db_per_km(1310) == 0.35
    assert lib.fibres["OS2"].origin.endswith("mine.toml")
    assert lib.connectors["site low-loss"].loss_max_db == 0.35
    assert "TIA-568.3-D" in lib.connectors  # shipped ones still there


def test_bad_file_and_bad_entries_are_reported_and_the_rest_load(isolated_dirs):
    config = isolated_dirs["config"]
    write(config, "broken.toml", "[[fibres]\nname = ")
    write(
        config,
        "mixed.toml",
        """
[[fibres]]
name = "good one"
family = "singlemode"
attenuation_max_db_per_km = { 1310 = 0.4 }
source = "test"

[[fibres]]
name = "typo"
family = "singlemode"
attenuation_max_db_per_km = { 1310 = 0.4 }
sauce = "test"

[[fibres]]
name = "upside down"
family = "singlemode"
attenuation_max_db_per_km = { 1310 = 0.4 }
attenuation_typical_db_per_km = { 1310 = 0.5 }
source = "test"

[[connectors]]
name = "nan loss"
loss_max_db = nan
source = "test"

[[transceivers]]
name = "backwards"
tx_min_dbm = 0
tx_max_dbm = -3
rx_sensitivity_dbm = -20
rx_overload_dbm = -3
source = "test"

[[widgets]]
name = "x"
""",
    )
    lib = load_presets(config)
    problems = "\n".join(lib.problems)
    assert "broken.toml: is not valid TOML" in problems
    assert "mixed.toml: fibres entry 'typo': unknown field(s) sauce" in problems
    assert (
        "fibres entry 'upside down': typical attenuation 0.5 dB/km at 1310 nm is above" in problems
    )
    assert "connectors entry 'nan loss': 'loss_max_db' must be a finite number" in problems
    assert "transceivers entry 'backwards': 'tx_min_dbm' is above 'tx_max_dbm'" in problems
    assert "unknown section 'widgets'" in problems
    assert len(lib.problems) == 6
    assert "good one" in lib.fibres
    assert "OM3" in lib.fibres  # shipped presets unaffected


def test_missing_fields_named(tmp_path):
    path = tmp_path / "x.toml"
    path.write_text(
        '[[applications]]\nname = "10G thing"\nwavelengths_nm = [850]\n'
        'limits.OM3 = { reach_m = 300 }\nsource = "x"\n',
        encoding="utf-8",
    )
    lib = load_file(path)
    assert lib.problems == [
        f"{path}: applications entry '10G thing': limits for 'OM3': 'loss_max_db' is missing"
    ]


def test_cache_rereads_a_changed_file(isolated_dirs):
    config = isolated_dirs["config"]
    text = '[[splices]]\nname = "ours"\nmethod = "fusion"\nloss_max_db = {}\nsource = "x"\n'
    path = write(config, "s.toml", text.format(0.1))
    assert load_presets(config).splices["ours"].loss_max_db == 0.1
    assert load_presets(config) is load_presets(config)  # cached
    path.write_text(text.format(0.15), encoding="utf-8")
    import os

    st = path.stat()
    os.utime(path, ns=(st.st_atime_ns, st.st_mtime_ns + 1_000_000))
    assert load_presets(config).splices["ours"].loss_max_db == 0.15


def test_shipped_dir_is_the_source_tree_in_an_editable_install():
    assert (shipped_dir() / "fibres.toml").is_file()


def test_budget_modules_import_without_the_ui_and_build_nothing():
    import subprocess
    import sys

    code = (
        "import sys, fieldkit.presets, fieldkit.linkspec, fieldkit.calc.budget, "
        "fieldkit.calc.coupling, fieldkit.commands.budget, fieldkit.commands.presets_cmd; "
        "print('textual' in sys.modules, 'pint' in sys.modules)"
    )
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert run.returncode == 0, run.stderr
    assert run.stdout.split() == ["False", "False"]


def test_new_fields_are_checked_like_the_others(tmp_path):
    path = tmp_path / "x.toml"
    path.write_text(
        """
[[transceivers]]
name = "odd LX"
tx_min_dbm = -11
tx_max_dbm = -3
rx_sensitivity_dbm = -19
rx_overload_dbm = -3
by_family.multimode = { tx_min_dbm = -2 }
source = "test"

[[fibres]]
name = "half dispersion"
family = "singlemode"
attenuation_max_db_per_km = { 1310 = 0.4 }
zero_dispersion_nm = [1300, 1324]
source = "test"

[[reflectance]]
name = "positive"
reflectance_max_db = 5
source = "test"
""",
        encoding="utf-8",
    )
    lib = load_file(path)
    assert lib.problems == [
        f"{path}: transceivers entry 'odd LX': 'by_family.multimode': 'tx_min_dbm' is above "
        "'tx_max_dbm'",
        f"{path}: fibres entry 'half dispersion': give 'zero_dispersion_nm' and "
        "'dispersion_slope_ps_nm2_km' together",
        f"{path}: reflectance entry 'positive': 'reflectance_max_db' must be at most 0, not 5",
    ]


def test_find_is_typed_by_kind():
    lib = load_presets()
    fibre = lib.find("fibres", "os2")
    assert fibre.family == "singlemode"  # a FibrePreset, not Any (mypy checks the attribute)
    assert lib.find("reflectance", "gpon odn").orl_min_db == 32.0
