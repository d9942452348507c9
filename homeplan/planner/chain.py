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
from homeplan.energy.meter import IntervalSeries
from homeplan.energy.solar import SolarArraySpec
from homeplan.errors import PlanRuleError
from homeplan.plan.files import PlanFolder, as_folder
from homeplan.plan.hashing import content_hash
from homeplan.plan.load import LoadedPlan
from homeplan.plan.model import Plan
from homeplan.planner import candidates, lifecycle
from homeplan.planner.adjust import Adjustments
from homeplan.planner.build import build_result
from homeplan.planner.capacity import plan_capacity
from homeplan.planner.context import Context, PlannerCache
from homeplan.planner.incentives import IncentiveModel, plan_programs
from homeplan.planner.meter import meter_summary, read_meter
from homeplan.planner.projects import detail
from homeplan.planner.risk import with_price_risk
from homeplan.planner.scheduling import schedule
from homeplan.result.plan_result import PlanResult

__all__ = ["STAGES", "plan_roadmap", "prepare_home", "size_projects", "specific_yield"]

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
    ctx = ctx.with_details(capacity.details)
    incentives = IncentiveModel(ctx, plan_programs(ctx))
    outcome = schedule(ctx, capacity.model, incentives)
    notes = (ctx.basis.weather_note, *ctx.basis.notes, *capacity.model.notes, *outcome.notes,
             *incentives.notes)
    result = with_price_risk(ctx, build_result(ctx, capacity.model, incentives, outcome, notes))
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

    Solar is sized to the electrified home's use: the typical year with every other project done
    (capacity remedies, the battery and the roof aside).
    """
    plan, basis = ctx.plan, ctx.basis
    cands = [ctx.graph.nodes[n]["candidate"] for n in candidates.project_nodes(ctx.graph)]
    kinds = catalog.upgrade_kinds()
    electrified = {c.id for c in cands if c.kind not in ("solar", "battery", "roof")
                   and not kinds[c.kind].capacity_remedy}
    provisional = ctx.with_details({c.id: detail(plan, c, basis, 0.0, 1.0) for c in cands if c.kind != "solar"})
    load_kwh = provisional.energy(frozenset(electrified)).units.get("electricity_kwh", 0.0)
    yield_kwh = specific_yield(ctx)
    details = {c.id: (detail(plan, c, basis, load_kwh, yield_kwh) if c.kind == "solar"
                      else provisional.details[c.id]) for c in cands}
    return ctx.with_details(details)


def specific_yield(ctx: Context) -> float:
    """kWh AC per kW DC per year on this roof (pvlib PVWatts via the energy engine)."""
    roof = ctx.plan.home.roof
    spec = SolarArraySpec(dc_kw=1.0, tilt_deg=roof.tilt_deg if roof else 25.0,
                          azimuth_deg=roof.azimuth_deg if roof else 180.0)
    return float(ctx.basis.site.pv_ac_kw(spec).sum())

