"""Yearly caps shared by several items reach the scheduler: splitting capped items over two tax
years is found when it pays (the shape of 26 USC 25C as amended in 2022: a percentage of cost
with an aggregate cap per tax year that resets each year: 26 USC 25C(b) and the IRS Instructions
for Form 5695 (2023), Part II)."""

from __future__ import annotations

from homeplan import plan_roadmap
from homeplan.plan.load import load_plan_text

PLAN = """\
home:
  climate: {hdd65: 5000, cdd65: 800, heating_design_f: 15, cooling_design_f: 90}
  floor_area_ft2: 1500
  electrical: {service_amps: 200}
appliances:
  - {kind: water_heater, fuel: electric, year_installed: 2016}
  - {kind: dryer, fuel: electric, year_installed: 2016}
  - {kind: heat_pump, year_installed: 2020, capacity_btuh: 24000}
  - {kind: range, fuel: electric, year_installed: 2020}
household: {ami_pct: 120, federal_tax_liability_usd: 20000}
budget: {usd_per_year: 50000, first_year: 2027, horizon_years: 4}
choices: {all_electric: false, pins: {heat_pump_water_heater: 2027}}
options:
  heat_pump_water_heater: {cost_usd: 4000}
  envelope: {cost_usd: 4000}
incentives:
  - id: capped_credit
    name: Invented capped credit
    administrator: invented for this test
    kind: tax_credit
    kinds: [heat_pump_water_heater, envelope]
    rate_pct: 30
    yearly_caps:
      - {name: per tax year, kinds: [heat_pump_water_heater, envelope], cap_usd: 1200}
    starts: 2026-01-01
    ends: 2030-12-31
    source: invented for this test
"""


def test_capped_items_are_spread_over_tax_years():
    # 30 % of $4,000 = $1,200 each; together in one year the $1,200 cap pays $1,200, in two
    # years $2,400 - worth more than the year of savings the later item gives up
    result = plan_roadmap(load_plan_text(PLAN).plan)
    year = {s.project_id: s.year for s in result.roadmap.steps}
    assert year["heat_pump_water_heater"] == 2027
    assert "envelope" in year and year["envelope"] != 2027
    paid = {s.project_id: s.incentives_usd for s in result.roadmap.steps}
    assert paid["heat_pump_water_heater"] + paid["envelope"] == 2400


def test_one_year_cap_is_applied_exactly_when_together():
    text = PLAN.replace("pins: {heat_pump_water_heater: 2027}", "pins: {heat_pump_water_heater: 2027, envelope: 2027}")
    result = plan_roadmap(load_plan_text(text).plan)
    paid = {s.project_id: s.incentives_usd for s in result.roadmap.steps}
    assert paid["heat_pump_water_heater"] + paid["envelope"] == 1200


def test_vehicle_credits_are_said_to_be_not_modelled():
    """Plans with an electric vehicle say the vehicle credits are not modelled (26 USC 30D and
    25E ended for vehicles acquired after 2025-09-30, Pub. L. 119-21); others do not."""
    from homeplan.planner.incentives import VEHICLE_CREDITS_NOTE

    base = """\
home:
  climate: {hdd65: 6000, heating_design_f: 5, cdd65: 700, cooling_design_f: 90}
  floor_area_ft2: 1500
  electrical: {service_amps: 200}
appliances: [{kind: water_heater, fuel: gas, year_installed: 2015}]
budget: {usd_per_year: 20000, first_year: 2027}
"""
    with_ev = plan_roadmap(load_plan_text(base + "vehicles: [{fuel: gasoline, replace_year: 2028}]\n").plan)
    without = plan_roadmap(load_plan_text(base).plan)
    assert VEHICLE_CREDITS_NOTE in with_ev.warnings
    assert "30D" in VEHICLE_CREDITS_NOTE and "2025-09-30" in VEHICLE_CREDITS_NOTE
    assert VEHICLE_CREDITS_NOTE not in without.warnings
