"""Heating and cooling equipment models."""

from __future__ import annotations

import numpy as np
import pytest

from homeplan.energy.heating import (
    FurnaceSpec,
    HeatPumpSpec,
    ResistanceHeatSpec,
    balance_point_f,
    cooling_kwh,
    heat_pump_hourly,
    heating_hourly,
    hp_capacity_btuh,
    hp_cop,
    size_heat_pump,
)

HP = HeatPumpSpec(36_000, 30_000, 26_000, 3.8, 2.6, 2.0, cutout_f=-13.0)


def test_linear_between_the_rating_points():
    # Capacity and COP are linear in outdoor temperature between the DOE 10 CFR 430 Subpart B
    # Appendix M1 rating temperatures 5, 17 and 47 F (as in the HSPF2 bin method, from memory).
    # Checked against numpy.interp (an independent implementation) on a 0.5 F grid; the values
    # at the rating points themselves are this spec's inputs, not an outside figure.
    t = np.arange(5.0, 47.01, 0.5)
    np.testing.assert_allclose(hp_capacity_btuh(HP, t),
                               np.interp(t, [5.0, 17.0, 47.0], [26_000, 30_000, 36_000]))
    np.testing.assert_allclose(hp_cop(HP, t), np.interp(t, [5.0, 17.0, 47.0], [2.0, 2.6, 3.8]))


def test_extrapolation_and_cutout():
    # Model choices (common practice, no source): below 5 F extrapolate with the 5-17 F slope;
    # capacity 0 below the cut-out; COP clamped >= 1 (never worse than resistance heat).
    cap = hp_capacity_btuh(HP, np.array([-7.0, -14.0]))
    assert cap[0] == pytest.approx(26_000 - 12 * (30_000 - 26_000) / 12)
    assert cap[1] == 0.0
    assert hp_cop(HP, np.array([-100.0]))[0] == 1.0
    assert hp_cop(HP, np.array([32.0]))[0] == pytest.approx(2.6 + 15 * 1.2 / 30)


def test_energy_star_cold_climate_criterion():
    # ENERGY STAR cold climate: COP >= 1.75 at 5 F and capacity at 5 F >= 70 % of 47 F
    cc = HeatPumpSpec.cold_climate(36_000)
    assert cc.cop_5 >= 1.75 and cc.capacity_5_btuh / cc.capacity_47_btuh >= 0.70
    ss = HeatPumpSpec.single_stage(36_000)
    assert ss.capacity_5_btuh / ss.capacity_47_btuh < 0.70


def test_hourly_worked_example_resistance_backup():
    # By hand at 17 F: load 34,000 Btu/h, capacity 30,000, COP 2.6, the rest resistance backup;
    # kWh = 30,000 / (2.6 * 3412.14) + 4,000 / 3412.14 = 3.3816 + 1.1723 (NIST SP 811:
    # 1 kWh = 3,412.14 Btu)
    out = heat_pump_hourly(HP, np.array([17.0]), np.array([34_000.0]))
    assert out.electric_kwh[0] == pytest.approx(30_000 / (2.6 * 3412.14) + 4_000 / 3412.14)
    assert out.backup_hours == 1


def test_hourly_worked_example_dual_fuel():
    # By hand: furnace backup therms = backup Btu / (AFUE x 100,000 Btu/therm) (AFUE as defined
    # in DOE 10 CFR 430 Subpart B Appendix N; 1 therm = 100,000 Btu)
    hp = HeatPumpSpec(36_000, 30_000, 26_000, 3.8, 2.6, 2.0, backup="natural_gas",
                      backup_afue=0.95, switchover_f=10.0)
    out = heat_pump_hourly(hp, np.array([17.0, 0.0]), np.array([34_000.0, 40_000.0]))
    assert out.fuel == "natural_gas"
    assert out.fuel_units[0] == pytest.approx(4_000 / 0.95e5)
    # below the switchover the furnace carries the whole load
    assert out.fuel_units[1] == pytest.approx(40_000 / 0.95e5)
    assert out.electric_kwh[1] == 0.0


def test_balance_point_analytic():
    # Definition of the thermal balance point, solved by hand: UA (65 - T*) = Cap(T*); on the 5-17 F segment
    # Cap = 26,000 + (T - 5) * 4,000 / 12, so T* = (65 UA - 26,000 + 5 * 333.33) / (UA + 333.33)
    ua = 550.0
    slope = 4000.0 / 12.0
    expected = (65 * ua - 26_000 + 5 * slope) / (ua + slope)
    assert 5.0 <= expected <= 17.0
    assert balance_point_f(HP, ua) == pytest.approx(expected, abs=0.02)


def test_furnace_and_resistance():
    load = np.array([1e6])
    # DOE Appendix N AFUE: 1 MMBtu delivered at AFUE 0.95 = 10.526 therm
    f = heating_hourly(FurnaceSpec("natural_gas", 0.95), load * 0, load)
    assert f.fuel_units[0] == pytest.approx(1e6 / 0.95 / 1e5)
    # propane 91,452 Btu/gal (EIA): 1 MMBtu at AFUE 0.80 = 13.67 gal
    p = heating_hourly(FurnaceSpec("propane", 0.80), load * 0, load)
    assert p.fuel_units[0] == pytest.approx(1e6 / 0.8 / 91_452)
    r = heating_hourly(ResistanceHeatSpec(), load * 0, load)
    assert r.electric_kwh[0] == pytest.approx(1e6 / 3412.14)  # 1 kWh = 3,412.14 Btu


def test_cooling_seer2():
    # SEER2 in Btu/Wh (DOE Appendix M1): 1 MMBtu at SEER2 15 = 66.67 kWh = load_kWh / (SEER/3.412)
    kwh = cooling_kwh(15.0, np.array([1e6]))[0]
    assert kwh == pytest.approx(1e6 / 15_000)
    assert kwh == pytest.approx((1e6 / 3412.14) / (15.0 / 3.41214), rel=1e-6)


def test_sizing_covers_design_load_and_backup_hours(greensboro):
    ua = 450.0
    t99 = float(greensboro.heating_design_f)
    design = ua * (65 - t99)
    hp = size_heat_pump(design, t99, "cold_climate")
    cap_design = float(hp_capacity_btuh(hp, np.array([t99]))[0])
    assert cap_design >= design  # ACCA Manual S (2nd ed., 2014, from memory): capacity at design covers the design load
    smaller = HeatPumpSpec.cold_climate(hp.capacity_47_btuh - 6000)
    assert float(hp_capacity_btuh(smaller, np.array([t99]))[0]) < design
    load = ua * np.maximum(65 - greensboro.temp_f, 0)
    out = heat_pump_hourly(hp, greensboro.temp_f, load)
    # ASHRAE 99 % design dry-bulb: colder on only ~88 h of the year, so backup runs <= ~88 h.
    assert out.backup_hours <= 88
