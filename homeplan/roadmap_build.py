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

from dataclasses import replace

from homeplan import catalog
from homeplan.pipeline import (
    Context,
    breakdown_cost,
    discount,
    fossil_projects,
    lfl_cost,
    project_infos,
    replaceable_items,
)
from homeplan.plan.hashing import content_hash
from homeplan.plan_finance import plan_returns, project_returns, solar_hedge
from homeplan.plan_schedule import LFL_PREFIX, ORDER_PREFIX, ScheduleOutcome, cost_in_year
from homeplan.result import PlanResult
from homeplan.schedule.roadmap import Baseline, IncentiveLine, Milestone, Roadmap, Step, YearTotals

MILESTONE_KIND = {"close_gas": "gas_service_closed", "remove_propane_tank": "propane_tank_removed",
                  "remove_oil_tank": "oil_tank_removed"}


def _bills_in_year(ctx: Context, bills: dict[str, float], t: int) -> dict[str, float]:
    return {f: v * (1 + ctx.escalation(f)) ** t for f, v in bills.items()}


def _state_by_year(ctx: Context, done: dict[str, int]) -> dict[int, set[str]]:
    return {y: {p for p, py in done.items() if py <= y} for y in ctx.years}


def _salvage(ctx: Context, pid: str, year: int, cost: float) -> float:
    """Remaining value at the end of the horizon, straight-line over the equipment life."""
    life = ctx.details[pid].life_years if pid in ctx.details else 15.0
    end = ctx.first_year + len(ctx.years)
    used = end - year
    return max(0.0, cost * (1 - used / life))


