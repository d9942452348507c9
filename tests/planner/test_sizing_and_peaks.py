"""The heat pump is sized from the home's loads (ACCA Manual S, 2nd ed., 2014), never from
today's air conditioner; the peak demand shown is the meter's, moved by each new load's
coincident demand."""

from __future__ import annotations

import pytest

from homeplan import catalog, load_plan, plan_roadmap
from homeplan.energy._data import heat_pump_class
from homeplan.planner.chain import prepare_home, size_projects
from homeplan.planner.context import PlannerCache

# An invented mild-climate gas home with an oversized 3-ton air conditioner and a measured
# 12-month peak of 6.5 kW.
HOME = """\
home:
  name: Mild gas home (invented)
  location: {latitude: 37.8, longitude: -122.2}
  climate: {hdd65: 2700, cdd65: 600, heating_design_f: 35, cooling_design_f: 88, cloudiness: 0.35}
  floor_area_ft2: 1500
  year_built: 1975
  occupants: 3
  electrical: {service_amps: 200, peak_demand_kw: 6.5, free_spaces: 8}
appliances:
  - {id: furnace, kind: furnace, fuel: gas, year_installed: 2004, afue: 0.80}
  - {id: ac, kind: central_ac, year_installed: 2012, seer2: 13, capacity_btuh: 36000}
  - {id: water_heater, kind: water_heater, fuel: gas, year_installed: 2016, uef: 0.62}
  - {id: range, kind: range, fuel: gas, year_installed: 2012}
vehicles:
  - {id: car, fuel: gasoline, mpg: 30, miles_per_year: 12000, replace_year: 2029}
usage:
  electricity: {monthly_kwh: [420, 380, 370, 340, 360, 450, 560, 560, 470, 360, 360, 420]}
  gas: {monthly_therms: [98, 84, 66, 42, 25, 18, 16, 16, 18, 32, 64, 105]}
budget: {usd_per_year: 30000, first_year: 2027}
choices: {exclude: [solar, battery]}
"""

# ACCA Manual S (2nd ed., 2014; from memory): cooling capacity at least 90 % of the total
# cooling load, at most 125 % for a heat pump in a heating-dominated climate (HDD65 at least
# twice CDD65).
BAND = (0.90, 1.25)


@pytest.fixture(scope="module")
def path(tmp_path_factory):
    p = tmp_path_factory.mktemp("sizing") / "home.yaml"
    p.write_text(HOME)
    return p


@pytest.fixture(scope="module")
def result(path):
    return plan_roadmap(load_plan(path))


@pytest.fixture(scope="module")
def ctx(path):
    lp = load_plan(path)
    return size_projects(prepare_home(lp.plan, lp.base_dir, PlannerCache()))


def test_heat_pump_is_sized_from_the_loads_not_the_old_air_conditioner(result):
    step = next(s for s in result.roadmap.steps if s.project_id == "heat_pump")
    assert step.nominal_tons != 3.0, "never the size of the 3-ton air conditioner"
    lo, hi = BAND
    assert lo <= step.nominal_tons * 12000 / step.cooling_load_btuh <= hi
    # no backup strips: the unit carries the heating load at the design temperature
    assert step.capacity_at_design_btuh >= step.heating_load_btuh
    assert "strips" not in step.variant
    d = step.to_dict()
    for key in ("heating_load_btuh", "cooling_load_btuh", "capacity_at_design_btuh", "nominal_tons"):
        assert d[key] is not None
    assert any("cooling" in r and "Btu/h" in r for r in step.reasons)


def test_other_steps_carry_no_sizing_figures(result):
    others = [s for s in result.roadmap.steps if s.project_id != "heat_pump"]
    assert others and all(s.nominal_tons is None and s.heating_load_btuh is None for s in others)


def test_today_shows_the_measured_peak(ctx):
    today = ctx.energy(frozenset())
    assert today.peak.kw == pytest.approx(6.5)
    assert today.summary.peak_demand_kw == pytest.approx(6.5)
    assert "measured" in ctx.basis.peak.method


def test_a_heat_pump_water_heater_adds_its_compressor(ctx):
    # from memory: a heat pump water heater's compressor draws about 0.5 kW; it runs on both
    # design days, so the peak rises by exactly that
    today = ctx.energy(frozenset()).peak
    after = ctx.energy(frozenset({"heat_pump_water_heater"})).peak
    assert after.kw - today.kw == pytest.approx(0.5)
    assert after.winter_kw - today.winter_kw == pytest.approx(0.5)


def test_home_charging_adds_the_charger_on_the_winter_design_day(ctx):
    # the overnight charging window falls inside the winter design day (held at the design
    # temperature all day), so the winter peak rises by the charger's power (amps x 240 V,
    # SAE J1772 Level 2); the summer design day's afternoon cooling does not meet it
    charger = ctx.details["ev_charger"]
    amps = catalog.upgrade_kinds()["ev_charger"].variant(charger.variant).amps
    ev = next(p for p, d in ctx.details.items() if d.kind == "ev")
    today = ctx.energy(frozenset()).peak
    after = ctx.energy(frozenset({"ev_charger", ev})).peak
    assert after.winter_kw - today.winter_kw == pytest.approx(amps * 240 / 1000)
    assert after.kw == pytest.approx(max(after.winter_kw, after.summer_kw))


def test_the_heat_pump_adds_its_input_at_the_design_temperature(ctx):
    # single-speed unit at full capacity at 35 F: capacity and COP linear between the 17 F and
    # 47 F rating points (DOE 10 CFR 430 Subpart B Appendix M1); 1 kW = 3,412.14 Btu/h
    d = ctx.details["heat_pump"]
    r = heat_pump_class("single_stage")
    nominal = d.size * 12000
    frac = (35 - 17) / 30
    cap = nominal * (r["cap_17_frac"] + (1 - r["cap_17_frac"]) * frac)
    cop = r["cop_17"] + (r["cop_47"] - r["cop_17"]) * frac
    furnace_fan_kw = ctx.basis.peak.today.heating_kw
    today = ctx.energy(frozenset()).peak
    after = ctx.energy(frozenset({"heat_pump"})).peak
    assert after.winter_kw - today.winter_kw == pytest.approx(cap / cop / 3412.14 - furnace_fan_kw, rel=1e-6)
