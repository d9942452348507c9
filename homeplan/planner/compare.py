"""What a step costs beyond the like-for-like purchase it avoids: the comparison a household makes.

A heat pump bought when the furnace and the air conditioner are both due does not cost its whole
price against the household's real alternative: they would have bought a new furnace and a new
air conditioner that year anyway. The step's incremental cost is its price after incentives less
the like-for-like replacements of the items it takes over that are due in its year (their likely
end of life - the plan's replace-by year - has come, or they have failed). An item that is not
due yet avoids nothing: the step costs its full price.

References
----------
NIST Handbook 135, "Life-Cycle Costing Manual for the Federal Energy Management Program"
(incremental cost of an alternative against the base case it replaces).
"""

from __future__ import annotations

from dataclasses import dataclass

from homeplan.planner.breakdowns import LFL_PREFIX, lfl_cost, replaceable_items
from homeplan.planner.context import Context

__all__ = ["Avoided", "avoided_like_for_like"]


@dataclass(frozen=True)
class Avoided:
    """The like-for-like purchases a step avoids: their cost in its year and what they are."""

    cost_usd: float
    items: tuple[str, ...]          # labels of the items due ("gas furnace")


def avoided_like_for_like(ctx: Context, pid: str, year: int) -> Avoided:
    """The like-for-like replacements ``pid`` avoids when done in ``year`` (nominal USD).

    A like-for-like step avoids itself; the roof project is the roof's like-for-like
    replacement. Vehicles are left out: the electric vehicle's price is already its premium over
    a comparable gasoline car.
    """
    infl = (1 + ctx.plan.prices.inflation_pct / 100.0) ** (year - ctx.first_year)
    items = replaceable_items(ctx)
    if pid.startswith(LFL_PREFIX):
        key = pid[len(LFL_PREFIX):]
        o = ctx.outlooks.get(key)
        return Avoided(lfl_cost(ctx, key) * infl, (o.label,) if o else ())
    d = ctx.details.get(pid)
    if d is None:
        return Avoided(0.0, ())
    cost, labels = 0.0, []
    for key in d.candidate.replaces:
        o = ctx.outlooks.get(key)
        if o is None or o.kind == "vehicle" or key not in items:
            continue
        if not (o.failed or o.replace_by_year <= year):
            continue
        item_cost = items[key][1]
        today = item_cost if item_cost is not None else lfl_cost(ctx, key)
        if today > 0:
            cost += today * infl
            labels.append(o.label)
    return Avoided(cost, tuple(labels))
