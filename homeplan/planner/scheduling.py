"""Turn a home's projects into the abstract scheduling problem, solve it, refine once.

Per project and year the scheduler gets (see :mod:`homeplan.schedule.problem`):

- ``cost_usd[t]``: installed cost in year t (catalog or quote, changed by inflation or a
  learning curve) minus the point-of-sale incentives of that year;
- ``value_usd[t]``: present value at the first year of the bill savings over the equipment's
  life if installed at the start of year t (each fuel's price escalating at its own rate), plus
  the later rebates and tax credits, discounted to when they arrive;
- ``undone_penalty_usd[t]``: for projects that replace an appliance (or a roof), the chance it
  fails in year t times the cost of an emergency like-for-like replacement - the cost of being
  caught by a failure, which also locks in another appliance lifetime of the old fuel;
- ``savings_usd[t]``: the year-t bill savings, for "add bill savings to later budgets";
- ``emissions_kg[t]``: CO2 saved from year t to the end of the horizon.

References
----------
NIST Handbook 135 (life-cycle cost: present value of escalating energy savings);
Weibull end-of-life risk from :mod:`homeplan.planner.lifecycle`.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

from homeplan import catalog
from homeplan.catalog import performance
from homeplan.money.finance import discount_factor, remaining_value_share
from homeplan.plan.fuels import HOME_FUELS, appliance_fuel
from homeplan.planner.backup import backup_need, resilience_share
from homeplan.planner.breakdowns import (
    LFL_PREFIX,
    EmergencyItem,
    breakdown_cost,
    emergency_items,
    fossil_projects,
    lfl_cost,
    replaceable_items,
)
from homeplan.planner.candidates import (
    INSTALL_ORDER,
    MILESTONE_FOR_FUEL,
    dual_fuel_backup,
    install_order,
    prerequisites_closure,
)
from homeplan.planner.capacity import CapacityModel, breaker_spaces
from homeplan.planner.context import Context
from homeplan.planner.incentives import IncentiveModel
from homeplan.planner.projects import ProjectDetail, cost_in_year_usd
from homeplan.planner.risk import price_paths, scenario_base_usd, scenario_values
from homeplan.schedule.explain import diagnose_infeasible, explain, first_true
from homeplan.schedule.milp import MilpSolver, Solution
from homeplan.schedule.problem import (
    ExclusiveGroup,
    FollowUp,
    IncentiveGroup,
    Prerequisite,
    Problem,
    Project,
    Target,
)

__all__ = [
    "COVER_PREFIX",
    "OBJECTIVE",
    "PLAN_SOLVER",
    "ORDER_PREFIX",
    "SIZE_SEP",
    "Coefficients",
    "ScheduleOutcome",
    "build_problem",
    "coefficients",
    "emergency_allowance",
    "emergency_reason",
    "maintenance_savings_usd",
    "schedule",
    "size_alternatives",
    "work_order",
]

OBJECTIVE = {"best_value": "max_npv", "lowest_emissions": "min_emissions",
             "home_fuel_off_soonest": "earliest_gas_closure", "least_out_of_pocket": "min_out_of_pocket",
             "risk_aware": "min_cost_cvar"}
"""Plan-file objective -> the scheduler's own name for it (the result names it as the plan does)."""

ORDER_PREFIX = "order:"
COVER_PREFIX = "covered:"


@dataclass(frozen=True)
class Coefficients:
    """One project's money and emissions by year index, measured against a given home state."""

    cost_usd: list[float]
    pos_incentive_usd: list[float]
    later_incentive_usd: list[float]
    savings_by_fuel: dict[str, float]      # annual, today's prices
    emissions_saved_kg: float              # per year
    resilience_usd_per_year: float = 0.0   # the household's value of riding through outages
    maintenance_usd_per_year: float = 0.0  # an electric car's lower maintenance, today's prices


@dataclass(frozen=True)
class ScheduleOutcome:
    """The problem solved last, its solution, the coefficients behind it and what explains it."""

    problem: Problem
    solution: Solution
    coefficients: dict[str, Coefficients]
    capacity: CapacityModel
    reasons: dict[str, tuple[str, ...]] = field(default_factory=dict)
    infeasibility: str | None = None
    passes: int = 1
    notes: tuple[str, ...] = ()
    details: dict[str, ProjectDetail] = field(default_factory=dict)   # sizes the optimiser chose
    size_values: dict[str, dict[float, float]] = field(default_factory=dict)  # NPV by size offered


