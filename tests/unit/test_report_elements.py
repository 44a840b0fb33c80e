"""Each element of the customer report, checked against what it must say.

Sources named beside the checks: DESIGN.md §5 (one counting rule; history, not overwrite),
IEC 61280-4-1 (loss = reference level − reading), OWASP "CSV injection" (cells starting
= + - @ tab CR), RFC 4180 (CSV), the issue-14 text for what a customer report must hold.
"""

from __future__ import annotations

import csv
import io
import re
import time
from datetime import UTC, date, datetime, timedelta
from pathlib import Path
from zoneinfo import ZoneInfo

import pytest

from fieldkit.jobs.counting import Count
from fieldkit.jobs.models import (
    FLAG_NEGATIVE_LOSS,
    BudgetCheck,
    BudgetRecord,
    BudgetWavelength,
    Job,
    Link,
    LossResult,
    ReferenceRecord,
)
from fieldkit.reports import ReportContext, build_document, export, to_csv
from fieldkit.reports.build import job_verdict, link_verdict
from fieldkit.reports.chart import marker, svg
from fieldkit.reports.checks import application_text, transceiver_text
from fieldkit.reports.document import Chart, ChartPoint
from fieldkit.reports.names import file_name, free_name, slug
from fieldkit.settings import make_equipment

GOLDEN = Path(__file__).parent.parent / "golden"
T0 = datetime(2026, 7, 1, 8, 0, tzinfo=UTC)
BERLIN = ZoneInfo("Europe/Berlin")


def sample() -> Job:
    return Job.model_validate_json((GOLDEN / "sample_job.json").read_text(encoding="utf-8"))


def ctx(**over: object) -> ReportContext:
    base: dict[str, object] = {
        "contractor": "Northline Fibre Works",
        "crew": "Splice crew 2",
        "equipment": (
            make_equipment("meter", "PM-4", "2026-01-10", "2027-01-10", "power meter"),
            make_equipment("source", "SRC-2", "2025-11-02", "2026-03-01"),
            make_equipment("otdr", "OT-1", "2026-02-01"),
        ),
        "tz": BERLIN,
    }
    base.update(over)
    return ReportContext(**base)  # type: ignore[arg-type]


def result(fibre: int, loss: float, limit: float | None = 3.0, **kw: object) -> LossResult:
    passed = None if limit is None or loss < 0 else loss <= limit
    flags = [FLAG_NEGATIVE_LOSS] if loss < 0 else []
    fields: dict[str, object] = {
        "fibre": fibre,
        "wavelength_nm": 1310.0,
        "loss_db": loss,
        "limit_db": limit,
        "passed": passed,
        "flags": flags,
        "at": T0 + timedelta(minutes=fibre),
        "by": "Ana Ruiz",
    }
    fields.update(kw)
    return LossResult(**fields)  # type: ignore[arg-type]


def body_of(md: str) -> str:
    """The report before its appendix."""
    return md[: md.index("## Appendix A")]


# -- header ---------------------------------------------------------------------------------------
def test_header_names_contractor_crew_customer_and_site() -> None:
    md = export(sample(), "md", ctx())
    head = md[: md.index("## Link")]
    for text in ("Northline Fibre Works", "Splice crew 2", "Wrenfield Town Council"):
        assert text in head
    assert "Wrenfield town centre" in head  # the job's site
    html = export(sample(), "html", ctx())
    assert '<div class="contractor">Northline Fibre Works</div>' in html
    # every link page repeats contractor, job, customer and site in its running header
    assert html.count('<div class="running">Northline Fibre Works · Sample') >= 2


def test_header_text_is_escaped_for_each_target() -> None:
    hostile = ctx(contractor="<b>Evil</b> [x](http://e)", crew="*crew*")
    html = export(sample(), "html", hostile)
    assert "<b>Evil</b>" not in html and "&lt;b&gt;Evil&lt;/b&gt;" in html
    md = export(sample(), "md", hostile)
    assert "[x](http://e)" not in md and "\\[x\\](http://e)" in md and "\\*crew\\*" in md