def build_result(ctx: Context, outcome: ScheduleOutcome) -> PlanResult:
    from homeplan.capacity import (
        breaker_spaces_note,
        capacity_model,
        measured_capacity,
        state_capacity,
    )
    from homeplan.incentive_adapter import IncentiveModel

    plan = ctx.plan
    sol = outcome.solution
    rate = plan.budget.discount_rate_pct
    T = len(ctx.years)
    base_energy = ctx.energy(frozenset(), "today")
    cap_model = getattr(outcome, "capacity", None) or capacity_model(ctx)
    infos = project_infos(ctx)
    outlooks = tuple(ctx.outlooks.values())
    cautions_all = catalog.cautions()
    if not sol.feasible:
        roadmap = Roadmap(
            plan_name=plan.home.name or "home", first_year=ctx.first_year, horizon_years=T,
            objective=outcome.problem.objective, status="infeasible",
            infeasibility=outcome.infeasibility, cautions=(cautions_all["planning"],),
            assumptions=assumptions(ctx),
        )
        today_cap = state_capacity(ctx, cap_model, set(), "today", None)
        return PlanResult(plan, roadmap, outlooks, infos, (today_cap,), base_energy.summary,
                          base_energy.summary, warnings=tuple(ctx.notes))
    solved = sol.done()
    done = {p: y for p, y in solved.items() if p in ctx.details}
    lfl = {p: y for p, y in solved.items() if p.startswith(LFL_PREFIX)}
    by_year = _state_by_year(ctx, done)
    incentives = IncentiveModel.for_context(ctx)
    costs = {p: cost_in_year(ctx, p, y) for p, y in done.items()}
    awards, incentive_result = incentives.exact(done, costs)
    # steps
    steps = [lfl_step(ctx, outcome, pid, year) for pid, year in lfl.items()]
    # order markers are bookkeeping for the solver; reasons that name them are not shown
    markers = [p.name.lower() for p in outcome.problem.projects if p.id.startswith(ORDER_PREFIX)]
    for pid, year in sorted(done.items(), key=lambda kv: (kv[1], kv[0])):
        d = ctx.details[pid]
        lines = tuple(IncentiveLine(a.program, a.amount_usd, a.arrives, a.kind) for a in awards.get(pid, ()))
        cost = costs[pid]
        extra_reasons = [r for r in outcome.reasons.get(pid, ()) if not any(m in r for m in markers)]
        if pid in cap_model.variant_notes:
            extra_reasons.append(cap_model.variant_notes[pid])
        if d.kind == "heat_pump":
            extra_reasons.append(_heat_pump_sizing(ctx, done, pid))
        if pid == cap_model.remedy_project:
            extra_reasons = [r for r in extra_reasons if not r.startswith(("paying later", "better overall"))]
            extra_reasons.insert(0, _remedy_reason(ctx, done, pid, year))
        steps.append(Step(
            project_id=pid, label=d.label, year=year, variant=d.variant_label, size=d.size_text(),
            cost_usd=round(cost, 2), incentives=lines,
            net_cost_usd=round(cost - sum(i.amount_usd for i in lines), 2),
            reasons=tuple(extra_reasons),
            cautions=tuple(cautions_all[c] for c in d.candidate.cautions if c in cautions_all),
        ))
    # years
    loans = loan_flows(ctx, outcome, costs, awards)
    years = []
    cumulative = 0.0
    npv = 0.0
    for t, year in enumerate(ctx.years):
        state = ctx.energy(frozenset(by_year[year]), f"{year}")
        bills = _bills_in_year(ctx, state.bills_usd, t)
        base_bills = _bills_in_year(ctx, base_energy.bills_usd, t)
        spend = sum(c for p, c in costs.items() if done[p] == year)
        spend += sum(s.cost_usd for s in steps if s.year == year and s.project_id in lfl)
        inc_in = sum(a.amount_usd for lst in awards.values() for a in lst if a.arrival_year == year)
        pay = loans["payments"].get(year, 0.0)
        borrowed = loans["borrowed"].get(year, 0.0)
        net = spend - inc_in
        savings = sum(base_bills.values()) - sum(bills.values())
        cumulative += net - borrowed + pay + sum(bills.values())
        cap = state_capacity(ctx, cap_model, by_year[year], str(year), year)
        years.append(YearTotals(
            year=year, spend_usd=round(spend, 2), incentives_usd=round(inc_in, 2), net_usd=round(net, 2),
            loan_payments_usd=round(pay, 2), bills_usd={k: round(v, 2) for k, v in bills.items()},
            bill_savings_usd=round(savings, 2), cumulative_usd=round(cumulative, 2),
            emissions_kg=round(state.emissions_kg, 1), peak_kw=round(state.peak_kw, 2),
            service_headroom_amps=round(cap.headroom_amps, 1),
            energy={k: round(v, 1) for k, v in state.units.items()},
        ))
        npv += discount(rate, t) * (savings - (net - borrowed + pay))
    # incentives arriving after the horizon and loan payments still due are part of the plan
    late = sum(a.amount_usd * discount(rate, a.arrival_year - ctx.first_year)
               for lst in awards.values() for a in lst if a.arrival_year > ctx.years[-1])
    owed = sum(p * discount(rate, y - ctx.first_year) for y, p in loans["payments"].items() if y > ctx.years[-1])
    paid = {p: costs[p] - sum(a.amount_usd for a in awards.get(p, ())) for p in done}
    salvage = sum(_salvage(ctx, p, done[p], paid[p]) for p in done) * discount(rate, T)
    salvage += sum(outcome.problem.project(p).value_usd[y - ctx.first_year] for p, y in lfl.items())
    npv += late - owed + salvage - expected_breakdowns(ctx, {**done, **lfl})
    # the same accounting as yearly flows against doing nothing (for IRR and payback)
    dn_break = breakdowns_by_year(ctx, {})
    plan_break = breakdowns_by_year(ctx, {**done, **lfl})
    extra_flows = [dn_break[t] - plan_break[t] for t in range(T)]
    extra_flows[-1] += (salvage + late - owed) / discount(rate, T - 1)
    today_cap = state_capacity(ctx, cap_model, set(), "today", None)
    # every NPV is against doing nothing: keeping today's home and paying for its breakdowns
    reference = expected_breakdowns(ctx, {})
    npv += reference
    lfl_baseline = like_for_like(ctx, base_energy, today_cap.headroom_amps)
    baselines = (do_nothing(ctx, base_energy, today_cap.headroom_amps),
                 Baseline(lfl_baseline.name, lfl_baseline.years, round(lfl_baseline.npv_usd + reference, 2)))
    milestones = milestones_of(ctx, done)
    cautions = [cautions_all["planning"]]
    for s in steps:
        for c in s.cautions:
            if c not in cautions:
                cautions.append(c)
    roadmap = Roadmap(
        plan_name=plan.home.name or "home", first_year=ctx.first_year, horizon_years=T,
        objective=outcome.problem.objective, steps=tuple(steps), years=tuple(years),
        milestones=milestones, baselines=baselines, npv_usd=round(npv, 2), status="ok",
        assumptions=assumptions(ctx), cautions=tuple(cautions),
    )
    capacity = [today_cap]

    seen = set()
    for year in ctx.years:
        state = frozenset(by_year[year])
        changed = [p for p in state if done[p] == year and (
            catalog.upgrade_kinds()[ctx.details[p].kind].capacity_load
            or catalog.upgrade_kinds()[ctx.details[p].kind].backfeed or p == cap_model.remedy_project)]
        if state and state not in seen and changed:
            seen.add(state)
            names = ", ".join(ctx.details[p].label for p in sorted(changed))
            capacity.append(state_capacity(ctx, cap_model, set(state), f"{year}: after {names}", year))
    spaces = breaker_spaces_note(ctx, set(done))
    if spaces:
        ctx.notes.append(spaces)
        capacity[-1] = replace(capacity[-1], notes=capacity[-1].notes + (spaces,))
    if ctx.plan.home.electrical.peak_demand_kw is not None:
        measured = [measured_capacity(ctx, cap_model, set(), None),
                    measured_capacity(ctx, cap_model, set(done), ctx.years[-1])]
        capacity += measured
        if measured[-1].total_va == measured[-1].total_va and not measured[-1].fits:
            ctx.notes.append(f"by your measured peak (NEC 220.87) the planned loads do not fit "
                             f"({measured[-1].amps:.0f} A on {measured[-1].service_amps:.0f} A); the plan "
                             "uses the 220.83 calculation, which fits - ask your electrician which one "
                             "the inspector accepts")
    final = frozenset(done)
    after = ctx.energy(final, "after the plan").summary
    return PlanResult(
        plan=plan, roadmap=roadmap, outlooks=outlooks, projects=infos, capacity=tuple(capacity),
        energy_before=base_energy.summary, energy_after=after, programs=incentives.uses(incentive_result),
        content_hash=content_hash(plan),
        warnings=tuple(dict.fromkeys(ctx.notes)),
        extra={"solver": {"status": sol.status, "seconds": sol.solve_time_s, "passes": outcome.passes},
               "finance": {"plan": plan_returns(roadmap, rate, extra_flows, roadmap.npv_usd),
                           "projects": project_returns(ctx, outcome, roadmap),
                           "solar_hedge": solar_hedge(ctx, roadmap)},
               "capacity_remedy": cap_model.remedy_project, "solar_connection": cap_model.solar_connection,
               "hourly": ctx.cache.memo(f"hourly:{sorted((p, ctx.details[p].variant) for p in done)}",
                                        lambda: hourly_series(ctx, done))},
    )


