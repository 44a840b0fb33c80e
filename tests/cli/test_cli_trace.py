"""``fieldkit trace`` run as a user runs it (in-process through cli_runner)."""

from __future__ import annotations

import json
import subprocess
from pathlib import Path

import cli_runner
import pytest

from fieldkit import safety


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return cli_runner.run("trace", *args)


@pytest.fixture(scope="module")
def cable(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("cable")
    result = run("example", str(folder), "--fibres", "2", "--points", "20000")
    assert result.returncode == 0, result.stderr
    return folder


def test_show_json_has_the_fixed_keys(cable: Path):
    result = run("show", str(cable / "F001_1550_AB.sor"), "--json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["length_m"] == pytest.approx(8000.0, abs=1.0)  # example_fibre's length
    kinds = {e["kind"] for e in data["events"]}
    assert kinds <= {"splice", "reflective", "gainer", "end"}
    for e in data["events"]:
        assert {"distance_m", "kind", "loss_db", "reflectance_db"} <= set(e)
        if e["kind"] == "end":
            assert e["loss_db"] is None
        if e["kind"] == "splice":
            assert e["reflectance_db"] is None
    assert all("attenuation_db_per_km" in s for s in data["sections"])
    # the instrument's own table is kept apart
    assert data["instrument_events"] and "code" in data["instrument_events"][0]


def test_pair_json_has_the_fixed_keys(cable: Path):
    result = run("pair", str(cable / "F001_1550_AB.sor"), str(cable / "F001_1550_BA.sor"), "--json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    for e in data["events"]:
        assert {"distance_m", "loss_ab_db", "loss_ba_db", "average_db"} <= set(e)
    # the patch connector 35 m from end A (example_fibre), seen from both ends
    first = data["events"][0]
    assert first["distance_m"] == pytest.approx(35.0, abs=2.0)
    assert first["average_db"] == pytest.approx(0.35, abs=0.05)


def test_show_text_and_five_point(cable: Path):
    result = run("show", str(cable / "F002_1550_BA.sor"), "--loss-method", "five-point")
    assert result.returncode == 0, result.stderr
    assert "five-point method" in result.stdout
    assert "instrument's own events" in result.stdout


def test_folder_table_and_json(cable: Path):
    result = run("folder", str(cable), "--json")
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    assert [f["fibre"] for f in data["fibres"]] == ["1", "2"]
    assert all(f["directions"] == "A→B+B→A" for f in data["fibres"])


@pytest.mark.parametrize(
    ("args", "problem"),
    [
        (("show", "missing.sor"), "no such file"),
        (("show", "{cable}/F001_1550_AB.sor", "--splice-threshold", "nan"), "splice-threshold"),
        (("show", "{cable}/F001_1550_AB.sor", "--end-threshold", "0,1"), "outside"),
        (("show", "{cable}/F001_1550_AB.sor", "--fibre-type", "nonesuch"), "no fibre preset"),
        (("pair", "{cable}/F001_1550_AB.sor", "{cable}/broken.sor"), "broken.sor"),
        (("folder", "{cable}/F001_1550_AB.sor"), "not a folder"),
        (("folder", "{empty}"), "no trace files"),
    ],
)
def test_bad_input_exits_2_with_one_line(cable: Path, tmp_path: Path, args, problem):
    (cable / "broken.sor").write_bytes(b"Map\0\xc8\x00")
    empty = tmp_path / "empty"
    empty.mkdir()
    result = run(*(a.format(cable=cable, empty=empty) for a in args))
    (cable / "broken.sor").unlink()
    assert result.returncode == 2
    assert result.stderr.count("\n") == 1 and problem in result.stderr
    assert "Traceback" not in result.stderr


def test_help_carries_the_otdr_caution():
    result = run("show", "--help")
    text = " ".join(result.stdout.split())
    assert " ".join(safety.OTDR_LIVE_FIBRE.split()) in text


def test_html_page_is_self_contained_with_an_svg_per_trace(cable: Path, tmp_path: Path):
    import re
    import xml.etree.ElementTree as ET

    out = tmp_path / "pair.html"
    result = run(
        "pair",
        str(cable / "F001_1550_AB.sor"),
        str(cable / "F001_1550_BA.sor"),
        "--html",
        str(out),
    )
    assert result.returncode == 0, result.stderr
    page = out.read_text(encoding="utf-8")
    assert "<script" not in page and "http://" not in page.replace(
        'xmlns="http://www.w3.org/2000/svg"', ""
    )
    svgs = re.findall(r"<svg.*?</svg>", page, re.S)
    assert len(svgs) == 2
    root = ET.fromstring(svgs[0])  # well-formed XML
    assert root.tag.endswith("svg")
    assert "both directions averaged" in page.lower()
    assert "The instrument's own events" in page
    assert " ".join(safety.OTDR_LIVE_FIBRE.split()) in " ".join(page.split()).replace("&#x27;", "'")
