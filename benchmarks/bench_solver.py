"""Solver time for 15 projects x 20 years (issue 6: "solver time reported separately").

Seeded, realistic but invented instance: a gas-heated house with a 100 A service. Prints the
median of several runs for model building and for the HiGHS solve, for the default objective,
the other objectives, and a hard variant (every project required, tight budget).
Record the figures in docs/performance.md.
"""

from __future__ import annotations

import os
import statistics
import time

import numpy as np

from homeplan.schedule.milp import MilpSolver, build_model
from homeplan.schedule.problem import (
    ExclusiveGroup,
    IncentiveGroup,
    Prerequisite,
    Problem,
    Project,
    Target,
)

FIRST_YEAR = 2026
N_YEARS = 20
RUNS = 5

# id, label, base cost USD, cost trend per year, value multiple, capacity use A, provided A,
# end-of-life year index (or None)  -- invented planning numbers, common practice, no source
CATALOG = [
    ("panel", "Panel upgrade to 200 A", 4500, 0.02, 0.0, 0, 100, None),
    ("loadmgmt", "Load management", 900, 0.0, 0.0, 0, 30, None),
    ("hp_ducted", "Ducted heat pump", 16000, -0.01, 1.35, 40, 0, 6),
    ("hp_mini", "Mini-split heat pumps", 11000, -0.02, 1.15, 25, 0, 6),
    ("hpwh", "Heat pump water heater", 4200, -0.01, 1.3, 15, 0, 3),
    ("ev_charger", "EV charger", 1800, 0.0, 0.2, 40, 0, None),
    ("ev", "Electric car", 38000, -0.03, 1.05, 0, 0, 8),
    ("roof", "Roof replacement", 14000, 0.03, 0.9, 0, 0, 5),
    ("solar", "Solar 7 kW", 18000, -0.04, 1.4, 0, 0, None),
    ("battery", "Battery 13 kWh", 12000, -0.05, 0.8, 0, 0, None),
    ("range", "Induction range", 2500, 0.0, 0.9, 40, 0, 10),
    ("dryer", "Heat pump dryer", 1600, 0.0, 0.9, 20, 0, 9),
    ("insulation", "Attic insulation and air sealing", 3500, 0.02, 1.6, -10, 0, None),
    ("windows", "Window replacement", 20000, 0.02, 0.7, 0, 0, None),
    ("gas_close", "Close the gas service", 500, 0.02, 0.0, 0, 0, None),
]