def coefficients(ctx: Context, pid: str, before: set[str], incentives: IncentiveModel) -> Coefficients:
    """Coefficients of one project measured against the home with ``before`` done."""
    context = set(before) | prerequisites_closure(ctx.graph, pid)
    context.discard(pid)
    e0 = ctx.energy(frozenset(context))
    e1 = ctx.energy(frozenset(context | {pid}))
    fuels = set(e0.bills_usd) | set(e1.bills_usd)
    savings = {f: e0.bills_usd.get(f, 0.0) - e1.bills_usd.get(f, 0.0) for f in fuels}
    costs, pos, later = [], [], []
    d = ctx.details[pid]
    for year in ctx.years:
        c = cost_in_year_usd(d, ctx.plan, year)
        p, lt = incentives.estimate(pid, year, c)
        costs.append(c)
        pos.append(p)
        later.append(lt)
    need = backup_need(ctx.plan)
    resilience = (need.value_usd_per_year * resilience_share(need, d.size)
                  if need is not None and d.kind == "battery" else 0.0)
    return Coefficients(costs, pos, later, savings, e0.emissions_kg - e1.emissions_kg, resilience,
                        maintenance_savings_usd(ctx, pid))


def maintenance_savings_usd(ctx: Context, pid: str) -> float:
    """What an electric vehicle saves in maintenance a year against the gasoline car it replaces,
    at today's prices (0 for other projects).

    References
    ----------
    Burnham et al. (2021), ANL/ESD-21/4 (maintenance cost per mile by powertrain; the values in
    data/equipment_performance.csv are marked from memory).
    """
    d = ctx.details.get(pid)
    if d is None or d.kind != "ev":
        return 0.0
    keys = [ctx.plan.vehicle_key(i) for i in range(len(ctx.plan.vehicles))]
    veh = ctx.plan.vehicles[keys.index(d.candidate.replaces[0])]
    p = performance()
    return veh.miles_per_year * (p["maintenance_usd_per_mile_gasoline"] - p["maintenance_usd_per_mile_ev"])


def _value(ctx: Context, co: Coefficients, t: int, life: float) -> float:
    """Present value at the first year of a project installed at the start of year index t.

    Bill savings count for the years of the horizon it runs (each fuel escalating at its own
    rate); the equipment still has value at the end of the horizon, counted as its remaining
    share of what the household paid (straight-line over its life, NIST Handbook 135); later
    rebates and tax credits count in the year after installation. A battery also earns the
    yearly value the household gives to riding through outages (its share of the outage), in
    the optimiser's choice only: it is no cash flow.
    """
    rate = ctx.plan.budget.discount_rate_pct
    T = len(ctx.years)
    total = 0.0
    for k in range(t, T):
        df = discount_factor(rate, k)
        for fuel, s in co.savings_by_fuel.items():
            total += s * (1.0 + ctx.escalation(fuel)) ** k * df
        total += co.resilience_usd_per_year * df
        if co.maintenance_usd_per_year:  # electric cars only
            total += co.maintenance_usd_per_year * (1.0 + ctx.plan.prices.inflation_pct / 100.0) ** k * df
    paid = co.cost_usd[t] - co.pos_incentive_usd[t] - co.later_incentive_usd[t]
    remaining = remaining_value_share(T - t, life)
    return (total + co.later_incentive_usd[t] * discount_factor(rate, t + 1)
            + paid * remaining * discount_factor(rate, T))


def all_electric_by(ctx: Context, implicit_target: bool) -> int | None:
    """The year the plan must be fully electric by: the plan's deadline, else (with the goal and
    ``implicit_target``) the last year of the horizon."""
    by = ctx.plan.choices.all_electric_by
    if by is None and ctx.plan.choices.all_electric and implicit_target:
        by = ctx.years[-1]
    return by


