"""From a plan to its result in named stages: the one path every command and view takes.

    plan --meter--> the plan with what its meter file tells (monthly use, measured peak)
         --home--> Context (upgrade graph, weather and heat loss, end-of-life outlooks)
         --projects--> each candidate's variant, size and cost (solar sized to the electrified home)
         --capacity--> the service remedy, lower-power variants where they suffice
         --incentives--> the programs the plan lists, estimated per purchase
         --schedule--> the MILP's placement of each project in a year, refined once
         --result--> the roadmap re-simulated year by year, exact incentives, PlanResult
         --risk--> the roadmap's cost on sampled energy price paths (price_risk)

Each stage is a function of what the stages before it returned; nothing is changed in place.
The scheduler sees linear approximations (each project's value measured against the home as it
will be when the project is done); the result stage re-simulates the chosen plan and evaluates
its incentives exactly, and those are the numbers shown.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np

from homeplan import catalog
from homeplan.energy import timegrid
from homeplan.energy.meter import IntervalSeries
from homeplan.errors import PlanRuleError
from homeplan.plan.files import PlanFolder, as_folder
from homeplan.plan.hashing import content_hash
from homeplan.plan.load import LoadedPlan
from homeplan.plan.model import Plan
from homeplan.planner import candidates, lifecycle
from homeplan.planner.adjust import Adjustments
from homeplan.planner.backup import backup_need
from homeplan.planner.build import build_result
from homeplan.planner.capacity import plan_capacity, refit_connections
from homeplan.planner.context import Context, PlannerCache
from homeplan.planner.incentives import IncentiveModel, plan_programs
from homeplan.planner.meter import meter_summary, read_meter
from homeplan.planner.projects import detail, size_choices, solar_size_kw, winter_array_kw
from homeplan.planner.risk import with_price_risk
from homeplan.planner.scheduling import schedule
from homeplan.planner.states import roof_array
from homeplan.result.plan_result import PlanResult

__all__ = ["STAGES", "monthly_sums", "plan_roadmap", "prepare_home", "size_projects", "specific_yield"]

STAGES = ("meter", "home", "projects", "capacity", "incentives", "schedule", "result", "risk")
"""The planner's stages, in order (see the module docstring)."""


def plan_roadmap(plan: Plan | LoadedPlan, base_dir: PlanFolder | Path | str | None = None,
                 cache: PlannerCache | None = None, adjust: Adjustments | None = None) -> PlanResult:
    """The roadmap for a plan, with everything the views show.

    Parameters
    ----------
    plan : Plan or LoadedPlan
        The plan; a :class:`~homeplan.plan.load.LoadedPlan` (from :func:`homeplan.load_plan`)
        brings its folder (for the weather and incentive files it names) and its document, so
        that a rule it breaks is reported at the line and column of the key.
    base_dir : path or PlanFolder, optional
        The folder the plan's file paths are relative to (default: the loaded file's folder);
        a :class:`~homeplan.plan.files.PlanFolder` also names the files outside it the user
        allowed. A file the plan names outside its folder is refused otherwise.
    cache : PlannerCache, optional
        Keeps the home's weather, heat loss and simulated states between calls (a re-plan
        after a budget or pin change reuses them).
    adjust : Adjustments, optional
        A what-if no plan field expresses (a warmer or colder weather year, other learning
        rates), applied between the stages; give it a cache of its own.

    Returns
    -------
    PlanResult
        An infeasible request is not an error: the roadmap's status says so and explains what
        would make it feasible.

    Raises
    ------
    InputError
        For a loaded plan that breaks a rule (unknown project id, a cycle in the user's order,
        an unreadable weather or incentive file), located in its file.
    PlanRuleError
        The same for a plan given without its file (``loc`` names the key).
    """
    if isinstance(plan, LoadedPlan):
        loaded = plan
        try:
            return _run(loaded.plan, as_folder(base_dir) if base_dir else loaded.folder, cache, adjust)
        except PlanRuleError as err:
            raise loaded.locate(err) from None
    return _run(plan, as_folder(base_dir), cache, adjust)


