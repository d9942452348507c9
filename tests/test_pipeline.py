"""The whole pipeline on the sample homes: hard constraints hold on the printed roadmap.

These are checks of the rules the roadmap must obey (budget, order, capacity, pins, windows),
computed from the roadmap itself, not from the solver's own bookkeeping.
"""

from __future__ import annotations

import copy

import pytest

from homeplan import PlannerCache, plan_roadmap
from homeplan.plan.load import load_plan, validate_document
from homeplan.plan.save import set_in

from .conftest import ROOT, SAMPLES

_CACHE = PlannerCache()


def run(path, **changes):
    loaded = load_plan(path)
    plan = loaded.plan
    if changes:
        doc = copy.deepcopy(loaded.document)
        for dotted, value in changes.items():
            set_in(doc, tuple(dotted.split("__")), value)
        plan, _ = validate_document(doc, str(path))
    return plan, plan_roadmap(plan, base_dir=path.parent, cache=_CACHE)


@pytest.fixture(scope="module", params=SAMPLES, ids=[p.name for p in SAMPLES])
def sample(request):
    return run(request.param)


def test_roadmap_is_feasible(sample):
    plan, result = sample
    assert result.roadmap.status == "ok", result.roadmap.infeasibility
    assert result.roadmap.steps


def test_budget_with_carryover_is_respected(sample):
    """Cumulative out-of-pocket spend never exceeds the cumulative budget plus loans and (when
    chosen) the previous years' bill savings."""
    plan, result = sample
    b = plan.budget
    loans = sum(loan.amount_usd for loan in b.loans)
    money = 0.0
    last_savings = 0.0
    for y in result.roadmap.years:
        pos = sum(i.amount_usd for s in result.roadmap.steps if s.year == y.year
                  for i in s.incentives if i.kind == "point_of_sale")
        money += (b.by_year or {}).get(y.year, b.usd_per_year) - (y.spend_usd - pos)
        if b.add_bill_savings:
            money += max(last_savings, 0.0)
        last_savings = y.bill_savings_usd
        assert money + loans >= -1.0, y.year
        if not b.carryover:
            money = min(money, 0.0)


def test_order_rules_hold(sample):
    plan, result = sample
    year = {s.project_id: s.year for s in result.roadmap.steps}
    for pid, y in year.items():
        if pid.startswith("ev:"):
            assert "ev_charger" in year and year["ev_charger"] <= y, "a charger before the car"
    for milestone in ("close_gas", "remove_propane_tank", "remove_oil_tank"):
        if milestone in year:
            fuel = {"close_gas": "gas", "remove_propane_tank": "propane", "remove_oil_tank": "oil"}[milestone]
            burners = [a.key for a in plan.appliances if (a.fuel or "gas") == fuel]
            for p in result.projects:
                if set(p.replaces) & set(burners):
                    assert p.id in year and year[p.id] <= year[milestone], (p.id, milestone)


def test_every_state_fits_the_service(sample):
    plan, result = sample
    for state in result.capacity:
        assert state.fits, (state.label, state.amps, state.service_amps)
    for y in result.roadmap.years:
        assert y.service_headroom_amps >= -1e-6


def test_pins_and_exclusions():
    path = ROOT / "sample_homes" / "cold_gas_100a.yaml"
    plan, result = run(path, choices__pins={"heat_pump_dryer": 2029}, choices__exclude=["solar"])
    year = {s.project_id: s.year for s in result.roadmap.steps}
    assert year.get("heat_pump_dryer") == 2029
    assert "solar" not in year
    step = next(s for s in result.roadmap.steps if s.project_id == "heat_pump_dryer")
    assert any("pinned" in r for r in step.reasons)


def test_failed_appliance_is_replaced_now():
    path = ROOT / "sample_homes" / "newer_ac_small_solar.yaml"
    plan, result = run(path, choices__failed_now=["water_heater"])
    year = {s.project_id: s.year for s in result.roadmap.steps}
    assert year.get("heat_pump_water_heater") == plan.first_year


