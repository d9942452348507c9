"""Plan speed on every sample home: fresh processes, warm re-plans, peak memory.

Prints, per sample home (min / median / max over the runs, wall time):
- first run: ``homeplan plan --json`` in a fresh interpreter with an empty disk store
  (target <= 1.6 s on an idle machine);
- fresh plan: the same with the store already holding the home's weather year
  (target <= 1.0 s median);
- check: ``homeplan check`` in a fresh interpreter (target <= 0.4 s);
- peak memory of the fresh ``homeplan plan`` (max resident set, target <= 150 MB);
- warm re-plan in a running process after changing only the budget or one pin, at the plan's
  own horizon (target <= 100 ms median) and at a 30-year horizon (target <= 300 ms).

Usage: python benchmarks/bench_pipeline.py [--runs N] [--replans N]
"""

from __future__ import annotations

import argparse
import copy
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from homeplan import PlannerCache, plan_roadmap  # noqa: E402
from homeplan.plan.load import load_plan, validate_document  # noqa: E402
from homeplan.plan.save import set_in  # noqa: E402

LAUNCHER = r"""
import json, os, subprocess, sys, time
t = time.perf_counter()
proc = subprocess.Popen(sys.argv[1:], stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
_, status, usage = os.wait4(proc.pid, 0)
print(json.dumps([time.perf_counter() - t, usage.ru_maxrss, usage.ru_utime + usage.ru_stime,
                  os.waitstatus_to_exitcode(status)]))
"""
"""Runs the command and reports its wall time, peak resident size (KiB) and CPU time. A small
launcher starts it, because Linux counts in a child's peak resident size the memory of the
process it was started from (the benchmark's own, several hundred MB once it has planned)."""


def _child(args: list[str], store: str) -> tuple[float, float, float]:
    """Wall seconds, max resident MB and CPU seconds of ``homeplan ARGS`` in a fresh interpreter."""
    # as on a user's machine: Python keeps the compiled modules (this workplace's shell sets
    # PYTHONDONTWRITEBYTECODE, which makes every process compile homeplan again, ~0.3 s)
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    env["HOMEPLAN_CACHE_DIR"] = store
    out = subprocess.run([sys.executable, "-c", LAUNCHER, sys.executable, "-m", "homeplan.cli", *args],
                         env=env, capture_output=True, text=True, check=True).stdout
    wall, maxrss_kib, cpu, code = json.loads(out)
    if code != 0:
        raise SystemExit(f"homeplan {' '.join(args)} failed with exit code {code}")
    return wall, maxrss_kib / 1024.0, cpu


def _stats(values: list[float], scale: float = 1000.0) -> str:
    v = [x * scale for x in values]
    return f"{min(v):5.0f}/{statistics.median(v):5.0f}/{max(v):5.0f}"


def _replans(path: Path, horizon: int | None, n: int) -> tuple[list[float], list[float]]:
    loaded = load_plan(path)
    doc0 = copy.deepcopy(loaded.document)
    if horizon is not None:
        set_in(doc0, ("budget", "horizon_years"), horizon)
    plan0, _ = validate_document(doc0, str(path))
    cache = PlannerCache()
    result = plan_roadmap(plan0, path.parent, cache)
    budget, pin = [], []
    for i in range(n):
        doc = copy.deepcopy(doc0)
        set_in(doc, ("budget", "usd_per_year"), plan0.budget.usd_per_year + 500 * (i + 1))
        plan, _ = validate_document(doc, str(path))
        t = time.perf_counter()
        plan_roadmap(plan, path.parent, cache)
        budget.append(time.perf_counter() - t)
        if result.roadmap.steps:
            step = result.roadmap.steps[-1]
            doc = copy.deepcopy(doc0)
            year = max(result.roadmap.first_year, step.year - 1 - (i % 2))
            set_in(doc, ("choices", "pins"), {step.project_id: year})
            plan, _ = validate_document(doc, str(path))
            t = time.perf_counter()
            plan_roadmap(plan, path.parent, cache)
            pin.append(time.perf_counter() - t)
    return budget, pin


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=5, help="fresh processes per figure")
    ap.add_argument("--replans", type=int, default=7, help="warm re-plans per figure")
    args = ap.parse_args()
    samples = sorted((ROOT / "sample_homes").glob("*.yaml"))
    plan_roadmap(load_plan(samples[0]))  # import once so the warm figures measure the planner
    with tempfile.TemporaryDirectory() as store:  # compile the modules once, as a first use would
        _child(["plan", "--json", str(samples[0])], store)
    print(f"load average at start {os.getloadavg()[0]:.2f}; figures in ms as min/median/max "
          f"({args.runs} fresh processes, {args.replans} re-plans)")
    print(f"{'sample':24s} {'first run':>17s} {'fresh plan':>17s} {'check':>17s} {'MB':>5s} "
          f"{'budget':>17s} {'pin':>17s} {'budget 30y':>17s} {'pin 30y':>17s}")
    for path in samples:
        first, fresh, check, mem, cpu_first, cpu_fresh, cpu_check = [], [], [], [], [], [], []
        for _ in range(args.runs):
            with tempfile.TemporaryDirectory() as store:
                wall, _mb, cpu = _child(["plan", "--json", str(path)], store)
                first.append(wall)
                cpu_first.append(cpu)
                wall, mb, cpu = _child(["plan", "--json", str(path)], store)
                fresh.append(wall)
                cpu_fresh.append(cpu)
                mem.append(mb)
                wall, _mb, cpu = _child(["check", str(path)], store)
                check.append(wall)
                cpu_check.append(cpu)
        budget, pin = _replans(path, None, args.replans)
        budget30, pin30 = _replans(path, 30, args.replans)
        print(f"{path.stem:24s} {_stats(first):>17s} {_stats(fresh):>17s} {_stats(check):>17s} "
              f"{max(mem):5.0f} {_stats(budget):>17s} {_stats(pin):>17s} {_stats(budget30):>17s} "
              f"{_stats(pin30):>17s}")
        print(f"{'  CPU time':24s} {_stats(cpu_first):>17s} {_stats(cpu_fresh):>17s} {_stats(cpu_check):>17s}")
    print(f"load average at end {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
