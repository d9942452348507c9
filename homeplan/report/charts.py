"""Two more inline SVG charts for the printout: a band chart of yearly bills across price paths
and a tornado chart of the assumptions that move the NPV most.

Drawn by hand like the timeline (:mod:`homeplan.report.svg`), one self-contained element each;
every label goes through :func:`html.escape`.

References
----------
W3C, Scalable Vector Graphics (SVG) 1.1 (Second Edition), 2011: sections 8 (paths), 9 (basic
shapes) and 10 (text).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from html import escape

from homeplan.report.fmt import money_signed, short
from homeplan.report.risk import BandSeries, TornadoBar
from homeplan.report.table import usd

__all__ = ["band_chart_svg", "nice_ticks", "tornado_svg"]

WIDTH = 720
INK = "#1d2a33"
MUTED = "#5d6770"
GRID = "#d9dcdf"
SERIES_COLOURS = ("#2f7d79", "#b8621b", "#4f5f99", "#8c4f7e")  # teal, rust, slate, plum
LOW_COLOUR = "#b8621b"
HIGH_COLOUR = "#2f7d79"


def _e(text: str) -> str:
    return escape(text, quote=True)


def nice_ticks(lo: float, hi: float, count: int = 5) -> list[float]:
    """Round tick values covering [lo, hi] (steps of 1, 2 or 5 times a power of ten)."""
    if not math.isfinite(lo) or not math.isfinite(hi) or hi <= lo:
        return [lo]
    raw = (hi - lo) / max(count - 1, 1)
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 5, 10) if m * mag >= raw)
    ticks = [math.floor(lo / step) * step]
    while ticks[-1] < hi - 1e-9 * step:
        ticks.append(ticks[-1] + step)
    return ticks


def band_chart_svg(series: Sequence[BandSeries], title: str, unit_note: str = "") -> str:
    """Years across, dollars up: each series as a shaded P10-P90 band with its median line (the
    legend is the caller's: the colours are :data:`SERIES_COLOURS` in order)."""
    left, right, top, bottom = 64, 16, 14, 34
    height = 230
    years = series[0].years if series else ()
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {WIDTH} {height}" '
           f'role="img" aria-label="{_e(title)}" font-family="inherit" font-size="11">',
           f"<title>{_e(title)}</title>"]
    if not years:
        out.append("</svg>")
        return "\n".join(out)
    lo = min(min(s.p10) for s in series)
    hi = max(max(s.p90) for s in series)
    ticks = nice_ticks(min(lo, 0.0) if lo < 0 else lo * 0.9, hi * 1.02)
    y_lo, y_hi = ticks[0], ticks[-1]
    span_x = max(len(years) - 1, 1)

    def x(i: int) -> float:
        return left + (WIDTH - left - right) * i / span_x

    def y(v: float) -> float:
        return top + (height - top - bottom) * (1 - (v - y_lo) / max(y_hi - y_lo, 1e-9))

    for t in ticks:
        out.append(f'<line x1="{left}" y1="{y(t):.1f}" x2="{WIDTH - right}" y2="{y(t):.1f}" stroke="{GRID}"/>')
        out.append(f'<text x="{left - 6}" y="{y(t) + 4:.1f}" text-anchor="end" fill="{MUTED}">'
                   f"{_e(usd(t, 100))}</text>")
    every = max(1, math.ceil(len(years) / 12))
    for i, yr in enumerate(years):
        if i % every == 0 or i == len(years) - 1:
            out.append(f'<text x="{x(i):.1f}" y="{height - bottom + 16}" text-anchor="middle" '
                       f'fill="{MUTED}">{yr}</text>')
    for k, s in enumerate(series):
        colour = SERIES_COLOURS[k % len(SERIES_COLOURS)]
        upper = " ".join(f"{x(i):.1f},{y(v):.1f}" for i, v in enumerate(s.p90))
        lower = " ".join(f"{x(i):.1f},{y(v):.1f}" for i, v in reversed(list(enumerate(s.p10))))
        out.append(f'<g class="band"><title>{_e(s.label)}: P10 to P90 and median</title>')
        out.append(f'<polygon points="{upper} {lower}" fill="{colour}" fill-opacity="0.22" stroke="none"/>')
        mid = " ".join(f"{x(i):.1f},{y(v):.1f}" for i, v in enumerate(s.p50))
        out.append(f'<polyline points="{mid}" fill="none" stroke="{colour}" stroke-width="2"/>')
        out.append("</g>")
    if unit_note:
        out.append(f'<text x="{WIDTH - right}" y="{top + 9}" text-anchor="end" fill="{MUTED}">'
                   f"{_e(unit_note)}</text>")
    out.append("</svg>")
    return "\n".join(out)


def tornado_svg(bars: Sequence[TornadoBar], base_usd: float, title: str) -> str:
    """One row per assumption, widest swing on top: a bar from the NPV at the low setting and one
    to the NPV at the high setting, on both sides of the NPV as planned."""
    label_w, right, top, row_h = 200, 36, 22, 22
    height = top + row_h * max(len(bars), 1) + 26
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {WIDTH} {height}" '
           f'role="img" aria-label="{_e(title)}" font-family="inherit" font-size="11">',
           f"<title>{_e(title)}</title>"]
    if not bars:
        out.append("</svg>")
        return "\n".join(out)
    values = [base_usd] + [b.low_usd for b in bars] + [b.high_usd for b in bars]
    ticks = nice_ticks(min(values), max(values))
    v_lo, v_hi = ticks[0], ticks[-1]

    def x(v: float) -> float:
        return label_w + (WIDTH - label_w - right) * (v - v_lo) / max(v_hi - v_lo, 1e-9)

    for t in ticks:
        out.append(f'<line x1="{x(t):.1f}" y1="{top - 4}" x2="{x(t):.1f}" y2="{height - 22}" stroke="{GRID}"/>')
        out.append(f'<text x="{x(t):.1f}" y="{height - 8}" text-anchor="middle" fill="{MUTED}">'
                   f"{_e(money_signed(t))}</text>")
    out.append(f'<text x="{label_w}" y="{top - 8}" fill="{MUTED}">'
               f"NPV against doing nothing; line: as planned ({_e(money_signed(base_usd))})</text>")
    for i, b in enumerate(bars):
        y0 = top + i * row_h
        out.append(f'<g class="bar"><title>{_e(f"{b.label}: {b.low_label} {money_signed(b.low_usd)}; {b.high_label} {money_signed(b.high_usd)}")}</title>')
        out.append(f'<text x="{label_w - 8}" y="{y0 + 14}" text-anchor="end" fill="{INK}">{_e(short(b.label, 32))}</text>')
        for value, colour in ((b.low_usd, LOW_COLOUR), (b.high_usd, HIGH_COLOUR)):
            x0, x1 = sorted((x(base_usd), x(value)))
            out.append(f'<rect x="{x0:.1f}" y="{y0 + 4}" width="{max(x1 - x0, 1):.1f}" height="{row_h - 8}" '
                       f'fill="{colour}" fill-opacity="0.75"/>')
        out.append("</g>")
    out.append(f'<line x1="{x(base_usd):.1f}" y1="{top - 4}" x2="{x(base_usd):.1f}" y2="{height - 22}" '
               f'stroke="{INK}" stroke-width="1.5"/>')
    out.append("</svg>")
    return "\n".join(out)