def _run(plan: Plan, base_dir: PlanFolder, cache: PlannerCache | None,
         adjust: Adjustments | None = None) -> PlanResult:
    adjust = adjust or Adjustments()
    cache = cache or PlannerCache()
    original = plan
    plan, reading = read_meter(plan, base_dir, cache)
    meter = (reading.key, reading.series) if reading is not None else None
    ctx = adjust.projects(size_projects(adjust.home(prepare_home(plan, base_dir, cache, meter))))
    capacity = plan_capacity(ctx)
    ctx = ctx.with_details(capacity.details).with_sizes(capacity.sizes)
    incentives = IncentiveModel(ctx, plan_programs(ctx))
    outcome = schedule(ctx, capacity.model, incentives)
    model = capacity.model
    if outcome.details:  # the optimiser chose other sizes: their connections and incentives
        ctx = ctx.with_details({**ctx.details, **outcome.details})
        model = refit_connections(ctx, model)
        incentives = incentives.with_ctx(ctx)
    notes = (ctx.basis.weather_note, *ctx.basis.notes, *model.notes, *outcome.notes,
             *incentives.notes)
    result = with_price_risk(ctx, build_result(ctx, model, incentives, outcome, notes))
    if reading is None:
        return result
    # the result is of the plan as written; what the meter file told is in the roadmap's meter
    today = next((h for h in result.hourly if h.label == "today"), None)
    summary = meter_summary(reading, ctx.basis.meter_fit, None if today is None else np.asarray(today.grid_import_kw))
    return replace(result, plan=original, content_hash=content_hash(original),
                   roadmap=replace(result.roadmap, meter=summary),
                   warnings=tuple(dict.fromkeys((*result.warnings, *summary.notes))))


def prepare_home(plan: Plan, base_dir: PlanFolder | Path | None, cache: PlannerCache,
                 meter: tuple[str, IntervalSeries] | None = None) -> Context:
    """Stage "home": the upgrade graph, the home's basis (weather, heat loss, calibrated to the
    bills or the meter's readings ``meter`` with their content key) and the outlooks."""
    g = candidates.build_graph(plan)
    basis_key, basis = cache.basis(plan, base_dir, meter)
    outlooks = {o.key: o for o in lifecycle.plan_outlooks(plan, max(plan.budget.horizon_years, 10))}
    return Context(plan, base_dir, cache, basis_key, basis, g, outlooks)


def size_projects(ctx: Context) -> Context:
    """Stage "projects": each candidate's variant, size and cost today.

    Solar and the battery come with several sizes the optimiser chooses among (``ctx.sizes``):
    the array up to the largest the roof holds and the electrified home uses in a year (the
    typical year with every other project done, capacity remedies, the battery and the roof
    aside), the battery from the catalog's sizes and the one the plan's critical loads need.
    ``details`` holds the largest array and the default battery until the optimiser has chosen.
    A size in the plan's options, or a winter share for the array, fixes the size.
    """
    plan, basis = ctx.plan, ctx.basis
    cands = [ctx.graph.nodes[n]["candidate"] for n in candidates.project_nodes(ctx.graph)]
    kinds = catalog.upgrade_kinds()
    electrified = {c.id for c in cands if c.kind not in ("solar", "battery", "roof")
                   and not kinds[c.kind].capacity_remedy}
    provisional = ctx.with_details({c.id: detail(plan, c, basis, 0.0, 1.0) for c in cands if c.kind != "solar"})
    state = provisional.energy(frozenset(electrified))
    load_kwh = state.units.get("electricity_kwh", 0.0)
    yield_kwh = specific_yield(ctx)
    details = dict(provisional.details)
    sizes = {}
    need = backup_need(plan)
    for c in cands:
        opt = plan.options.get(c.id)
        fixed = opt is not None and (opt.size is not None or opt.winter_cover_pct is not None)
        if c.kind == "solar":
            want = None
            if opt is not None and opt.winter_cover_pct is not None and opt.size is None:
                per_kw = monthly_sums(ctx.basis.site.pv_ac_kw(roof_array(plan, 1.0)))
                want, _ = winter_array_kw(plan, state.summary.monthly["electricity_kwh"], per_kw,
                                          opt.winter_cover_pct)
            largest = solar_size_kw(plan, load_kwh, yield_kwh, want)
            details[c.id] = detail(plan, c, basis, load_kwh, yield_kwh,
                                   size_override=None if opt is not None and opt.size else largest)
        if c.kind in ("solar", "battery") and not fixed and c.id not in plan.choices.exclude:
            choices = size_choices(c.kind, details[c.id].size, need.battery_kwh if need else None)
            if len(choices) > 1:
                sizes[c.id] = tuple(detail(plan, c, basis, load_kwh, yield_kwh, size_override=x)
                                    for x in choices)
    return ctx.with_details(details).with_sizes(sizes)


def monthly_sums(hourly: np.ndarray) -> tuple[float, ...]:
    """Twelve monthly totals of an hourly year (kWh from kW)."""
    return tuple(float(x) for x in np.add.reduceat(hourly, timegrid.month_start_hours()))


def specific_yield(ctx: Context) -> float:
    """kWh AC per kW DC per year on this roof (pvlib PVWatts via the energy engine)."""
    return float(ctx.basis.site.pv_ac_kw(roof_array(ctx.plan, 1.0)).sum())

