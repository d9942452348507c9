"""The plan against replacing like-for-like when things are due: the comparison a household makes.

Outside checks: numpy-financial's ``npv`` and ``irr`` on the yearly flows (NIST Handbook 135
present value; the incremental cost of an alternative against the base case it replaces).
"""

from __future__ import annotations

import numpy_financial as npf
import pytest

from homeplan import load_plan, plan_roadmap
from homeplan.catalog import like_for_like_cost
from homeplan.report.fmt import money_signed
from homeplan.report.view import build_report
from tests.conftest import SAMPLES


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_npv_against_like_for_like_is_the_npv_of_the_difference_of_the_flows(path):
    result = plan_roadmap(load_plan(path))
    road, fin = result.roadmap, result.finance.plan
    rate = result.plan.budget.discount_rate_pct / 100.0
    diff = [p - b for p, b in zip(fin.flows_usd, fin.like_for_like_flows_usd, strict=True)]
    # numpy-financial npv: first flow at t = 0 (flows rounded to cents: within a dollar)
    assert road.npv_vs_like_for_like_usd == pytest.approx(npf.npv(rate, diff), abs=1.0)
    assert road.npv_usd == pytest.approx(npf.npv(rate, fin.flows_usd), abs=1.0)
    assert road.baseline("like_for_like").npv_usd == pytest.approx(
        npf.npv(rate, fin.like_for_like_flows_usd), abs=1.0)
    # the JSON carries the headline
    assert road.to_dict()["npv_vs_like_for_like_usd"] == pytest.approx(road.npv_vs_like_for_like_usd)


def _heat_pump_in(year: int):
    loaded = load_plan(SAMPLES[0]).with_values({("choices", "pins"): {"heat_pump": year},
                                                ("budget", "usd_per_year"): 40000})
    result = plan_roadmap(loaded)
    return loaded.plan, result, next(s for s in result.roadmap.steps if s.project_id == "heat_pump")


def test_a_heat_pump_bought_when_furnace_and_ac_are_due_costs_only_the_difference():
    # the sample's furnace (2006) and air conditioner (2009) both reach their replace-by year in 2029
    plan, result, step = _heat_pump_in(2029)
    outs = {o.key: o for o in result.outlooks}
    assert outs["furnace"].replace_by_year <= 2029 and outs["ac"].replace_by_year <= 2029
    grow = (1 + plan.prices.inflation_pct / 100) ** (2029 - plan.first_year)
    lfl = (like_for_like_cost("furnace", "gas", plan.prices.cost_level)
           + like_for_like_cost("central_ac", "electric", plan.prices.cost_level)) * grow
    assert step.avoided_usd == pytest.approx(lfl, abs=0.01)
    assert step.incremental_cost_usd == pytest.approx(step.net_cost_usd - lfl, abs=0.01)
    assert step.to_dict()["incremental_cost_usd"] == pytest.approx(step.incremental_cost_usd)
    assert any(f"about {step.incremental_cost_usd:,.0f} USD beyond it" in r for r in step.reasons)
    r = result.finance.projects["heat_pump"]
    assert r.flows_usd[0] == pytest.approx(-step.incremental_cost_usd, abs=0.01)
    if r.irr_pct is not None:  # numpy-financial irr of the same flows
        assert r.irr_pct == pytest.approx(npf.irr(r.flows_usd) * 100, abs=0.05)


def test_a_heat_pump_bought_before_anything_is_due_costs_its_full_price():
    _, result, step = _heat_pump_in(2027)
    outs = {o.key: o for o in result.outlooks}
    assert outs["furnace"].replace_by_year > 2027 and outs["ac"].replace_by_year > 2027
    assert step.avoided_usd == 0.0 and step.incremental_cost_usd == pytest.approx(step.net_cost_usd)
    assert result.finance.projects["heat_pump"].flows_usd[0] == pytest.approx(-step.net_cost_usd, abs=0.01)


def test_the_printout_counts_the_plan_ahead_of_like_for_like():
    # the running comparison in the printout is against the like-for-like baseline, year by year
    result = plan_roadmap(load_plan(SAMPLES[0]))
    road = result.roadmap
    table = build_report(result).years
    col = table.headers.index("Ahead of like-for-like")
    lfl = {y.year: y.cumulative_usd for y in road.baseline("like_for_like").years}
    for row, y in zip(table.rows, road.years, strict=True):
        assert row[col] == money_signed(lfl[y.year] - y.cumulative_usd)
