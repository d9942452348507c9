"""Price risk speed: the risk figures of one plan and the risk-aware solve, on every sample home.

Prints, per sample home:
- paths: drawing the plan's 2,000 price paths (fuels x years to the end of the solar's life);
- figures cold: the whole risk stage with the paths drawn (a fresh cache), target <= 300 ms;
- figures warm: the same with the paths kept in the home's cache (a re-plan);
- risk-aware schedule: the schedule stage with objective risk_aware (every solve of the
  stage: the replace-by relaxation and the refinement pass), target <= 2 s for a sample home,
  and its last MILP solve alone (100 scenarios);
- plan: the whole plan with objective risk_aware, cold (the home's basis included).
Run with the machine's load average printed beside (2 shared cores).
"""

from __future__ import annotations

import os
import statistics
import sys
import time
from dataclasses import replace
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from homeplan import PlannerCache, plan_roadmap  # noqa: E402
from homeplan.plan.load import load_plan  # noqa: E402
from homeplan.planner import risk  # noqa: E402
from homeplan.planner.capacity import plan_capacity  # noqa: E402
from homeplan.planner.chain import prepare_home, size_projects  # noqa: E402
from homeplan.planner.incentives import IncentiveModel, plan_programs  # noqa: E402
from homeplan.planner.scheduling import schedule  # noqa: E402


def timed(fn) -> float:
    t = time.perf_counter()
    fn()
    return time.perf_counter() - t


def main(repeats: int = 5) -> None:
    print(f"load average: {os.getloadavg()[0]:.2f} {os.getloadavg()[1]:.2f} {os.getloadavg()[2]:.2f}")
    first = sorted((ROOT / "sample_homes").glob("*.yaml"))[0]
    plan_roadmap(load_plan(first))  # imports
    print(f"{'sample':26s} {'paths':>7s} {'cold':>7s} {'warm':>7s} {'sched':>8s} {'solve':>7s} {'plan':>8s}"
          f"   (median of {repeats}; ms)")
    for path in sorted((ROOT / "sample_homes").glob("*.yaml")):
        loaded = load_plan(path)
        result = plan_roadmap(loaded)
        ctx = size_projects(prepare_home(loaded.plan, loaded.base_dir, PlannerCache()))
        risk.price_risk(ctx, result)  # the simulated states, as a plan leaves them
        span = max(len(ctx.years), 40)
        model = risk.price_model(ctx)
        paths = [timed(lambda m=model, n=span: risk.simulate_price_paths(m, n, 2000, seed=1))
                 for _ in range(repeats)]
        cold, warm = [], []
        for i in range(repeats):
            # a new seed: new paths to draw, the home's simulated states already cached
            seeded = loaded.with_values({("prices", "uncertainty", "seed"): 1000 + i}).plan
            c2 = replace(ctx, plan=seeded)
            cold.append(timed(lambda c=c2, r=result: risk.price_risk(c, r)))
            warm.append(timed(lambda c=c2, r=result: risk.price_risk(c, r)))
        plan = loaded.with_values({("choices", "objective"): "risk_aware"}).plan
        rctx = size_projects(prepare_home(plan, loaded.base_dir, PlannerCache()))
        cap = plan_capacity(rctx)
        rctx = rctx.with_details(cap.details)
        inc = IncentiveModel(rctx, plan_programs(rctx))
        schedule(rctx, cap.model, inc)  # states and incentive estimates warm
        sched, solve = [], []
        for _ in range(repeats):
            out = None

            def run(c=rctx, m=cap.model, i=inc):
                nonlocal out
                out = schedule(c, m, i)
            sched.append(timed(run))
            solve.append(out.solution.solve_time_s)
        whole = timed(lambda p=plan, d=loaded.base_dir: plan_roadmap(p, d, PlannerCache()))
        med = statistics.median
        print(f"{path.name:26s} {med(paths) * 1000:7.0f} {med(cold) * 1000:7.0f} {med(warm) * 1000:7.1f} "
              f"{med(sched) * 1000:8.0f} {med(solve) * 1000:7.0f} {whole * 1000:8.0f}")
    print(f"load average: {os.getloadavg()[0]:.2f} {os.getloadavg()[1]:.2f} {os.getloadavg()[2]:.2f}")


if __name__ == "__main__":
    main()
