"""An electric vehicle step is a car bought from a dealer: its cost is the premium over a
comparable gasoline car, with both prices shown, its savings are fuel and maintenance, and the
calendar does not send the household to contractors for it.

Outside reference: Burnham et al. (2021), Comprehensive Total Cost of Ownership Quantification
for Vehicles with Different Size Classes and Powertrains, ANL/ESD-21/4 - maintenance about
10.1 c/mile for a gasoline car and 6.1 c/mile for a battery-electric one (from memory).
Demo homes are the invented samples.
"""

from __future__ import annotations

import re

import pytest

from homeplan import load_plan, plan_roadmap
from homeplan.report.ics import reminders
from tests.conftest import SAMPLES

GASOLINE_USD_PER_MILE = 0.101  # ANL/ESD-21/4 (from memory)
EV_USD_PER_MILE = 0.061        # ANL/ESD-21/4 (from memory)


@pytest.fixture(scope="module")
def cold_gas():
    # cold_gas_100a: a 2012 sedan (11,000 miles a year) and a 2017 SUV (9,000 miles a year)
    return plan_roadmap(load_plan(SAMPLES[0]))


def _ev_steps(result):
    return {s.project_id: s for s in result.roadmap.steps if s.project_id.startswith("ev:")}


def test_the_ev_step_is_the_premium_over_a_gasoline_car_with_both_prices(cold_gas):
    steps = _ev_steps(cold_gas)
    assert set(steps) == {"ev:sedan", "ev:wagon"}
    for s in steps.values():
        m = re.search(r"premium over a comparable gasoline (\w+): about ([\d,]+) USD against ([\d,]+) USD today",
                      s.variant)
        assert m, s.variant
        ev_usd, gas_usd = (float(x.replace(",", "")) for x in m.group(2, 3))
        info = cold_gas.project(s.project_id)
        # the premium is the difference of the two prices (today's, before any later price change)
        assert ev_usd - gas_usd == pytest.approx(info.cost_usd, abs=1000)
    assert "SUV" in steps["ev:wagon"].variant and "car" in steps["ev:sedan"].variant


def test_maintenance_savings_per_mile_count_each_year_after_the_car(cold_gas):
    road, plan = cold_gas.roadmap, cold_gas.plan
    miles = {"ev:sedan": 11000, "ev:wagon": 9000}
    per_mile = GASOLINE_USD_PER_MILE - EV_USD_PER_MILE
    steps = _ev_steps(cold_gas)
    for pid, s in steps.items():
        assert any(f"{miles[pid] * per_mile:,.0f} USD on maintenance" in r for r in s.reasons), s.reasons
    infl = plan.prices.inflation_pct / 100.0
    for t, y in enumerate(road.years):
        owned = sum(miles[pid] for pid, s in steps.items() if s.year <= y.year)
        assert y.maintenance_savings_usd == pytest.approx(owned * per_mile * (1 + infl) ** t, abs=0.02)
    assert road.years[0].maintenance_savings_usd == 0.0  # no electric car in the first year


def test_the_calendar_sends_the_household_shopping_not_to_contractors(cold_gas):
    cars = [r for r in reminders(cold_gas) if r.category == "quotes" and "vehicle" in r.summary.lower()]
    assert len(cars) == 2
    for r in cars:
        assert r.summary.startswith("Shop for the car")
        assert "contractor" not in r.description.lower() and "permit" not in r.description.lower()
    others = [r for r in reminders(cold_gas) if r.category == "quotes" and r not in cars]
    assert others and all("contractors" in r.description for r in others)