# -- verdicts -----------------------------------------------------------------------------------
def test_link_and_job_verdicts_follow_the_one_counting_rule() -> None:
    # DESIGN §5: worst of fail, reference problem, in doubt, no limit, pass
    good = Link(label="A", results=[result(1, 1.0), result(2, 2.9)])
    bad = Link(label="B", results=[result(1, 1.0), result(2, 3.2), result(3, -0.1)])
    none = Link(label="C", results=[result(1, 1.0, limit=None)])
    assert link_verdict(good)[0] is Count.PASS
    assert link_verdict(bad)[0] is Count.FAIL  # a fail outranks the reference problem
    assert link_verdict(none)[0] is Count.NO_LIMIT
    count, tally, untested = job_verdict(Job(name="J", links=[good, bad, none]))
    assert (count, tally.tested, tally.failed, untested) == (Count.FAIL, 6, 1, 0)
    only_ref = Link(label="D", results=[result(1, -0.1)])
    assert link_verdict(only_ref)[0] is Count.REFERENCE_PROBLEM


def test_a_link_without_results_keeps_the_job_from_passing() -> None:
    job = Job(name="J", links=[Link(label="A", results=[result(1, 1.0)]), Link(label="B")])
    count, _, untested = job_verdict(job)
    assert count is None and untested == 1
    md = export(job, "md", ctx())
    assert "**Job verdict: NOT TESTED**" in md and "1 link has no results" in md
    assert "**Link A: PASS**" in md and "**Link B: NOT TESTED**" in md


def test_a_reference_in_doubt_makes_the_verdict_in_doubt() -> None:
    ref = ReferenceRecord(
        wavelength_nm=1310.0,
        level_dbm=-7.0,
        method="one-cord",
        at=T0,
        in_doubt_since=T0,
    )
    link = Link(label="A", references=[ref], results=[result(1, 1.0, reference_id=ref.id)])
    assert link_verdict(link)[0] is Count.IN_DOUBT
    html = export(Job(name="J", links=[link]), "html", ctx())
    assert '<span class="word">IN DOUBT</span>' in html


# -- legend -------------------------------------------------------------------------------------
def test_the_legend_explains_every_flag_used_and_only_those() -> None:
    link = Link(
        label="A",
        results=[result(1, 1.0), result(2, 1.1, flags=["connector-dirty"]), result(3, -0.2)],
    )
    md = export(Job(name="J", links=[link]), "md", ctx())
    legend = md[md.index("**Legend**") : md.index("Safety and disclaimer")]
    assert "- **negative loss**" in legend  # fibre 3's flag
    assert "- **connector dirty**" in legend  # a flag the meter may add
    assert "reference in doubt" not in legend  # not used in this job
    for word in ("pass", "FAIL", "reference problem", "in doubt", "no limit"):
        assert f"- **{word}**" in legend
    assert "- **R1, R2 …**" in legend
    # the flag is written in the results as the legend names it
    assert "| pass, connector dirty |" in md


def test_the_html_legend_shows_each_chart_marker() -> None:
    html = export(sample(), "html", ctx())
    start = html.index('<dl class="legend">')
    legend = html[start : html.index("</dl>", start)]
    assert legend.count('<svg class="mark"') == 5  # pass, fail, reference problem, doubt, none


# -- equipment ----------------------------------------------------------------------------------
def test_equipment_block_lists_ids_and_calibration_dates_and_flags_what_is_off() -> None:
    md = export(sample(), "md", ctx())
    block = md[md.index("**Test equipment**") : md.index("**Legend**")]
    assert "| power meter | PM-4 | power meter | 2026-01-10 | 2027-01-10 |  |" in block
    # SRC-2 was due 2026-03-01; the sample's tests are on 2026-03-14
    assert "| light source | SRC-2 |  | 2025-11-02 | 2026-03-01 | calibration was due" in block
    assert "| OTDR | OT-1 |  | 2026-02-01 |" in block
    # a reference naming a meter the list lacks
    md2 = export(sample(), "md", ctx(equipment=()))
    assert (
        "| power meter | PM-4 |  |  |  | named by a reference; calibration not on record |" in md2
    )
    # each link page names the equipment its references used
    page = md[md.index("## Link LIB-TH-01") : md.index("## Link RES-N-FEED")]
    assert "Test equipment: power meter PM-4 (calibrated 2026-01-10), light source SRC-2" in page


# -- signature ----------------------------------------------------------------------------------
def test_every_page_carries_a_signature_block_with_the_testers_named() -> None:
    job = sample()
    html = export(job, "html", ctx())
    assert html.count('<div class="signature">') == 1 + len(job.links)
    assert html.count("Customer accepts") == 1 + len(job.links)
    md = export(job, "md", ctx())
    page = md[md.index("## Link RES-N-FEED") : md.index("## Appendix A")]
    assert "- Tested by: Jon Okafor; test date: 2026-03-14; signature:" in page
    assert "- Customer acceptance, name:" in page


