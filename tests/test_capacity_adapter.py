"""From a plan file to the load calculation: the adapter feeds the NEC engine the right loads."""

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
    # NEC Table 430.248: 1/2 hp single-phase motor, 9.8 A at 115-120 V (furnace blower)
    assert loads["furnace"].va == pytest.approx(9.8 * 120)
    # NEC Annex D, Example D2(a): 5 kW dryer, 12 kW range
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


def test_final_state_counts_every_planned_load():
    """Rebuild the last state's load list from the roadmap's steps and run NEC 220.83 directly:
    the roadmap's figure must match (every planned load counted, replaced loads removed)."""
    from dataclasses import replace
    from types import SimpleNamespace

    from homeplan import catalog
    from homeplan.electrical.nec220 import nec220_83
    from homeplan.plan.load import load_plan
    from homeplan.planner.capacity import _dwelling, _service, existing_loads, project_loads

    from .conftest import ROOT

    plan = load_plan(ROOT / "sample_homes" / "newer_ac_small_solar.yaml").plan
    result = plan_roadmap(plan, ROOT / "sample_homes")
    assert result.capacity_remedy is None  # this sample keeps its service (no 220.82 new service)
    kinds = catalog.upgrade_kinds()
    loads = existing_loads(plan)
    for step in result.roadmap.steps:
        info = result.project(step.project_id)
        if info is None or not kinds[info.kind].capacity_load:
            continue
        gone = {ld.name for ld in loads for key in info.replaces if ld.name.startswith(f"{key} ")}
        loads = [ld for ld in loads if ld.name not in gone]
        installed = SimpleNamespace(kind=info.kind, variant=info.variant, size=info.size, backup_kw=0.0)
        loads += [replace(ld, existing=False) for ld in project_loads(installed, info.label)]
    calc = nec220_83(_dwelling(plan), loads, _service(plan), edition=plan.home.electrical.code_edition)
    last = [s for s in result.capacity if s.year is not None and "measured" not in s.label][-1]
    assert last.amps == pytest.approx(calc.amps, abs=0.01)
    assert last.amps > result.capacity[0].amps  # the electric loads really were added


def test_home_already_over_its_service_can_be_planned():
    """Existing heat pump with strips, resistance water heater, electric range and an EV charger
    on 100 A: by NEC 220.83(A) the home is already over its service. The plan must still be made
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
