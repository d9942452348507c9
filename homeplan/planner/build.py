"""Turn the scheduler's solution into the Roadmap and PlanResult the views show.

Every number here comes from the full simulation of the home in each year's state and from the
exact incentive rules for the chosen purchases - not from the scheduler's linear coefficients.

Conventions (stated on the screens): a project placed in year Y is installed at the start of Y
and saves from Y on; costs and bills are nominal dollars (costs follow inflation or a learning
curve, each fuel's price its own escalation); the net present value is the plan's cash flows
minus the do-nothing cash flows, discounted to the first year, plus the remaining value of the
equipment at the end of the horizon (straight-line over its life).

References
----------
NIST Handbook 135, "Life-Cycle Costing Manual for the Federal Energy Management Program"
(present value, residual value by straight-line depreciation).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from homeplan import catalog
from homeplan.energy.selection import HeatPumpSelection
from homeplan.money.finance import Loan, discount_factor, loan_schedule, remaining_value_share
from homeplan.plan.fuels import BILL_FUELS, HOME_FUELS, appliance_fuel
from homeplan.plan.hashing import content_hash
from homeplan.planner.baselines import bills_in_year, do_nothing, like_for_like
from homeplan.planner.breakdowns import (
    LFL_PREFIX,
    breakdowns_by_year,
    emergency_items,
    expected_breakdowns,
    fossil_projects,
    replaceable_items,
)
from homeplan.planner.candidates import dual_fuel_backup
from homeplan.planner.capacity import (
    CapacityModel,
    breaker_spaces,
    other_method_capacity,
    state_capacity,
)
from homeplan.planner.context import Context
from homeplan.planner.finance import plan_returns, project_returns, solar_hedge
from homeplan.planner.incentives import AwardLine, IncentiveModel
from homeplan.planner.projects import cost_in_year_usd
from homeplan.planner.scheduling import (
    COVER_PREFIX,
    OBJECTIVE,
    ORDER_PREFIX,
    ScheduleOutcome,
    work_order,
)
from homeplan.planner.states import peak_fields
from homeplan.result.figures import (
    CapacityState,
    Finance,
    HourlyProfile,
    ProjectInfo,
    SolverReport,
)
from homeplan.result.plan_result import PlanResult
from homeplan.result.roadmap import Emergency, IncentiveLine, Milestone, Roadmap, Step, YearTotals
from homeplan.schedule.problem import evaluate
from homeplan.units import BTUH_PER_TON, heat_output_words

__all__ = ["assumptions", "build_result", "hourly_profiles", "milestones_of", "project_infos", "rounded"]

MILESTONE_KIND = {"close_gas": "gas_service_closed", "remove_propane_tank": "propane_tank_removed",
                  "remove_oil_tank": "oil_tank_removed"}


@dataclass(frozen=True)
class LoanFlows:
    """Borrowing and loan payments by calendar year."""

    borrowed: dict[int, float]
    payments: dict[int, float]


def _objective_key(engine_name: str) -> str:
    """The plan's name for the objective the scheduler used (one name everywhere)."""
    return next((k for k, v in OBJECTIVE.items() if v == engine_name), engine_name)


def project_infos(ctx: Context) -> tuple[ProjectInfo, ...]:
    """Every candidate project as the views show it."""
    ch = ctx.plan.choices
    return tuple(
        ProjectInfo(
            id=d.id, kind=d.kind, label=d.label, variant=d.variant, variant_label=d.variant_label,
            size=d.size, size_unit=d.size_unit, cost_usd=d.cost_today_usd, cost_source=d.cost_source,
            replaces=d.candidate.replaces, cautions=d.candidate.cautions,
            excluded=d.id in ch.exclude, pinned_year=ch.pins.get(d.id),
        )
        for d in ctx.details.values()
    )


def _state_by_year(ctx: Context, done: dict[str, int]) -> dict[int, set[str]]:
    return {y: {p for p, py in done.items() if py <= y} for y in ctx.years}


