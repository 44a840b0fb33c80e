"""``fieldkit budget`` and ``fieldkit presets`` as a user runs them (in-process: cli_runner.py)."""

from __future__ import annotations

import json
import subprocess
from pathlib import Path

import cli_runner
import pytest


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return cli_runner.run(*args)


def budget_json(*args: str) -> dict:
    result = run("budget", *args, "--json")
    assert result.returncode == 0, result.stderr
    return json.loads(result.stdout)


def test_json_contract_and_worked_example():
    # OS2 (ISO/IEC 11801-1:2017, 0.4 dB/km, from memory) 10 km, 4 mated pairs at the
    # TIA-568.3-D 0.75 dB, 6 fusion splices at 0.3 dB:
    # 4.0 + 3.0 + 1.8 = 8.8 dB at 1310 and at 1550 nm; margin 3 dB -> 11.8 dB
    data = budget_json(
        "--fibre-type",
        "OS2",
        "--length",
        "10 km",
        "--connectors",
        "4",
        "--splices",
        "6",
        "--margin",
        "3",
    )
    assert [w["wavelength_nm"] for w in data["wavelengths"]] == [1310.0, 1550.0]
    for row in data["wavelengths"]:
        assert row["loss_db"] == pytest.approx(8.8, abs=1e-9)
        assert row["loss_with_margin_db"] == pytest.approx(11.8, abs=1e-9)
        assert sum(i["loss_db"] for i in row["items"]) == pytest.approx(row["loss_db"], abs=1e-9)
        assert all({"name", "loss_db", "source"} <= set(i) for i in row["items"])
    assert data["application"] is None and data["transceiver"] is None


def test_application_and_transceiver_in_json():
    # IEEE Std 802.3-2018 Clause 52 (from memory): 10GBASE-LR 6.2 dB / 10 km.
    # OS2 8 km: 3.2 + 1.5 (2 pairs) = 4.7 dB; headroom 1.5 dB; 2000 m of reach left.
    # Typed levels Tx −8.2..+0.5, Rx −14.4 / +0.5: margin −8.2 − 4.7 + 14.4 = 1.5 dB.
    data = budget_json(
        "--fibre-type",
        "OS2",
        "--length",
        "8km",
        "--application",
        "10GBASE-LR",
        "--tx-min",
        "-8.2",
        "--tx-max",
        "0.5",
        "--rx-sensitivity",
        "-14.4",
        "--rx-overload",
        "0.5",
    )
    app = data["application"]
    assert app["name"] == "10GBASE-LR" and app["pass"] is True
    assert app["loss_headroom_db"] == pytest.approx(1.5, abs=1e-9)
    assert app["length_headroom_m"] == pytest.approx(2000.0, abs=1e-9)
    tx = data["transceiver"]
    assert tx["margin_db"] == pytest.approx(1.5, abs=1e-9)
    assert tx["attenuator_db"] is None and tx["attenuator_needed"] is False


def test_pon_budget_adds_the_application_wavelengths():
    # GPON (ITU-T G.984.2) works at 1310 and 1490 nm: both are in the result.
    data = budget_json(
        "--fibre-type",
        "G.652.D",
        "--length",
        "12 km",
        "--splitter",
        "1x32",
        "--application",
        "GPON Class B+",
        "--transceiver",
        "GPON B+ downstream",
    )
    assert [w["wavelength_nm"] for w in data["wavelengths"]] == [1310.0, 1490.0, 1550.0]
    # 1310: 12 × 0.4 = 4.8; 2 × 0.75 = 1.5; 1x32: 15.0515 + 2.1 = 17.1515 -> 23.4515 dB
    assert data["application"]["loss_db"] == pytest.approx(23.4515, abs=1e-4)
    assert data["application"]["pass"] is True
    assert data["transceiver"]["wavelength_nm"] == 1490.0


