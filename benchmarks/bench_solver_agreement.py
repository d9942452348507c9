"""The plan solver's answers against exhaustive enumeration, with the product's settings.

Random small scheduling problems (``tests/schedule/instances.py``: invented numbers, every
constraint family and objective) are solved by ``homeplan.planner.scheduling.PLAN_SOLVER``
(HiGHS, presolve on, relative gap 1e-5, with the presolve-off repeat) and by brute force over
every placement. Target: >= 10,000 instances, 0 worse answers, 0 false infeasibles. A worse
answer is one whose objective is worse than the enumeration's optimum by more than the solver's
relative gap (1e-5). ``--raw`` turns the repeat off to show what HiGHS alone answers.

Usage: python benchmarks/bench_solver_agreement.py [--count N] [--start SEED] [--raw]
       [--max-projects P] [--max-years T]
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from homeplan.planner.scheduling import PLAN_SOLVER  # noqa: E402
from homeplan.schedule.bruteforce import BruteForceSolver  # noqa: E402
from tests.schedule.instances import random_problem  # noqa: E402


def _worse_by(objective: str, got: float, best: float) -> float:
    """How much worse ``got`` is than ``best`` (positive = worse), in the objective's units."""
    if objective in ("min_out_of_pocket", "earliest_gas_closure"):
        return got - best
    return best - got


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--count", type=int, default=10_000)
    ap.add_argument("--start", type=int, default=0)
    ap.add_argument("--raw", action="store_true", help="HiGHS alone: no presolve-off repeat")
    ap.add_argument("--max-projects", type=int, default=8)
    ap.add_argument("--max-years", type=int, default=10)
    args = ap.parse_args()
    solver = PLAN_SOLVER
    if args.raw:
        solver = dataclasses.replace(solver, retry_without_presolve=False)
    brute = BruteForceSolver()
    worse, false_infeasible, false_feasible, retried, feasible = [], [], [], 0, 0
    t_milp = t_brute = 0.0
    cpu0 = time.process_time()
    for seed in range(args.start, args.start + args.count):
        pr = random_problem(seed, max_projects=args.max_projects, max_years=args.max_years,
                            max_combinations=200_000)
        t0 = time.perf_counter()
        a = solver.solve(pr)
        t_milp += time.perf_counter() - t0
        t0 = time.perf_counter()
        b = brute.solve(pr)
        t_brute += time.perf_counter() - t0
        retried += a.presolve_retried
        if a.feasible != b.feasible:
            (false_infeasible if b.feasible else false_feasible).append((seed, a.status))
            continue
        if not a.feasible:
            continue
        feasible += 1
        by = _worse_by(pr.objective, a.objective_value, b.objective_value)
        tol = solver.mip_rel_gap * max(1.0, abs(b.objective_value)) + 1e-6
        if pr.objective == "earliest_gas_closure" and by <= 0:
            by = b.npv_usd - a.npv_usd  # same year: compare the NPV of the second stage
        if by > tol:
            worse.append((seed, pr.objective, a.objective_value, b.objective_value))
    print(f"instances {args.count} (seeds {args.start}..{args.start + args.count - 1}, "
          f"<= {args.max_projects} projects x <= {args.max_years} years), feasible {feasible}")
    print(f"solver: {'HiGHS alone (no repeat)' if args.raw else 'plan settings with repeat'}; "
          f"presolve {solver.presolve}, gap {solver.mip_rel_gap:g}")
    print(f"worse answers {len(worse)} {worse[:5]}")
    print(f"false infeasible {len(false_infeasible)} {false_infeasible[:5]}")
    print(f"false feasible {len(false_feasible)} {false_feasible[:5]}")
    print(f"repeated without presolve {retried}")
    print(f"wall: solver {t_milp:.1f} s ({1000 * t_milp / args.count:.1f} ms each), "
          f"enumeration {t_brute:.1f} s; CPU {time.process_time() - cpu0:.1f} s; "
          f"load average {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
