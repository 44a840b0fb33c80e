"""``fieldkit splice``: the fixed JSON shapes and the one-line refusals (in-process, plus one
subprocess run)."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from fieldkit.cli import main


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(["splice", *args])
    out, err = capsys.readouterr()
    return code, out, err


def ok_json(capsys: pytest.CaptureFixture[str], *args: str) -> dict:
    code, out, err = run(capsys, *args, "--json")
    assert code == 0, err
    return json.loads(out)


def refused(capsys: pytest.CaptureFixture[str], *args: str) -> str:
    code, _, err = run(capsys, *args)
    assert code == 2 and len(err.strip().splitlines()) == 1, err
    return err


@pytest.mark.parametrize(
    ("fibre", "per_tube", "expected"),
    [
        ("14", "12", (2, "orange", 2, "orange")),  # TIA-598, the example
        ("144", "12", (12, "aqua", 12, "aqua")),  # TIA-598, the example
        ("7", "6", (2, "orange", 1, "blue")),  # 6 a tube: (7-1)//6+1 = 2, (7-1)%6+1 = 1
    ],
)
def test_colour_json_shape(
    capsys: pytest.CaptureFixture[str], fibre: str, per_tube: str, expected: tuple
) -> None:
    data = ok_json(capsys, "colour", fibre, "--per-tube", per_tube)
    assert (
        data["tube"],
        data["tube_colour"],
        data["fibre_in_tube"],
        data["fibre_colour"],
    ) == expected


def test_colour_refuses_unknown_sequence(capsys: pytest.CaptureFixture[str]) -> None:
    assert "unknown colour sequence 'nope'" in refused(capsys, "colour", "3", "--sequence", "nope")


@pytest.fixture
def job(capsys: pytest.CaptureFixture[str]) -> str:
    assert main(["jobs", "new", "Splice CLI", "--json"]) == 0
    job_id = json.loads(capsys.readouterr().out)["id"]
    common = ["--job", job_id, "--link", "L1", "--by", "Ana"]
    assert main(["splice", "closure", *common, "JC-1", "--route-distance", "2.1 km"]) == 0
    for name in ("C1", "C2"):
        assert main(["splice", "cable", *common, "--closure", "JC-1", name, "--fibres", "24"]) == 0
    capsys.readouterr()
    return job_id


def add(job: str, *more: str) -> list[str]:
    return ["add", "--job", job, "--link", "L1", "--closure", "JC-1", *more]


def test_add_gives_average_and_pass(
    capsys: pytest.CaptureFixture[str], job: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("FIELDKIT_OPERATOR", "Ana")  # the operator when --by is not given
    data = ok_json(capsys, *add(job, "--fibre", "1", "--loss-ab", "-0.05", "--loss-ba", "0.25"))
    assert data["average_db"] == pytest.approx(0.10, abs=1e-9)  # (−0.05 + 0.25) / 2
    assert data["pass"] is True and data["by"] == "Ana"
    one = ok_json(capsys, *add(job, "--fibre", "2", "--loss-ab", "0.05"))
    assert one["average_db"] is None and one["pass"] is None


def test_add_with_only_the_fixed_options_creates_what_it_needs(
    capsys: pytest.CaptureFixture[str], job: str
) -> None:
    data = ok_json(
        capsys, "add", "--job", job, "--link", "L2", "--closure", "New", "--fibre", "3",
        "--estimate", "0.02",
    )  # fmt: skip
    assert data["fibre_b"] == 3 and data["pass"] is None and data["average_db"] is None


@pytest.mark.parametrize(
    ("more", "message"),
    [
        (["--fibre", "25"], "past cable C1's 24 fibres"),
        (["--fibre", "1", "--loss-ab", "0.3 dBm"], "--loss-ab"),
        (["--fibre", "0"], "--fibre"),
        (["--fibre", "1", "--tray", "x"], "--tray"),
    ],
)
def test_bad_input_exits_2_with_one_line(
    capsys: pytest.CaptureFixture[str], job: str, more: list[str], message: str
) -> None:
    assert message in refused(capsys, *add(job, *more))


def test_second_splice_needs_resplice(capsys: pytest.CaptureFixture[str], job: str) -> None:
    ok_json(capsys, *add(job, "--fibre", "4", "--loss-ab", "0.4", "--loss-ba", "0.5"))
    assert "--resplice" in refused(capsys, *add(job, "--fibre", "4"))
    again = ok_json(
        capsys, *add(job, "--fibre", "4", "--resplice", "--loss-ab", "0.04", "--loss-ba", "0.06")
    )
    assert again["replaces"] and again["pass"] is True
    listing = ok_json(capsys, "list", "--job", job)
    splices = listing["closures"][0]["splices"]
    assert [(s["fibre_a"], s["superseded"]) for s in splices] == [(4, False), (4, True)]


def test_plan_csv_out_and_back(capsys: pytest.CaptureFixture[str], job: str, tmp_path) -> None:
    base = ["--job", job, "--link", "L1", "--closure", "JC-1"]
    data = ok_json(capsys, "plan", *base, "1-12 > 13-24; 13-24 > 1-12")
    assert data["plan"][0]["first_b"] == 13
    out = tmp_path / "plan.csv"
    assert main(["splice", "plan", *base, "--to-csv", str(out)]) == 0
    capsys.readouterr()
    back = ok_json(capsys, "plan", *base, "--from-csv", str(out))
    assert back["plan"] == data["plan"]


def test_splice_command_runs_as_a_program() -> None:
    proc = subprocess.run(
        [sys.executable, "-m", "fieldkit", "splice", "colour", "20", "--json"],
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert proc.returncode == 0, proc.stderr
    # TIA-598: fibre 20 of 12-fibre tubes is tube 2 (orange), fibre 8 (black)
    data = json.loads(proc.stdout)
    assert (data["tube_colour"], data["fibre_colour"]) == ("orange", "black")


def test_cable_with_unknown_colour_sequence_is_refused(
    capsys: pytest.CaptureFixture[str], job: str
) -> None:
    base = ["--job", job, "--link", "L1", "--closure", "JC-1"]
    err = refused(capsys, "cable", *base, "C3", "--fibres", "12", "--sequence", "rainbow")
    assert "unknown colour sequence 'rainbow'" in err


def test_closure_at_fault_needs_a_located_fault(
    capsys: pytest.CaptureFixture[str], job: str
) -> None:
    err = refused(capsys, "closure", "--job", job, "--link", "L1", "R-1", "--at-fault")
    assert "no located fault" in err


def test_listing_shows_the_closure_and_its_tray_map(
    capsys: pytest.CaptureFixture[str], job: str
) -> None:
    base = ["--job", job, "--link", "L1", "--closure", "JC-1"]
    assert main(["splice", "tray", *base, "1", "--capacity", "12"]) == 0
    capsys.readouterr()
    ok_json(capsys, *add(job, "--fibre", "14", "--loss-ab", "0.04", "--loss-ba", "0.06"))
    code, out, _ = run(capsys, "list", "--job", job)
    assert code == 0
    # TIA-598, 12 a tube: fibre 14 is tube 2 orange, fibre 2 orange; (0.04 + 0.06) / 2 = 0.05
    assert "tray 1 (1/12): C1 14" in out
    assert "C1 14 orange/orange → C2 14 orange/orange, tray 1 slot 1" in out
    assert "average 0.05 dB: pass" in out


def test_splices_are_stamped_with_the_saved_operator_like_every_command(
    capsys: pytest.CaptureFixture[str], job: str
) -> None:
    # the same rule as budget, locate and jobs: --by, else $FIELDKIT_OPERATOR, else the name
    # saved in the terminal UI (it was --by or the variable only, so a splice went in unsigned)
    import os
    from pathlib import Path

    from fieldkit.actions.operator import save_operator

    save_operator(Path(os.environ["FIELDKIT_CONFIG_DIR"]), "Saved Splicer")
    data = ok_json(capsys, *add(job, "--fibre", "3", "--loss-ab", "0.02"))
    assert data["by"] == "Saved Splicer"