def build_problem(ctx: Context, co: dict[str, Coefficients], capacity: CapacityModel,
                  implicit_target: bool = True, delay: int | None = 0,
                  groups: tuple[IncentiveGroup, ...] = (),
                  alternatives: dict[str, ProjectDetail] | None = None,
                  series: dict[str, tuple] | None = None) -> Problem:
    """The scheduling problem. ``delay``: years allowed past each appliance's replace-by year
    (None: no replace-by windows). ``alternatives``: other sizes of the sized projects (id
    ``<project>@<size>`` -> detail), offered beside the project itself, at most one of them.
    ``series``: a dict kept by a caller that builds the problem again with the same context and
    coefficients (another ``delay`` or target): each project's yearly values, computed once."""
    plan = ctx.plan
    years = ctx.years
    T = len(years)
    projects = []
    alternatives = alternatives or {}
    sized = {d.id for d in alternatives.values()}
    urgent = {e.upgrade for e in emergency_items(ctx)}  # a failure overrides a later pin
    objective, objective_project = _objective(ctx)
    # the risk-aware objective: the same projects valued on sampled price paths
    paths = price_paths(ctx, plan.choices.risk_scenarios, T) if objective == "min_cost_cvar" else None
    for entry, d in [*ctx.details.items(), *alternatives.items()]:
        pid = d.id
        c = co[entry]
        life = d.life_years
        if series is not None and entry in series:
            value, scenarios, savings, emissions = series[entry]
        else:
            value = [_value(ctx, c, t, life) for t in range(T)]
            scenarios = () if paths is None else tuple(
                tuple(v) for v in scenario_values(ctx, c.savings_by_fuel, value, paths).tolist())
            savings = [sum(s * (1 + ctx.escalation(f)) ** t for f, s in c.savings_by_fuel.items())
                       + c.maintenance_usd_per_year * (1 + plan.prices.inflation_pct / 100.0) ** t
                       for t in range(T)]
            emissions = [c.emissions_saved_kg * (T - t) for t in range(T)]
            if series is not None:
                series[entry] = (value, scenarios, savings, emissions)
        penalty = [0.0] * T
        cumulative = [0.0] * T
        item = ""
        for key in d.candidate.replaces:
            o = ctx.outlooks.get(key)
            if o is None or o.kind == "vehicle":
                continue
            if not item or (o.cumulative_failure_pct[0] > cumulative[0] * 100):
                item = f"the {o.label}"
                cumulative = [x / 100.0 for x in o.cumulative_failure_pct[:T]]
                cumulative += [cumulative[-1] if cumulative else 0.0] * (T - len(cumulative))
        latest = None
        if delay is not None and pid not in plan.choices.pins:
            ends = [ctx.outlooks[k].replace_by_year for k in d.candidate.replaces
                    if k in ctx.outlooks and ctx.outlooks[k].kind != "vehicle"]
            if ends:
                latest = max(min(ends), ctx.first_year) + delay
                latest = latest if latest < years[-1] else None
        earliest = None
        if d.kind == "ev":
            veh = plan.vehicles[[plan.vehicle_key(i) for i in range(len(plan.vehicles))].index(d.candidate.replaces[0])]
            if veh.replace_year is not None and pid not in plan.choices.pins:
                earliest = max(veh.replace_year, ctx.first_year)
        pinned = None if pid in urgent else plan.choices.pins.get(pid)
        if pid in sized and pinned is not None:  # one of the sizes, in the pinned year
            earliest = latest = pinned
            pinned = None
        projects.append(Project(
            id=entry, label=d.label if entry == pid else f"{d.label}, {d.size_text()}",
            cost_usd=[c.cost_usd[t] - c.pos_incentive_usd[t] for t in range(T)],
            value_usd=value, emissions_kg=emissions, savings_usd=savings,
            undone_penalty_usd=penalty, excluded=pid in plan.choices.exclude or pid in capacity.excluded,
            earliest_year=earliest, latest_year=latest,
            pinned_year=pinned,
            window_reason=_window_reason(item, latest, delay, plan.choices.replace_at_risk_pct,
                                         cumulative, ctx.first_year),
            capacity_use=max(capacity.use.get(pid, 0.0), 0.0),
            capacity_provided=capacity.provided.get(pid, 0.0) + max(-capacity.use.get(pid, 0.0), 0.0),
            spaces_use=float(max(breaker_spaces(ctx, d, capacity), 0)),
            spaces_provided=float(max(-breaker_spaces(ctx, d, capacity), 0)
                                  + catalog.upgrade_kinds()[d.kind].extra.get("provides_spaces", 0)),
            failure_item=item, failure_prob_by_year=cumulative if item else (),
            scenario_value_usd=scenarios,
        ))
    prereqs = []
    for u, v, data in ctx.graph.edges(data=True):
        if data["kind"] == "requires" and u in ctx.details and v in ctx.details:
            prereqs.append(Prerequisite(project=v, requires_any=(u,), label=data.get("why", "")))
    followups = []
    for fuel, milestone in MILESTONE_FOR_FUEL.items():
        if milestone not in ctx.details or milestone in plan.choices.pins:
            continue
        after = tuple(u for u, _, data in ctx.graph.in_edges(milestone, data=True)
                      if data["kind"] == "requires" and u in ctx.details)
        if after:
            # common practice, no source: an unused tank is a leak and fire risk and an open
            # service keeps its fixed charge: the fuel goes within a year of its last appliance
            followups.append(FollowUp(milestone, after, 1,
                                      f"within a year of the last {fuel} appliance's replacement"))
    order_projects, order_prereqs, exclusive = better_before(ctx)
    projects.extend(order_projects)
    prereqs.extend(order_prereqs)
    extra, extra_prereqs = breakdown_projects(ctx, excluded_lfl=bool(all_electric_by(ctx, implicit_target)))
    projects.extend(extra)
    prereqs.extend(extra_prereqs)
    targets = []
    by = all_electric_by(ctx, implicit_target)
    if by is not None:
        ids = tuple(p for p in fossil_projects(ctx)
                    if p not in plan.choices.exclude and _reachable(ctx, p, by))
        if ids:
            targets.append(Target(ids, by, "fully electric"))
    if alternatives:
        prereqs, exclusive, groups = _offer_sizes(ctx, alternatives, prereqs, exclusive, groups)
    b = plan.budget
    budget = [float((b.by_year or {}).get(y, b.usd_per_year)) for y in years]
    budget[0] += emergency_allowance(ctx, co)
    loan_limit = sum(loan.amount_usd for loan in b.loans)
    first_loan = b.loans[0] if b.loans else None
    return Problem(
        first_year=ctx.first_year, budget_usd=budget, projects=tuple(projects), carryover=b.carryover,
        discount_rate=b.discount_rate_pct / 100.0, loan_limit_usd=loan_limit,
        loan_rate=(first_loan.rate_pct / 100.0) if first_loan else 0.0,
        loan_term_years=first_loan.term_years if first_loan else 10,
        savings_to_budget=b.add_bill_savings, prerequisites=tuple(prereqs),
        capacity_base=capacity.base_headroom, max_per_year=plan.choices.max_projects_per_year,
        spaces_base=(None if plan.home.electrical.free_spaces is None
                     else float(plan.home.electrical.free_spaces)),
        incentive_groups=tuple(g for g in groups if all(pid in ctx.details or pid in alternatives
                                                         for pid, _ in g.rates)),
        targets=tuple(targets), objective=objective, objective_project=objective_project,
        exclusive_groups=tuple(exclusive), followups=tuple(followups),
        scenario_base_usd=() if paths is None else tuple(scenario_base_usd(ctx, paths).tolist()),
        risk_weight=plan.choices.risk_weight, risk_tail=plan.choices.risk_tail_pct / 100.0,
    )