def loan_flows(ctx: Context, outcome: ScheduleOutcome, costs: dict, awards: dict) -> dict:
    """Borrowing per year from the solver and the resulting payments (annuity, yearly)."""
    from homeplan.money.finance import Loan, loan_schedule

    b = ctx.plan.budget
    borrowed = {}
    payments: dict[int, float] = {}
    if b.loans:
        from homeplan.schedule.problem import evaluate

        # borrow just in time: only the shortfall, in the year it occurs (the cheapest feasible
        # borrowing for this placement; the solver's own loan variables may carry slack)
        first = b.loans[0]
        for t, amount in enumerate(evaluate(outcome.problem, outcome.solution.years).loans_usd):
            if amount > 0.5:
                year = ctx.first_year + t
                borrowed[year] = borrowed.get(year, 0.0) + amount
                for row in loan_schedule(Loan(amount, first.rate_pct, first.term_years, year + 1,
                                              payments_per_year=1, name=first.name)):
                    payments[row.year] = payments.get(row.year, 0.0) + row.payments_usd
    return {"borrowed": borrowed, "payments": payments}


def _heat_pump_sizing(ctx: Context, done: dict[str, int], pid: str) -> str:
    """How the heat pump was sized and how often its backup heat runs (or heat falls short)."""
    d = ctx.details[pid]
    state = ctx.energy(frozenset(p for p, y in done.items() if y <= done[pid]))
    hours = state.summary.backup_heat_hours
    design = ctx.basis.design_load_btuh
    t = ctx.basis.weather.heating_design_f
    text = f"sized {d.size:g} t for a {design:,.0f} Btu/h heating load at {t:.0f} F"
    v = catalog.upgrade_kinds()["heat_pump"].variant(d.variant)
    if hours and v is not None and not v.strips_kw:
        text += f"; about {hours} hours a year colder than it can carry alone (keep a backup plan)"
    elif hours:
        text += f"; backup heat runs about {hours} hours a year"
    return text


