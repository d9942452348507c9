"""The printed summary as plain text (terminal, .txt) and as Markdown (.md).

User text in a :class:`~homeplan.report.view.Report` is already free of control characters (so a
plan file cannot send terminal escape sequences). Markdown additionally escapes its own
punctuation and ``<``/``>``/``&`` so that user text cannot become links, images or raw HTML in a
Markdown viewer.

References
----------
CommonMark Spec 0.31.2, section 2.4 (backslash escapes) and 6.6 (raw HTML).
"""

from __future__ import annotations

import re

from homeplan.report.compare import Comparison
from homeplan.report.fmt import money, money_signed, short
from homeplan.report.table import text_table
from homeplan.report.view import GROUP_LABELS, Report, Table, Timeline, footer_line

__all__ = ["chart_table", "comparison_markdown", "comparison_text", "md", "render_markdown", "render_text",
           "timeline_text", "tornado_text"]

_GROUP_CHAR = {"appliances": "#", "electrical": "E", "solar": "S", "vehicles": "V", "building": "B",
               "other": "*"}


def timeline_text(t: Timeline, label_w: int = 30) -> str:
    """Years across (two digits each), one row per step, milestones on their own rows."""
    years = list(range(t.first_year, t.last_year + 1))
    head = " " * label_w + " " + " ".join(f"{y % 100:02d}" for y in years)
    lines = [" " * label_w + f" {t.first_year} to {t.last_year}", head]
    for b in sorted(t.bars, key=lambda b: b.year):
        ch = _GROUP_CHAR.get(b.group, "*") * 2
        cells = " ".join(ch if y == b.year else " ." for y in years)
        lines.append(f"{short(b.label, label_w):<{label_w}} {cells}")
    for m in sorted(t.marks, key=lambda m: m.year):
        cells = " ".join("<>" if y == m.year else "  " for y in years)
        lines.append(f"{'milestone':<{label_w}} {cells}  {m.year}: {short(m.label, 50)}")
    key = [f"{_GROUP_CHAR[g] * 2} {GROUP_LABELS[g].lower()}" for g in t.groups]
    if t.marks:
        key.append("<> milestone")
    if key:
        lines.append("key: " + ", ".join(key))
    return "\n".join(lines)


def _wrap(text: str, width: int, indent: str = "", hang: int = 0) -> str:
    import textwrap

    return textwrap.fill(text, width=width, initial_indent=indent,
                         subsequent_indent=indent + " " * hang, break_long_words=True)


def _text_table(t: Table, reason_w: int = 48) -> str:
    rows = [tuple(short(c, reason_w) for c in r) for r in t.rows]
    if t.total:
        rows.append(t.total)
    align = t.align.replace("n", "l").replace("w", "l")
    out = text_table(t.headers, rows, align)
    if t.note:
        out += "\n" + _wrap(t.note, 100)
    return out


def chart_table(r: Report) -> Table:
    """The printout's chart as numbers: bills and money out a year, plan and like for like."""
    c = r.chart
    assert c is not None
    headers = ("Year", *(f"Bills: {sr.name.lower()}" for sr in c.bills),
               *(f"Money out: {sr.name.lower()}" for sr in c.cash_out))
    rows = tuple((str(y), *(money(sr.values[i]) for sr in (*c.bills, *c.cash_out)))
                 for i, y in enumerate(c.years))
    return Table(headers, rows, "n" + "r" * (len(headers) - 1), None,
                 "Money out: projects after incentives, loan payments and energy bills. Like for "
                 "like: replacing each thing with the same kind on the same fuel when it wears out.")


def tornado_text(base_usd: float, bars: tuple, width: int = 24) -> str:
    """A tornado chart in text: the NPV as planned in the middle, each assumption's low (<) and
    high (>) settings as bars to either side."""
    if not bars:
        return ""
    reach = max(max(abs(b.low_usd - base_usd), abs(b.high_usd - base_usd)) for b in bars) or 1.0
    out = []
    for b in bars:
        cells = [" "] * (2 * width + 1)
        cells[width] = "|"
        for value, ch in ((b.low_usd, "<"), (b.high_usd, ">")):
            n = round(abs(value - base_usd) / reach * width)
            for i in range(1, n + 1):
                pos = width + i if value > base_usd else width - i
                cells[pos] = ch
        out.append(f"{short(b.label, 30):<30} {money_signed(b.low_usd):>10} {''.join(cells)} "
                   f"{money_signed(b.high_usd)}")
    out.append(f"{'':<30} {'':>10} {'as planned ' + money_signed(base_usd):^{2 * width + 1}}")
    out.append("< low setting, > high setting; the table says which is which.")
    return "\n".join(out)


