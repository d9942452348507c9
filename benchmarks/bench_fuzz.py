"""The long fuzz run: fuzzed plans through check, plan, costs, capacity, print and export.

Targets (issue "a plan file from someone else is safe to open"): >= 10,000 fuzzed plans,
0 internal errors, 0 tracebacks, 0 commands over 5 s.

Each plan comes from a seed (``tests/fuzzing.py``: a sample home with a few mutations, sometimes
damaged text), is written into a copy of ``sample_homes/`` (so its incentive files are found) and
run through the six commands by homeplan's own entry point in worker processes. The five
commands that plan share the planning run of their file (the same call on the same bytes);
loading, checking, the views and the writing run for each. A command that runs 60 s is stopped
by an alarm and counted as a hang. Also fuzzed: incentive files and weather files (TMY3) named
by a plan, through check and plan.

Usage: python benchmarks/bench_fuzz.py [PLANS] [WORKERS] [FIRST_SEED] [MINUTES]
(MINUTES, default 90: stop taking new files after this long; the figures say how many were done.)
"""

from __future__ import annotations

import collections
import multiprocessing as mp
import os
import random
import signal
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from tests import fuzzing  # noqa: E402

HANG_S = 5.0
ALARM_S = 60


class _Alarm(BaseException):  # not an Exception: homeplan's main must not catch it as an error
    pass


def _on_alarm(*_args) -> None:
    raise _Alarm


def _classify(o: fuzzing.Outcome) -> list[str]:
    bad = []
    if o.internal_error:
        bad.append("internal error")
    if o.traceback:
        bad.append("traceback")
    if o.code not in (0, 1, 2) and o.code is not None:
        bad.append(f"exit {o.code}")
    if o.code == 1 and not o.internal_error:
        bad.append("exit 1")
    if o.seconds > HANG_S:
        bad.append("over 5 s")
    if o.cpu_seconds > HANG_S:
        bad.append("over 5 s of CPU")
    return bad


def _work(args: tuple[str, int, int]) -> dict:
    what, first, count = args
    signal.signal(signal.SIGALRM, _on_alarm)
    counts: collections.Counter = collections.Counter()
    problems: list[tuple[int, str, str, str]] = []
    slowest = slowest_cpu = 0.0
    with tempfile.TemporaryDirectory() as tmp, fuzzing.shared_planning():
        folder = fuzzing.plan_folder(Path(tmp))
        out = Path(tmp) / "out"
        out.mkdir()
        fuzzing.run_commands(folder / "minimal.yaml", out, ("plan",))  # imports, not counted
        for seed in range(first, first + count):
            rng = random.Random(seed)
            plan = folder / f"fuzz_{os.getpid()}.yaml"
            commands: tuple[str, ...] | None = None
            if what == "plans":
                plan.write_text(fuzzing.fuzzed_plan_text(rng), encoding="utf-8")
            elif what == "incentives":
                (folder / "incentives" / "fuzz.yaml").write_text(fuzzing.fuzzed_incentive_text(rng),
                                                                 encoding="utf-8")
                plan.write_text((folder / "minimal.yaml").read_text() +
                                "incentive_files: [incentives/fuzz.yaml]\n", encoding="utf-8")
                commands = ("check", "plan")
            else:
                (folder / "fuzz_weather.csv").write_text(
                    fuzzing.fuzzed_weather_text(rng, fuzzing.tmy3_text()), encoding="utf-8")
                plan.write_text(fuzzing.weather_plan_text("fuzz_weather.csv"), encoding="utf-8")
                commands = ("check", "plan")
            try:
                signal.alarm(ALARM_S)
                outcomes = fuzzing.run_commands(plan, out, commands)
                signal.alarm(0)
            except _Alarm:
                counts["hang"] += 1
                problems.append((seed, "any", "hang", ""))
                continue
            counts["plans"] += 1
            for o in outcomes:
                counts[f"{o.command} exit {o.code}"] += 1
                slowest = max(slowest, o.seconds)
                slowest_cpu = max(slowest_cpu, o.cpu_seconds)
                for b in _classify(o):
                    counts[b] += 1
                    problems.append((seed, o.command, b, (o.stderr + o.trace).strip()[-300:]))
    return {"counts": counts, "problems": problems, "slowest": slowest, "slowest_cpu": slowest_cpu}