SIZE_SEP = "@"
"""Separates a sized project's id from the size of one of its alternatives (``solar@6``)."""


def size_alternatives(ctx: Context) -> dict[str, ProjectDetail]:
    """The other sizes of each sized project (solar, battery), by alternative id: every size
    the optimiser may choose except the one ``ctx.details`` holds."""
    out: dict[str, ProjectDetail] = {}
    for pid, options in ctx.sizes.items():
        if pid not in ctx.details or pid in ctx.plan.choices.exclude:
            continue
        for alt in options:
            if alt.size != ctx.details[pid].size:
                out[f"{pid}{SIZE_SEP}{alt.size:g}"] = alt
    return out


def _offer_sizes(ctx: Context, alternatives: dict[str, ProjectDetail], prereqs: list[Prerequisite],
                 exclusive: list[ExclusiveGroup], groups: tuple[IncentiveGroup, ...]
                 ) -> tuple[list[Prerequisite], list[ExclusiveGroup], tuple[IncentiveGroup, ...]]:
    """The rules of a sized project hold for each of its sizes: what it needs, what needs it
    (any size will do), its exclusions and its capped incentives; and at most one size is done
    (exactly one when the project is pinned)."""
    by_pid: dict[str, list[str]] = {}
    for aid, d in alternatives.items():
        by_pid.setdefault(d.id, []).append(aid)
    out = []
    for pr in prereqs:
        reqs = tuple(r2 for r in pr.requires_any for r2 in (r, *by_pid.get(r, ())))
        pr = replace(pr, requires_any=reqs)
        out.append(pr)
        out.extend(replace(pr, project=aid) for aid in by_pid.get(pr.project, ()))
    excl = [replace(g, members=tuple(m2 for m in g.members for m2 in (m, *by_pid.get(m, ()))))
            for g in exclusive]
    for pid, ids in by_pid.items():
        excl.append(ExclusiveGroup(members=(pid, *ids), exactly_one=pid in ctx.plan.choices.pins,
                                   label=f"one size of {ctx.details[pid].label.lower()}"))
    grps = tuple(replace(g, rates=tuple((p2, r) for p, r in g.rates for p2 in (p, *by_pid.get(p, ()))))
                 for g in groups)
    return out, excl, grps


def _window_reason(item: str, latest: int | None, delay: int | None, risk_pct: float,
                   cumulative: list[float], first_year: int) -> str:
    """Why a replacement comes no later than ``latest``: the old one reaches the plan's failure
    risk; when the budget forced a later year than that (``delay``), the risk it has reached by
    then, so the reason never quotes a year the roadmap has already passed."""
    if not latest:
        return ""
    name = item or "the old one"
    t = latest - first_year
    if delay and 0 <= t < len(cumulative) and cumulative[t] > 0:
        return (f"{name} reaches {cumulative[t] * 100:.0f} % failure risk in {latest} (the budget "
                f"could not replace it sooner, at {risk_pct:.0f} %)")
    return f"{name} reaches {risk_pct:.0f} % failure risk"


def _objective(ctx: Context) -> tuple[str, str | None]:
    """The scheduler's objective and, for the earliest fuel closure, the milestone it moves.

    A home that burns no gas, oil or propane has no fuel to close: best net present value.
    """
    objective = OBJECTIVE[ctx.plan.choices.objective]
    if objective != "earliest_gas_closure":
        return objective, None
    milestone = next((m for m in MILESTONE_FOR_FUEL.values() if m in ctx.details), None)
    return (objective, milestone) if milestone is not None else ("max_npv", None)


