"""The roadmap timeline as an inline SVG: years across, one row per step, milestones marked.

Drawn by hand (no plotting library) so the printout stays a single self-contained file. Every
piece of user text goes through :func:`html.escape` (SVG is XML: ``<``, ``&`` and quotes must be
escaped in text and attributes alike). Long labels are shortened on the drawing; the full text
is kept in a ``<title>`` (shown as a tooltip) and in the table of steps.

References
----------
W3C, Scalable Vector Graphics (SVG) 1.1 (Second Edition), 2011: sections 9 (basic shapes),
10 (text) and 5.4 (the 'title' element).
"""

from __future__ import annotations

import math
from html import escape

from homeplan.report.fmt import money_short, short
from homeplan.report.view import GROUP_LABELS, Series, Timeline, YearChart

__all__ = ["PATH_COLOURS", "chart_svg", "legend_items", "timeline_svg"]

# One colour per group of work; a dark ink for milestones; greys for the grid. Our own palette.
COLOURS: dict[str, str] = {
    "appliances": "#2f7d79",   # deep teal
    "electrical": "#4f5f99",   # slate blue
    "solar": "#c28a22",        # ochre
    "vehicles": "#8c4f7e",     # plum
    "building": "#7b7566",     # warm grey
    "other": "#9a9a9a",
}
MILESTONE_INK = "#1d2a33"
GRID = "#d9dcdf"
TEXT = "#1d2a33"
MUTED = "#5d6770"

WIDTH = 720
LABEL_W = 230
ROW_H = 24
AXIS_H = 26
PAD = 8


def _e(text: str) -> str:
    return escape(text, quote=True)


def timeline_svg(t: Timeline, title: str = "Roadmap timeline") -> str:
    """An SVG element (no XML prolog) sized by viewBox so it scales to the page width."""
    years = list(range(t.first_year, t.last_year + 1))
    n = max(len(years), 1)
    col_w = (WIDTH - LABEL_W - PAD) / n
    bars = sorted(t.bars, key=lambda b: b.year)
    marks = sorted(t.marks, key=lambda m: m.year)
    top = AXIS_H
    body_h = max(len(bars), 1) * ROW_H
    mark_top = top + body_h + 10
    height = mark_top + len(marks) * 20 + PAD

    def x_of(year: int) -> float:
        return LABEL_W + (year - t.first_year) * col_w

    out: list[str] = [
        f'<svg xmlns="http://www.w3.org/2000/svg" class="timeline" viewBox="0 0 {WIDTH} {height:.0f}" '
        f'role="img" aria-labelledby="tl-title" font-family="inherit" font-size="12">',
        f'<title id="tl-title">{_e(title)}</title>',
    ]
    # year columns and labels (every n-th year when the columns are too narrow for "2031")
    every = max(1, math.ceil(40 / col_w))
    for i, y in enumerate(years):
        x = x_of(y)
        if i % 2 == 0:
            out.append(f'<rect x="{x:.1f}" y="{top}" width="{col_w:.1f}" height="{body_h + 4}" '
                       f'fill="#f3f4f5"/>')
        if i % every == 0:
            out.append(f'<text x="{x + col_w / 2:.1f}" y="{AXIS_H - 9}" text-anchor="middle" '
                       f'fill="{MUTED}">{y}</text>')
    out.append(f'<line x1="{LABEL_W}" y1="{top}" x2="{WIDTH - PAD}" y2="{top}" stroke="{GRID}"/>')
    if not bars:
        out.append(f'<text x="{LABEL_W + 6}" y="{top + 16}" fill="{MUTED}">No steps in this roadmap.</text>')
    for row, b in enumerate(bars):
        y0 = top + row * ROW_H
        x = x_of(b.year)
        name = b.label + (f" ({b.detail})" if b.detail else "")
        colour = COLOURS.get(b.group, COLOURS["other"])
        out.append('<g class="step">')
        out.append(f"<title>{_e(f'{b.year}: {name}')}</title>")
        out.append(f'<text x="{LABEL_W - 8}" y="{y0 + 16}" text-anchor="end" fill="{TEXT}">'
                   f"{_e(short(b.label, 36))}</text>")
        out.append(f'<rect x="{x + 2:.1f}" y="{y0 + 5}" width="{max(col_w - 4, 4):.1f}" height="{ROW_H - 10}" '
                   f'rx="3" fill="{colour}"/>')
        out.append("</g>")
    # milestones: a dashed line through the rows at the end of the year, a diamond and a label
    for i, m in enumerate(marks):
        cx = x_of(m.year) + col_w / 2
        cy = mark_top + i * 20 + 8
        out.append('<g class="milestone">')
        out.append(f"<title>{_e(f'{m.year}: {m.label}')}</title>")
        out.append(f'<line x1="{cx:.1f}" y1="{top}" x2="{cx:.1f}" y2="{cy:.1f}" stroke="{MILESTONE_INK}" '
                   f'stroke-width="1" stroke-dasharray="3 3"/>')
        out.append(f'<path d="M{cx:.1f} {cy - 6:.1f} l6 6 l-6 6 l-6 -6 z" fill="{MILESTONE_INK}"/>')
        right = cx < (LABEL_W + WIDTH) / 2 + 60
        tx = cx + 10 if right else cx - 10
        anchor = "start" if right else "end"
        out.append(f'<text x="{tx:.1f}" y="{cy + 4:.1f}" text-anchor="{anchor}" fill="{TEXT}">'
                   f"{_e(short(f'{m.year}: {m.label}', 48))}</text>")
        out.append("</g>")
    out.append("</svg>")
    return "\n".join(out)


