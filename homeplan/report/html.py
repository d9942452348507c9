"""The printed summary as one self-contained HTML page (inline CSS and SVG, no network).

Safety: every string that came from a plan file (names, notes, labels, reasons...) is passed
through :func:`html.escape` with ``quote=True`` at the point it is written into markup, and the
page carries a Content-Security-Policy that allows no script, no fetches and no external
resources at all, so even a mistake in escaping could not run code or phone home.

Print: the page is laid out for the narrower of A4 and US Letter (content 182 mm wide), with
``@page`` margins, page numbers and the plan's content hash in the page margin, and three
parts in order: the roadmap at a glance (the first page, for the fridge), the numbers year by
year, and assumptions with the safety cautions. Headings stay with what follows them; table
rows, the yearly table, the energy and capacity blocks and each caution are kept whole on one
page when they fit (no forced page breaks, so no half-empty pages).

References
----------
WHATWG HTML Living Standard, 13.1 (syntax) and 4.2.4 (meta http-equiv Content-Security-Policy);
W3C CSS Paged Media Module Level 3 (@page, margin boxes, counter(page));
W3C CSS Fragmentation Module Level 3 (break-before, break-inside).
"""

from __future__ import annotations

from html import escape

from homeplan.report.charts import (
    HIGH_COLOUR,
    LOW_COLOUR,
    SERIES_COLOURS,
    band_chart_svg,
    tornado_svg,
)
from homeplan.report.compare import Comparison, range_chart_svg
from homeplan.report.fmt import short
from homeplan.report.svg import PATH_COLOURS, chart_svg, legend_items, timeline_svg
from homeplan.report.view import Report, Table

__all__ = ["CSP", "CSS", "comparison_html", "comparison_page", "e", "render_html", "table_html"]


def e(text: object) -> str:
    """Escape text for HTML content and attribute values."""
    return escape("" if text is None else str(text), quote=True)


CSP = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'"