# -- reference labels ---------------------------------------------------------------------------
def test_references_are_r_labels_in_the_body_and_ids_in_the_appendix() -> None:
    job = sample()
    md = export(job, "md", ctx())
    ids = [ref.id for link in job.links for ref in link.references]
    assert ids and not any(i in body_of(md) for i in ids)
    appendix = md[md.index("## Appendix A") :]
    first = min((ref for link in job.links for ref in link.references), key=lambda r: r.at)
    assert re.search(rf"\| R1 \| [^|]+ \|.*\| {first.id} \|", appendix)
    assert "| R1 |" in appendix and f"| {len(ids)} " not in appendix.split("R1")[0]


# -- local time ---------------------------------------------------------------------------------
@pytest.fixture
def new_york(monkeypatch: pytest.MonkeyPatch):
    monkeypatch.setenv("TZ", "America/New_York")
    time.tzset()
    yield
    monkeypatch.undo()
    time.tzset()


def test_times_are_local_with_their_zone(new_york: None) -> None:
    # 2026-07-01 08:01 UTC is 04:01 EDT (UTC−4 in summer); no zone given: the machine's
    job = Job(name="J", links=[Link(label="A", results=[result(1, 1.0)])])
    md = export(job, "md")
    assert "2026-07-01 04:01 EDT" in md
    assert "EDT (UTC-04:00)" in md  # the zone is named in the header
    # a given zone wins; CEST is UTC+2 in July
    assert "2026-07-01 10:01 CEST" in export(job, "md", ctx())
    # the CSV keeps UTC for machines and adds the local time for people
    row = list(csv.DictReader(io.StringIO(to_csv(job))))[0]
    assert (row["at_utc"], row["at_local"]) == ("2026-07-01T08:01:00Z", "2026-07-01 04:01 EDT")


# -- appendix -----------------------------------------------------------------------------------
def test_sources_and_ids_stay_out_of_the_body() -> None:
    job = sample()
    md = export(job, "md", ctx())
    body = body_of(md)
    assert "(from memory)" not in body and "TIA-568.3-D" not in body
    sources = md[md.index("## Appendix B: sources") :]
    assert "0.3 dB per splice (from memory)" in sources
    assert "IEC 61280-4-1" in sources
    assert job.id not in body and f"| Job id | {job.id}" not in md  # facts, not a table
    assert f"- **Job id:** {job.id}" in md[md.index("## Appendix A") :]


def test_cautions_are_short_and_present() -> None:
    md = export(sample(), "md", ctx())
    summary = md[: md.index("## Link")]
    start = summary.index("Safety and disclaimer")
    cautions = summary[start : summary.index("*The customer accepts", start)]
    assert "never look into a fibre" in cautions and "utility-locate" in cautions
    assert len(cautions) < 900  # a few lines, not the splice bench's rules


# -- checks as sentences and tables -------------------------------------------------------------
# The dump: 10GBASE-LR, link loss 8.26 dB against 6.20 dB: headroom -2.0600000000000014
APPLICATION = {
    "name": "10GBASE-LR",
    "fibre": "singlemode",
    "row_reason": "",
    "pass": False,
    "verdict": "fail",
    "wavelength_nm": 1310.0,
    "loss_db": 8.26,
    "loss_max_db": 6.2,
    "loss_headroom_db": -2.0600000000000014,
    "loss_pass": False,
    "margin_db": 0.5,
    "margin_headroom_db": -2.5600000000000014,
    "margin_pass": False,
    "length_m": 12000.0,
    "reach_m": 10000.0,
    "length_headroom_m": -2000.0,
    "length_pass": False,
    "loss_min_db": None,
    "link_loss_min_db": 4.1,
    "min_pass": None,
    "per_wavelength": [{"wavelength_nm": 1310.0, "loss_db": 8.26, "headroom_db": -2.06}],
    "source": "IEEE 802.3-2022 Table 52-12 (from memory)",
}


def _words(blocks: list) -> str:
    out = []
    for b in blocks:
        out.append(getattr(b, "text", ""))
        for row in getattr(b, "rows", []):
            out.append(" | ".join(row))
    return "\n".join(out)