def _salvage(ctx: Context, pid: str, year: int, cost: float) -> float:
    """Remaining value at the end of the horizon, straight-line over the equipment life."""
    life = ctx.details[pid].life_years if pid in ctx.details else 15.0
    end = ctx.first_year + len(ctx.years)
    return max(0.0, cost * remaining_value_share(end - year, life))


def build_result(ctx: Context, capacity: CapacityModel, incentives: IncentiveModel,
                 outcome: ScheduleOutcome, notes: tuple[str, ...] = ()) -> PlanResult:
    """The result of planning: the roadmap and every figure beside it.

    ``notes`` are what the earlier stages had to say (weather, calibration, capacity, the
    goal); the result's warnings are those followed by this stage's own.
    """
    plan = ctx.plan
    sol = outcome.solution
    rate = plan.budget.discount_rate_pct
    T = len(ctx.years)
    notes_out = list(notes)
    base_energy = ctx.energy(frozenset(), "today")
    infos = project_infos(ctx)
    outlooks = tuple(ctx.outlooks.values())
    cautions_all = catalog.cautions(plan.home.electrical.code_edition)
    if not sol.feasible:
        roadmap = Roadmap(
            plan_name=plan.home.name or "home", first_year=ctx.first_year, horizon_years=T,
            objective=_objective_key(outcome.problem.objective), status="infeasible",
            infeasibility=outcome.infeasibility, cautions=(cautions_all["planning"],),
            assumptions=assumptions(ctx), calibration=ctx.basis.bill_fits,
        )
        today_cap = state_capacity(ctx, capacity, set(), "today", None)
        return PlanResult(plan, roadmap, outlooks, infos, (today_cap,), base_energy.summary,
                          base_energy.summary, warnings=tuple(dict.fromkeys(notes_out)),
                          content_hash=content_hash(plan))
    solved = sol.done()
    done = {p: y for p, y in solved.items() if p in ctx.details}
    lfl = {p: y for p, y in solved.items() if p.startswith(LFL_PREFIX)}
    by_year = _state_by_year(ctx, done)
    costs = {p: cost_in_year_usd(ctx.details[p], plan, y) for p, y in done.items()}
    awards, incentive_result = incentives.exact(done, costs)
    emergencies = emergency_records(ctx, outcome)
    steps = _steps(ctx, capacity, outcome, done, lfl, costs, awards, emergencies)
    # years
    loans = loan_flows(ctx, outcome, emergencies)
    years = []
    cumulative = 0.0
    npv = 0.0
    for t, year in enumerate(ctx.years):
        state = ctx.energy(frozenset(by_year[year]), f"{year}")
        bills = bills_in_year(ctx, state.bills_usd, t)
        base_bills = bills_in_year(ctx, base_energy.bills_usd, t)
        spend = sum(c for p, c in costs.items() if done[p] == year)
        spend += sum(s.cost_usd for s in steps if s.year == year and s.project_id in lfl)
        inc_in = sum(a.amount_usd for lst in awards.values() for a in lst if a.arrival_year == year)
        pay = loans.payments.get(year, 0.0)
        borrowed = loans.borrowed.get(year, 0.0)
        net = spend - inc_in
        savings = sum(base_bills.values()) - sum(bills.values())
        cumulative += net - borrowed + pay + sum(bills.values())
        cap = state_capacity(ctx, capacity, by_year[year], str(year), year)
        years.append(YearTotals(
            year=year, spend_usd=round(spend, 2), incentives_usd=round(inc_in, 2), net_usd=round(net, 2),
            loan_payments_usd=round(pay, 2), bills_usd={k: round(v, 2) for k, v in bills.items()},
            bill_savings_usd=round(savings, 2), cumulative_usd=round(cumulative, 2),
            emissions_kg=round(state.emissions_kg, 1), peak_kw=round(state.peak_kw, 2),
            service_headroom_amps=round(cap.headroom_amps, 1),
            energy={k: round(v, 1) for k, v in state.units.items()},
            service_load_pct=cap.load_pct, service_near_limit=cap.near_limit,
            **peak_fields(state),
        ))
        npv += discount_factor(rate, t) * (savings - (net - borrowed + pay))
    # incentives arriving after the horizon and loan payments still due are part of the plan
    late = sum(a.amount_usd * discount_factor(rate, a.arrival_year - ctx.first_year)
               for lst in awards.values() for a in lst if a.arrival_year > ctx.years[-1])
    owed = sum(p * discount_factor(rate, y - ctx.first_year) for y, p in loans.payments.items()
               if y > ctx.years[-1])
    paid = {p: costs[p] - sum(a.amount_usd for a in awards.get(p, ())) for p in done}
    salvage = sum(_salvage(ctx, p, done[p], paid[p]) for p in done) * discount_factor(rate, T)
    salvage += sum(outcome.problem.project(p).value_usd[y - ctx.first_year] for p, y in lfl.items())
    npv += late - owed + salvage - expected_breakdowns(ctx, {**done, **lfl})
    # the same accounting as yearly flows against doing nothing (for IRR and payback)
    dn_break = breakdowns_by_year(ctx, {})
    plan_break = breakdowns_by_year(ctx, {**done, **lfl})
    extra_flows = [dn_break[t] - plan_break[t] for t in range(T)]
    extra_flows[-1] += (salvage + late - owed) / discount_factor(rate, T - 1)
    today_cap = state_capacity(ctx, capacity, set(), "today", None)
    # every NPV is against doing nothing: keeping today's home and paying for its breakdowns
    reference = expected_breakdowns(ctx, {})
    npv += reference
    lfl_baseline = like_for_like(ctx, base_energy, today_cap.headroom_amps, today_cap.load_pct)
    baselines = (do_nothing(ctx, base_energy, today_cap.headroom_amps, today_cap.load_pct),
                 replace(lfl_baseline, npv_usd=round(lfl_baseline.npv_usd + reference, 2)))
    cautions = [cautions_all["planning"]]
    for s in steps:
        for c in s.cautions:
            if c not in cautions:
                cautions.append(c)
    if cautions_all["electrical"] in cautions:
        cautions.append(cautions_all["code_edition"])
    roadmap = Roadmap(
        plan_name=plan.home.name or "home", first_year=ctx.first_year, horizon_years=T,
        objective=_objective_key(outcome.problem.objective), steps=tuple(steps), years=tuple(years),
        milestones=milestones_of(ctx, done), baselines=baselines, npv_usd=round(npv, 2), status="ok",
        assumptions=assumptions(ctx), cautions=tuple(cautions), emergencies=emergencies,
        calibration=ctx.basis.bill_fits,
    )
    capacity_states = _capacity_states(ctx, capacity, done, by_year, today_cap, notes_out)
    return PlanResult(
        plan=plan, roadmap=roadmap, outlooks=outlooks, projects=infos, capacity=capacity_states,
        energy_before=base_energy.summary, energy_after=ctx.energy(frozenset(done), "after the plan").summary,
        programs=incentives.uses(incentive_result), content_hash=content_hash(plan),
        warnings=tuple(dict.fromkeys(notes_out)),
        finance=Finance(plan=plan_returns(roadmap, rate, extra_flows, roadmap.npv_usd),
                        projects=project_returns(ctx, outcome, roadmap),
                        solar_hedge=solar_hedge(ctx, roadmap)),
        solver=SolverReport(status=sol.status, seconds=sol.solve_time_s, passes=outcome.passes,
                            mip_gap=sol.mip_gap, presolve_retried=sol.presolve_retried),
        capacity_remedy=capacity.remedy_project,
        solar_connection=_connection_words(ctx, capacity, set(done)),
        hourly_source=lambda: ctx.cache.memo(
            f"hourly:{sorted((p, ctx.details[p].variant) for p in done)}",
            lambda: hourly_profiles(ctx, done)),
    )


