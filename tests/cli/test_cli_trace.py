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
        (("show", "{cable}/F001_1550_AB.sor", "--fibre-type", "nonesuch"), "unknown fibre"),
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


def test_fill_splices_writes_then_asks_before_overwriting(cable: Path, isolated_dirs):
    from fieldkit import locations
    from fieldkit.actions import splices as act
    from fieldkit.jobs.store import JobStore

    store = JobStore(locations.jobs_dir(isolated_dirs["data"]))
    job = store.create("Mill Lane")
    # example_fibre puts fusion splices at 2100 m and 4650 m of fibre; the closure's route
    # position 2070 m lies within 3 % + 20 m of 2100 m
    act.add_closure(store, job.id, "feeder", "JC-3", route_distance_m=2070.0, by="Ana")
    args = ["--job", job.id, "--link", "feeder", "--closure", "JC-3", "--by", "Ana", "--json"]
    result = run("fill-splices", "--folder", str(cable), *args)
    assert result.returncode == 0, result.stderr
    data = json.loads(result.stdout)
    assert {(w["fibre"], w["direction"]) for w in data["written"]} == {
        (1, "A->B"),
        (1, "B->A"),
        (2, "A->B"),
        (2, "B->A"),
    }
    closure = store.load(job.id).links[0].closures[0]
    splice = next(s for s in closure.splices if s.fibre_a == 1)
    act.update_losses(store, job.id, "feeder", "JC-3", splice.id, loss_ab_db=0.9, overwrite=True)
    again = run("fill-splices", "--folder", str(cable), *args)
    assert again.returncode == 2 and "already holds 0.900 dB" in again.stderr
    assert (
        next(
            s for s in store.load(job.id).links[0].closures[0].splices if s.fibre_a == 1
        ).loss_ab_db
        == 0.9
    )
    forced = run("fill-splices", "--folder", str(cable), *args, "--overwrite")
    assert forced.returncode == 0, forced.stderr


def test_folder_csv_has_a_row_per_fibre(cable: Path, tmp_path: Path):
    import csv

    out = tmp_path / "cable.csv"
    result = run("folder", str(cable), "--csv", str(out), "--quiet")
    assert result.returncode == 0, result.stderr
    rows = list(csv.DictReader(out.read_text(encoding="utf-8").splitlines()))
    assert [r["fibre"] for r in rows] == ["1", "2"]
    assert all(r["directions"] == "A→B+B→A" and r["verdict"] for r in rows)
    # example_fibre: 8 km span
    assert float(rows[0]["length_m"]) == pytest.approx(8000.0, abs=1.0)
