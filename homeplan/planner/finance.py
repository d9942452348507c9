"""Household finance figures of a roadmap: plan and per-project returns, and the solar hedge.

References
----------
NIST Handbook 135 (net present value, simple and discounted payback, internal rate of return);
Short, Packey & Holt, NREL/TP-462-5173 (1995), levelised cost of energy. The arithmetic is in
:mod:`homeplan.money.finance` (checked against numpy-financial in its tests).
"""

from __future__ import annotations

from homeplan.catalog import performance
from homeplan.money.finance import (
    discounted_payback_years,
    energy_hedge,
    irr_pct,
    npv_usd,
    simple_payback_years,
)
from homeplan.planner.context import Context
from homeplan.planner.scheduling import ScheduleOutcome
from homeplan.result.figures import PlanReturns, SolarHedge, StepReturns
from homeplan.result.roadmap import Roadmap

__all__ = ["plan_returns", "project_returns", "solar_hedge"]


def _round(x: float | None, nd: int = 1) -> float | None:
    return None if x is None else round(x, nd)


def plan_returns(roadmap: Roadmap, discount_rate_pct: float, extra_flows: list[float] | None = None,
                 npv_vs_do_nothing_usd: float | None = None,
                 like_for_like_flows: tuple[float, ...] | list[float] | None = None) -> PlanReturns:
    """Cash flows of the plan against doing nothing, year by year, and their returns; and, with
    ``like_for_like_flows`` (the like-for-like baseline against doing nothing), the plan against
    replacing like-for-like: the difference of the two, year by year.

    Each year: bill savings and the electric cars' lower maintenance, minus what the plan spends
    (net of incentives received), minus loan payments, plus ``extra_flows`` (the expected breakdown costs the plan avoids, and in the last
    year the equipment's remaining value) - the same accounting as the roadmap's NPV.
    """
    extra = extra_flows or [0.0] * len(roadmap.years)
    flows = [y.bill_savings_usd + y.maintenance_savings_usd - (y.spend_usd - y.incentives_usd)
             - y.loan_payments_usd + e for y, e in zip(roadmap.years, extra, strict=True)]
    npv = npv_vs_do_nothing_usd if npv_vs_do_nothing_usd is not None else npv_usd(discount_rate_pct, flows)
    vs_lfl: dict = {}
    if like_for_like_flows is not None:
        diff = [f - b for f, b in zip(flows, like_for_like_flows, strict=True)]
        vs_lfl = {
            "like_for_like_flows_usd": tuple(round(f, 2) for f in like_for_like_flows),
            "npv_vs_like_for_like_usd": round(npv - npv_usd(discount_rate_pct, list(like_for_like_flows)), 2),
            "irr_vs_like_for_like_pct": _round(irr_pct(diff)),
            "simple_payback_vs_like_for_like_years": _round(simple_payback_years(diff)),
        }
    return PlanReturns(
        flows_usd=tuple(round(f, 2) for f in flows),
        npv_vs_do_nothing_usd=round(npv, 2),
        irr_pct=_round(irr_pct(flows)),
        simple_payback_years=_round(simple_payback_years(flows)),
        discounted_payback_years=_round(discounted_payback_years(discount_rate_pct, flows)),
        **vs_lfl,
    )


def project_returns(ctx: Context, outcome: ScheduleOutcome, roadmap: Roadmap) -> dict[str, StepReturns]:
    """Per step: pay its incremental cost up front - the net cost less the like-for-like
    purchase it avoids when the old item is due (the full net cost when it is not) - then save
    its bills over its life."""
    rate = ctx.plan.budget.discount_rate_pct
    out = {}
    for s in roadmap.steps:
        co = outcome.coefficients.get(s.project_id)
        d = ctx.details.get(s.project_id)
        if co is None or d is None:
            continue
        t0 = s.year - ctx.first_year
        life = int(round(min(d.life_years, 30)))  # milestones "last" 100 years; count 30 at most
        incremental = s.incremental_cost_usd if s.incremental_cost_usd is not None else s.net_cost_usd
        flows = [-incremental]
        infl = 1 + ctx.plan.prices.inflation_pct / 100.0
        for k in range(1, life + 1):
            flows.append(sum(v * (1 + ctx.escalation(f)) ** (t0 + k) for f, v in co.savings_by_fuel.items())
                         + co.maintenance_usd_per_year * infl ** (t0 + k))
        out[s.project_id] = StepReturns(
            first_year_savings_usd=round(flows[1], 2) if len(flows) > 1 else 0.0,
            npv_over_life_usd=round(npv_usd(rate, flows), 2),
            irr_pct=_round(irr_pct(flows)) if any(f > 0 for f in flows[1:]) else None,
            simple_payback_years=_round(simple_payback_years(flows)),
            discounted_payback_years=_round(discounted_payback_years(rate, flows)),
            incremental_cost_usd=round(incremental, 2), avoided_usd=s.avoided_usd,
            flows_usd=tuple(round(f, 2) for f in flows),
        )
    return out


def solar_hedge(ctx: Context, roadmap: Roadmap) -> SolarHedge | None:
    """What the solar (and battery) of the plan lock in per kWh, against the utility's price."""
    steps = {s.project_id: s for s in roadmap.steps}
    if "solar" not in steps:
        return None
    d = ctx.details["solar"]
    kwh = ctx.energy(frozenset({"solar"})).summary.annual.get("solar_kwh", 0.0)
    if kwh <= 0:
        return None
    capex = steps["solar"].net_cost_usd + (steps["battery"].net_cost_usd if "battery" in steps else 0.0)
    price = ctx.plan.prices.electricity.usd_per_kwh * (1 + ctx.escalation("electricity")) ** (
        steps["solar"].year - ctx.first_year)
    degradation_pct = performance()["pv_degradation_pct_per_year"]
    h = energy_hedge(capex, kwh, int(d.life_years), ctx.plan.budget.discount_rate_pct, price,
                     ctx.escalation("electricity") * 100, degradation_pct=degradation_pct)
    return SolarHedge(
        lcoe_usd_per_kwh=round(h.lcoe_usd_per_kwh, 4),
        utility_levelised_usd_per_kwh=round(h.utility_levelised_usd_per_kwh, 4),
        utility_first_year_usd_per_kwh=round(h.utility_first_year_usd_per_kwh, 4),
        utility_last_year_usd_per_kwh=round(h.utility_last_year_usd_per_kwh, 4),
        life_years=h.life_years,
        includes_battery="battery" in steps,
        degradation_pct_per_year=degradation_pct,
    )
