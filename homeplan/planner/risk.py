"""Stage "risk": the roadmap under sampled energy prices, and the price scenarios the risk-aware
objective optimises over.

The roadmap rests on one path of prices (each fuel escalating at the plan's rate). Here the same
plan, like-for-like replacement and doing nothing are costed on thousands of sampled price paths
(:mod:`homeplan.money.prices`: a correlated random walk of yearly log prices, volatilities and
correlations from a table of historic US prices, starting at the plan's prices). Only the energy
bills change from path to path: each year's bills at today's prices (the typical year of that
year's state of the home, the same simulation as the roadmap) times the path's price multiplier
of each fuel. Everything else - spend, incentives, loans, breakdown repairs, remaining value - is
the roadmap's own, so with zero volatility every band collapses to the roadmap's single answer.

References
----------
NIST Handbook 135, "Life-Cycle Costing Manual for the Federal Energy Management Program"
(present value of energy costs); R. T. Rockafellar, S. Uryasev, "Optimization of conditional
value-at-risk", Journal of Risk 2 (2000) 21-41 (scenario losses for the risk-aware objective).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import replace

import numpy as np

from homeplan.catalog import performance
from homeplan.money.finance import discount_factor
from homeplan.money.prices import (
    PriceModel,
    bill_shock_usd,
    estimate_price_model,
    levelised_price_paths_usd_per_kwh,
    price_history,
    simulate_price_paths,
)
from homeplan.plan.fuels import BILL_FUELS
from homeplan.planner.breakdowns import expected_breakdowns
from homeplan.planner.context import Context, content_key
from homeplan.result.plan_result import PlanResult
from homeplan.result.risk import Band, FuelShock, PriceRisk, PriceSeries, SolarPriceRisk, YearBand

__all__ = [
    "FUELS",
    "band",
    "price_model",
    "price_paths",
    "price_risk",
    "scenario_base_usd",
    "scenario_values",
    "with_price_risk",
]

FUELS: tuple[str, ...] = BILL_FUELS
"""The fuels whose prices move, in the order of the path arrays."""


def price_model(ctx: Context) -> PriceModel:
    """The price model of the plan: the history's volatilities and correlations, scaled by the
    plan's ``prices.uncertainty.volatility_factor``."""
    u = ctx.plan.prices.uncertainty
    return estimate_price_model(price_history(), FUELS).scaled(u.volatility_factor)


def _escalation_pct(ctx: Context) -> dict[str, float] | None:
    if ctx.plan.prices.uncertainty.drift == "history":
        return None
    return {f: ctx.escalation(f) * 100.0 for f in FUELS}


def price_paths(ctx: Context, n_paths: int, years: int, model: PriceModel | None = None) -> np.ndarray:
    """Price multipliers ``[n_paths, fuels, years + 1]`` of the plan (seeded by the plan; kept in
    the home's cache, so a re-plan after a budget or pin change draws no new paths)."""
    u = ctx.plan.prices.uncertainty
    esc = _escalation_pct(ctx)
    key = content_key("price-paths", u.model_dump(mode="json"), esc, n_paths, years)
    return ctx.cache.memo(key, lambda: simulate_price_paths(model or price_model(ctx), years, n_paths,
                                                            seed=u.seed, escalation_pct=esc))


def band(values: np.ndarray) -> Band:
    """P10, P50, P90 and mean of sampled values (numpy's linear-interpolation percentiles)."""
    p10, p50, p90 = np.percentile(values, [10, 50, 90])
    return Band(float(p10), float(p50), float(p90), float(np.mean(values)))


def _bills_matrix(bills: Sequence[Mapping[str, float]]) -> np.ndarray:
    """``[fuels, T]`` bills at today's prices from one mapping per year."""
    return np.array([[b.get(f, 0.0) for b in bills] for f in FUELS], dtype=float)


def _pv(bills: np.ndarray, multipliers: np.ndarray, df: np.ndarray) -> np.ndarray:
    """Present value of bills ``[F, T]`` on each path ``[S, F, >= T]``."""
    t = bills.shape[1]
    return np.einsum("sft,ft,t->s", multipliers[:, :, :t], bills, df)


def _growth(ctx: Context, years: int) -> np.ndarray:
    """The single path: ``[1, F, years]`` multipliers at the plan's escalation."""
    esc = np.array([ctx.escalation(f) for f in FUELS])
    return ((1.0 + esc)[:, None] ** np.arange(years)[None, :])[None, :, :]


def _discount(ctx: Context, years: int) -> np.ndarray:
    rate = ctx.plan.budget.discount_rate_pct
    return np.array([discount_factor(rate, t) for t in range(years)])


def scenario_base_usd(ctx: Context, paths: np.ndarray) -> np.ndarray:
    """Today's home's total cost on each path: the present value of its bills plus its expected
    breakdown repairs (the risk-aware objective's base cost, before any project)."""
    t = len(ctx.years)
    today = _bills_matrix([ctx.energy(frozenset(), "today").bills_usd] * t)
    return _pv(today, paths, _discount(ctx, t)) + expected_breakdowns(ctx, {})


