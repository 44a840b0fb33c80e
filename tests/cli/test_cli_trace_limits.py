"""fieldkit trace show --job --link: the link's presets give the verdict limits, and the output
says which were used (the expected preset values: tests/unit/test_traces_limits.py)."""

from __future__ import annotations

import json
from pathlib import Path

import cli_runner

from fieldkit.actions import splices as act
from fieldkit.jobs.store import JobStore
from fieldkit.traces.sor import write_sor
from fieldkit.traces.synthetic import SynthEvent, SynthFibre, synth_trace


def test_cli_show_takes_the_links_limits_and_says_so(tmp_path: Path) -> None:
    store = JobStore(tmp_path / "jobs")
    job_id = store.create("Limits test").id
    limit = act.limit_from_preset("fusion", "fusion, outside-plant planning")  # 0.1 dB
    act.set_splice_limit(store, job_id, "L1", limit)

    def os2(job):  # OS2: 0.4 dB/km at 1550 nm (TIA-568.3-D, from memory)
        job.links[0].fibre_type = "OS2"

    store.update(job_id, os2)
    fibre = SynthFibre(length_m=6000.0, events=(SynthEvent(3000.0, 0.20),))
    path = tmp_path / "F001_1550_AB.sor"
    path.write_bytes(write_sor(synth_trace(fibre, seed=3)))
    data_dir = str(tmp_path)
    args = ("trace", "show", str(path), "--job", job_id, "--link", "L1", "--data-dir", data_dir)
    shown = cli_runner.run(*args, "--json")
    assert shown.returncode == 0, shown.stderr
    data = json.loads(shown.stdout)
    limits = data["limits"]
    assert limits["origin"] == "link 'L1' of job 'Limits test'"
    assert limits["splice_max_db"] == 0.1 and limits["attenuation_max_db_per_km"] == 0.4
    splice = next(e for e in data["events"] if e["kind"] == "splice")
    assert splice["verdict"] == "fail"  # 0.20 dB > the link's 0.1 dB
    text = cli_runner.run(*args).stdout
    assert "limits from link 'L1' of job 'Limits test':" in text
    assert (
        "splice max 0.10 dB (any non-reflective loss: a splice or a bend): fusion, outside-plant "
        "planning preset" in text
    )
    missing = cli_runner.run("trace", "show", str(path), "--job", job_id, "--data-dir", data_dir)
    assert missing.returncode == 2 and "needs both --job and --link" in missing.stderr
