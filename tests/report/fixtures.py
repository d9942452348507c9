"""A small invented plan and a hand-made PlanResult for the report tests.

Everything here is invented: the household, the town, the contractor and the programs. The
figures are made up to exercise layout and escaping; they are not the output of the engines.
"""

from __future__ import annotations

import datetime as dt

from homeplan.plan.load import load_plan_text
from homeplan.planner.lifecycle import plan_outlooks
from homeplan.result import (
    CapacityRow,
    CapacityState,
    EnergySummary,
    PlanResult,
    ProgramUse,
    ProjectInfo,
)
from homeplan.result.risk import Band, FuelShock, PriceRisk, PriceSeries, SolarPriceRisk, YearBand
from homeplan.result.roadmap import Baseline, IncentiveLine, Milestone, Roadmap, Step, YearTotals

PLAN_YAML = """\
# Invented demo household for report tests.
format_version: 1
provenance:
  prepared_by: {prepared_by}
  prepared_for: {prepared_for}
  date: 2026-11-20
  notes: {notes}
home:
  name: {name}
  location: {{latitude: 44.95, longitude: -93.25, place: {place}}}
  climate: {{hdd65: 7500, heating_design_f: -10}}
  floor_area_ft2: 1850
  year_built: 1962
  stories: 2
  electrical: {{service_amps: 100, free_spaces: 2}}
appliances:
  - {{id: furnace, kind: furnace, fuel: gas, year_installed: 2006, afue: 0.8}}
  - {{id: water_heater, kind: water_heater, fuel: gas, year_installed: 2014}}
  - {{id: range, kind: range, fuel: gas, year_installed: 2010}}
vehicles:
  - {{id: sedan, name: {car}, fuel: gasoline, mpg: 29, replace_year: 2028}}
budget:
  usd_per_year: {budget}
  first_year: 2027
  horizon_years: 10
options:
  heat_pump: {{cost_usd: 16500, contractor: {contractor}, quote_date: 2026-10-01}}
"""

SAFE = {
    "prepared_by": "Demo Energy Advisor (invented)",
    "prepared_for": "The Example household (invented)",
    "notes": "Invented plan for tests.",
    "name": "Example house",
    "place": "Fixtureville (invented)",
    "car": "2012 sedan",
    "contractor": "Invented Heating Co",
    "budget": 9000,
}

LONG = "Supercalifragilistic" * 15
HOSTILE = {
    "prepared_by": "'<script>alert(\"by\")</script>'",
    "prepared_for": "'\"><img src=x onerror=alert(1)> & Co'",
    "notes": "'</textarea><svg onload=alert(2)>'",
    "name": f"'<b>Bold</b> {LONG} \"quoted\" & ''single'' </title><script>x()</script>'",
    "place": "'=HYPERLINK(\"http://evil.example\")'",
    "car": "'+SUM(A1:A9)<i>'",
    "contractor": "'@evil <style>body{{display:none}}</style>'",
    "budget": 9000,
}


def plan_text(**overrides: object) -> str:
    values = {**SAFE, **overrides}
    return PLAN_YAML.format(**values)


def make_plan(**overrides: object):
    return load_plan_text(plan_text(**overrides), "<test>").plan


def make_price_risk(first_year: int = 2027, years: int = 10) -> PriceRisk:
    """Invented price-risk figures (not the output of the engines), bands widening with time."""
    def band(mid: float, half: float) -> Band:
        return Band(mid - half, mid, mid + half * 1.3, mid + half * 0.1)

    yearly = tuple(YearBand(first_year + i, band(2900.0 - 80 * i, 60.0 * i), band(2900.0 + 60 * i, 150.0 * i))
                   for i in range(years))
    return PriceRisk(
        paths=2000, seed=1, drift="plan", history_years="2001-2024",
        plan_cost_usd=band(61000.0, 3500.0), like_for_like_cost_usd=band(66000.0, 8000.0),
        do_nothing_cost_usd=band(67400.0, 8500.0), plan_beats_like_for_like_pct=72.5,
        plan_beats_do_nothing_pct=78.0, bill_shock_before_usd=410.0, bill_shock_after_usd=95.0,
        shocks=(FuelShock("electricity", 2.9, 44.0, 80.0), FuelShock("gas", 10.0, 150.0, 0.0)),
        years=yearly,
        fuels=(PriceSeries("electricity", 2.9, 2.5, 2.9, "invented"), PriceSeries("gas", 10.0, 2.5, 1.8, "invented")),
        solar=SolarPriceRisk(0.11, Band(0.19, 0.23, 0.28, 0.235), 97.0, 25, False),
    )