def test_link_file_toml_with_segments_and_components(tmp_path: Path):
    path = tmp_path / "span.toml"
    path.write_text(
        """
label = "hut to cabinet"
margin = "2 dB"
wavelengths = [1310, 1550]

[[segments]]
fibre = "G.652.D"
length = "4.2 km"

[[segments]]
fibre = "G.657.A2"
length = "150 m"

[connectors]
count = 4
grade = "IEC 61753-1 Grade C"

[[splices]]
count = 3
grade = "fusion"

[[components]]
kind = "attenuator"
loss = "5 dB"
""",
        encoding="utf-8",
    )
    data = budget_json(str(path))
    assert data["label"] == "hut to cabinet"
    row = data["wavelengths"][0]
    # 1310 nm: 4.2 × 0.4 = 1.68; 0.15 × 0.4 = 0.06; MFD 9.2/8.6 µm mismatch 0.019738;
    # 4 × 0.5 (Grade C maximum, IEC 61753-1, from memory) = 2.0; 3 × 0.3 = 0.9; 5 dB attenuator
    # total 1.68 + 0.06 + 0.019738 + 2.0 + 0.9 + 5.0 = 9.659738 dB
    assert row["loss_db"] == pytest.approx(9.659738, abs=1e-5)
    assert [i["kind"] for i in row["items"]] == [
        "fibre",
        "mismatch",
        "fibre",
        "connectors",
        "splices",
        "component",
    ]


def test_link_file_json(tmp_path: Path):
    path = tmp_path / "link.json"
    path.write_text(
        json.dumps(
            {
                "segments": [
                    {"attenuation": {"1310": "0.33 dB/km", "1550": "0.19 dB/km"}, "length": "20 km"}
                ],
                "connectors": {"count": 2, "loss": "0.5 dB"},
            }
        ),
        encoding="utf-8",
    )
    data = budget_json(str(path))
    # 1310: 20 × 0.33 = 6.6 + 1.0 = 7.6 dB; 1550: 20 × 0.19 = 3.8 + 1.0 = 4.8 dB
    assert {w["wavelength_nm"]: round(w["loss_db"], 9) for w in data["wavelengths"]} == {
        1310.0: 7.6,
        1550.0: 4.8,
    }


def test_text_output_has_the_breakdown():
    result = run(
        "budget", "--fibre-type", "OM4", "--length", "100m", "--application", "40GBASE-SR4"
    )
    assert result.returncode == 0, result.stderr
    # OM4 100 m × 3.0 dB/km (ANSI/TIA-568.3-D, from memory) = 0.30 dB + 2 × 0.75 = 1.80 dB, over
    # the 40GBASE-SR4 OM4 row's 1.5 dB (IEEE 802.3 Clause 86, from memory) by 0.30 dB
    assert "850 nm  max 1.80 dB" in result.stdout
    assert "2 mated connector pairs × 0.75 dB" in result.stdout
    assert "Application 40GBASE-SR4 on OM4: FAIL" in result.stdout
    assert "headroom \u22120.30 dB OVER" in result.stdout


