"""Random small scheduling problems for the solver tests (invented numbers, no real homes)."""

from __future__ import annotations

import dataclasses

import numpy as np

from homeplan.schedule.problem import (
    ExclusiveGroup,
    FollowUp,
    IncentiveGroup,
    Interaction,
    Prerequisite,
    Problem,
    Project,
    Target,
)

OBJECTIVES = ("max_npv", "min_emissions", "earliest_gas_closure", "min_out_of_pocket")


def random_problem(
    seed: int,
    max_projects: int = 6,
    max_years: int = 8,
    max_combinations: int = 60_000,
    objective: str | None = None,
) -> Problem:
    """A random problem exercising every constraint family with some probability.

    Sizes are drawn so that the brute-force enumeration stays below ``max_combinations``.
    Money is whole dollars so that ties at the budget boundary are exact.
    """
    rng = np.random.default_rng(seed)
    while True:
        n_p = int(rng.integers(1, max_projects + 1))
        n_t = int(rng.integers(1, max_years + 1))
        if (n_t + 1) ** n_p <= max_combinations:
            break
    first_year = 2026
    ids = [f"p{i}" for i in range(n_p)]
    projects = []
    for i, pid in enumerate(ids):
        base = float(rng.integers(2, 20)) * 500
        trend = float(rng.choice([-0.06, -0.03, 0.0, 0.03]))
        cost = tuple(float(round(base * (1 + trend) ** t)) for t in range(n_t))
        value_base = base * float(rng.uniform(0.3, 1.8))
        decay = float(rng.uniform(0.85, 1.02))
        value = tuple(float(round(value_base * decay**t)) for t in range(n_t))
        emis = tuple(float(round(float(rng.uniform(0, 20_000)) * decay**t)) for t in range(n_t))
        savings = (
            tuple(float(rng.integers(0, 800)) for _ in range(n_t)) if rng.random() < 0.4 else ()
        )
        penalty = ()
        if rng.random() < 0.3:
            penalty = tuple(float(round(base * 0.1 * (t + 1))) for t in range(n_t))
        earliest = latest = pinned = None
        if rng.random() < 0.2:
            earliest = first_year + int(rng.integers(0, n_t))
        if rng.random() < 0.2:
            latest = first_year + int(rng.integers(0, n_t))
        if rng.random() < 0.08:
            pinned = first_year + int(rng.integers(0, n_t))
        projects.append(
            Project(
                id=pid,
                label=f"Project {i}",
                cost_usd=cost,
                value_usd=value,
                emissions_kg=emis,
                savings_usd=savings,
                undone_penalty_usd=penalty,
                mandatory=bool(rng.random() < 0.12),
                excluded=bool(rng.random() < 0.05),
                earliest_year=earliest,
                latest_year=latest,
                pinned_year=pinned,
                capacity_use=float(rng.choice([0, 0, 20, 30, 40])),
                capacity_provided=float(rng.choice([0, 0, 0, 50, 100])),
            )
        )
    prereqs = []
    for i in range(1, n_p):
        if rng.random() < 0.35:
            k = int(rng.integers(1, min(3, i) + 1))
            req = tuple(str(s) for s in rng.choice(ids[:i], size=k, replace=False))
            prereqs.append(Prerequisite(ids[i], req, strict=bool(rng.random() < 0.4)))
    groups = []
    if n_p >= 3 and rng.random() < 0.3:
        members = tuple(str(s) for s in rng.choice(ids, size=2, replace=False))
        groups.append(ExclusiveGroup(members, exactly_one=bool(rng.random() < 0.3)))
    incentives = []
    if n_p >= 2 and rng.random() < 0.4:
        members = rng.choice(ids, size=min(n_p, int(rng.integers(2, 4))), replace=False)
        incentives.append(
            IncentiveGroup(
                "credit",
                {str(m): 0.3 for m in members},
                cap_usd_per_year=float(rng.integers(1, 6)) * 500,
                arrives_after_years=int(rng.integers(0, 2)),
                adds_to_budget=bool(rng.random() < 0.5),
            )
        )
    targets = []
    if rng.random() < 0.2:
        k = int(rng.integers(1, n_p + 1))
        members = tuple(str(s) for s in rng.choice(ids, size=k, replace=False))
        targets.append(Target(members, first_year + int(rng.integers(0, n_t))))
    interactions = []
    if n_p >= 2 and rng.random() < 0.35:
        a, b = (str(s) for s in rng.choice(ids, size=2, replace=False))
        per_year = float(rng.integers(-6, 7)) * 100
        interactions.append(Interaction(a, b, tuple(per_year for _ in range(n_t))))
    total_cost = sum(p.cost_usd[0] for p in projects)
    budget = tuple(
        float(round(total_cost * float(rng.uniform(0.05, 0.6)))) for _ in range(n_t)
    )
    loans = rng.random() < 0.3
    obj = objective or str(rng.choice(OBJECTIVES, p=[0.55, 0.15, 0.15, 0.15]))
    # breaker spaces and follow-ups, drawn last so that the draws above stay as they were
    spaces = rng.random() < 0.3
    followups = []
    if n_p >= 3 and rng.random() < 0.3:
        picked = [str(s) for s in rng.choice(ids, size=3, replace=False)]
        followups.append(FollowUp(picked[0], tuple(picked[1:]), int(rng.integers(0, 2))))
    if spaces:
        projects = [dataclasses.replace(p, spaces_use=float(rng.choice([0, 1, 2, 2])),
                                        spaces_provided=float(rng.choice([0, 0, 0, 0, 6])))
                    for p in projects]
    return Problem(
        first_year=first_year,
        budget_usd=budget,
        projects=tuple(projects),
        carryover=bool(rng.random() < 0.75),
        discount_rate=float(rng.choice([0.0, 0.03, 0.05])),
        loan_limit_usd=float(rng.integers(1, 10) * 1000) if loans else 0.0,
        loan_rate=float(rng.choice([0.0, 0.05, 0.08])),
        loan_term_years=int(rng.integers(1, 6)),
        savings_to_budget=bool(rng.random() < 0.3),
        prerequisites=tuple(prereqs),
        exclusive_groups=tuple(groups),
        capacity_base=float(rng.choice([40, 60, 80])) if rng.random() < 0.4 else None,
        spaces_base=float(rng.choice([0, 1, 2, 4])) if spaces else None,
        followups=tuple(followups),
        max_per_year=int(rng.integers(1, 3)) if rng.random() < 0.3 else None,
        incentive_groups=tuple(incentives),
        targets=tuple(targets),
        interactions=tuple(interactions),
        objective=obj,
        objective_project=str(rng.choice(ids)) if obj == "earliest_gas_closure" else None,
    )