def instance(seed: int = 42, hard: bool = False, objective: str = "max_npv") -> Problem:
    rng = np.random.default_rng(seed)
    t = np.arange(N_YEARS)
    projects = []
    for pid, label, base, trend, value_mult, use, provided, eol in CATALOG:
        cost = base * (1 + trend) ** t * rng.uniform(0.95, 1.05)
        value = base * value_mult * rng.uniform(0.9, 1.1) * 0.97**t
        emissions = base * value_mult * 2.0 * (N_YEARS - t) / N_YEARS
        penalty = np.zeros(N_YEARS)
        probs = np.zeros(N_YEARS)
        if eol is not None:
            probs = 1 - np.exp(-(((t + 1) / (eol + 2)) ** 3))  # Weibull shape 3 (invented scale)
            penalty = np.diff(np.concatenate([[0.0], probs])) * base * 0.5
        projects.append(
            Project(
                pid,
                tuple(cost),
                label=label,
                value_usd=tuple(value),
                emissions_kg=tuple(emissions),
                savings_usd=tuple(np.full(N_YEARS, base * 0.03)),
                undone_penalty_usd=tuple(penalty),
                mandatory=hard and pid not in ("hp_mini", "loadmgmt", "windows", "battery"),
                capacity_use=float(use),
                capacity_provided=float(provided),
                failure_item=f"the old {label.lower()}" if eol is not None else "",
                failure_prob_by_year=tuple(probs) if eol is not None else (),
                latest_year=FIRST_YEAR + 8 if pid == "hpwh" else None,
                window_reason="the rebate ends" if pid == "hpwh" else "",
            )
        )
    gas = ("hpwh", "range", "dryer")
    prereqs = (
        Prerequisite("hp_ducted", ("panel", "loadmgmt")),
        Prerequisite("hp_mini", ("panel", "loadmgmt")),
        Prerequisite("ev", ("ev_charger",)),
        Prerequisite("ev_charger", ("panel", "loadmgmt")),
        Prerequisite("solar", ("roof",)),
        Prerequisite("battery", ("solar",)),
        Prerequisite("hp_ducted", ("insulation",)),
        *(Prerequisite("gas_close", (g,), strict=True) for g in ("hpwh", "range", "dryer")),
        Prerequisite("gas_close", ("hp_ducted", "hp_mini"), strict=True),
    )
    budget = tuple(float(b) for b in rng.uniform(9000, 13000, N_YEARS)) if not hard else (
        tuple(7000.0 for _ in range(N_YEARS))
    )
    return Problem(
        FIRST_YEAR,
        budget,
        tuple(projects),
        carryover=True,
        discount_rate=0.03,
        loan_limit_usd=25000.0,
        loan_rate=0.07,
        loan_term_years=5,
        savings_to_budget=True,
        prerequisites=prereqs,
        exclusive_groups=(ExclusiveGroup(("hp_ducted", "hp_mini"), exactly_one=hard),),
        capacity_base=60.0,
        max_per_year=3,
        incentive_groups=(
            IncentiveGroup(
                "credit_hp",
                {"hp_ducted": 0.3, "hp_mini": 0.3, "hpwh": 0.3},
                2000.0,
                arrives_after_years=1,
                adds_to_budget=True,
            ),
            IncentiveGroup("credit_env", {"insulation": 0.3, "windows": 0.3}, 1200.0),
        ),
        targets=(Target((*gas, "gas_close"), FIRST_YEAR + 15),) if hard else (),
        objective=objective,
        objective_project="gas_close" if objective == "earliest_gas_closure" else None,
    )


def median_time(fn, runs: int = RUNS) -> tuple[float, float, object]:
    """Median wall-clock and CPU seconds of ``runs`` calls, and the last result."""
    walls, cpus, result = [], [], None
    for _ in range(runs):
        w0, c0 = time.perf_counter(), time.process_time()
        result = fn()
        walls.append(time.perf_counter() - w0)
        cpus.append(time.process_time() - c0)
    return statistics.median(walls), statistics.median(cpus), result


def main() -> None:
    solver = MilpSolver(time_limit_s=60.0)
    MilpSolver().solve(instance(objective="max_npv"))  # warm the solver's import
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(
        f"solver benchmark: {len(CATALOG)} projects x {N_YEARS} years, median of {RUNS} runs "
        f"(wall / CPU; load average {load:.1f} on {os.cpu_count()} cores)"
    )
    pr = instance()
    w, c, model = median_time(lambda: build_model(pr))
    print(
        f"  {'model build':48s} {w * 1000:8.1f} / {c * 1000:8.1f} ms  "
        f"({model.shape[0]} rows, {model.shape[1]} columns, "
        f"{len(model.a_value)} nonzeros)"
    )
    cases = [
        ("max_npv", instance()),
        ("min_emissions", instance(objective="min_emissions")),
        ("min_out_of_pocket", instance(objective="min_out_of_pocket")),
        ("earliest_gas_closure", instance(objective="earliest_gas_closure")),
        ("max_npv, hard (required, tight budget, target)", instance(hard=True)),
    ]
    for name, problem in cases:
        w, c, sol = median_time(lambda p=problem: solver.solve(p))
        value = "-" if sol.objective_value is None else f"{sol.objective_value:,.1f}"
        print(f"  {name:48s} {w * 1000:8.1f} / {c * 1000:8.1f} ms  {sol.status}, objective {value}")
    seeds = range(1, 6)
    per_seed = [median_time(lambda s=s: solver.solve(instance(seed=s)), runs=1) for s in seeds]
    w = statistics.median(r[0] for r in per_seed)
    c = statistics.median(r[1] for r in per_seed)
    print(f"  {'max_npv, median over seeds 1-5':48s} {w * 1000:8.1f} / {c * 1000:8.1f} ms")


if __name__ == "__main__":
    main()
