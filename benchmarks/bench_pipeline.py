"""Re-plan speed of the whole pipeline (simulation included) on every sample home.

Prints, per sample home:
- new process: wall time of `homeplan plan --json` in a fresh interpreter (imports included);
- cold: first plan of the home in a running process (empty cache, libraries imported);
- budget / pin change: median re-plan time with a warm cache after changing only the budget
  or one pin (targets: <= 150 ms re-plan, <= 1.5 s cold).
"""

from __future__ import annotations

import copy
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from homeplan import PlannerCache, plan_roadmap  # noqa: E402
from homeplan.plan.load import load_plan, validate_document  # noqa: E402
from homeplan.plan.save import set_in  # noqa: E402


def timed(fn) -> float:
    t = time.perf_counter()
    fn()
    return time.perf_counter() - t


def main(repeats: int = 7) -> None:
    # warm the imports once so "cold" measures the home, not the interpreter
    first = sorted((ROOT / "sample_homes").glob("*.yaml"))[0]
    plan_roadmap(load_plan(first).plan, first.parent)
    print(f"{'sample':28s} {'new process':>12s} {'cold':>8s} {'budget':>8s} {'pin':>8s}   (median of {repeats})")
    for path in sorted((ROOT / "sample_homes").glob("*.yaml")):
        loaded = load_plan(path)
        proc = timed(lambda p=path: subprocess.run([sys.executable, "-m", "homeplan.cli", "plan", "--json", str(p)],
                                                   check=True, capture_output=True))
        cache = PlannerCache()
        cold = timed(lambda lp=loaded, p=path, c=cache: plan_roadmap(lp.plan, p.parent, c))
        result = plan_roadmap(loaded.plan, path.parent, cache)
        budget_times, pin_times = [], []
        for i in range(repeats):
            doc = copy.deepcopy(loaded.document)
            set_in(doc, ("budget", "usd_per_year"), loaded.plan.budget.usd_per_year + 500 * (i + 1))
            plan, _ = validate_document(doc, str(path))
            budget_times.append(timed(lambda p=plan, d=path.parent, c=cache: plan_roadmap(p, d, c)))
            step = result.roadmap.steps[-1]
            doc = copy.deepcopy(loaded.document)
            year = max(result.roadmap.first_year, step.year - 1 - (i % 2))
            set_in(doc, ("choices", "pins"), {step.project_id: year})
            plan, _ = validate_document(doc, str(path))
            pin_times.append(timed(lambda p=plan, d=path.parent, c=cache: plan_roadmap(p, d, c)))
        print(f"{path.name:28s} {proc * 1000:10.0f}ms {cold * 1000:6.0f}ms "
              f"{statistics.median(budget_times) * 1000:6.0f}ms {statistics.median(pin_times) * 1000:6.0f}ms")


if __name__ == "__main__":
    main()