def _remedy_reason(ctx: Context, done: dict[str, int], pid: str, year: int) -> str:
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


def lfl_step(ctx: Context, outcome: ScheduleOutcome, pid: str, year: int) -> Step:
    """A like-for-like replacement the optimiser chose (the old fuel stays a while longer)."""
    pr = outcome.problem.project(pid)
    cost = pr.cost_usd[year - ctx.first_year]
    reasons = outcome.reasons.get(pid, ()) + (
        "a like-for-like replacement costs less than the upgrade over the plan's years",)
    key = pid[len(LFL_PREFIX):]
    cautions = catalog.cautions()
    a = next((x for x in ctx.plan.appliances if x.key == key), None)
    notes = (cautions["combustion_removal"],) if a is not None and (a.fuel or "gas") != "electric" else ()
    return Step(project_id=pid, label=pr.label, year=year, cost_usd=round(cost, 2), net_cost_usd=round(cost, 2),
                reasons=tuple(dict.fromkeys(reasons)), cautions=notes)


def hourly_series(ctx: Context, done: dict[str, int]) -> dict[str, dict[str, list[float]]]:
    """Hour-by-hour electricity of a typical year, today and after the plan (for the CSV export)."""
    out = {}
    for label, ids in (("today", ()), ("after the plan", tuple(done))):
        r = ctx.simulate(ids, label)
        out[label] = {k: [round(float(v), 4) for v in getattr(r, k)]
                      for k in ("load_kw", "solar_kw", "grid_import_kw", "grid_export_kw")}
    return out


def breakdowns_by_year(ctx: Context, done: dict[str, int]) -> list[float]:
    """Expected emergency replacement cost in each year (nominal) of the items still in place."""
    out = [0.0] * len(ctx.years)
    for key, (pid, cost) in replaceable_items(ctx).items():
        years = [done[p] for p in (pid, f"{LFL_PREFIX}{key}") if p in done]
        until = min(years) - ctx.first_year if years else len(ctx.years)
        for t in range(until):
            out[t] += breakdown_cost(ctx, key, t, cost)
    return out


def expected_breakdowns(ctx: Context, done: dict[str, int]) -> float:
    """Present value of the expected emergency replacements of the items the plan leaves in
    place, for each year before the project that replaces them (see ``breakdown_cost``)."""
    rate = ctx.plan.budget.discount_rate_pct
    total = 0.0
    for key, (pid, cost) in replaceable_items(ctx).items():
        years = [done[p] for p in (pid, f"{LFL_PREFIX}{key}") if p in done]
        until = min(years) - ctx.first_year if years else len(ctx.years)
        total += sum(breakdown_cost(ctx, key, t, cost) * discount(rate, t) for t in range(until))
    return total


