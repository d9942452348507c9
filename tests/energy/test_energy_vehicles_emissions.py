"""Vehicles (EPA kWh per gallon equivalent, charging) and emission factors."""

from __future__ import annotations

import numpy as np
import pint
import pytest

from homeplan.energy._data import read_table
from homeplan.energy.emissions import EmissionFactors, emissions_kg, fuel_money_out_usd
from homeplan.energy.vehicles import (
    VehicleSpec,
    daily_charging_profile,
    ev_charging_hourly,
    ev_wall_kwh_per_mile,
    mpge,
    vehicle_annual_input,
)

UREG = pint.UnitRegistry()


def test_mpge_epa():
    # EPA label: MPGe = 33.7 / (kWh/mile); 0.30 kWh/mile -> 112.3 MPGe
    assert mpge(0.30) == pytest.approx(112.33, abs=0.01)
    assert mpge(0.337) == pytest.approx(100.0)


def test_charging_losses_counted_once():
    # from memory: Level 2 charging efficiency 0.85-0.90; the EPA fuel economy label's kWh per
    # 100 miles is measured at the wall (40 CFR 600), so it must not be divided again
    ev = VehicleSpec("electricity", 12_000, kwh_per_mile=0.28, charging_efficiency=0.88)
    assert ev_wall_kwh_per_mile(ev) == pytest.approx(0.28 / 0.88)
    label = VehicleSpec("electricity", 12_000, kwh_per_mile=0.30, label_is_wall=True)
    assert vehicle_annual_input(label) == ("electricity", pytest.approx(3600.0))


def test_ev_uses_about_a_third_of_gasoline_energy_per_mile():
    # common practice, no source: an EV uses about a third of the energy per mile of a gas car
    gas_kwh_per_mile = 33.7 / 28.0  # EPA 33.7 kWh/gal, a 28 mpg car
    ev = ev_wall_kwh_per_mile(VehicleSpec("electricity", kwh_per_mile=0.30))
    assert 0.22 <= ev / gas_kwh_per_mile <= 0.40


def test_typical_passenger_car_emissions():
    # EPA "Greenhouse gas emissions from a typical passenger vehicle": ~4.6 t CO2/yr
    # (22.2 mpg, 11,500 miles, 8,887 g/gal - figures from memory)
    fuel, gal = vehicle_annual_input(VehicleSpec("gasoline", 11_500, mpg=22.2))
    kg = emissions_kg({fuel: gal}, EmissionFactors.default())[fuel]
    assert kg == pytest.approx(4600, rel=0.01)


@pytest.mark.parametrize("schedule", ["overnight", "solar", "tou", "immediate"])
def test_charging_schedules(schedule):
    ev = VehicleSpec("electricity", 14_600, kwh_per_mile=0.30, charging_efficiency=0.9,
                     charger_kw=7.2, schedule=schedule, window_start_hour=1)
    hourly = ev_charging_hourly(ev)
    daily = 14_600 * 0.30 / 0.9 / 365
    assert hourly.sum() == pytest.approx(14_600 * 0.30 / 0.9)
    assert hourly.max() <= 7.2 + 1e-9
    day = hourly[:24]
    assert day.sum() == pytest.approx(daily)
    start = {"overnight": 22, "solar": 10, "tou": 1, "immediate": 18}[schedule]
    assert day[start] == pytest.approx(7.2)
    hours_needed = int(np.ceil(daily / 7.2))
    charging = {(start + k) % 24 for k in range(hours_needed)}
    assert set(np.nonzero(day)[0]) == charging


def test_charging_more_than_a_day_fits():
    prof = daily_charging_profile(200.0, 22, 7.2)
    assert prof.sum() == pytest.approx(200.0)


def test_emission_factors_eia_epa():
    f = EmissionFactors.default()
    # EPA 40 CFR 98 Table C-1: 53.06 kg CO2/MMBtu natural gas (from memory) -> per therm via pint
    per_therm = (UREG.Quantity(53.06, "kg") / UREG.Quantity(1e6, "Btu") * UREG.Quantity(1, "therm")).to("kg").magnitude
    assert f.natural_gas_kg_per_therm == pytest.approx(per_therm, rel=2e-4)
    assert f.gasoline_kg_per_gal == pytest.approx(8.887)  # EPA-420-F-11-041
    assert f.diesel_kg_per_gal == pytest.approx(10.18)  # EPA-420-F-11-041
    # EIA CO2 coefficients (from memory): No. 2 fuel oil 22.4 lb/gal, propane 12.68 lb/gal
    assert f.heating_oil_kg_per_gal == pytest.approx(UREG.Quantity(22.4, "lb").to("kg").magnitude, rel=0.005)
    assert f.propane_kg_per_gal == pytest.approx(UREG.Quantity(12.68, "lb").to("kg").magnitude, rel=0.005)
    # EIA FAQ 74: 0.81 lb/kWh (2023)
    assert f.grid_kg_per_kwh == pytest.approx(UREG.Quantity(0.81, "lb").to("kg").magnitude,
                                              rel=0.002)
    # EPA eGRID2023 (reportedly): 771.5 lb/MWh
    egrid = EmissionFactors.default("grid_us_egrid_2023").grid_kg_per_kwh
    assert egrid == pytest.approx(UREG.Quantity(771.5, "lb/MWh").to("kg/kWh").magnitude,
                                  rel=0.001)
    assert EmissionFactors.default(grid_kg_per_kwh=0.1).grid_kg_per_kwh == 0.1  # user setting


def test_every_table_row_has_a_source():
    for name in ("constants", "emission_factors", "efficiencies", "hourly_profiles", "prices"):
        rows = read_table(name)
        assert rows and all(r["source"].strip() for r in rows)


def test_money_out_excludes_electricity():
    assert fuel_money_out_usd({"electricity": 1000.0, "natural_gas": 900.0,
                               "gasoline": 1200.0}) == 2100.0
