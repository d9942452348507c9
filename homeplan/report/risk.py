"""Price risk and sensitivity in words, small tables and chart series, for every output.

Reads ``roadmap.price_risk`` and ``result.sensitivity``; computes nothing but percentages of
figures already in the result. The renderers (text, Markdown, HTML, the app) lay these out.

References
----------
None: presentation only. The figures come from :mod:`homeplan.planner.risk` and
:mod:`homeplan.planner.sensitivity`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from homeplan.plan.text import clean
from homeplan.report.fmt import Table, money, money_signed

__all__ = [
    "BandSeries",
    "RiskView",
    "SensitivityView",
    "TornadoBar",
    "risk_lines",
    "risk_view",
    "sensitivity_view",
]

FUEL_WORDS = {"electricity": "Electricity", "gas": "Gas", "propane": "Propane", "oil": "Heating oil",
              "gasoline": "Gasoline", "diesel": "Diesel"}


@dataclass(frozen=True)
class BandSeries:
    """One line of a band chart: P10, P50 and P90 by year (USD)."""

    label: str
    years: tuple[int, ...]
    p10: tuple[float, ...]
    p50: tuple[float, ...]
    p90: tuple[float, ...]


@dataclass(frozen=True)
class RiskView:
    """The price-risk part of a printout or screen."""

    lines: tuple[str, ...]
    totals: Table
    shocks: Table
    yearly: Table
    series: tuple[BandSeries, ...]


def _cents(usd_per_kwh: float) -> str:
    return f"{usd_per_kwh * 100:.1f} c"


def risk_lines(road: Any) -> tuple[str, ...]:
    """The roadmap's price risk in a few sentences (empty when it was not computed)."""
    r = getattr(road, "price_risk", None)
    if r is None:
        return ()
    centre = ("centred on this plan's escalation" if r.drift == "plan"
              else "following each price's historic trend")
    p, lfl, dn = r.plan_cost_usd, r.like_for_like_cost_usd, r.do_nothing_cost_usd
    out = [
        f"Across {r.paths:,} sampled energy price paths (yearly swings and correlations of US prices "
        f"{clean(r.history_years)}, {centre}), the plan's total cost over {len(r.years)} years is "
        f"{money(p.p50)} in today's dollars ({money(p.p10)} to {money(p.p90)}, P10 to P90); replacing "
        f"like-for-like {money(lfl.p50)} ({money(lfl.p10)} to {money(lfl.p90)}); doing nothing "
        f"{money(dn.p50)} ({money(dn.p10)} to {money(dn.p90)}).",
        f"The plan costs less than like-for-like in {r.plan_beats_like_for_like_pct:.0f} % of the paths "
        f"and less than doing nothing in {r.plan_beats_do_nothing_pct:.0f} %.",
        f"One year of typical price moves (one standard deviation) changes the yearly energy bills by "
        f"about {money(r.bill_shock_before_usd)} with today's home and {money(r.bill_shock_after_usd)} "
        "once the plan is done.",
    ]
    s = r.solar
    if s is not None:
        what = "solar and battery lock" if s.includes_battery else "solar locks"
        u = s.utility_usd_per_kwh
        out.append(f"The plan's {what} in electricity at {_cents(s.lcoe_usd_per_kwh)}/kWh for {s.life_years} "
                   f"years; the utility's price over the same years averages {_cents(u.p50)}/kWh on the "
                   f"middle path ({_cents(u.p10)} to {_cents(u.p90)}) and is above the solar's in "
                   f"{s.utility_above_lcoe_pct:.0f} % of the paths.")
    return tuple(out)


