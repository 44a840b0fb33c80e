"""``fieldkit trace show/pair/folder --job --link --save``: the analysis kept on a job's link as
the same numbers the command printed, a retest superseding, and refusals that write nothing;
``fieldkit budget --job --link`` keeping its checks beyond loss (in-process: cli_runner.py)."""

from __future__ import annotations

import json
import subprocess
from pathlib import Path

import cli_runner
import pytest

from fieldkit.jobs.store import JobStore


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return cli_runner.run(*args)


@pytest.fixture(scope="module")
def cable(tmp_path_factory: pytest.TempPathFactory) -> Path:
    # example_fibre (synthetic.py, the physical model): 8 km, a connector at 35 m, fusion
    # splices at 2100 and 4650 m, a clean end; both directions of fibres 1 and 2
    folder = tmp_path_factory.mktemp("cable")
    made = run("trace", "example", str(folder), "--fibres", "2", "--points", "20000")
    assert made.returncode == 0, made.stderr
    return folder


@pytest.fixture()
def job(tmp_path: Path) -> tuple[JobStore, str, str]:
    store = JobStore(tmp_path / "jobs")
    job_id = store.create("Mill Lane feeder").id
    store.update(job_id, lambda j: j.add_link("FEED") and None)
    return store, job_id, str(tmp_path)


def test_pair_save_keeps_what_it_printed_and_a_retest_supersedes(cable: Path, job) -> None:
    store, job_id, data = job
    files = (str(cable / "F001_1550_AB.sor"), str(cable / "F001_1550_BA.sor"))
    args = ("trace", "pair", *files, "--job", job_id, "--link", "FEED", "--data-dir", data)
    first = run(*args, "--save", "--by", "Ana Ruiz", "--json")
    assert first.returncode == 0, first.stderr
    printed = json.loads(first.stdout)
    assert printed["saved"]["records"][0]["fibre"] == 1  # from the file name F001_...
    [kept] = store.load(job_id).links[0].traces
    assert kept.by == "Ana Ruiz" and kept.direction == "A<->B" and kept.current
    assert kept.sources == ["F001_1550_AB.sor", "F001_1550_BA.sor"]  # names, never folders
    assert [e.average_db for e in kept.events] == [e["average_db"] for e in printed["events"]]
    assert [e.distance_m for e in kept.events] == [e["distance_m"] for e in printed["events"]]
    again = run(*args, "--save", "--by", "Jon Park")
    assert again.returncode == 0, again.stderr
    assert "1 earlier kept as superseded" in again.stdout
    old, new = store.load(job_id).links[0].traces
    assert old.id == kept.id and old.superseded_by == new.id and new.current
    # no --save: nothing more is written
    assert run(*args).returncode == 0 and len(store.load(job_id).links[0].traces) == 2


def test_show_save_takes_the_direction_from_the_name_or_the_option(cable: Path, job) -> None:
    store, job_id, data = job
    path = str(cable / "F002_1550_BA.sor")
    base = ("trace", "show", path, "--job", job_id, "--link", "FEED", "--data-dir", data)
    assert run(*base, "--save").returncode == 0
    assert run(*base, "--save", "--fibre", "7", "--direction", "ab").returncode == 0
    first, second = store.load(job_id).links[0].traces
    assert (first.fibre, first.direction) == (2, "B->A")
    assert (second.fibre, second.direction) == (7, "A->B")
    assert first.current and second.current  # other fibre and direction: no retest
    assert first.events[0].loss_db is not None and first.events[0].average_db is None


def test_folder_save_keeps_every_fibre(cable: Path, job) -> None:
    store, job_id, data = job
    result = run(
        "trace", "folder", str(cable), "--job", job_id, "--link", "FEED", "--save",
        "--data-dir", data, "--json",
    )  # fmt: skip
    assert result.returncode == 0, result.stderr
    saved = json.loads(result.stdout)["saved"]
    assert [(r["fibre"], r["direction"]) for r in saved["records"]] == [
        (1, "A<->B"),
        (2, "A<->B"),
    ]
    traces = store.load(job_id).links[0].traces
    assert [t.fibre for t in traces] == [1, 2] and all(len(t.curves) == 2 for t in traces)


@pytest.mark.parametrize(
    ("extra", "message"),
    [
        (("--save",), "give --job and --link"),
        (("--fibre", "3"), "--fibre goes with --save"),
        (("--fiber", "OS2"), "--fiber is now --fibre-type"),  # a fibre type's new name
    ],
)
def test_save_refusals_are_one_line_and_write_nothing(cable: Path, job, extra, message) -> None:
    store, job_id, data = job
    path = str(cable / "F001_1550_AB.sor")
    result = run("trace", "show", path, *extra, "--data-dir", data)
    assert result.returncode == 2 and message in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1
    assert store.load(job_id).links[0].traces == []


def test_a_file_without_a_fibre_number_needs_fibre(cable: Path, job, tmp_path: Path) -> None:
    store, job_id, data = job
    # a text trace named with no number; its record has no fibre ID
    lines = ["distance_m,level_db"] + [f"{k * 2.0},{-0.0002 * k * 2.0:.4f}" for k in range(3000)]
    lines += [f"{6000 + k * 2.0},-30.0" for k in range(500)]
    path = tmp_path / "spare.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    base = ("trace", "show", str(path), "--job", job_id, "--link", "FEED", "--data-dir", data)
    refused = run(*base, "--save")
    assert refused.returncode == 2 and "give --fibre N" in refused.stderr
    assert store.load(job_id).links[0].traces == []
    assert run(*base, "--save", "--fibre", "12").returncode == 0
    assert store.load(job_id).links[0].traces[0].fibre == 12


def test_budget_saved_onto_a_link_keeps_its_checks(job) -> None:
    # ITU-T G.652 (from memory): 40 km at 1550 nm accumulates at most 720.39 ps/nm
    # (hand computation in tests/unit/test_beyond_loss.py); "generic 1550 nm 80 km" tolerates
    # 1600 ps/nm (common practice).
    store, job_id, data = job
    saved = run(
        "budget", "--fibre-type", "G.652.D", "--length", "40km", "--wavelength", "1550",
        "--transceiver", "generic 1550 nm 80 km", "--job", job_id, "--link", "FEED",
        "--data-dir", data,
    )  # fmt: skip
    assert saved.returncode == 0, saved.stderr
    budget = store.load(job_id).links[0].budget
    assert budget is not None
    [row] = [c for c in budget.checks if c.kind == "dispersion"]
    # kept to the 0.1 ps/nm its sentence shows (review A10: same digits in value and words)
    assert row.value == pytest.approx(720.4, abs=1e-9) and row.limit == 1600.0
    assert row.verdict == "pass"
    # at 1550 nm D has one sign: only the worst case means anything (no "0.0 to ...", which
    # would come from S0 = 0, no G.652 fibre's)
    assert row.detail.startswith("worst |D|·L 720.4 ps/nm over 40000 m")
    assert "0.0" not in row.detail