def test_cli_and_workspace_print_the_same_check_lines():
    # one builder for both faces: the CLI's application section is the workspace panel's lines
    from fieldkit import linkspec
    from fieldkit.presets import load_presets
    from fieldkit.text.budget import application_lines

    result = run(
        "budget",
        "--fibre-type",
        "OS2",
        "--length",
        "10km",
        "--margin",
        "3",
        "--application",
        "10GBASE-LR",
    )
    report = linkspec.resolve(
        {
            "segments": [{"fibre": "OS2", "length": "10km"}],
            "margin": "3",
            "application": "10GBASE-LR",
        },
        load_presets(),
    ).evaluate()
    expected = application_lines(report.application)
    assert "Application " + "\n  ".join(expected) in result.stdout
    # IEEE 802.3 Clause 52 (from memory) 6.2 dB; 10 × 0.4 + 1.5 = 5.5 dB; 0.7 − 3 = −2.3 dB
    assert "10GBASE-LR on singlemode: FITS, NO MARGIN" in result.stdout
    assert "fits the limits, but not with the design margin" in result.stdout


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("--fibre-type", "OS2", "--length=-5km"), "negative"),
        (("--attenuation", "0.35", "--length", "5km", "--wavelength", "1310"), "no length unit"),
        (("--fibre-type", "OM9", "--length", "5km"), "unknown fibre 'OM9'"),
        (
            ("--fibre-type", "OS2", "--length", "5km", "--application", "100BASE-Q"),
            "unknown application",
        ),
        (("--fibre-type", "OS2", "--length", "NaN km"), "not a number"),
        (("--fibre-type", "OS2", "--length", "500"), "needs a unit"),
        (
            ("--fibre-type", "OM3", "--length", "1km", "--wavelength", "1550"),
            "no maximum attenuation",
        ),
        (("--fibre-type", "OS2", "--length", "1km", "--tx-min", "-3"), "needs all four"),
        (("--fibre-type", "OS2", "--length", "1km", "--connectors", "2.5"), "not a whole number"),
        (("--fibre-type", "OS2", "--length", "1km", "--splitter", "1x1"), "fewer than 2 outputs"),
        (("--fibre-type", "OS2", "--length", "1km", "--margin", "inf"), "infinity"),
        (
            (
                "--length",
                "1km",
            ),
            "--fibre-type TYPE or --attenuation",
        ),
    ],
)
def test_bad_input_exits_2_with_one_line(args, message):
    result = run("budget", *args)
    assert result.returncode == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    assert message in lines[0]
    assert "Traceback" not in result.stderr


def test_bad_link_file(tmp_path: Path):
    path = tmp_path / "bad.toml"
    path.write_text('[[segments]]\nfibre = "OS2"\n', encoding="utf-8")
    result = run("budget", str(path))
    assert result.returncode == 2
    assert "segment 1: no length" in result.stderr
    result = run("budget", str(tmp_path / "missing.toml"))
    assert result.returncode == 2 and "not found" in result.stderr


def test_budget_saved_onto_a_job_shows_in_its_export(tmp_path: Path):
    data_dir = str(tmp_path / "data")
    made = run("jobs", "new", "Riverside", "--data-dir", data_dir, "--json")
    assert made.returncode == 0, made.stderr
    job_id = json.loads(made.stdout)["id"]
    saved = run(
        "budget",
        "--fibre-type",
        "OS2",
        "--length",
        "10km",
        "--connectors",
        "4",
        "--job",
        job_id,
        "--link",
        "span 1",
        "--by",
        "ana",
        "--data-dir",
        data_dir,
        "--json",
    )
    assert saved.returncode == 0, saved.stderr
    assert json.loads(saved.stdout)["saved"]["link"] == "span 1"
    job_file = next((tmp_path / "data" / "jobs").glob(f"{job_id}*.json"))
    job = json.loads(job_file.read_text(encoding="utf-8"))
    budget = job["links"][0]["budget"]
    # 4.0 + 3.0 = 7.0 dB at 1310 nm; the meter workspace reads the connector figures
    assert budget["wavelengths"][0]["loss_db"] == pytest.approx(7.0, abs=1e-9)
    assert budget["description"]["connector_loss_db"] == 0.75
    assert budget["description"]["connector_count"] == 4
    assert budget["by"] == "ana"
    export = run("jobs", "export", job_id, "--format", "md", "--data-dir", data_dir)
    assert export.returncode == 0, export.stderr
    assert "loss budget" in export.stdout.lower()
    assert "4 mated connector pairs × 0.75 dB" in export.stdout


def test_presets_lists_sources():
    result = run("presets", "fibres")
    assert result.returncode == 0, result.stderr
    assert "G.652.D" in result.stdout and "source: " in result.stdout
    data = json.loads(run("presets", "applications", "--json").stdout)
    names = {a["name"] for a in data["applications"]}
    assert {"10GBASE-SR", "10GBASE-LR", "100GBASE-SR4", "GPON Class B+", "XGS-PON N1"} <= names
    assert data["problems"] == []


