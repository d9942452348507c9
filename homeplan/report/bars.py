"""Bar charts by year as inline SVG, in the printout's palette (for pages that add up many homes).

Drawn by hand like the roadmap timeline (:mod:`homeplan.report.svg`): one self-contained
element, sized by its viewBox, every label escaped, each bar with a ``<title>`` giving its exact
value. Bars of several series stand side by side in each year; negative values hang below the
zero line.

References
----------
W3C, Scalable Vector Graphics (SVG) 1.1 (Second Edition), 2011: sections 9 (basic shapes),
10 (text) and 5.4 (the 'title' element).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from html import escape

from homeplan.report.svg import GRID, MUTED, TEXT

__all__ = ["Series", "bars_by_year_svg", "nice_step"]

WIDTH = 720
LEFT = 64
RIGHT = 8
TOP = 10
BOTTOM = 24
HEIGHT = 190


@dataclass(frozen=True)
class Series:
    """One row of values to draw (one per year), its name and colour."""

    label: str
    colour: str
    values: tuple[float, ...]


def nice_step(span: float, ticks: int = 4) -> float:
    """A round tick step (1, 2 or 5 times a power of ten) giving about ``ticks`` ticks over
    ``span``."""
    if span <= 0 or not math.isfinite(span):
        return 1.0
    raw = span / ticks
    power = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 5, 10):
        if m * power >= raw:
            return m * power
    return 10 * power


def bars_by_year_svg(title: str, years: Sequence[int], series: Sequence[Series],
                     fmt: Callable[[float], str]) -> str:
    """Grouped bars: one group per year, one bar per series. ``fmt`` writes axis and tooltip
    values (e.g. as dollars)."""
    n = max(len(years), 1)
    values = [v for s in series for v in s.values if math.isfinite(v)]
    hi = max([0.0, *values])
    lo = min([0.0, *values])
    step = nice_step(hi - lo)
    top = math.ceil(hi / step) * step if hi > 0 else 0.0
    bottom = math.floor(lo / step) * step if lo < 0 else 0.0
    if top == bottom:
        top = step
    plot_h = HEIGHT - TOP - BOTTOM
    col_w = (WIDTH - LEFT - RIGHT) / n

    def y_of(v: float) -> float:
        return TOP + (top - v) / (top - bottom) * plot_h

    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {WIDTH} {HEIGHT}" '
           f'role="img" font-family="inherit" font-size="11"><title>{escape(title, quote=True)}</title>']
    tick = bottom
    while tick <= top + step / 2:
        y = y_of(tick)
        out.append(f'<line x1="{LEFT}" y1="{y:.1f}" x2="{WIDTH - RIGHT}" y2="{y:.1f}" stroke="{GRID}"'
                   + (' stroke-width="1.5"' if tick == 0 else "") + "/>")
        out.append(f'<text x="{LEFT - 6}" y="{y + 4:.1f}" text-anchor="end" fill="{MUTED}">'
                   f"{escape(fmt(tick))}</text>")
        tick += step
    every = max(1, math.ceil(36 / col_w))
    k = max(len(series), 1)
    bar_w = max(min((col_w - 6) / k, 28.0), 1.0)
    zero = y_of(0.0)
    for i, year in enumerate(years):
        x0 = LEFT + i * col_w + (col_w - bar_w * k) / 2
        for j, s in enumerate(series):
            v = s.values[i] if i < len(s.values) else 0.0
            if not math.isfinite(v):
                continue
            y = y_of(max(v, 0.0))
            h = abs(y_of(v) - zero)
            out.append(f'<rect x="{x0 + j * bar_w:.1f}" y="{min(y, zero):.1f}" width="{bar_w - 1:.1f}" '
                       f'height="{max(h, 0.5):.1f}" fill="{s.colour}"><title>'
                       f"{escape(f'{year} {s.label}: {fmt(v)}', quote=True)}</title></rect>")
        if i % every == 0:
            out.append(f'<text x="{LEFT + (i + 0.5) * col_w:.1f}" y="{HEIGHT - 8}" text-anchor="middle" '
                       f'fill="{TEXT}">{year}</text>')
    out.append("</svg>")
    return "\n".join(out)
