"""``fieldkit loss`` and ``fieldkit reference`` run in-process (cli_runner.py)."""

from __future__ import annotations

import json
import re
import subprocess
from pathlib import Path

import cli_runner
import pytest


def run(*args: str, **given: str | bool | list[str]) -> subprocess.CompletedProcess[str]:
    """``fieldkit ARGS... OPTIONS...``, the options from keywords (``cli_runner.options``)."""
    return cli_runner.run(*args, *cli_runner.options(**given))


def run_json(*args: str, **given: str | bool | list[str]) -> dict:
    proc = run(*args, *cli_runner.options(**given), "--json")
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout)


def test_loss_with_a_typed_limit() -> None:
    # Hand computation: -7.20 − (-9.65) = 2.45 dB; limit 3.00 dB; margin 3.00 − 2.45 = 0.55 dB.
    out = run_json("loss", reference="-7.20", reading="-9.65", limit="3")
    assert out["loss_db"] == pytest.approx(2.45, abs=1e-9)
    assert out["limit_db"] == pytest.approx(3.0, abs=1e-12)
    assert out["margin_db"] == pytest.approx(0.55, abs=1e-9)
    assert out["pass"] is True and out["status"] == "pass"
    assert out["average_db"] is None
    assert out["warnings"] == []


def test_loss_in_linear_units_and_both_directions() -> None:
    # ITU-R V.574: 100 µW = -10 dBm, 10 µW = -20 dBm, 12.5 µW = -19.0309 dBm.
    # A->B: -10 − (-20) = 10.00 dB; B->A: 10·log10(100/12.5) = 9.0309 dB; mean 9.51545 dB.
    out = run_json("loss", reference="100 uW", reading="10 µW", reading_back="12.5 uW", limit="9.5")
    assert out["loss_db"] == pytest.approx(10.0, abs=1e-9)
    assert out["loss_back_db"] == pytest.approx(9.03090, abs=1e-5)
    assert out["average_db"] == pytest.approx(9.51545, abs=1e-5)
    assert out["pass"] is False and out["status"] == "fail"
    assert out["margin_db"] == pytest.approx(9.5 - 10.0, abs=1e-9)


def test_negative_loss_is_never_a_pass() -> None:
    out = run_json("loss", reference="-7.2", reading="-6.9", limit="3")
    assert out["loss_db"] == pytest.approx(-0.3, abs=1e-9)
    assert out["pass"] is None and out["status"] == "reference-problem"
    assert "negative-loss" in out["flags"]
    assert any("reference" in w for w in out["warnings"])
    text = run("loss", reference="-7.2", reading="-6.9", limit="3")
    assert "REFERENCE PROBLEM" in text.stdout and "PASS\n" not in text.stdout


@pytest.mark.parametrize(
    ("method", "end_connections"),
    # IEC 61280-4-1 / TIA-526-14-B (from memory): one-cord = B = 2, two-cord = A = 1,
    # three-cord = C = 0 end connections.
    [("one-cord", 2), ("B", 2), ("two-cord", 1), ("Method A", 1), ("three-cord", 0), ("C", 0)],
)
def test_method_and_end_connections(method: str, end_connections: int) -> None:
    out = run_json("loss", reference="-7", reading="-8", method=method)
    assert out["end_connections_included"] == end_connections
    assert out["status"] == "no-limit" and out["pass"] is None


def test_plausibility_warning_for_a_weak_reference() -> None:
    # Typical single-mode source -7 dBm (common practice): -12 dBm is 5.0 dB below it.
    out = run_json("loss", reference="-12", reading="-13", wavelength="1310")
    assert any("5.0 dB below" in w and "clean" in w for w in out["warnings"])
    out = run_json("loss", reference="-12", reading="-13", wavelength="1310", source_level="-11")
    assert out["warnings"] == []


