"""Turn a solved :class:`Problem` into a first :class:`Roadmap` (solver numbers only).

The lead's adapter replaces the money and energy figures with the full simulation and exact
incentive rules for the chosen plan (issue 6: "the numbers the user sees always come from the
full simulation"); this draft gives the ordered steps, their reasons, and the infeasibility
explanation, and is what tests and the portfolio runner can use before the adapter lands.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from homeplan.schedule.explain import diagnose_infeasible, explain
from homeplan.schedule.milp import Solution, Solver, solve
from homeplan.schedule.problem import Problem, evaluate
from homeplan.schedule.roadmap import Roadmap, Step, YearTotals


def draft_roadmap(
    problem: Problem,
    plan_name: str,
    solution: Solution | None = None,
    solver: Solver | None = None,
    assumptions: Mapping[str, Any] | None = None,
) -> Roadmap:
    """Solve (unless ``solution`` is given), explain, and package as a Roadmap.

    Step ``cost_usd`` / ``net_cost_usd`` are the problem's costs after point-of-sale incentives;
    ``financed_usd`` is the year's just-in-time borrowing shared in proportion to cost. Year
    totals carry spend and loans only (bills, emissions and peak come from the simulation).
    """
    sol = solution or solve(problem, solver)
    base = {
        "plan_name": plan_name,
        "first_year": problem.first_year,
        "horizon_years": problem.n_years,
        "objective": problem.objective,
        "assumptions": {
            "discount_rate": problem.discount_rate,
            "budget_usd": list(problem.budget_usd),
            "carryover": problem.carryover,
            "solver": sol.solver,
            "solver_status": sol.status,
            **dict(assumptions or {}),
        },
    }
    if not sol.feasible:
        return Roadmap(status="infeasible", infeasibility=diagnose_infeasible(problem), **base)
    ev = evaluate(problem, sol.years)
    reasons = explain(problem, sol)
    steps = []
    spend = [0.0] * problem.n_years
    for p in problem.projects:
        y = sol.years.get(p.id)
        if y is not None:
            spend[y - problem.first_year] += p.cost_usd[y - problem.first_year]
    for p in problem.projects:
        y = sol.years.get(p.id)
        if y is None:
            continue
        t = y - problem.first_year
        cost = p.cost_usd[t]
        share = cost / spend[t] if spend[t] > 0 else 0.0
        steps.append(
            Step(
                project_id=p.id,
                label=p.name,
                year=y,
                cost_usd=cost,
                net_cost_usd=cost,
                financed_usd=ev.loans_usd[t] * share,
                reasons=reasons[p.id],
            )
        )
    cumulative = 0.0
    years = []
    for t, year in enumerate(problem.years):
        cumulative += spend[t]
        years.append(
            YearTotals(year, spend_usd=spend[t], net_usd=spend[t], cumulative_usd=cumulative)
        )
    return Roadmap(steps=steps, years=years, npv_usd=ev.npv_usd, **base)
