"""Portfolio throughput, cost per home by size, dask scaling and the driver's memory.

Prints, for the invented demo community (the first N homes of the generator's sequence with the
stated seed; N = 1000 is sample_homes/community), each home given the full plan:

- local process pool (one worker per core): wall time, homes per second, seconds of planning
  per home (as each worker measured it), the driver's peak Python memory (tracemalloc, during
  the run) and peak resident size, the load average before and after;
- dask.distributed LocalCluster with 1 and with 2 worker processes (one thread each) on the same
  homes: homes per second and the ratio.

Targets (issue): >= 25 homes/s on this 2-core machine for the demo community; cost per home flat
from 100 to 10,000 homes; 2 dask workers >= 1.7x one; driver memory flat in the number of homes.

    python benchmarks/bench_portfolio.py                    # 100, 300 and 1000 homes; dask on 200
    python benchmarks/bench_portfolio.py --homes 100,1000,10000 --dask 300
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

PROGRAMS = ROOT / "sample_homes" / "incentives" / "demoland_invented.yaml"


def load() -> str:
    return " ".join(Path("/proc/loadavg").read_text().split()[:3])


def community(folder: Path, homes: int) -> tuple[Path, Path]:
    from homeplan.portfolio.community import DEMO_SEED, write_community

    folder.mkdir(parents=True, exist_ok=True)
    shutil.copy(PROGRAMS, folder / "programs.yaml")
    return write_community(folder, homes, DEMO_SEED, incentive_file="programs.yaml")


def one_run(csv_path: str, template: str, out: str, workers: int, scheduler: str | None) -> dict:
    """One run in this (fresh) process: the driver's figures."""
    import resource
    import tracemalloc

    from homeplan.portfolio.inputs import iter_inputs, open_source
    from homeplan.portfolio.runner import make_executor, run
    from homeplan.portfolio.store import Store, store_path

    source = open_source(csv_path, template)
    before = load()
    tracemalloc.start()
    t0 = time.perf_counter()
    with Store.create(store_path(out), {"kind": source.kind}) as store:
        store.add_inputs(iter_inputs(source))
        outcome = run(source, store, make_executor(workers, scheduler))
        seconds = [r[0] for r in store.conn.execute("SELECT seconds FROM homes")]
        cpu = [r[0] for r in store.conn.execute("SELECT cpu_seconds FROM homes")]
        counts = store.counts()
    driver_cpu = time.process_time()
    wall = time.perf_counter() - t0
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return {
        "homes": outcome.stored, "wall_s": wall, "run_s": outcome.seconds,
        "rate": outcome.stored / outcome.seconds, "plan_s_mean": sum(seconds) / len(seconds),
        "plan_s_sum": sum(seconds), "cpu_s_mean": sum(cpu) / len(cpu),
        "driver_cpu_ms_per_home": driver_cpu / max(1, outcome.stored) * 1000, "py_peak_mb": peak / 2**20,
        "rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
        "load_before": before, "load_after": load(), "ok": counts["ok"],
        "problems": counts["error"] + counts["failed"] + counts["infeasible"],
    }


def in_child(csv_path: Path, template: Path, out: Path, workers: int, scheduler: str | None = None) -> dict:
    cmd = [sys.executable, __file__, "--one", str(csv_path), str(template), str(out), str(workers),
           scheduler or ""]
    proc = subprocess.run(cmd, capture_output=True, text=True, check=True)
    return json.loads(proc.stdout.strip().splitlines()[-1])


def dask_rate(csv_path: Path, template: Path, out: Path, workers: int) -> dict:
    from distributed import LocalCluster

    with LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                      dashboard_address=None) as cluster:
        # warm the workers' imports so that both runs measure planning, not start-up
        from distributed import Client

        with Client(cluster.scheduler_address) as c:
            c.run(lambda: __import__("homeplan.portfolio.work"))
        return in_child(csv_path, template, out, 0, cluster.scheduler_address)


