"""A year of meter data is a way to show the service fits (NEC 2023 220.87), used when it needs
the cheaper remedy.

The home: 100 A, a 2.5 kW twelve-month peak, adding a 3 t heat pump, a 240 V heat pump water
heater and an 11.5 kW induction range. By hand, NEC 2023 220.87: 2,500 x 1.25 = 3,125 VA; the
range at 8,000 VA (Table 220.55 Column C); the water heater 4,500 VA x 1.25 (continuous, the
plan's explicit setting); the heat pump compressor at 100 % (the larger of heating or cooling,
220.60) -> fits on 100 A. By the 220.83 calculation the same loads do not fit. So the plan uses
220.87 and needs no remedy; the capacity view shows the other method beside it.
"""

from __future__ import annotations

import pytest

from homeplan import load_plan, plan_roadmap

HOME = """\
# invented test home: a small gas home on 100 A with a year of meter data
home:
  name: Measured peak (invented)
  climate: {hdd65: 5200, heating_design_f: 20, cdd65: 900, cooling_design_f: 90}
  floor_area_ft2: 2200
  electrical: {service_amps: 100, peak_demand_kw: 2.5}
appliances:
  - {id: furnace, kind: furnace, fuel: gas, year_installed: 2008}
  - {id: ac, kind: central_ac, year_installed: 2008, capacity_btuh: 30000}
  - {id: water_heater, kind: water_heater, fuel: gas, year_installed: 2014}
  - {id: range, kind: range, fuel: gas, year_installed: 2010}
  - {id: dryer, kind: dryer, fuel: electric, year_installed: 2015}
budget: {usd_per_year: 40000, first_year: 2027}
choices: {exclude: [solar, battery, heat_pump_dryer]}
options:
  heat_pump: {variant: cold_climate}
  heat_pump_water_heater: {variant: v240}
  induction_range: {variant: full}
"""


@pytest.fixture(scope="module")
def result(tmp_path_factory):
    path = tmp_path_factory.mktemp("peak") / "home.yaml"
    path.write_text(HOME)
    return plan_roadmap(load_plan(path))


def test_the_measured_peak_decides_and_no_remedy_is_bought(result):
    steps = {s.project_id for s in result.roadmap.steps}
    assert {"heat_pump", "heat_pump_water_heater", "induction_range"} <= steps
    assert not steps & {"service_upgrade", "panel_upgrade", "load_management"}
    by_year = [c for c in result.capacity if c.year is not None and "by the 220.83" not in c.label]
    assert all("220.87" in c.method and c.fits for c in by_year)


def test_end_state_by_hand(result):
    hp = result.project("heat_pump")
    end = [c for c in result.capacity if c.year is not None and "220.87" in c.method][-1]
    compressor = [r for r in end.rows if "compressor" in r.name][0]
    assert compressor.va == pytest.approx(2300 * hp.size)   # catalog: 2.3 kVA per ton
    expected = 2500 * 1.25 + 8000 + 4500 * 1.25 + compressor.va
    assert end.total_va == pytest.approx(expected)
    assert end.amps == pytest.approx(expected / 240)
    assert end.fits


def test_the_other_method_is_shown_and_would_not_fit(result):
    other = [c for c in result.capacity if "by the 220.83" in c.label]
    assert len(other) == 2 and "220.83" in other[-1].method and not other[-1].fits
    assert any("NEC 220.83 calculation the planned loads would not fit" in w for w in result.warnings)
