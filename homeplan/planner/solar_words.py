"""Why the roadmap has the solar, battery and roof steps it has, in words with their figures.

When rooftop solar is not in the plan the household should learn why: the array is worth less
than it costs at the home's export rule, the roof must be replaced first and the two together do
not pay, or the budget does not reach it. When solar waits for the roof, both steps say so. The
battery's step says what it carries through an outage when the plan lists critical loads.

References
----------
Common practice, no source: a roof with less life left than the panels is replaced before they
go on (removing and reinstalling an array costs a good part of a new one).
"""

from __future__ import annotations

from homeplan.catalog import performance, upgrade_kinds
from homeplan.money.finance import discount_factor
from homeplan.planner.backup import BackupNeed, backup_need, hours_carried
from homeplan.planner.context import Context
from homeplan.planner.scheduling import COVER_PREFIX, ScheduleOutcome

__all__ = ["backup_words", "export_words", "roof_first", "roof_unknown", "solar_left_out"]


def export_words(ctx: Context) -> str:
    """The export rule in force, in words ("net billing at 0.05 USD/kWh")."""
    e = ctx.plan.prices.electricity
    if e.export == "none":
        return "no export (the inverter curtails what the home does not use)"
    if e.export == "net_metering":
        text = "net metering"
    else:
        rate = (e.export_usd_per_kwh if e.export_usd_per_kwh is not None
                else performance()["net_billing_export_usd_per_kwh"])
        text = f"net billing at {rate:.2f} USD/kWh"
    if e.export_limit_kw is not None:
        text += f", exports limited to {e.export_limit_kw:g} kW"
    return text


def _roof_required(ctx: Context) -> bool:
    g = ctx.graph
    return g.has_edge("roof", "solar") and g.edges["roof", "solar"]["kind"] == "requires"


def _years_left(ctx: Context) -> int | None:
    o = ctx.outlooks.get("roof")
    return None if o is None else max(o.expected_end_year - ctx.first_year, 0)


def _best(outcome: ScheduleOutcome, pid: str) -> tuple[float, float] | None:
    """(size, net present value) of the project's best size at the first year."""
    values = outcome.size_values.get(pid)
    if values:
        size = max(values, key=lambda s: values[s])
        return size, values[size]
    p = outcome.problem
    if pid not in {x.id for x in p.projects}:
        return None
    pr = p.project(pid)
    return None, pr.value_usd[0] - pr.cost_usd[0]


def _roof_now(ctx: Context, outcome: ScheduleOutcome) -> float | None:
    """Net present value of replacing the roof in the first year rather than paying for its
    failure when it comes (the breakdowns it avoids counted)."""
    p = outcome.problem
    ids = {x.id for x in p.projects}
    if "roof" not in ids:
        return None
    roof = p.project("roof")
    rate = ctx.plan.budget.discount_rate_pct
    avoided = 0.0
    if f"{COVER_PREFIX}roof" in ids:
        pen = p.project(f"{COVER_PREFIX}roof").undone_penalty_usd
        avoided = sum(x * discount_factor(rate, t) for t, x in enumerate(pen))
    return roof.value_usd[0] - roof.cost_usd[0] + avoided


def solar_left_out(ctx: Context, outcome: ScheduleOutcome, done: dict[str, int]) -> str | None:
    """Why rooftop solar is not in the plan, with the figures (None when it is, or when the
    home has no candidate for it)."""
    if "solar" not in ctx.details or "solar" in done:
        return None
    if "solar" in ctx.plan.choices.exclude:
        return "rooftop solar is left out, as the plan asks (choices.exclude)"
    best = _best(outcome, "solar")
    if best is None:
        return None
    size, npv = best
    what = f"the best array ({size:g} kW)" if size is not None else "the array"
    text = (f"rooftop solar is not in the plan: {what} is worth {npv:+,.0f} USD over the plan "
            f"under {export_words(ctx)}")
    if _roof_required(ctx):
        o = ctx.outlooks["roof"]
        roof_cost = ctx.details["roof"].cost_today_usd if "roof" in ctx.details else None
        now = _roof_now(ctx, outcome)
        text += (f"; the roof ({o.label}, about {_years_left(ctx)} years left) must be replaced "
                 f"before panels go on" + (f" ({roof_cost:,.0f} USD)" if roof_cost else ""))
        if now is not None:
            text += (f", which done now rather than when it fails changes the plan's value by "
                     f"{now:+,.0f} USD: together {npv + now:+,.0f} USD")
            npv += now
    if npv > 0:
        text += "; the budget does not reach it within the plan's years"
    return text


def roof_first(ctx: Context, done: dict[str, int]) -> tuple[str, str] | None:
    """(the roof step's reason, the solar step's reason) when the plan replaces the roof before
    the panels go on, with the roof's remaining life; None otherwise."""
    if not ("roof" in done and "solar" in done and done["roof"] <= done["solar"]):
        return None
    left = _years_left(ctx)
    if left is None or not ctx.graph.has_edge("roof", "solar"):
        return None
    life = upgrade_kinds()["solar"].life_years
    roof = f"replaced before the solar panels go on ({done['solar']}): it has about {left} years left"
    solar = (f"on the new roof ({done['roof']}): the old one had about {left} years left, less "
             f"than the panels' {life:.0f}")
    return roof, solar


def roof_unknown(ctx: Context) -> str | None:
    """A note for a solar step when the plan does not say how old the roof is."""
    roof = ctx.plan.home.roof
    if roof is not None and roof.year_installed is not None:
        return None
    return ("the roof's age is not in the plan: have a roofer check it before the panels go on "
            "(a roof replaced under an array means taking the panels off and putting them back)")


def backup_words(ctx: Context, battery_kwh: float | None, need: BackupNeed | None = None) -> str | None:
    """What the plan's critical loads need in an outage and what the planned battery (or none)
    does for them."""
    need = need or backup_need(ctx.plan)
    if need is None:
        return None
    loads = ", ".join(need.loads)
    text = (f"backup power: your critical loads ({loads}) use about {need.energy_kwh:,.1f} kWh in a "
            f"{need.outage_hours:g}-hour outage - a battery needs at least {need.battery_kwh:,.1f} kWh "
            f"kept charged for it (its backup reserve), and {need.peak_kw:,.1f} kW if they all run at once")
    if battery_kwh:
        hours = hours_carried(need, battery_kwh)
        text += (f"; the planned {battery_kwh:g} kWh battery carries them about {hours:,.0f} hours"
                 if hours < need.outage_hours else
                 f"; the planned {battery_kwh:g} kWh battery carries them through it")
    else:
        text += "; the plan has no new battery"
        if need.value_usd_per_year:
            text += (f": at the {need.value_usd_per_year:,.0f} USD a year you give to riding through, "
                     "one does not pay for itself within the plan")
    return text
