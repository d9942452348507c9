"""Property tests: over random instances the MILP's plan never breaks a hard constraint.

The checks below are written directly from the constraint definitions of the problem (budget with
carryover, prerequisites, any-of, capacity, pins, exclusions, windows, per-year limit, targets,
capped incentives, loan limit); they do not use ``problem.evaluate`` or the MILP model. Loans and
incentive amounts are taken from the solution and checked for consistency themselves.
"""

from __future__ import annotations

import numpy as np
import pytest

from homeplan.schedule.milp import MilpSolver, Solution
from homeplan.schedule.problem import Problem
from tests.schedule.instances import OBJECTIVES, random_problem

MILP = MilpSolver(mip_rel_gap=1e-6)
EPS = 1e-5


def check_hard_constraints(pr: Problem, sol: Solution) -> list[str]:
    bad: list[str] = []
    fy, nt = pr.first_year, pr.n_years
    years = sol.years
    t_of = {pid: (None if y is None else y - fy) for pid, y in years.items()}
    scale = 1.0 + sum(max(p.cost_usd) for p in pr.projects) + sum(pr.budget_usd)
    # windows, pins, exclusions, mandatory
    for p in pr.projects:
        y = years[p.id]
        if y is None:
            if p.mandatory or p.pinned_year is not None:
                bad.append(f"{p.id} required but not done")
            continue
        if not fy <= y < fy + nt:
            bad.append(f"{p.id} outside horizon")
        if p.excluded:
            bad.append(f"{p.id} excluded but done")
        if p.earliest_year is not None and y < p.earliest_year:
            bad.append(f"{p.id} before window")
        if p.latest_year is not None and y > p.latest_year:
            bad.append(f"{p.id} after window")
        if p.pinned_year is not None and y != p.pinned_year:
            bad.append(f"{p.id} not in pinned year")
    # prerequisites and any-of
    for r in pr.prerequisites:
        ya = years[r.project]
        if ya is None:
            continue
        ok = any(
            years[b] is not None and (years[b] < ya if r.strict else years[b] <= ya)
            for b in r.requires_any
        )
        if not ok:
            bad.append(f"{r.project} before its prerequisite {r.requires_any}")
    # exclusive groups
    for g in pr.exclusive_groups:
        n_done = sum(years[m] is not None for m in g.members)
        if n_done > 1 or (g.exactly_one and n_done != 1):
            bad.append(f"exclusive group {g.members} has {n_done} done")
    # targets
    for tg in pr.targets:
        for pid in tg.project_ids:
            if years[pid] is None or years[pid] > tg.by_year:
                bad.append(f"target {tg.by_year} missed by {pid}")
    # max per year
    if pr.max_per_year is not None:
        for t in range(nt):
            if sum(v == t for v in t_of.values()) > pr.max_per_year:
                bad.append(f"too many projects in {fy + t}")
    # capacity in every year's state
    if pr.capacity_base is not None:
        for t in range(nt):
            used = sum(
                p.capacity_use - p.capacity_provided
                for p in pr.projects
                if t_of[p.id] is not None and t_of[p.id] <= t
            )
            if used > pr.capacity_base + 1e-6:
                bad.append(f"capacity exceeded in {fy + t}")
    # capped incentives never exceed the cap nor the rate times the cost
    for g in pr.incentive_groups:
        earned = sol.incentives_usd[g.id]
        for t in range(nt):
            base = sum(
                rate * pr.project(pid).cost_usd[t] for pid, rate in g.rates if t_of[pid] == t
            )
            if earned[t] > min(base, g.cap_usd_per_year) + EPS * scale or earned[t] < -EPS:
                bad.append(f"incentive {g.id} over its cap or rate in {fy + t}")
    # loans within the limit
    loans = sol.loans_usd or (0.0,) * nt
    if sum(loans) > pr.loan_limit_usd + EPS * scale or min(loans) < -EPS:
        bad.append("loan limit exceeded")
    # budget: money in minus money out, per year or cumulatively with carryover
    a = pr.annuity_factor()
    balance = 0.0
    for t in range(nt):
        spend = sum(p.cost_usd[t] for p in pr.projects if t_of[p.id] == t)
        money = pr.budget_usd[t] + loans[t]
        money -= sum(a * loans[s] for s in range(nt) if 1 <= t - s <= pr.loan_term_years)
        if pr.savings_to_budget:
            money += sum(
                p.savings_usd[t] for p in pr.projects
                if p.savings_usd and t_of[p.id] is not None and t_of[p.id] < t
            )
        for g in pr.incentive_groups:
            s = t - g.arrives_after_years
            if g.adds_to_budget and s >= 0:
                money += sol.incentives_usd[g.id][s]
        balance = (balance if pr.carryover else 0.0) + money - spend
        if balance < -EPS * scale:
            bad.append(f"budget exceeded in {fy + t} by {-balance:.2f}")
    return bad


N_CASES = 150
CHUNKS = 5


def _case(seed: int) -> Problem:
    """Instance ``seed`` with its budget scaled and carryover and objective drawn, from a
    generator of its own (a case never depends on the cases run before it)."""
    rng = np.random.default_rng([7, seed])
    budget_factor = float(rng.choice([0.3, 0.7, 1.0, 1.5, 3.0]))
    carryover = bool(rng.integers(2))
    pr = random_problem(seed, objective=str(rng.choice(OBJECTIVES)))
    return pr.replace(
        budget_usd=tuple(round(b * budget_factor) for b in pr.budget_usd), carryover=carryover
    )


@pytest.mark.parametrize("chunk", range(CHUNKS))
def test_milp_plan_never_violates_hard_constraints(chunk: int) -> None:
    per = N_CASES // CHUNKS
    feasible = 0
    for seed in range(chunk * per, (chunk + 1) * per):
        pr = _case(seed)
        sol = MILP.solve(pr)
        if not sol.feasible:
            continue  # nothing to check; bounded below
        feasible += 1
        assert check_hard_constraints(pr, sol) == [], seed
    # the check must not be vacuous: most instances have a plan (measured: 94 of 150)
    assert feasible >= per // 3, f"only {feasible} of {per} instances were feasible"


def test_checker_catches_violations() -> None:
    """The checker above is not vacuous: a plan that overspends is reported."""
    pr = random_problem(3, objective="max_npv").replace(
        budget_usd=(0.0,) * random_problem(3).n_years, loan_limit_usd=0.0
    )
    first = pr.projects[0]
    years = {p.id: None for p in pr.projects}
    years[first.id] = pr.first_year
    fake = Solution("optimal", years=years, incentives_usd={g.id: (0.0,) * pr.n_years for g in pr.incentive_groups})
    assert any("budget exceeded" in b for b in check_hard_constraints(pr, fake))
