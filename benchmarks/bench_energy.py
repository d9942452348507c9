"""Benchmark: median time of one full-year homeplan.energy.simulate after the per-home cache is
built, and the speed-up against the per-hour Python loop in baseline_loop_energy.py.

Prints figures only (targets: <= 5 ms median; >= 20x faster than the loop). Weather: pvlib's
bundled TMY3 for Greensboro NC. The home is invented.
"""

from __future__ import annotations

import os
import statistics
import sys
import time
from dataclasses import replace
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from baseline_loop_energy import simulate_loop  # noqa: E402

from homeplan.energy.appliances import CookingSpec, DryerSpec  # noqa: E402
from homeplan.energy.battery import BatterySpec  # noqa: E402
from homeplan.energy.heating import CoolingSpec, size_heat_pump  # noqa: E402
from homeplan.energy.simulate import HomeEnergySpec, SiteCache, simulate, with_heat_pump  # noqa: E402
from homeplan.energy.solar import SolarArraySpec  # noqa: E402
from homeplan.energy.vehicles import VehicleSpec  # noqa: E402
from homeplan.energy.water import WaterHeaterSpec  # noqa: E402
from homeplan.energy.weather import read_tmy3  # noqa: E402


def _median_s(fn, repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main() -> None:
    import pvlib

    t0 = time.perf_counter()
    weather = read_tmy3(os.path.join(os.path.dirname(pvlib.__file__), "data", "723170TYA.CSV"))
    cache = SiteCache(weather)
    base = HomeEnergySpec(weather=weather, ua_btuh_f=450.0, cooling=CoolingSpec(13.4),
                          vehicles=(VehicleSpec(),), label="invented demo home")
    hp = size_heat_pump(base.design_heating_load_btuh, float(weather.heating_design_f))
    electric = replace(
        with_heat_pump(base, hp), water_heater=WaterHeaterSpec.heat_pump(),
        cooking=CookingSpec("induction"), dryer=DryerSpec("heat_pump"),
        vehicles=(VehicleSpec("electricity"),), solar=SolarArraySpec(7.0),
        battery=BatterySpec(), gas_service_open=False,
    )
    simulate(base, cache)
    simulate(electric, cache)
    setup = time.perf_counter() - t0
    print(f"weather read + per-home cache build + first simulations: {setup * 1000:.0f} ms")

    for name, spec in (("gas baseline state", base), ("all-electric + PV + battery", electric)):
        vec = _median_s(lambda s=spec: simulate(s, cache), 300)
        loop = _median_s(lambda s=spec: simulate_loop(s, cache), 5)
        r = simulate(spec, cache)
        ref = simulate_loop(spec, cache)
        print(f"{name}: simulate median {vec * 1000:.2f} ms (target <= 5 ms); "
              f"per-hour loop median {loop * 1000:.1f} ms; speed-up {loop / vec:.0f}x "
              f"(target >= 20x)")
        print(f"  check: site kWh {r.annual_units['electricity']:.1f} vs loop "
              f"{ref['electricity']:.1f}; grid import {r.grid_import_kwh:.1f} vs "
              f"{ref['import']:.1f}")


if __name__ == "__main__":
    main()