def _steps(ctx: Context, capacity: CapacityModel, outcome: ScheduleOutcome, done: dict[str, int],
           lfl: dict[str, int], costs: dict[str, float], awards: dict[str, list[AwardLine]],
           emergencies: tuple[Emergency, ...] = ()) -> list[Step]:
    """The roadmap's steps in the order of the work (:func:`work_order`): each project with its
    incentives, reasons and cautions, and the like-for-like replacements the optimiser chose."""
    cautions_all = catalog.cautions(ctx.plan.home.electrical.code_edition)
    steps = []
    # order markers are bookkeeping for the solver; reasons that name them are not shown
    markers = [p.name.lower() for p in outcome.problem.projects
               if p.id.startswith((ORDER_PREFIX, COVER_PREFIX))]
    urgent = {e.step_id: e for e in emergencies}
    for pid in work_order(ctx, {**done, **lfl}):
        if pid in lfl:
            step = lfl_step(ctx, outcome, pid, lfl[pid])
            if pid in urgent:
                step = replace(step, reasons=(_emergency_words(urgent[pid]),))
            steps.append(step)
            continue
        year = done[pid]
        d = ctx.details[pid]
        lines = tuple(IncentiveLine(a.program, a.amount_usd, a.arrives, a.kind) for a in awards.get(pid, ()))
        cost = costs[pid]
        extra_reasons = [r for r in outcome.reasons.get(pid, ()) if not any(m in r for m in markers)]
        if pid in capacity.variant_notes:
            extra_reasons.append(capacity.variant_notes[pid])
        if d.kind in ("solar", "battery"):
            words = _connection_words(ctx, capacity, {p for p, y in done.items() if y <= year})
            if words:
                extra_reasons.append(words)
        if d.kind == "heat_pump":
            extra_reasons.append(_heat_pump_sizing(ctx, done, pid))
        if pid == capacity.remedy_project:
            extra_reasons = [r for r in extra_reasons if not r.startswith(("paying later", "better overall"))]
            extra_reasons.insert(0, _remedy_reason(ctx, done, year))
        if d.kind == "panel_space":
            extra_reasons = [_space_reason(ctx, capacity, done, year)]
        if pid in urgent:  # the failure decides the year: the engine's other reasons do not apply
            extra_reasons = [_emergency_words(urgent[pid])] + [
                r for r in extra_reasons if r.startswith(("sized ", "a lower-power")) or "lower-power" in r]
        caution_ids = list(d.candidate.cautions)
        if d.kind == "envelope" and _burns_fuel_during(ctx, {**done, **lfl}, year):
            caution_ids.append("combustion_test")
        steps.append(Step(
            project_id=pid, label=d.label, year=year, variant=d.variant_label, size=d.size_text(),
            cost_usd=round(cost, 2), incentives=lines,
            net_cost_usd=round(cost - sum(i.amount_usd for i in lines), 2),
            reasons=tuple(extra_reasons),
            cautions=tuple(cautions_all[c] for c in caution_ids if c in cautions_all),
            replaces=d.candidate.replaces, **_sizing_fields(d.sizing),
        ))
    return steps