def risk_view(road: Any) -> RiskView | None:
    """Sentences, tables and chart series of the roadmap's price risk (None: not computed)."""
    r = getattr(road, "price_risk", None)
    if r is None:
        return None
    totals = Table(
        ("Over the horizon", "P10", "Median", "P90", "Mean"),
        tuple((name, money(b.p10), money(b.p50), money(b.p90), money(b.mean)) for name, b in (
            ("This plan", r.plan_cost_usd), ("Replace like-for-like", r.like_for_like_cost_usd),
            ("Do nothing", r.do_nothing_cost_usd))),
        "lrrrr", None,
        "Total cost in today's dollars: projects after incentives, loan payments, energy bills and "
        "expected breakdown repairs, less the equipment's value left at the end. P10: nine paths "
        "in ten cost more; P90: nine in ten cost less.")
    shocks = Table(
        ("Price one standard deviation up", "Yearly swing", "Bills today", "Bills after the plan"),
        tuple((FUEL_WORDS.get(s.fuel, clean(s.fuel)), f"{s.volatility_pct:.0f} %",
               money_signed(s.before_usd), money_signed(s.after_usd)) for s in r.shocks)
        + (("All prices together (as they move in history)", "", money_signed(r.bill_shock_before_usd),
            money_signed(r.bill_shock_after_usd)),),
        "lrrr", None, "Change in a year's energy bills, at today's prices.")
    yearly = Table(
        ("Year", "Plan P10", "Plan median", "Plan P90", "Nothing P10", "Nothing median", "Nothing P90"),
        tuple((str(y.year), money(y.plan_bills_usd.p10), money(y.plan_bills_usd.p50),
               money(y.plan_bills_usd.p90), money(y.do_nothing_bills_usd.p10),
               money(y.do_nothing_bills_usd.p50), money(y.do_nothing_bills_usd.p90)) for y in r.years),
        "nrrrrrr", None, "Energy bills each year across the price paths (dollars of that year).")
    years = tuple(y.year for y in r.years)
    series = (
        BandSeries("This plan", years, tuple(y.plan_bills_usd.p10 for y in r.years),
                   tuple(y.plan_bills_usd.p50 for y in r.years), tuple(y.plan_bills_usd.p90 for y in r.years)),
        BandSeries("Do nothing", years, tuple(y.do_nothing_bills_usd.p10 for y in r.years),
                   tuple(y.do_nothing_bills_usd.p50 for y in r.years),
                   tuple(y.do_nothing_bills_usd.p90 for y in r.years)),
    )
    return RiskView(risk_lines(road), totals, shocks, yearly, series)


@dataclass(frozen=True)
class TornadoBar:
    """One assumption of a tornado chart: the NPV at its low and high setting (USD)."""

    label: str
    low_label: str
    high_label: str
    low_usd: float
    high_usd: float


@dataclass(frozen=True)
class SensitivityView:
    """The assumptions that move the NPV most, ranked, for a tornado chart and a table."""

    base_usd: float
    bars: tuple[TornadoBar, ...]
    table: Table
    lines: tuple[str, ...]


def sensitivity_view(result: Any) -> SensitivityView | None:
    """The result's sensitivity ranking (None: not computed)."""
    s = getattr(result, "sensitivity", None)
    if s is None or not s.rows:
        return None
    bars = tuple(TornadoBar(clean(r.label), clean(r.low_label), clean(r.high_label), r.low_npv_usd,
                            r.high_npv_usd) for r in s.rows)
    table = Table(
        ("Assumption", "Low setting", "NPV", "High setting", "NPV", "Swing"),
        tuple((b.label, b.low_label, money_signed(b.low_usd), b.high_label, money_signed(b.high_usd),
               money(abs(b.high_usd - b.low_usd))) for b in bars),
        "llrlrr", None,
        f"Net present value against doing nothing, re-planned with one assumption changed at a time "
        f"(as planned: {money_signed(s.base_npv_usd)}).")
    top = bars[0]
    lines = (f"The assumption that moves the result most is {top.label.lower()}: from "
             f"{money_signed(top.low_usd)} ({top.low_label}) to {money_signed(top.high_usd)} ({top.high_label}).",)
    lines += tuple(clean(n) for n in s.notes)
    return SensitivityView(s.base_npv_usd, bars, table, lines)
