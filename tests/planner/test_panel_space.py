"""New circuits need breaker spaces: when the panel runs out, the roadmap adds a costed step.

Rules (common practice, no source): a 240 V circuit takes two spaces of a residential panel and a
120 V one takes one; an appliance that goes frees its spaces; a subpanel or tandem breakers make
room. The step comes in the year the spaces run out, before the circuits that need it.
"""

from __future__ import annotations

from homeplan import load_plan, plan_roadmap

FULL = """\
# invented test home
home:
  name: Full panel (invented)
  climate: {hdd65: 5000, heating_design_f: 10, cdd65: 900, cooling_design_f: 90}
  floor_area_ft2: 1500
  electrical: {service_amps: 200, free_spaces: FREE}
appliances:
  - {id: furnace, kind: furnace, fuel: gas, year_installed: 2008}
  - {id: water_heater, kind: water_heater, fuel: gas, year_installed: 2014}
  - {id: range, kind: range, fuel: gas, year_installed: 2010}
budget: {usd_per_year: 40000, first_year: 2027}
choices: {exclude: [solar, battery]}
"""


def plan(tmp_path, free: int):
    path = tmp_path / f"full{free}.yaml"
    path.write_text(FULL.replace("FREE", str(free)))
    return plan_roadmap(load_plan(path)).roadmap


def test_full_panel_gets_room_before_the_new_circuits(tmp_path):
    road = plan(tmp_path, 0)
    ids = [s.project_id for s in road.steps]
    assert "panel_space" in ids
    space = road.steps[ids.index("panel_space")]
    # every step that adds 240 V circuits in the same year comes after it
    same_year = [s for s in road.steps if s.year == space.year]
    for s in same_year[:same_year.index(space)]:
        assert s.project_id in ("panel_upgrade", "service_upgrade", "load_management", "envelope")
    assert all(s.year >= space.year for s in road.steps
               if s.project_id in ("heat_pump", "heat_pump_water_heater", "induction_range"))
    assert "breaker space" in space.reasons[0] and space.cost_usd > 0


def test_enough_free_spaces_need_no_step(tmp_path):
    road = plan(tmp_path, 20)
    assert "panel_space" not in [s.project_id for s in road.steps]
    assert {"heat_pump", "heat_pump_water_heater", "induction_range"} <= {s.project_id for s in road.steps}