CSS = """
:root { --ink: #1d2a33; --muted: #5d6770; --rule: #d9dcdf; --band: #f3f4f5; --attention: #b8621b; }
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; }
body { margin: 0 auto; max-width: 190mm; padding: 8mm 4mm; color: var(--ink);
  font: 10.5pt/1.4 "DejaVu Sans", "Liberation Sans", "Helvetica Neue", Arial, sans-serif;
  -webkit-print-color-adjust: exact; print-color-adjust: exact; }
h1 { font-size: 18pt; margin: 0 0 1mm; font-weight: 600; overflow-wrap: anywhere; }
h2 { font-size: 12.5pt; margin: 6mm 0 2mm; padding-bottom: 1mm; border-bottom: 1.5px solid var(--ink);
  break-after: avoid; page-break-after: avoid; }
h3 { font-size: 10.5pt; margin: 4mm 0 1mm; break-after: avoid; }
p { margin: 1mm 0 2mm; }
.kicker { text-transform: uppercase; letter-spacing: .08em; font-size: 8.5pt; color: var(--muted); margin: 0; }
.sub { color: var(--muted); margin: 0 0 3mm; overflow-wrap: anywhere; }
.note { color: var(--muted); font-size: 8.5pt; }
dl.facts { display: grid; grid-template-columns: 22mm minmax(0, 1fr); gap: .6mm 3mm; margin: 0; align-content: start; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; overflow-wrap: anywhere; }
.glance-grid { display: grid; grid-template-columns: minmax(0, 1.35fr) minmax(0, 1fr); gap: 5mm; }
.figures { display: grid; grid-template-columns: 1fr 1fr; gap: 1.5mm; margin: 0; padding: 0; list-style: none;
  align-content: start; }
.figures li { border: 1px solid var(--rule); border-radius: 1.5mm; padding: 1mm 2mm; break-inside: avoid; }
.figures .v { font-size: 12pt; font-weight: 600; display: block; line-height: 1.25; }
.figures .k { font-size: 7.5pt; color: var(--muted); display: block; line-height: 1.25; }
table { width: 100%; border-collapse: collapse; font-size: 9pt; margin: 1mm 0 1mm; }
th, td { padding: 1mm 1.5mm; border-bottom: 1px solid var(--rule); vertical-align: top; text-align: left;
  overflow-wrap: anywhere; word-break: break-word; }
th { font-weight: 600; color: var(--muted); border-bottom: 1.5px solid var(--ink); overflow-wrap: normal;
  word-break: normal; vertical-align: bottom; }
td.r, th.r { text-align: right; }
td.r, td.n { white-space: nowrap; overflow-wrap: normal; word-break: normal; }
table.steps td:nth-child(2) { width: 27%; }
td.w, th.w { width: 34%; }
tr { break-inside: avoid; page-break-inside: avoid; }
tbody tr:nth-child(even) td { background: var(--band); }
tbody tr.total td { font-weight: 600; border-top: 1.5px solid var(--ink); border-bottom: 0; background: none; }
thead { display: table-header-group; }
svg.timeline, svg.chart { width: 100%; height: auto; display: block; margin: 1mm 0; }
.compare { display: grid; grid-template-columns: 1fr 1fr; gap: 3mm; margin: 2mm 0 0; }
.compare div { border: 1px solid var(--rule); border-radius: 1.5mm; padding: 1.5mm 3mm; }
.compare div.first { border: 1.5px solid var(--ink); }
.compare .v { font-size: 14pt; font-weight: 600; display: block; }
.compare .k { font-weight: 600; display: block; }
.compare .m { font-size: 8.5pt; color: var(--muted); display: block; }
.advisor { border: 1px solid var(--rule); border-radius: 1.5mm; padding: 1.5mm 3mm; margin: 0 0 3mm;
  break-inside: avoid; }
.advisor dl.facts { grid-template-columns: 27mm minmax(0, 1fr) 27mm minmax(0, 1fr); }  /* two pairs a row */
.advisor h2 { font-size: 10.5pt; margin: 0 0 1mm; border: 0; padding: 0; }
dl.glossary dt { font-weight: 600; }
dl.glossary { margin: 0; }
dl.glossary dd { margin: 0 0 .8mm 0; }
.legend { display: flex; flex-wrap: wrap; gap: 1mm 5mm; font-size: 8.5pt; color: var(--muted); margin: 0 0 2mm;
  padding: 0; list-style: none; }
.legend .sw { display: inline-block; width: 4mm; height: 2.6mm; border-radius: .6mm; margin-right: 1.5mm;
  vertical-align: -.2mm; }
.legend .sw.diamond { width: 2.6mm; transform: rotate(45deg); border-radius: 0; }
.attention { border-left: 1.2mm solid var(--attention); padding: 1mm 3mm; margin: 2mm 0; background: #fbf4ee;
  break-inside: avoid; }
.no { color: var(--attention); font-weight: 600; }
ul.notes { margin: 0; padding-left: 5mm; font-size: 8.5pt; color: var(--muted); }
ul.cautions { list-style: none; padding: 0; margin: 0; }
ul.cautions li { border-left: 1.2mm solid var(--attention); padding: .3mm 3mm; margin: 0 0 1.5mm; break-inside: avoid; }
dl.facts.wide { grid-template-columns: 40mm minmax(0, 1fr); }
.keep { break-inside: avoid; page-break-inside: avoid; }
footer p { margin: 0 0 1mm; }
footer { margin-top: 4mm; padding-top: 1.5mm; border-top: 1px solid var(--rule); font-size: 8.5pt; color: var(--muted);
  overflow-wrap: anywhere; }
footer code { font-size: 9pt; color: var(--ink); }
@page { margin: 13mm 13mm 15mm;
  @bottom-left { content: "homeplan summary - plan HASH"; font: 7.5pt sans-serif; color: #5d6770; }
  @bottom-right { content: "page " counter(page) " of " counter(pages); font: 7.5pt sans-serif; color: #5d6770; } }
@media print {
  body { max-width: none; padding: 0; font-size: 9.5pt; }
  h2:first-child { margin-top: 3mm; }  /* room after the block before; a page top shows it little */
  a { color: inherit; text-decoration: none; }
}
"""