def run(what: str, total: int, workers: int, first_seed: int, deadline: float) -> dict:
    """Fuzz ``total`` files in chunks of 50 seeds; stop taking new chunks at ``deadline``
    (time.monotonic). Prints the running totals after every 1,000 files."""
    per = 50
    chunks = [(what, s, min(per, first_seed + total - s)) for s in range(first_seed, first_seed + total, per)]
    counts: collections.Counter = collections.Counter()
    problems: list = []
    slowest = slowest_cpu = 0.0
    start = time.perf_counter()
    with mp.get_context("fork").Pool(workers, maxtasksperchild=20) as pool:
        pending = iter(chunks)
        running = [pool.apply_async(_work, (c,)) for c in (next(pending, None) for _ in range(workers * 2)) if c]
        while running:
            part = running.pop(0).get()
            counts.update(part["counts"])
            problems += part["problems"]
            slowest = max(slowest, part["slowest"])
            slowest_cpu = max(slowest_cpu, part["slowest_cpu"])
            if counts["plans"] % 1000 < per:
                print(f"   ... {what}: {counts['plans']:,} files, {counts['internal error']} internal errors, "
                      f"{counts['traceback']} tracebacks, {counts['over 5 s']} over 5 s, {counts['hang']} hangs "
                      f"({time.perf_counter() - start:.0f} s, load {Path('/proc/loadavg').read_text().split()[0]})",
                      flush=True)
            nxt = next(pending, None) if time.monotonic() < deadline else None
            if nxt is not None:
                running.append(pool.apply_async(_work, (nxt,)))
    return {"counts": counts, "problems": problems, "slowest": slowest, "slowest_cpu": slowest_cpu,
            "seconds": time.perf_counter() - start}


def report(what: str, r: dict) -> None:
    c = r["counts"]
    sys.stdout.flush()
    print(f"== {what}: {c['plans']:,} files in {r['seconds']:.0f} s; slowest command "
          f"{r['slowest']:.2f} s wall, {r['slowest_cpu']:.2f} s CPU")
    for key in sorted(k for k in c if " exit " in k):
        print(f"   {key:20s} {c[key]:>7,}")
    for key in ("internal error", "traceback", "exit 1", "over 5 s", "over 5 s of CPU", "hang"):
        print(f"   {key:20s} {c.get(key, 0):>7,}")
    shown = [p for p in r["problems"] if not p[2].startswith("over 5 s")][:40]
    shown += [p for p in r["problems"] if p[2].startswith("over 5 s")][:40 - len(shown)]
    for seed, command, kind, text in shown:
        print(f"   seed {seed} {command}: {kind}: {text}")


def main() -> None:
    plans = int(sys.argv[1]) if len(sys.argv) > 1 else 10_000
    workers = int(sys.argv[2]) if len(sys.argv) > 2 else 2
    first = int(sys.argv[3]) if len(sys.argv) > 3 else 0
    minutes = float(sys.argv[4]) if len(sys.argv) > 4 else 90.0
    print(f"load average before: {Path('/proc/loadavg').read_text().split()[:3]}", flush=True)
    end = time.monotonic() + minutes * 60
    shares = (("incentives", max(plans // 10, 1), 0.06), ("weather", max(plans // 50, 1), 0.04), ("plans", plans, 0.9))
    for what, n, share in shares:  # the small ones first, each with its share of the time
        report(what, run(what, n, workers, first, min(end, time.monotonic() + share * minutes * 60)))
        print(f"load average after: {Path('/proc/loadavg').read_text().split()[:3]}", flush=True)


if __name__ == "__main__":
    main()