def test_presets_reports_a_bad_user_file(tmp_path: Path):
    config = tmp_path / "config"
    (config / "presets").mkdir(parents=True)
    (config / "presets" / "bad.toml").write_text('[[connectors]]\nname = "x"\n', encoding="utf-8")
    result = run("presets", "connectors", "--config-dir", str(config))
    assert result.returncode == 0
    assert "bad.toml: connectors entry 'x': 'loss_max_db' is missing" in result.stdout
    assert "TIA-568.3-D" in result.stdout


def test_presets_unknown_kind():
    result = run("presets", "gizmos")
    assert result.returncode == 2 and "unknown preset kind" in result.stderr


def test_presets_check_a_file_before_use(tmp_path: Path):
    good = tmp_path / "good.toml"
    good.write_text(
        '[[connectors]]\nname = "site rule"\nloss_max_db = 0.4\nsource = "ours"\n', encoding="utf-8"
    )
    result = run("presets", "--check", str(good))
    assert result.returncode == 0, result.stderr
    assert "connectors: site rule" in result.stdout
    bad = tmp_path / "bad.toml"
    bad.write_text(
        '[[splices]]\nname = "x"\nmethod = "laser"\nloss_max_db = 0.1\nsource = "ours"\n',
        encoding="utf-8",
    )
    result = run("presets", "--check", str(bad))
    assert result.returncode == 2
    assert "'method' must be fusion or mechanical, not 'laser'" in result.stdout
    assert len(result.stderr.strip().splitlines()) == 1


@pytest.mark.parametrize(
    "argv",
    [
        ("budget", "--fiber", "OS2", "--length", "1km"),
        ("budget", "--fibre", "OS2", "--length", "1km"),
        ("locate", "--distance", "3.4 km", "--fiber", "G.652.D", "--wavelength", "1550"),
        ("locate", "--distance", "3.4 km", "--fibre", "G.652.D", "--wavelength", "1550"),
    ],
)
def test_a_fibre_type_is_fibre_type_and_the_old_spellings_say_so(argv):
    # --fibre is a fibre number wherever it appears (loss, meter record, splice, trace); a
    # fibre type is --fibre-type: the old spellings stop with one line naming the new option
    result = run(*argv)
    assert result.returncode == 2
    assert "is now --fibre-type" in result.stderr
    assert "--fibre is a fibre number" in result.stderr
    fixed = ["--fibre-type" if a in ("--fiber", "--fibre") else a for a in argv]
    assert run(*fixed).returncode == 0


def test_help_calls_the_rate_a_line_rate_and_explains_it():
    # Review A15: "--bit-rate GBD" read as a bit rate in baud. It is the line rate in GBd;
    # the help says so and how it relates to the bit rate (10GBASE-LR: 10 Gb/s of data,
    # 64b/66b coded, 10.3125 GBd on the line; IEEE 802.3 clause 49, from memory).
    text = " ".join(run("budget", "--help").stdout.split())
    assert "line rate in GBd" in text and "10.3125 GBd" in text and "Gb/s" in text


def test_text_output_names_the_dispersion_worst_case():
    # Review A10: 12 km of OS2 at 1550 nm: at most 12 × 18.0097 = 216.1 ps/nm (ITU-T G.652,
    # from memory, worked in tests/unit/test_beyond_loss.py); no "0.0 ps/nm to" (S0 = 0).
    result = run("budget", "--fibre-type", "OS2", "--length", "12 km", "--wavelength", "1550")
    assert result.returncode == 0, result.stderr
    assert "Dispersion at 1550 nm: worst |D|·L 216.1 ps/nm over 12 km" in result.stdout
    assert "0.0 ps/nm" not in result.stdout and "Beyond loss" not in result.stdout


def test_json_says_whether_the_dispersion_range_is_real():
    # Review A10: at 1550 nm the low end 0.0 comes from S0 = 0 (no G.652 fibre's); the JSON
    # says so, so a reader does not take it as a minimum. 1310 nm lies inside λ0's range.
    data = budget_json("--fibre-type", "OS2", "--length", "12 km", "--wavelength", "1310,1550")
    near, far = data["checks"]["dispersion"]
    assert (near["either_sign"], far["either_sign"]) == (True, False)
