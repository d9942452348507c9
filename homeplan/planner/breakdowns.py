"""What the old appliances and the roof cost while they stay: expected breakdowns, like-for-like.

One rule, used by the scheduler's penalty for leaving an item in place, by the roadmap's
accounting and by both baselines, so that they agree: an item that a project would replace
fails in year t with its Weibull probability (given it works today) and is then replaced in an
emergency, like for like; the share of that replacement still unused at the end of the horizon
is worth its straight-line remaining value.

References
----------
NIST Handbook 135, "Life-Cycle Costing Manual for the Federal Energy Management Program"
(present value; residual value by straight-line depreciation). Weibull end-of-life risk from
:mod:`homeplan.planner.lifecycle`.
"""

from __future__ import annotations

from dataclasses import dataclass

from homeplan.catalog import like_for_like_cost
from homeplan.money.finance import discount_factor, remaining_value_share
from homeplan.plan.fuels import HOME_FUELS, appliance_fuel
from homeplan.planner.candidates import MILESTONE_FOR_FUEL
from homeplan.planner.context import Context
from homeplan.planner.projects import replaced_fuels

__all__ = [
    "ESSENTIAL_SERVICE",
    "LFL_PREFIX",
    "EmergencyItem",
    "breakdown_cost",
    "breakdowns_by_year",
    "emergency_items",
    "expected_breakdowns",
    "fossil_projects",
    "lfl_cost",
    "replaceable_items",
]

LFL_PREFIX = "like_for_like:"
"""Id prefix of the like-for-like replacement the scheduler may choose instead of an upgrade."""

ESSENTIAL_SERVICE = {"furnace": "heat", "boiler": "heat", "heat_pump": "heat", "mini_split": "heat",
                     "baseboard": "heat", "water_heater": "hot water"}
"""Appliance kinds whose failure leaves the home without an essential service: a failed one is
replaced in the first plan year, over budget if need be (common practice, no source: a home is
not left without heat or hot water)."""


@dataclass(frozen=True)
class EmergencyItem:
    """A failed appliance that provides an essential service, and the two ways to replace it."""

    key: str                   # appliance id in the plan
    label: str                 # "oil boiler"
    service: str               # "heat" or "hot water"
    upgrade: str               # the project that replaces it with electric equipment
    like_for_like: str | None  # the like-for-like project id, when the catalog prices one


def emergency_items(ctx: Context) -> list[EmergencyItem]:
    """Failed appliances (``choices.failed_now`` or ``condition: failed``) that provide heat or
    hot water and that a candidate project replaces."""
    failed = set(ctx.plan.choices.failed_now) | {a.key for a in ctx.plan.appliances
                                                  if a.condition == "failed"}
    items = replaceable_items(ctx)
    out = []
    for a in ctx.plan.appliances:
        if a.key not in failed or a.kind not in ESSENTIAL_SERVICE or a.key not in items:
            continue
        lfl = f"{LFL_PREFIX}{a.key}" if lfl_cost(ctx, a.key) > 0 else None
        out.append(EmergencyItem(a.key, ctx.outlooks[a.key].label, ESSENTIAL_SERVICE[a.kind],
                                 items[a.key][0], lfl))
    return out


def fossil_projects(ctx: Context) -> list[str]:
    """Projects that take the home off a combustion fuel (appliances, cars, fuel milestones)."""
    out = []
    for pid, d in ctx.details.items():
        if (d.kind == "ev" or d.kind in MILESTONE_FOR_FUEL.values()
                or replaced_fuels(ctx.plan, d.candidate) & set(HOME_FUELS)):
            out.append(pid)
    return out


def lfl_cost(ctx: Context, key: str) -> float:
    """Like-for-like replacement cost today of an appliance by its key (0 if unknown)."""
    a = next((x for x in ctx.plan.appliances if x.key == key), None)
    if a is None:
        return 0.0
    return like_for_like_cost(a.kind, appliance_fuel(a), ctx.plan.prices.cost_level)


def replaceable_items(ctx: Context) -> dict[str, tuple[str, float | None]]:
    """Item key -> (project that replaces it, item cost override) for every appliance or roof a
    candidate project replaces."""
    out: dict[str, tuple[str, float | None]] = {}
    for pid, d in ctx.details.items():
        for key in d.candidate.replaces:
            if key in ctx.outlooks and ctx.outlooks[key].kind != "vehicle":
                out[key] = (pid, d.cost_today_usd if key == "roof" else None)
    return out


def breakdown_cost(ctx: Context, key: str, t: int, item_cost_usd: float | None = None) -> float:
    """Expected cost in year index t of the item ``key`` breaking that year (year-t dollars).

    The chance it fails in that year (given it works today, Weibull) times an emergency
    like-for-like replacement, less the share of that replacement still unused at the end of
    the horizon (straight-line, NIST Handbook 135). The same figure is the scheduler's penalty
    for leaving the item in place and the roadmap's expected breakdown cost, so the two agree.
    """
    o = ctx.outlooks.get(key)
    if o is None or o.kind == "vehicle" or t >= len(o.yearly_failure_pct):
        return 0.0
    T = len(ctx.years)
    cost = (item_cost_usd if item_cost_usd is not None else lfl_cost(ctx, key))
    cost *= (1 + ctx.plan.prices.inflation_pct / 100.0) ** t
    rate = ctx.plan.budget.discount_rate_pct
    unused = remaining_value_share(T - t, o.median_life_years)
    return o.yearly_failure_pct[t] / 100.0 * cost * (
        1.0 - unused * discount_factor(rate, T) / discount_factor(rate, t))


def _years_in_place(ctx: Context, key: str, pid: str, done: dict[str, int]) -> int:
    """Years of the horizon before the item is replaced (by its upgrade or like for like)."""
    years = [done[p] for p in (pid, f"{LFL_PREFIX}{key}") if p in done]
    return min(years) - ctx.first_year if years else len(ctx.years)


def breakdowns_by_year(ctx: Context, done: dict[str, int]) -> list[float]:
    """Expected emergency replacement cost in each year (nominal) of the items still in place."""
    out = [0.0] * len(ctx.years)
    for key, (pid, cost) in replaceable_items(ctx).items():
        for t in range(_years_in_place(ctx, key, pid, done)):
            out[t] += breakdown_cost(ctx, key, t, cost)
    return out


def expected_breakdowns(ctx: Context, done: dict[str, int]) -> float:
    """Present value of the expected emergency replacements of the items the plan leaves in
    place, for each year before the project that replaces them (see ``breakdown_cost``)."""
    rate = ctx.plan.budget.discount_rate_pct
    total = 0.0
    for key, (pid, cost) in replaceable_items(ctx).items():
        total += sum(breakdown_cost(ctx, key, t, cost) * discount_factor(rate, t)
                     for t in range(_years_in_place(ctx, key, pid, done)))
    return total