def cvar_problem(seed: int, max_combinations: int = 30_000) -> Problem:
    """A random problem with the risk-aware objective: the instance of ``random_problem(seed)``
    with S equally likely price scenarios added (each project's value scaled by its own random
    factor per scenario, as a price path would), a base cost per scenario, and a CVaR weight
    and tail (fractional tails included, e.g. 30 % of 7 scenarios)."""
    base = random_problem(seed, max_combinations=max_combinations, objective="max_npv")
    rng = np.random.default_rng([seed, 17])
    n_s = int(rng.integers(1, 13))
    n_t = base.n_years
    projects = []
    for p in base.projects:
        if not p.value_usd or rng.random() < 0.2:
            projects.append(p)  # the same value in every scenario
            continue
        factors = np.exp(rng.normal(0.0, float(rng.choice([0.1, 0.3, 0.6])), size=(n_s, 1)))
        trend = 1.0 + float(rng.normal(0, 0.02)) * np.arange(n_t)[None, :]
        values = np.round(np.asarray(p.value_usd)[None, :] * factors * trend)
        projects.append(dataclasses.replace(p, scenario_value_usd=tuple(tuple(v) for v in values)))
    return base.replace(
        projects=tuple(projects), objective="min_cost_cvar", objective_project=None,
        scenario_base_usd=tuple(float(v) for v in np.round(rng.uniform(20_000, 60_000, size=n_s))),
        risk_weight=float(rng.choice([0.0, 0.5, 1.0, 3.0])),
        risk_tail=float(rng.choice([0.1, 0.25, 0.3, 0.5, 1.0])),
    )
