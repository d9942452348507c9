"""The vectorised model agrees with an independent implementation: the per-hour Python loop of
benchmarks/baseline_loop_energy.py (the baseline that bench_energy.py times it against).

This is a consistency check between two implementations in this project, not a check against an
outside source (the physics are checked against published sources in the other energy tests):
the loop is the same hourly model written a second time, hour by hour in plain Python with its own degree-hour loads, heat pump rating lines, daily
profiles, EV charging window, battery dispatch, export curtailment, bill netting, fuel totals and
emissions. It shares with ``simulate`` only the cache's inputs that do not depend on the plan state
(temperatures, mains water temperature, the tariff's hourly price, the array's output per kWdc,
whose PVWatts chain tests/energy/test_energy_solar.py checks against pvlib), the appliances'
annual ratings and the data tables.
Every figure the loop produces is compared, to 0.01 kWh (0.01 kW, USD, kg CO2; fuel to the
therm or gallon worth 0.01 kWh of heat). The homes are invented.
"""

from __future__ import annotations

import importlib.util
from dataclasses import replace

import pytest

from homeplan.energy.appliances import CookingSpec, DryerSpec
from homeplan.energy.battery import BatterySpec
from homeplan.energy.heating import (
    CoolingSpec,
    FurnaceSpec,
    HeatPumpSpec,
    ResistanceHeatSpec,
)
from homeplan.energy.rates import ElectricRate, TouPeriod
from homeplan.energy.simulate import HomeEnergySpec, SiteCache, simulate
from homeplan.energy.solar import SolarArraySpec
from homeplan.energy.units import btu_per_kwh, btu_per_unit
from homeplan.energy.vehicles import VehicleSpec
from homeplan.energy.water import WaterHeaterSpec
from homeplan.energy.weather import synthetic_weather

from ..conftest import ROOT
from .conftest import CLIMATES

KWH_TOL = 0.01  # kWh (and kW, USD, kg CO2)


def _load_loop():
    path = ROOT / "benchmarks" / "baseline_loop_energy.py"
    mod_spec = importlib.util.spec_from_file_location("baseline_loop_energy", path)
    module = importlib.util.module_from_spec(mod_spec)
    mod_spec.loader.exec_module(module)
    return module


_loop_module = _load_loop()
simulate_loop = _loop_module.simulate_loop
_bench_states = _loop_module.bench_states  # the two states bench_energy.py times


@pytest.fixture(scope="module")
def greensboro_cache(greensboro):
    return SiteCache(greensboro)


@pytest.fixture(scope="module")
def cold_cache():
    """Synthetic Minneapolis-like year (normals from memory, see conftest): hours below the heat
    pumps' cut-outs and switch-overs, so backup heat runs."""
    return SiteCache(synthetic_weather(CLIMATES["minneapolis"]))


def _state(name, greensboro_cache, cold_cache):
    gb = greensboro_cache.weather
    base, electric = _bench_states(gb)
    if name == "gas baseline":
        return base, greensboro_cache
    if name == "all-electric + PV + battery":
        return electric, greensboro_cache
    w = cold_cache.weather
    tou = ElectricRate(usd_per_kwh=0.12, tou_periods=(TouPeriod("peak", 0.38, (16, 17, 18, 19, 20),
                                                                weekdays_only=True),))
    if name == "dual fuel, TOU battery, net billing with export limit":
        # single-stage heat pump, propane backup below 20 F, cycling losses; a battery that
        # charges from the grid at night; exports credited at a fixed rate and capped at 2 kW
        hp = HeatPumpSpec.single_stage(30_000.0, backup="propane", backup_afue=0.92,
                                       switchover_f=20.0)
        spec = HomeEnergySpec(
            weather=w, ua_btuh_f=520.0, heating=hp,
            cooling=CoolingSpec(hp.seer2), water_heater=WaterHeaterSpec("electricity", 0.93),
            cooking=CookingSpec("propane"), dryer=DryerSpec("propane"),
            vehicles=(VehicleSpec("electricity", schedule="tou", window_start_hour=1),
                      VehicleSpec("diesel", 9_000, mpg=35.0)),
            solar=SolarArraySpec(9.0, azimuth_deg=200.0, shading_monthly_pct=(8, 6, 4, 2, 1, 0, 0, 1, 2, 4, 6, 8)),
            battery=BatterySpec(mode="tou", charge_hours=(1, 2, 3), discharge_hours=(17, 18, 19)),
            electric_rate=replace(tou, export="net_billing", export_limit_kw=2.0, min_bill_usd=20.0),
            gas_service_open=False, fuel_accounts_open=("propane",),
            cooling_load_multiplier=1.3, label="invented dual-fuel home")
        return spec, cold_cache
    if name == "resistance heat, no export, EV longer than a day":
        # baseboard heat, electric resistance water heater, a non-export array, and an EV whose
        # daily charge does not fit in 24 h on its charger
        spec = HomeEnergySpec(
            weather=w, ua_btuh_f=380.0, heating=ResistanceHeatSpec(), cooling=None,
            water_heater=WaterHeaterSpec("electricity", 0.92), cooking=CookingSpec("resistance"),
            dryer=DryerSpec("electric"),
            vehicles=(VehicleSpec("electricity", 40_000, charger_kw=1.4, schedule="immediate"),),
            solar=SolarArraySpec(5.0, losses_pct=12.0), electric_rate=ElectricRate(export="none"),
            label="invented all-resistance home")
        return spec, cold_cache
    if name == "oil furnace with blower, TOU rate":
        # an oil furnace with blower power and an oil water heater; the oil account stays open
        furnace = HomeEnergySpec(
            weather=w, ua_btuh_f=600.0, heating=FurnaceSpec("heating_oil", 0.84, aux_kwh_per_therm_out=0.8),
            water_heater=WaterHeaterSpec("heating_oil", 0.6), fuel_accounts_open=("heating_oil",),
            electric_rate=tou, label="invented oil home")
        return furnace, cold_cache
    if name == "heat pump without backup, net metering true-up":
        # a cold-climate unit too small for the cold hours and no backup (that load goes unmet);
        # an array larger than the home's use, so net metering credit is left at the true-up
        hp = HeatPumpSpec.cold_climate(24_000.0, backup="none")
        spec = HomeEnergySpec(
            weather=w, ua_btuh_f=600.0, heating=hp, cooling=CoolingSpec(20.0),
            water_heater=WaterHeaterSpec.heat_pump(), cooking=CookingSpec("induction"),
            dryer=DryerSpec("heat_pump"), solar=SolarArraySpec(25.0), gas_service_open=False,
            plug_kwh_per_yr=0.0, label="invented over-solar home")
        return spec, cold_cache
    raise KeyError(name)