def _sizing_fields(sel: HeatPumpSelection | None) -> dict[str, float]:
    """The heat pump step's loads and capacity for the roadmap JSON (nothing for other steps)."""
    if sel is None:
        return {}
    return {"heating_load_btuh": round(sel.heating_load_btuh), "cooling_load_btuh": round(sel.cooling_load_btuh),
            "capacity_at_design_btuh": round(sel.capacity_at_design_btuh),
            "nominal_tons": sel.nominal_tons}


def _burns_fuel_during(ctx: Context, placed: dict[str, int], year: int) -> bool:
    """Whether a fuel-burning appliance is still in the house at the start of ``year`` (not
    replaced, by its upgrade or like for like, in an earlier year)."""
    items = replaceable_items(ctx)
    for a in ctx.plan.appliances:
        if appliance_fuel(a) not in HOME_FUELS:
            continue
        upgrade = items.get(a.key, ("", None))[0]
        years = [placed[p] for p in (upgrade, f"{LFL_PREFIX}{a.key}") if p in placed]
        if not years or min(years) >= year:
            return True
    return False


def _capacity_states(ctx: Context, capacity: CapacityModel, done: dict[str, int],
                     by_year: dict[int, set[str]], today: CapacityState,
                     notes: list[str]) -> tuple[CapacityState, ...]:
    """The load calculation today and after each year that adds a load, a backfeed or the
    remedy; then the measured-peak method when the plan gives a peak. Adds its notes."""
    kinds = catalog.upgrade_kinds()
    states = [today]
    seen = set()
    for year in ctx.years:
        state = frozenset(by_year[year])
        changed = [p for p in state if done[p] == year and (
            kinds[ctx.details[p].kind].capacity_load or kinds[ctx.details[p].kind].backfeed
            or p == capacity.remedy_project)]
        if state and state not in seen and changed:
            seen.add(state)
            names = ", ".join(ctx.details[p].label for p in sorted(changed))
            states.append(state_capacity(ctx, capacity, set(state), f"{year}: after {names}", year))
    near = next((s for s in states[1:] if s.near_limit), None)
    if near is not None and near.year is not None:
        notes.append(f"from {near.year} the service carries {near.load_pct:.0f} % of its rating by the "
                     "load calculation: near its limit, with little room for the next load - ask an "
                     "electrician whether load management or a larger service is wiser")
    if ctx.plan.home.electrical.peak_demand_kw is not None:
        other = [other_method_capacity(ctx, capacity, set(), None),
                 other_method_capacity(ctx, capacity, set(done), ctx.years[-1])]
        states += other
        last = other[-1]
        if last.applies and not last.fits and states[-3].fits:
            names = {"220.87": "your measured peak (NEC 220.87)", "220.83": "the NEC 220.83 calculation"}
            chosen = names[capacity.method]
            other = names["220.83" if capacity.method == "220.87" else "220.87"]
            notes.append(f"by {other} the planned loads would not fit "
                         f"({last.amps:.0f} A on {last.service_amps:.0f} A); the plan uses {chosen}, which "
                         "fits and which the code allows as well - ask your electrician which one the "
                         "inspector accepts")
    return tuple(states)


