"""Job reports: golden files for CSV, Markdown and HTML, and the counts they are built on.

The golden files in tests/golden/ are the reviewed output for tests/golden/sample_job.json;
after an intended change, regenerate them with FIELDKIT_UPDATE_GOLDEN=1 and read the diff.
"""

from __future__ import annotations

import csv
import io
import json
import os
import re
from datetime import UTC, datetime, timedelta
from pathlib import Path
from zoneinfo import ZoneInfo

import pytest

from fieldkit import safety
from fieldkit.jobs.models import Job, Link, LossResult
from fieldkit.jobs.reports import (
    failures,
    in_doubt,
    job_summary,
    latest_results,
    to_handoff,
)
from fieldkit.reports import ReportContext, export, to_csv
from fieldkit.reports.spreadsheet import CSV_HEADERS
from fieldkit.settings import make_equipment

GOLDEN = Path(__file__).parent.parent / "golden"


def sample() -> Job:
    return Job.model_validate_json((GOLDEN / "sample_job.json").read_text(encoding="utf-8"))


def golden_context() -> ReportContext:
    """The letterhead and equipment of the golden files, in a fixed zone (CET in March)."""
    return ReportContext(
        contractor="Northline Fibre Works",
        crew="Splice crew 2",
        equipment=(
            make_equipment("meter", "PM-4", "2026-01-10", "2027-01-10", "power meter, InGaAs"),
            make_equipment("source", "SRC-2", "2025-11-02", "2026-03-01", "LED/laser source"),
        ),
        tz=ZoneInfo("Europe/Berlin"),
    )


@pytest.mark.parametrize("fmt", ["csv", "md", "html"])
def test_export_matches_golden_file(fmt: str) -> None:
    produced = export(sample(), fmt, golden_context())
    golden = GOLDEN / f"sample_job.{fmt}"
    if os.environ.get("FIELDKIT_UPDATE_GOLDEN"):
        golden.write_bytes(produced.encode("utf-8"))
    assert produced == golden.read_bytes().decode("utf-8")


def test_summary_counts_by_hand() -> None:
    rows = {(r.link_label, r.wavelength_nm): r for r in job_summary(sample())}
    backbone_1550 = rows[("LIB-TH-01", 1550.0)]
    # Limit = 1.84 km × 0.3 dB/km + 2 × 0.75 + 4 × 0.3 = 0.552 + 1.5 + 1.2 = 3.252 -> 3.25 dB
    # (TIA-568.3-D connector and splice maxima; 0.3 dB/km cabled G.652 at 1550 nm, from
    # memory). Fibre 7 reads 3.91 dB: the one failure of 12.
    # One counting rule (fieldkit.jobs.counting): each fibre in one count; the 5 in doubt
    # (below) are not passes until retested: 12 = 6 passed + 1 failed + 5 in doubt.
    assert (backbone_1550.tested, backbone_1550.passed, backbone_1550.failed) == (12, 6, 1)
    # The 1550 nm reference is in doubt from 10:00; fibre f was read at 09:15 + f × 6 min, so
    # fibres 8..12 (09:63 = 10:03 onwards) are in doubt: 5.
    assert backbone_1550.in_doubt == 5
    feed = rows[("RES-N-FEED", 1550.0)]
    # 2.41, 2.52, 2.38, 2.47 <= 4.26 pass; 4.63 fails; -0.12 (negative loss) is a reference
    # problem, its own count (never "no limit").
    assert (feed.tested, feed.passed, feed.failed, feed.reference_problems) == (6, 4, 1, 1)
    assert feed.no_limit == 0
    assert [(link.label, r.fibre) for link, r in failures(sample())] == [
        ("LIB-TH-01", 7),
        ("RES-N-FEED", 5),
    ]
    assert len(in_doubt(sample())) == 5


def test_a_retest_supersedes_the_earlier_result() -> None:
    t0 = datetime(2026, 3, 14, 9, tzinfo=UTC)
    link = Link(
        label="L",
        results=[
            LossResult(
                fibre=1, wavelength_nm=1310.0, loss_db=3.0, limit_db=2.0, passed=False, at=t0
            ),
            LossResult(
                fibre=1,
                wavelength_nm=1310.0,
                loss_db=1.5,
                limit_db=2.0,
                passed=True,
                at=t0 + timedelta(hours=1),
            ),
            LossResult(
                fibre=1,
                wavelength_nm=1310.0,
                direction="B->A",
                loss_db=1.6,
                limit_db=2.0,
                passed=True,
                at=t0,
            ),
        ],
    )
    job = Job(name="Retest", links=[link])
    assert [r.loss_db for r in latest_results(link)] == [1.5, 1.6]
    [row] = job_summary(job)
    assert (row.tested, row.passed, row.failed) == (1, 1, 0)
    assert failures(job) == []
    assert len(to_csv(job).splitlines()) == 1 + 3  # every result is still listed


