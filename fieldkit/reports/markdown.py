"""The report as Markdown: the same document as the HTML, in text. Every user text passes
:func:`fieldkit.text.escape.markdown` (no link, image, heading or raw HTML from a job file).

A chart is written as its caption (which fibres fail, which need a retest); a page break as a
horizontal rule.
"""

from __future__ import annotations

from fieldkit.reports import chart
from fieldkit.reports.common import minus
from fieldkit.reports.document import (
    Block,
    Chart,
    Document,
    Drawing,
    Facts,
    Legend,
    Paragraph,
    Section,
    Signature,
    Table,
    Verdict,
)
from fieldkit.text import escape

m = escape.markdown


def _table(table: Table) -> list[str]:
    out = []
    if table.caption:
        out += [f"**{m(table.caption)}**", ""]
    out.append("| " + " | ".join(m(h) for h in table.headers) + " |")
    out.append(
        "| "
        + " | ".join("---:" if i in table.numeric else "---" for i in range(len(table.headers)))
        + " |"
    )
    for row in table.rows:
        out.append("| " + " | ".join(m(minus(c)) for c in row) + " |")
    return [*out, ""]


def _block(block: Block) -> list[str]:
    if isinstance(block, Paragraph):
        text = m(block.text)
        return [f"*{text}*" if block.style == "small" else text, ""]
    if isinstance(block, Table):
        return _table(block)
    if isinstance(block, Facts):
        return [*(f"- **{m(k)}:** {m(v)}" for k, v in block.rows), ""]
    if isinstance(block, Verdict):
        why = "; ".join(block.reasons)
        return [f"**{m(block.subject)}: {m(block.word)}**" + (f" — {m(why)}." if why else ""), ""]
    if isinstance(block, Chart):
        return [f"Chart, {m(chart.caption(block))}", ""]
    if isinstance(block, Legend):
        return ["**Legend**", "", *(f"- **{m(k)}**: {m(v)}" for k, v in block.entries), ""]
    if isinstance(block, Drawing):
        return [f"Trace drawing (in the HTML report): {m(block.caption)}", ""]
    return _signature(block)


def _signature(sig: Signature) -> list[str]:
    blank = "\\_" * 20
    return [
        f"*{m(sig.statement)}*",
        "",
        f"- Tested by: {m(sig.tested_by) or blank}; test date: {m(sig.dates) or blank}; "
        f"signature: {blank}",
        f"- Customer acceptance, name: {blank}; date: {blank}; signature: {blank}",
        "",
    ]


def _section(sec: Section) -> list[str]:
    out = ["---", ""] if sec.page_break else []
    out += [f"{'#' * sec.level} {m(sec.title)}", ""]
    for block in sec.blocks:
        out += _block(block)
    return out


def body(doc: Document) -> list[str]:
    out = [f"# {m(doc.title)}", ""]
    if doc.contractor:
        out += [f"**{m(doc.contractor)}** — {m(doc.subtitle)}", ""]
    else:
        out += [m(doc.subtitle), ""]
    for sec in doc.sections:
        out += _section(sec)
    return out


def render(doc: Document) -> str:
    return "\n".join(body(doc)).rstrip() + "\n"