def emergency_records(ctx: Context, outcome: ScheduleOutcome) -> tuple[Emergency, ...]:
    """The failed heat sources and water heaters, how the roadmap replaces them in the first year,
    the other way and its price, and how the money beyond the year's budget is found: the plan's
    emergency savings, then its emergency loan, else it is over budget."""
    items = emergency_items(ctx)
    if not items:
        return ()
    problem, years = outcome.problem, outcome.solution.years
    t0 = ctx.first_year
    b = ctx.plan.budget
    budget0 = float((b.by_year or {}).get(t0, b.usd_per_year))
    first = [p for p in problem.projects if years.get(p.id) == t0]
    spend0 = sum(p.cost_usd[0] for p in first)
    borrowed0 = evaluate(problem, years).loans_usd[0] if b.loans else 0.0
    excess = max(0.0, spend0 - budget0 - borrowed0)
    funds = b.emergency
    savings = min(excess, funds.savings_usd if funds else 0.0)
    loan = excess - savings if funds is not None and funds.loan_rate_pct is not None else 0.0
    unfunded = excess - savings - loan

    ids = {p.id for p in problem.projects}

    def label(pid: str) -> str:
        return problem.project(pid).name if pid in ids else pid

    def cost(pid: str) -> float | None:
        return problem.project(pid).cost_usd[0] if pid in ids else None

    out = []
    for e in items:
        chosen = e.upgrade if years.get(e.upgrade) == t0 else (e.like_for_like or e.upgrade)
        other = e.like_for_like if chosen == e.upgrade else e.upgrade
        out.append(Emergency(
            item=e.key, label=e.label, service=e.service, year=t0, step_id=chosen,
            step_label=label(chosen), step_cost_usd=round(cost(chosen) or 0.0, 2), other_id=other,
            other_label=label(other) if other else "",
            other_cost_usd=None if other is None or cost(other) is None else round(cost(other), 2),
            over_budget_usd=round(excess, 2), from_savings_usd=round(savings, 2),
            from_loan_usd=round(loan, 2), unfunded_usd=round(unfunded, 2),
        ))
    return tuple(out)


