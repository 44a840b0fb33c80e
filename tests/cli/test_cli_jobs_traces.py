"""``fieldkit jobs show`` (text and --json) tells what a link's kept OTDR traces say: fibres
traced per wavelength, current against superseded, the worst event loss and reflectance, the
event verdicts; by the rule the customer report counts with (in-process: cli_runner.py)."""

from __future__ import annotations

import json
import subprocess
from pathlib import Path

import cli_runner
from traced_sample import traced_job


def run(*args: str) -> subprocess.CompletedProcess[str]:
    return cli_runner.run(*args)


def test_show_lists_the_traces_of_each_link_per_wavelength(tmp_path: Path) -> None:
    job_id = traced_job(tmp_path)
    shown = run("jobs", "show", job_id, "--data-dir", str(tmp_path))
    assert shown.returncode == 0, shown.stderr
    out = shown.stdout
    feed = out[out.index("link FEED") : out.index("link SPARE")]
    assert "OTDR 1310 nm: 1 fibre traced\n    1 current, 0 superseded" in feed
    assert "OTDR 1550 nm: 2 fibres traced\n    2 current, 1 superseded" in feed
    # wavelengths in order; the superseded 2.00 dB splice counts for nothing
    assert feed.index("OTDR 1310") < feed.index("OTDR 1550")
    at_1550 = feed[feed.index("OTDR 1550") :]
    assert "1 trace with an event over its limit" in at_1550
    assert "events: 1 FAIL, 3 pass" in at_1550  # the ends are never judged
    # the averaged loss is the loss (G.650.3): 0.35 dB at 2100 m, not the 0.90 dB one-way
    assert "worst loss 0.35 dB, fibre 1 at 2100.0 m" in at_1550
    assert "worst reflectance -42.00 dB, fibre 2 at 35.0 m" in at_1550
    assert "loss 2.00" not in feed
    at_1310 = feed[feed.index("OTDR 1310") : feed.index("OTDR 1550")]
    assert "no event over its limit" in at_1310 and "events: 1 pass" in at_1310
    assert "OTDR" not in out[out.index("link SPARE") :]


def test_show_json_gives_the_same_figures(tmp_path: Path) -> None:
    job_id = traced_job(tmp_path)
    shown = run("jobs", "show", job_id, "--json", "--data-dir", str(tmp_path))
    assert shown.returncode == 0, shown.stderr
    rows = json.loads(shown.stdout)["traces"]
    assert [(r["link_label"], r["wavelength_nm"]) for r in rows] == [
        ("FEED", 1310.0),
        ("FEED", 1550.0),
    ]
    r = rows[1]
    assert (r["fibres_traced"], r["fibres"], r["current"], r["superseded"]) == (2, [1, 2], 2, 1)
    assert r["directions"] == {"A<->B": 2}
    assert r["traces_over_limits"] == 1
    assert r["event_verdicts"] == {"fail": 1, "in doubt": 0, "pass": 3, "no limit": 0}
    assert r["worst_loss"] == {
        "fibre": 1,
        "direction": "A<->B",
        "event": 2,
        "distance_m": 2100.0,
        "value_db": 0.35,
    }
    assert r["worst_reflectance"]["fibre"] == 2
    assert r["worst_reflectance"]["value_db"] == -42.0


def test_show_and_the_report_count_failing_traces_alike(tmp_path: Path) -> None:
    job_id = traced_job(tmp_path)
    report = run("jobs", "export", job_id, "--format", "md", "-o", "-", "--data-dir", str(tmp_path))
    assert report.returncode == 0, report.stderr
    # the report's own sentence for the link's traces (fieldkit/reports/traces_page.py)
    assert "3 traces kept on this link; 1 with an event over its limit" in report.stdout
