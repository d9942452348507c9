"""The two baselines a roadmap is compared with: doing nothing, and replacing like for like.

Both keep today's home and its bills (each fuel's price escalating at its own rate); the
like-for-like baseline also buys a same-fuel replacement of each item in its likely end-of-life
year, and counts what is left of it at the end of the horizon (straight-line).

References
----------
NIST Handbook 135, "Life-Cycle Costing Manual for the Federal Energy Management Program"
(present value, residual value by straight-line depreciation).
"""

from __future__ import annotations

from homeplan.money.finance import discount_factor, remaining_value_share
from homeplan.planner.breakdowns import breakdown_cost, lfl_cost, replaceable_items
from homeplan.planner.context import Context
from homeplan.planner.states import StateEnergy, peak_fields
from homeplan.result.roadmap import Baseline, YearTotals

__all__ = ["bills_in_year", "do_nothing", "like_for_like"]


def bills_in_year(ctx: Context, bills: dict[str, float], t: int) -> dict[str, float]:
    """Today's bills by fuel, each escalated to year index t at its own rate."""
    return {f: v * (1 + ctx.escalation(f)) ** t for f, v in bills.items()}


def do_nothing(ctx: Context, base_energy: StateEnergy, headroom_amps: float = 0.0,
               load_pct: float | None = None) -> Baseline:
    """Keep today's home: its bills each year (breakdowns are counted in every NPV)."""
    years = []
    cumulative = 0.0
    for t, year in enumerate(ctx.years):
        bills = bills_in_year(ctx, base_energy.bills_usd, t)
        cumulative += sum(bills.values())
        years.append(YearTotals(year=year, bills_usd={k: round(v, 2) for k, v in bills.items()},
                                cumulative_usd=round(cumulative, 2),
                                emissions_kg=round(base_energy.emissions_kg, 1),
                                peak_kw=round(base_energy.peak_kw, 2),
                                service_headroom_amps=round(headroom_amps, 1),
                                energy={k: round(v, 1) for k, v in base_energy.units.items()},
                                service_load_pct=load_pct, **peak_fields(base_energy)))
    return Baseline("do_nothing", "do nothing (pay for breakdowns as they come)", tuple(years), 0.0)


def like_for_like(ctx: Context, base_energy: StateEnergy, headroom_amps: float = 0.0,
                  load_pct: float | None = None) -> Baseline:
    """Replace each appliance with the same kind on the same fuel in its likely end-of-life year."""
    rate = ctx.plan.budget.discount_rate_pct
    infl = ctx.plan.prices.inflation_pct / 100.0
    spend: dict[int, float] = {}
    breakdowns_before: dict[str, int] = {}
    salvage = 0.0
    end = ctx.first_year + len(ctx.years)
    for key, (_pid, item_cost) in replaceable_items(ctx).items():
        o = ctx.outlooks[key]
        y = max(o.expected_end_year, ctx.first_year)
        breakdowns_before[key] = y
        if y < end:
            today = item_cost if item_cost is not None else lfl_cost(ctx, key)
            c = today * (1 + infl) ** (y - ctx.first_year)
            spend[y] = spend.get(y, 0.0) + c
            salvage += c * remaining_value_share(end - y, o.median_life_years)
    years = []
    cumulative = 0.0
    npv = 0.0
    for t, year in enumerate(ctx.years):
        bills = bills_in_year(ctx, base_energy.bills_usd, t)
        s = spend.get(year, 0.0)
        cumulative += s + sum(bills.values())
        npv -= s * discount_factor(rate, t)
        years.append(YearTotals(year=year, spend_usd=round(s, 2), net_usd=round(s, 2),
                                bills_usd={k: round(v, 2) for k, v in bills.items()},
                                cumulative_usd=round(cumulative, 2),
                                emissions_kg=round(base_energy.emissions_kg, 1),
                                peak_kw=round(base_energy.peak_kw, 2),
                                service_headroom_amps=round(headroom_amps, 1),
                                energy={k: round(v, 1) for k, v in base_energy.units.items()},
                                service_load_pct=load_pct, **peak_fields(base_energy)))
    npv += salvage * discount_factor(rate, len(ctx.years))
    for key, (_pid, item_cost) in replaceable_items(ctx).items():
        until = min(breakdowns_before[key], end) - ctx.first_year
        npv -= sum(breakdown_cost(ctx, key, t, item_cost) * discount_factor(rate, t) for t in range(until))
    return Baseline("like_for_like", "replace like-for-like at the likely end of life", tuple(years),
                    round(npv, 2))