def test_csv_has_one_row_per_result_and_parses() -> None:
    job = sample()
    every = list(csv.reader(io.StringIO(to_csv(job))))
    rows = every[: every.index([])]  # the splice log follows the results after a blank line
    assert rows[0] == CSV_HEADERS
    assert len(rows) - 1 == sum(len(link.results) for link in job.links) == 30
    fibre7 = next(r for r in rows[1:] if r[2] == "LIB-TH-01" and r[3] == "7" and r[4] == "1550")
    record = dict(zip(CSV_HEADERS, fibre7, strict=True))
    # reading = reference − loss = −7.10 − 3.91 = −11.01 dBm; margin = 3.25 − 3.91 = −0.66 dB
    assert (record["reading_dbm"], record["margin_db"], record["result"]) == (
        "-11.01",
        "-0.66",
        "fail",
    )
    assert record["reference_level_dbm"] == "-7.10"
    assert "reference-in-doubt" in next(r for r in rows[1:] if r[3] == "12" and r[4] == "1550")[11]


def test_csv_keeps_formula_looking_text_as_text() -> None:
    job = Job(
        name="=HYPERLINK(1)",
        links=[
            Link(
                label="+L",
                results=[LossResult(fibre=1, wavelength_nm=1310.0, loss_db=-0.5, by="@me")],
            )
        ],
    )
    row = list(csv.reader(io.StringIO(to_csv(job))))[1]
    assert (row[0], row[2], row[15]) == ("'=HYPERLINK(1)", "'+L", "'@me")
    assert row[7] == "-0.50"  # numbers stay numbers


def test_html_is_self_contained_and_escapes_user_text() -> None:
    page = export(sample(), "html")
    assert not re.search(
        r"https?://(?!www\.w3\.org/2000/svg)|src=|<script|<link|@import|url\(", page
    )
    assert "&lt;basement&gt;" in page and "<basement>" not in page
    assert "@page" in page  # print rules for paper (A4 and Letter both fit these margins)
    # the short cautions of a test report (fieldkit.reports.build._safety_lines)
    assert safety.INVISIBLE_LIGHT_REPORT in page and safety.DEFER.replace("'", "&#x27;") in page
    assert "utility-locate" in page  # the sample has a located fault
    assert "glass shards" in page  # and a splice log


def test_markdown_link_pages_come_before_the_appendix_and_tables_stay_intact() -> None:
    text = export(sample(), "md")
    assert text.index("## Summary") < text.index("## Link LIB-TH-01") < text.index("## Appendix A")
    assert "&lt;basement> \\| " in text
    columns = None
    for line in text.splitlines():
        if not line.startswith("| "):
            columns = None
            continue
        count = len(re.findall(r"(?<!\\)\|", line))
        if columns is None:
            columns = count  # the header row of a table
        assert count == columns, line  # an escaped "|" in user text never adds a column
    assert safety.DEFER in text


def test_handoff_holds_every_job_as_valid_json() -> None:
    data = json.loads(to_handoff([sample()]))
    assert data["format"] == "fieldkit-jobs-handoff"
    assert Job.model_validate(data["jobs"][0]) == sample()


def test_a_negative_loss_is_reported_as_a_reference_problem_without_margin() -> None:
    from fieldkit.jobs.models import FLAG_NEGATIVE_LOSS, LossResult
    from fieldkit.jobs.reports import margin_db, verdict

    # DESIGN §4: a negative loss means a bad reference, not a good fibre.
    bad = LossResult(
        fibre=6,
        wavelength_nm=1550.0,
        direction="A->B",
        reading_dbm=-6.83,
        loss_db=-0.12,
        method="one-cord",
        limit_db=4.26,
        passed=None,
        flags=[FLAG_NEGATIVE_LOSS],
    )
    assert verdict(bad) == "reference problem"
    assert margin_db(bad) is None
    good = bad.model_copy(update={"loss_db": 2.41, "passed": True, "flags": []})
    assert verdict(good) == "pass"
    assert margin_db(good) == pytest.approx(4.26 - 2.41, abs=1e-12)