def table_html(t: Table, cls: str = "") -> str:
    """A table of the page (numbers right-aligned, a closing total row, a note below)."""
    head = "".join(f'<th class="{a if a in ("r", "w") else "l"}" scope="col">{e(h)}</th>'
                   for h, a in zip(t.headers, t.align, strict=False))
    body = []
    for row in t.rows:
        cells = []
        for v, a in zip(row, t.align, strict=False):
            klass = a if a in ("r", "n", "w") else "l"
            inner = f'<span class="no">{e(v)}</span>' if v == "NO" else e(v)
            cells.append(f'<td class="{klass}">{inner}</td>')
        body.append("<tr>" + "".join(cells) + "</tr>")
    if t.total:  # a last body row: a <tfoot> would repeat on every printed page
        body.append('<tr class="total">' + "".join(
            f'<td class="{"r" if a == "r" else "l"}">{e(v)}</td>'
            for v, a in zip(t.total, t.align, strict=False)) + "</tr>")
    note = f'<p class="note">{e(t.note)}</p>' if t.note else ""
    return (f'<table class="{e(cls)}"><thead><tr>{head}</tr></thead><tbody>{"".join(body)}</tbody>'
            f"</table>{note}")


def comparison_html(c: Comparison) -> str:
    """Options side by side as an HTML section (a printout's page, or a page of its own)."""
    parts = ['<section class="compare"><h2>Options side by side</h2>', table_html(c.headline, "compare")]
    parts.append('<div class="keep"><h3>Steps by year</h3>' + table_html(c.steps, "compare-steps") + "</div>")
    if c.ranges:
        parts.append('<div class="keep"><h3>Total cost across the price paths</h3>')
        parts.append(range_chart_svg(c.ranges, "Total cost of each option: P10 to P90 bar, median mark"))
        parts.append('<p class="note">Each bar runs from P10 to P90 of the price paths; the mark is the median.</p>')
        parts.append(table_html(c.risk, "compare-risk") + "</div>")
    parts += [f'<p class="note">{e(n)}</p>' for n in c.notes]
    parts.append("</section>")
    return "\n".join(parts)


def comparison_page(c: Comparison, title: str, printed: str, tool_version: str) -> str:
    """A page of its own for ``homeplan compare -o FILE.html``."""
    return "\n".join([
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{e(CSP)}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        '<meta name="referrer" content="no-referrer">',
        f'<meta name="generator" content="homeplan {e(tool_version)}">',
        f"<title>{e(title)}</title>", f"<style>{CSS.replace('HASH', '')}</style></head><body>",
        '<header class="doc"><p class="kicker">Home electrification options</p>',
        f"<h1>{e(short(title, 120))}</h1></header>",
        comparison_html(c),
        f'<footer class="keep"><p>Printed {e(printed)} with homeplan {e(tool_version)}. All figures are planning '
        "estimates; local codes, permits and licensed professionals have the final word.</p></footer>",
        "</body></html>",
    ]) + "\n"


def _arrow(escaped: str) -> str:
    """Draw the plain-text arrow of already-escaped text as a real one."""
    return escaped.replace(" -&gt; ", " \u2192 ")


def _facts(items: tuple[tuple[str, str], ...], cls: str = "facts") -> str:
    return f'<dl class="{cls}">' + "".join(f"<dt>{e(k)}</dt><dd>{e(v)}</dd>" for k, v in items) + "</dl>"


def _legend(items: list[tuple[str, str]]) -> str:
    return '<ul class="legend">' + "".join(
        f'<li><span class="sw" style="background:{colour}"></span>{e(label)}</li>' for colour, label in items) + "</ul>"