def legend_items(t: Timeline) -> list[tuple[str, str]]:
    """(colour, meaning) for the groups drawn, then the milestone marker."""
    items = [(COLOURS[g], GROUP_LABELS[g]) for g in t.groups]
    if t.marks:
        items.append((MILESTONE_INK, "Milestone"))
    return items


PATH_COLOURS: dict[str, str] = {"plan": "#2f7d79", "like_for_like": "#b8621b"}
"""The plan in the timeline's teal; like for like in the attention ochre (with a dashed line)."""


def _nice_top(value: float) -> float:
    """A round axis top at or above ``value``: 1, 2, 2.5 or 5 times a power of ten."""
    if value <= 0:
        return 1.0
    power = 10 ** math.floor(math.log10(value))
    return next(m * power for m in (1, 2, 2.5, 5, 10) if m * power >= value)


def _panel(series: tuple[Series, ...], years: tuple[int, ...], title: str, top_y: float,
           bars: bool) -> list[str]:
    """One panel: a title, a value axis with three grid lines, bars or lines per series."""
    left, right, height = 64, WIDTH - PAD, 150
    base = top_y + 22 + height
    top = _nice_top(max((v for sr in series for v in sr.values), default=0.0))
    n = max(len(years), 1)
    col = (right - left) / n
    out = [f'<text x="{left}" y="{top_y + 12:.0f}" font-weight="600" fill="{TEXT}">{_e(title)}</text>']
    for k in range(3):
        v = top * k / 2
        y = base - height * k / 2
        out.append(f'<line x1="{left}" y1="{y:.1f}" x2="{right}" y2="{y:.1f}" stroke="{GRID}"/>')
        out.append(f'<text x="{left - 6}" y="{y + 4:.1f}" text-anchor="end" fill="{MUTED}">'
                   f"${_e(money_short(v))}</text>")
    every = max(1, math.ceil(40 / col))
    for i, year in enumerate(years):
        if i % every == 0:
            out.append(f'<text x="{left + col * (i + 0.5):.1f}" y="{base + 16:.1f}" '
                       f'text-anchor="middle" fill="{MUTED}">{year}</text>')

    def y_of(v: float) -> float:
        return base - height * max(v, 0.0) / top

    if bars:
        width = col * 0.8 / max(len(series), 1)
        for j, sr in enumerate(series):
            colour = PATH_COLOURS.get(sr.kind, COLOURS["other"])
            for i, v in enumerate(sr.values):
                x = left + col * (i + 0.1) + j * width
                y = y_of(v)
                out.append(f'<rect x="{x:.1f}" y="{y:.1f}" width="{max(width - 1, 1):.1f}" '
                           f'height="{base - y:.1f}" fill="{colour}">\n'
                           f"<title>{_e(f'{sr.name}, {years[i]}: ${money_short(v)}')}</title>\n</rect>")
    else:
        for sr in series:
            colour = PATH_COLOURS.get(sr.kind, COLOURS["other"])
            dash = ' stroke-dasharray="6 4"' if sr.kind != "plan" else ""
            points = " ".join(f"{left + col * (i + 0.5):.1f},{y_of(v):.1f}"
                              for i, v in enumerate(sr.values))
            out.append(f'<polyline points="{points}" fill="none" stroke="{colour}" stroke-width="2.5"'
                       f"{dash}>\n<title>{_e(sr.name)}</title>\n</polyline>")
            for i, v in enumerate(sr.values):
                out.append(f'<circle cx="{left + col * (i + 0.5):.1f}" cy="{y_of(v):.1f}" r="2.5" '
                           f'fill="{colour}">\n<title>{_e(f"{sr.name}, {years[i]}: ${money_short(v)}")}'
                           "</title>\n</circle>")
    return out


def chart_svg(chart: YearChart, title: str = "Energy bills and money out, year by year") -> str:
    """Two panels, one above the other: energy bills a year (lines) and all the money out a year
    (projects after incentives, loan payments and bills; bars), for the plan and like for like."""
    height = 2 * (22 + 150 + 30) + 8
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {WIDTH} {height}" '
           f'role="img" aria-labelledby="ch-title" font-family="inherit" font-size="12">',
           f'<title id="ch-title">{_e(title)}</title>']
    out += _panel(chart.bills, chart.years, "Energy bills a year", 0, bars=False)
    out += _panel(chart.cash_out, chart.years,
                  "Money out a year: projects after incentives, loan payments and bills", 202, bars=True)
    out.append("</svg>")
    return "\n".join(out)
