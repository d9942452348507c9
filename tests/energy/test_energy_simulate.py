"""End-to-end simulation of one home in several plan states (the home is invented)."""

from __future__ import annotations

import subprocess
import sys
from dataclasses import replace

import numpy as np
import pytest

from homeplan.energy.appliances import CookingSpec, DryerSpec
from homeplan.energy.battery import BatterySpec
from homeplan.energy.calibrate import calibrate_annual
from homeplan.energy.heating import CoolingSpec, FurnaceSpec, HeatPumpSpec, size_heat_pump
from homeplan.energy.rates import ElectricRate
from homeplan.energy.simulate import (
    HomeEnergySpec,
    SiteCache,
    plug_kwh_from_bills,
    simulate,
    with_heat_pump,
)
from homeplan.energy.solar import SolarArraySpec
from homeplan.energy.vehicles import VehicleSpec
from homeplan.energy.water import WaterHeaterSpec
from homeplan.energy.weather import ClimateNormals, synthetic_weather


@pytest.fixture(scope="module")
def cold():
    """Synthetic year for the climate of the degree-day hand calculation: HDD65 6,000, T_99 5 F
    (invented site at 42 N; CDD, cooling design and cloudiness from memory, plausible)."""
    w = synthetic_weather(ClimateNormals(42.0, -88.0, 6000.0, 800.0, 5.0, 90.0, 0.5))
    return w, SiteCache(w)


@pytest.fixture(scope="module")
def gas_home(cold):
    w, _ = cold
    return HomeEnergySpec(weather=w, ua_btuh_f=422.22, heating=FurnaceSpec("natural_gas", 0.80),
                          cooling=CoolingSpec(13.4), water_heater=WaterHeaterSpec("natural_gas", 0.62),
                          cooking=CookingSpec("natural_gas"), dryer=DryerSpec("electric"),
                          vehicles=(VehicleSpec("gasoline", 11_000, mpg=28.0),),
                          plug_kwh_per_yr=5000.0, label="invented gas home")


def test_heating_gas_matches_bill_worked_example(cold, gas_home):
    w, cache = cold
    r = simulate(gas_home, cache)
    heat_therm = r.end_use_units["heating"]["natural_gas"]
    # Degree-hour method (ASHRAE Handbook - Fundamentals 2021, ch. 19), by hand from this year's
    # hourly temperatures: therm = UA x sum(max(65 - T_h, 0)) / (AFUE x 1e5)
    degree_hours = float(np.maximum(65.0 - w.temp_f, 0.0).sum())
    assert heat_therm == pytest.approx(422.22 * degree_hours / 0.80e5, rel=1e-9)
    # The daily degree-day hand calculation (UA 422.22, AFUE 0.80, HDD65 6,000 -> 760 therm)
    # scales by degree-hours / 24 over this year's daily-mean HDD65 (6,218 / 6,001 here: hours
    # colder than the daily mean count in full) - not a tolerance, an exact relation.
    daily_method_therm = 422.22 * 24 * 6000.0 / 0.80e5  # = 760.0 therm, by hand
    assert heat_therm == pytest.approx(daily_method_therm * (degree_hours / 24) / 6000.0, rel=1e-9)
    assert w.hdd65 == pytest.approx(6000.0, rel=0.001)
    # and the bill calibration (daily degree days) run on the simulated gas recovers the UA it
    # was given, scaled by the same ratio
    base = r.annual_units["natural_gas"] - heat_therm
    cal = calibrate_annual(r.annual_units["natural_gas"], base, 6000.0, 5.0, 0.80)
    assert cal.ua_btuh_f == pytest.approx(422.22 * (degree_hours / 24) / 6000.0, rel=1e-9)
    assert r.backup_heat_hours == 0


def test_gas_home_totals_and_frames(cold, gas_home):
    _, cache = cold
    r = simulate(gas_home, cache)
    # 11,000 mi / 28 mpg = 392.9 gal; x 8.887 kg/gal (EPA-420-F-11-041)
    assert r.annual_units["gasoline"] == pytest.approx(11_000 / 28)
    assert r.emissions_kg["gasoline"] == pytest.approx(11_000 / 28 * 8.887)
    assert r.emissions_kg["natural_gas"] == pytest.approx(r.annual_units["natural_gas"] * 5.306)
    m = r.monthly_frame()
    a = r.annual_frame()
    assert list(m.index)[:2] == ["Jan", "Feb"] and len(m) == 12
    assert m["natural_gas_therm"].sum() == pytest.approx(a.loc["natural_gas", "use"])
    assert a.loc["natural_gas", "bill_usd"] == pytest.approx(
        r.annual_units["natural_gas"] * 1.40 + 12 * 15.0)  # default price + fixed charge
    assert m["natural_gas_therm"]["Jan"] > 5 * m["natural_gas_therm"]["Jul"]
    assert r.fossil_fuel_usd == pytest.approx(a.loc[["natural_gas", "gasoline"], "bill_usd"].sum())
    assert r.peak_summer_kw > r.peak_winter_kw  # AC-only electric peak is in summer


