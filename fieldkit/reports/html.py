"""The report as one self-contained HTML file: no scripts, no external files, print CSS for
A4 and Letter (the page size is the printer's; widths are relative, so both fit), one printed
page per link (``break-before: page``). Every user text passes :func:`fieldkit.text.escape.html`.
"""

from __future__ import annotations

from fieldkit.jobs.counting import Count
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

e = escape.html

CSS = """
@page { margin: 10mm 11mm 10mm; }
html { font-family: "DejaVu Sans", "Liberation Sans", Arial, sans-serif; font-size: 9pt;
       color: #111; background: #fff; }
body { margin: 0 auto; max-width: 62em; padding: 1em; }
h1 { font-size: 15pt; margin: .1em 0 .3em; }
h2 { font-size: 12.5pt; margin: .6em 0 .3em; border-bottom: 1.5px solid #333; }
.letterhead { border-bottom: 3px double #333; margin-bottom: .4em; padding-bottom: .2em; }
.letterhead .contractor { font-size: 13pt; font-weight: bold; }
.letterhead .subtitle { font-size: 10pt; color: #333; }
.running { font-size: 8pt; color: #333; border-bottom: 1px solid #999; padding-bottom: .1em; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: .05em 1em; margin: .3em 0; }
dl.facts dt { font-weight: bold; } dl.facts dd { margin: 0; }
.verdict { border: 2px solid #333; padding: .3em .6em; margin: .4em 0; }
.verdict .word { font-size: 13pt; font-weight: bold; letter-spacing: .03em; }
.verdict.v-fail { border-width: 4px; border-color: #b3261e; }
.verdict.v-pass { border-color: #1a7f37; }
.verdict.v-doubt { border-style: dashed; border-color: #8a5a00; }
.verdict .why { font-size: 8.5pt; }
table { border-collapse: collapse; width: 100%; margin: .2em 0 .4em; font-size: 7.5pt; }
caption { text-align: left; font-weight: bold; font-size: 8.5pt; padding: .1em 0; }
th, td { border: 1px solid #999; padding: 0 .3em; text-align: left; vertical-align: top;
         overflow-wrap: break-word; word-break: normal; hyphens: manual; }
th { background: #eee; overflow-wrap: normal; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.nowrap { white-space: nowrap; }
tr.fail td { background: #fde2e2; font-weight: bold; }
tr.doubt td { background: #fff3cd; font-style: italic; }
tr.old td { color: #555; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
h2, caption { break-after: avoid; page-break-after: avoid; }
p { margin: .2em 0; }
section.link p { font-size: 8.5pt; }
p.small, .small { font-size: 7.5pt; color: #222; }
.charts { display: flex; flex-wrap: wrap; gap: .3em 2%; break-inside: avoid; }
.charts figure { margin: 0; flex: 1 1 48%; min-width: 18em; break-inside: avoid; }
.charts figcaption { font-size: 8pt; }
svg.chart { display: block; max-height: 36mm; }
svg.mark { vertical-align: middle; }
dl.legend { display: grid; grid-template-columns: max-content 1fr; gap: 0 .8em; font-size: 7.5pt;
            margin: .2em 0; }
dl.legend dt { font-weight: bold; white-space: nowrap; } dl.legend dd { margin: 0; }
.signature { border: 1.5px solid #333; padding: .1em .5em .3em; margin-top: .3em;
             break-inside: avoid; }
.signature table { font-size: 8.5pt; margin: .2em 0 0; table-layout: fixed; }
.signature td { border: none; border-bottom: 1px solid #555; height: 2.1em;
                vertical-align: bottom; }
.signature td.label { border: none; font-weight: bold; width: 6.5em; white-space: nowrap; }
.signature td.label.wide { width: 11em; }
section.page, article.page { break-before: page; page-break-before: always; }
table.sources td:first-child { width: 64%; }
figure.trace { margin: .4em 0 0; break-inside: avoid; }
figure.trace svg { display: block; width: 100%; height: auto; max-height: 52mm; }
figure.trace figcaption { font-size: 8pt; font-weight: bold; }
.trace-block { break-inside: avoid; }
@media print {
  body { max-width: none; padding: 0; }
  tr.fail td, tr.doubt td, th, .verdict { -webkit-print-color-adjust: exact;
                                          print-color-adjust: exact; }
}
"""

_VERDICT_CLASS = {
    Count.FAIL: "v-fail",
    Count.REFERENCE_PROBLEM: "v-doubt",
    Count.IN_DOUBT: "v-doubt",
    Count.NO_LIMIT: "v-none",
    Count.PASS: "v-pass",
}


def _table(table: Table) -> str:
    out = [f'<table class="{table.css_class}">' if table.css_class else "<table>"]
    if table.caption:
        out.append(f"<caption>{e(table.caption)}</caption>")
    out.append("<thead><tr>" + "".join(f"<th>{e(h)}</th>" for h in table.headers) + "</tr></thead>")
    out.append("<tbody>")
    for i, row in enumerate(table.rows):
        mark = table.marks[i] if i < len(table.marks) else ""
        cls = f' class="{mark}"' if mark else ""
        cells = "".join(
            f'<td class="num">{e(minus(c))}</td>'
            if j in table.numeric
            else f'<td class="nowrap">{e(minus(c))}</td>'
            if j in table.nowrap
            else f"<td>{e(minus(c))}</td>"
            for j, c in enumerate(row)
        )
        out.append(f"<tr{cls}>{cells}</tr>")
    out.append("</tbody></table>")
    return "\n".join(out)