def _risk_sections(r: Report) -> list[str]:
    """Price risk (band chart and tables) and what moves the result (tornado chart)."""
    parts: list[str] = []
    if r.risk is not None:
        k = r.risk
        parts.append('<section class="risk"><h2>Price risk</h2>')
        parts += [f"<p>{e(line)}</p>" for line in k.lines]
        parts.append('<div class="keep"><h3>Energy bills each year across the price paths</h3>')
        parts.append(band_chart_svg(k.series, "Yearly energy bills: median line, P10 to P90 band",
                                    "dollars of each year"))
        parts.append(_legend([(SERIES_COLOURS[i], f"{s.label}: median, and P10 to P90 shaded")
                              for i, s in enumerate(k.series)]) + "</div>")
        parts.append('<div class="keep">' + table_html(k.totals, "risk-totals") + "</div>")
        parts.append('<div class="keep">' + table_html(k.shocks, "risk-shocks") + "</div>")
        parts.append("</section>")
    if r.sensitivity is not None:
        v = r.sensitivity
        parts.append('<section class="sensitivity"><h2>What moves the result</h2>')
        parts += [f"<p>{e(line)}</p>" for line in v.lines]
        parts.append('<div class="keep">' + tornado_svg(v.bars, v.base_usd, "Net present value, one "
                                                        "assumption changed at a time") + "</div>")
        parts.append(_legend([(LOW_COLOUR, "low setting"), (HIGH_COLOUR, "high setting")]))
        parts.append('<div class="keep">' + table_html(v.table, "sensitivity") + "</div></section>")
    return parts


