"""Control characters that arrive through a job file or an import never reach the terminal raw:
`jobs list`, `show`, `today` and `export` to standard output show them visibly, and every error
stays on one line (ECMA-48 control characters, from memory; see tests/unit/test_text_escape.py).
"""

from __future__ import annotations

import re
from pathlib import Path

import cli_runner
import pytest

from fieldkit.jobs.models import Job, LossResult
from fieldkit.jobs.store import JobStore

_RAW = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f]")
# window title, screen clear, cursor up + erase line, C1 CSI
_HOSTILE = "\x1b]0;owned\x07\x1b[2J\x1b[1A\x1b[2K\x9b31m"


def _hostile_job(data: Path) -> Job:
    store = JobStore(data / "jobs")
    job = Job(name="Spur" + _HOSTILE, customer="C" + _HOSTILE, site="S\rfake line" + _HOSTILE)
    job.add_note("note" + _HOSTILE, by="by" + _HOSTILE)
    link = job.add_link("L" + _HOSTILE, end_a="A" + _HOSTILE)
    link.results.append(LossResult(fibre=1, wavelength_nm=1310, loss_db=0.4, by="b" + _HOSTILE))
    return store.save(job)


@pytest.mark.parametrize(
    "args",
    [
        ("jobs", "list"),
        ("jobs", "list", "--search", "spur"),
        ("jobs", "show", "{id}"),
        ("jobs", "today"),
        ("jobs", "export", "{id}", "--format", "md"),
        ("jobs", "export", "{id}", "--format", "csv"),
        ("jobs", "export", "{id}", "--format", "html"),
        ("jobs", "export", "{id}", "--format", "json"),
    ],
)
def test_listings_and_exports_show_control_characters_visibly(
    isolated_dirs: dict[str, Path], args: tuple[str, ...]
) -> None:
    job = _hostile_job(isolated_dirs["data"])
    result = cli_runner.run(*(a.format(id=job.id) for a in args))
    assert result.returncode == 0, result.stderr
    out = result.stdout.replace("\r\n", "\n")
    assert not _RAW.search(out), repr(out[:400])
    assert "\u241b" in out or "\\u001b" in out  # ESC shown as ␛ (or JSON-escaped)


def test_an_error_echoing_user_text_stays_on_one_line() -> None:
    result = cli_runner.run("jobs", "show", "abc\ndef\x1b[2J")
    assert result.returncode == 2
    assert len(result.stderr.strip().splitlines()) == 1, result.stderr
    assert not _RAW.search(result.stderr)