def test_the_application_check_reads_as_sentences_and_a_table() -> None:
    text = application_text(APPLICATION)
    words = _words(text.blocks)
    assert words.startswith("Application 10GBASE-LR (singlemode): FAIL.")
    # 8.26 − 6.20 = 2.06 dB over; 12000 m beyond a 10000 m reach
    assert "is over the channel's maximum of 6.20 dB by 2.06 dB" in words
    assert "The length, 12000.0 m, is beyond the reach of 10000.0 m." in words
    assert "Loss (highest, dB) | 8.26 | 6.20 | -2.06 | over" in words
    for raw in ("{", "headroom_db", "per_wavelength", "None", "False", "0000000"):
        assert raw not in words
    assert text.source == "IEEE 802.3-2022 Table 52-12 (from memory)"  # for the appendix


def test_the_transceiver_check_says_whether_an_attenuator_is_needed() -> None:
    # Tx −1 … +3 dBm, Rx −14.4 … −1 dBm, loss 1.0 … 2.0 dB: received max 3 − 1 = 2 dBm > −1:
    # overload by 3 dB; the margin −1 − 2 + 14.4 = 11.4 dB leaves room for a 5 dB pad
    data = {
        "name": "LR optics",
        "pass": True,
        "wavelength_nm": 1310.0,
        "power_budget_db": 13.4,
        "loss_max_db": 2.0,
        "loss_min_db": 1.0,
        "margin_db": 11.4,
        "required_margin_db": 3.0,
        "margin_pass": True,
        "received_min_dbm": -3.0,
        "received_max_dbm": 2.0,
        "attenuator_needed": True,
        "attenuator_min_db": 3.0,
        "attenuator_max_db": 8.4,
        "attenuator_db": 5.0,
        "attenuator_fits": True,
        "source": "vendor sheet",
        "extra_figure": [1, 2],
    }
    words = _words(transceiver_text(data).blocks)
    assert words.startswith("Transceiver LR optics at 1310 nm: PASS.")
    assert "leaves 11.40 dB, at least the design margin of 3.00 dB" in words
    assert "fit a 5.00 dB attenuator (anything from 3.00 to 8.40 dB fits)" in words
    assert "extra figure | 1; 2" in words  # an unknown figure by name, never as JSON


def test_a_hand_edited_check_with_wrong_types_is_left_out_not_dumped() -> None:
    words = _words(application_text({"name": "X", "loss_db": "eight", "per_wavelength": 3}).blocks)
    assert "Application X: not judged." in words and "eight" not in words.split("\n")[0]


def test_the_budget_checks_beyond_loss_are_a_table() -> None:
    budget = BudgetRecord(
        wavelengths=[BudgetWavelength(wavelength_nm=1550.0, loss_db=3.0)],
        checks=[
            BudgetCheck(
                kind="dispersion",
                wavelength_nm=1550.0,
                value=33.1,
                unit="ps/nm",
                limit=800.0,
                verdict="pass",
                detail="0.0 to 33.1 ps/nm over 1840 m of fibre",
                source="ITU-T G.652 D(λ) formula",
            ),
            BudgetCheck(kind="cut-off", wavelength_nm=1260.0, verdict="warning", detail="close"),
        ],
    )
    job = Job(name="J", links=[Link(label="A", budget=budget, results=[result(1, 1.0)])])
    md = export(job, "md", ctx())
    assert "**A: checks beyond loss**" in md
    row = "| Chromatic dispersion against the receiver's tolerance | 1550 | 33.1 ps/nm | 800 ps/nm"
    assert row in md
    assert "ITU-T G.652 D(λ) formula" in md[md.index("## Appendix B") :]


# -- the chart ----------------------------------------------------------------------------------
def test_the_chart_is_self_contained_svg_with_one_marker_per_result() -> None:
    points = [
        ChartPoint(1, "A->B", 1.0, 3.0, Count.PASS),
        ChartPoint(2, "A->B", 3.5, 3.0, Count.FAIL),
        ChartPoint(3, "A->B", -0.1, 3.0, Count.REFERENCE_PROBLEM),
    ]
    drawn = svg(Chart("L1", 1310.0, points, 4))
    assert drawn.startswith("<svg") and drawn.endswith("</svg>")
    assert not re.search(r"<script|href|url\(|<image|@import", drawn)
    assert drawn.count("<g><title>") == 3
    assert "fibre 2 A→B: 3.50 dB, limit 3.00 dB, fail" in drawn  # its tooltip, escaped
    assert "limit 3.00 dB" in drawn  # the dashed limit line is labelled
    assert ">4</text>" in drawn  # the axis runs to the link's fibre count