def do_nothing(ctx: Context, base_energy, headroom_amps: float = 0.0) -> Baseline:
    years = []
    cumulative = 0.0
    for t, year in enumerate(ctx.years):
        bills = _bills_in_year(ctx, base_energy.bills_usd, t)
        cumulative += sum(bills.values())
        years.append(YearTotals(year=year, bills_usd={k: round(v, 2) for k, v in bills.items()},
                                cumulative_usd=round(cumulative, 2),
                                emissions_kg=round(base_energy.emissions_kg, 1),
                                peak_kw=round(base_energy.peak_kw, 2),
                                service_headroom_amps=round(headroom_amps, 1),
                                energy={k: round(v, 1) for k, v in base_energy.units.items()}))
    return Baseline("do nothing (pay for breakdowns as they come)", tuple(years), 0.0)


def like_for_like(ctx: Context, base_energy, headroom_amps: float = 0.0) -> Baseline:
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
            salvage += max(0.0, c * (1 - (end - y) / o.median_life_years))
    years = []
    cumulative = 0.0
    npv = 0.0
    for t, year in enumerate(ctx.years):
        bills = _bills_in_year(ctx, base_energy.bills_usd, t)
        s = spend.get(year, 0.0)
        cumulative += s + sum(bills.values())
        npv -= s * discount(rate, t)
        years.append(YearTotals(year=year, spend_usd=round(s, 2), net_usd=round(s, 2),
                                bills_usd={k: round(v, 2) for k, v in bills.items()},
                                cumulative_usd=round(cumulative, 2),
                                emissions_kg=round(base_energy.emissions_kg, 1),
                                peak_kw=round(base_energy.peak_kw, 2),
                                service_headroom_amps=round(headroom_amps, 1),
                                energy={k: round(v, 1) for k, v in base_energy.units.items()}))
    npv += salvage * discount(rate, len(ctx.years))
    for key, (_pid, item_cost) in replaceable_items(ctx).items():
        until = min(breakdowns_before[key], end) - ctx.first_year
        npv -= sum(breakdown_cost(ctx, key, t, item_cost) * discount(rate, t) for t in range(until))
    return Baseline("replace like-for-like at the likely end of life", tuple(years), round(npv, 2))


def milestones_of(ctx: Context, done: dict[str, int]) -> tuple[Milestone, ...]:
    out = []
    for pid, kind in MILESTONE_KIND.items():
        if pid in done:
            out.append(Milestone(done[pid], ctx.details[pid].label, kind))
    evs = [p for p, d in ctx.details.items() if d.kind == "ev"]
    if evs and all(p in done for p in evs) and not any(v.fuel == "diesel" for v in ctx.plan.vehicles):
        out.append(Milestone(max(done[p] for p in evs), "Last gasoline car gone", "last_gasoline_car"))
    fossil = fossil_projects(ctx)
    if fossil and all(p in done for p in fossil):
        out.append(Milestone(max(done[p] for p in fossil), "Fully electric", "fully_electric"))
    if "service_upgrade" in done:
        out.append(Milestone(done["service_upgrade"], "Service upgraded", "service_upgraded"))
    return tuple(sorted(out, key=lambda m: m.year))


def assumptions(ctx: Context) -> dict:
    pr = ctx.plan.prices
    b = ctx.plan.budget
    return {
        "discount_rate_pct": b.discount_rate_pct,
        "inflation_pct": pr.inflation_pct,
        "escalation_pct": {f: round(ctx.escalation(f) * 100, 2) for f in ("electricity", "gas", "propane", "oil", "gasoline")},
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
        "conventions": "projects installed at the start of their year; nominal dollars; NPV against doing "
                       "nothing, with the equipment's remaining value at the end of the horizon",
    }

