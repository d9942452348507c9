"""From a plan file to the load calculation: the adapter feeds the calculation the right loads."""

from __future__ import annotations

import pytest

from homeplan import plan_roadmap
from homeplan.plan.load import load_plan_text
from homeplan.planner.capacity import existing_loads

EXPLICIT = """\
home:
  climate: {hdd65: 5000, heating_design_f: 10, cdd65: 800, cooling_design_f: 90}
  floor_area_ft2: 1500
  electrical:
    service_amps: 100
    loads:
      - {name: range, va: 12000, kind: range}
      - {name: dryer, va: 5000, kind: dryer}
      - {name: dishwasher, va: 1200, kind: appliance, voltage_v: 120}
budget: {usd_per_year: 5000, first_year: 2027}
choices: {all_electric: false}
"""


def test_explicit_loads_give_the_hand_calculation():
    # NEC 2023 220.83(A), computed by hand:
    #   lighting 3 VA/ft2 x 1500 ft2 = 4,500 (220.41); small-appliance 2 x 1,500 = 3,000 and
    #   laundry 1,500 (220.52); range 12,000; dryer 5,000; dishwasher 1,200 -> 27,200 VA other load
    #   first 8,000 at 100 % + 19,200 x 40 % = 7,680 -> 15,680 VA / 240 V = 65.33 A
    result = plan_roadmap(load_plan_text(EXPLICIT).plan)
    today = result.capacity[0]
    assert today.total_va == pytest.approx(15680, abs=1)
    assert today.amps == pytest.approx(65.33, abs=0.01)
    assert today.headroom_amps == pytest.approx(100 - 65.33, abs=0.01)
    assert "220.83(A)" in today.method


def test_appliance_loads_use_the_published_values():
    plan = load_plan_text("""\
home:
  climate: {hdd65: 5000, heating_design_f: 10}
  floor_area_ft2: 1500
  electrical: {service_amps: 100}
appliances:
  - {kind: furnace, fuel: gas}
  - {kind: dryer, fuel: electric}
  - {kind: range, fuel: electric}
budget: {usd_per_year: 5000}
""").plan
    loads = {ld.name.split(" (")[0]: ld for ld in existing_loads(plan)}
    # NEC 2023 Table 430.248: 1/2 hp single-phase motor, 9.8 A at 115-120 V (furnace blower)
    assert loads["furnace"].va == pytest.approx(9.8 * 120)
    # NEC 2023 Informative Annex D, Example D2(a): 5 kW dryer, 12 kW range
    assert loads["dryer"].va == 5000
    assert loads["range"].va == 12000


def test_over_capacity_home_gets_a_remedy_and_every_state_fits():
    """A 100 A home adding a heat pump with strips, a 240 V water heater, an electric range and
    a charger does not fit as wanted (common practice, no source: such a home needs lower-power
    choices, load management or a bigger service); the plan picks a remedy and each state fits."""
    text = """\
home:
  climate: {hdd65: 7500, heating_design_f: -10, cdd65: 700, cooling_design_f: 89}
  floor_area_ft2: 2400
  electrical: {service_amps: 100}
appliances:
  - {kind: furnace, fuel: gas, year_installed: 2005}
  - {kind: water_heater, fuel: gas, year_installed: 2012}
  - {kind: range, fuel: gas, year_installed: 2010}
  - {kind: dryer, fuel: electric}
vehicles: [{fuel: gasoline, replace_year: 2028}]
budget: {usd_per_year: 30000, first_year: 2027}
options:
  heat_pump: {variant: ducted_strips}
"""
    result = plan_roadmap(load_plan_text(text).plan)
    assert result.roadmap.status == "ok"
    assert all(s.fits for s in result.capacity)
    chosen = {s.project_id for s in result.roadmap.steps}
    lower = [s for s in result.roadmap.steps if any("lower-power" in r for r in s.reasons)]
    assert "service_upgrade" in chosen or "load_management" in chosen or lower


FULLY_ELECTRIC = """\
home:
  climate: {hdd65: 6000, heating_design_f: 5, cdd65: 700, cooling_design_f: 90}
  floor_area_ft2: 1500
  electrical: {service_amps: 200}
appliances:
  - {kind: furnace, fuel: gas, year_installed: 2010}
  - {kind: water_heater, fuel: gas, year_installed: 2015}
  - {kind: range, fuel: gas, year_installed: 2012}
  - {kind: dryer, fuel: electric}
budget: {usd_per_year: 60000, first_year: 2027}
options:
  heat_pump: {variant: cold_climate, size: 3}
  heat_pump_water_heater: {variant: v240}
  induction_range: {variant: full}
choices: {all_electric: true, exclude: [heat_pump_dryer]}
"""


def test_final_state_counts_every_planned_load():
    """The last state after every planned step, against NEC 2023 220.83(B) worked by hand (the
    furnace's blower goes with the furnace; the new loads are counted as the code counts them)."""
    # other load: lighting 3 VA/ft2 x 1,500 = 4,500 (220.41); small-appliance 2 x 1,500 = 3,000
    #   and laundry 1,500 (220.52); dryer 5,000 (Annex D, Example D2(a)); dishwasher 1,200
    #   (Annex D, Examples D2(a)-(c)); heat pump water heater 4,500 (240 V elements, from
    #   memory); induction range 11,500 (9.6-12 kW, from memory) -> 31,200 VA
    #   -> 8,000 at 100 % + 23,200 x 40 % = 17,280 VA
    # heating: 3 t x 2,300 VA/t = 6,900 VA at 100 % (Annex D, Example D2(c): 2 1/2 t = 24 A)
    # total 24,180 VA / 240 V = 100.75 A
    result = plan_roadmap(load_plan_text(FULLY_ELECTRIC).plan)
    assert result.roadmap.status == "ok"
    last = [s for s in result.capacity if s.year is not None and "measured" not in s.label][-1]
    assert "220.83(B)" in last.method
    names = [r.name for r in last.rows]
    assert not any(n.startswith("furnace") for n in names)  # replaced by the heat pump
    assert last.total_va == pytest.approx(24_180, abs=1)
    assert last.amps == pytest.approx(100.75, abs=0.01)
    assert last.amps > result.capacity[0].amps  # the electric loads really were added


def test_home_already_over_its_service_can_be_planned():
    """Existing heat pump with strips, resistance water heater, electric range and an EV charger
    on 100 A: by NEC 2023 220.83(A) the home is already over its service. The plan must still be made
    (doing nothing is always possible) and must say so."""
    text = """\
home:
  climate: {hdd65: 6300, cdd65: 850, heating_design_f: -2, cooling_design_f: 89}
  floor_area_ft2: 1500
  electrical: {service_amps: 100}
appliances:
  - {kind: heat_pump, capacity_btuh: 36000}
  - {kind: water_heater, fuel: electric}
  - {kind: range, fuel: electric}
vehicles: [{fuel: electric}]
budget: {usd_per_year: 5000, first_year: 2027}
"""
    result = plan_roadmap(load_plan_text(text).plan)
    assert result.capacity[0].headroom_amps < 0
    assert result.roadmap.status == "ok"
    assert any("already uses" in w for w in result.warnings)