def test_markers_differ_by_shape_not_only_colour() -> None:
    # black-and-white print: each verdict's marker is a different element or outline
    shapes = {c: re.sub(r'"[^"]*"', '""', marker(c, 10, 10)) for c in Count}
    assert len(set(shapes.values())) == len(Count)


def test_each_link_page_has_a_chart_per_wavelength_with_failures_in_words() -> None:
    html = export(sample(), "html", ctx())
    page = html[html.index("<h2>Link LIB-TH-01</h2>") : html.index("<h2>Link RES-N-FEED</h2>")]
    assert page.count('<svg class="chart"') == 2  # 1310 and 1550 nm
    assert "1550 nm: 6 pass; fail: fibre 7; in doubt: fibres 8, 9, 10, 11, 12." in page


def test_each_link_starts_a_printed_page() -> None:
    html = export(sample(), "html", ctx())
    assert "section.page, article.page { break-before: page;" in html
    assert html.count('<section class="link page">') == len(sample().links)


# -- CSV ----------------------------------------------------------------------------------------
def _negative_job() -> Job:
    return Job(
        name='=HYPERLINK("http://x")',
        links=[
            Link(
                label="-2+3",
                results=[
                    result(1, -0.12, by="@admin"),
                    result(2, 2.5, by="\tTab"),
                    result(3, 1.25, by="+cmd|' /C calc'!A0", flags=["\rcr"]),
                ],
            )
        ],
    )


@pytest.mark.parametrize("style,sep,decimal", [("comma", ",", "."), ("semicolon", ";", ",")])
def test_csv_styles_keep_numbers_numbers(style: str, sep: str, decimal: str) -> None:
    text = to_csv(_negative_job(), ctx(), style)
    rows = list(csv.DictReader(io.StringIO(text), delimiter=sep))
    # IEC 61280-4-1: loss −0.12 dB; written as a number a spreadsheet adds up
    assert rows[0]["loss_db"] == f"-0{decimal}12"
    assert float(rows[0]["loss_db"].replace(",", ".")) == pytest.approx(-0.12)
    assert rows[1]["margin_db"] == f"0{decimal}50"  # 3.0 − 2.5
    assert rows[0]["wavelength_nm"] == "1310"
    if style == "semicolon":
        assert text.splitlines()[0].count(";") == len(rows[0]) - 1


@pytest.mark.parametrize("style,sep", [("comma", ","), ("semicolon", ";")])
def test_csv_neutralises_formula_cells_in_both_styles(style: str, sep: str) -> None:
    rows = list(csv.DictReader(io.StringIO(to_csv(_negative_job(), ctx(), style)), delimiter=sep))
    # OWASP CSV injection: a cell starting with = + - @ tab or CR is text, prefixed with '
    assert rows[0]["job"].startswith("'=")
    assert rows[0]["link"] == "'-2+3"  # looks like arithmetic, is a label
    assert rows[0]["by"] == "'@admin"
    assert rows[1]["by"].startswith("'") and "\t" not in rows[1]["by"]
    assert rows[2]["by"].startswith("'+")
    assert rows[2]["flags"].startswith("'") and "\r" not in rows[2]["flags"]


def test_a_plain_number_typed_as_text_is_not_mangled() -> None:
    job = Job(name="-0.12", links=[Link(label="1.5", results=[result(1, 1.0)])])
    rows = list(csv.DictReader(io.StringIO(to_csv(job, ctx(), "semicolon")), delimiter=";"))
    # user text is never converted: a label "1.5" keeps its point (it is not our number)
    assert (rows[0]["job"], rows[0]["link"]) == ("-0.12", "1.5")


# -- file names ---------------------------------------------------------------------------------
@pytest.mark.parametrize(
    "name,expected",
    [
        ("Library to Town Hall backbone", "Library-to-Town-Hall-backbone"),
        ("../../etc/passwd", "etc-passwd"),
        ("Feed / Nord: Straße 5", "Feed-Nord-Straße-5"),
        (".hidden", "hidden"),
        ("CON", "CON-job"),
        ("nul", "nul-job"),
        ("***", "job"),
        ("-rf", "rf"),
    ],
)
def test_file_names_are_one_safe_name(name: str, expected: str) -> None:
    assert slug(name) == expected
    made = file_name(name, date(2026, 12, 2), "html")
    assert made == f"{expected}_2026-12-02.html"
    assert "/" not in made and "\\" not in made and not made.startswith((".", "-"))


