"""The portfolio's summary page: one self-contained HTML file in the printout's style.

The same stylesheet, security policy (no script, no fetches) and escaping as the single-home
printout (:mod:`homeplan.report.html`), with bar charts by year (:mod:`homeplan.report.bars`):
what the homes spend and the incentives they draw, the money that leaves them for fossil fuel
and their emissions before and after, and the peak load they add to the grid (diversified, the
method named on the page). Tables follow: year by year, incentive programs (caps reached,
budgets used up), work by kind, and the homes that could not be planned.
"""

from __future__ import annotations

from pathlib import Path

from homeplan import __version__, catalog
from homeplan.electrical.tables import practice
from homeplan.plan.save import write_atomic
from homeplan.portfolio.rollup import Rollup
from homeplan.report.bars import Series, bars_by_year_svg
from homeplan.report.html import CSP, CSS, e, table_html
from homeplan.report.svg import COLOURS
from homeplan.report.table import usd
from homeplan.report.view import Table

__all__ = ["render_page", "write_page"]

EXTRA_CSS = """
svg.chart { width: 100%; height: auto; display: block; margin: 1mm 0 0; }
.charts { display: grid; grid-template-columns: 1fr; gap: 2mm; }
.chart-box { break-inside: avoid; page-break-inside: avoid; }
.chart-box h3 { margin-top: 2mm; }
"""

BEFORE = "#9a9a9a"
AFTER = COLOURS["appliances"]
MONEY_OUT = COLOURS["electrical"]
MONEY_IN = COLOURS["solar"]
WINTER = COLOURS["electrical"]
SUMMER = COLOURS["solar"]

WORK_LABELS = {
    "heat_pump": "Heat pumps", "heat_pump_water_heater": "Heat pump water heaters",
    "induction_range": "Induction ranges", "heat_pump_dryer": "Heat pump dryers",
    "ev_charger": "EV chargers", "ev": "Electric vehicles", "solar": "Solar arrays",
    "battery": "Batteries", "envelope": "Air sealing and insulation", "roof": "Roofs",
    "panel_upgrade": "Panel upgrades", "service_upgrade": "Service upgrades",
    "load_management": "Load management", "close_gas": "Gas services closed",
    "remove_propane_tank": "Propane tanks removed", "remove_oil_tank": "Oil tanks removed",
    "replacement": "Like-for-like replacements",
}


def _k(v: float) -> str:
    return f"{v / 1000:,.1f}" if v else "-"


def _kw(v: float) -> str:
    return f"{v:,.0f} kW"


def _t(v: float) -> str:
    return f"{v:,.0f} t"


def _legend(items: list[tuple[str, str]]) -> str:
    return '<ul class="legend">' + "".join(
        f'<li><span class="sw" style="background:{c}"></span>{e(label)}</li>' for c, label in items) + "</ul>"


def _chart(title: str, years: list[int], series: list[Series], fmt, note: str = "") -> str:
    return ('<div class="chart-box"><h3>' + e(title) + "</h3>"
            + bars_by_year_svg(title, years, series, fmt)
            + _legend([(s.colour, s.label) for s in series])
            + (f'<p class="note">{e(note)}</p>' if note else "") + "</div>")