def _target_notes(ctx: Context, implicit_target: bool) -> list[str]:
    """What the plan says about its goal: the cars left out of it, an objective that cannot apply,
    a pin that a failure overrides."""
    notes = []
    for e in emergency_items(ctx):
        pinned = ctx.plan.choices.pins.get(e.upgrade)
        if pinned is not None and pinned != ctx.first_year:
            notes.append(f"the {e.label} has failed: {ctx.details[e.upgrade].label.lower()}, which you "
                         f"pinned to {pinned}, may come in {ctx.first_year} instead")
    backup = dual_fuel_backup(ctx.plan)
    if backup is not None and ctx.plan.choices.all_electric:
        notes.append(f"the {backup.key.replace('_', ' ')} stays as the heat pump's backup, as the plan asks: "
                     f"the home keeps burning {appliance_fuel(backup)} in the coldest hours and is not "
                     "fully electric")
    by = all_electric_by(ctx, implicit_target)
    if by is not None:
        kept = [ctx.details[p].label for p in fossil_projects(ctx) if not _reachable(ctx, p, by)]
        if kept:
            notes.append(f"cars you plan to keep past {by} are not part of the fully-electric goal: "
                         + ", ".join(k.lower() for k in kept))
    if OBJECTIVE[ctx.plan.choices.objective] == "earliest_gas_closure" and _objective(ctx)[1] is None:
        notes.append("objective 'home fuel off soonest': this home burns no gas, oil or propane; "
                     "aiming for the best value instead")
    return notes


def better_before(ctx: Context) -> tuple[list[Project], list[Prerequisite], list[ExclusiveGroup]]:
    """"Better before" order (air sealing before the heat pump is sized; the roof before solar
    when it has less life left than the panels) as a rule that binds only when both are done:
    the later project needs the earlier one, or a free marker that rules the earlier one out.

    References
    ----------
    Common practice, no source (see :mod:`homeplan.planner.candidates`).
    """
    T = len(ctx.years)
    projects, prereqs, groups = [], [], []
    for u, v, data in ctx.graph.edges(data=True):
        if data["kind"] != "better_before" or u not in ctx.details or v not in ctx.details:
            continue
        marker = f"{ORDER_PREFIX}{u}>{v}"
        projects.append(Project(id=marker, label=f"no {ctx.details[u].label.lower()}", cost_usd=[0.0] * T))
        prereqs.append(Prerequisite(project=v, requires_any=(u, marker), label=data.get("why", "")))
        groups.append(ExclusiveGroup(members=(u, marker)))
    return projects, prereqs, groups


def breakdown_projects(ctx: Context, excluded_lfl: bool = False) -> tuple[list[Project], list[Prerequisite]]:
    """Projects that model what happens to an old appliance or roof while it stays in place.

    For each item a project would replace: a "covered" marker that costs nothing, carries the
    item's expected breakdown cost for every year it is not yet done, and can only be done once
    the item is replaced - by its upgrade, or by a like-for-like replacement, which is offered
    as a project of its own (so that keeping the old fuel a while longer is priced fairly). With
    an all-electric target the like-for-like choice is not offered for combustion appliances.
    """
    T = len(ctx.years)
    rate = ctx.plan.budget.discount_rate_pct
    infl = ctx.plan.prices.inflation_pct / 100.0
    projects: list[Project] = []
    prereqs: list[Prerequisite] = []
    emergencies = {e.key: e for e in emergency_items(ctx)}
    for key, (pid, item_cost) in replaceable_items(ctx).items():
        o = ctx.outlooks[key]
        alternatives = [pid]
        today = lfl_cost(ctx, key)
        fossil = o.fuel in HOME_FUELS
        # a failed heat source or water heater is always offered like for like as well
        if key != "roof" and today > 0 and (key in emergencies or not (excluded_lfl and fossil)):
            lid = f"{LFL_PREFIX}{key}"
            costs = [today * (1 + infl) ** t for t in range(T)]
            salvage = [c * remaining_value_share(T - t, o.median_life_years) * discount_factor(rate, T)
                       for t, c in enumerate(costs)]
            projects.append(Project(id=lid, label=f"Replace the {o.label} like-for-like", cost_usd=costs,
                                    value_usd=salvage,
                                    excluded=pid in ctx.plan.choices.pins and key not in emergencies))
            alternatives.append(lid)
        penalty = [breakdown_cost(ctx, key, t, item_cost) for t in range(T)]
        cid = f"{COVER_PREFIX}{key}"
        e = emergencies.get(key)
        projects.append(Project(id=cid, label=f"{o.label} replaced", cost_usd=[0.0] * T,
                                undone_penalty_usd=penalty,
                                pinned_year=ctx.first_year if e is not None else None,
                                pin_reason=emergency_reason(e) if e is not None else ""))
        prereqs.append(Prerequisite(project=cid, requires_any=tuple(alternatives)))
    return projects, prereqs