def test_a_long_name_is_cut_and_a_taken_name_gets_a_suffix(tmp_path: Path) -> None:
    assert len(slug("x" * 500)) == 60
    first = free_name(tmp_path, "a_2026-12-02.csv")
    assert first.name == "a_2026-12-02.csv"
    first.write_text("")
    assert free_name(tmp_path, "a_2026-12-02.csv").name == "a_2026-12-02-2.csv"
    (tmp_path / "a_2026-12-02-2.csv").symlink_to(tmp_path / "nowhere")  # a dangling link
    assert free_name(tmp_path, "a_2026-12-02.csv").name == "a_2026-12-02-3.csv"


# -- the document as a whole --------------------------------------------------------------------
def test_the_document_is_summary_then_one_section_per_link_then_appendix() -> None:
    job = sample()
    doc = build_document(job, ctx())
    titles = [s.title for s in doc.sections]
    assert titles == [
        "Summary",
        *(f"Link {link.label}" for link in job.links),
        "Appendix A: traceability",
        "Appendix B: sources",
    ]
    assert [s.page_break for s in doc.sections] == [False, True, True, True, False]


# -- OTDR traces (schema 5) ---------------------------------------------------------------------
def _traced_job() -> Job:
    from fieldkit.actions.traces import trace_record
    from fieldkit.traces.analysis import analyse_trace
    from fieldkit.traces.synthetic import example_fibre, synth_trace

    fibre = example_fibre(3, length_m=1840.0, wavelength_nm=1550.0, closures=(900.0,))
    record = trace_record(analyse_trace(synth_trace(fibre, seed=3, source="f3.sor")), fibre=3)
    older = record.model_copy(
        update={"id": "0" * 19 + "1", "superseded_at": T0, "superseded_by": record.id}
    )
    link = Link(label="A", results=[result(1, 1.0)], traces=[older, record])
    return Job(name="J", links=[link])


def test_a_links_stored_traces_are_drawn_with_their_event_table() -> None:
    job = _traced_job()
    record = job.links[0].traces[1]
    html = export(job, "html", ctx())
    page = html[html.index("<h2>Link A: OTDR traces</h2>") : html.index("<h2>Appendix A")]
    assert page.count('<figure class="trace"><svg') == 1  # the current trace only
    assert not re.search(r"<script|<image|url\(", page)
    # one table row per stored event, numbered as the analysis numbered them
    assert "Fibre 3 at 1550 nm, A→B: events" in page
    for event in record.events:
        assert f'<td class="num">{event.number}</td>' in page
    assert "end-to-end loss" in page
    appendix = html[html.index("<h2>Appendix A") :]
    assert "Superseded OTDR traces" in appendix and "0" * 19 + "1" in appendix
    md = export(job, "md", ctx())
    assert "Trace drawing (in the HTML report): Fibre 3 at 1550 nm, A→B" in md


def test_the_summary_lists_at_most_twelve_open_items_and_counts_the_rest() -> None:
    link = Link(label="A", results=[result(n, 3.5) for n in range(1, 21)])  # 20 fail 3.0 dB
    md = export(Job(name="J", links=[link]), "md", ctx())
    line = next(x for x in md.splitlines() if x.startswith("Open items:"))
    assert line.count("failed, repair and retest") == 12
    assert line.endswith("and 8 more (each link's page names its fibres).")


def test_sources_are_one_per_row_with_where_they_were_used() -> None:
    job = _traced_job()
    md = export(job, "md", ctx())
    sources = md[md.index("## Appendix B") :]
    rows = [line for line in sources.splitlines() if line.startswith("| ")][2:]
    assert rows and not any(row.split(" | ")[0].endswith(":") for row in rows)  # no headings
    assert re.search(r"\| A: OTDR limits at 1550 nm from [\w ]+ \|", sources)


@pytest.mark.parametrize("made", [sample, _traced_job], ids=["sample", "traced"])
def test_no_standard_is_cited_in_the_body(made) -> None:
    body = body_of(export(made(), "md", ctx()))
    for cited in ("ITU-T", "IEC ", "IEEE", "TIA-", "(from memory)", "common practice"):
        assert cited not in body, cited