def scenario_values(ctx: Context, savings_by_fuel: Mapping[str, float], value_usd: Sequence[float],
                    paths: np.ndarray) -> np.ndarray:
    """A project's present value if done in each year, on each path ``[S, T]``: its value on the
    plan's single path with the bill savings re-priced along the path (savings count from the year
    it is done to the end of the horizon, as in the scheduler's value)."""
    t = len(ctx.years)
    sav = np.array([savings_by_fuel.get(f, 0.0) for f in FUELS])
    df = _discount(ctx, t)
    per_year = np.einsum("sft,f,t->st", paths[:, :, :t], sav, df)
    single = np.einsum("sft,f,t->st", _growth(ctx, t), sav, df)
    tail = np.cumsum(per_year[:, ::-1], axis=1)[:, ::-1]
    tail_single = np.cumsum(single[:, ::-1], axis=1)[:, ::-1]
    return np.asarray(value_usd, dtype=float)[None, :] - tail_single + tail


def price_risk(ctx: Context, result: PlanResult) -> PriceRisk | None:
    """The roadmap's price risk (None for an infeasible request)."""
    rm = result.roadmap
    if rm.status != "ok" or not rm.years:
        return None
    u = ctx.plan.prices.uncertainty
    model = price_model(ctx)
    t = len(ctx.years)
    first = ctx.first_year
    done = {s.project_id: s.year for s in rm.steps if s.project_id in ctx.details}
    hedge = result.finance.solar_hedge if result.finance else None
    solar_t0 = done["solar"] - first if hedge is not None and "solar" in done else None
    span = max(t, solar_t0 + hedge.life_years if solar_t0 is not None and hedge else 0)
    paths = price_paths(ctx, u.paths, span, model)
    df = _discount(ctx, t)
    single = _growth(ctx, t)
    plan_bills = _bills_matrix([ctx.energy(frozenset(p for p, y in done.items() if y <= year)).bills_usd
                                for year in ctx.years])
    today_bills = ctx.energy(frozenset(), "today").bills_usd
    dn_bills = _bills_matrix([today_bills] * t)
    reference = expected_breakdowns(ctx, {})
    dn_single = float(_pv(dn_bills, single, df)[0])
    lfl = rm.baseline("like_for_like")
    plan_cost = dn_single + reference - rm.npv_usd - float(_pv(plan_bills, single, df)[0]) + _pv(plan_bills, paths, df)
    dn_cost = _pv(dn_bills, paths, df) + reference
    lfl_cost = dn_cost - (lfl.npv_usd if lfl is not None else 0.0)
    yearly_plan = np.einsum("sft,ft->st", paths[:, :, :t], plan_bills)
    yearly_dn = np.einsum("sft,ft->st", paths[:, :, :t], dn_bills)
    after = {f: float(plan_bills[i, -1]) for i, f in enumerate(FUELS)}
    before = {f: float(dn_bills[i, 0]) for i, f in enumerate(FUELS)}
    shock_before, by_before = bill_shock_usd(before, model)
    shock_after, by_after = bill_shock_usd(after, model)
    vol = model.volatility
    shocks = tuple(FuelShock(f, float(vol[i] * 100), by_before.get(f, 0.0), by_after.get(f, 0.0))
                   for i, f in enumerate(FUELS) if before.get(f, 0.0) or after.get(f, 0.0))
    esc = _escalation_pct(ctx)
    fuels = tuple(PriceSeries(f, float(vol[i] * 100),
                              esc[f] if esc is not None else float(model.trend_pct[i]),
                              float(model.trend_pct[i]), model.sources[i])
                  for i, f in enumerate(FUELS))
    solar = None
    if hedge is not None and solar_t0 is not None:
        kwh = ctx.energy(frozenset({"solar"})).summary.annual.get("solar_kwh", 0.0)
        e = FUELS.index("electricity")
        utility = levelised_price_paths_usd_per_kwh(
            ctx.plan.prices.electricity.usd_per_kwh, paths[:, e, solar_t0:solar_t0 + hedge.life_years], kwh,
            ctx.plan.budget.discount_rate_pct, performance()["pv_degradation_pct_per_year"])
        solar = SolarPriceRisk(hedge.lcoe_usd_per_kwh, band(utility),
                               float(np.mean(utility > hedge.lcoe_usd_per_kwh) * 100), hedge.life_years,
                               hedge.includes_battery)
    return PriceRisk(
        paths=u.paths, seed=u.seed, drift=u.drift, history_years=f"{model.first_year}-{model.last_year}",
        plan_cost_usd=band(plan_cost), like_for_like_cost_usd=band(lfl_cost), do_nothing_cost_usd=band(dn_cost),
        plan_beats_like_for_like_pct=float(np.mean(plan_cost < lfl_cost) * 100),
        plan_beats_do_nothing_pct=float(np.mean(plan_cost < dn_cost) * 100),
        bill_shock_before_usd=shock_before, bill_shock_after_usd=shock_after, shocks=shocks,
        years=tuple(YearBand(y, band(yearly_plan[:, i]), band(yearly_dn[:, i])) for i, y in enumerate(ctx.years)),
        fuels=fuels, solar=solar,
    )


def with_price_risk(ctx: Context, result: PlanResult) -> PlanResult:
    """Stage "risk": the result with its roadmap's ``price_risk``."""
    risk = price_risk(ctx, result)
    if risk is None:
        return result
    return replace(result, roadmap=replace(result.roadmap, price_risk=risk))