def _risk_text(r: Report, w: int) -> list[tuple[str, str]]:
    out: list[tuple[str, str]] = []
    if r.risk is not None:
        k = r.risk
        body = "\n\n".join(_wrap(line, w) for line in k.lines)
        body += "\n\n" + _text_table(k.totals) + "\n\n" + _text_table(k.shocks) + "\n\n" + _text_table(k.yearly)
        out.append(("Price risk", body))
    if r.sensitivity is not None:
        v = r.sensitivity
        body = "\n".join(_wrap(line, w) for line in v.lines)
        body += "\n\n" + tornado_text(v.base_usd, v.bars) + "\n\n" + _text_table(v.table)
        out.append(("What moves the result", body))
    return out


def render_text(r: Report) -> str:
    w = 100
    out: list[str] = [short(r.title, 200), "=" * min(len(r.title), w)]
    if r.subtitle:
        out.append(short(r.subtitle, 200))
    out.append("")
    if r.advisor:
        out.append("Prepared by")
        out += [_wrap(f"  {k + ':':<18} {v}", w, hang=21) for k, v in r.advisor]
        out.append("")
    for k, v in r.home:
        out.append(_wrap(f"{k + ':':<12} {v}", w, hang=13))
    out.append("")
    for k, v in r.headline:
        out.append(f"{v:>10}  {k}")
    for what, value, means in r.against:
        out.append(_wrap(f"{what}: {value} ({means})", w, hang=2))
    for text in r.emergencies:
        out += ["", "EMERGENCY", _wrap(text, w)]
    if r.status != "ok":
        out += ["", "NO ROADMAP FITS THESE INPUTS", _wrap(r.infeasibility, w)]
    for warn in r.warnings:
        out.append(_wrap(f"note: {warn}", w))
    sections: list[tuple[str, str]] = [
        ("The roadmap", timeline_text(r.timeline)),
        ("Steps", _text_table(r.steps) + "\n" + r.money_note),
        *((("Bills and money out, year by year", _text_table(chart_table(r))),) if r.chart else ()),
        *((("Fuel still bought, and when it stops", _text_table(r.fossil)),) if r.fossil else ()),
        ("Year by year", _text_table(r.years)),
        *_risk_text(r, w),
        *((("Options side by side", comparison_text(r.comparison).split("\n", 2)[2]),) if r.comparison else ()),
        ("Energy and emissions, before and after", _text_table(r.energy)),
        ("Electrical capacity", _text_table(r.capacity) + "".join(f"\n  - {n}" for n in r.capacity_notes)),
        ("Key assumptions", "\n".join(_wrap(f"{k + ':':<28} {v}", w, hang=29) for k, v in r.assumptions)
         + ("\n\n" + _text_table(r.programs) if r.programs.rows else "")),
        ("Safety", "\n".join(_wrap(f"{t}: {text}", w, hang=2) for t, text in r.cautions)),
        *((("Words used in this summary", "\n".join(
            _wrap(f"{term} ({plain}): {text}", w, hang=2) for term, plain, text in r.glossary)),)
          if r.glossary else ()),
    ]
    for title, body in sections:
        out += ["", title, "-" * len(title), body]
    f = r.footer
    out += ["", "-" * w, _wrap(footer_line(f), w)]
    if f.prepared_for:
        out.append(_wrap(f"prepared for {f.prepared_for}", w))
    if f.notes:
        out.append(_wrap(f"notes: {f.notes}", w))
    return "\n".join(out) + "\n"


# ----------------------------------------------------------------------------- Markdown

_MD_SPECIAL = re.compile(r"([\\`*_{}\[\]#|~])")


def md(text: str) -> str:
    """Escape user text for Markdown: entities for <, >, &; backslashes for punctuation."""
    text = text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
    return _MD_SPECIAL.sub(r"\\\1", text)


def _md_table(t: Table) -> str:
    head = "| " + " | ".join(md(h) for h in t.headers) + " |"
    rule = "|" + "|".join("---:" if a == "r" else ":---" for a in t.align) + "|"
    rows = ["| " + " | ".join(md(c) for c in row) + " |" for row in t.rows]
    if t.total:
        rows.append("| " + " | ".join(f"**{md(c)}**" if c else "" for c in t.total) + " |")
    note = f"\n\n_{md(t.note)}_" if t.note else ""
    return "\n".join([head, rule, *rows]) + note


