"""Terminal app timings: first paint, and a budget keypress to the updated roadmap on screen.

    .venv/bin/python benchmarks/bench_tui.py [--presses N] [sample.yaml ...]

First paint is measured in a fresh interpreter (a subprocess), from the start of the script to the
first refresh after the app mounts; the plan is loaded but the planner has not run yet (it runs in
a worker after the first paint). The keypress figure runs the app headless with the real planner,
presses "+" (budget +$1,000) on the Roadmap view and takes the time at which the app reports the
screen holding the new roadmap has been drawn (``call_after_refresh`` after the result lands);
the planner's own time for the same plans is printed beside it, so the share of the UI is visible.
Targets (issue 7): first paint <= 1 s; keypress to roadmap median <= 200 ms.
"""

from __future__ import annotations

import argparse
import asyncio
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SAMPLES = sorted((ROOT / "sample_homes").glob("*.yaml"))

FIRST_PAINT = r"""
import time
t0 = time.perf_counter()
import sys
from homeplan.tui.session import PlanSession
from homeplan.tui.app import HomeplanApp

class Bench(HomeplanApp):
    def on_mount(self):
        super().on_mount()
        self.call_after_refresh(self._painted)

    def _painted(self):
        print(f"FIRST_PAINT {time.perf_counter() - t0:.4f}", flush=True)
        self.exit()

def never(plan, base_dir):
    raise RuntimeError("not planning in this measurement")

Bench(session=PlanSession.open(sys.argv[1]), planner=never, light=False).run(
    headless=True, size=(80, 24))
"""


def first_paint(path: Path, runs: int = 5) -> list[float]:
    out = []
    for _ in range(runs):
        proc = subprocess.run([sys.executable, "-c", FIRST_PAINT, str(path)], capture_output=True,
                              text=True, cwd=ROOT, timeout=60)
        line = next((x for x in proc.stdout.splitlines() if x.startswith("FIRST_PAINT")), None)
        if line is None:
            raise RuntimeError(f"no first paint: {proc.stderr[-2000:]}")
        out.append(float(line.split()[1]))
    return out


async def keypress_to_roadmap(path: Path, presses: int) -> tuple[list[float], list[float]]:
    from homeplan.tui.app import EnginePlanner, HomeplanApp
    from homeplan.tui.session import PlanSession

    engine = EnginePlanner()
    engine_times: list[float] = []

    def timed(plan, base_dir):
        t = time.perf_counter()
        result = engine(plan, base_dir)
        engine_times.append(time.perf_counter() - t)
        return result

    app = HomeplanApp(session=PlanSession.open(path), planner=timed, light=False)
    totals: list[float] = []
    async with app.run_test(size=(100, 30)) as pilot:
        await _wait_plan(app, pilot)
        await pilot.press("3")
        await pilot.pause()
        engine_times.clear()
        for _ in range(presses):
            t0 = time.perf_counter()
            await pilot.press("plus")
            target = app.generation
            while app.painted[0] != target:
                await asyncio.sleep(0.001)
            totals.append(app.painted[1] - t0)
            await _wait_plan(app, pilot)
    return totals, engine_times


async def _wait_plan(app, pilot) -> None:
    while app.planning or app.shown_generation != app.generation:
        await asyncio.sleep(0.002)
    await pilot.pause()  # the refreshed roadmap is drawn


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("files", nargs="*", type=Path)
    ap.add_argument("--presses", type=int, default=9)
    args = ap.parse_args()
    files = args.files or SAMPLES
    fp = first_paint(ROOT / "sample_homes" / "cold_gas_100a.yaml")
    print(f"first paint (fresh interpreter, 80x24, cold_gas_100a): median {statistics.median(fp):.3f} s"
          f"  (runs: {', '.join(f'{x:.3f}' for x in fp)})  target <= 1 s")
    print(f"{'sample':<28} {'keypress->roadmap median':>25} {'max':>7} {'planner median':>15} "
          f"{'UI share':>9}")
    for path in files:
        totals, engine = asyncio.run(keypress_to_roadmap(path, args.presses))
        med, eng = statistics.median(totals), statistics.median(engine) if engine else float("nan")
        print(f"{path.name:<28} {med * 1000:>22.0f} ms {max(totals) * 1000:>4.0f} ms "
              f"{eng * 1000:>12.0f} ms {(med - eng) * 1000:>6.0f} ms")
    print("target: keypress->roadmap median <= 200 ms")
    return 0


if __name__ == "__main__":
    sys.exit(main())