def render_html(r: Report) -> str:
    """The whole page as one string."""
    f = r.footer
    css = CSS.replace("HASH", "".join(c for c in f.content_hash if c in "0123456789abcdef"))
    parts: list[str] = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{e(CSP)}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        '<meta name="referrer" content="no-referrer">',
        f'<meta name="generator" content="homeplan {e(f.tool_version)}">',
        f"<title>{e(r.title)}</title>",
        f"<style>{css}</style></head><body>",
        '<header class="doc"><p class="kicker">Home electrification roadmap</p>',
        f"<h1>{e(short(r.title.split(': ', 1)[-1], 120))}</h1>",
    ]
    if r.subtitle:
        parts.append(f'<p class="sub">{e(r.subtitle)}</p>')
    parts.append("</header>")
    if r.advisor:
        parts.append('<section class="advisor"><h2>Prepared by</h2>' + _facts(r.advisor) + "</section>")
    # ---- page 1: at a glance
    parts.append('<section class="glance keep"><h2>At a glance</h2><div class="glance-grid">')
    parts.append(_facts(r.home))
    parts.append('<ul class="figures">' + "".join(
        f'<li><span class="v">{_arrow(e(v))}</span><span class="k">{_arrow(e(k))}</span></li>'
        for k, v in r.headline) + "</ul>")
    parts.append("</div>")
    if r.against:
        parts.append('<div class="compare">' + "".join(
            f'<div class="{"first" if i == 0 else "second"}"><span class="k">{e(what)}</span>'
            f'<span class="v">{e(value)}</span><span class="m">{e(means)}</span></div>'
            for i, (what, value, means) in enumerate(r.against)) + "</div>")
    parts.append("</section>")
    for text in r.emergencies:
        parts.append(f'<div class="attention"><b>Emergency.</b> {e(text)}</div>')
    if r.status != "ok":
        parts.append('<div class="attention"><b>No roadmap fits these inputs.</b> '
                     f"{e(r.infeasibility)}</div>")
    parts.append('<section class="timeline keep"><h2>The roadmap</h2>')
    parts.append(timeline_svg(r.timeline, f"Roadmap {r.timeline.first_year} to {r.timeline.last_year}"))
    parts.append('<ul class="legend">' + "".join(
        f'<li><span class="sw{" diamond" if label == "Milestone" else ""}" style="background:{colour}">'
        f"</span>{e(label)}</li>" for colour, label in legend_items(r.timeline))
        + "<li>Each bar is the year the work is done.</li></ul>")
    parts.append("</section>")
    parts.append('<section class="steps"><h2>Steps</h2>')
    parts.append(table_html(r.steps, "steps") + f'<p class="note">{e(r.money_note)}</p>')
    if r.warnings:
        parts.append('<div class="keep"><h3>Notes from the planner</h3><ul class="notes">'
                     + "".join(f"<li>{e(w)}</li>" for w in r.warnings) + "</ul></div>")
    parts.append("</section>")
    # ---- page 2: year by year
    if r.chart is not None:
        names = {sr.kind: sr.name for sr in r.chart.bills}
        parts.append('<section class="chart keep"><h2>Bills and money out, year by year</h2>'
                     + chart_svg(r.chart) + '<ul class="legend">' + "".join(
                         f'<li><span class="sw" style="background:{PATH_COLOURS[k]}"></span>{e(n)}</li>'
                         for k, n in names.items())
                     + "<li>Like for like: replacing each thing with the same kind on the same fuel "
                     "when it wears out.</li></ul></section>")
    if r.fossil is not None:
        parts.append('<section class="fossil keep"><h2>Fuel still bought, and when it stops</h2>'
                     + table_html(r.fossil, "fossil") + "</section>")
    parts.append('<section class="years"><h2>Year by year</h2>' + table_html(r.years, "years") + "</section>")
    parts += _risk_sections(r)
    if r.comparison is not None:
        parts.append(comparison_html(r.comparison))
    parts.append('<section class="energy keep"><h2>Energy and emissions, before and after</h2>'
                 + table_html(r.energy, "energy") + "</section>")
    parts.append('<section class="capacity"><h2>Electrical capacity</h2>' + table_html(r.capacity, "capacity"))
    if r.capacity_notes:
        parts.append("<ul>" + "".join(f"<li>{e(n)}</li>" for n in r.capacity_notes) + "</ul>")
    parts.append("</section>")
    # ---- page 3: assumptions and safety
    parts.append('<section class="assumptions"><h2>Key assumptions</h2>' + _facts(r.assumptions, "facts wide"))
    if r.programs.rows:
        parts.append("<h3>Incentive programs</h3>" + table_html(r.programs, "programs"))
    parts.append("</section>")
    parts.append('<section class="cautions"><h2>Safety</h2><ul class="cautions">' + "".join(
        f"<li><b>{e(t)}.</b> {e(text)}</li>" for t, text in r.cautions) + "</ul></section>")
    if r.glossary:
        parts.append('<section class="glossary"><h2>Words used in this summary</h2><dl class="glossary">'
                     + "".join(f"<dt>{e(term)} ({e(plain)})</dt><dd>{e(text)}</dd>"
                               for term, plain, text in r.glossary) + "</dl></section>")
    # ---- footer
    who = []
    if f.prepared_by:
        who.append(f"Prepared by {e(f.prepared_by)}" + (f" on {e(f.plan_date)}" if f.plan_date else ""))
    if f.prepared_for:
        who.append(f"for {e(f.prepared_for)}")
    parts.append('<footer class="keep">')
    parts.append(f"<p>Plan content hash <code>{e(f.content_hash)}</code> - printed {e(f.printed)} "
                 f"with homeplan {e(f.tool_version)}." + (f" {' '.join(who)}." if who else "") + "</p>")
    if f.notes:
        parts.append(f"<p>Notes: {e(f.notes)}</p>")
    parts.append("<p>The same hash on two printouts means they were made from the same plan inputs. "
                 "All figures are planning estimates; local codes, permits and licensed "
                 "professionals have the final word.</p>")
    parts.append("</footer></body></html>")
    return "\n".join(parts) + "\n"
