"""A failed heat source or water heater is replaced at once, whatever the budget.

Rules (common practice, no source: a home is not left without heat or hot water, and the
replacement is the first work of the year). The emergency loan's payments are checked against
numpy-financial's ``pmt`` (annuity formula).
"""

from __future__ import annotations

import numpy_financial as npf
import pytest

from homeplan import load_plan, plan_roadmap
from homeplan.plan.fuels import HOME_FUELS, UNIT_KEY, appliance_fuel, engine_fuel
from homeplan.planner.breakdowns import ESSENTIAL_SERVICE
from tests.conftest import SAMPLES

CASES = [(path, a.key) for path in SAMPLES for a in load_plan(path).plan.appliances
         if a.kind in ESSENTIAL_SERVICE]


@pytest.mark.parametrize("path,key", CASES, ids=[f"{p.stem}-{k}" for p, k in CASES])
def test_failed_essential_appliance_is_replaced_first_thing(path, key):
    loaded = load_plan(path).with_values({("choices", "failed_now"): [key],
                                          ("budget", "usd_per_year"): 2000})
    road = plan_roadmap(loaded).roadmap
    assert road.status == "ok"
    first = road.first_year
    step = next(s for s in road.steps if key in s.replaces)
    assert step.year == first
    same_year = [s for s in road.steps if s.year == first]
    before = same_year[:same_year.index(step)]
    assert all(s.project_id in ("panel_upgrade", "service_upgrade", "load_management") for s in before)
    assert "has failed" in step.reasons[0]
    (e,) = [e for e in road.emergencies if e.item == key]
    assert e.step_id == step.project_id and e.year == first
    # the first year's energy is the new equipment's: an upgrade of a fuel-burning appliance
    # stops burning that fuel in the first year already
    fuel = appliance_fuel(next(a for a in loaded.plan.appliances if a.key == key))
    if not step.project_id.startswith("like_for_like:") and fuel in HOME_FUELS:
        unit = UNIT_KEY[engine_fuel(fuel)]
        nothing = road.baseline("do_nothing").years[0].energy
        assert road.years[0].energy.get(unit, 0.0) < nothing.get(unit, 0.0)


def test_cases_cover_heating_and_hot_water():
    kinds = {ESSENTIAL_SERVICE[a.kind] for path, key in CASES
             for a in load_plan(path).plan.appliances if a.key == key}
    fossil = [key for path, key in CASES for a in load_plan(path).plan.appliances
              if a.key == key and appliance_fuel(a) in HOME_FUELS]
    assert kinds == {"heat", "hot water"} and len(CASES) >= 8 and len(fossil) >= 6


def test_over_budget_paid_from_savings_then_the_emergency_loan(tmp_path):
    plan = tmp_path / "failed.yaml"
    plan.write_text(
        "# invented test home\n"
        "home:\n  name: Failed boiler (invented)\n  location: {latitude: 46.8, longitude: -92.1}\n"
        "  climate: {heating_design_f: -18, hdd65: 9500, cdd65: 200}\n  floor_area_ft2: 1600\n"
        "  electrical: {service_amps: 200}\n"
        "appliances:\n  - {id: boiler, kind: boiler, fuel: oil, year_installed: 1998}\n"
        "budget: {usd_per_year: 3000, first_year: 2027,\n"
        "         emergency: {savings_usd: 2000, loan_rate_pct: 9, loan_term_years: 5}}\n"
        "choices: {failed_now: [boiler]}\n")
    road = plan_roadmap(load_plan(plan)).roadmap
    (e,) = road.emergencies
    spent = sum(s.net_cost_usd for s in road.steps if s.year == 2027)
    assert e.over_budget_usd == pytest.approx(spent - 3000, abs=0.01)
    assert e.from_savings_usd == pytest.approx(min(2000, e.over_budget_usd))
    assert e.from_loan_usd == pytest.approx(e.over_budget_usd - e.from_savings_usd)
    assert e.unfunded_usd == 0
    assert e.from_loan_usd > 0, "the case is chosen so that the loan is needed"
    payment = float(npf.pmt(0.09, 5, -e.from_loan_usd))  # numpy-financial annuity, yearly
    by_year = {y.year: y.loan_payments_usd for y in road.years}
    assert [by_year[y] for y in range(2028, 2033)] == pytest.approx([payment] * 5, abs=0.01)
    assert by_year[2033] == 0