def _connection_words(ctx: Context, capacity: CapacityModel, done: set[str]) -> str | None:
    """How the solar and battery among ``done`` connect to the service, in words."""
    pv = {p for p in done if p in ctx.details and ctx.details[p].kind in ("solar", "battery")}
    conn = capacity.connection(pv)
    return conn.words if conn is not None else None


def _emergency_words(e: Emergency) -> str:
    text = f"the {e.label} has failed: replaced at once, a home needs {e.service}"
    if e.other_cost_usd is not None and e.other_id:
        which = "less" if e.other_cost_usd < e.step_cost_usd else "more"
        text += f" ({e.other_label.lower()} instead would cost {which} now)"
    return text


def loan_flows(ctx: Context, outcome: ScheduleOutcome,
               emergencies: tuple[Emergency, ...] = ()) -> LoanFlows:
    """Borrowing per year from the solver and the resulting payments (annuity, yearly), and the
    plan's emergency loan for a failed heat source or water heater (repaid from the next year).

    Borrowing is just in time: only the shortfall, in the year it occurs (the cheapest feasible
    borrowing for this placement; the solver's own loan variables may carry slack).
    """
    b = ctx.plan.budget
    borrowed: dict[int, float] = {}
    payments: dict[int, float] = {}
    loan = emergencies[0].from_loan_usd if emergencies else 0.0
    if loan > 0 and b.emergency is not None and b.emergency.loan_rate_pct is not None:
        year = emergencies[0].year
        borrowed[year] = loan
        for row in loan_schedule(Loan(loan, b.emergency.loan_rate_pct, b.emergency.loan_term_years or 1,
                                      year + 1, payments_per_year=1, name="emergency loan")):
            payments[row.year] = payments.get(row.year, 0.0) + row.payments_usd
    if b.loans:
        first = b.loans[0]
        for t, amount in enumerate(evaluate(outcome.problem, outcome.solution.years).loans_usd):
            if amount > 0.5:
                year = ctx.first_year + t
                borrowed[year] = borrowed.get(year, 0.0) + amount
                for row in loan_schedule(Loan(amount, first.rate_pct, first.term_years, year + 1,
                                              payments_per_year=1, name=first.name)):
                    payments[row.year] = payments.get(row.year, 0.0) + row.payments_usd
    return LoanFlows(borrowed, payments)


def sizing_words(sel: HeatPumpSelection) -> str:
    """How a heat pump was sized, in words: its size, the loads, its heat at the design
    temperature and its cooling against the cooling load."""
    text = (f"sized at {heat_output_words(sel.nominal_btuh)} for the home's heat loss of "
            f"{heat_output_words(sel.heating_load_btuh)} on a {sel.heating_design_f:.0f} F design day "
            f"and heat gain of {heat_output_words(sel.cooling_load_btuh)} in summer")
    if sel.heating_ratio is not None:
        text += (f"; at {sel.heating_design_f:.0f} F it gives {heat_output_words(sel.capacity_at_design_btuh)} "
                 f"({sel.heating_ratio * 100:.0f} % of the heat loss)")
    if sel.cooling_ratio is not None:
        text += f", its cooling {sel.cooling_ratio * 100:.0f} % of the heat gain"
    return text + f" ({sel.rule})"