def make_result(plan=None, label_suffix: str = "", steps=None, hostile_labels: bool = False) -> PlanResult:
    """A roadmap of four steps over 2027-2036, with one milestone, a do-nothing and a like-for-like baseline."""
    plan = plan or make_plan()
    x = label_suffix
    bad = "<script>alert('step')</script> =1+1" if hostile_labels else ""
    if steps is None:
        steps = [
            Step("heat_pump", f"Heat pump{x}{bad}", 2028, variant="cold-climate ducted", size="3 ton",
                 cost_usd=16500.0,
                 incentives=[IncentiveLine("Invented utility rebate", 1500.0, dt.date(2028, 9, 1), "rebate"),
                             IncentiveLine("Invented state credit", 2000.0, 2029, "tax_credit")],
                 net_cost_usd=13000.0, reasons=["waiting for budget", "after the new 200 A panel"],
                 cautions=["refrigerant", "combustion_removal"]),
            Step("panel_upgrade", "New 200 A panel", 2027, cost_usd=4200.0, net_cost_usd=4200.0,
                 reasons=["needed for the heat pump's load"], cautions=["electrical"]),
            Step("heat_pump_water_heater", "Heat pump water heater", 2030, size="65 gal", cost_usd=4300.0,
                 incentives=[IncentiveLine("Invented utility rebate", 700.0, dt.date(2030, 11, 1), "rebate")],
                 net_cost_usd=3600.0, reasons=["before the water heater's likely failure (55 % by 2031)"]),
            Step("induction_range", "Induction range", 2031, cost_usd=2300.0, net_cost_usd=2300.0,
                 reasons=["cheaper later: cost falls 3 %/yr"]),
            Step("close_gas", "Close the gas service", 2031, cost_usd=500.0, net_cost_usd=500.0,
                 reasons=["after the induction range"], cautions=["gas_line"]),
        ]
    years = []
    cum = base_cum = 0.0
    for i, year in enumerate(range(2027, 2037)):
        spend = sum(s.cost_usd for s in steps if s.year == year)
        inc = sum(s.incentives_usd for s in steps if s.year == year)
        bills = {"electricity": 1500.0 + 120 * i, "gas": max(0.0, 1400.0 - 250 * i)}
        base_bills = 2900.0 + 60 * i
        cum += spend - inc + sum(bills.values())
        base_cum += base_bills
        years.append(YearTotals(year, spend_usd=spend, incentives_usd=inc, net_usd=spend - inc,
                                bills_usd=bills, bill_savings_usd=base_bills - sum(bills.values()),
                                cumulative_usd=cum, emissions_kg=9000.0 - 700 * i, peak_kw=8.0 + 0.5 * i,
                                service_headroom_amps=40.0 - 3 * i,
                                energy={"electricity_kwh": 7000.0 + 900 * i}))
    base = Baseline("do_nothing", "do nothing", tuple(YearTotals(y.year, cumulative_usd=2900.0 * (k + 1))
                                        for k, y in enumerate(years)), 0.0)
    # like for like: a new gas furnace in 2029 and bills a little above doing nothing's
    lfl_years = tuple(YearTotals(y.year, spend_usd=6500.0 if y.year == 2029 else 0.0,
                                 net_usd=6500.0 if y.year == 2029 else 0.0,
                                 bills_usd={"electricity": 1400.0, "gas": 1500.0 + 60 * k},
                                 cumulative_usd=2900.0 * (k + 1) + (6500.0 if y.year >= 2029 else 0.0))
                      for k, y in enumerate(years))
    lfl = Baseline("like_for_like", "like for like", lfl_years, -9800.0)
    road = Roadmap(plan.home.name or "", 2027, 10, steps=steps, years=years,
                   milestones=[Milestone(2031, "Gas service closed", "gas_service_closed"),
                               Milestone(2031, "Fully electric home", "fully_electric")],
                   baselines=[base, lfl], npv_usd=6400.0,
                   assumptions={"discount_rate_pct": 3.0, "incentive_data_as_of": "2026-11-01"},
                   price_risk=make_price_risk())
    months = tuple(float(v) for v in (900, 800, 700, 500, 400, 450, 600, 620, 480, 500, 700, 880))
    before = EnergySummary("Today", {"electricity_kwh": months, "gas_therm": tuple(v / 5 for v in months)},
                           {"electricity_kwh": 7500.0, "gas_therm": 1100.0},
                           {"electricity": 1400.0, "gas": 1350.0}, 9300.0, 6.5, 1350.0)
    after = EnergySummary("After the plan", {"electricity_kwh": tuple(v * 2 for v in months)},
                          {"electricity_kwh": 15200.0}, {"electricity": 2500.0}, 4400.0, 11.2, 0.0)
    rows = (CapacityRow("General lighting", 5550.0, 1.0, 5550.0, "220.82(B)(1)"),)
    cap = (
        CapacityState("today", None, "NEC 2023 220.83", 14000.0, 58.3, 100.0, 41.7, True, rows),
        CapacityState(f"2028: after heat pump{x}", 2028, "NEC 2023 220.83", 33600.0, 140.0, 100.0, -40.0,
                      False, rows, remedy="New 200 A panel in 2027", notes=("busbar 200 A",)),
    )
    projects = (
        ProjectInfo("heat_pump", "heat_pump", "Heat pump", "cold_climate", "cold-climate ducted",
                    3.0, "ton", 16500.0, "your quote", ("furnace",), ("refrigerant",)),
        ProjectInfo("heat_pump_water_heater", "heat_pump_water_heater", "Heat pump water heater",
                    None, "", 65, "gal", 4300.0, "catalog", ("water_heater",), ()),
        ProjectInfo("panel_upgrade", "panel_upgrade", "New 200 A panel", None, "", 200, "A",
                    4200.0, "catalog", (), ("electrical",)),
    )
    programs = (ProgramUse("util", "Invented utility rebate", "rebate_later", {2028: 1500.0, 2030: 700.0},
                           "up to $1,500 a project", "2030-12-31"),
                ProgramUse("state", "Invented state credit", "tax_credit", {2029: 2000.0}, "", None))
    return PlanResult(plan, road, tuple(plan_outlooks(plan)), projects, cap, before, after, programs,
                      content_hash="", warnings=("Invented data: for tests only",))