def emergency_reason(e: EmergencyItem) -> str:
    """Why a failed essential appliance is replaced in the first year, in words."""
    return f"the {e.label} has failed: replaced at once, a home needs {e.service}"


def emergency_allowance(ctx: Context, co: dict[str, Coefficients]) -> float:
    """Money beyond the first year's budget for the failed heat source or water heater: the
    cheapest way to restore each service (like for like when the catalog prices it, else the
    upgrade after point-of-sale incentives), paid from savings, an emergency loan or over budget
    (:func:`homeplan.planner.build.emergency_funding`)."""
    total = 0.0
    for e in emergency_items(ctx):
        if e.like_for_like is not None:
            total += lfl_cost(ctx, e.key)
        else:
            c = co[e.upgrade]
            total += c.cost_usd[0] - c.pos_incentive_usd[0]
    return total


PLAN_SOLVER = MilpSolver(time_limit_s=20.0, mip_rel_gap=1e-5, presolve=True)
"""The solver settings plans use. Presolve on: measured faster on the sample homes' problems
(20-60 ms against 20-100 ms without, benchmarks/bench_pipeline.py), with the presolve-off repeat
of :class:`~homeplan.schedule.milp.MilpSolver` when an answer does not hold up; a 1e-5 relative
gap is well below a dollar on these plans. Graded against exhaustive enumeration by
benchmarks/bench_solver_agreement.py and tests/schedule/test_agreement.py."""


def solve(problem: Problem, start: dict[str, int | None] | None = None) -> Solution:
    """Solve with :data:`PLAN_SOLVER`, from the plan ``start`` when given (project id -> year)."""
    return PLAN_SOLVER.solve(problem, start=start)


def work_order(ctx: Context, placed: dict[str, int]) -> list[str]:
    """Projects and like-for-like replacements (id -> year) in the order the work is done: by
    year, and within a year in the safe order of :func:`~homeplan.planner.candidates.install_order`
    (a like-for-like replacement ranks with the upgrade it stands in for)."""
    items = replaceable_items(ctx)
    urgent = frozenset(p for e in emergency_items(ctx) for p in (e.upgrade, e.like_for_like) if p)
    out: list[str] = []
    for year in sorted(set(placed.values())):
        ranks: dict[str, float] = {}
        for pid in (p for p, y in placed.items() if y == year):
            if pid.startswith(LFL_PREFIX):
                upgrade = items.get(pid[len(LFL_PREFIX):], ("", None))[0]
                kind = ctx.details[upgrade].kind if upgrade in ctx.details else ""
            else:
                kind = ctx.details[pid].kind
            # an emergency replacement comes first, after any room it needs on the service
            ranks[pid] = 0.5 if pid in urgent else INSTALL_ORDER.get(kind, 15)
        out.extend(install_order(ctx.graph, ranks, urgent))
    return out


def _reachable(ctx: Context, pid: str, by: int) -> bool:
    """A car the owner will not replace before ``by`` is not part of the all-electric target."""
    d = ctx.details[pid]
    if d.kind != "ev" or pid in ctx.plan.choices.pins:
        return True
    keys = [ctx.plan.vehicle_key(i) for i in range(len(ctx.plan.vehicles))]
    veh = ctx.plan.vehicles[keys.index(d.candidate.replaces[0])]
    return veh.replace_year is None or veh.replace_year <= by


def _alt_coefficients(ctx: Context, alternatives: dict[str, ProjectDetail], incentives: IncentiveModel,
                      before: dict[str, set[str]]) -> dict[str, Coefficients]:
    """Coefficients of each size alternative, measured like its project (against ``before[pid]``)."""
    out = {}
    for aid, d in alternatives.items():
        trial = ctx.with_size(d)
        out[aid] = coefficients(trial, d.id, before.get(d.id, set()), incentives.with_ctx(trial))
    return out


def _electrified(ctx: Context) -> set[str]:
    """Every project that changes the home's use (capacity remedies, solar, the battery and the
    roof aside): the home a sized project is first measured against."""
    kinds = catalog.upgrade_kinds()
    return {pid for pid, d in ctx.details.items() if d.kind not in ("solar", "battery", "roof")
            and not kinds[d.kind].capacity_remedy and pid not in ctx.plan.choices.exclude}


def _chosen_sizes(ctx: Context, solution: Solution, alternatives: dict[str, ProjectDetail]) -> Context:
    """The context with each sized project at the size the solution chose (unchanged when it
    chose the size ``ctx.details`` holds, or none)."""
    years = solution.done()
    chosen = [d for aid, d in alternatives.items() if aid in years]
    for d in chosen:
        ctx = ctx.with_size(d)
    return ctx