def test_electrified_states(cold, gas_home):
    w, cache = cold
    hp = size_heat_pump(gas_home.design_heating_load_btuh, float(w.heating_design_f))
    s1 = with_heat_pump(gas_home, hp)
    r0, r1 = simulate(gas_home, cache), simulate(s1, cache)
    assert "natural_gas" not in r1.end_use_units["heating"]
    assert r1.annual_units["natural_gas"] < r0.annual_units["natural_gas"] - 600
    # gas still open -> the fixed charge stays (common practice, no source: it is billed while
    # the account is open)
    assert r1.annual_bills_usd["natural_gas"] >= 12 * 15.0
    # seasonal COP of the heat pump between the 5 F and 47 F rating COPs
    heat_kwh = r1.end_use_units["heating"]["electricity"]
    scop = r1.heating_delivered_kwh / heat_kwh
    assert hp.cop_5 < scop < hp.cop_47
    assert r1.peak_winter_kw > r1.peak_summer_kw  # heat pump home peaks in winter
    s2 = replace(s1, water_heater=WaterHeaterSpec.heat_pump(), cooking=CookingSpec("induction"),
                 vehicles=(VehicleSpec("electricity", 11_000, kwh_per_mile=0.30,
                                       charging_efficiency=0.88),),
                 gas_service_open=False)
    r2 = simulate(s2, cache)
    assert "natural_gas" not in r2.annual_bills_usd
    assert r2.fossil_fuel_usd == 0.0
    assert r2.end_use_units["vehicles"]["electricity"] == pytest.approx(11_000 * 0.30 / 0.88)
    assert r2.total_emissions_kg < r0.total_emissions_kg


def test_closing_gas_with_gas_appliances_is_an_error(gas_home):
    with pytest.raises(ValueError, match="gas service is closed"):
        replace(gas_home, gas_service_open=False)


def test_solar_battery_energy_balance(cold, gas_home):
    _, cache = cold
    hp = HeatPumpSpec.cold_climate(30_000)
    spec = replace(with_heat_pump(gas_home, hp), solar=SolarArraySpec(8.0),
                   battery=BatterySpec(), electric_rate=ElectricRate(export="net_billing"))
    r = simulate(spec, cache)
    assert r.grid_export_kwh > 0
    soc = r.battery_soc_kwh
    d_soc = soc[-1] - 0.5 * 13.5
    # load - solar = import - export - battery losses - stored energy
    lhs = r.load_kw.sum() - r.solar_kw.sum()
    rhs = r.grid_import_kwh - r.grid_export_kwh
    assert rhs >= lhs  # battery losses can only add imports
    eta = 0.9 ** 0.5
    charge_minus_discharge = rhs - lhs
    assert charge_minus_discharge >= d_soc / eta - 1e-6
    no_batt = simulate(replace(spec, battery=None), cache)
    assert r.grid_import_kwh < no_batt.grid_import_kwh
    assert r.peak_kw == pytest.approx(no_batt.peak_kw)  # battery does not change site load
    assert r.annual_bills_usd["electricity"] < no_batt.annual_bills_usd["electricity"]


def test_site_cache_must_match_weather(gas_home, greensboro):
    with pytest.raises(ValueError):
        simulate(gas_home, SiteCache(greensboro))


def test_core_does_not_import_heavy_libraries():
    # Project rule (not an outside source): pandas, scipy, pvlib are imported inside functions;
    # never textual.
    code = ("import sys; import homeplan.energy.simulate, homeplan.energy.calibrate, "
            "homeplan.energy.sizing; "
            "print(sorted(m for m in ('pandas', 'scipy', 'pvlib', 'textual') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_results_are_numpy_and_full_year(cold, gas_home):
    _, cache = cold
    r = simulate(gas_home, cache)
    for arr in (r.load_kw, r.solar_kw, r.grid_import_kw, r.grid_export_kw):
        assert isinstance(arr, np.ndarray) and arr.shape == (8760,)


def test_specs_are_hashable_and_replaceable(cold, gas_home):
    _, cache = cold
    s1 = replace(gas_home, plug_kwh_per_yr=6000.0)
    assert s1 != gas_home and hash(replace(gas_home)) == hash(gas_home)
    memo = {gas_home: 1, s1: 2}  # the lead can memoise results per state
    assert memo[replace(gas_home)] == 1
    r0, r1 = simulate(gas_home, cache), simulate(s1, cache)
    # invented home: +1,000 kWh of plug load adds exactly 1,000 kWh of site use
    assert r1.annual_units["electricity"] - r0.annual_units["electricity"] == pytest.approx(1000)
    summ = r1.summary()
    assert summ["electricity_kWh"] == pytest.approx(r1.annual_units["electricity"])
    assert summ["total_bill_usd"] == pytest.approx(sum(r1.annual_bills_usd.values()))


def test_plug_load_and_cooling_calibration(cold, gas_home):
    _, cache = cold
    r = simulate(gas_home, cache)
    # subtraction from the bill: the invented home's 5,000 kWh of other loads come back
    billed = r.annual_units["electricity"]
    assert plug_kwh_from_bills(gas_home, billed, cache) == pytest.approx(5000.0)
    assert plug_kwh_from_bills(gas_home, 100.0, cache) == 0.0
    hot = simulate(replace(gas_home, cooling_load_multiplier=1.5), cache)
    assert hot.end_use_units["cooling"]["electricity"] == pytest.approx(
        1.5 * r.end_use_units["cooling"]["electricity"])