def _heat_pump_sizing(ctx: Context, done: dict[str, int], pid: str) -> str:
    """How the heat pump was sized and how often its backup heat runs (or heat falls short)."""
    d = ctx.details[pid]
    state = ctx.energy(frozenset(p for p, y in done.items() if y <= done[pid]))
    hours = state.summary.backup_heat_hours
    text = sizing_words(d.sizing) if d.sizing is not None else f"sized at {heat_output_words(d.size * BTUH_PER_TON)}"
    kept = dual_fuel_backup(ctx.plan) if d.backup_kind == "existing" else None
    if kept is not None:
        fuel = appliance_fuel(kept)
        end = ctx.energy(frozenset(done))
        bill = end.bills_usd.get(fuel, 0.0)
        return (text + f"; the {fuel} {kept.kind} stays as its backup for about {hours} hours a year: "
                f"the {fuel} bill stays at about {bill:,.0f} USD a year at today's prices (its fixed "
                "charges included), and the home is not fully electric")
    if hours and not d.backup_kw:
        text += f"; about {hours} hours a year colder than it can carry alone (keep a backup plan)"
    elif hours:
        what = "electric heaters" if d.backup_kind == "heaters" else "backup electric heat"
        text += f"; its {what} ({d.backup_kw:g} kW) would run about {hours} hours a year"
    return text


def _remedy_reason(ctx: Context, done: dict[str, int], year: int) -> str:
    """Why a panel, service or load-management step lands where it does: the loads it makes
    room for (the first ones the load calculation could not take without it)."""
    kinds = catalog.upgrade_kinds()
    later = sorted((y, ctx.details[p].label) for p, y in done.items()
                   if kinds[ctx.details[p].kind].capacity_load and y >= year)
    if not later:
        return "makes room on the service for the planned electric loads"
    first = later[0][0]
    names = ", ".join(n.lower() for y, n in later if y == first)
    when = "the same year" if first == year else str(first)
    return f"makes room on the service for the {names} ({when}): the load calculation needs it"


def _space_reason(ctx: Context, capacity: CapacityModel, done: dict[str, int], year: int) -> str:
    """Why the panel needs room: the free spaces and the circuits that would not fit."""
    free = ctx.plan.home.electrical.free_spaces or 0
    need = sum(max(breaker_spaces(ctx, ctx.details[p], capacity), 0) for p, y in done.items() if y <= year)
    names = ", ".join(sorted({ctx.details[p].label.lower() for p, y in done.items()
                              if y == year and breaker_spaces(ctx, ctx.details[p], capacity) > 0}))
    text = (f"the new circuits need {need} breaker space{'s' if need != 1 else ''} and the panel has "
            f"{free} free: a subpanel, "
            "or tandem breakers where the panel is listed for them - the electrician decides")
    return text + (f" (for the {names})" if names else "")


def lfl_step(ctx: Context, outcome: ScheduleOutcome, pid: str, year: int) -> Step:
    """A like-for-like replacement the optimiser chose (the old fuel stays a while longer)."""
    pr = outcome.problem.project(pid)
    cost = pr.cost_usd[year - ctx.first_year]
    reasons = outcome.reasons.get(pid, ()) + (
        "a like-for-like replacement costs less than the upgrade over the plan's years",)
    key = pid[len(LFL_PREFIX):]
    cautions = catalog.cautions(ctx.plan.home.electrical.code_edition)
    a = next((x for x in ctx.plan.appliances if x.key == key), None)
    notes = (cautions["combustion_removal"],) if a is not None and (a.fuel or "gas") != "electric" else ()
    return Step(project_id=pid, label=pr.label, year=year, cost_usd=round(cost, 2), net_cost_usd=round(cost, 2),
                reasons=tuple(dict.fromkeys(reasons)), cautions=notes, replaces=(key,))