def _as_projects(solution: Solution, alternatives: dict[str, ProjectDetail]) -> dict[str, int]:
    """The solution's placements with each size alternative named by its project."""
    return {(alternatives[p].id if p in alternatives else p): y for p, y in solution.done().items()}


def schedule(ctx: Context, capacity: CapacityModel, incentives: IncentiveModel) -> ScheduleOutcome:
    """Solve, refine the project values in the order found, solve again.

    The sized projects (solar, battery) are offered at each of their sizes in the first two
    solves, at most one size each; the last problem has the sizes chosen (``outcome.details``)
    and the second solve's plan (optimal for it: no third solve).
    Their savings are measured against the home they serve most of their life: the electrified
    home (first solve), then the plan's end state (second solve)."""
    notes: list[str] = []
    key = (f"groups:{id(incentives.programs)}:{[(p, d.cost_today_usd) for p, d in ctx.details.items()]}:"
           f"{ctx.first_year}:{len(ctx.years)}:{ctx.plan.prices.model_dump_json()}:"
           f"{ctx.plan.household.model_dump_json()}")
    groups = ctx.cache.memo(key, incentives.groups)
    start = ctx  # the sizes assumed before the optimiser chose
    alts = size_alternatives(ctx)
    electrified = _electrified(ctx)
    first = {pid: (electrified - {pid} if pid in ctx.sizes else set()) for pid in ctx.details}
    co = {pid: coefficients(ctx, pid, first[pid], incentives) for pid in ctx.details}
    co.update(_alt_coefficients(ctx, alts, incentives, first))
    implicit = ctx.plan.choices.all_electric_by is None and ctx.plan.choices.all_electric
    notes.extend(_target_notes(ctx, implicit))
    problem, solution, delay = _solve_relaxing(ctx, co, capacity, implicit, groups, notes, alts)
    if not solution.feasible and implicit and problem.targets:
        why = diagnose_infeasible(problem)
        notes.append(f"fully electric by {ctx.years[-1]} is out of reach: {why} This plan does "
                     "the most it can within the budget.")
        implicit = False
        problem, solution, delay = _solve_relaxing(ctx, co, capacity, implicit, groups, notes, alts)
    passes = 1
    size_values: dict[str, dict[float, float]] = {}
    if solution.feasible:
        ctx = _chosen_sizes(ctx, solution, alts)
        done = {p: y for p, y in _as_projects(solution, alts).items() if p in ctx.details}
        alts = size_alternatives(ctx)
        order = work_order(ctx, done)
        co2, before = {}, {}
        for pid in ctx.details:
            before[pid] = set(order[:order.index(pid)]) if pid in done else set(done)
            if pid in ctx.sizes:  # sized for the home it serves most of its life: the plan's end
                before[pid] = set(done) - {pid}
            co2[pid] = coefficients(ctx, pid, before[pid], incentives.with_ctx(ctx))
        co2.update(_alt_coefficients(ctx, alts, incentives, before))
        problem2 = build_problem(ctx, co2, capacity, implicit_target=implicit, delay=delay, groups=groups,
                                 alternatives=alts)
        # from the first answer: every project of the second problem, done in the year it was
        solution2 = solve(problem2, start={p: None for p in problem2.ids} | _as_projects(solution, alts))
        if solution2.feasible:
            problem, solution, co, passes = problem2, solution2, co2, 2
            size_values = _size_values(ctx, problem2, solution2, alts)
            if alts:  # the sizes chosen, then the plan solved with them alone
                ctx = _chosen_sizes(ctx, solution2, alts)
                names = {aid: d.id for aid, d in alts.items() if aid in solution2.done()}
                co3 = {pid: co2[next((a for a, p in names.items() if p == pid), pid)] for pid in ctx.details}
                problem3 = build_problem(ctx, co3, capacity, implicit_target=implicit, delay=delay,
                                         groups=groups)
                # the second solve restricted to the sizes it chose: feasible, and optimal since the
                # third problem is the second with the other sizes not done - no need to solve it
                problem, solution, co, passes = problem3, _restricted(solution2, alts, names), co3, 3
    sized = {pid: ctx.details[pid] for pid in start.sizes if pid in ctx.details
             and ctx.details[pid] is not start.details.get(pid)}
    if solution.status == "time_limit":
        gap = solution.mip_gap
        within = f" it is within {100 * gap:.2g} % of the best possible" if gap is not None and gap == gap else ""
        notes.append(f"The search for the best order stopped at its {PLAN_SOLVER.time_limit_s:g} s limit;"
                     f"{within or ' it may not be the best possible'}.")
    if not solution.feasible:
        return ScheduleOutcome(problem, solution, co, capacity, infeasibility=diagnose_infeasible(problem),
                               passes=passes, notes=tuple(notes), details=sized)
    reasons = dict(explain(problem, solution))
    for pid, values in size_values.items():
        if pid in solution.done():
            reasons[pid] = (*reasons.get(pid, ()), _size_reason(ctx, pid, values))
    return ScheduleOutcome(problem, solution, co, capacity, reasons=reasons, passes=passes,
                           notes=tuple(notes), details=sized, size_values=size_values)


