"""Options side by side: headline figures, the steps by year and the price-risk bands of several
planned options (plan files, or the named options inside one plan file).

Presentation only: every figure is read from each option's :class:`~homeplan.result.PlanResult`.
The renderers (:mod:`homeplan.report.text`, :mod:`homeplan.report.html`) lay it out as text,
Markdown and an HTML section or page; the JSON form is :func:`comparison_json`.

References
----------
None: presentation only. The figures' sources are cited by the engines that made them.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from html import escape
from typing import Any

from homeplan.plan.text import clean
from homeplan.report.charts import INK, MUTED, SERIES_COLOURS, nice_ticks
from homeplan.report.fmt import Table, money, money_signed, short, tonnes
from homeplan.report.table import usd

__all__ = [
    "Comparison",
    "OptionRange",
    "build_comparison",
    "comparison_json",
    "range_chart_svg",
]


@dataclass(frozen=True)
class OptionRange:
    """One option's total cost across the price paths (USD, present value)."""

    name: str
    p10: float
    p50: float
    p90: float


@dataclass(frozen=True)
class Comparison:
    """Several options laid side by side (already in words)."""

    names: tuple[str, ...]
    headline: Table
    steps: Table
    risk: Table
    ranges: tuple[OptionRange, ...]
    notes: tuple[str, ...] = ()


def _year_of(road: Any, kind: str) -> str:
    return next((str(m.year) for m in road.milestones if m.kind == kind), "not within the horizon")


def build_comparison(options: Sequence[tuple[str, Any]]) -> Comparison:
    """The comparison of ``(name, PlanResult)`` pairs, in the order given."""
    names = tuple(clean(n) for n, _ in options)
    rows: list[tuple[str, ...]] = []

    def add(label: str, fn) -> None:  # noqa: ANN001 - a small formatter per option
        rows.append((label, *(fn(r) if r.roadmap.status == "ok" else "no roadmap" for _, r in options)))

    add("Net present value vs doing nothing", lambda r: money_signed(r.roadmap.npv_usd))
    add("You pay (after incentives)", lambda r: money(sum(s.net_cost_usd for s in r.roadmap.steps)))
    add("Incentives", lambda r: money(sum(s.incentives_usd for s in r.roadmap.steps)))
    add("Steps", lambda r: str(len(r.roadmap.steps)))
    add("Fully electric", lambda r: _year_of(r.roadmap, "fully_electric"))
    add("Energy bills in the last year", lambda r: money(r.roadmap.years[-1].total_bills_usd))
    add("CO2e a year at the end", lambda r: tonnes(r.roadmap.years[-1].emissions_kg))

    def risk(r: Any, fmt) -> str:  # noqa: ANN001
        return fmt(r.roadmap.price_risk) if r.roadmap.price_risk is not None else "n/a"

    add("Total cost, median of the price paths", lambda r: risk(r, lambda k: money(k.plan_cost_usd.p50)))
    add("Total cost, P10 to P90", lambda r: risk(r, lambda k: f"{money(k.plan_cost_usd.p10)} to "
                                                   f"{money(k.plan_cost_usd.p90)}"))
    add("Costs less than like-for-like", lambda r: risk(r, lambda k: f"{k.plan_beats_like_for_like_pct:.0f} % of paths"))
    add("Yearly bill swing after the plan", lambda r: risk(r, lambda k: money(k.bill_shock_after_usd)))
    headline = Table(("", *names), tuple(rows), "l" + "r" * len(names), None,
                     "Total cost: present value of projects after incentives, loan payments, energy bills "
                     "and expected repairs, less the value left at the end, across sampled price paths.")
    years = sorted({y.year for _, r in options for y in r.roadmap.years})
    step_rows = []
    for year in years:
        cells = []
        for _, r in options:
            labels = [clean(s.label) for s in r.roadmap.steps if s.year == year]
            cells.append("; ".join(labels) if labels else "")
        if any(cells):
            step_rows.append((str(year), *cells))
    steps = Table(("Year", *names), tuple(step_rows), "n" + "l" * len(names), None,
                  "The steps of each option in the year they are done.")
    ranges = tuple(OptionRange(clean(n), r.roadmap.price_risk.plan_cost_usd.p10, r.roadmap.price_risk.plan_cost_usd.p50,
                               r.roadmap.price_risk.plan_cost_usd.p90)
                   for n, r in options if r.roadmap.status == "ok" and r.roadmap.price_risk is not None)
    risk_rows = tuple((rg.name, money(rg.p10), money(rg.p50), money(rg.p90)) for rg in ranges)
    risk_table = Table(("Option", "P10", "Median", "P90"), risk_rows, "lrrr", None,
                       "Total cost over the horizon across the price paths, today's dollars.")
    notes = tuple(f"{clean(n)}: {clean(r.roadmap.infeasibility) or 'no roadmap fits'}"
                  for n, r in options if r.roadmap.status != "ok")
    return Comparison(names, headline, steps, risk_table, ranges, notes)


def comparison_json(options: Sequence[tuple[str, str, Any]]) -> dict[str, Any]:
    """``(name, plan file, PlanResult)`` triples as JSON-safe data: each option's roadmap
    (docs/roadmap-json.md) under its name."""
    return {"options": [{"name": n, "file": f, "roadmap": r.roadmap.to_dict(),
                         "warnings": list(r.warnings)} for n, f, r in options]}


# ----------------------------------------------------------------------------- chart


def range_chart_svg(ranges: Sequence[OptionRange], title: str) -> str:
    """One row per option: its total cost from P10 to P90 as a bar, the median as a mark."""
    width, label_w, right, row_h, top = 720, 200, 36, 24, 10
    height = top + row_h * max(len(ranges), 1) + 24
    e = escape
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" class="chart" viewBox="0 0 {width} {height}" '
           f'role="img" aria-label="{e(title)}" font-family="inherit" font-size="11">', f"<title>{e(title)}</title>"]
    if ranges:
        ticks = nice_ticks(min(r.p10 for r in ranges), max(r.p90 for r in ranges))

        def x(v: float) -> float:
            return label_w + (width - label_w - right) * (v - ticks[0]) / max(ticks[-1] - ticks[0], 1e-9)

        for t in ticks:
            out.append(f'<line x1="{x(t):.1f}" y1="{top}" x2="{x(t):.1f}" y2="{height - 20}" stroke="#d9dcdf"/>')
            out.append(f'<text x="{x(t):.1f}" y="{height - 6}" text-anchor="middle" fill="{MUTED}">'
                       f"{e(usd(t, 100))}</text>")
        for i, r in enumerate(ranges):
            y0 = top + i * row_h
            colour = SERIES_COLOURS[i % len(SERIES_COLOURS)]
            out.append(f'<g><title>{e(f"{r.name}: {money(r.p10)} to {money(r.p90)}, median {money(r.p50)}")}</title>')
            out.append(f'<text x="{label_w - 8}" y="{y0 + 15}" text-anchor="end" fill="{INK}">{e(short(r.name, 32))}</text>')
            out.append(f'<rect x="{x(r.p10):.1f}" y="{y0 + 5}" width="{max(x(r.p90) - x(r.p10), 1):.1f}" '
                       f'height="{row_h - 10}" fill="{colour}" fill-opacity="0.35"/>')
            out.append(f'<rect x="{x(r.p50) - 1.5:.1f}" y="{y0 + 3}" width="3" height="{row_h - 6}" fill="{colour}"/>')
            out.append("</g>")
    out.append("</svg>")
    return "\n".join(out)
