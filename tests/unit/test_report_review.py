"""The customer report on the demo backbone (fieldkit.jobs.demo: link LIB-TH-01, 12 fibres at
1310 nm all passing, fibre 7 failing at 1550 nm): the Links table gives each wavelength its
own verdict and the link's on its own row (review A9); the times line says plainly which zone
(C40); the HTML never breaks a word to fit a cell (B18).
"""

from __future__ import annotations

import re
from datetime import UTC
from zoneinfo import ZoneInfo

from fieldkit.jobs.demo import build, local_day_start
from fieldkit.jobs.ids import now
from fieldkit.reports import ReportContext, export


def _backbone():  # type: ignore[no-untyped-def]
    return next(j for j in build(local_day_start(now())) if j.id == "de30000000000001")


def _links_rows(md: str) -> list[list[str]]:
    start = md.index("| Link |")
    rows = []
    for line in md[start:].splitlines()[2:]:
        if not line.startswith("|"):
            break
        rows.append([c.strip() for c in line.strip("|").split("|")])
    return rows


def test_links_table_gives_each_wavelength_its_verdict_and_the_link_its_own_row() -> None:
    md = export(_backbone(), "md", ReportContext(tz=UTC))
    rows = _links_rows(md)
    by_nm = {r[1]: r for r in rows}
    assert set(by_nm) == {"all", "1310", "1550"}
    assert all(r[0] == "LIB-TH-01" for r in rows)  # every row names its link
    assert by_nm["all"][2] == "FAIL"  # the link: one fibre fails at 1550 nm
    assert by_nm["1310"][2] == "PASS"  # 12 of 12 pass at 1310 nm
    assert by_nm["1550"][2] == "FAIL"
    assert by_nm["1550"][5] == "1"  # the failing fibre counted on its wavelength


def test_times_line_says_which_zone() -> None:
    utc = export(_backbone(), "md", ReportContext(tz=UTC))
    assert "**Times:** UTC (the machine's time zone)" in utc and "local time, UTC" not in utc
    berlin = export(_backbone(), "md", ReportContext(tz=ZoneInfo("Europe/Berlin")))
    assert re.search(r"\*\*Times:\*\* local time, CES?T \(UTC\+0[12]:00\)", berlin)


def test_html_cells_break_no_word() -> None:
    html = export(_backbone(), "html", ReportContext(tz=UTC))
    assert "overflow-wrap: anywhere" not in html and "word-break: break-all" not in html


def test_report_writes_one_arrow_form() -> None:
    """C27: directions are "A→B" in the results, the legend and the open items, as in the splice
    log and the workspaces; the CSV keeps the stored "A->B" for spreadsheets."""
    job = _backbone()
    for fmt in ("md", "html"):
        text = export(job, fmt, ReportContext(tz=UTC))
        assert "A→B" in text and "A->B" not in text and "A-&gt;B" not in text, fmt
    assert "A->B" in export(job, "csv", ReportContext(tz=UTC))


def test_report_tables_write_negative_numbers_with_the_typographic_minus() -> None:
    """C26: README ("The command line"): results print negative numbers with U+2212. The demo
    backbone has negative ones: fibre 7's margin at 1550 nm, the references' dBm."""
    job = _backbone()
    md = export(job, "md", ReportContext(tz=UTC))
    assert re.search(r"\| \u2212\d", md) and not re.search(r"\| -\d", md)
    html = export(job, "html", ReportContext(tz=UTC))
    assert re.search(r">\u2212\d", html) and not re.search(r"<td[^>]*>-\d", html)
    assert re.search(r"(^|,)-\d", export(job, "csv", ReportContext(tz=UTC)), re.M)  # ASCII


def test_reference_table_keeps_ids_and_link_labels_whole() -> None:
    """B18: the appendix's References table keeps each full id and the link's label on one
    line (they broke over three) and lets the times break between date and time instead."""
    job = _backbone()
    html = export(job, "html", ReportContext(tz=UTC))
    refs = html[html.index("<caption>References</caption>") :]
    refs = refs[: refs.index("</table>")]
    for ref in job.links[0].references:
        assert f'<td class="nowrap">{ref.id}</td>' in refs
    assert '<td class="nowrap">LIB-TH-01</td>' in refs
    assert not re.search(r'<td class="nowrap">\d{4}-\d\d-\d\d \d\d:\d\d', refs)