def rounded(values: np.ndarray, digits: int) -> tuple[float, ...]:
    """``tuple(round(float(v), digits) for v in values)``, vectorised.

    numpy rounds ``v * 10**digits`` to the nearest integer and divides back, which gives the
    same double as Python's correctly rounded ``round`` except where the scaled value lies
    within rounding error of a half; those few values (and any that are not finite) are rounded
    by ``round`` itself. The 8760-hour series of a result take ~1 ms this way instead of ~25.
    """
    a = np.asarray(values, dtype=float)
    out = np.round(a, digits)
    scaled = a * 10.0 ** digits
    near = ~np.isfinite(scaled) | (np.abs(scaled) > 2.0**40) | (
        np.abs(scaled - np.floor(scaled) - 0.5) < 1e-6)
    for i in np.flatnonzero(near):
        out[i] = round(float(a[i]), digits)
    return tuple(out.tolist())


def hourly_profiles(ctx: Context, done: dict[str, int]) -> tuple[HourlyProfile, ...]:
    """Hour-by-hour electricity of a typical year, today and after the plan (for the CSV export)."""
    out = []
    for label, ids in (("today", ()), ("after the plan", tuple(done))):
        r = ctx.simulate(ids, label)
        series = {k: rounded(getattr(r, k), 4)
                  for k in ("load_kw", "solar_kw", "grid_import_kw", "grid_export_kw")}
        out.append(HourlyProfile(label=label, **series))
    return tuple(out)


def milestones_of(ctx: Context, done: dict[str, int]) -> tuple[Milestone, ...]:
    """The roadmap's milestones: fuels closed, the last gasoline car, fully electric, the service."""
    out = []
    for pid, kind in MILESTONE_KIND.items():
        if pid in done:
            out.append(Milestone(done[pid], ctx.details[pid].label, kind))
    evs = [p for p, d in ctx.details.items() if d.kind == "ev"]
    if evs and all(p in done for p in evs) and not any(v.fuel == "diesel" for v in ctx.plan.vehicles):
        out.append(Milestone(max(done[p] for p in evs), "Last gasoline car gone", "last_gasoline_car"))
    fossil = fossil_projects(ctx)
    if fossil and all(p in done for p in fossil) and dual_fuel_backup(ctx.plan) is None:
        out.append(Milestone(max(done[p] for p in fossil), "Fully electric", "fully_electric"))
    if "service_upgrade" in done:
        out.append(Milestone(done["service_upgrade"], "Service upgraded", "service_upgraded"))
    return tuple(sorted(out, key=lambda m: m.year))


def assumptions(ctx: Context) -> dict[str, Any]:
    """The inputs that shaped the result, as JSON-safe values (the roadmap's ``assumptions``)."""
    pr = ctx.plan.prices
    b = ctx.plan.budget
    return {
        "discount_rate_pct": b.discount_rate_pct,
        "inflation_pct": pr.inflation_pct,
        "escalation_pct": {f: round(ctx.escalation(f) * 100, 2) for f in BILL_FUELS if f != "diesel"},
        "prices": {"electricity_usd_per_kwh": pr.electricity.usd_per_kwh, "gas_usd_per_therm": pr.gas.usd_per_therm,
                   "propane_usd_per_gal": pr.propane.usd_per_gal, "oil_usd_per_gal": pr.oil.usd_per_gal,
                   "gasoline_usd_per_gal": pr.gasoline.usd_per_gal},
        "cost_level": pr.cost_level,
        "budget_usd_per_year": b.usd_per_year,
        "carryover": b.carryover,
        "add_bill_savings": b.add_bill_savings,
        "weather": ctx.basis.weather_note,
        "heat_loss_method": ctx.basis.calibration.method,
        "design_heating_load_btuh": round(ctx.basis.design_load_btuh),
        "peak_demand": ctx.basis.peak.method if ctx.basis.peak is not None else None,
        "conventions": "projects installed at the start of their year; nominal dollars; NPV against doing "
                       "nothing, with the equipment's remaining value at the end of the horizon",
    }