def stages(csv_path: Path, template: Path, n: int) -> None:
    """Where a home's time goes: the planner's stages over the first ``n`` homes, planned in this
    process with one shared cache per place (as a batch does), and the MILP solves behind them."""
    from collections import defaultdict

    from homeplan.planner import chain
    from homeplan.planner.context import PlannerCache
    from homeplan.planner.shared import SharedCache
    from homeplan.portfolio.inputs import iter_inputs, open_source, plan_of_row
    from homeplan.schedule import milp

    source = open_source(csv_path, template)
    items = sorted(list(iter_inputs(source))[:n], key=lambda h: (h.group, h.seq))
    plans = [plan_of_row(str(source.path), source.template, h.home_id, h.payload, source.columns)
             for h in items]
    chain.plan_roadmap(plans[0], source.base_dir)  # imports
    spent: dict[str, float] = defaultdict(float)
    solves = [0, 0.0]
    real_solve = milp.MilpSolver.solve

    def counted(self, problem, start=None):
        t = time.perf_counter()
        try:
            return real_solve(self, problem, start=start)
        finally:
            solves[0] += 1
            solves[1] += time.perf_counter() - t

    runs = [0, 0.0]  # every HiGHS run: full solves, their repeats and feasibility tests
    real_highs = milp.MilpSolver._highs

    def counted_run(self, model, time_limit_s, presolve):
        t = time.perf_counter()
        try:
            return real_highs(self, model, time_limit_s, presolve)
        finally:
            runs[0] += 1
            runs[1] += time.perf_counter() - t

    milp.MilpSolver.solve = counted
    milp.MilpSolver._highs = counted_run

    def timed(name, fn, *a):
        t = time.perf_counter()
        out = fn(*a)
        spent[name] += time.perf_counter() - t
        return out

    shared = SharedCache()
    cpu0 = time.process_time()
    t0 = time.perf_counter()
    for plan in plans:  # the stages of chain._run, timed one by one
        ctx = timed("home (weather, heat loss)", chain.prepare_home, plan, source.base_dir,
                    PlannerCache(shared=shared))
        ctx = timed("projects", chain.size_projects, ctx)
        cap = timed("capacity", chain.plan_capacity, ctx)
        ctx = ctx.with_details(cap.details).with_sizes(cap.sizes)
        inc = timed("incentives", lambda c=ctx: chain.IncentiveModel(c, chain.plan_programs(c)))
        out = timed("schedule", chain.schedule, ctx, cap.model, inc)
        timed("result", chain.build_result, ctx, cap.model, inc, out, ())
    total = time.perf_counter() - t0
    cpu = time.process_time() - cpu0
    milp.MilpSolver.solve = real_solve
    milp.MilpSolver._highs = real_highs
    print(f"stages, {n} homes in one process (load {load()}): {total / n * 1000:.0f} ms per home "
          f"({cpu / n * 1000:.0f} ms of CPU); {solves[0] / n:.1f} MILP solves per home taking "
          f"{solves[1] / n * 1000:.0f} ms; {runs[0] / n:.1f} HiGHS runs in all (solves, repeats, "
          f"feasibility tests) taking {runs[1] / n * 1000:.0f} ms")
    for name, s in spent.items():
        print(f"  {name:28s} {s / n * 1000:7.1f} ms per home")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--homes", default="100,300,1000", help="sizes, comma-separated (0: none)")
    ap.add_argument("--dask", type=int, default=200, help="homes for the dask comparison (0: skip)")
    ap.add_argument("--workers", type=int, default=os.cpu_count() or 1)
    ap.add_argument("--stages", type=int, default=0, help="also time the planner's stages on N homes")
    ap.add_argument("--one", nargs=5, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.one:
        csv_path, template, out, workers, scheduler = args.one
        print(json.dumps(one_run(csv_path, template, out, int(workers), scheduler or None)))
        return
    sizes = [int(s) for s in args.homes.split(",") if s.strip() and int(s) > 0]  # 0: skip
    tmp = Path(tempfile.mkdtemp(prefix="bench_portfolio_"))
    print(f"portfolio benchmark, {args.workers} local workers, cores {os.cpu_count()}; load {load()}")
    print(f"{'homes':>6s} {'wall':>8s} {'homes/s':>8s} {'wall s/home':>11s} {'CPU s/home':>10s} "
          f"{'driver CPU':>10s} {'driver py peak':>14s} {'driver RSS':>10s}  load before -> after")
    for n in sizes:
        csv_path, template = community(tmp / f"c{n}", n)
        r = in_child(csv_path, template, tmp / f"r{n}", args.workers)
        print(f"{r['homes']:6d} {r['run_s']:7.1f}s {r['rate']:8.2f} {r['plan_s_mean']:11.3f} "
              f"{r['cpu_s_mean']:10.3f} {r['driver_cpu_ms_per_home']:8.1f}ms {r['py_peak_mb']:12.1f}MB "
              f"{r['rss_mb']:8.0f}MB  {r['load_before']} -> {r['load_after']}"
              f"  ({r['ok']} ok, {r['problems']} not planned)", flush=True)
    if args.stages:
        csv_path, template = community(tmp / "stages", args.stages)
        stages(csv_path, template, args.stages)
    if args.dask:
        csv_path, template = community(tmp / "dask", args.dask)
        one = dask_rate(csv_path, template, tmp / "d1", 1)
        two = dask_rate(csv_path, template, tmp / "d2", 2)
        print(f"dask LocalCluster, {args.dask} homes: 1 worker {one['rate']:.2f} homes/s "
              f"(load {one['load_before']} -> {one['load_after']}), 2 workers {two['rate']:.2f} homes/s "
              f"(load {two['load_before']} -> {two['load_after']}): {two['rate'] / one['rate']:.2f}x")
    shutil.rmtree(tmp, ignore_errors=True)


if __name__ == "__main__":
    main()