STATES = ("gas baseline", "all-electric + PV + battery",
          "dual fuel, TOU battery, net billing with export limit",
          "resistance heat, no export, EV longer than a day",
          "oil furnace with blower, TOU rate",
          "heat pump without backup, net metering true-up")


def _expected(r):
    """The vectorised model's figure for each output of the loop."""
    end = r.end_use_units
    return {
        "site_kwh": r.annual_units["electricity"],
        "grid_import_kwh": r.grid_import_kwh,
        "grid_export_kwh": r.grid_export_kwh,
        "solar_kwh": float(r.monthly_solar_kwh.sum()),
        "heating_electric_kwh": end["heating"].get("electricity", 0.0),
        "cooling_kwh": end["cooling"].get("electricity", 0.0),
        "heating_delivered_kwh": r.heating_delivered_kwh,
        "backup_heat_hours": r.backup_heat_hours,
        "peak_kw": r.peak_kw,
        "peak_winter_kw": r.peak_winter_kw,
        "peak_summer_kw": r.peak_summer_kw,
        "peak_import_kw": r.peak_import_kw,
        "electric_bill_usd": r.annual_bills_usd["electricity"],
        "total_bill_usd": r.total_bill_usd,
        "kg_co2": r.total_emissions_kg,
        "fuel_units": {f: u for f, u in r.annual_units.items() if f != "electricity"},
        "monthly_site_kwh": r.monthly_units["electricity"].tolist(),
        "monthly_import_kwh": r.monthly_grid_import_kwh.tolist(),
        "monthly_export_kwh": r.monthly_grid_export_kwh.tolist(),
    }


@pytest.mark.parametrize("name", STATES)
def test_vectorised_model_agrees_with_the_per_hour_loop(name, greensboro_cache, cold_cache):
    spec, cache = _state(name, greensboro_cache, cold_cache)
    loop = simulate_loop(spec, cache)
    want = _expected(simulate(spec, cache))
    assert set(loop) == set(want), "every output of the loop is compared"
    for key, value in loop.items():
        if key == "fuel_units":
            assert set(value) == set(want[key]), key
            for fuel, units in value.items():
                tol = KWH_TOL * btu_per_kwh() / btu_per_unit(fuel)  # 0.01 kWh of heat, in units
                assert units == pytest.approx(want[key][fuel], abs=tol), fuel
        elif key == "backup_heat_hours":
            assert value == want[key]
        elif key.startswith("monthly_"):
            assert value == pytest.approx(want[key], abs=KWH_TOL), key
        else:
            assert value == pytest.approx(want[key], abs=KWH_TOL), key


def test_the_states_exercise_every_branch(greensboro_cache, cold_cache):
    """Guard against states that leave branches of either implementation idle."""
    out = {n: simulate_loop(*_state(n, greensboro_cache, cold_cache)) for n in STATES}
    assert out["gas baseline"]["fuel_units"]["natural_gas"] > 300
    assert out["all-electric + PV + battery"]["grid_export_kwh"] > 100
    dual = out["dual fuel, TOU battery, net billing with export limit"]
    assert dual["backup_heat_hours"] > 100 and dual["fuel_units"]["propane"] > 50
    dual_spec, cache = _state("dual fuel, TOU battery, net billing with export limit",
                              greensboro_cache, cold_cache)
    assert dual["solar_kwh"] < float(cache.pv_ac_kw(dual_spec.solar).sum()) - 10  # curtailed
    resistance = out["resistance heat, no export, EV longer than a day"]
    assert resistance["grid_export_kwh"] == 0.0 and resistance["solar_kwh"] > 0
    furnace = out["oil furnace with blower, TOU rate"]
    assert furnace["heating_electric_kwh"] > 0 and furnace["fuel_units"]["heating_oil"] > 300
    over = out["heat pump without backup, net metering true-up"]
    assert over["backup_heat_hours"] == 0 and over["grid_export_kwh"] > over["grid_import_kwh"]