def render_page(r: Rollup, title: str = "", printed: str = "", complete: bool = True,
                problems: list[tuple[str, str, str]] | None = None) -> str:
    """The page as one string. ``problems``: (home id, status, message) of homes not planned."""
    ys = r.years
    years = [y["year"] for y in ys]
    c = r.counts
    last = ys[-1] if ys else None
    source = Path(str(r.meta.get("input", "portfolio")))
    name = title or (f"{source.parent.name}/{source.name}" if source.suffix else source.name)
    parts = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{e(CSP)}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        '<meta name="referrer" content="no-referrer">',
        f'<meta name="generator" content="homeplan {e(__version__)}">',
        f"<title>{e('Portfolio: ' + name)}</title>",
        f"<style>{CSS.replace('plan HASH', 'portfolio')}{EXTRA_CSS}</style></head><body>",
        '<header class="doc"><p class="kicker">Electrification of many homes</p>',
        f"<h1>{e(name)}</h1>",
        f'<p class="sub">{c["ok"]} of {c["total"]} homes planned'
        + (f", {years[0]}-{years[-1]}" if years else "")
        + ("" if complete else f" - the run is not complete ({c['total'] - c['done']} homes not yet planned)")
        + ". Every home is planned on its own; the figures below add them up. Planning estimates.</p>",
        "</header>",
    ]
    figures = []
    if ys:
        figures = [
            ("homes with a roadmap", f"{c['ok']:,}"),
            ("spent on the work, all years", usd(sum(y["spend_usd"] for y in ys))),
            ("incentives drawn, all years", usd(sum(y["incentives_usd"] for y in ys))),
            (f"fossil fuel money kept in {last['year']}", usd(last["fossil_avoided_usd"])),
            (f"emissions avoided in {last['year']}", _t(last["emissions_avoided_t"])),
            ("homes fully electric by the end", f"{r.fully_electric:,}"),
            (f"added winter peak by {last['year']} (diversified)", _kw(last["added_winter_kw_diversified"])),
            (f"added summer peak by {last['year']} (diversified)", _kw(last["added_summer_kw_diversified"])),
            ("service upgrades, all years", f"{sum(y['service_upgrades'] for y in ys):,}"),
            (f"homes near their service limit in {last['year']}", f"{last['homes_near_limit']:,}"),
        ]
    parts.append('<section class="glance keep"><h2>At a glance</h2><ul class="figures">' + "".join(
        f'<li><span class="v">{e(v)}</span><span class="k">{e(k)}</span></li>' for k, v in figures)
        + "</ul>")
    parts.append(f'<p class="note">{c["ok"]} planned, {c["infeasible"]} without a roadmap that fits '
                 f'their budget and rules, {c["error"]} with bad input, {c["failed"]} the planner '
                 "could not plan; sums are over the planned homes.</p></section>")
    if ys:
        parts.append('<section class="charts"><h2>Year by year</h2>')
        parts.append(_chart("Spending on the work, and incentives drawn", years, [
            Series("spent", MONEY_OUT, tuple(y["spend_usd"] for y in ys)),
            Series("incentives", MONEY_IN, tuple(y["incentives_usd"] for y in ys))], usd))
        parts.append(_chart("Money leaving the homes for fossil fuel", years, [
            Series("doing nothing", BEFORE, tuple(y["fossil_before_usd"] for y in ys)),
            Series("with the roadmaps", AFTER, tuple(y["fossil_after_usd"] for y in ys))], usd,
            "Gas, propane, oil, gasoline and diesel bills with their fixed charges."))
        parts.append(_chart("Emissions (tonnes CO2e)", years, [
            Series("doing nothing", BEFORE, tuple(y["emissions_before_t"] for y in ys)),
            Series("with the roadmaps", AFTER, tuple(y["emissions_after_t"] for y in ys))], _t))
        parts.append(_chart("Peak load added to the grid (diversified)", years, [
            Series("winter", WINTER, tuple(y["added_winter_kw_diversified"] for y in ys)),
            Series("summer", SUMMER, tuple(y["added_summer_kw_diversified"] for y in ys))], _kw,
            f"Method: {r.method}; c_inf {r.coincidence.winter:g} in winter and "
            f"{r.coincidence.summer:g} in summer ({r.coincidence.source})."))
        parts.append("</section>")
        money = tuple((str(y["year"]), f"{y['homes']:,}", usd(y["spend_usd"]), usd(y["incentives_usd"]),
                       usd(y["bill_savings_usd"]), usd(y["fossil_before_usd"]), usd(y["fossil_after_usd"]))
                      for y in ys)
        grid = tuple((str(y["year"]), _t(y["emissions_before_t"]), _t(y["emissions_after_t"]),
                      f"{_kw(y['peak_demand_winter_kw_sum'])} / {_kw(y['peak_demand_summer_kw_sum'])}",
                      _kw(y["added_winter_kw_diversified"]),
                      _kw(y["added_summer_kw_diversified"]), f"{y['service_upgrades']:,}",
                      f"{y['homes_near_limit']:,} / {y['homes_over_limit']:,}") for y in ys)
        parts.append('<section class="years"><h2>The numbers</h2><h3>Money</h3>' + table_html(Table(
            ("year", "homes", "spent on the work", "incentives drawn", "bill savings",
             "fossil fuel $, doing nothing", "fossil fuel $, roadmaps"), money, "nrrrrrr",
            note="Incentives by the year the money arrives; bill savings against doing nothing."),
            "years") + "<h3>Emissions and the grid</h3>" + table_html(Table(
            ("year", "CO2e, doing nothing", "CO2e, roadmaps", "peak demand winter / summer, sum of homes",
             "added winter peak, diversified", "added summer peak, diversified", "service upgrades",
             "homes near / over the service limit"), grid, "nrrrrrrr",
            note="Peak demand: each home's peak as a meter would show it on the winter and the summer "
                 "design day, added up (not diversified). Near the limit: the NEC 220.83 calculated "
                 f"load fits but is above {practice('near_limit_pct'):g} % of the service rating; over: "
                 "it does not fit. Diversified peaks: see the chart."),
            "years") + "</section>")
    if r.program_totals:
        rows = tuple((t.name, usd(t.amount_usd), f"{t.homes:,}", f"{t.homes_at_cap:,}",
                      usd(t.budget_usd) if t.budget_usd is not None else "-",
                      str(t.exhausted_year) if t.exhausted_year else ("-" if t.budget_usd is None else "not used up"))
                     for t in r.program_totals)
        parts.append('<section class="programs"><h2>Incentive programs</h2>' + table_html(Table(
            ("program", "paid in all", "homes", "homes at their lifetime cap", "program budget",
             "budget used up in"), rows, "lrrrrr",
            note="Each home is planned as if its programs pay; a program whose budget is used up "
                 "would not pay the homes after that year (budgets as given to the command).")))
        paid_years = sorted({p["year"] for p in r.programs})
        by = {(p["program_id"], p["year"]): p["amount_usd"] for p in r.programs}
        rows = tuple((t.name, *(_k(by.get((t.program_id, y), 0.0)) for y in paid_years))
                     for t in r.program_totals if t.homes)
        if paid_years:
            parts.append("<h3>Paid by year (thousands of dollars)</h3>" + table_html(Table(
                ("program", *map(str, paid_years)), rows, "l" + "r" * len(paid_years),
                note="By the year the money reaches the homes.")))
        parts.append("</section>")
    if r.work:
        kinds: dict[str, list[float]] = {}
        for w in r.work:
            k = kinds.setdefault(w["kind"], [0, 0.0, 0.0])
            k[0] += w["steps"]
            k[1] += w["cost_usd"]
            k[2] += w["incentives_usd"]
        rows = tuple((WORK_LABELS.get(k, k.replace("_", " ")), f"{int(v[0]):,}", usd(v[1]), usd(v[2]))
                     for k, v in sorted(kinds.items(), key=lambda kv: -kv[1][1]))
        parts.append('<section class="work keep"><h2>Work to be done</h2>' + table_html(Table(
            ("kind of work", "jobs", "cost", "incentives"), rows, "lrrr",
            note="All years together; work.csv has them year by year.")) + "</section>")
    if problems:
        rows = tuple((h, {"infeasible": "no roadmap fits", "error": "bad input",
                          "failed": "planner error"}.get(s, s), m) for h, s, m in problems)
        parts.append('<section class="problems"><h2>Homes not planned</h2>' + table_html(Table(
            ("home", "why", "what to do"), rows, "nll",
            note="homes.csv lists every home with its status and message.")) + "</section>")
    cautions = catalog.cautions()
    parts.append('<section class="cautions"><h2>Safety</h2><ul class="cautions">'
                 f"<li><b>Planning estimates.</b> {e(cautions['planning'])}</li>"
                 f"<li><b>Electrical work.</b> {e(cautions['electrical'])}</li>"
                 f"<li><b>Gas lines.</b> {e(cautions['gas_line'])}</li></ul></section>")
    meta = r.meta
    parts.append('<footer class="keep"><p>'
                 f"Input <code>{e(meta.get('input', ''))}</code>"
                 + (f" with template <code>{e(meta.get('template'))}</code>" if meta.get("template") else "")
                 + f", fingerprint <code>{e(str(meta.get('fingerprint', ''))[:12])}</code>"
                 + (f" - printed {e(printed)}" if printed else "")
                 + f" with homeplan {e(__version__)}.</p>"
                 "<p>Demo communities and their programs are invented. All figures are planning "
                 "estimates; local codes, permits, utilities and licensed professionals have the "
                 "final word.</p></footer></body></html>")
    return "\n".join(parts) + "\n"


def write_page(r: Rollup, path: str | Path, complete: bool = True, printed: str = "",
               problems: list[tuple[str, str, str]] | None = None) -> Path:
    """Write the page atomically (no backup: it is made anew from the store)."""
    return write_atomic(path, render_page(r, printed=printed, complete=complete, problems=problems),
                        backup=False)