def render_markdown(r: Report) -> str:
    out: list[str] = [f"# {md(r.title)}", ""]
    if r.subtitle:
        out += [md(r.subtitle), ""]
    if r.advisor:
        out += ["**Prepared by**", ""] + [f"- {md(k)}: {md(v)}" for k, v in r.advisor] + [""]
    out += [f"- **{md(k)}:** {md(v)}" for k, v in r.home]
    out += ["", " | ".join(f"**{md(v)}** {md(k)}" for k, v in r.headline), ""]
    out += [f"- **{md(what)}: {md(value)}** ({md(means)})" for what, value, means in r.against]
    out += [""] if r.against else []
    out += [f"> **Emergency.** {md(text)}" + "\n" for text in r.emergencies]
    if r.status != "ok":
        out += [f"> **No roadmap fits these inputs.** {md(r.infeasibility)}", ""]
    out += [f"> {md(w)}" for w in r.warnings]
    out += ["", "## The roadmap", "", "```text", timeline_text(r.timeline).replace("```", "'''"), "```", ""]
    out += ["## Steps", "", _md_table(r.steps), "", f"_{md(r.money_note)}_", ""]
    if r.chart is not None:
        out += ["## Bills and money out, year by year", "", _md_table(chart_table(r)), ""]
    if r.fossil is not None:
        out += ["## Fuel still bought, and when it stops", "", _md_table(r.fossil), ""]
    out += ["## Year by year", "", _md_table(r.years), ""]
    if r.risk is not None:
        out += ["## Price risk", ""] + [md(line) + "\n" for line in r.risk.lines]
        out += [_md_table(r.risk.totals), "", _md_table(r.risk.shocks), "", _md_table(r.risk.yearly), ""]
    if r.sensitivity is not None:
        v = r.sensitivity
        out += ["## What moves the result", ""] + [md(line) + "\n" for line in v.lines]
        out += ["```text", tornado_text(v.base_usd, v.bars).replace("```", "'''"), "```", "", _md_table(v.table), ""]
    if r.comparison is not None:
        out += [comparison_markdown(r.comparison)]
    out += ["## Energy and emissions, before and after", "", _md_table(r.energy), ""]
    out += ["## Electrical capacity", "", _md_table(r.capacity), ""]
    out += [f"- {md(n)}" for n in r.capacity_notes]
    out += ["", "## Key assumptions", ""] + [f"- **{md(k)}:** {md(v)}" for k, v in r.assumptions]
    if r.programs.rows:
        out += ["", _md_table(r.programs)]
    out += ["", "## Safety", ""] + [f"- **{md(t)}.** {md(text)}" for t, text in r.cautions]
    if r.glossary:
        out += ["", "## Words used in this summary", ""] + [
            f"- **{md(term)}** ({md(plain)}): {md(text)}" for term, plain, text in r.glossary]
    out += ["", "---", "", md(footer_line(r.footer))]
    if r.footer.prepared_for:
        out += ["", md(f"Prepared for {r.footer.prepared_for}")]
    if r.footer.notes:
        out += ["", md(f"Notes: {r.footer.notes}")]
    return "\n".join(out) + "\n"


# ----------------------------------------------------------------------------- options side by side


def _cell_table(t: Table, width: int = 28) -> str:
    rows = [[short(c, width) if i else short(c, 40) for i, c in enumerate(row)] for row in t.rows]
    out = text_table(list(t.headers), rows, t.align.replace("n", "l"))
    return out + ("\n" + _wrap(t.note, 100) if t.note else "")


def comparison_text(c: Comparison) -> str:
    """Options side by side as plain text."""
    steps = []
    for row in c.steps.rows:
        steps.append(row[0])
        for name, cell in zip(c.names, row[1:], strict=True):
            steps.append(_wrap(f"  {name}: {cell or '-'}", 100, hang=4))
    parts = ["Options side by side", "--------------------", _cell_table(c.headline), "",
             "Steps by year", "-------------", *steps]
    if c.ranges:
        parts += ["", "Total cost across the price paths", "---------------------------------", _cell_table(c.risk)]
    parts += [_wrap(f"note: {n}", 100) for n in c.notes]
    return "\n".join(parts) + "\n"


def comparison_markdown(c: Comparison) -> str:
    """Options side by side as Markdown."""
    parts = ["## Options side by side", "", _md_table(c.headline), "", "### Steps by year", "", _md_table(c.steps)]
    if c.ranges:
        parts += ["", "### Total cost across the price paths", "", _md_table(c.risk)]
    parts += [f"\n> {md(n)}" for n in c.notes]
    return "\n".join(parts) + "\n"