def _restricted(solution: Solution, alternatives: dict[str, ProjectDetail],
                chosen: dict[str, str]) -> Solution:
    """A solution with size alternatives, as a solution of the problem without them: each chosen
    alternative's year under its project's id (``chosen``: alternative id -> project id)."""
    years = {p: y for p, y in solution.years.items() if p not in alternatives}
    for aid, pid in chosen.items():
        years[pid] = solution.years[aid]
    return replace(solution, years=years)


def _size_values(ctx: Context, problem: Problem, solution: Solution,
                 alternatives: dict[str, ProjectDetail]) -> dict[str, dict[float, float]]:
    """For each sized project: the net present value (to the first year) of each of its sizes,
    done in the year the solution placed it (or the first year when it left it out)."""
    years = _as_projects(solution, alternatives)
    rate = ctx.plan.budget.discount_rate_pct
    out: dict[str, dict[float, float]] = {}
    for pid in ctx.sizes:
        if pid not in ctx.details:
            continue
        t = years.get(pid, ctx.first_year) - ctx.first_year
        ids = [pid] + [aid for aid, d in alternatives.items() if d.id == pid]
        vals = {}
        for aid in ids:
            pr = problem.project(aid)
            size = (alternatives[aid] if aid in alternatives else ctx.details[pid]).size
            vals[size] = pr.value_usd[t] - pr.cost_usd[t] * discount_factor(rate, t)
        out[pid] = dict(sorted(vals.items()))
    return out


def _size_reason(ctx: Context, pid: str, values: dict[float, float]) -> str:
    """Why this size, in words: the value of each size the optimiser weighed."""
    d = ctx.details[pid]
    unit = "kW" if d.kind == "solar" else "kWh"
    e = ctx.plan.prices.electricity
    rule = {"net_metering": "net metering", "none": "no export",
            "net_billing": "net billing"}[e.export]
    if e.export == "net_billing":
        rate = e.export_usd_per_kwh if e.export_usd_per_kwh is not None else performance()[
            "net_billing_export_usd_per_kwh"]
        rule += f" at {rate:.2f} USD/kWh"
    if e.export_limit_kw is not None and e.export != "none":
        rule += f", exports limited to {e.export_limit_kw:g} kW"
    if e.time_of_use:
        rule += ", time-of-use prices"
    each = ", ".join(f"{s:g} {unit} {v:+,.0f}" for s, v in values.items())
    text = (f"{d.size:g} {unit} chosen for value among the sizes offered ({rule}); net present value "
            f"of each over the plan, USD: {each}")
    best = max(values, key=lambda x: values[x])
    if best != d.size and values[best] > values.get(d.size, values[best]) + 1.0:
        text += (f" ({best:g} {unit} is worth more on its own, but the plan as a whole does better "
                 "with this size: the budget and the other steps)")
    return text


def _solve_relaxing(ctx: Context, co: dict[str, Coefficients], capacity: CapacityModel, implicit: bool,
                    groups: tuple[IncentiveGroup, ...], notes: list[str],
                    alternatives: dict[str, ProjectDetail] | None = None
                    ) -> tuple[Problem, Solution, int | None]:
    """Solve with the replace-by windows; if the budget cannot meet them, allow the fewest
    extra years that make it feasible, and finally drop the windows (saying so in ``notes``).

    Each extra year only widens the windows, so the fewest is found by galloping search with
    feasibility tests (:meth:`MilpSolver.feasible`, a few ms each), and only the problem
    chosen is solved in full."""

    series: dict[str, tuple] = {}
    built: dict[int | None, Problem] = {}  # the problem a feasibility test found is solved as built

    def build(delay: int | None) -> Problem:
        if delay not in built:
            built[delay] = build_problem(ctx, co, capacity, implicit_target=implicit, delay=delay,
                                         groups=groups, alternatives=alternatives, series=series)
        return built[delay]

    problem = build(0)
    solution = solve(problem)
    if solution.feasible:
        return problem, solution, 0
    if not any(p.latest_year for p in problem.projects):
        return problem, solution, None
    delay = first_true(1, len(ctx.years) - 1, lambda d: PLAN_SOLVER.feasible(build(d)))
    problem = build(delay)
    if delay is None and not PLAN_SOLVER.feasible(problem):
        return problem, Solution("infeasible", solver="highs",
                                 message="no plan meets every constraint, even without the windows"), None
    solution = solve(problem)
    if solution.feasible:
        if delay:
            notes.append(f"the budget cannot replace every appliance by its replace-by year; "
                         f"the plan allows up to {delay} more year(s)")
        else:
            notes.append("the budget cannot replace the appliances before their likely "
                         "failure; the plan accepts the risk")
    return problem, solution, delay if solution.feasible else None