@pytest.mark.parametrize(
    ("args", "problem"),
    [
        (["--reference", "5 km", "--reading", "-8"], "reference"),
        (["--reference", "-7", "--reading", "0 mW"], "reading"),
        (["--reference", "-7", "--reading", "-8", "--method", "four-cord"], "method"),
        (["--reference", "-7", "--reading", "-8", "--limit", "-1"], "limit"),
        (["--reference", "-7", "--reading", "-8", "--limit", "1,234"], "ambiguous"),
        (["--reference", "-7", "--reading", "-8", "--wavelength", "5"], "wavelength"),
        (["--reference", "-7", "--reading", "-8", "--reference-back", "-7"], "--reading-back"),
        (["--reference", "-7", "--reading", "-8", "--fibre", "2"], "--job and --link"),
    ],
)
def test_bad_input_exits_2_with_one_line(args: list[str], problem: str) -> None:
    proc = run("loss", *args)
    assert proc.returncode == 2
    assert problem in proc.stderr
    assert len(proc.stderr.strip().splitlines()) == 1
    assert "Traceback" not in proc.stderr


def _new_job(data: Path) -> str:
    from fieldkit.jobs.store import JobStore

    return JobStore(data / "jobs").create("Campus trunk").id


def test_reference_and_results_recorded_into_a_job(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.jobs.store import JobStore

    job_id = _new_job(isolated_dirs["data"])
    saved = run_json(
        "reference",
        job=job_id[:8],
        link="Trunk 1",
        wavelength="1310",
        level="-7.20",
        method="two-cord",
        source="LS-1",
        meter="PM-7",
        cord=["TC-1", "TC-2"],
        by="Ana",
    )
    reference_id = saved["saved"]["reference_id"]
    out = run_json(
        "loss",
        job=job_id,
        link="trunk 1",
        fibre="3",
        wavelength="1310",
        reference="-7.20",
        reading="-8.40",
        reading_back="-8.60",
        method="two-cord",
        limit="1.3",
        by="Ana",
    )
    assert out["saved"]["reference_ids"] == [reference_id]  # the same reference, reused
    job = JobStore(isolated_dirs["data"] / "jobs").load(job_id)
    (link,) = job.links
    assert link.label == "Trunk 1"
    (reference,) = link.references
    assert (
        reference.level_dbm,
        reference.method,
        reference.source_id,
        reference.meter_id,
        reference.cords,
        reference.by,
    ) == (-7.2, "two-cord", "LS-1", "PM-7", ["TC-1", "TC-2"], "Ana")
    by_direction = {r.direction: r for r in link.results}
    # -7.20 − (-8.40) = 1.20 dB passes 1.3; -7.20 − (-8.60) = 1.40 dB fails.
    assert by_direction["A->B"].loss_db == pytest.approx(1.20, abs=1e-9)
    assert by_direction["A->B"].passed is True
    assert by_direction["B->A"].loss_db == pytest.approx(1.40, abs=1e-9)
    assert by_direction["B->A"].passed is False
    assert {r.reference_id for r in link.results} == {reference_id}
    assert all(r.fibre == 3 and r.wavelength_nm == 1310 and r.limit_db == 1.3 for r in link.results)

    # History, not overwrite: a retest adds a result and supersedes the first of that cell.
    run_json(
        "loss",
        job=job_id,
        link="Trunk 1",
        fibre="3",
        wavelength="1310",
        reference="-7.20",
        reading="-8.30",
        method="two-cord",
    )
    link = JobStore(isolated_dirs["data"] / "jobs").load(job_id).links[0]
    assert len(link.results) == 3
    first, back, retest = link.results
    assert retest.current and retest.loss_db == pytest.approx(1.1, abs=1e-9)
    assert first.superseded_by == retest.id and first.loss_db == pytest.approx(1.2, abs=1e-9)
    assert back.current  # the other direction was not retested


def test_recheck_beyond_tolerance_puts_results_in_doubt(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.jobs.store import JobStore

    job_id = _new_job(isolated_dirs["data"])
    run_json("reference", job=job_id, link="L1", wavelength="1550", level="-7.00")
    for fibre in ("1", "2"):
        run_json(
            "loss",
            job=job_id,
            link="L1",
            fibre=fibre,
            wavelength="1550",
            reference="-7.00",
            reading="-8.0",
        )
    # Within: -7.05 − (-7.00) = -0.05 dB, inside 0.1 dB (single-mode, common practice).
    good = run_json(
        "reference", job=job_id, link="L1", wavelength="1550", level="-7.05", recheck=True
    )
    assert good["within_tolerance"] is True and good["in_doubt_result_ids"] == []
    # Beyond: -7.25 − (-7.00) = -0.25 dB.
    bad = run_json(
        "reference", job=job_id, link="L1", wavelength="1550", level="-7.25", recheck=True
    )
    assert bad["drift_db"] == pytest.approx(-0.25, abs=1e-9)
    assert bad["within_tolerance"] is False
    # The results were taken before the good recheck: only those after it would be in doubt.
    assert bad["in_doubt_result_ids"] == []
    # With an edited tolerance of 0.3 dB the same drift is within.
    edited = run_json(
        "reference",
        job=job_id,
        link="L1",
        wavelength="1550",
        level="-7.25",
        recheck=True,
        tolerance="0.3",
    )
    assert edited["within_tolerance"] is True
    job = JobStore(isolated_dirs["data"] / "jobs").load(job_id)
    kinds = [r.kind for r in job.links[0].references]
    assert kinds == ["initial", "recheck", "recheck", "recheck"]


def test_recheck_marks_results_since_the_initial_reference(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.jobs.models import result_in_doubt
    from fieldkit.jobs.store import JobStore

    job_id = _new_job(isolated_dirs["data"])
    run_json(
        "reference", job=job_id, link="L1", wavelength="850", level="-20.0", launch="encircled flux"
    )
    run_json(
        "loss",
        job=job_id,
        link="L1",
        fibre="1",
        wavelength="850",
        reference="-20.0",
        reading="-21.5",
    )
    # Multimode tolerance 0.2 dB (common practice): -20.3 − (-20.0) = -0.3 dB is beyond.
    bad = run_json(
        "reference", job=job_id, link="L1", wavelength="850", level="-20.3", recheck=True
    )
    assert bad["tolerance_db"] == pytest.approx(0.2, abs=1e-12)
    assert len(bad["in_doubt_result_ids"]) == 1
    link = JobStore(isolated_dirs["data"] / "jobs").load(job_id).links[0]
    (result,) = link.results
    assert "reference-in-doubt" in result.flags and result_in_doubt(link, result)
    assert link.references[0].in_doubt_since == link.references[0].at


def test_recording_errors_exit_2(isolated_dirs: dict[str, Path]) -> None:
    job_id = _new_job(isolated_dirs["data"])
    proc = run("reference", job=job_id, link="L9", wavelength="1310", level="-7", recheck=True)
    assert proc.returncode == 2 and "no link" in proc.stderr
    proc = run(
        "loss", job="ffffff", link="L1", fibre="1", wavelength="1310", reference="-7", reading="-8"
    )
    assert proc.returncode == 2 and "no job" in proc.stderr
    proc = run(
        "loss", job=job_id, link="L1", fibre="0", wavelength="1310", reference="-7", reading="-8"
    )
    assert proc.returncode == 2 and "fibre" in proc.stderr
    proc = run("loss", job=job_id, link="L1", fibre="1", reference="-7", reading="-8")
    assert proc.returncode == 2 and "--wavelength" in proc.stderr


# Hand computation for the link options: 10 km × 0.35 dB/km = 3.50 dB of fibre; 4 mated pairs
# (counting both end connections) × 0.50 dB = 2.00 dB; budget 5.50 dB. One-cord keeps both end
# connections: 5.50 dB; two-cord keeps one (3 pairs): 5.00 dB; three-cord none (2 pairs): 4.50 dB
# (IEC 61280-4-1 / -4-2 end connections per method, from memory).
LINK = {
    "attenuation": "0.35 dB/km",
    "length": "10 km",
    "connectors": "4",
    "connector_loss": "0.5",
    "wavelength": "1310",
}


@pytest.mark.parametrize(
    ("method", "limit_db"), [("one-cord", 5.50), ("two-cord", 5.00), ("three-cord", 4.50)]
)
def test_limit_from_the_link_options_counts_the_methods_end_connections(
    method: str, limit_db: float
) -> None:
    # Reading: -7.20 − (-12.00) = 4.80 dB: passes 5.50 and 5.00, fails 4.50.
    out = run_json("loss", reference="-7.20", reading="-12.00", method=method, **LINK)
    assert out["limit_db"] == pytest.approx(limit_db, abs=1e-9)
    assert out["margin_db"] == pytest.approx(limit_db - 4.80, abs=1e-9)
    assert out["pass"] is (limit_db >= 4.80)


def test_limit_from_the_link_options_refuses_a_typed_limit_too() -> None:
    proc = run("loss", reference="-7", reading="-8", limit="3", **LINK)
    assert proc.returncode == 2 and "not both" in proc.stderr
    proc = run(
        "loss",
        reference="-7",
        reading="-8",
        attenuation="0.35 dB/km",
        length="10 km",
        connectors="1",
        wavelength="1310",
    )
    assert proc.returncode == 2 and "at least 2" in proc.stderr


def test_limit_from_the_budget_saved_on_the_jobs_link(isolated_dirs: dict[str, Path]) -> None:
    job_id = _new_job(isolated_dirs["data"])
    saved = run("budget", job=job_id, link="L1", **LINK)
    assert saved.returncode == 0, saved.stderr
    # Same budget as above, saved on the link; a three-cord result keeps 2 pairs: 4.50 dB.
    out = run_json(
        "loss",
        job=job_id,
        link="L1",
        fibre="1",
        wavelength="1310",
        reference="-7.20",
        reading="-12.00",
        method="three-cord",
    )
    assert out["limit_db"] == pytest.approx(4.50, abs=1e-9)
    assert out["pass"] is False
    from fieldkit.jobs.store import JobStore

    (result,) = JobStore(isolated_dirs["data"] / "jobs").load(job_id).links[0].results
    assert result.limit_db == pytest.approx(4.50, abs=1e-9) and result.passed is False
    assert result.method == "three-cord"


def test_recheck_of_one_directions_reference(isolated_dirs: dict[str, Path]) -> None:
    from fieldkit.jobs.store import JobStore

    job_id = _new_job(isolated_dirs["data"])
    out = run_json(
        "loss",
        job=job_id,
        link="L1",
        fibre="1",
        wavelength="1310",
        reference="-7.20",
        reading="-8.0",
        reference_back="-6.90",
        reading_back="-7.9",
    )
    forward_id, backward_id = out["saved"]["reference_ids"]
    # -7.40 − (-7.20) = -0.20 dB: beyond 0.1 dB; only the A->B result used that reference.
    bad = run_json(
        "reference",
        job=job_id,
        link="L1",
        wavelength="1310",
        level="-7.40",
        recheck=True,
        of=forward_id,
    )
    assert bad["rechecked_reference_id"] == forward_id and len(bad["in_doubt_result_ids"]) == 1
    link = JobStore(isolated_dirs["data"] / "jobs").load(job_id).links[0]
    flagged = {r.direction: "reference-in-doubt" in r.flags for r in link.results}
    assert flagged == {"A->B": True, "B->A": False}
    assert link.reference(backward_id).in_doubt_since is None  # type: ignore[union-attr]
    proc = run(
        "reference",
        job=job_id,
        link="L1",
        wavelength="1310",
        level="-7.40",
        recheck=True,
        of="nosuchid",
    )
    assert proc.returncode == 2 and "nosuchid" in proc.stderr


@pytest.mark.parametrize(
    ("args", "phrase"),
    [
        # a level no power meter reads is a typo or a wrong unit, not a measurement
        (
            ["loss", "--reference", "1e308", "--reading", "-9", "--limit", "3"],
            "outside what a power meter reads",
        ),
        (
            ["reference", "--level", "-150 dBm", "--wavelength", "1310"],
            "outside what a power meter reads",
        ),
        (
            [
                "loss",
                "--reference",
                "-7",
                "--reading",
                "-9",
                "--limit",
                "3",
                "--wavelength",
                "1310",
                "--job",
                "x",
                "--link",
                "a\x1b[31m",
                "--fibre",
                "2",
            ],
            "control character",
        ),
        (
            ["reference", "--level", "-7", "--wavelength", "1310", "--by", "x\ny"],
            "control character",
        ),
    ],
)
def test_meter_commands_refuse_implausible_levels_and_control_characters(args, phrase) -> None:
    result = run(*args)
    assert result.returncode == 2
    assert phrase in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1


def test_fibre_number_beyond_any_cable_is_refused() -> None:
    from fieldkit.commands.common import CommandError
    from fieldkit.commands.meter_record import parse_fibre

    assert parse_fibre("6912") == 6912
    with pytest.raises(CommandError, match="more fibres than any cable"):
        parse_fibre("99999999")


def test_a_fibre_number_past_the_links_fibre_count_is_refused(
    isolated_dirs: dict[str, Path],
) -> None:
    from fieldkit.jobs.store import JobStore

    store = JobStore(isolated_dirs["data"] / "jobs")
    job = store.create("Campus trunk")
    store.update(job.id, lambda j: j.add_link("Trunk 1", fibre_count=24))
    args = ("loss", "--reference", "-7.2", "--reading", "-9.9", "--wavelength", "1310")
    proc = run(*args, job=job.id, link="Trunk 1", fibre="999")
    assert proc.returncode == 2
    assert "fibre: 999 is beyond the link's 24 fibres" in proc.stderr
    assert JobStore(isolated_dirs["data"] / "jobs").load(job.id).links[0].results == []
    assert run_json(*args, job=job.id, link="Trunk 1", fibre="24")["loss_db"] == (
        pytest.approx(2.7, abs=1e-9)  # −7.2 − (−9.9) = 2.7 dB
    )


def test_levels_past_what_meters_read_warn_on_both_sides() -> None:
    # common practice: field meters read about −70 to +27 dBm; a single-mode source delivers
    # about −7 dBm, so a +30 dBm reference is 37 dB above it
    out = run_json("loss", reference="30", reading="-95", wavelength="1310")
    text = " | ".join(out["warnings"])
    assert "reference +30.00 dBm is above what field meters read" in text
    assert "37.0 dB above the -7.0 dBm the source should deliver" in text
    assert "reading -95.00 dBm is below what field meters read" in text
    quiet = run_json("loss", reference="-7.2", reading="-9.9", wavelength="1310")
    assert quiet["warnings"] == []


def test_text_output_follows_the_minus_and_arrow_policy() -> None:
    # README "The command line": U+2212 for a minus sign, directions as A→B; a one-cord
    # reference includes both end connections (IEC 61280-4-2, TIA Method B)
    result = cli_runner.run(
        "loss", "--reference", "-7.2", "--reading", "-7.5", "--reading-back", "-6.9"
    )
    assert result.returncode == 0, result.stderr
    out = result.stdout
    assert re.search(r"loss A→B +0\.30 dB", out) and re.search("loss B→A +\u22120\\.30 dB", out)
    assert "2 end connections included" in out and "connection(s)" not in out
    assert not re.search(r"(?<![\w.])-\d", out)  # no ASCII hyphen before a number
