"""The report as data: pages of sections of blocks, rendered alike to HTML and Markdown.

A block is a paragraph, a table, a list of facts, a verdict, a chart, the equipment block,
the legend or the signature block. The renderers (:mod:`fieldkit.reports.html`,
:mod:`fieldkit.reports.markdown`) know how each looks; the builder
(:mod:`fieldkit.reports.build`) decides what a report says. All text in a block is plain
user-or-program text: each renderer escapes it for its target.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from fieldkit.jobs.counting import Count


@dataclass
class Paragraph:
    text: str
    #: "small" (fine print), "note" (a remark), "" (body text).
    style: str = ""


@dataclass
class Table:
    headers: list[str]
    rows: list[list[str]] = field(default_factory=list)
    #: Per row: "fail", "doubt", "old" (superseded) or "" (the HTML marks those rows; the text
    #: says it too, so a black-and-white print loses nothing).
    marks: list[str] = field(default_factory=list)
    numeric: set[int] = field(default_factory=set)
    #: Columns kept on one line (directions such as "A->B", times).
    nowrap: set[int] = field(default_factory=set)
    caption: str = ""
    #: A class for the HTML table (column widths of a known table).
    css_class: str = ""

    def add(self, row: list[str], mark: str = "") -> None:
        self.rows.append(row)
        self.marks.append(mark)


@dataclass
class Facts:
    """Label/value pairs (the header of a job, a link's description)."""

    rows: list[tuple[str, str]]


@dataclass
class Verdict:
    """An overall verdict: the word, the count it comes from (None: not tested) and why."""

    subject: str
    word: str
    count: Count | None
    reasons: list[str] = field(default_factory=list)


@dataclass(frozen=True)
class ChartPoint:
    fibre: int
    direction: str
    loss_db: float
    limit_db: float | None
    count: Count


@dataclass
class Chart:
    """Loss per fibre against the limit, at one wavelength of one link."""

    title: str
    wavelength_nm: float
    points: list[ChartPoint]
    fibre_count: int | None = None


@dataclass
class Signature:
    """The signature block: who tested (names filled in), the dates, and customer acceptance."""

    tested_by: str
    dates: str
    statement: str


@dataclass
class Legend:
    """Each mark and flag the report uses, with what it means."""

    entries: list[tuple[str, str]]
    #: Show the chart's marker shapes beside the verdict words (HTML).
    chart_marks: bool = True


@dataclass
class Drawing:
    """A drawing made by the program (an OTDR trace), as one trusted ``<svg>`` element that
    holds no user text; Markdown shows its caption only."""

    svg: str
    caption: str


Block = Paragraph | Table | Facts | Verdict | Chart | Signature | Legend | Drawing


@dataclass
class Section:
    title: str
    level: int = 2
    blocks: list[Block] = field(default_factory=list)
    #: Start a new printed page before this section (one page per link).
    page_break: bool = False
    #: A short running header printed above the section on its page (contractor, job, site).
    running_header: str = ""
    css_class: str = ""

    def para(self, text: str, style: str = "") -> None:
        self.blocks.append(Paragraph(text, style))


@dataclass
class Document:
    title: str
    #: The letterhead: the contractor's name (may be empty) and the line under it.
    contractor: str
    subtitle: str
    sections: list[Section]