def _verdict(v: Verdict) -> str:
    cls = _VERDICT_CLASS.get(v.count, "v-none") if v.count is not None else "v-none"
    why = "; ".join(v.reasons)
    return (
        f'<div class="verdict {cls}"><span class="what">{e(v.subject)}:</span> '
        f'<span class="word">{e(v.word)}</span>'
        + (f'<div class="why">{e(why)}.</div>' if why else "")
        + "</div>"
    )


def _legend(legend: Legend) -> str:
    marks = {
        "pass": Count.PASS,
        "FAIL": Count.FAIL,
        "reference problem": Count.REFERENCE_PROBLEM,
        "in doubt": Count.IN_DOUBT,
        "no limit": Count.NO_LIMIT,
    }
    out = ['<dl class="legend">']
    for term, meaning in legend.entries:
        count = marks.get(term)
        mark = chart.legend_marker(count) + " " if count is not None and legend.chart_marks else ""
        out.append(f"<dt>{mark}{e(term)}</dt><dd>{e(meaning)}</dd>")
    out.append("</dl>")
    return '<div class="legend-block"><h3 class="small">Legend</h3>' + "".join(out) + "</div>"


def _signature(sig: Signature) -> str:
    tested = e(sig.tested_by) if sig.tested_by else "&nbsp;"
    dates = e(sig.dates) if sig.dates else "&nbsp;"
    return (
        '<div class="signature">'
        f'<p class="small">{e(sig.statement)}</p>'
        "<table><tbody>"
        f'<tr><td class="label wide">Tested by</td><td>{tested}</td>'
        f'<td class="label">Test date</td><td>{dates}</td>'
        '<td class="label">Signature</td><td></td></tr>'
        '<tr><td class="label wide">Customer accepts</td><td></td>'
        '<td class="label">Date</td><td></td>'
        '<td class="label">Signature</td><td></td></tr>'
        "</tbody></table></div>"
    )


def _block(block: Block) -> str:
    if isinstance(block, Paragraph):
        cls = f' class="{block.style}"' if block.style else ""
        return f"<p{cls}>{e(block.text)}</p>"
    if isinstance(block, Table):
        return _table(block)
    if isinstance(block, Facts):
        rows = "".join(f"<dt>{e(k)}</dt><dd>{e(v)}</dd>" for k, v in block.rows)
        return f'<dl class="facts">{rows}</dl>'
    if isinstance(block, Verdict):
        return _verdict(block)
    if isinstance(block, Chart):
        return (
            f"<figure>{chart.svg(block)}<figcaption>{e(chart.caption(block))}</figcaption></figure>"
        )
    if isinstance(block, Legend):
        return _legend(block)
    if isinstance(block, Drawing):
        # drawn by fieldkit.traces.svg from numbers only: no user text inside
        return (
            f'<figure class="trace">{block.svg}<figcaption>{e(block.caption)}</figcaption></figure>'
        )
    return _signature(block)


def _section(sec: Section) -> list[str]:
    classes = " ".join(c for c in (sec.css_class, "page" if sec.page_break else "") if c)
    out = [f'<section class="{classes}">' if classes else "<section>"]
    if sec.running_header:
        out.append(f'<div class="running">{e(sec.running_header)}</div>')
    out.append(f"<h{sec.level}>{e(sec.title)}</h{sec.level}>")
    charts: list[str] = []
    for block in sec.blocks:
        if isinstance(block, Chart):
            charts.append(_block(block))
            continue
        if charts:
            out.append('<div class="charts">' + "".join(charts) + "</div>")
            charts = []
        out.append(_block(block))
    if charts:
        out.append('<div class="charts">' + "".join(charts) + "</div>")
    out.append("</section>")
    return out


def letterhead(doc: Document) -> str:
    head = '<header class="letterhead">'
    if doc.contractor:
        head += f'<div class="contractor">{e(doc.contractor)}</div>'
    head += f'<div class="subtitle">{e(doc.subtitle)}</div>'
    return head + f"<h1>{e(doc.title)}</h1></header>"


def page(title: str, body: list[str]) -> str:
    """A whole HTML file around ``body``."""
    out = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{e(title)}</title>",
        f"<style>{CSS}</style>",
        "</head>",
        "<body>",
        *body,
        "</body>",
        "</html>",
    ]
    return "\n".join(out) + "\n"


def body(doc: Document, *, first_page_break: bool = False) -> list[str]:
    """The HTML of one job's report (a day report puts several after each other)."""
    cls = ' class="page"' if first_page_break else ""
    out = [f"<article{cls}>", letterhead(doc)]
    for sec in doc.sections:
        out += _section(sec)
    out.append("</article>")
    return out


def render(doc: Document) -> str:
    return page(doc.title, body(doc))