def test_more_budget_brings_the_last_gasoline_car_forward():
    path = ROOT / "sample_homes" / "oil_boiler_no_ducts.yaml"
    _, low = run(path, budget__usd_per_year=5000)
    _, high = run(path, budget__usd_per_year=25000)

    def car_year(r):
        return next(x.year for x in r.roadmap.milestones if x.kind == "last_gasoline_car")

    assert car_year(high) < car_year(low)


def test_without_carryover_each_year_stands_alone():
    """Unspent money is lost: no year spends more than its own budget, and the plan changes."""
    path = ROOT / "sample_homes" / "cold_gas_100a.yaml"
    plan, carry = run(path)
    plan, alone = run(path, budget__carryover=False)
    for y in alone.roadmap.years:
        pos = sum(i.amount_usd for s in alone.roadmap.steps if s.year == y.year
                  for i in s.incentives if i.kind == "point_of_sale")
        # the sample adds last year's bill savings to the budget
        prev = next((p.bill_savings_usd for p in alone.roadmap.years if p.year == y.year - 1), 0.0)
        assert y.spend_usd - pos <= plan.budget.usd_per_year + max(prev, 0.0) + 1.0, y.year
    assert [(s.project_id, s.year) for s in carry.roadmap.steps] != \
        [(s.project_id, s.year) for s in alone.roadmap.steps]


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_npv_equals_numpy_financial_on_the_yearly_flows(path):
    """The roadmap's NPV against doing nothing equals numpy-financial's NPV of its yearly flows
    (bill savings, spending net of incentives, loan payments, breakdowns avoided, remaining
    value) - two independent sums of the same accounting."""
    import numpy_financial as npf

    plan, result = run(path)
    flows = result.finance.plan.flows_usd
    rate = plan.budget.discount_rate_pct / 100
    assert npf.npv(rate, flows) == pytest.approx(result.roadmap.npv_usd, abs=max(25.0, 0.002 * abs(result.roadmap.npv_usd)))


@pytest.mark.parametrize("path", SAMPLES, ids=[p.name for p in SAMPLES])
def test_npv_plan_beats_the_baselines(path):
    """Free to choose (no all-electric target), the optimised plan is worth at least as much as
    doing nothing or replacing like-for-like (a requirement of the planner: NPV at least the
    best baseline's)."""
    plan, result = run(path, choices__all_electric=False, choices__pins={})
    best = max(b.npv_usd for b in result.roadmap.baselines)
    assert result.roadmap.npv_usd >= best - 1.0


def test_deterministic():
    path = ROOT / "sample_homes" / "mild_propane_roof.yaml"
    a = plan_roadmap(load_plan(path).plan, base_dir=path.parent).roadmap.to_dict()
    b = plan_roadmap(load_plan(path).plan, base_dir=path.parent).roadmap.to_dict()
    assert a == b


def test_unreachable_target_is_explained():
    path = ROOT / "sample_homes" / "cold_gas_100a.yaml"
    plan, result = run(path, choices__all_electric_by=2028, budget__usd_per_year=3000)
    assert result.roadmap.status == "infeasible"
    assert "budget" in result.roadmap.infeasibility.lower()


def test_air_sealing_comes_before_the_heat_pump_when_both_are_done():
    """'Better before' binds when both happen (common practice, no source: seal the house
    before sizing the heat pump): pinning them the wrong way round cannot be planned."""
    path = ROOT / "sample_homes" / "cold_gas_100a.yaml"
    _, ok = run(path, choices__pins={"heat_pump": 2029})
    year = {s.project_id: s.year for s in ok.roadmap.steps}
    assert "envelope" in year and year["envelope"] <= year["heat_pump"]
    _, wrong = run(path, choices__pins={"heat_pump": 2027, "envelope": 2029})
    assert wrong.roadmap.status == "infeasible"
